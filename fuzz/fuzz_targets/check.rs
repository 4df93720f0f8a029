//! Any input: the checker gives a model or diagnostics, never a panic; a
//! model that solves keeps equilibrium; the whole analysis and its report
//! never panic.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let src = tandem::source::Source::new("fuzz.tandem", text);
    match tandem::check(&src) {
        Ok(model) => {
            if let Ok(solution) = tandem::solve::solve(&model) {
                // every result was verified: finite and in equilibrium
                for c in &solution.combinations {
                    assert!(c.equilibrium_residual.value.is_finite());
                    assert!(c.parts.iter().all(|p| p.force.value.is_finite()));
                    assert!(c.nodes.iter().all(|n| n.displacement[0].value.is_finite()
                        && n.displacement[1].value.is_finite()));
                }
            }
            // the whole analysis and its report never panic
            if let Ok(a) = tandem::analyse(&src) {
                let d = tandem::report::Display::for_model(&a.model, 4);
                let md = tandem::report::markdown::report(&src, &a, &d);
                assert!(!md.contains("NaN") && !md.contains('∞') && !md.contains("inf "));
                // the drawings and the HTML page never panic and stay finite
                let options = tandem::report::markdown::Options {
                    figures: tandem::report::markdown::Figures::Beside("f".into()),
                    history: None,
                };
                let w = tandem::report::markdown::report_with(&src, &a, &d, &options);
                for g in &w.drawings {
                    assert!(!g.svg.contains("=\"NaN") && !g.svg.contains("=\"inf") && !g.svg.contains("=\"-inf"));
                }
                let _ = tandem::report::html(&w.markdown, &a.model.title, "f", &w.drawings);
            }
        }
        Err(errors) => {
            assert!(!errors.is_empty());
            let _ = tandem::diagnostic::render(&errors, &src, 80, false);
        }
    }
});

//! Any input: the checker gives a model or diagnostics, never a panic; the
//! outline read gives what the full parse and build give; a model that
//! solves keeps equilibrium.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let src = tandem::source::Source::new("fuzz.tandem", text);
    let checked = tandem::check(&src);
    let full = tandem::syntax::parse(text)
        .map_err(|es| es.into_iter().map(tandem::Error::from).collect::<Vec<_>>())
        .and_then(|file| {
            tandem::model::build(&file, tandem::model::Limits::default())
                .map_err(|es| es.into_iter().map(tandem::Error::from).collect())
        });
    assert!(checked == full, "outline and full parse differ");
    match checked {
        Ok(model) => {
            if let Ok(solution) = tandem::solve::solve(&model) {
                for c in &solution.combinations {
                    assert!(c.equilibrium_residual.value <= 1e-6 * c.force_scale.value.max(1.0));
                }
            }
        }
        Err(errors) => {
            assert!(!errors.is_empty());
            let _ = tandem::diagnostic::render(&errors, &src, 80, false);
        }
    }
});

//! Any input: the checker gives a model or diagnostics, never a panic; a
//! model that solves keeps equilibrium.
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

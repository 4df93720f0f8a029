//! Golden diagnostics: each `tests/diagnostics/NAME.tandem` is a bad input and
//! `NAME.stderr` its rendered diagnostics (no colour, 80 columns).
//! Regenerate with `UPDATE_GOLDEN=1 cargo test --test it diagnostics::`.

use std::path::Path;

use tandem::diagnostic::render;
use tandem::source::Source;

fn inputs() -> Vec<std::path::PathBuf> {
    let mut v: Vec<_> =
        std::fs::read_dir(Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/diagnostics"))
            .expect("tests/diagnostics")
            .filter_map(Result::ok)
            .map(|e| e.path())
            .filter(|p| p.extension().is_some_and(|e| e == "tandem"))
            .collect();
    v.sort();
    v
}

#[test]
fn golden_diagnostics() {
    let update = std::env::var_os("UPDATE_GOLDEN").is_some();
    let files = inputs();
    assert!(files.len() >= 15, "at least 15 bad inputs");
    let mut mismatched = Vec::new();
    for path in files {
        let text = std::fs::read_to_string(&path).expect("read input");
        let name = path
            .file_name()
            .map(|n| n.to_string_lossy().to_string())
            .unwrap_or_default();
        let src = Source::new(name.clone(), text);
        let errors = tandem::check(&src).expect_err(&format!("{name} must not check"));
        let rendered = render(&errors, &src, 80, false);
        let golden = path.with_extension("stderr");
        if update {
            std::fs::write(&golden, &rendered).expect("write golden");
            continue;
        }
        let expected = std::fs::read_to_string(&golden).unwrap_or_default();
        if expected != rendered {
            mismatched.push(format!("--- {name}\n{rendered}"));
        }
    }
    assert!(
        mismatched.is_empty(),
        "diagnostics changed (UPDATE_GOLDEN=1 to accept):\n{}",
        mismatched.join("\n")
    );
}

/// Every bad input exits with code 2 from the command line.
#[test]
fn bad_inputs_exit_2() {
    for path in inputs() {
        let out = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
            .arg("check")
            .arg(&path)
            .output()
            .expect("run tandem");
        assert_eq!(out.status.code(), Some(2), "{}", path.display());
        assert!(!out.stderr.is_empty(), "{}", path.display());
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert!(
            !stderr.contains("Rule::") && !stderr.contains("expr_"),
            "pest names leaked: {stderr}"
        );
    }
}

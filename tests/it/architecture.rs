//! The direction of imports (docs/architecture.md, "Invariants"): each
//! stage uses only the stages before it and the leaf modules. Read from the
//! source text: a `crate::` path in a file names a module it uses.

use std::path::{Path, PathBuf};

fn sources(under: &str) -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("src")
        .join(under);
    if root.extension().is_some() {
        return vec![root];
    }
    let mut out = Vec::new();
    let mut stack = vec![root];
    while let Some(dir) = stack.pop() {
        for e in std::fs::read_dir(&dir).expect("read src") {
            let p = e.expect("entry").path();
            if p.is_dir() {
                stack.push(p);
            } else if p.extension().is_some_and(|x| x == "rs") {
                out.push(p);
            }
        }
    }
    out
}

/// `module` (a file or folder under src/) names none of `forbidden`.
fn uses_none(module: &str, forbidden: &[&str]) {
    for path in sources(module) {
        let text = std::fs::read_to_string(&path).expect("read");
        for f in forbidden {
            let needle = format!("crate::{f}");
            let bad = text
                .lines()
                .filter(|l| !l.trim_start().starts_with("//"))
                .any(|l| {
                    l.match_indices(&needle).any(|(i, _)| {
                        !l[i + needle.len()..]
                            .starts_with(|c: char| c.is_alphanumeric() || c == '_')
                    })
                });
            assert!(!bad, "{} uses crate::{f}", path.display());
        }
    }
}

/// The stages, in the order data flows through them.
const STAGES: [&str; 9] = [
    "syntax",
    "units",
    "model",
    "solve",
    "checks",
    "report",
    "review",
    "diagnostic",
    "output",
];

#[test]
fn leaf_modules_use_no_stage() {
    for leaf in [
        "words.rs",
        "warning.rs",
        "source.rs",
        "parallel.rs",
        "history.rs",
        "units",
    ] {
        uses_none(leaf, &STAGES);
    }
}

#[test]
fn syntax_knows_nothing_of_the_model() {
    uses_none("syntax", &STAGES[2..]);
}

#[test]
fn the_model_knows_nothing_of_solving_checking_or_reporting() {
    uses_none("model", &STAGES[3..]);
}

#[test]
fn the_solver_reads_the_model_only() {
    uses_none("solve", &[&STAGES[..1], &STAGES[4..]].concat());
}

#[test]
fn checks_do_not_import_the_report() {
    uses_none("checks.rs", &STAGES[5..]);
}

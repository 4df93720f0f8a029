//! The command line: exit codes and output of every shipped example.

use std::process::Command;

fn tandem(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_tandem"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(args)
        .output()
        .expect("run tandem")
}

fn examples() -> Vec<String> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .expect("examples")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|e| e == "tandem"))
        .map(|p| {
            format!(
                "examples/{}",
                p.file_name()
                    .map(|n| n.to_string_lossy().to_string())
                    .unwrap_or_default()
            )
        })
        .collect();
    v.sort();
    v
}

#[test]
fn every_example_checks() {
    let files = examples();
    assert!(files.len() >= 3);
    let mut args = vec!["check"];
    args.extend(files.iter().map(String::as_str));
    let out = tandem(&args);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{stdout}{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert_eq!(
        stdout.lines().filter(|l| l.contains(": ok, ")).count(),
        files.len()
    );
}

#[test]
fn check_summary_line() {
    let out = tandem(&["check", "examples/hung_platform.tandem"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.contains("plane model, 2 materials, 2 parts, 6 nodes, 1 combination, 1 check"),
        "{stdout}"
    );
}

#[test]
fn missing_file_exits_2() {
    let out = tandem(&["check", "no/such/file.tandem"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("cannot read"));
}

#[test]
fn units_lists_the_table() {
    let out = tandem(&["units"]);
    assert_eq!(out.status.code(), Some(0));
    let s = String::from_utf8_lossy(&out.stdout);
    for name in ["ksi", "kip", "degF", "microstrain", "MPa"] {
        assert!(s.lines().any(|l| l.starts_with(name)), "{name} missing");
    }
}

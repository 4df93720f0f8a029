//! The command line: exit codes and output of every shipped example.

use super::common::tandem;

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

#[test]
fn every_example_solves() {
    for f in examples() {
        let out = tandem(&["solve", &f]);
        let code = out.status.code();
        assert!(
            code == Some(0) || code == Some(1),
            "{f}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        assert!(String::from_utf8_lossy(&out.stdout).contains("equilibrium residual"));
    }
}

#[test]
fn failing_check_exits_1() {
    // the bolted sleeve's surge case overstresses the bolt on purpose
    let out = tandem(&["solve", "examples/bolted_sleeve.tandem"]);
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stdout).contains("FAIL"));
}

#[test]
fn mechanism_exits_2_and_names_the_node() {
    let out = tandem(&["solve", "tests/solve/mechanism.tandem"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("mechanism") && err.contains("node `"), "{err}");
}

/// The JSON follows the documented shape: SI units, unit-carrying keys.
#[test]
fn json_shape() {
    let out = tandem(&["solve", "examples/filled_post.tandem", "--json"]);
    assert_eq!(out.status.code(), Some(0));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    assert_eq!(v["model"]["kind"], "axial");
    assert_eq!(v["model"]["parts"], 2);
    let c = &v["combinations"][0];
    assert_eq!(c["name"], "service");
    for key in ["force_N", "stress_Pa", "strain", "elongation_m", "state"] {
        assert!(!c["parts"][0][key].is_null(), "{key}");
    }
    for key in ["displacement_m", "reaction_N"] {
        assert!(c["nodes"][0][key].is_number(), "{key}");
    }
    assert!(c["equilibrium_residual_N"].is_number());
    let check = &v["checks"][0];
    for key in [
        "label",
        "combination",
        "demand",
        "capacity",
        "utilization",
        "pass",
    ] {
        assert!(!check[key].is_null(), "{key}");
    }
    // the base reaction balances the factored load: 1.2 x 95 + 1.6 x 60 = 210 kip
    let r = v["combinations"][1]["nodes"][0]["reaction_N"]
        .as_f64()
        .unwrap_or(0.0);
    assert!((r - 210.0 * 4_448.221_615_260_5).abs() < 1e-6 * r);
}

#[test]
fn plane_json_uses_pairs() {
    let out = tandem(&["solve", "examples/hung_platform.tandem", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    assert!(v["combinations"][0]["nodes"][0]["displacement_m"].is_array());
    assert!(v["combinations"][0]["nodes"][0]["reaction_N"].is_array());
}

#[test]
fn units_flag_changes_display() {
    let out = tandem(&["solve", "examples/filled_post.tandem", "--units", "si"]);
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(
        s.contains("force (kN)") && s.contains("stress (MPa)"),
        "{s}"
    );
    let out = tandem(&[
        "solve",
        "examples/filled_post.tandem",
        "--units",
        "lbf,psi,mm",
    ]);
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(
        s.contains("force (lbf)") && s.contains("stress (psi)") && s.contains("(mm)"),
        "{s}"
    );
    let out = tandem(&["solve", "examples/filled_post.tandem", "--units", "furlong"]);
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn report_to_stdout_and_exit_codes() {
    let out = tandem(&["report", "examples/filled_post.tandem"]);
    assert_eq!(out.status.code(), Some(0));
    let md = String::from_utf8_lossy(&out.stdout);
    assert!(md.starts_with("# Column C-3"));
    assert!(md.contains("qualified engineer"));
    let out = tandem(&["report", "examples/bolted_sleeve.tandem"]);
    assert_eq!(out.status.code(), Some(1));
    let out = tandem(&["report", "tests/solve/mechanism.tandem"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(out.stdout.is_empty());
}

#[test]
fn report_many_files_into_a_folder() {
    let dir = std::env::temp_dir().join(format!("tandem-reports-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("mkdir");
    let d = dir.display().to_string();
    let files = examples();
    let mut args = vec!["report", "-o", &d, "--html"];
    args.extend(files.iter().map(String::as_str));
    let out = tandem(&args);
    assert_eq!(
        out.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    for f in &files {
        let stem = std::path::Path::new(f)
            .file_stem()
            .map(|s| s.to_string_lossy().to_string())
            .unwrap_or_default();
        let html =
            std::fs::read_to_string(dir.join(format!("{stem}.html"))).expect("report written");
        assert!(html.starts_with("<!DOCTYPE html>"));
    }
    // no temporary files are left behind
    let leftovers = std::fs::read_dir(&dir)
        .expect("dir")
        .flatten()
        .filter(|e| e.file_name().to_string_lossy().ends_with(".tmp"))
        .count();
    assert_eq!(leftovers, 0);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn report_refuses_to_overwrite_its_input() {
    let dir = std::env::temp_dir().join(format!("tandem-input-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("mkdir");
    let input = dir.join("calc.tandem");
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/filled_post.tandem"),
    )
    .expect("read");
    std::fs::write(&input, &text).expect("write");
    let p = input.display().to_string();
    let out = tandem(&["report", &p, "-o", &p]);
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(std::fs::read_to_string(&input).expect("still there"), text);
    let _ = std::fs::remove_dir_all(&dir);
}

/// The calc shown in README.md checks and solves, so the README stays true.
#[test]
fn readme_calc_solves() {
    let readme =
        std::fs::read_to_string(std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md"))
            .expect("README");
    let at = readme.find("## A calc file").expect("section");
    let block = readme[at..].split("```").nth(1).expect("code block");
    let src = tandem::source::Source::new("README.md", block);
    let a = tandem::analyse(&src)
        .unwrap_or_else(|e| panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)));
    assert_eq!(a.model.parts.len(), 2);
    assert_eq!(a.checks.failures(), 0);
}

/// `-o FILE.html` writes the HTML page, as `--html` does; `-o FILE.md`
/// and standard output stay Markdown.
#[test]
fn an_html_file_name_asks_for_html() {
    let dir = tempfile::tempdir().expect("dir");
    let post = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/filled_post.tandem");
    for (name, html) in [("post.html", true), ("POST.HTM", true), ("post.md", false)] {
        let out = dir.path().join(name);
        let o = tandem(&["report", post, "-o", &out.to_string_lossy()]);
        assert_eq!(
            o.status.code(),
            Some(0),
            "{}",
            String::from_utf8_lossy(&o.stderr)
        );
        let text = std::fs::read_to_string(&out).expect("report");
        assert_eq!(
            text.contains("<html"),
            html,
            "{name}: {}",
            text.chars().take(80).collect::<String>()
        );
        assert_eq!(text.starts_with("# "), !html, "{name}");
    }
}

//! Every limit gives a diagnostic, never a crash or an exhausted machine.

use crate::common;

use tandem::model::{build, Limits, ModelError};
use tandem::source::Source;

#[test]
fn too_many_declarations() {
    let text = "let a = 1\n".repeat(20);
    let file = tandem::syntax::parse(&text).expect("parses");
    let errors = build(
        &file,
        Limits {
            max_declarations: 10,
            max_name_len: 128,
        },
    )
    .expect_err("limit");
    assert!(matches!(
        errors[0],
        ModelError::TooMany {
            what: "declarations",
            count: 20,
            limit: 10,
            ..
        }
    ));
}

#[test]
fn file_size_limit() {
    let dir = std::env::temp_dir().join(format!("tandem-size-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("mkdir");
    let f = dir.join("big.tandem");
    std::fs::write(&f, "let a = 1 in\n".repeat(100)).expect("write");
    let err = tandem::read_source_limited(&f, 64).expect_err("refused");
    assert!(err.contains("at most 64 bytes"), "{err}");
    assert!(tandem::read_source_limited(&f, 1 << 20).is_ok());
    // the command line refuses a folder and a file that is not UTF-8
    std::fs::write(&f, [0xff, 0xfe, 0x00]).expect("write");
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .arg("check")
        .arg(&f)
        .output()
        .expect("run");
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("not UTF-8"));
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .arg("check")
        .arg(&dir)
        .output()
        .expect("run");
    assert_eq!(out.status.code(), Some(2));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn active_set_trial_limit() {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/bolted_sleeve.tandem"),
    )
    .expect("read");
    let m = common::model(&text);
    // the surge combination needs a second trial (the sleeve lets go)
    let err = tandem::solve::solve_with(&m, 1).expect_err("limit");
    let src = Source::new("bolted_sleeve.tandem", text);
    let shown = tandem::diagnostic::render(&[err.into()], &src, 80, false);
    assert!(shown.contains("did not settle after 1 trials"), "{shown}");
    assert!(tandem::solve::solve_with(&m, 5).is_ok());
}

#[test]
fn deep_nesting_in_every_position() {
    for template in ["let a = {}", "node n at {}", "check \"c\" : {} <= 1"] {
        let deep = format!("{}1{}", "(".repeat(500), ")".repeat(500));
        let src = Source::new("deep.tandem", template.replace("{}", &deep));
        let errors = tandem::check(&src).expect_err("too deep");
        assert!(format!("{errors:?}").contains("TooDeep"));
    }
    // a long flat chain is fine: sums are flat lists, not deep trees
    let long = vec!["1 in"; 20_000].join(" + ");
    let m = common::value(&format!("let a = {long}"), "a");
    assert!((m.value - 20_000.0 * 0.0254).abs() < 1e-6);
}

#[test]
fn long_chains_of_lets_do_not_recurse() {
    let mut text = String::from("let v0 = 1 in\n");
    for i in 1..20_000 {
        text.push_str(&format!("let v{i} = v{} + 1 in\n", i - 1));
    }
    let q = common::value(&text, "v19999");
    assert!((q.value - 20_000.0 * 0.0254).abs() < 1e-6);
}

/// Thousands of wrong names: every one is an error, the first ones get a
/// suggestion (each scans every name), and only the first
/// `MAX_SHOWN` are drawn, with the count of the rest, so that a generated
/// file gone wrong is reported at once rather than after minutes.
#[test]
fn thousands_of_errors_are_counted_but_drawn_and_suggested_for_the_first() {
    use std::fmt::Write as _;
    let n = 3000;
    let mut text = String::from("material s { E = 29000 ksi }\nnode node0 at 0 in\nfix node0\n");
    for i in 1..=n {
        let _ = writeln!(text, "node node{i} at {i} in");
    }
    for i in 1..=n {
        let _ = writeln!(
            text,
            "part p{i} {{ material = s; area = 1 in^2; ends = nodx{}, node{i} }}",
            i - 1
        );
    }
    let src = Source::new("many.tandem", text);
    let errors = tandem::check(&src).expect_err("unknown nodes");
    assert_eq!(errors.len(), n);
    let help = |e: &tandem::Error| {
        miette::Diagnostic::help(e)
            .map(|h| h.to_string())
            .unwrap_or_default()
    };
    assert!(
        help(&errors[0]).contains("did you mean"),
        "{}",
        help(&errors[0])
    );
    assert!(!help(&errors[n - 1]).contains("did you mean"));
    let shown = tandem::diagnostic::render(&errors, &src, 80, false);
    let drawn = shown.matches("× unknown node").count();
    assert_eq!(drawn, tandem::diagnostic::MAX_SHOWN, "{drawn} drawn");
    assert!(shown.contains(&format!(
        "and {} more errors not shown",
        n - tandem::diagnostic::MAX_SHOWN
    )));
}

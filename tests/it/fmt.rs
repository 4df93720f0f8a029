//! The formatter: idempotent, comment-preserving, meaning-preserving, and
//! never writing a file that does not parse.

use std::path::PathBuf;

use tandem::review::fmt::format;
use tandem::source::Source;

fn inputs() -> Vec<PathBuf> {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let mut v = Vec::new();
    for dir in ["examples", "tests/reports"] {
        for e in std::fs::read_dir(root.join(dir)).expect("dir").flatten() {
            if e.path().extension().is_some_and(|x| x == "tandem") {
                v.push(e.path());
            }
        }
    }
    v.sort();
    v
}

fn fmt(text: &str) -> String {
    format(&Source::new("t.tandem", text)).expect("formats")
}

/// Solved results as JSON: numbers bit for bit, names, states, checks.
fn results(text: &str) -> String {
    let src = Source::new("same.tandem", text);
    let a = tandem::analyse(&src)
        .unwrap_or_else(|e| panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)));
    let mut lets: Vec<String> = a
        .model
        .lets
        .iter()
        .map(|l| format!("{}={:?}", l.name, l.value))
        .collect();
    lets.sort();
    format!(
        "{}\n{}\n{:?}",
        tandem::report::json::solution_json("same", &a),
        lets.join(","),
        a.model.title
    )
}

#[test]
fn formatting_is_idempotent_and_keeps_the_model() {
    for path in inputs() {
        let text = std::fs::read_to_string(&path).expect("read");
        let once = fmt(&text);
        assert_eq!(fmt(&once), once, "{} is not idempotent", path.display());
        assert_eq!(
            results(&text),
            results(&once),
            "{} changed meaning",
            path.display()
        );
    }
}

#[test]
fn shipped_files_are_formatted() {
    for path in inputs() {
        let text = std::fs::read_to_string(&path).expect("read");
        assert_eq!(fmt(&text), text, "run `tandem fmt {}`", path.display());
    }
}

#[test]
fn messy_layout_is_made_canonical() {
    let messy = "# header comment\nmaterial   steel{E=29000 ksi\n      alpha =  6.5e-6/degF # per degree\n}\nlet  a=2   in^2\nlet longer_name = 3*a   # trailing\nnode n0 at 0 in\nnode far at 100 in\n\n\n\nfix n0\npart p { material = steel; area = a; ends = n0, far }\ncase c1 { load far = 1 kip }\ncase two {\n  # before the load\n  load far = 2 kip\n  temperature = 10 degF\n}\n# at the end\n";
    let want = "# header comment\nmaterial steel {\n  E     = 29000 ksi\n  alpha = 6.5e-6/degF  # per degree\n}\n\nlet a           = 2 in^2\nlet longer_name = 3*a  # trailing\n\nnode n0  at 0 in\nnode far at 100 in\n\nfix n0\n\npart p {\n  material = steel\n  area     = a\n  ends     = n0, far\n}\n\ncase c1 { load far = 1 kip }\n\ncase two {\n  # before the load\n  load far    = 2 kip\n  temperature = 10 degF\n}\n\n# at the end\n";
    assert_eq!(fmt(messy), want);
    assert_eq!(results(messy), results(want));
}

#[test]
fn comments_stay_where_they_were() {
    let text = "# one\n# two\nlet a = 1 in # t1\n\n# before node\nnode x at a\npart p {\n  # inside, first\n  stiffness = 3 kip/in # t2\n  ends = x, y\n  # inside, last\n}\nnode y at 2 in\nfix x\n";
    let out = fmt(text);
    for c in [
        "# one",
        "# two",
        "# t1",
        "# before node",
        "# inside, first",
        "# t2",
        "# inside, last",
    ] {
        assert_eq!(out.matches(c).count(), 1, "{c} in\n{out}");
    }
    assert!(out.contains("let a = 1 in  # t1"));
    assert!(out.contains("  # inside, last\n}"));
    assert!(out.find("# before node") < out.find("node x"));
    assert!(out.contains("stiffness = 3 kip/in  # t2"));
}

#[test]
fn unparsable_file_is_refused_and_left_alone() {
    assert!(format(&Source::new(
        "bad.tandem",
        "material steel {\n  E = 29000 ksi\n"
    ))
    .is_err());
    let dir = std::env::temp_dir().join(format!("tandem-fmt-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("mkdir");
    let bad = dir.join("bad.tandem");
    let text = "let a = = 3\n";
    std::fs::write(&bad, text).expect("write");
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .args(["fmt"])
        .arg(&bad)
        .output()
        .expect("run");
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(std::fs::read_to_string(&bad).expect("read"), text);
    let good = dir.join("good.tandem");
    std::fs::write(&good, "let a=3\n").expect("write");
    let check = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .args(["fmt", "--check"])
        .arg(&good)
        .output()
        .expect("run");
    assert_eq!(check.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&check.stdout).contains("good.tandem"));
    assert_eq!(std::fs::read_to_string(&good).expect("read"), "let a=3\n");
    let run = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .args(["fmt"])
        .arg(&good)
        .output()
        .expect("run");
    assert_eq!(run.status.code(), Some(0));
    assert_eq!(std::fs::read_to_string(&good).expect("read"), "let a = 3\n");
    let _ = std::fs::remove_dir_all(&dir);
}

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

#[test]
fn one_line_blocks_in_a_run_stay_a_table() {
    // Blocks written one per line, one after another, stay so with their
    // entries in aligned columns; a lone one-line block is opened up.
    let text = "material s { E = 29000 ksi }\nnode a at 0 in\nnode b at 10 in\nnode c at 20 in\nfix a\npart p1 { material = s; area = 1 in^2; ends = a, b }\npart p10 {material=s; area = 12.5 in^2;ends = b, c}  # long\npart p11 { material = s; area = 1.5 in^2; ends = a, c }\nload c = 1 kip\n";
    let want = "material s {\n  E = 29000 ksi\n}\n\nnode a at 0 in\nnode b at 10 in\nnode c at 20 in\n\nfix a\n\npart p1  { material = s; area = 1 in^2;    ends = a, b }\npart p10 { material = s; area = 12.5 in^2; ends = b, c }  # long\npart p11 { material = s; area = 1.5 in^2;  ends = a, c }\n\nload c = 1 kip\n";
    assert_eq!(fmt(text), want);
    assert_eq!(fmt(want), want, "not idempotent");
    assert_eq!(results(text), results(want));
}

#[test]
fn a_blank_line_between_groups_of_one_line_declarations_is_kept() {
    let text = "let a = 1 in\nlet bb = 2 in\n\nlet ccc = 3 in\n";
    let want = "let a  = 1 in\nlet bb = 2 in\n\nlet ccc = 3 in\n";
    assert_eq!(fmt(text), want);
    assert_eq!(fmt(want), want, "not idempotent");
}

#[test]
fn comments_in_a_long_file_each_keep_their_line() {
    // The placement pass is one sweep over lines and comments: every
    // comment of a generated file with thousands of them lands on its line.
    let mut text = String::from("material s { E = 29000 ksi }\nnode n0 at 0 in\nfix n0\n");
    for i in 1..=3000 {
        text.push_str(&format!("# node {i}\nnode n{i} at {i} in  # at {i}\n"));
    }
    text.push_str("load n3000 = 1 kip\n");
    let once = fmt(&text);
    let lines: Vec<&str> = once.lines().collect();
    for i in (1..=3000).step_by(499) {
        let k = lines
            .iter()
            .position(|l| l.starts_with(&format!("node n{i} ")))
            .expect("node kept");
        assert_eq!(
            lines[k - 1],
            format!("# node {i}"),
            "own-line comment {i} moved"
        );
        assert!(
            lines[k].ends_with(&format!("  # at {i}")),
            "trailing comment {i} moved"
        );
    }
    assert_eq!(fmt(&once), once);
}

/// Beams, pins, rotation supports, moments and loads along a beam keep
/// their meaning and take the canonical layout, once and for all.
#[test]
fn beam_statements_take_the_canonical_layout() {
    let text = "material oak { E = 11 GPa }\nnode a at (0 m, 0 m)\nnode b at (4 m, 0 m)\n\
                pin   a\nfix b rotation ,  b x\nbeam lintel { material = oak\n section = rect(b = 100 mm, h = 250 mm)\n ends = a, b\n hinge = a }\n\
                case dead {\n  load lintel = (0 kN/m, -3 kN/m)\n  moment   b = 2 kN*m\n  settle b rotation = 0.002\n}\n";
    let once = fmt(text);
    assert_eq!(fmt(&once), once);
    for line in [
        "pin a\n",
        "fix b rotation, b x\n",
        "beam lintel {\n  material = oak\n",
        "  hinge    = a\n",
        "  settle b rotation = 0.002\n",
    ] {
        assert!(once.contains(line), "{line:?} in\n{once}");
    }
    // one run of case statements, `=` aligned
    assert!(
        once.lines()
            .any(|l| l.starts_with("  moment b ") && l.ends_with(" = 2 kN*m")),
        "{once}"
    );
    // the model it describes is unchanged, supports and loads included
    let (m0, m1) = (
        tandem::check(&tandem::source::Source::new("a", text.to_string())).expect("checks"),
        tandem::check(&tandem::source::Source::new("b", once.clone())).expect("checks"),
    );
    assert_eq!(m0.nodes[1].fixed_rotation, m1.nodes[1].fixed_rotation);
    assert!(m1.nodes[1].fixed_rotation && m1.nodes[0].fixed == [true, true]);
    assert!(!m1.nodes[0].fixed_rotation);
    let moment = |m: &tandem::model::Model| {
        m.cases[0]
            .moments
            .iter()
            .map(|x| (x.node, x.moment))
            .collect::<Vec<_>>()
    };
    assert_eq!(moment(&m0), moment(&m1));
    assert_eq!(moment(&m1), vec![(1, 2000.0)]);
    let w = m1.cases[0].distributed[0].w;
    assert!(w[0].abs() < 1e-12 && (w[1] + 3000.0).abs() < 1e-9, "{w:?}");
    assert!((m1.cases[0].twists[0].angle - 0.002).abs() < 1e-15);
    let bend = m1.parts[0].bend.as_ref().expect("a beam");
    // rect(b = 100 mm, h = 250 mm) about its strong axis: I = b·h³/12,
    // c = h/2 (mechanics of materials, rectangle)
    assert!((bend.inertia - 0.1 * 0.25f64.powi(3) / 12.0).abs() < 1e-15);
    assert!((bend.fibre - 0.125).abs() < 1e-15);
    assert_eq!(bend.hinge, [true, false]);
}

//! What the result depends on: elasticities of the utilizations to each
//! `let`, against closed forms (a rod's stress σ = P/A, Hooke's law; a
//! restrained rod heated, σ = −E·α·ΔT) and against finite differences of
//! the examples computed here by editing the calc text itself.

use tandem::review::sensitivity::Method;
use tandem::source::Source;

fn analysed(text: &str) -> tandem::Analysis {
    let src = Source::new("s.tandem", text.to_string());
    let mut a = tandem::analyse(&src)
        .unwrap_or_else(|e| panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)));
    tandem::with_sensitivity(&src, &mut a);
    a
}

fn input<'a>(a: &'a tandem::Analysis, name: &str) -> &'a tandem::review::sensitivity::Input {
    a.sensitivity
        .as_ref()
        .expect("computed")
        .inputs
        .iter()
        .find(|i| i.name == name)
        .unwrap_or_else(|| panic!("no input {name}"))
}

/// A single rod: U = (P/A)/fy, so the elasticity is +1 to the load, −1 to
/// the area and −1 to the allowable, exactly (a power law), and 0 to a
/// `let` the result does not depend on. A `let` nothing uses is not listed.
#[test]
fn a_rods_utilization_is_a_power_law_of_its_inputs() {
    let a = analysed(
        "let P = 12 kN\nlet A = 100 mm^2\nlet fy = 250 MPa\nlet L = 2 m\nlet unused = 3 kN\n\
         material s { E = 200 GPa }\nnode a at 0 m\nnode b at L\nfix a\n\
         part rod { material = s; area = A; ends = a, b }\nload b = P\n\
         check \"stress\" : rod.stress <= fy\n",
    );
    for (name, want) in [("P", 1.0), ("A", -1.0), ("fy", -1.0), ("L", 0.0)] {
        let i = input(&a, name);
        assert!(
            matches!(i.method, Some(Method::Exact { .. })),
            "{name}: {:?}",
            i.method
        );
        let g = i.governing.expect("an influence");
        assert!((g - want).abs() <= 1e-9, "{name}: {g} against {want}");
        assert_eq!(i.checks[0], i.governing, "{name}");
    }
    let s = a.sensitivity.as_ref().expect("computed");
    assert!(s.inputs.iter().all(|i| i.name != "unused"));
    // most influential first: the three of size 1 before the length
    assert_eq!(s.inputs.last().map(|i| i.name.as_str()), Some("L"));
}

/// A rod held at both ends and heated by ΔT = 0 at the design point: the
/// derivative, not the elasticity, dU/dΔT = E·α / limit per kelvin (σ =
/// −E·α·ΔT), exact because U is linear in ΔT.
#[test]
fn a_zero_input_gets_its_derivative() {
    let a = analysed(
        "let dT = 0 degC\nlet limit = 240 MPa\n\
         material s { E = 200 GPa; alpha = 12e-6 / degC }\nnode a at 0 m\nnode b at 1 m\nfix a\nfix b\n\
         part rod { material = s; area = 100 mm^2; ends = a, b }\n\
         case heat { temperature = dT }\n\
         check \"compression\" : -rod.stress <= limit\n",
    );
    let i = input(&a, "dT");
    assert!(
        matches!(i.method, Some(Method::Absolute { exact: true, .. })),
        "{:?}",
        i.method
    );
    let want = 200e9 * 12e-6 / 240e6;
    let got = i.governing.expect("a derivative");
    assert!((got - want).abs() <= 1e-9 * want, "{got} against {want}");
}

/// On every shipped example, the most influential input's elasticity
/// agrees with finite differences computed here by writing the input's
/// value times e^±h into the calc text and solving again.
#[test]
fn elasticities_agree_with_finite_differences_of_the_text() {
    let h: f64 = 1e-4;
    let mut checked = 0;
    for e in std::fs::read_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/examples"))
        .expect("examples")
        .flatten()
    {
        let path = e.path();
        if path.extension().is_none_or(|x| x != "tandem") {
            continue;
        }
        let text = std::fs::read_to_string(&path).expect("read");
        let a = analysed(&text);
        let s = a.sensitivity.as_ref().expect("computed");
        let Some(top) = s.inputs.first() else {
            continue;
        };
        let (Some(g), false) = (top.governing, top.value.value == 0.0) else {
            continue;
        };
        // `let NAME = EXPR` -> `let NAME = (EXPR) * FACTOR`
        let moved = |factor: f64| {
            text.lines()
                .map(|l| {
                    let head = format!("let {} ", top.name);
                    match (l.starts_with(&head), l.split_once('=')) {
                        (true, Some((lhs, rhs))) => {
                            let (expr, comment) = rhs.split_once('#').unwrap_or((rhs, ""));
                            let comment = if comment.is_empty() {
                                String::new()
                            } else {
                                format!(" #{comment}")
                            };
                            format!("{lhs}= ({}) * {factor:e}{comment}\n", expr.trim())
                        }
                        _ => format!("{l}\n"),
                    }
                })
                .collect::<String>()
        };
        let governing = |t: &str| {
            let src = Source::new("moved.tandem", t.to_string());
            let b = tandem::analyse(&src)
                .unwrap_or_else(|e| panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)));
            b.checks
                .outcomes
                .iter()
                .chain(b.long_term_checks.iter().flat_map(|(_, c)| &c.outcomes))
                .filter_map(|o| o.utilization)
                .fold(f64::NEG_INFINITY, f64::max)
        };
        let (up, down) = (governing(&moved(h.exp())), governing(&moved((-h).exp())));
        let fd = (up.ln() - down.ln()) / (2.0 * h);
        assert!(
            (fd - g).abs() <= 1e-6 * g.abs().max(1e-3),
            "{}: `{}` {g} against {fd}",
            path.display(),
            top.name
        );
        checked += 1;
    }
    assert!(checked >= 5, "only {checked} examples checked");
}

/// `solve --json` carries the sensitivity, in the published schema's
/// layout; `report` has its section.
#[test]
fn solve_json_and_the_report_carry_it() {
    let out = super::common::tandem(&["solve", "--json", "examples/filled_post.tandem"]);
    assert_eq!(out.status.code(), Some(0));
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    let inputs = j["sensitivity"]["inputs"].as_array().expect("inputs");
    assert!(!inputs.is_empty());
    for i in inputs {
        assert!(i["name"].is_string() && i["how"].is_string(), "{i}");
        assert!(i["checks"].as_array().is_some_and(|c| !c.is_empty()), "{i}");
    }
    let out = super::common::tandem(&["report", "examples/filled_post.tandem"]);
    let md = String::from_utf8_lossy(&out.stdout);
    assert!(md.contains("## What the result depends on"), "{md}");
    assert!(md.contains("| Input | Value | Governing utilization | How computed |"));
}

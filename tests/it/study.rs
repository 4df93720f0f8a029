//! The numbers updated in place (what every sweep step and sample runs)
//! against a full build, and the sweep's grid, streaming table and
//! bounded chart against closed forms.

use tandem::model::{build_with, Limits, Rebuild};
use tandem::review::sweep::{Axis, Seek, Sweeper};
use tandem::source::Source;
use tandem::units::Quantity;

use super::common::tandem;

fn examples() -> Vec<(String, String)> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut out: Vec<(String, String)> = std::fs::read_dir(dir)
        .expect("examples")
        .flatten()
        .filter(|e| e.path().extension().is_some_and(|x| x == "tandem"))
        .map(|e| {
            (
                e.file_name().to_string_lossy().into_owned(),
                std::fs::read_to_string(e.path()).expect("read"),
            )
        })
        .collect();
    out.sort();
    out
}

/// Every `let` of every example, moved by a few percent one at a time and
/// then all together: the model updated in place equals the model a full
/// build gives at those values, field for field (an independent path: the
/// whole syntax tree evaluated again).
#[test]
fn a_model_updated_in_place_equals_a_full_build() {
    let mut tried = 0;
    for (name, text) in examples() {
        let file = tandem::syntax::parse(&text).expect("parses");
        let base = tandem::model::build(&file, Limits::default()).expect("builds");
        let lets: Vec<(String, Quantity)> = base
            .lets
            .iter()
            .map(|l| (l.name.clone(), l.value))
            .collect();
        for (l, x) in &lets {
            let (mut rebuild, mut model) =
                Rebuild::new(&file, Limits::default(), &[l]).unwrap_or_else(|_| panic!("{name}"));
            for f in [1.07, 0.93, 1.0] {
                let moved = Quantity::new(x.value * f, x.dim);
                let full = build_with(&file, Limits::default(), &[(l.clone(), moved)]);
                let updated = rebuild.update(&mut model, &[moved]);
                match full {
                    Ok(full) => {
                        assert!(updated.is_ok(), "{name}: {l} × {f}");
                        assert!(full == model, "{name}: {l} × {f}: the models differ");
                    }
                    Err(_) => assert!(updated.is_err(), "{name}: {l} × {f} should fail"),
                }
                tried += 1;
            }
        }
        // all at once
        let names: Vec<&str> = lets.iter().map(|(n, _)| n.as_str()).collect();
        let (mut rebuild, mut model) =
            Rebuild::new(&file, Limits::default(), &names).unwrap_or_else(|_| panic!("{name}"));
        let moved: Vec<(String, Quantity)> = lets
            .iter()
            .map(|(n, x)| (n.clone(), Quantity::new(x.value * 1.05, x.dim)))
            .collect();
        let values: Vec<Quantity> = moved.iter().map(|(_, q)| *q).collect();
        if let Ok(full) = build_with(&file, Limits::default(), &moved) {
            rebuild.update(&mut model, &values).expect("updates");
            assert!(full == model, "{name}: every let × 1.05: the models differ");
        }
    }
    assert!(tried > 30, "{tried}");
}

/// A value out of its sane range is the full build's error, and the next
/// good value mends the model.
#[test]
fn a_failed_update_is_an_error_and_the_next_mends_it() {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/sweep/plate.tandem"),
    )
    .expect("read");
    let file = tandem::syntax::parse(&text).expect("parses");
    let (mut rebuild, mut model) =
        Rebuild::new(&file, Limits::default(), &["t"]).unwrap_or_else(|_| panic!("rebuild"));
    let t = |inches: f64| Quantity::new(inches * 0.0254, tandem::units::Dimension::LENGTH);
    let bad = rebuild.update(&mut model, &[t(0.0)]);
    let full = build_with(&file, Limits::default(), &[("t".into(), t(0.0))]);
    let (Err(a), Err(b)) = (bad, full) else {
        panic!("a zero thickness must fail");
    };
    assert_eq!(a[0].to_string(), b[0].to_string());
    rebuild.update(&mut model, &[t(0.75)]).expect("updates");
    let full = build_with(&file, Limits::default(), &[("t".into(), t(0.75))]).expect("builds");
    assert!(full == model);
}

fn plate_with_load() -> Source {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/sweep/plate.tandem"),
    )
    .expect("read")
    .replace("let t = 0.5 in", "let t = 0.5 in\nlet P = 400 kip")
    .replace("load b = -400 kip", "load b = -P");
    Source::new("plate.tandem", text)
}

fn axis(name: &str, from: &str, to: &str, steps: usize) -> Axis {
    Axis {
        name: name.into(),
        from: tandem::quantity(from).expect("from"),
        to: tandem::quantity(to).expect("to"),
        steps,
        unit: None,
    }
}

/// Parallel share (mechanics of materials): the plate's stress is
/// σ = P·E_s / (E_s·A_s + E_c·A_c) with A_s = 10 in · t, and its check
/// reads σ / 20 ksi. On a grid of t and P every step agrees, and the seek
/// finds, for each P, t = (P·E_s/σ − E_c·A_c) / (E_s · 10 in) at σ = 20 ksi.
#[test]
fn a_grid_agrees_with_the_closed_form_and_seeks_along_each_row() {
    let src = plate_with_load();
    let sweeper = Sweeper::grid(&src, &["t", "P"], &[]).unwrap_or_else(|_| panic!("sweeper"));
    let axes = [
        axis("t", "0.2 in", "1.4 in", 13),
        axis("P", "350 kip", "550 kip", 5),
    ];
    let mut kept = tandem::review::sweep::Collect::default();
    let seek = sweeper
        .run(&axes, Some(1e-10), &mut kept, &|_| {})
        .unwrap_or_else(|_| panic!("sweep"))
        .expect("seek");
    let sweep = kept.into_sweep();
    assert_eq!(sweep.steps.len(), 65);
    let kip = 4_448.221_615_260_5;
    for s in &sweep.steps {
        let t_in = s.value.value / 0.0254;
        let p_kip = s.second.expect("second").value / kip;
        let sigma = p_kip * 29000.0 / (29000.0 * 10.0 * t_in + 4000.0 * 100.0);
        let u = s.governing.expect("governing");
        assert!((u - sigma / 20.0).abs() < 1e-9, "t {t_in} P {p_kip}: {u}");
    }
    let Seek::Found {
        crossings, second, ..
    } = seek
    else {
        panic!("roots lie in the grid");
    };
    assert_eq!(crossings.len(), second.len());
    assert_eq!(crossings.len(), 5, "one crossing per load");
    for (t, p) in crossings.iter().zip(&second) {
        let p_kip = p.value / kip;
        let exact = (p_kip * 29000.0 / 20.0 - 4000.0 * 100.0) / 29000.0 / 10.0;
        assert!((t.value / 0.0254 - exact).abs() < 1e-6, "P {p_kip}: {t:?}");
    }
}

fn run(args: &[&str]) -> (Option<i32>, String, String) {
    let out = tandem(args);
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

#[test]
fn the_command_line_grid_table_json_and_chart() {
    let dir = tempfile::tempdir().expect("dir");
    let calc = dir.path().join("plate.tandem");
    std::fs::write(&calc, plate_with_load().text).expect("write");
    let calc = calc.display().to_string();
    let svg = dir.path().join("grid.svg");
    let svg_arg = svg.display().to_string();
    let (code, text, err) = run(&[
        "sweep",
        &calc,
        "--vary",
        "t=0.2 in..1.4 in",
        "--vary",
        "P=350 kip..550 kip",
        "--steps",
        "13,3",
        "--seek",
        "--plot",
        &svg_arg,
    ]);
    assert_eq!(code, Some(0), "{err}");
    let lines: Vec<&str> = text.lines().collect();
    assert!(
        lines[0].starts_with("t (in)") && lines[0].contains("P (kip)"),
        "{text}"
    );
    assert_eq!(lines.iter().take_while(|l| !l.is_empty()).count(), 1 + 39);
    assert!(text.contains("reaches 1.0 at these points"), "{text}");
    assert!(text.contains("t = 0.8707 in, P = 450.0 kip"), "{text}");
    // the chart: one curve per load, each named, the seek's points marked
    let doc_text = std::fs::read_to_string(&svg).expect("svg");
    let doc = roxmltree::Document::parse(&doc_text).expect("well-formed");
    let texts: Vec<&str> = doc.descendants().filter_map(|n| n.text()).collect();
    for p in ["P = 350.0 kip", "P = 450.0 kip", "P = 550.0 kip"] {
        assert!(texts.contains(&p), "{p}: {texts:?}");
    }
    let marks = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("mark"))
        .count();
    assert_eq!(marks, 3);
    let (code, json, _) = run(&[
        "sweep",
        &calc,
        "--vary",
        "t=0.2 in..1.4 in",
        "--vary",
        "P=350 kip..550 kip",
        "--steps",
        "4,2",
        "--json",
        "--seek",
    ]);
    assert_eq!(code, Some(0));
    let v: serde_json::Value = serde_json::from_str(&json).expect("json");
    assert_eq!(v["second_parameter"], "P");
    let steps = v["steps"].as_array().expect("steps");
    assert_eq!(steps.len(), 8);
    assert!(steps[7]["second_value_si"].as_f64().is_some());
    assert_eq!(
        v["seek"]["second_si"].as_array().map(Vec::len),
        v["seek"]["crossings_si"].as_array().map(Vec::len)
    );
}

#[test]
fn grid_mistakes_are_errors() {
    let plate = "tests/sweep/plate.tandem";
    for (args, says) in [
        (
            vec!["--vary", "t=1 in..2 in", "--vary", "t=1 in..2 in"],
            "varied twice",
        ),
        (
            vec!["--vary", "t=1 in..2 in", "--steps", "3,4"],
            "gives 2 counts",
        ),
        (
            vec![
                "--vary",
                "t=1 in..2 in",
                "--vary",
                "t=1 in..2 in",
                "--vary",
                "t=1 in..2 in",
            ],
            "one parameter or a grid of two",
        ),
        (
            vec![
                "--vary",
                "t=1 in..2 in",
                "--vary",
                "x=1..2",
                "--steps",
                "3,20",
                "--plot",
                "x.svg",
            ],
            "at most 12 steps",
        ),
        (
            vec![
                "--vary",
                "t=1 in..2 in",
                "--vary",
                "t=1 in..2 in",
                "--steps",
                "1000000,1000000",
            ],
            "at most 10000000",
        ),
    ] {
        let mut all = vec!["sweep", plate];
        all.extend(args);
        let (code, _, err) = run(&all);
        assert_eq!(code, Some(2), "{all:?}: {err}");
        assert!(err.contains(says), "{all:?}: {err}");
    }
}

/// Beyond a few thousand rows the text table's rows wait in a temporary
/// file: it is still one aligned table, every row as wide as the header.
#[test]
fn a_long_table_streams_and_stays_aligned() {
    let (code, text, err) = run(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=0.3 in..1.2 in",
        "--steps",
        "5001",
        "--show",
        "plate.stress",
    ]);
    assert_eq!(code, Some(0), "{err}");
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines.len(), 5002);
    let width = lines[0].chars().count();
    assert!(lines.iter().all(|l| l.chars().count() == width));
    assert!(lines[1].trim_start().starts_with("0.3000"));
    assert!(lines[5001].trim_start().starts_with("1.200"));
}

/// The chart of a long sweep keeps a bounded envelope of each curve: its
/// size does not grow with the steps, and its highest point is the
/// sweep's (the peak of |k − 5| at the ends of 0..10).
#[test]
fn the_chart_of_a_long_sweep_is_bounded_and_keeps_the_peaks() {
    let dir = tempfile::tempdir().expect("dir");
    let calc = dir.path().join("band.tandem");
    std::fs::write(
        &calc,
        "let k = 1\ncheck \"band\" : abs(k - 5) <= 2\nmaterial s { E = 200 GPa }\nnode a at 0 m\nnode b at 1 m\nfix a\npart p { material = s; area = 100 mm^2; ends = a, b }\nload b = 1 kN\n",
    )
    .expect("write");
    let calc = calc.display().to_string();
    let mut sizes = Vec::new();
    for steps in ["2001", "20001"] {
        let svg = dir.path().join(format!("{steps}.svg"));
        let s = svg.display().to_string();
        let (code, _, err) = run(&[
            "sweep", &calc, "--vary", "k=0..10", "--steps", steps, "--plot", &s,
        ]);
        assert_eq!(code, Some(0), "{err}");
        let text = std::fs::read_to_string(&svg).expect("svg");
        roxmltree::Document::parse(&text).expect("well-formed");
        sizes.push(text.len());
    }
    assert!(
        sizes[1] < sizes[0] * 3 / 2,
        "the chart grows with the steps: {sizes:?}"
    );
}

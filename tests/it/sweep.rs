//! Sweeps and goal seek against a closed form.

use tandem::review::sweep::{Seek, Sweeper};
use tandem::source::Source;

const KSI: f64 = 4_448.221_615_260_5 / 0.000_645_16;

fn source() -> Source {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/sweep/plate.tandem");
    Source::new("plate.tandem", std::fs::read_to_string(path).expect("read"))
}

/// Parallel share (mechanics of materials): the plate's stress is
/// σ = P·E_s / (E_s·A_s + E_c·A_c). Setting σ = 20 ksi gives
/// A_s = (P·E_s/σ − E_c·A_c)/E_s = (400·29000/20 − 4000·100)/29000 in²,
/// and t = A_s / 10 in = 0.620 689 655 in.
#[test]
fn seek_finds_the_closed_form_thickness() {
    let src = source();
    let sweeper = Sweeper::new(&src, "t", &["plate.stress".to_string()])
        .unwrap_or_else(|_| panic!("sweeper"));
    let from = tandem::quantity("0.3 in").expect("from");
    let to = tandem::quantity("1.2 in").expect("to");
    let table = sweeper
        .sweep(from, to, 10)
        .unwrap_or_else(|_| panic!("sweep"));
    let exact = (400.0 * 29000.0 / 20.0 - 4000.0 * 100.0) / 29000.0 / 10.0 * 0.0254;
    match sweeper
        .seek(&table, 1e-9)
        .unwrap_or_else(|_| panic!("seek"))
    {
        Seek::Found {
            value, tolerance, ..
        } => {
            assert!(
                (value.value - exact).abs() <= tolerance.max(1e-12),
                "{} vs {exact}",
                value.value
            );
        }
        Seek::NoRoot { .. } => panic!("a root lies in the range"),
    }
    // each step's stress follows the closed form too
    for s in &table.steps {
        let a_s = 10.0 * s.value.value / 0.0254;
        let sigma = 400.0 * 29000.0 / (29000.0 * a_s + 4000.0 * 100.0);
        assert!((-s.shown[0].value / KSI - sigma).abs() < 1e-9 * sigma);
        assert!((s.governing.unwrap_or(0.0) - sigma / 20.0).abs() < 1e-9);
    }
}

#[test]
fn seek_says_when_there_is_no_root() {
    let src = source();
    let sweeper = Sweeper::new(&src, "t", &[]).unwrap_or_else(|_| panic!("sweeper"));
    let table = sweeper
        .sweep(
            tandem::quantity("0.8 in").expect("q"),
            tandem::quantity("1.5 in").expect("q"),
            5,
        )
        .unwrap_or_else(|_| panic!("sweep"));
    assert!(matches!(
        sweeper.seek(&table, 1e-6),
        Ok(Seek::NoRoot { .. })
    ));
}

use super::common::tandem;

#[test]
fn command_line_sweep_and_plot() {
    let svg = std::env::temp_dir().join(format!("tandem-sweep-{}.svg", std::process::id()));
    let s = svg.display().to_string();
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=0.3 in..1.2 in",
        "--steps",
        "10",
        "--seek",
        "--show",
        "plate.stress",
        "--plot",
        &s,
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("t = 0.6207 in"), "{text}");
    let drawing = std::fs::read_to_string(&svg).expect("svg written");
    assert!(drawing.contains("<svg") && drawing.contains("plate stress"));
    // well-formed; the axis titles carry units; the value --seek found is
    // marked on the chart; the legend stands below the data, one swatch
    // per entry (the limit line, the one check, the mark)
    let doc = roxmltree::Document::parse(&drawing).expect("well-formed SVG");
    let texts: Vec<&str> = doc.descendants().filter_map(|n| n.text()).collect();
    assert!(texts.contains(&"t (in)"), "{texts:?}");
    assert!(texts.contains(&"utilization (demand / capacity)"));
    let marks: Vec<_> = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("mark"))
        .collect();
    assert_eq!(marks.len(), 1);
    assert_eq!(marks[0].attribute("data-name"), Some("t = 0.6207 in"));
    let legend = doc
        .descendants()
        .find(|n| n.attribute("class") == Some("legend"))
        .expect("legend");
    let entries = legend
        .children()
        .filter(|n| n.tag_name().name() == "text")
        .count();
    assert_eq!(entries, 3);
    // below the plot area: every legend text lower than the frame's bottom
    for t in legend.children().filter(|n| n.tag_name().name() == "text") {
        let y: f64 = t.attribute("y").and_then(|v| v.parse().ok()).expect("y");
        assert!(y > 344.0, "legend inside the data at y = {y}");
    }
    let _ = std::fs::remove_file(&svg);
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=0.3 in..1.2 in",
        "--json",
        "--seek",
    ]);
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    assert_eq!(v["seek"]["found"], true);
    assert_eq!(v["steps"].as_array().map(Vec::len), Some(11));
}

#[test]
fn sweep_errors() {
    // units are required and checked
    let out = tandem(&["sweep", "tests/sweep/plate.tandem", "--vary", "t=0.3..1.2"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("length"));
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "w=1 in..2 in",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("not a `let`"));
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=1 in..2 in",
        "--show",
        "plate.strss",
    ]);
    assert_eq!(out.status.code(), Some(2));
    // a thickness of zero makes the plate's area zero: a clear error, not a panic
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=0 in..1 in",
        "--steps",
        "3",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("must be positive"));
}

/// A parameter that enters only a check keeps the one solution; one that
/// enters a part re-solves. Both give the closed-form utilization.
#[test]
fn only_what_depends_on_the_parameter_is_re_solved() {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/sweep/plate.tandem"),
    )
    .expect("read")
    .replace(
        "let t = 0.5 in",
        "let t = 0.5 in\nlet limit = 20 ksi\nlet twice = 2 * limit",
    )
    .replace("<= 20 ksi", "<= twice / 2");
    let file = tandem::syntax::parse(&text).expect("parses");
    assert!(tandem::model::solver_depends_on(&file, "t"));
    assert!(!tandem::model::solver_depends_on(&file, "limit"));
    let src = Source::new("plate.tandem", text);
    let sweeper = Sweeper::new(&src, "limit", &[]).unwrap_or_else(|_| panic!("sweeper"));
    let table = sweeper
        .sweep(
            tandem::quantity("10 ksi").expect("q"),
            tandem::quantity("40 ksi").expect("q"),
            4,
        )
        .unwrap_or_else(|_| panic!("sweep"));
    // σ at t = 0.5 in: 400·29000/(29000·5 + 4000·100) ksi
    let sigma = 400.0 * 29000.0 / (29000.0 * 5.0 + 4000.0 * 100.0);
    for (s, limit) in table.steps.iter().zip([10.0, 20.0, 30.0, 40.0]) {
        assert!((s.governing.unwrap_or(0.0) - sigma / limit).abs() < 1e-9);
    }
}

/// A sweep step at the file's own value sees every check `solve` sees:
/// the automatic checks and the long-term state's (before: a pier whose
/// long-term check governed swept with the short-term value alone).
#[test]
fn a_step_sees_every_check_solve_sees() {
    let examples = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut sources: Vec<Source> = std::fs::read_dir(&examples)
        .expect("examples")
        .flatten()
        .map(|e| tandem::read_source(&e.path()).expect("read"))
        .collect();
    // the pier's bars: 0.747 short term, 1.12 long term (creep moves load
    // onto them); the long-term failure governs
    let pier = std::fs::read_to_string(examples.join("conveyor_pier.tandem")).expect("pier");
    sources.push(Source::new(
        "pier_bars.tandem",
        pier + "check \"bar stress\" : -bars.stress <= 150 MPa\n",
    ));
    let mut tried = 0;
    for src in sources {
        let a = tandem::analyse(&src).unwrap_or_else(|_| panic!("analyse"));
        let Some(l) = a.model.lets.first() else {
            continue;
        };
        let sweeper = Sweeper::new(&src, &l.name, &[]).unwrap_or_else(|_| panic!("sweeper"));
        let table = sweeper
            .sweep(l.value, l.value, 1)
            .unwrap_or_else(|_| panic!("sweep"));
        let all = a
            .checks
            .outcomes
            .iter()
            .chain(a.long_term_checks.iter().flat_map(|(_, c)| &c.outcomes))
            .map(|o| o.utilization.unwrap_or(f64::INFINITY))
            .fold(None, |m: Option<f64>, u| Some(m.map_or(u, |m| m.max(u))));
        assert_eq!(table.steps[0].governing, all, "{}", src.name);
        tried += 1;
    }
    assert!(tried >= 3);
    let last = tandem::analyse(&Source::new("p", pier_check())).unwrap_or_else(|_| panic!("a"));
    assert_eq!(last.failures(), 1);
}

fn pier_check() -> String {
    let examples = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    std::fs::read_to_string(examples.join("conveyor_pier.tandem")).expect("pier")
        + "check \"bar stress\" : -bars.stress <= 150 MPa\n"
}

/// A utilization that falls then rises crosses 1.0 twice: both are found,
/// and the sweep says it is not monotonic. |k − 5| / 2 = 1 at k = 3 and 7.
#[test]
fn seek_reports_every_crossing() {
    let text = format!(
        "let k = 1\ncheck \"band\" : abs(k - 5) <= 2\n{}",
        common_assembly()
    );
    let src = tandem::source::Source::new("band.tandem", text);
    let sweeper = Sweeper::new(&src, "k", &[]).unwrap_or_else(|_| panic!("sweeper"));
    let table = sweeper
        .sweep(
            tandem::quantity("0").expect("q"),
            tandem::quantity("10").expect("q"),
            11,
        )
        .unwrap_or_else(|_| panic!("sweep"));
    match sweeper
        .seek(&table, 1e-9)
        .unwrap_or_else(|_| panic!("seek"))
    {
        Seek::Found {
            crossings,
            monotonic,
            ..
        } => {
            let at: Vec<f64> = crossings.iter().map(|c| c.value).collect();
            assert_eq!(at.len(), 2, "{at:?}");
            assert!(
                (at[0] - 3.0).abs() < 1e-6 && (at[1] - 7.0).abs() < 1e-6,
                "{at:?}"
            );
            assert!(!monotonic);
        }
        Seek::NoRoot { .. } => panic!("two roots lie in the range"),
    }
}

fn common_assembly() -> &'static str {
    "material s { E = 200 GPa }\nnode a at 0 m\nnode b at 1 m\nfix a\npart p { material = s; area = 100 mm^2; ends = a, b }\nload b = 1 kN\n"
}

#[test]
fn a_range_in_deg_answers_in_deg_and_three_dots_are_refused() {
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=10 mm..30 mm",
        "--steps",
        "3",
        "--seek",
    ]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.starts_with("t (mm)"), "{text}");
    assert!(text.contains(" mm (to within"), "{text}");
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=0.3 in...1.2 in",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("two dots"));
}

/// Where a utilization is undefined (the capacity k · 1 kN is zero at
/// k = 0) or off the scale, the plot draws it at the top edge and marks it
/// rather than leaving a gap.
#[test]
fn the_plot_keeps_stretches_off_the_scale() {
    let text = format!(
        "let k = 1\ncheck \"reach\" : 1 kN <= k * 1 kN\n{}",
        common_assembly()
    );
    let src = tandem::source::Source::new("reach.tandem", text);
    let sweeper = Sweeper::new(&src, "k", &[]).unwrap_or_else(|_| panic!("sweeper"));
    let table = sweeper
        .sweep(
            tandem::quantity("0").expect("q"),
            tandem::quantity("2").expect("q"),
            5,
        )
        .unwrap_or_else(|_| panic!("sweep"));
    assert_eq!(table.steps[0].checks[0], None);
    let a = tandem::analyse(&src).unwrap_or_else(|_| panic!("analyse"));
    let d = tandem::report::Display::for_model(&a.model, 4);
    let svg = tandem::review::sweep::plot(&table, None, &d);
    assert!(svg.contains("off the scale"), "{svg}");
    roxmltree::Document::parse(&svg).expect("well-formed SVG");
}

/// `--show` takes every result a check can name (one table of result
/// fields): a part's length, and a node's reaction. The plate's length is
/// its ends' distance, 100 in (the file's geometry).
#[test]
fn show_takes_every_result_a_check_can_name() {
    let out = tandem(&[
        "sweep",
        "tests/sweep/plate.tandem",
        "--vary",
        "t=0.5 in..1 in",
        "--steps",
        "2",
        "--show",
        "plate.length,a.reaction",
        "--json",
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("plate.length") && text.contains("a.reaction"),
        "{text}"
    );
    assert!(text.contains("2.54"), "100 in is 2.54 m: {text}");
}

/// `--show` takes a beam's bending: on the flitch lintel the moment in the
/// glulam over a bolt line is proportional to the total line load (dead
/// 4.2 kN/m plus the swept live load), as a linear model gives.
#[test]
fn a_sweep_shows_a_beams_moment() {
    let out = super::common::tandem(&[
        "sweep",
        "examples/flitch_lintel.tandem",
        "--vary",
        "floor_live=2 kN/m..8 kN/m",
        "--steps",
        "4",
        "--show",
        "g2.moment,b.rotation",
        "--json",
    ]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    let steps = j["steps"].as_array().expect("steps");
    let ratio: Vec<f64> = steps
        .iter()
        .map(|s| {
            let live = s["value_si"].as_f64().expect("value");
            let m = s["shown"][0]["value_si"].as_f64().expect("moment");
            m / (4.2e3 + live)
        })
        .collect();
    for r in &ratio {
        assert!((r - ratio[0]).abs() <= 1e-9 * ratio[0].abs(), "{ratio:?}");
    }
    // a beam result on a plain part is refused
    let out = super::common::tandem(&[
        "sweep",
        "examples/mezzanine_edge.tandem",
        "--vary",
        "live=0.5 kip/ft..0.7 kip/ft",
        "--show",
        "column.moment",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        String::from_utf8_lossy(&out.stderr).contains("is not a result of a part, beam or node")
    );
}

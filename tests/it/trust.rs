//! No wrong result passes: absurd values are refused at their span, every
//! result is finite and in equilibrium, and a strut past its Euler load
//! fails. Each case below passed with exit 0 before it was guarded.

use crate::common;

use std::io::Write as _;
use std::process::Command;

fn tandem_on(text: &str, args: &[&str]) -> std::process::Output {
    let mut f = tempfile_in_target("calc");
    f.1.write_all(text.as_bytes()).expect("write");
    let mut all: Vec<&str> = args.to_vec();
    let path = f.0.display().to_string();
    all.push(&path);
    Command::new(env!("CARGO_BIN_EXE_tandem"))
        .args(&all)
        .output()
        .expect("runs")
}

/// A fresh file under the target folder (removed with it).
fn tempfile_in_target(stem: &str) -> (std::path::PathBuf, std::fs::File) {
    use std::sync::atomic::{AtomicUsize, Ordering};
    static N: AtomicUsize = AtomicUsize::new(0);
    let dir = std::path::Path::new(env!("CARGO_TARGET_TMPDIR")).join("trust");
    std::fs::create_dir_all(&dir).expect("dir");
    let path = dir.join(format!(
        "{stem}-{}-{}.tandem",
        std::process::id(),
        N.fetch_add(1, Ordering::Relaxed)
    ));
    let f = std::fs::File::create(&path).expect("create");
    (path, f)
}

const ROD: &str = "
material steel { E = 200 GPa }
node a at 0 m
node b at 1 m
fix a
part r { material = steel; area = AREA; ends = a, b }
load b = 50 kN
";

#[test]
fn a_subnormal_area_is_refused_at_its_span() {
    // before: all-zero forces, "equilibrium residual 50 kN", exit 0
    for area in ["1e-320 m^2", "1e-319 m^2"] {
        let out = tandem_on(&ROD.replace("AREA", area), &["solve"]);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{area}: {err}");
        assert!(err.contains("underflows"), "{err}");
    }
    // absurd but normal: too small for its kind
    let out = tandem_on(&ROD.replace("AREA", "1e-300 m^2"), &["solve"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("too small") && err.contains("1 µm²"), "{err}");
}

#[test]
fn a_node_at_1e308_m_is_refused_without_a_follow_on_error() {
    // before: `k = … / ∞` in the report, exit 0
    let text = ROD.replace("AREA", "100 mm^2").replace("1 m", "1e308 m");
    let out = tandem_on(&text, &["check"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        err.contains("the position of node `b` is too large"),
        "{err}"
    );
    // one fault, one error: no "zero length" for the part at that node
    assert!(!err.contains("zero length"), "{err}");
    assert!(err.contains("1 error"), "{err}");
}

#[test]
fn a_zero_buckling_length_is_refused() {
    // before: P_e = ∞, exit 0
    let text = "
material steel { E = 200 GPa }
node a at 0 m
node b at 1 m
fix a
part r { material = steel; section = circle(d = 20 mm); ends = a, b; buckling_length = 0 m }
load b = -5 kN
";
    let out = tandem_on(text, &["solve"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("`buckling_length` of part `r` must be positive"),
        "{err}"
    );
}

#[test]
fn a_strut_past_its_euler_load_fails_the_gate() {
    // π²·E·I/L² for a 20 mm rod 2 m long (E = 200 GPa): 3.876 kN (Euler's
    // formula, any mechanics-of-materials text); 220 kN is 57 × that.
    let text = "
material steel { E = 200 GPa }
node a at 0 m
node b at 2 m
fix a
part strut { material = steel; section = circle(d = 20 mm); ends = a, b; buckling_length = 2 m }
load b = -220 kN
";
    let out = tandem_on(text, &["solve"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(1), "{stdout}");
    assert!(
        stdout.contains("strut: compression within Euler load"),
        "{stdout}"
    );
    let json = tandem_on(text, &["solve", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&json.stdout).expect("json");
    let check = &v["checks"][0];
    assert_eq!(check["kind"], "buckling");
    assert_eq!(check["pass"], false);
    let pe =
        std::f64::consts::PI.powi(2) * 200e9 * std::f64::consts::PI * 0.02f64.powi(4) / 64.0 / 4.0;
    let u = check["utilization"].as_f64().expect("u");
    assert!(common::rel(u, 220e3 / pe) < 1e-9, "{u}");
    assert!(u > 56.0 && u < 58.0);
    let report = tandem_on(text, &["report"]);
    let md = String::from_utf8_lossy(&report.stdout);
    assert_eq!(report.status.code(), Some(1));
    assert!(md.contains("the one check fails"), "{md}");
}

#[test]
fn a_filled_pipe_is_gated_by_its_group_not_its_parts() {
    // the core alone would be past its own Euler load; bonded to the tube
    // it buckles with it (Σ E·I)
    let a = common::analyse(
        "
material fill { E = 25 GPa }
material steel { E = 200 GPa }
node a at 0 m
node b at 6 m
fix a
part core { material = fill; section = circle(d = 250 mm); buckling_length = 6 m; ends = a, b }
part tube { material = steel; section = ring(d = 273 mm, t = 6 mm); buckling_length = 6 m; ends = a, b }
load b = -500 kN
",
    );
    let labels: Vec<&str> = a.checks.outcomes.iter().map(|o| &*o.label).collect();
    assert_eq!(labels, ["core + tube: compression within Euler load"]);
    assert_eq!(a.failures(), 0);
}

#[test]
fn a_combination_of_zero_factors_is_refused() {
    let text = ROD.replace("AREA", "100 mm^2").replace(
        "load b = 50 kN",
        "case c { load b = 50 kN }\ncombine none = 0 c",
    );
    let out = tandem_on(&text, &["check"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        err.contains("every factor of combination `none` is zero"),
        "{err}"
    );
}

#[test]
fn every_result_is_verified_in_equilibrium() {
    // the tolerance is relative to the largest force of the combination
    let (m, s) = common::solve(&ROD.replace("AREA", "100 mm^2"));
    for r in &s.combinations {
        assert!(
            r.equilibrium_residual.value
                <= tandem::solve::EQUILIBRIUM_TOLERANCE * r.force_scale.value
        );
    }
    // a result out of equilibrium is an error naming its combination
    let mut bad = s.combinations[0].clone();
    bad.equilibrium_residual.value = 1e-3 * bad.force_scale.value;
    let err = tandem::solve::verified(&m, bad, m.combinations[0].span).expect_err("refused");
    assert!(err
        .to_string()
        .contains("combination `loads` is out of equilibrium"));
    // and so is a result that is not finite
    let mut bad = s.combinations[0].clone();
    bad.parts[0].force.value = f64::INFINITY;
    let err = tandem::solve::verified(&m, bad, m.combinations[0].span).expect_err("refused");
    assert!(
        err.to_string().contains("not a finite number (part `r`)"),
        "{err}"
    );
}

#[test]
fn negative_zero_never_reaches_the_json() {
    // a part that carries nothing: its force may come out as −0
    let text = "
material steel { E = 200 GPa }
node a at 0 m
node b at 1 m
node c at 2 m
fix a
fix c
part r { material = steel; area = 100 mm^2; ends = a, b }
part s { material = steel; area = 100 mm^2; ends = b, c }
load b = -0 kN
";
    let out = tandem_on(text, &["solve", "--json"]);
    let json = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{json}");
    assert!(!json.contains("-0.0"), "{json}");
    assert!(!json.contains("null"), "{json}");
}

const CLAMPED: &str = r#"
calc { title = "Clamp <script>alert(1)</script> *rev* B" }
let fy  = 36 ksi
let phi = 0.9
let fa  = 0.6*fy*phi
material steel { E = 29000 ksi }
node a at 0 in
node b at 10 in
fix a
fix b
part bolt_a { material = steel; area = 0.5 in^2; ends = a, b; misfit = -0.01 in; carries = tension }
check "residual clamp" : bolt_a.force >= 10 kip
check "bolt *stress*" : bolt_a.stress <= fa
"#;

#[test]
fn the_report_shows_user_text_as_written() {
    let out = tandem_on(CLAMPED, &["report", "--html"]);
    let html = String::from_utf8_lossy(&out.stdout);
    // before: `0.6<em>fy</em>phi`, the signs gone
    assert!(html.contains("0.6*fy*phi"), "{html}");
    assert!(!html.contains("<em>fy</em>"));
    assert!(!html.contains("<script>"));
    assert!(html.contains("bolt *stress*"));
    assert!(html.contains("&lt;script&gt;"));
}

#[test]
fn a_greater_equal_check_reads_true() {
    let out = tandem_on(CLAMPED, &["report"]);
    let md = String::from_utf8_lossy(&out.stdout);
    // the clamp force 29000 ksi · 0.5 in² · 0.01 in / 10 in = 14.50 kip
    // (Hooke's law); before: "| 10.00 kip | ≥ 14.50 kip |", a falsehood
    assert!(md.contains("| 14.50 kip | ≥ 10.00 kip |"), "{md}");
    let text = tandem_on(CLAMPED, &["solve"]);
    let t = String::from_utf8_lossy(&text.stdout);
    assert!(t.contains("14.50 kip") && t.contains("≥ 10.00 kip"), "{t}");
    // utilization to three decimals: 10 / 14.5
    assert!(md.contains("0.690"), "{md}");
}

#[test]
fn utilization_has_three_decimals_everywhere() {
    assert_eq!(tandem::report::utilization(Some(1.0763)), "1.076");
    assert_eq!(tandem::report::utilization(Some(0.90412)), "0.904");
    assert_eq!(tandem::report::utilization(Some(-1e-9)), "0.000");
    assert_eq!(tandem::report::utilization(None), "—");
    assert_eq!(tandem::report::utilization(Some(f64::INFINITY)), "—");
}

#[test]
fn a_byte_order_mark_is_accepted_and_nul_or_non_utf8_named_with_line_and_column() {
    let text = ROD.replace("AREA", "100 mm^2");
    let with_bom = format!("\u{feff}{text}");
    assert_eq!(tandem_on(&with_bom, &["check"]).status.code(), Some(0));
    let err = tandem::text_of("c.tandem", b"let a = 1\nlet b\0 = 2\n".to_vec()).expect_err("NUL");
    assert!(err.contains("NUL byte at line 2, column 6"), "{err}");
    let err =
        tandem::text_of("c.tandem", b"let a = 1\nlet \xff = 2\n".to_vec()).expect_err("latin-1");
    assert!(err.contains("line 2, column 5"), "{err}");
}

#[test]
fn a_node_tied_to_itself_is_an_error() {
    // before: accepted silently
    let text = ROD.replace("AREA", "100 mm^2") + "tie b, b\n";
    let out = tandem_on(&text, &["check"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    assert!(err.contains("node `b` is tied to itself"), "{err}");
}

/// One combination that cannot be solved (the compression-only part goes
/// slack under a pull: a mechanism) no longer hides the others: `push` is
/// solved and shown, the calc says it is incomplete and exits 2.
#[test]
fn one_failing_combination_does_not_hide_the_rest() {
    let text = "
material steel { E = 200 GPa }
node a at 0 m
node b at 1 m
fix a
part r { material = steel; area = 100 mm^2; ends = a, b; carries = compression }
case push { load b = -10 kN }
case pull { load b = 10 kN }
check \"stress\" : -r.stress <= 150 MPa
check \"ratio\" : 1 kN / r.force >= -1
";
    let out = tandem_on(text, &["solve"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(stdout.contains("combination push"), "{stdout}");
    assert!(
        stdout.contains("INCOMPLETE: combination `pull`"),
        "{stdout}"
    );
    assert!(stderr.contains("combination `pull`"), "{stderr}");
    let report = tandem_on(text, &["report"]);
    let md = String::from_utf8_lossy(&report.stdout);
    assert_eq!(report.status.code(), Some(2));
    assert!(md.contains("**Incomplete:** combination `pull`"), "{md}");
    let json = tandem_on(text, &["solve", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&json.stdout).expect("json");
    assert_eq!(v["left_out"][0], "pull");
    assert_eq!(v["combinations"].as_array().map(Vec::len), Some(1));
    // the library's strict form still refuses
    let src = tandem::source::Source::new("t.tandem", text);
    assert!(tandem::analyse(&src).is_err());
}

/// Hints that used to mislead now name what to write.
#[test]
fn hints_point_at_what_to_write() {
    let rod = |tail: &str, area: &str| {
        format!(
            "material steel {{ E = 200 GPa }}\nnode a at 0 m\nnode b at 1 m\nfix a\npart r {{ material = steel; area = {area}; ends = a, b }}\n{tail}"
        )
    };
    let cases = [
        // (file, expected help); before: "did you mean `mm`?"
        (rod("", "100 mm2"), "`mm^2`"),
        // before: "`tandem units` lists the units"
        (format!("units SI\n{}", rod("", "100 mm^2")), "`units si`"),
        // before: a list of declaration keywords
        (rod("support b fixed\n", "100 mm^2"), "`fix NODE`"),
        (rod("pin b\n", "100 mm^2"), "`fix NODE`"),
        (
            rod("case c { temp = 10 degC }\n", "100 mm^2"),
            "`temperature = 20 degC`",
        ),
    ];
    for (text, help) in cases {
        let out = tandem_on(&text, &["check"]);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{text}");
        assert!(err.contains(help), "{text}\n{err}");
    }
}

/// Accepted silently before, now errors with a reason.
#[test]
fn silent_acceptances_are_errors() {
    let spring = "material steel { E = 200 GPa }\nnode a at 0 m\nnode b at 1 m\nfix a\npart s { stiffness = 10 kN/mm; ends = a, b }\ncase c { temperature s = 10 degC }\n";
    let out = tandem_on(spring, &["check"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("`s` is a spring"));
    let text = format!("units kN, N\n{}", ROD.replace("AREA", "100 mm^2"));
    let out = tandem_on(&text, &["check"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("`kN` and `N` are both a force"));
    let out = tandem_on(
        &ROD.replace("AREA", "100 mm^2"),
        &["solve", "--units", "kN,N"],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("both a force"));
}

/// A node in two rigid bodies is one fault: one error, not a second
/// "at least two nodes" for the body it was taken from.
#[test]
fn a_shared_rigid_node_is_one_error() {
    let text = "
material steel { E = 200 GPa }
node a at (0 m, 0 m)
node b at (1 m, 0 m)
node c at (2 m, 0 m)
node d at (1 m, 2 m)
fix d
rigid one { nodes = a, b }
rigid two { nodes = b, c }
part r { material = steel; area = 100 mm^2; ends = b, d }
";
    let out = tandem_on(text, &["check"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    assert!(err.contains("more than one rigid body"), "{err}");
    assert!(err.contains(": 1 error"), "{err}");
}

/// The part table says which strain is which: the total (thermal and free
/// strain included) and the strain from force, σ/E (Hooke's law).
#[test]
fn strain_columns_say_what_they_are() {
    let out = tandem_on(
        &std::fs::read_to_string(
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/anchored_pipe.tandem"),
        )
        .expect("example"),
        &["solve", "--json"],
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    let line = &v["combinations"][0]["parts"][0];
    let from_force = line["strain_from_force"].as_f64().expect("member");
    let sigma = line["stress_Pa"].as_f64().expect("stress");
    // 29000 ksi in Pa (NIST SP 811: 1 psi = 6894.757293168361 Pa)
    assert!(common::rel(from_force, sigma / (29000e3 * 6_894.757_293_168_361)) < 1e-12);
    assert!(line["strain"].as_f64().expect("total") > 0.0 && from_force < 0.0);
    let text = tandem_on(
        &std::fs::read_to_string(
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/anchored_pipe.tandem"),
        )
        .expect("example"),
        &["solve"],
    );
    let t = String::from_utf8_lossy(&text.stdout);
    assert!(
        t.contains("total strain (µε)") && t.contains("strain from force σ/E (µε)"),
        "{t}"
    );
}

/// A value derived from others shows its expression with their values
/// substituted, once: Ec = 57000·√(f'c/psi) psi (ACI 318-19 19.2.2.1(b)).
#[test]
fn derived_inputs_show_their_numbers() {
    let text = "let fc = 5000 psi\nlet ec = 57000 * sqrt(fc / psi) * psi\nlet span = 12 ft\n\
        let defl = span / 360 - 0.1 in\nmaterial fill { E = ec }\nnode a at 0 ft\nnode b at span\nfix a\n\
        part p { material = fill; area = 100 in^2; ends = a, b }\nload b = -10 kip\n";
    let out = tandem_on(text, &["report"]);
    let md = String::from_utf8_lossy(&out.stdout);
    assert!(
        md.contains("| ec | `57000 * sqrt(fc / psi) * psi` = `57000 · √(5000 psi / psi) · psi` |"),
        "{md}"
    );
    assert!(md.contains("= `12.00 ft / 360 − 0.1 in`"), "{md}");
    // a value given directly is not repeated
    assert!(md.contains("| fc | `5000 psi` |"), "{md}");
}

/// A material value written with other names is shown substituted too:
/// Ec = 57000·√(f'c/psi) psi = 4031 ksi for f'c = 5 ksi (ACI 318-19
/// 19.2.2.1(b)).
#[test]
fn derived_material_values_show_their_numbers() {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/filled_post.tandem"),
    )
    .expect("example");
    let out = tandem_on(&text, &["report"]);
    let md = String::from_utf8_lossy(&out.stdout);
    assert!(
        md.contains("- E(fill): `57000 * sqrt(fc / psi) * psi` = `57000 · √(5.000 ksi / psi) · psi` = 4031 ksi"),
        "{md}"
    );
}

/// A warning is worded once: the JSON carries its code and raw values beside
/// the sentence, and the Markdown and the text tables print that sentence.
/// Stress over yield: 200 kN on 400 mm² is 500 MPa, twice a 250 MPa yield
/// (hand arithmetic).
#[test]
fn warnings_are_worded_once_and_carry_their_values() {
    let text = "material steel { E = 200 GPa; yield = 250 MPa }
node a at 0 m
node b at 1 m
fix a
part rod { material = steel; area = 400 mm^2; ends = a, b }
load b = 200 kN
";
    let src = tandem::source::Source::new("yield.tandem", text);
    let a = tandem::analyse(&src).expect("analyses");
    let json = tandem::report::json::solution_json("yield", &a);
    let w = &json["warnings"][0];
    assert_eq!(w["code"], "beyond_yield");
    assert_eq!(w["part"], "rod");
    assert!((w["ratio"].as_f64().expect("ratio") - 2.0).abs() < 1e-12);
    let sentence = w["message"].as_str().expect("message");
    assert_eq!(
        sentence,
        "in combination `loads` part `rod` is stressed to 2.00 × its yield strength; elastic results are not valid beyond yield"
    );
    let display = tandem::report::Display::for_model(&a.model, 3);
    let md = tandem::report::markdown::report(&src, &a, &display);
    assert!(md.contains(&format!("**Warning:** {sentence}.")), "{md}");
    let table = tandem::report::text::solve_text(&a, &display);
    assert!(table.contains(&format!("warning: {sentence}\n")), "{table}");
}

/// Keys that exclude each other are refused with the key to keep, worded in
/// the model's error table (one wording for each pair).
#[test]
fn conflicting_keys_say_which_to_keep() {
    let cases = [
        (
            "part p { stiffness = 100 kip/in; material = s; area = 1 in^2; ends = a, b }",
            "a spring takes `stiffness` alone",
        ),
        (
            "part p { material = s; area = 1 in^2; section = circle(d = 1 in); ends = a, b }",
            "`section` gives the area; drop `area`",
        ),
        (
            "part p { material = s; section = circle(d = 1 in); buckling_length = 10 ft; buckling_factor = 1; ends = a, b }",
            "K alone as `buckling_factor`",
        ),
    ];
    for (part, help) in cases {
        let text = format!(
            "material s {{ E = 29000 ksi }}\nnode a at 0 ft\nnode b at 10 ft\nfix a\n{part}\nload b = 1 kip\n"
        );
        let src = tandem::source::Source::new("conflict.tandem", text);
        let errors = tandem::check(&src).expect_err("refused");
        let shown = tandem::diagnostic::render(&errors, &src, 200, false);
        assert!(shown.contains("cannot both be given"), "{shown}");
        assert!(shown.contains(help), "{shown}");
    }
}

/// The report shows the free elongation the solver used, source by source:
/// misfit, then α·ΔT·L, then ε·L (the solver hands its sources over; the
/// report does not find them again).
#[test]
fn free_elongation_is_reported_from_the_solvers_own_sources() {
    let text = "material steel { E = 200 GPa; alpha = 12e-6/degC }
node a at 0 m
node b at 2 m
fix a
fix b
part rod { material = steel; area = 100 mm^2; ends = a, b; misfit = 0.1 mm }
case heat { temperature rod = 10 degC; strain rod = 0.0001 }
";
    let src = tandem::source::Source::new("free.tandem", text);
    let a = tandem::analyse(&src).expect("analyses");
    // δ₀ = 0.1 mm + 12e-6/degC · 10 degC · 2 m + 1e-4 · 2 m = 0.54 mm (hand arithmetic)
    let free = a.solution.combinations[0].parts[0].free_elongation.value;
    assert!((free - 0.54e-3).abs() < 1e-15, "{free}");
    let sources = tandem::solve::free_sources(&a.model, &a.model.combinations[0].terms);
    let sum: f64 = sources.iter().map(|(_, s)| s.value()).sum();
    assert_eq!(
        sum.to_bits(),
        free.to_bits(),
        "the same additions in the same order"
    );
    let display = tandem::report::Display::for_model(&a.model, 4);
    let md = tandem::report::markdown::report(&src, &a, &display);
    assert!(md.contains("δ₀ = misfit + α·ΔT·L + ε·L = "), "{md}");
}

/// A calc with a combination that cannot be solved never ends its `solve`
/// tables with a bare "all checks pass": the line says the pass holds in
/// the combinations solved only, and that the calc is incomplete.
#[test]
fn solve_never_says_all_pass_for_an_incomplete_calc() {
    let dir = tempfile::tempdir().expect("tempdir");
    let file = dir.path().join("hanger.tandem");
    std::fs::write(
        &file,
        "material s { E = 200 GPa }\nnode top at 2 m\nnode low at 0 m\nfix top\n\
         part rod { material = s; area = 100 mm^2; ends = low, top; carries = tension }\n\
         case hang { load low = -5 kN }\ncase lift { load low = 5 kN }\n\
         combine down = hang\ncombine up = lift\n\
         check \"rod stress\" : rod.stress <= 250 MPa\n",
    )
    .expect("write");
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .args(["solve"])
        .arg(&file)
        .output()
        .expect("tandem");
    assert_eq!(out.status.code(), Some(2));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(!text.contains("  all checks pass\n"), "{text}");
    assert!(
        text.contains("all checks pass in the combinations solved; INCOMPLETE: combination `up`"),
        "{text}"
    );
}

/// A moment at a node no beam frames into is an error of the file (nothing
/// there turns to carry it), not a load the solver drops.
#[test]
fn a_moment_where_nothing_turns_is_an_error() {
    let dir = tempfile::tempdir().expect("tempdir");
    let run = |args: &[&str]| super::common::tandem(args);
    // a moment at a node no beam frames into is an error of the file
    let only_moment = dir.path().join("moment.tandem");
    std::fs::write(
        &only_moment,
        "material s { E = 200 GPa }\nnode a at (0 m, 0 m)\nnode b at (2 m, 0 m)\nfix a\n\
         part p { material = s; area = 100 mm^2; ends = a, b }\nfix b y\nmoment b = 1 kN*m\n",
    )
    .expect("write");
    let out = run(&["check", only_moment.to_str().expect("utf-8")]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr)
        .contains("a moment at `b` needs a beam rigidly joined there"));
}

//! Grammar-aware random calcs: random but well-formed assemblies of every
//! kind of declaration. Each one either checks or gives diagnostics; when it
//! solves, equilibrium holds in every combination; its report, formatting
//! and JSON never panic, and formatting is idempotent.
#![allow(
    clippy::cast_possible_truncation,
    clippy::cast_sign_loss,
    clippy::cast_possible_wrap,
    clippy::write_with_newline,
    clippy::format_collect
)]

use std::fmt::Write as _;

use crate::common;

use tandem::source::Source;

use common::Rng;

fn calc(rng: &mut Rng) -> String {
    let plane = rng.chance(0.5);
    let mut t = String::new();
    if rng.chance(0.5) {
        t.push_str("calc {\n  title = \"random\"\n  revision = \"R\"\n}\n");
    }
    if rng.chance(0.3) {
        let _ = writeln!(
            t,
            "units {}",
            rng.pick(&["us", "si", "kip, in, ksi", "kN, mm, MPa"])
        );
    }
    let nm = 1 + rng.below(3);
    for m in 0..nm {
        let _ = write!(
            t,
            "material mat{m} {{\n  E = {} {}\n",
            1000 + rng.below(30000),
            rng.pick(&["ksi", "MPa"])
        );
        if rng.chance(0.6) {
            let _ = writeln!(
                t,
                "  alpha = {}e-6 / {}",
                5 + rng.below(10),
                rng.pick(&["degF", "degC"])
            );
        }
        if rng.chance(0.4) {
            let _ = writeln!(t, "  yield = {} ksi", 20 + rng.below(60));
        }
        if rng.chance(0.3) {
            let _ = writeln!(t, "  allowable = {} ksi", 10 + rng.below(30));
        }
        if rng.chance(0.2) {
            t.push_str("  creep = 2.0\n");
        }
        t.push_str("}\n");
    }
    let nn = 2 + rng.below(8);
    for i in 0..nn {
        if plane {
            let _ = writeln!(
                t,
                "node n{i} at ({} in, {} in)",
                i * 24 + rng.below(5),
                rng.below(60)
            );
        } else {
            let _ = writeln!(t, "node n{i} at {} in", i * 24 + rng.below(5));
        }
    }
    t.push_str("fix n0\n");
    for i in 1..nn {
        if rng.chance(0.3) {
            if plane {
                let _ = writeln!(t, "fix n{i} {}", rng.pick(&["x", "y", ""]).trim());
            } else {
                let _ = writeln!(t, "fix n{i}");
            }
        }
    }
    let mut np = 0;
    let mut part = |t: &mut String, rng: &mut Rng, a: usize, b: usize| {
        let _ = write!(t, "part p{np} {{\n  ends = n{a}, n{b}\n");
        if rng.chance(0.15) && !plane {
            let _ = writeln!(t, "  stiffness = {} kip/in", 10 + rng.below(1000));
        } else {
            let _ = writeln!(t, "  material = mat{}", rng.below(nm));
            let area = match rng.below(4) {
                0 => format!("{} in^2", 1 + rng.below(20)),
                1 => format!("circle(d = {} in)", 1 + rng.below(6)),
                2 => format!("ring(d = {} in, t = 0.25 in)", 2 + rng.below(8)),
                _ => format!(
                    "rect(b = {} in, h = {} in)",
                    1 + rng.below(6),
                    1 + rng.below(6)
                ),
            };
            if rng.chance(0.3) {
                let _ = writeln!(
                    t,
                    "  section = {area}\n  buckling_length = {} ft",
                    1 + rng.below(20)
                );
            } else {
                let _ = writeln!(t, "  area = {area}");
            }
        }
        if rng.chance(0.2) {
            let _ = writeln!(
                t,
                "  carries = {}",
                rng.pick(&["tension", "compression", "both"])
            );
        }
        if rng.chance(0.15) {
            let _ = writeln!(t, "  slack = 0.0{} in", 1 + rng.below(9));
        }
        if rng.chance(0.15) {
            let _ = writeln!(t, "  misfit = -0.0{} in", 1 + rng.below(9));
        }
        t.push_str("}\n");
        np += 1;
    };
    for i in 1..nn {
        part(&mut t, rng, i - 1, i);
        if plane && i >= 2 && rng.chance(0.7) {
            part(&mut t, rng, i - 2, i);
        }
    }
    for _ in 0..rng.below(3) {
        let (a, b) = (rng.below(nn), rng.below(nn));
        if a != b {
            part(&mut t, rng, a, b);
        }
    }
    if plane && nn >= 4 && rng.chance(0.3) {
        let _ = writeln!(t, "rigid body0 {{ nodes = n{}, n{} }}", nn - 2, nn - 1);
    }
    if nn >= 3 && rng.chance(0.15) {
        t.push_str("tie n1, n2\n");
    }
    let nc = 1 + rng.below(3);
    for c in 0..nc {
        let _ = write!(
            t,
            "case c{c}{} {{\n",
            if rng.chance(0.3) { " sustained" } else { "" }
        );
        let node = rng.below(nn);
        if plane {
            let _ = writeln!(
                t,
                "  load n{node} = ({} kip, -{} kip)",
                rng.below(10),
                rng.below(20)
            );
        } else {
            let _ = writeln!(t, "  load n{node} = {} kip", rng.below(40) as i64 - 20);
        }
        if rng.chance(0.2) {
            let _ = writeln!(t, "  temperature = {} degF", rng.below(100));
        }
        t.push_str("}\n");
    }
    if rng.chance(0.5) {
        let _ = writeln!(
            t,
            "combine all = 1.2 c0{}",
            (1..nc).map(|c| format!(" + 1.6 c{c}")).collect::<String>()
        );
    }
    if rng.chance(0.6) {
        let _ = writeln!(
            t,
            "check \"force\" : abs(p0.force) <= {} kip",
            1 + rng.below(50)
        );
        if plane {
            let _ = writeln!(t, "check \"drift\" : abs(n1.dx) <= 1 in");
        } else {
            let _ = writeln!(t, "check \"move\" : abs(n1.displacement) <= 1 in");
        }
    }
    t
}

#[test]
fn random_calcs_check_solve_and_report() {
    let mut rng = Rng(0xdead_beef_cafe_f00d);
    let (mut solved, mut refused) = (0, 0);
    for _ in 0..400 {
        let text = calc(&mut rng);
        let src = Source::new("random.tandem", text.clone());
        let a = match tandem::analyse(&src) {
            Ok(a) => a,
            Err(errors) => {
                assert!(!errors.is_empty());
                let shown = tandem::diagnostic::render(&errors, &src, 80, false);
                assert!(!shown.is_empty());
                refused += 1;
                continue;
            }
        };
        solved += 1;
        for c in &a.solution.combinations {
            assert!(
                c.equilibrium_residual.value <= 1e-9 * c.force_scale.value.max(1.0),
                "residual {} of {} in\n{text}",
                c.equilibrium_residual.value,
                c.force_scale.value
            );
        }
        let d = tandem::report::Display::for_model(&a.model, 4);
        let md = tandem::report::markdown::report(&src, &a, &d);
        assert!(md.contains("qualified engineer"));
        let _ = tandem::report::json::solution_json("random", &a);
        let once = tandem::review::fmt::format(&src).expect("formats");
        let twice = tandem::review::fmt::format(&Source::new("r", once.clone())).expect("formats");
        assert_eq!(once, twice, "fmt not idempotent on\n{text}");
    }
    assert!(
        solved > 100,
        "only {solved} of 400 solved ({refused} refused)"
    );
}

/// Random chains and meshes of one-sense and gapped parts: the active set
/// always settles (the damped Newton fallback) or the assembly is reported
/// as a mechanism; what solves keeps equilibrium and every part obeys its
/// law (no tension in a compression-only part, nothing inside a gap).
#[test]
fn one_sense_and_gapped_parts_always_settle() {
    let mut rng = Rng(12345);
    let (mut solved, mut mechanisms) = (0, 0);
    for _ in 0..1500 {
        let n = 3 + rng.below(4);
        let mut t = String::from("material s { E = 29000 ksi; alpha = 6.5e-6 / degF }\n");
        for i in 0..n {
            let _ = writeln!(t, "node n{i} at {} in", i * 10);
        }
        t.push_str("fix n0\n");
        if rng.chance(0.7) {
            let _ = writeln!(t, "fix n{}", n - 1);
        }
        let mut k = 0;
        for i in 1..n {
            for j in 0..i {
                if j + 1 == i || rng.chance(0.3) {
                    let carries = rng.pick(&["tension", "compression", "both"]);
                    let slack = if rng.chance(0.5) {
                        format!("; slack = 0.0{} in", 1 + rng.below(9))
                    } else {
                        String::new()
                    };
                    let _ = writeln!(t, "part p{k} {{ material = s; area = {} in^2; ends = n{j}, n{i}; carries = {carries}{slack} }}", 1 + rng.below(5));
                    k += 1;
                }
            }
        }
        for i in 1..n {
            if rng.chance(0.5) {
                let _ = writeln!(t, "load n{i} = {} kip", rng.below(400) as i64 - 200);
            }
        }
        if rng.chance(0.5) {
            t.push_str("temperature = 100 degF\n");
        }
        let src = Source::new("c.tandem", t.clone());
        let m = tandem::check(&src)
            .unwrap_or_else(|e| panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)));
        match tandem::solve::solve(&m) {
            Ok(s) => {
                solved += 1;
                let c = &s.combinations[0];
                // forces of round-off size (a micronewton) are noise, not imbalance
                assert!(
                    c.equilibrium_residual.value <= 1e-9 * c.force_scale.value.max(1e3),
                    "{t}"
                );
                let tol = 1e-9 * c.force_scale.value.max(1e3);
                for (p, r) in m.parts.iter().zip(&c.parts) {
                    match p.carries {
                        tandem::model::Carries::Tension => assert!(r.force.value >= -tol, "{t}"),
                        tandem::model::Carries::Compression => assert!(r.force.value <= tol, "{t}"),
                        tandem::model::Carries::Both => {}
                    }
                }
            }
            Err(e) => {
                let text = format!("{e:?}");
                assert!(text.contains("Mechanism"), "did not settle:\n{t}\n{text}");
                mechanisms += 1;
            }
        }
    }
    assert!(solved > 500, "{solved} solved, {mechanisms} mechanisms");
}

//! Check lines: sides equal within round-off, and models whose checks or
//! materials are many.
#![allow(clippy::float_cmp)]

use tandem::source::Source;

fn analyse(text: &str) -> tandem::Analysis {
    tandem::analyse(&Source::new("t.tandem", text.to_string())).unwrap_or_else(|_| panic!("{text}"))
}

/// 1 kN over 10 mm² is exactly 100 MPa (SI prefixes are exact, NIST SP 811
/// table 5); in binary floating point the quotient lands a last digit above.
/// Equal sides pass `<=` and `>=` and fail `<` and `>`, as in exact
/// arithmetic.
#[test]
fn a_demand_at_its_capacity_passes_le_and_fails_lt() {
    let base = "material s { E = 200 GPa }\nnode a at 0 mm\nnode b at 1000 mm\nfix a\n\
                part p { material = s; area = 10 mm^2; ends = a, b }\nload b = 1 kN\n";
    // the floating-point demand is indeed not exactly the capacity
    assert_ne!(1000.0 / (10.0 * (1e-3 * 1e-3)), 1e8);
    for (line, pass) in [
        ("check \"c\" : p.stress <= 100 MPa", true),
        ("check \"c\" : p.stress < 100 MPa", false),
        ("check \"c\" : 100 MPa >= p.stress", true),
        ("check \"c\" : 100 MPa > p.stress", false),
        ("check \"c\" : p.stress >= 100 MPa", true),
        ("check \"c\" : p.stress > 100 MPa", false),
        // a real excess is still one: 1e-6 above
        ("check \"c\" : p.stress <= 99.9999 MPa", false),
        ("check \"c\" : p.stress < 100.0001 MPa", true),
    ] {
        let a = analyse(&format!("{base}{line}\n"));
        assert_eq!(a.checks.outcomes[0].pass, pass, "{line}");
    }
}

/// Many checks, each on its own part of a chain, and many materials, each
/// used by one part: every check reads its own part (the load is carried
/// by every segment of a series chain, statics: N = P), and every part
/// its own material (k = E A / L with that material's E).
#[test]
fn many_checks_and_many_materials_resolve_each_name() {
    let n = 3000;
    let mut t = String::from("node a at 0 mm\nfix a\n");
    let mut prev = "a".to_string();
    for i in 0..n {
        t += &format!("material m{i} {{ E = {} GPa }}\n", 100 + i);
        t += &format!("node n{i} at {} mm\n", i + 1);
        t += &format!("part p{i} {{ material = m{i}; area = 1 mm^2; ends = {prev}, n{i} }}\n");
        t += &format!("check \"c{i}\" : p{i}.elongation <= n{i}.displacement\n");
        prev = format!("n{i}");
    }
    t += &format!("load {prev} = 1 kN\n");
    let a = analyse(&t);
    for i in 0..n {
        let p = &a.model.parts[i];
        let e = a.model.materials[p.material().expect("material")].e.value;
        assert!((e - (100.0 + i as f64) * 1e9).abs() < 1e-3, "part {i}");
        // each segment stretches P L / (E A); the check compares it with
        // its end's displacement, the sum of the segments so far
        let o = &a.checks.outcomes[i];
        let stretch = 1000.0 * 1e-3 / (e * 1e-6);
        assert!(
            (o.demand.value - stretch).abs() < 1e-9 * stretch,
            "check {i}"
        );
    }
}

/// A strut 2 m long, 40 mm round, E = 200 GPa, K = 0.7, under 70 kN.
const STRUT: &str = "material s { E = 200 GPa }\nnode a at 0 m\nnode b at 2 m\nfix a\n\
    part strut { material = s; section = circle(d = 40 mm); ends = a, b; buckling_factor = 0.7 }\n\
    load b = -70 kN\n";

/// A check is validated by dimension only: a root of a compression stress
/// over MPa is negative at the validation's one-SI-unit stand-in, but real
/// in every combination (before: "square root of a negative value").
#[test]
fn checks_are_validated_by_dimension_only() {
    let a = analyse(&format!(
        "{STRUT}check \"root\" : sqrt(-strut.stress / MPa) <= 20\ncheck \"inverse\" : 1 MPa / strut.stress <= 1\n"
    ));
    // σ = 70 kN / (π·(40 mm)²/4) = 55.70 MPa (Hooke's law, axial member)
    let sigma = 70e3 / (std::f64::consts::PI * 0.04f64.powi(2) / 4.0) / 1e6;
    let u = a.checks.outcomes[0].utilization.expect("u");
    assert!((u - sigma.sqrt() / 20.0).abs() < 1e-12, "{u}");
}

/// π²·E·I/(K·L)² with I = π d⁴/64 (Euler's formula, any mechanics-of-
/// materials text); K·L/r with r = d/4; sin 30° = 1/2 and atan2(1, 1) = 45°
/// exactly (trigonometry); `.length` from the node positions.
#[test]
fn new_results_and_functions() {
    let a = analyse(&format!(
        "{STRUT}check \"euler\" : -strut.force <= 0.9 * strut.euler_load\n\
         check \"slender\" : strut.slenderness <= 200\n\
         check \"long\" : strut.length <= 2.5 m\n\
         check \"trig\" : sin(30 deg) * strut.length <= 1.5 m\n\
         check \"angle\" : atan2(1 m, 1 m) <= 45 deg\n\
         check \"inverse trig\" : asin(0.5) / deg <= 30\n"
    ));
    let i = std::f64::consts::PI * 0.04f64.powi(4) / 64.0;
    let pe = std::f64::consts::PI.powi(2) * 200e9 * i / (0.7 * 2.0f64).powi(2);
    let by = |label: &str| {
        a.checks
            .outcomes
            .iter()
            .find(|o| &*o.label == label)
            .unwrap_or_else(|| panic!("{label}"))
    };
    assert!((by("euler").capacity.value - 0.9 * pe).abs() < 1e-6 * pe);
    assert!((by("slender").demand.value - 1.4 / 0.01).abs() < 1e-9);
    assert_eq!(by("long").demand.value, 2.0);
    assert!((by("trig").demand.value - 1.0).abs() < 1e-12);
    assert!(by("angle").pass && by("inverse trig").pass);
    // the buckling factor gives the automatic Euler-load check its K·L too
    assert!((a.buckling[0].kl - 1.4).abs() < 1e-12);
}

#[test]
fn an_euler_load_needs_a_buckling_length() {
    let text = "material s { E = 200 GPa }\nnode a at 0 m\nnode b at 2 m\nfix a\n\
        part p { material = s; area = 100 mm^2; ends = a, b }\nload b = -1 kN\n\
        check \"e\" : -p.force <= p.euler_load\n";
    let Err(err) = tandem::analyse(&Source::new("t.tandem", text.to_string())) else {
        panic!("refused");
    };
    let text =
        tandem::diagnostic::render(&err, &Source::new("t.tandem", text.to_string()), 100, false);
    assert!(text.contains("buckling_length"), "{text}");
}

const PIER: &str = "material c { E = 30 GPa; creep = 2 }\nmaterial s { E = 200 GPa }\n\
    node a at 0 m\nnode b at 3 m\nfix a\n\
    part core { material = c; area = 0.16 m^2; ends = a, b }\n\
    part bars { material = s; area = 2500 mm^2; ends = a, b }\n\
    case dead sustained { load b = -1200 kN }\ncase belt { load b = -450 kN }\n\
    combine service = dead + belt\ncombine ultimate = 1.35 dead + 1.5 belt\n";

/// `under` narrows where a check applies; `for x in GROUP` makes one check
/// per member, labelled with it.
#[test]
fn checks_apply_where_they_are_written() {
    let a = analyse(&format!(
        "{PIER}group both = core, bars\n\
         check \"short\" under ultimate : -core.stress <= 20 MPa\n\
         check \"sustained\" under service long_term : -bars.stress <= 400 MPa\n\
         check \"each\" for p in both under service, ultimate short_term : -p.force <= 5000 kN\n"
    ));
    let labels = |c: &tandem::checks::Checks| -> Vec<(String, usize)> {
        c.outcomes
            .iter()
            .filter(|o| matches!(o.origin, tandem::checks::Origin::Line(_)))
            .map(|o| (o.label.to_string(), o.combination))
            .collect()
    };
    assert_eq!(
        labels(&a.checks),
        [
            ("short".to_string(), 1),
            ("each (core)".to_string(), 0),
            ("each (core)".to_string(), 1),
            ("each (bars)".to_string(), 0),
            ("each (bars)".to_string(), 1),
        ]
    );
    let (_, long) = a.long_term_checks.as_ref().expect("long term");
    // "short" names no state, so it reads both; "each" is short term only
    assert_eq!(
        labels(long),
        [("short".to_string(), 1), ("sustained".to_string(), 0)]
    );
}

#[test]
fn under_names_what_is_wrong() {
    let err = |text: &str| {
        let src = Source::new("t.tandem", text.to_string());
        match tandem::check(&src) {
            Ok(_) => panic!("refused: {text}"),
            Err(e) => tandem::diagnostic::render(&e, &src, 100, false),
        }
    };
    let e = err(&format!(
        "{PIER}check \"x\" under servise : -core.stress <= 20 MPa\n"
    ));
    assert!(e.contains("did you mean `service`?"), "{e}");
    // no creep, no long-term state
    let no_creep = PIER.replace("creep = 2", "yield = 30 MPa");
    let e = err(&format!(
        "{no_creep}check \"x\" under long_term : -core.stress <= 20 MPa\n"
    ));
    assert!(e.contains("no long-term state"), "{e}");
    let e = err(&format!(
        "{PIER}check \"x\" for p in nothing : p.force <= 1 kN\n"
    ));
    assert!(e.contains("unknown group `nothing`"), "{e}");
}

/// `yield_factor` and `limit_factor` are the λ of each combination's
/// capacity path: a core (fy·A) and bars in parallel reach the limit when
/// both yield, λ = (0.85·fck·A_c + f_y·A_s) / P (plastic limit of parallel
/// members, any limit-analysis text).
#[test]
fn load_factors_in_checks() {
    let text = "material c { E = 30 GPa; yield = 25.5 MPa }\nmaterial s { E = 200 GPa; yield = 500 MPa }\n\
        node a at 0 m\nnode b at 3 m\nfix a\n\
        part core { material = c; area = 0.16 m^2; ends = a, b }\n\
        part bars { material = s; area = 2500 mm^2; ends = a, b }\n\
        load b = -2000 kN\n\
        check \"reserve\" : limit_factor >= 1.7\ncheck \"first\" : yield_factor >= 1\n";
    let a = analyse(text);
    let limit = (25.5e6 * 0.16 + 500e6 * 2500e-6) / 2000e3;
    let reserve = &a.checks.outcomes[0];
    assert!(
        (reserve.capacity.value - limit).abs() < 1e-9 * limit,
        "{}",
        reserve.capacity.value
    );
    assert_eq!(a.capacity[0].limit, Some(reserve.capacity.value));
    assert_eq!(
        a.capacity[0].first_yield,
        Some(a.checks.outcomes[1].capacity.value)
    );
    // no material yields: no load factor, and the error says why
    let plain = text
        .replace("; yield = 25.5 MPa", "")
        .replace("; yield = 500 MPa", "");
    let src = Source::new("t.tandem", plain);
    let Err(e) = tandem::analyse(&src) else {
        panic!("refused");
    };
    let msg = tandem::diagnostic::render(&e, &src, 100, false);
    assert!(msg.contains("no capacity path is traced"), "{msg}");
}

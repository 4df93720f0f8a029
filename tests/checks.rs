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

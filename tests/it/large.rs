//! Large files take the parallel paths (statements parsed on every core,
//! parts built on every core); the results must be those of the one-core
//! path: parts in file order, errors in file order, and the closed form.

use std::fmt::Write as _;

fn chain(n: usize, broken: &[usize]) -> String {
    let mut t =
        String::from("material s { E = 29000 ksi }\nlet a = 2 in^2\nnode n0 at 0 in\nfix n0\n");
    for i in 1..=n {
        let _ = writeln!(t, "node n{i} at {i} in");
    }
    for i in 1..=n {
        // a broken part names a node that does not exist
        let a = if broken.contains(&i) {
            "nowhere".to_string()
        } else {
            format!("n{}", i - 1)
        };
        let _ = writeln!(
            t,
            "part p{i} {{ material = s; area = a; ends = {a}, n{i} }}"
        );
    }
    let _ = writeln!(t, "load n{n} = 10 kip");
    t
}

/// Springs in series: the tip moves P·ΣL/(E·A) (axial members in series,
/// any mechanics-of-materials text).
#[test]
fn a_long_chain_keeps_file_order_and_the_closed_form() {
    let n = 25_000;
    let src = tandem::source::Source::new("chain.tandem", chain(n, &[]));
    let a = tandem::analyse(&src).expect("solves");
    assert_eq!(a.model.parts.len(), n);
    for (i, p) in a.model.parts.iter().enumerate() {
        assert_eq!(p.name, format!("p{}", i + 1));
        assert_eq!(p.ends, [i, i + 1]);
    }
    let tip = a.solution.combinations[0].nodes[n].displacement[0].value;
    // P = 10 kip, total length n in, E = 29000 ksi, A = 2 in^2; in inches
    let expected_in = 10.0 * n as f64 / (29_000.0 * 2.0);
    let got_in = tip / 0.0254;
    // Round-off in a chain grows with the square of its length (condition
    // number ~ n^2, common practice): 1e-6 relative for 25,000 parts.
    assert!(
        (got_in - expected_in).abs() <= 1e-6 * expected_in,
        "{got_in} in against {expected_in} in"
    );
}

#[test]
fn errors_in_a_long_file_come_in_file_order() {
    let n = 25_000;
    let broken = [3, 12_000, 13_000, 24_999];
    let src = tandem::source::Source::new("chain.tandem", chain(n, &broken));
    let errors = tandem::check(&src).expect_err("unknown nodes");
    assert_eq!(errors.len(), broken.len());
    let mut last = 0;
    for e in &errors {
        let shown = format!("{e}");
        assert!(shown.contains("nowhere"), "{shown}");
        let at = miette::Diagnostic::labels(e)
            .and_then(|mut l| l.next())
            .map_or(0, |l| l.offset());
        assert!(at > last, "errors out of order");
        last = at;
    }
}

/// A long chain held between two fixed ends, every part with its own
/// temperature change: one force runs through it, N = −Σ α ΔTᵢ Lᵢ / Σ Lᵢ/(E A)
/// (series compatibility with a zero total elongation, any mechanics of
/// materials text). Each part's change is found once, not searched for.
#[test]
fn a_long_restrained_chain_with_a_temperature_per_part() {
    let n = 25_000;
    let mut t = String::from(
        "material s { E = 29000 ksi; alpha = 6.5e-6 / degF }\nlet a = 2 in^2\nnode n0 at 0 in\nfix n0\n",
    );
    for i in 1..=n {
        let _ = writeln!(t, "node n{i} at {i} in");
    }
    let _ = writeln!(t, "fix n{n}");
    for i in 1..=n {
        let _ = writeln!(
            t,
            "part p{i} {{ material = s; area = a; ends = n{}, n{i} }}",
            i - 1
        );
    }
    let mut sum_dt = 0.0;
    for i in 1..=n {
        let dt = f64::from(i % 7) * 10.0;
        sum_dt += dt;
        let _ = writeln!(t, "temperature p{i} = {dt} degF");
    }
    let src = tandem::source::Source::new("restrained.tandem", t);
    let a = tandem::analyse(&src).expect("solves");
    // in kip and inches: every part 1 in long, E A = 58000 kip
    let expected_kip = -6.5e-6 * sum_dt / (f64::from(n) / 58_000.0);
    let got_kip = a.solution.combinations[0].parts[0].force.value / 4_448.221_615_260_5;
    assert!(
        (got_kip - expected_kip).abs() <= 1e-6 * expected_kip.abs(),
        "{got_kip} kip against {expected_kip} kip"
    );
}

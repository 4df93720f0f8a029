//! Results as data: `parts.csv`, `nodes.csv` and `checks.csv`, one row per
//! combination and item, values in the display units named in the column
//! headers, at full precision (not rounded to the report's digits).
//! Written with the `csv` crate (RFC 4180 quoting).

use super::display::{Display, Shown};
use crate::model::Kind;

/// The three tables: `(file name, bytes)`.
#[must_use]
pub fn tables(a: &crate::Analysis, d: &Display) -> Vec<(&'static str, Vec<u8>)> {
    vec![
        ("parts.csv", parts(a, d)),
        ("nodes.csv", nodes(a, d)),
        ("checks.csv", checks(a, d)),
    ]
}

fn head(label: &str, u: &Shown) -> String {
    format!("{label} ({})", u.name)
}

/// A value in a unit to 12 significant figures (past the solve's accuracy,
/// short of the unit conversion's round-off: 0.6, not 0.6000000000000001),
/// in the shortest form that reads back as that.
fn v(si: f64, u: &Shown) -> String {
    full(u.value(si))
}

fn full(x: f64) -> String {
    let rounded: f64 = format!("{x:.11e}").parse().unwrap_or(x);
    format!("{}", rounded + 0.0)
}

fn writer() -> csv::Writer<Vec<u8>> {
    csv::WriterBuilder::new()
        .terminator(csv::Terminator::CRLF)
        .from_writer(Vec::new())
}

fn finish(w: csv::Writer<Vec<u8>>) -> Vec<u8> {
    w.into_inner().unwrap_or_default()
}

fn parts(a: &crate::Analysis, d: &Display) -> Vec<u8> {
    let (model, solution) = (&a.model, &a.solution);
    let mut w = writer();
    let mut header = vec![
        "combination".to_string(),
        "part".into(),
        head("force", &d.force),
        head("stress", &d.stress),
        "total strain".into(),
        "strain from force".into(),
        head("elongation", &d.small),
        "state".into(),
    ];
    // beams add their bending, moments as along the beam (sagging positive)
    let bending = model.parts.iter().any(|p| p.bend.is_some());
    if bending {
        header.extend([
            "kind".to_string(),
            head("moment at A", &d.moment),
            head("moment at B", &d.moment),
            head("largest moment", &d.moment),
            head("largest moment at", &d.length),
            head("largest shear", &d.force),
            head("largest deflection", &d.small),
            head("largest deflection at", &d.length),
        ]);
    }
    let _ = w.write_record(&header);
    for r in &solution.combinations {
        for (i, (p, pr)) in model.parts.iter().zip(&r.parts).enumerate() {
            let mut row = vec![
                r.name.clone(),
                p.name.to_string(),
                v(pr.force.value, &d.force),
                pr.stress.map_or(String::new(), |s| v(s.value, &d.stress)),
                full(pr.strain),
                super::text::force_strain(model, p, pr).map_or(String::new(), full),
                v(pr.elongation.value, &d.small),
                pr.state.name().into(),
            ];
            if bending {
                match r.beam(i) {
                    Some(b) => {
                        let [ma, mb] = b.end_moments_along();
                        row.extend([
                            "beam".to_string(),
                            v(ma, &d.moment),
                            v(mb, &d.moment),
                            v(b.moment_max.0, &d.moment),
                            v(b.moment_max.1, &d.length),
                            v(b.shear_max, &d.force),
                            v(b.deflection_max.0, &d.small),
                            v(b.deflection_max.1, &d.length),
                        ]);
                    }
                    None => {
                        row.push("part".into());
                        row.extend(std::iter::repeat_n(String::new(), 7));
                    }
                }
            }
            let _ = w.write_record(&row);
        }
    }
    finish(w)
}

fn nodes(a: &crate::Analysis, d: &Display) -> Vec<u8> {
    let (model, solution) = (&a.model, &a.solution);
    let mut w = writer();
    let mut header = vec!["combination".to_string(), "node".into()];
    match model.kind {
        Kind::Axial => {
            header.push(head("displacement", &d.small));
            header.push(head("reaction", &d.force));
        }
        Kind::Plane => {
            header.push(head("displacement x", &d.small));
            header.push(head("displacement y", &d.small));
            header.push(head("reaction x", &d.force));
            header.push(head("reaction y", &d.force));
        }
    }
    let turns = model.rotating_nodes();
    let any_turns = turns.contains(&true);
    if any_turns {
        header.push("rotation (rad)".into());
        header.push(head("reaction moment", &d.moment));
    }
    let _ = w.write_record(&header);
    let nd = model.kind.dofs();
    for r in &solution.combinations {
        for ((n, nr), turns) in model.nodes.iter().zip(&r.nodes).zip(&turns) {
            let mut row = vec![r.name.clone(), n.name.to_string()];
            for k in 0..nd {
                row.push(v(nr.displacement[k].value, &d.small));
            }
            // a reaction only where the node is fixed
            for k in 0..nd {
                row.push(if n.fixed[k] {
                    v(nr.reaction[k].value, &d.force)
                } else {
                    String::new()
                });
            }
            if any_turns {
                row.push(if *turns {
                    full(nr.rotation)
                } else {
                    String::new()
                });
                row.push(if *turns && n.fixed_rotation {
                    v(nr.reaction_moment, &d.moment)
                } else {
                    String::new()
                });
            }
            let _ = w.write_record(&row);
        }
    }
    finish(w)
}

fn checks(a: &crate::Analysis, d: &Display) -> Vec<u8> {
    let mut w = writer();
    let _ = w.write_record([
        "check",
        "state",
        "combination",
        "governing",
        "demand",
        "capacity",
        "unit",
        "utilization",
        "result",
    ]);
    let mut write = |checks: &crate::checks::Checks, names: &[String], state: &str| {
        let mut governing = vec![false; checks.outcomes.len()];
        for k in checks.governing_indices() {
            governing[k] = true;
        }
        for (o, gov) in checks.outcomes.iter().zip(governing) {
            let (demand, capacity, unit) = match d.unit_for(o.demand.dim) {
                Some(u) => (v(o.demand.value, u), v(o.capacity.value, u), u.name.clone()),
                None => (
                    full(o.demand.value),
                    full(o.capacity.value),
                    o.demand.dim.si_symbol(),
                ),
            };
            let _ = w.write_record([
                o.label.to_string(),
                state.into(),
                names[o.combination].clone(),
                gov.to_string(),
                demand,
                capacity,
                unit,
                o.utilization.map_or(String::new(), full),
                if o.pass { "pass" } else { "fail" }.into(),
            ]);
        }
    };
    let names: Vec<String> = a
        .solution
        .combinations
        .iter()
        .map(|c| c.name.clone())
        .collect();
    write(&a.checks, &names, "short_term");
    if let Some((lt, c)) = &a.long_term_checks {
        let names: Vec<String> = lt.combinations.iter().map(|c| c.name.clone()).collect();
        write(c, &names, "long_term");
    }
    finish(w)
}

//! The capacity section: the load path to yield and to a mechanism.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::*;

pub(super) fn capacity_section(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    if a.capacity.is_empty() {
        return;
    }
    let (model, solution) = (&a.model, &a.solution);
    doc.h(2, "Capacity");
    doc.p("The loads of each combination are scaled by a load factor λ while temperature, misfits and free strains stay at their full value. Parts are elastic–perfectly plastic: once a part reaches its yield force F_y = f_y·A it keeps carrying F_y, and the load redistributes to the others until the assembly becomes a mechanism (the plastic limit). A part that carries one sense only lets go when its force reaches zero, and carries nothing after; the path is followed through that event too. The applied load at a load factor is λ times the sum of the combination's loads (in a plane model, the size of their resultant).");
    doc.p("Yield forces:");
    for p in &model.parts {
        let (Some(m), Some(area)) = (p.material(), p.area()) else {
            continue;
        };
        let mat = &model.materials[m];
        let Some(fy) = mat.yield_strength else {
            continue;
        };
        let mut yield_force = |force: &str, strength: &str, fy: f64| {
            doc.eq(&format!(
                "{force}({}) = {strength} · A = {} · {} = {}",
                p.name,
                f.stress(fy),
                f.area(area.value),
                f.force(fy * area.value)
            ));
        };
        yield_force("F_y", "f_y", fy.value);
        if let Some(fyc) = mat.yield_compression {
            yield_force("F_y,c", "f_y,c", fyc.value);
        }
    }
    doc.end_list();
    // One reason for every combination is said once.
    let first_note = a.capacity.first().and_then(|c| c.note.clone());
    if first_note.is_some()
        && a.capacity
            .iter()
            .all(|c| c.note == first_note && c.events.is_empty())
    {
        doc.p(&format!("Capacity {}.", first_note.unwrap_or_default()));
        return;
    }
    for c in &a.capacity {
        let name = &solution.combinations[c.combination].name;
        doc.h(3, &format!("Combination `{name}`"));
        if let Some(n) = &c.note {
            doc.p(&format!("Capacity {n}."));
            if c.events.is_empty() {
                continue;
            }
        }
        let rows: Vec<Vec<String>> = c
            .events
            .iter()
            .enumerate()
            .map(|(k, e)| {
                let sense = if e.tension { "tension" } else { "compression" };
                vec![
                    format!("{}", k + 1),
                    format!("`{}`", model.parts[e.part].name),
                    if e.released {
                        format!("lets go (carried {sense} only)")
                    } else {
                        format!("yields in {sense}")
                    },
                    f.n(e.lambda),
                ]
            })
            .collect();
        doc.table(&["Order", "Part", "Event", "Load factor λ"], &rows, &[0, 3]);
        if doc.figures != Figures::Omitted {
            if let Some(plot) = crate::report::drawing::capacity_plot(model, c, f.d) {
                doc.figure(plot);
            }
        }
        // the applied load at a load factor: λ times the combination's loads
        let total = combination_load(model, c.combination);
        let applied = |what: &str, l: f64| {
            format!(
                "applied load at {what}: λ · ΣP = {} · {} = {}",
                f.n(l),
                f.force_t(total),
                f.force(l * total)
            )
        };
        match (c.first_yield, c.limit) {
            (None, Some(l)) => {
                doc.eq(&format!("mechanism as parts let go: λ_p = {}", f.n(l)));
                doc.eq(&applied("the limit", l));
                doc.end_list();
                doc.p("The assembly becomes a mechanism when the parts above let go, before any part yields.");
            }
            (Some(y), Some(l)) => {
                doc.eq(&format!("first yield: λ_y = {}", f.n(y)));
                doc.eq(&applied("first yield", y));
                doc.eq(&format!("plastic limit: λ_p = {}", f.n(l)));
                doc.eq(&applied("the limit", l));
                doc.eq(&format!(
                    "reserve beyond first yield: λ_p / λ_y = {} / {} = {}",
                    f.n(l),
                    f.n(y),
                    f.n(l / y)
                ));
                doc.end_list();
                let rows: Vec<Vec<String>> = model
                    .parts
                    .iter()
                    .enumerate()
                    .map(|(i, p)| {
                        vec![
                            text(&p.name),
                            f.force_bare(c.limit_forces[i]),
                            f.force_bare(c.residual.get(i).copied().unwrap_or(0.0)),
                        ]
                    })
                    .collect();
                doc.p("Part forces at the plastic limit, and the residual forces left after unloading elastically from it:");
                if c.events.iter().any(|e| e.released) {
                    doc.p("The unloading is taken with every part engaged: a part that let go on the way up is assumed to take load again as the assembly unloads.");
                }
                doc.table(
                    &[
                        "Part",
                        &head("At the limit", &f.d.force),
                        &head("Residual after unloading", &f.d.force),
                    ],
                    &rows,
                    &[1, 2],
                );
            }
            (Some(y), None) => {
                doc.eq(&format!("first yield: λ_y = {}", f.n(y)));
                doc.eq(&applied("first yield", y));
                doc.end_list();
                doc.p("No plastic limit forms: parts without a yield strength keep carrying the added load.");
            }
            _ => doc.p("No part reaches yield under these loads at any load factor."),
        }
    }
}

/// The sum of a combination's factored loads (in a plane model, the size
/// of their resultant), as a force: what a load factor multiplies.
pub(super) fn combination_load(model: &Model, k: usize) -> f64 {
    let mut sum = [0.0f64; 2];
    for &(case, factor) in &model.combinations[k].terms {
        for l in &model.cases[case].loads {
            sum[0] += factor * l.force[0].value;
            sum[1] += factor * l.force[1].value;
        }
    }
    match model.kind {
        Kind::Axial => sum[0],
        Kind::Plane => sum[0].hypot(sum[1]),
    }
}

//! The stability section: each compressed part against its Euler load.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::*;

pub(super) fn buckling_section(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    if a.buckling.is_empty() {
        return;
    }
    let (model, solution) = (&a.model, &a.solution);
    doc.h(2, "Stability (Euler buckling)");
    doc.p("For parts with a `buckling_length` (the effective length K·L) the Euler load P_e = π²·E·I / (K·L)² and the slenderness K·L / r with r = √(I / A) are compared with the largest compression over all combinations. Parts spanning the same two nodes buckle together: their group takes Σ E·I.");
    let rows: Vec<Vec<String>> = a
        .buckling
        .iter()
        .map(|b| {
            let names: Vec<String> = b
                .parts
                .iter()
                .map(|&i| format!("`{}`", model.parts[i].name))
                .collect();
            vec![
                names.join(" + "),
                f.bare(b.kl, &f.d.small),
                b.r.map_or("—".into(), |r| f.bare(r, &f.d.small)),
                b.slenderness().map_or("—".into(), |s| f.n(s)),
                f.force_bare(b.euler),
                if b.compression > 0.0 {
                    format!(
                        "{} (`{}`)",
                        f.force_bare(b.compression),
                        solution.combinations[b.combination].name
                    )
                } else {
                    "none (never in compression)".into()
                },
                f.n(b.compression / b.euler),
            ]
        })
        .collect();
    doc.table(
        &[
            "Part",
            &head("K·L", &f.d.small),
            &head("r", &f.d.small),
            "K·L / r",
            &head("P_e", &f.d.force),
            &head("Largest compression", &f.d.force),
            "C / P_e",
        ],
        &rows,
        &[1, 2, 3, 4, 5, 6],
    );
    for b in &a.buckling {
        let names: Vec<&str> = b
            .parts
            .iter()
            .map(|&i| model.parts[i].name.as_str())
            .collect();
        let ei_text = b
            .parts
            .iter()
            .map(|&i| {
                let p = &model.parts[i];
                let e = p.material().map_or(0.0, |m| model.materials[m].e.value);
                format!(
                    "{} · {}",
                    f.stress(e),
                    f.d.quantity(crate::units::Quantity::new(
                        p.inertia().unwrap_or(0.0),
                        Dimension::SECOND_MOMENT
                    ))
                )
            })
            .collect::<Vec<_>>()
            .join(" + ");
        let kl = f.with(b.kl, &f.d.small);
        // Σ only where a group of parts buckles together.
        let ei = if b.parts.len() > 1 { "Σ E·I" } else { "E·I" };
        doc.eq(&format!(
            "P_e({}) = π² · {ei} / (K·L)² = π² · ({ei_text}) / ({kl} · {kl}) = {}",
            names.join(" + "),
            f.force(b.euler)
        ));
    }
    doc.end_list();
}

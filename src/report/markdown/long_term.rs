//! The long-term section: creep and shrinkage under the sustained cases.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::*;

pub(super) fn long_term_section(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    if a.long_term.is_empty() {
        return;
    }
    let (model, solution) = (&a.model, &a.solution);
    doc.h(2, "Long-term state (creep)");
    doc.p("Sustained cases act on creeping materials with the effective modulus E_eff = E / (1 + φ) (effective modulus method, EN 1992-1-1 7.4.3); the other cases act on E. The long-term state is the sum of the two; the short-term state is the one solved above.");
    for m in &model.materials {
        if let Some(phi) = m.creep.filter(|p| *p > 0.0) {
            doc.eq(&format!(
                "E_eff({}) = E / (1 + φ) = {} / (1 + {}) = {}",
                m.name,
                f.stress(m.e.value),
                f.n(phi),
                f.stress(m.e.value / (1.0 + phi))
            ));
        }
    }
    doc.end_list();
    let sustained: Vec<String> = model
        .cases
        .iter()
        .filter(|c| c.sustained)
        .map(|c| format!("`{}`", c.name))
        .collect();
    doc.p(&format!("Sustained cases: {}.", sustained.join(", ")));
    for l in &a.long_term {
        let short = &solution.combinations[l.combination];
        doc.h(3, &format!("Combination `{}`", short.name));
        let Some(r) = &l.result else {
            doc.p(&format!(
                "Long-term state {}.",
                l.note.clone().unwrap_or_default()
            ));
            continue;
        };
        let rows: Vec<Vec<String>> = model
            .parts
            .iter()
            .enumerate()
            .map(|(i, p)| {
                let s0 = short.parts[i].stress.map(|s| s.value);
                let s1 = r.parts[i].stress.map(|s| s.value);
                vec![
                    text(&p.name),
                    f.force_bare(short.parts[i].force.value),
                    f.force_bare(r.parts[i].force.value),
                    s0.map_or("—".into(), |s| f.stress_bare(s)),
                    s1.map_or("—".into(), |s| f.stress_bare(s)),
                    match (s0, s1) {
                        (Some(x), Some(y)) if x != 0.0 => {
                            let c = 100.0 * (y.abs() - x.abs()) / x.abs();
                            format!("{}{}", if c > 0.0 { "+" } else { "" }, number(c, 3))
                        }
                        _ => "—".into(),
                    },
                ]
            })
            .collect();
        doc.table(
            &[
                "Part",
                &head("Force, short term", &f.d.force),
                &head("Force, long term", &f.d.force),
                &head("Stress, short term", &f.d.stress),
                &head("Stress, long term", &f.d.stress),
                "Change in size of stress (%)",
            ],
            &rows,
            &[1, 2, 3, 4, 5],
        );
    }
    if let Some((lt, checks)) = &a.long_term_checks {
        doc.h(3, "Checks in the long-term state");
        let rows: Vec<Vec<String>> = checks
            .governing()
            .iter()
            .map(|o| {
                vec![
                    text(&o.label),
                    format!("`{}`", lt.combinations[o.combination].name),
                    written(o, f.d)[0].clone(),
                    written(o, f.d)[1].clone(),
                    utilization(o.utilization),
                    verdict(o.pass, true),
                ]
            })
            .collect();
        check_table(doc, "Governing combination", &rows);
    }
}

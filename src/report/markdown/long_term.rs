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
        if let Some(split) = &l.split {
            f.scales.set(crate::report::display::Scales::of(r));
            part_equations(doc, f, model, r, split);
            f.scales.set(crate::report::display::Scales::default());
        }
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

/// Each part's long-term force and elongation, substituted: the sustained
/// actions meet k_eff = k / (1 + φ), the others k.
fn part_equations(
    doc: &mut Doc,
    f: &Fmt<'_>,
    model: &Model,
    r: &crate::solve::CombinationResult,
    split: &crate::solve::longterm::Split,
) {
    doc.p("Long-term force and elongation of each part: the sustained actions (subscript s) act on k_eff = k / (1 + φ), the others (subscript t) on k; δ₀ is the elongation free of force.");
    let (es, fs) = &split.sustained;
    let (et, ft) = &split.transient;
    for (i, p) in model.parts.iter().enumerate() {
        let phi = p
            .material()
            .and_then(|m| model.materials[m].creep)
            .unwrap_or(0.0);
        doc.p(&format!("**{}**", text(&p.name)));
        let k = |v: f64| f.with(v, &f.d.stiffness);
        if phi > 0.0 {
            doc.eq(&format!(
                "k_eff = k / (1 + φ) = {} / (1 + {}) = {}",
                k(split.k[i]),
                f.n(phi),
                k(split.k_eff[i])
            ));
        }
        let keff = if phi > 0.0 { "k_eff" } else { "k" };
        doc.eq(&format!(
            "N = {keff}·(δ_s − δ₀,s) + k·(δ_t − δ₀,t) = {} · ({} - {}) + {} · ({} - {}) = {}",
            k(split.k_eff[i]),
            f.small_t(es[i]),
            f.small_t(fs[i]),
            k(split.k[i]),
            f.small_t(et[i]),
            f.small_t(ft[i]),
            f.force(r.parts[i].force.value)
        ));
        doc.eq(&format!(
            "δ = δ_s + δ_t = {} + {} = {}",
            f.small_t(es[i]),
            f.small_t(et[i]),
            f.small(r.parts[i].elongation.value)
        ));
        doc.end_list();
    }
    beam_equations(doc, f, model, r, split);
}

/// Each beam's long-term bending: the sustained actions meet E·I / (1 + φ),
/// the others E·I; end moments add, deflections add, each at its own E·I.
fn beam_equations(
    doc: &mut Doc,
    f: &Fmt<'_>,
    model: &Model,
    r: &crate::solve::CombinationResult,
    split: &crate::solve::longterm::Split,
) {
    if split.beams.is_empty() {
        return;
    }
    doc.p("Long-term bending of each beam: the sustained actions (subscript s) bend it at E·I_eff = E·I / (1 + φ), the others (subscript t) at E·I; its end moments (counter-clockwise on the beam) are the sums, and so is its deflection, each part at its own E·I.");
    for (b, (s, t)) in r.beams.iter().zip(&split.beams) {
        let p = &model.parts[b.part];
        let (Some(bend), Some(m)) = (&p.bend, p.material()) else {
            continue;
        };
        let mat = &model.materials[m];
        let phi = mat.creep.unwrap_or(0.0);
        doc.p(&format!("**{}**", text(&p.name)));
        let ei_unit = Shown {
            name: format!("{}·{}²", f.d.force.name, f.d.length.name),
            factor: f.d.force.factor * f.d.length.factor * f.d.length.factor,
        };
        let ei = mat.e.value * bend.inertia;
        if phi > 0.0 {
            doc.eq(&format!(
                "E·I_eff = E·I / (1 + φ) = {} · {} / (1 + {}) = {}",
                f.stress(mat.e.value),
                f.inertia(bend.inertia),
                f.n(phi),
                f.with(ei / (1.0 + phi), &ei_unit)
            ));
        }
        for (k, end) in ["M_AB", "M_BA"].iter().enumerate() {
            doc.eq(&format!(
                "{end} = {end},s + {end},t = {} + {} = {}",
                f.moment_t(s.end_moments[k]),
                f.moment_t(t.end_moments[k]),
                f.moment(b.end_moments[k])
            ));
        }
        doc.end_list();
        doc.p(&format!(
            "Largest moment in size along `{}`: {} at {} from end A; largest deflection across its chord {} at {}.",
            p.name,
            f.moment(b.moment_max.0),
            f.with(b.moment_max.1, &f.d.length),
            f.small(b.deflection_max.0),
            f.with(b.deflection_max.1, &f.d.length),
        ));
    }
}

//! The inputs section: title, materials, nodes, parts, lets and cases.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::*;

pub(super) fn section(doc: &mut Doc, f: &Fmt<'_>, source: &Source, model: &Model) {
    doc.h(2, "Inputs");
    // each let's value as shown, found by name once
    let values: std::collections::HashMap<&str, String> = model
        .lets
        .iter()
        .map(|l| (l.name.as_str(), shown(f, l)))
        .collect();
    design_quantities(doc, f, source, model, &values);
    materials(doc, f, source, model, &values);
    nodes(doc, f, model);
    parts(doc, f, model);
    cases(doc, f, model);
}

/// A `let`'s value as the report shows it: in the unit it is written in
/// when it is one number with a unit (`0.4 kip/ft`, `250 mm`: the reader
/// finds the file's own value), else in the calc's unit for its kind.
pub(super) fn shown(f: &Fmt<'_>, l: &crate::model::LetValue) -> String {
    if let crate::syntax::ast::ExprKind::Quantity { unit: Some(u), .. } = &l.expr.kind {
        if let Ok(unit) = crate::model::eval::unit_value(u) {
            if unit.dim == l.value.dim && unit.value != 0.0 {
                return format!("{} {u}", number(l.value.value / unit.value, f.d.digits));
            }
        }
    }
    if l.value.dim == Dimension::LENGTH {
        f.length(l.value.value)
    } else {
        f.d.quantity(l.value)
    }
}

/// The `let`s, with the expressions of those derived from other names.
fn design_quantities(
    doc: &mut Doc,
    f: &Fmt<'_>,
    source: &Source,
    model: &Model,
    values: &std::collections::HashMap<&str, String>,
) {
    if !model.lets.is_empty() {
        doc.h(3, "Design quantities");
        let with_sources = model.lets.iter().any(|l| !l.sources.is_empty());
        let rows: Vec<Vec<String>> = model
            .lets
            .iter()
            .map(|l| {
                let expr = source.slice(l.expr.span).trim().replace('\n', " ");
                let value = shown(f, l);
                // a value derived from others: its expression with their
                // values substituted, once
                let expr = if crate::report::substitute::uses_names(&l.expr) {
                    let with = crate::report::substitute::substituted(&l.expr, source, &|n| {
                        values.get(n).cloned()
                    });
                    format!("{} = {}", code(&expr), code(&with))
                } else {
                    code(&expr)
                };
                let mut row = vec![text(&l.name), expr, value];
                if with_sources {
                    row.push(if l.sources.is_empty() {
                        "—".into()
                    } else {
                        l.sources.join("; ")
                    });
                }
                row
            })
            .collect();
        if with_sources {
            doc.table(&["Name", "Expression", "Value", "Source"], &rows, &[2]);
        } else {
            doc.table(&["Name", "Expression", "Value"], &rows, &[2]);
        }
    }
}

/// The materials, and their values derived from other names.
fn materials(
    doc: &mut Doc,
    f: &Fmt<'_>,
    source: &Source,
    model: &Model,
    values: &std::collections::HashMap<&str, String>,
) {
    doc.h(3, "Materials");
    let rows: Vec<Vec<String>> = model
        .materials
        .iter()
        .map(|m| {
            let opt = |p: Option<uom::si::f64::Pressure>| {
                p.map_or("—".into(), |p| f.stress_bare(p.value))
            };
            let allow = match (
                m.allowable_tension.or(m.allowable),
                m.allowable_compression.or(m.allowable),
            ) {
                (None, None) => "—".to_string(),
                (t, c) if t == c => opt(t),
                (Some(t), None) => format!("{} in tension", f.stress_bare(t.value)),
                (None, Some(c)) => format!("{} in compression", f.stress_bare(c.value)),
                (t, c) => format!("{} in tension, {} in compression", opt(t), opt(c)),
            };
            let e = if m.e_sources.is_empty() {
                f.stress_bare(m.e.value)
            } else {
                format!("{} ({})", f.stress_bare(m.e.value), m.e_sources.join("; "))
            };
            vec![
                text(&m.name),
                e,
                m.alpha.map_or("—".into(), |a| f.alpha_bare(a.value)),
                opt(m.yield_strength),
                allow,
            ]
        })
        .collect();
    let per_degree = format!("1/{}", degree(&f.d.temperature.name));
    doc.table(
        &[
            "Material",
            &head("E", &f.d.stress),
            &format!("α ({per_degree})"),
            &head("Yield", &f.d.stress),
            &head("Allowable", &f.d.stress),
        ],
        &rows,
        &[1, 2, 3],
    );
    // values derived from other names, substituted once
    let mut any = false;
    for m in &model.materials {
        for (key, e) in &m.derived {
            let with =
                crate::report::substitute::substituted(e, source, &|n| values.get(n).cloned());
            let value = match *key {
                "E" => f.stress(m.e.value),
                "alpha" => m.alpha.map_or("—".into(), |a| f.alpha(a.value)),
                "creep" => m.creep.map_or("—".into(), |c| f.n(c)),
                _ => [
                    ("yield", m.yield_strength),
                    ("yield_compression", m.yield_compression),
                    ("allowable", m.allowable),
                    ("allowable_tension", m.allowable_tension),
                    ("allowable_compression", m.allowable_compression),
                ]
                .iter()
                .find(|(k, _)| k == key)
                .and_then(|(_, v)| *v)
                .map_or("—".into(), |v| f.stress(v.value)),
            };
            if !any {
                doc.p("Material values derived from other quantities, as written and with their values substituted:");
                any = true;
            }
            doc.eq(&format!(
                "{key}({}): {} = {} = {value}",
                text(&m.name),
                code(source.slice(e.span).trim()),
                code(&with)
            ));
        }
    }
    if any {
        doc.end_list();
    }
}

/// Nodes, supports, rigid bodies and ties.
fn nodes(doc: &mut Doc, f: &Fmt<'_>, model: &Model) {
    doc.h(3, "Nodes and supports");
    let turns = model.rotating_nodes();
    let rows: Vec<Vec<String>> = model
        .nodes
        .iter()
        .zip(&turns)
        .map(|(n, turns)| {
            let at = match model.kind {
                Kind::Axial => f.bare(n.x.value, &f.d.length),
                Kind::Plane => format!(
                    "({}, {})",
                    f.bare(n.x.value, &f.d.length),
                    f.bare(n.y.value, &f.d.length)
                ),
            };
            let sup = match (model.kind, n.fixed) {
                (Kind::Axial, [true, _]) | (Kind::Plane, [true, true]) => "fixed",
                (Kind::Plane, [true, false]) => "fixed in x (roller)",
                (Kind::Plane, [false, true]) => "fixed in y (roller)",
                _ => "free",
            };
            // where a beam turns the node, whether its rotation is held
            let sup = match (*turns, n.fixed_rotation) {
                (false, _) => sup.to_string(),
                (true, false) if sup == "fixed" => "pinned (fixed, free to turn)".to_string(),
                (true, true) if sup == "free" => "rotation held".to_string(),
                (true, true) => format!("{sup}, rotation held"),
                (true, false) if sup == "free" => "free".to_string(),
                (true, false) => format!("{sup}, free to turn"),
            };
            vec![text(&n.name), at, sup]
        })
        .collect();
    doc.table(
        &["Node", &head("Position", &f.d.length), "Support"],
        &rows,
        &[1],
    );
    for r in &model.rigids {
        let names: Vec<String> = r
            .nodes
            .iter()
            .map(|&n| format!("`{}`", model.nodes[n].name))
            .collect();
        doc.p(&format!(
            "Rigid body `{}`: nodes {} move as one rigid body{}.",
            r.name,
            names.join(", "),
            if model.kind == Kind::Plane {
                format!(
                    " (two translations and a small rotation θ about `{}`)",
                    model.nodes[r.nodes[0]].name
                )
            } else {
                String::new()
            }
        ));
    }
    for t in &model.ties {
        let names: Vec<String> = t
            .nodes
            .iter()
            .map(|&n| format!("`{}`", model.nodes[n].name))
            .collect();
        doc.p(&format!("Tie: nodes {} move together.", names.join(", ")));
    }
}

/// Parts: law, geometry, stiffness and limits.
fn parts(doc: &mut Doc, f: &Fmt<'_>, model: &Model) {
    doc.h(3, "Parts");
    let rows: Vec<Vec<String>> = model
        .parts
        .iter()
        .map(|p| {
            let ends = format!(
                "`{}` → `{}`",
                model.nodes[p.ends[0]].name, model.nodes[p.ends[1]].name
            );
            let (mat, area) = match &p.law {
                Law::Member {
                    material,
                    area,
                    section,
                    ..
                } => (
                    text(&model.materials[*material].name),
                    match section {
                        Some(s) => format!("{} ({s})", f.bare(area.value, &f.d.area)),
                        None => f.bare(area.value, &f.d.area),
                    },
                ),
                Law::Spring { .. } => ("spring".into(), "—".into()),
            };
            let mut notes = Vec::new();
            if p.carries != Carries::Both {
                notes.push(format!("{} only", p.carries.name()));
            }
            if p.slack.value > 0.0 {
                notes.push(format!("gap {}", f.small(p.slack.value)));
            }
            if p.misfit.value != 0.0 {
                notes.push(format!("misfit {}", f.small(p.misfit.value)));
            }
            if let Some(b) = &p.bend {
                notes.push(format!(
                    "beam: I = {}, depth {}",
                    f.inertia(b.inertia),
                    f.small(2.0 * b.fibre)
                ));
                let ends = ["A", "B"];
                for k in 0..2 {
                    if b.hinge[k] {
                        notes.push(format!("hinged at end {}", ends[k]));
                    }
                }
            }
            vec![
                text(&p.name),
                ends,
                mat,
                area,
                f.bare(p.length.value, &f.d.length),
                f.bare(p.stiffness(&model.materials).value, &f.d.stiffness),
                if notes.is_empty() {
                    "—".into()
                } else {
                    notes.join(", ")
                },
            ]
        })
        .collect();
    doc.table(
        &[
            "Part",
            "Ends",
            "Material",
            &head("A", &f.d.area),
            &head("L", &f.d.length),
            &head("k", &f.d.stiffness),
            "Notes",
        ],
        &rows,
        &[3, 4, 5],
    );
    doc.p("Axial stiffness of each part:");
    for p in &model.parts {
        let k = p.stiffness(&model.materials).value;
        match &p.law {
            Law::Member { material, area, .. } => {
                let e = model.materials[*material].e.value;
                doc.eq(&format!(
                    "k({}) = E·A / L = {} · {} / {} = {}",
                    p.name,
                    f.stress(e),
                    f.area(area.value),
                    f.with(p.length.value, &f.d.small),
                    f.stiffness(k)
                ));
            }
            Law::Spring { .. } => doc.eq(&format!(
                "k({}) = {} (spring, as given)",
                p.name,
                f.stiffness(k)
            )),
        }
    }
    doc.end_list();
}

/// Load cases and combinations.
fn cases(doc: &mut Doc, f: &Fmt<'_>, model: &Model) {
    doc.h(3, "Load cases and combinations");
    let mut rows = Vec::new();
    for c in &model.cases {
        let parts = crate::report::text::case_actions(model, c, f.d);
        rows.push(vec![
            format!(
                "`{}`{}",
                c.name,
                if c.sustained { " (sustained)" } else { "" }
            ),
            if parts.is_empty() {
                "no actions (misfits act in every combination)".into()
            } else {
                parts.join("; ")
            },
        ]);
    }
    doc.table(&["Case", "Actions"], &rows, &[]);
    let rows: Vec<Vec<String>> = (0..model.combinations.len())
        .map(|i| {
            vec![
                format!("`{}`", model.combinations[i].name),
                combination_text(model, i),
            ]
        })
        .collect();
    doc.table(&["Combination", "Definition"], &rows, &[]);
    doc.p("Every combination is solved directly with its factored actions (never by adding case results), so parts that go slack behave right; misfits act in every combination at full value.");
}

//! The compact, aligned results tables of `tandem solve`.

use super::display::{number, Display, Scales};
use crate::model::{Kind, Model};

/// Columns padded to a common width: text columns (those in `left`) flush
/// left, number columns flush right.
pub fn aligned(rows: &[Vec<String>], left: &[usize], indent: &str) -> String {
    let cols = rows.iter().map(Vec::len).max().unwrap_or(0);
    let mut width = vec![0usize; cols];
    for r in rows {
        widen(&mut width, r);
    }
    let mut out = String::new();
    for r in rows {
        aligned_row(&mut out, r, &width, left, indent);
    }
    out
}

/// Grow `width` to hold each cell of `row` (the widths [`aligned_row`] pads to).
pub fn widen<S: AsRef<str>>(width: &mut Vec<usize>, row: &[S]) {
    if width.len() < row.len() {
        width.resize(row.len(), 0);
    }
    for (w, c) in width.iter_mut().zip(row) {
        *w = (*w).max(crate::words::width(c.as_ref()));
    }
}

/// One row of an [`aligned`] table, padded to `width`, onto `out`.
pub fn aligned_row<S: AsRef<str>>(
    out: &mut String,
    row: &[S],
    width: &[usize],
    left: &[usize],
    indent: &str,
) {
    let start = out.len();
    out.push_str(indent);
    for (i, c) in row.iter().enumerate() {
        let c = c.as_ref();
        let pad = width
            .get(i)
            .copied()
            .unwrap_or(0)
            .saturating_sub(crate::words::width(c));
        if left.contains(&i) {
            out.push_str(c);
            out.extend(std::iter::repeat_n(' ', pad));
        } else {
            out.extend(std::iter::repeat_n(' ', pad));
            out.push_str(c);
        }
        out.push_str("   ");
    }
    let end = out[start..].trim_end().len() + start;
    out.truncate(end);
    out.push('\n');
}

/// The heading of a combination: `name = 1.2 dead + 1.6 live`, or for a
/// case solved alone (no `combine` in the file) `name (case alone)`.
pub fn combination_heading(model: &Model, index: usize, code: bool) -> String {
    let c = &model.combinations[index];
    let name = if code {
        format!("`{}`", c.name)
    } else {
        c.name.clone()
    };
    if c.declared {
        format!("{name} = {}", combination_text(model, index))
    } else {
        format!("{name} (case alone)")
    }
}

/// How a combination is made, e.g. `1.2 dead + 1.6 live`.
pub fn combination_text(model: &Model, index: usize) -> String {
    let c = &model.combinations[index];
    let mut s = String::new();
    for (k, (case, f)) in c.terms.iter().enumerate() {
        let name = &model.cases[*case].name;
        let (sign, mag) = if *f < 0.0 { ("-", -f) } else { ("+", *f) };
        if k == 0 {
            if sign == "-" {
                s.push('-');
            }
        } else {
            s.push_str(&format!(" {sign} "));
        }
        if (mag - 1.0).abs() > 0.0 {
            s.push_str(&format!("{mag} "));
        }
        s.push_str(name);
    }
    if s.is_empty() {
        s.push_str("no loads");
    }
    s
}

/// What a case does, one phrase per action, in the file's order of kinds:
/// loads at nodes, loads along beams, moments, temperature changes, free
/// strains, support movements and prescribed rotations. The one wording of
/// a case's actions (the report's inputs and `diff` use it).
pub fn case_actions(model: &Model, c: &crate::model::Case, d: &Display) -> Vec<String> {
    use crate::units::{Dimension, Quantity};
    let q = |v: f64, dim: Dimension| d.quantity(Quantity::new(v, dim));
    let mut acts = Vec::new();
    for l in &c.loads {
        let node = &model.nodes[l.node].name;
        acts.push(match model.kind {
            Kind::Axial => format!("load `{node}` {}", q(l.force[0].value, Dimension::FORCE)),
            Kind::Plane => format!(
                "load `{node}` ({}, {})",
                q(l.force[0].value, Dimension::FORCE),
                q(l.force[1].value, Dimension::FORCE)
            ),
        });
    }
    let w = d.per_length();
    for l in &c.distributed {
        acts.push(format!(
            "load along `{}` ({}, {}) {}",
            model.parts[l.part].name,
            number(w.value(l.w[0]), d.digits),
            number(w.value(l.w[1]), d.digits),
            w.name
        ));
    }
    for m in &c.moments {
        acts.push(format!(
            "moment `{}` {}",
            model.nodes[m.node].name,
            q(m.moment, Dimension::MOMENT)
        ));
    }
    for t in &c.temperatures {
        let on = t.part.map_or("all parts".to_string(), |i| {
            format!("`{}`", model.parts[i].name)
        });
        acts.push(format!(
            "ΔT {} on {on}",
            q(t.change.value, Dimension::TEMPERATURE)
        ));
    }
    for s in &c.strains {
        acts.push(format!(
            "free strain {} µε on `{}`",
            number(s.strain.value * 1e6, d.digits),
            model.parts[s.part].name
        ));
    }
    for s in &c.settlements {
        let dir = match (model.kind, s.direction) {
            (Kind::Axial, _) => "",
            (Kind::Plane, 0) => " x",
            (Kind::Plane, _) => " y",
        };
        acts.push(format!(
            "`{}`{dir} moves {}",
            model.nodes[s.node].name,
            q(s.movement.value, Dimension::LENGTH)
        ));
    }
    for t in &c.twists {
        acts.push(format!(
            "`{}` turns {} rad",
            model.nodes[t.node].name,
            number(t.angle, d.digits)
        ));
    }
    acts
}

/// The text `tandem solve` prints.
/// The strain from force alone, σ/E, of a member (springs have none); a
/// beam's from its axial force, N/(E·A).
pub fn force_strain(
    model: &Model,
    p: &crate::model::Part,
    pr: &crate::solve::PartResult,
) -> Option<f64> {
    let e = model.materials[p.material()?].e.value;
    if p.bend.is_some() {
        // a beam's stress is its extreme fibre's: the force's strain is N/(E·A)
        return Some(pr.force.value / p.area()?.value / e);
    }
    Some(pr.stress?.value / e)
}

pub fn solve_text(a: &crate::Analysis, d: &Display) -> String {
    let (model, solution, checks) = (&a.model, &a.solution, &a.checks);
    let mut out = String::new();
    out.push_str(&format!(
        "{} model: {}\n",
        model.kind.name(),
        crate::model::counts(&[
            (model.parts.len(), "part"),
            (model.nodes.len(), "node"),
            (solution.unknowns, "unknown"),
        ])
    ));
    if !a.left_out.is_empty() {
        out.push_str(&format!("INCOMPLETE: {}\n", super::left_out(&a.left_out)));
    }
    for w in &solution.warnings {
        out.push_str(&format!("warning: {w}\n"));
    }
    for (ci, r) in solution.combinations.iter().enumerate() {
        combination_tables(&mut out, model, ci, r, d);
    }
    for w in checks.beyond_yield(model, solution) {
        out.push_str(&format!("\nwarning: {w}\n"));
    }
    capacity_lines(&mut out, a, d);
    long_term_lines(&mut out, a, d);
    for b in &a.buckling {
        for w in b.warnings(model) {
            out.push_str(&format!("\nwarning: {w}\n"));
        }
    }
    check_tables(&mut out, a, d);
    out
}

/// One combination's tables: parts, nodes, and its equilibrium residual.
fn combination_tables(
    out: &mut String,
    model: &Model,
    ci: usize,
    r: &crate::solve::CombinationResult,
    d: &Display,
) {
    let sc = Scales::of(r);
    out.push_str(&format!(
        "\ncombination {}\n",
        combination_heading(model, ci, false)
    ));
    let mut rows = vec![vec![
        "part".to_string(),
        format!("force ({})", d.force.name),
        format!("stress ({})", d.stress.name),
        "total strain (µε)".to_string(),
        "strain from force σ/E (µε)".to_string(),
        format!("elongation ({})", d.small.name),
        "state".to_string(),
    ]];
    for (p, pr) in model.parts.iter().zip(&r.parts) {
        rows.push(vec![
            p.name.to_string(),
            number(d.force.value(sc.force(pr.force.value)), d.digits),
            pr.stress.map_or("—".into(), |s| {
                number(d.stress.value(sc.stress(s.value)), d.digits)
            }),
            number(sc.strain(pr.strain) * 1e6, d.digits),
            force_strain(model, p, pr)
                .map_or("—".into(), |e| number(sc.strain(e) * 1e6, d.digits)),
            number(d.small.value(sc.small(pr.elongation.value)), d.digits),
            pr.state.name().to_string(),
        ]);
    }
    out.push_str(&aligned(&rows, &[0, 6], "  "));
    if !r.beams.is_empty() {
        out.push('\n');
        out.push_str(&aligned(&beam_rows(model, r, d, &sc), &[0], "  "));
    }
    let turns = model.rotating_nodes();
    let any_turns = turns.contains(&true);
    let mut rows = match model.kind {
        Kind::Axial => vec![vec![
            "node".to_string(),
            format!("displacement ({})", d.small.name),
            format!("reaction ({})", d.force.name),
        ]],
        Kind::Plane => vec![vec![
            "node".to_string(),
            format!("dx ({})", d.small.name),
            format!("dy ({})", d.small.name),
            format!("rx ({})", d.force.name),
            format!("ry ({})", d.force.name),
        ]],
    };
    if any_turns {
        rows[0].push("rotation (rad)".into());
        rows[0].push(format!("mz ({})", d.moment.name));
    }
    for ((n, nr), turns) in model.nodes.iter().zip(&r.nodes).zip(&turns) {
        let react = |k: usize| {
            if n.fixed[k] {
                number(d.force.value(sc.force(nr.reaction[k].value)), d.digits)
            } else {
                "—".to_string()
            }
        };
        let mut row = vec![
            n.name.to_string(),
            number(d.small.value(sc.small(nr.displacement[0].value)), d.digits),
        ];
        if model.kind == Kind::Plane {
            row.push(number(
                d.small.value(sc.small(nr.displacement[1].value)),
                d.digits,
            ));
            row.push(react(0));
            row.push(react(1));
        } else {
            row.push(react(0));
        }
        if any_turns {
            let dash = || "—".to_string();
            row.push(if *turns {
                number(nr.rotation, d.digits)
            } else {
                dash()
            });
            row.push(if *turns && n.fixed_rotation {
                number(d.moment.value(sc.moment(nr.reaction_moment)), d.digits)
            } else {
                dash()
            });
        }
        rows.push(row);
    }
    out.push('\n');
    out.push_str(&aligned(&rows, &[0], "  "));
    for (k, rb) in model.rigids.iter().enumerate() {
        if model.kind == Kind::Plane {
            out.push_str(&format!(
                "  rigid body {} rotates {} rad\n",
                rb.name,
                number(r.rotations[k], d.digits)
            ));
        }
    }
    out.push_str(&format!(
        "  equilibrium residual {} {} (largest force {} {})\n",
        number(d.force.value(r.equilibrium_residual.value), 2),
        d.force.name,
        number(d.force.value(r.force_scale.value), d.digits),
        d.force.name
    ));
}

/// The beams' table: moments at the ends and the largest along the span
/// (sagging positive), the largest shear and deflection, and where.
pub(crate) fn beam_rows(
    model: &Model,
    r: &crate::solve::CombinationResult,
    d: &Display,
    sc: &Scales,
) -> Vec<Vec<String>> {
    let mut rows = vec![vec![
        "beam".to_string(),
        format!("M at A ({})", d.moment.name),
        format!("M at B ({})", d.moment.name),
        format!("largest M ({})", d.moment.name),
        format!("at ({})", d.length.name),
        format!("largest V ({})", d.force.name),
        format!("deflection ({})", d.small.name),
        format!("at ({})", d.length.name),
    ]];
    for b in &r.beams {
        let m = |v: f64| number(d.moment.value(sc.moment(v)), d.digits);
        let [ma, mb] = b.end_moments_along();
        rows.push(vec![
            model.parts[b.part].name.to_string(),
            m(ma),
            m(mb),
            m(b.moment_max.0),
            number(d.length.value(b.moment_max.1), d.digits),
            number(d.force.value(sc.force(b.shear_max)), d.digits),
            number(d.small.value(sc.small(b.deflection_max.0)), d.digits),
            number(d.length.value(b.deflection_max.1), d.digits),
        ]);
    }
    rows
}

/// The load factors at first yield and at the plastic limit.
fn capacity_lines(out: &mut String, a: &crate::Analysis, d: &Display) {
    let solution = &a.solution;
    let first_note = a.capacity.first().and_then(|c| c.note.clone());
    let same_note = first_note.is_some()
        && a.capacity
            .iter()
            .all(|c| c.note == first_note && c.events.is_empty());
    if same_note {
        out.push_str(&format!("\ncapacity: {}\n", first_note.unwrap_or_default()));
    }
    for c in a.capacity.iter().filter(|_| !same_note) {
        let name = &solution.combinations[c.combination].name;
        match (&c.note, c.first_yield, c.limit) {
            (Some(n), _, _) => out.push_str(&format!("\ncapacity in {name}: {n}\n")),
            (None, Some(y), Some(l)) => out.push_str(&format!(
                "\ncapacity in {name}: first yield at {} × the loads, plastic limit at {} × (ratio {})\n",
                number(y, d.digits),
                number(l, d.digits),
                number(l / y, d.digits)
            )),
            (None, Some(y), None) => out.push_str(&format!(
                "\ncapacity in {name}: first yield at {} × the loads; no plastic limit forms\n",
                number(y, d.digits)
            )),
            _ => {}
        }
    }
}

/// The long-term results of every combination with sustained loads.
fn long_term_lines(out: &mut String, a: &crate::Analysis, d: &Display) {
    let (model, solution) = (&a.model, &a.solution);
    for l in &a.long_term {
        let short = &solution.combinations[l.combination];
        match &l.result {
            None => out.push_str(&format!(
                "\nlong term in {}: {}\n",
                short.name,
                l.note.clone().unwrap_or_default()
            )),
            Some(r) => {
                out.push_str(&format!(
                    "\nlong term in {} (creep, effective modulus)\n",
                    short.name
                ));
                let mut rows = vec![vec![
                    "part".to_string(),
                    format!("short-term ({})", d.stress.name),
                    format!("long-term ({})", d.stress.name),
                    "change in size".to_string(),
                ]];
                for (i, p) in model.parts.iter().enumerate() {
                    let (Some(s0), Some(s1)) = (short.parts[i].stress, r.parts[i].stress) else {
                        continue;
                    };
                    rows.push(vec![
                        p.name.to_string(),
                        number(d.stress.value(s0.value), d.digits),
                        number(d.stress.value(s1.value), d.digits),
                        if s0.value == 0.0 {
                            "—".into()
                        } else {
                            let c = 100.0 * (s1.value.abs() - s0.value.abs()) / s0.value.abs();
                            format!("{}{} %", if c > 0.0 { "+" } else { "" }, number(c, 3))
                        },
                    ]);
                }
                out.push_str(&aligned(&rows, &[0], "  "));
                if !r.beams.is_empty() {
                    out.push('\n');
                    out.push_str(&aligned(
                        &beam_rows(model, r, d, &Scales::of(r)),
                        &[0],
                        "  ",
                    ));
                }
            }
        }
    }
}

/// The checks (governing combination), and the long-term checks.
fn check_tables(out: &mut String, a: &crate::Analysis, d: &Display) {
    let (solution, checks) = (&a.solution, &a.checks);
    if !checks.outcomes.is_empty() {
        out.push_str("\nchecks (governing combination)\n");
        let mut rows = vec![vec![
            "check".to_string(),
            "combination".to_string(),
            "value".to_string(),
            "limit".to_string(),
            "utilization".to_string(),
            "result".to_string(),
        ]];
        for o in checks.governing() {
            rows.push(vec![
                o.label.to_string(),
                solution.combinations[o.combination].name.clone(),
                super::display::written(o, d)[0].clone(),
                super::display::written(o, d)[1].clone(),
                super::utilization(o.utilization),
                super::display::verdict(o.pass, false),
            ]);
        }
        out.push_str(&aligned(&rows, &[0, 1, 5], "  "));
        let fails = checks.failures();
        out.push_str(&if fails == 0 && !a.left_out.is_empty() {
            // never a bare "pass" for a calc that is not complete
            format!(
                "  all checks pass in the combinations solved; INCOMPLETE: {}\n",
                super::left_out(&a.left_out)
            )
        } else if fails == 0 {
            "  all checks pass\n".to_string()
        } else {
            format!(
                "  {fails} check{} FAIL\n",
                if fails == 1 { "" } else { "s" }
            )
        });
    }
    if let Some((lt, c)) = &a.long_term_checks {
        out.push_str("\nchecks in the long-term state (governing combination)\n");
        let mut rows = vec![vec![
            "check".to_string(),
            "combination".to_string(),
            "utilization".to_string(),
            "result".to_string(),
        ]];
        for o in c.governing() {
            rows.push(vec![
                o.label.to_string(),
                lt.combinations[o.combination].name.clone(),
                super::utilization(o.utilization),
                super::display::verdict(o.pass, false),
            ]);
        }
        out.push_str(&aligned(&rows, &[0, 1, 3], "  "));
    }
}

//! A combination's beams: each one's stiffness terms, the fixed-end moments
//! of its load across it, the slope-deflection equations of its end moments
//! with the numbers substituted, its end shears from its own equilibrium,
//! the moment along it, its fibre stress and its deflection.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::combination::Combo;
use super::*;
use crate::solve::{BeamResult, CombinationResult};

/// The axial force at end `k` (0 = A, 1 = B) of part `i`: its force N, and
/// for a beam loaded along its length N ± w∥·L/2 (the load along it is
/// carried to both ends).
pub(super) fn axial_at(model: &Model, r: &CombinationResult, i: usize, k: usize) -> f64 {
    let n = r.parts[i].force.value;
    match r.beam(i) {
        Some(b) if b.load[0] != 0.0 => {
            let half = b.load[0] * model.parts[i].length.value / 2.0;
            if k == 0 {
                n + half
            } else {
                n - half
            }
        }
        _ => n,
    }
}

/// The force, `[x, y]`, that end `k` of part `i` puts on its node: its
/// axial force pulling toward the other end when in tension, and for a
/// beam minus its end shear across it.
pub(super) fn end_force(model: &Model, r: &CombinationResult, i: usize, k: usize) -> [f64; 2] {
    let dir = model.direction(i);
    let across = [-dir[1], dir[0]];
    let pull = if k == 0 { 1.0 } else { -1.0 } * axial_at(model, r, i, k);
    let v = r.beam(i).map_or(0.0, |b| b.end_shears[k]);
    [pull * dir[0] - v * across[0], pull * dir[1] - v * across[1]]
}

/// The section "Beams: bending" of a combination with beams.
pub(super) fn bending(doc: &mut Doc, c: &Combo<'_>) {
    if c.r.beams.is_empty() {
        return;
    }
    doc.h(3, "Beams: bending");
    doc.p("Each beam's end moments M_AB and M_BA act on the beam, counter-clockwise positive. They follow from the slope-deflection equations: the rotations θ of the nodes its ends are rigidly joined to, the movement Δ of end B relative to end A across the beam (along n̂, a quarter turn counter-clockwise from ĉ), and the fixed-end moments FEM of its load across it, w⊥. A hinged end carries no moment. The end shears V_A and V_B (forces on the beam along n̂) follow from the beam's own equilibrium. Along the beam, M(x) = −M_AB + V_A·x + w⊥·x²/2 at x from end A, positive where the fibre on the right of the direction A to B is in tension (sagging for a beam drawn left to right).");
    for b in &c.r.beams {
        one_beam(doc, c, b);
    }
}

#[allow(clippy::too_many_lines)]
fn one_beam(doc: &mut Doc, c: &Combo<'_>, b: &BeamResult) {
    let (f, model, r) = (c.f, c.model, c.r);
    let i = b.part;
    let p = &model.parts[i];
    let Some(bend) = &p.bend else {
        return;
    };
    let e = p.material().map_or(0.0, |m| model.materials[m].e.value);
    let l = p.length.value;
    let [a, bn] = p.ends;
    let (na, nb) = (&model.nodes[a].name, &model.nodes[bn].name);
    let _ = writeln!(doc.out, "**{}** (end A `{na}`, end B `{nb}`)\n", p.name);
    let (es, is, ls) = (f.stress(e), f.inertia(bend.inertia), f.with(l, &f.d.length));
    let ei_l = e * bend.inertia / l;
    let m_unit = |v: f64| f.with(v, &f.d.moment);
    // stiffness terms
    let hinge = bend.hinge;
    // (coefficient, over L² rather than L): 4EI/L, 2EI/L, 6EI/L², or with
    // one end hinged 3EI/L and 3EI/L²
    let terms: &[(u8, bool)] = match hinge {
        [false, false] => &[(4, false), (2, false), (6, true)],
        [true, true] => &[],
        _ => &[(3, false), (3, true)],
    };
    for &(c, squared) in terms {
        let v = f64::from(c) * ei_l;
        doc.eq(&if squared {
            format!(
                "{c}EI/L² = {c} · {es} · {is} / ({ls} · {ls}) = {}",
                f.with(v / l, &f.d.force)
            )
        } else {
            format!("{c}EI/L = {c} · {es} · {is} / {ls} = {}", m_unit(v))
        });
    }
    if let Some(area) = p.area() {
        doc.eq(&format!(
            "EA/L = {es} · {} / {ls} = {}",
            f.area(area.value),
            f.stiffness(e * area.value / l)
        ));
    }
    // the load across it and its fixed-end moments
    let w = b.load;
    let unit = f.d.per_length();
    let wt = |v: f64| f.term(v, &unit);
    let dir = model.direction(i);
    let [_, _, ma, mb] = crate::solve::equivalent_loads(w[1], l, hinge);
    let fem = [-ma + 0.0, -mb + 0.0];
    if w != [0.0, 0.0] {
        let wx = w[0] * dir[0] - w[1] * dir[1];
        let wy = w[0] * dir[1] + w[1] * dir[0];
        doc.eq(&format!(
            "w⊥ = −wx·cy + wy·cx = - {} · {} + {} · {} = {}",
            wt(wx),
            f.plain(dir[1]),
            wt(wy),
            f.plain(dir[0]),
            f.with(w[1], &unit)
        ));
        if w[0] != 0.0 {
            doc.eq(&format!(
                "w∥ = wx·cx + wy·cy = {} · {} + {} · {} = {}",
                wt(wx),
                f.plain(dir[0]),
                wt(wy),
                f.plain(dir[1]),
                f.with(w[0], &unit)
            ));
        }
        let fem_line = |name: &str, sign: &str, div: u32, v: f64| {
            format!(
                "FEM_{name} = {}w⊥·L²/{div} = {sign}{} · {ls} · {ls} / {div} = {}",
                if sign.is_empty() { "" } else { "−" },
                wt(w[1]),
                m_unit(v)
            )
        };
        match hinge {
            [false, false] => {
                doc.eq(&fem_line("AB", "- ", 12, fem[0]));
                doc.eq(&fem_line("BA", "", 12, fem[1]));
            }
            [false, true] => doc.eq(&fem_line("AB", "- ", 8, fem[0])),
            [true, false] => doc.eq(&fem_line("BA", "", 8, fem[1])),
            [true, true] => {}
        }
    }
    // the movement across it and the end rotations
    let across = [-dir[1], dir[0]];
    let (ua, ub) = (&r.nodes[a].displacement, &r.nodes[bn].displacement);
    let delta = (0..2)
        .map(|d| (ub[d].value - ua[d].value) * across[d])
        .sum::<f64>();
    let [ma_end, mb_end] = b.end_moments;
    if hinge != [true, true] {
        doc.eq(&format!(
            "Δ = (u({nb}) − u({na}))·nx + (v({nb}) − v({na}))·ny = ({} - {}) · {} + ({} - {}) · {} = {}",
            f.small_t(ub[0].value),
            f.small_t(ua[0].value),
            f.plain(across[0]),
            f.small_t(ub[1].value),
            f.small_t(ua[1].value),
            f.plain(across[1]),
            f.small(delta)
        ));
    }
    let theta = |k: usize| f.plain_rad(r.nodes[p.ends[k]].rotation);
    let k6 = f.with(6.0 * ei_l / l, &f.d.force);
    let k3 = f.with(3.0 * ei_l / l, &f.d.force);
    let (k4, k2, k3l) = (m_unit(4.0 * ei_l), m_unit(2.0 * ei_l), m_unit(3.0 * ei_l));
    let dl = f.small_t(delta);
    match hinge {
        [false, false] => {
            doc.eq(&format!(
                "M_AB = 4EI/L·θ({na}) + 2EI/L·θ({nb}) − 6EI/L²·Δ + FEM_AB = {k4} · {} + {k2} · {} - {k6} · {dl} + {} = {}",
                theta(0),
                theta(1),
                f.moment_t(fem[0]),
                f.moment(ma_end)
            ));
            doc.eq(&format!(
                "M_BA = 2EI/L·θ({na}) + 4EI/L·θ({nb}) − 6EI/L²·Δ + FEM_BA = {k2} · {} + {k4} · {} - {k6} · {dl} + {} = {}",
                theta(0),
                theta(1),
                f.moment_t(fem[1]),
                f.moment(mb_end)
            ));
        }
        [false, true] | [true, false] => {
            // one end hinged: the other carries 3EI/L
            let k = usize::from(hinge[0]);
            let names = [("AB", "A", na), ("BA", "B", nb)];
            let ((m, _, node), (other, end, other_node)) = (names[k], names[1 - k]);
            doc.eq(&format!(
                "M_{m} = 3EI/L·θ({node}) − 3EI/L²·Δ + FEM_{m} = {k3l} · {} - {k3} · {dl} + {} = {}",
                theta(k),
                f.moment_t(fem[k]),
                f.moment(b.end_moments[k])
            ));
            doc.eq(&format!(
                "M_{other} = 0: end {end} (`{other_node}`) is hinged"
            ));
        }
        [true, true] => doc.eq("M_AB = M_BA = 0: both ends are hinged"),
    }
    doc.end_list();
    // end shears from the beam's own equilibrium
    let ls_t = f.with(l, &f.d.length);
    let load_term = if w[1] == 0.0 {
        (String::new(), String::new())
    } else {
        (
            " − w⊥·L/2".to_string(),
            format!(" - {} · {ls_t} / 2", wt(w[1])),
        )
    };
    let [va, vb] = b.end_shears;
    doc.eq(&format!(
        "V_A = (M_AB + M_BA) / L{} = ({} + {}) / {ls_t}{} = {}",
        load_term.0,
        f.moment_t(ma_end),
        f.moment_t(mb_end),
        load_term.1,
        f.force(va)
    ));
    doc.eq(&format!(
        "V_B = −(M_AB + M_BA) / L{} = - ({} + {}) / {ls_t}{} = {}",
        load_term.0,
        f.moment_t(ma_end),
        f.moment_t(mb_end),
        load_term.1,
        f.force(vb)
    ));
    // the moment along it
    let [m0, ml] = b.end_moments_along();
    doc.eq(&format!(
        "M(0) = −M_AB = - {} = {}",
        f.moment_t(ma_end),
        f.moment(m0)
    ));
    doc.eq(&format!(
        "M(L) = M_BA = {} = {}",
        f.moment_t(mb_end),
        f.moment(ml)
    ));
    if w[1] != 0.0 {
        let x0 = -va / w[1];
        if x0 > 0.0 && x0 < l {
            let xs = f.with(x0, &f.d.length);
            doc.eq(&format!(
                "x₀ = −V_A / w⊥ = - {} / {} = {xs}",
                f.force_t(va),
                wt(w[1])
            ));
            doc.eq(&format!(
                "M(x₀) = −M_AB + V_A·x₀ + w⊥·x₀²/2 = - {} + {} · {xs} + {} · {xs} · {xs} / 2 = {}",
                f.moment_t(ma_end),
                f.force_t(va),
                wt(w[1]),
                f.moment(b.moment_at(x0))
            ));
        }
    }
    // the fibre stress
    if let (Some(area), Some(stress)) = (p.area(), r.parts[i].stress) {
        let n = r.parts[i].force.value;
        let (sym, op) = if n >= 0.0 { ("+", "+") } else { ("−", "-") };
        doc.eq(&format!(
            "σ = N/A {sym} |M|·c/I = {} / {} {op} {} · {} / {is} = {}",
            f.force_t(n),
            f.area(area.value),
            f.moment_t(b.moment_max.0.abs()),
            f.with(bend.fibre, &f.d.small),
            f.stress(stress.value)
        ));
    }
    doc.end_list();
    let from = |x: f64| f.with(x, &f.d.length);
    let ratio = if b.deflection_max.0 == 0.0 {
        String::new()
    } else {
        format!(" (L/{:.0})", l / b.deflection_max.0.abs())
    };
    doc.p(&format!(
        "Largest moment in size along `{}`: {} at {} from `{na}`; largest shear in size {}. Largest deflection across the chord between its displaced ends, from E·I·v″ = M(x) with v = 0 at both ends: {} at {} from `{na}`{ratio}.",
        p.name,
        f.moment(b.moment_max.0),
        from(b.moment_max.1),
        f.force(b.shear_max),
        f.small(b.deflection_max.0),
        from(b.deflection_max.1),
    ));
}

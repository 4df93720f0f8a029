//! One combination: its loads, the solved system, each part's force and
//! stress with their equations, equilibrium at the nodes, and its checks.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::*;

use super::equilibrium::{equilibrium, reactions};

/// For each node, the parts meeting there: (part, sign, direction); a part
/// in tension pulls its end A toward B (+ĉ) and its end B toward A (−ĉ).
pub(super) fn incidence(model: &Model) -> Vec<Vec<(usize, f64, [f64; 2])>> {
    let mut out = vec![Vec::new(); model.nodes.len()];
    for (i, p) in model.parts.iter().enumerate() {
        let dir = model.direction(i);
        out[p.ends[0]].push((i, 1.0, dir));
        out[p.ends[1]].push((i, -1.0, dir));
    }
    out
}

#[allow(clippy::too_many_lines)]
pub(super) fn combination(
    doc: &mut Doc,
    f: &Fmt<'_>,
    model: &Model,
    solution: &Solution,
    ci: usize,
    incidence: &[Vec<(usize, f64, [f64; 2])>],
) {
    let r = &solution.combinations[ci];
    f.scales.set(Scales::of(r));
    combination_body(doc, f, model, r, ci, incidence);
    f.scales.set(Scales::default());
}

pub(super) fn combination_body(
    doc: &mut Doc,
    f: &Fmt<'_>,
    model: &Model,
    r: &crate::solve::CombinationResult,
    ci: usize,
    incidence: &[Vec<(usize, f64, [f64; 2])>],
) {
    let combo = &model.combinations[ci];
    doc.h(
        2,
        &format!(
            "Combination {}",
            crate::report::text::combination_heading(model, ci, true)
        ),
    );
    if doc.figures != Figures::Omitted {
        doc.figure(crate::report::drawing::forces(model, r, ci, f.d));
    }
    let nd = model.kind.dofs();
    // Loads on each node component.
    let mut loads = vec![[0.0f64; 2]; model.nodes.len()];
    for &(case, factor) in &combo.terms {
        for l in &model.cases[case].loads {
            for d in 0..nd {
                loads[l.node][d] += factor * l.force[d].value;
            }
        }
    }
    // Moments applied at each node.
    let mut moments = vec![0.0f64; model.nodes.len()];
    for &(case, factor) in &combo.terms {
        for m in &model.cases[case].moments {
            moments[m.node] += factor * m.moment;
        }
    }
    let mut in_body = vec![false; model.nodes.len()];
    for n in model
        .rigids
        .iter()
        .flat_map(|b| &b.nodes)
        .chain(model.ties.iter().flat_map(|t| &t.nodes))
    {
        in_body[*n] = true;
    }
    let groups = parallel_groups(model);
    let c = Combo {
        f,
        groups: &groups,
        model,
        r,
        ci,
        incidence,
        loads: &loads,
        moments: &moments,
        in_body: &in_body,
        nd,
    };
    equilibrium(doc, &c);
    compatibility(doc, &c);
    part_forces(doc, &c);
    super::beams::bending(doc, &c);
    parallel_share(doc, &c);
    reactions(doc, &c);
}

/// What every section of a combination reads.
#[derive(Clone, Copy)]
pub(super) struct Combo<'a> {
    pub(super) f: &'a Fmt<'a>,
    pub(super) model: &'a Model,
    pub(super) r: &'a crate::solve::CombinationResult,
    pub(super) ci: usize,
    pub(super) incidence: &'a [Vec<(usize, f64, [f64; 2])>],
    /// The combined load on each node component.
    pub(super) loads: &'a [[f64; 2]],
    /// The combined moment applied at each node (counter-clockwise).
    pub(super) moments: &'a [f64],
    /// Whether each node belongs to a rigid body or a tie.
    pub(super) in_body: &'a [bool],
    pub(super) nd: usize,
    /// Parts that span the same two nodes (and share one elongation).
    pub(super) groups: &'a [(usize, usize, Vec<usize>)],
}

/// The parts that span each pair of nodes, in the order first met.
fn parallel_groups(model: &Model) -> Vec<(usize, usize, Vec<usize>)> {
    let mut groups: Vec<(usize, usize, Vec<usize>)> = Vec::new();
    let mut group_of: std::collections::HashMap<(usize, usize), usize> =
        std::collections::HashMap::new();
    for (i, p) in model.parts.iter().enumerate() {
        let key = (p.ends[0].min(p.ends[1]), p.ends[0].max(p.ends[1]));
        match group_of.get(&key) {
            Some(&g) => groups[g].2.push(i),
            None => {
                group_of.insert(key, groups.len());
                groups.push((key.0, key.1, vec![i]));
            }
        }
    }
    groups
}

/// Compatibility: the elongation of each part from its ends' movements.
fn compatibility(doc: &mut Doc, c: &Combo<'_>) {
    let (f, groups, model, r) = (c.f, c.groups, c.model, c.r);
    doc.h(3, "Compatibility");
    doc.p(match model.kind {
        Kind::Axial => "Each part's elongation follows from the displacements of its end nodes, δ = (u(B) − u(A))·ĉ, with ĉ = +1 when B lies further along the axis than A and −1 when it lies back:",
        Kind::Plane => "Each part's elongation follows from the displacements of its end nodes, δ = (u(B) − u(A))·ĉ with ĉ the unit vector from A to B:",
    });
    for p in model.parts.iter().enumerate() {
        let (i, p) = p;
        let (a, b) = (p.ends[0], p.ends[1]);
        let (na, nb) = (&model.nodes[a].name, &model.nodes[b].name);
        let ua = &r.nodes[a].displacement;
        let ub = &r.nodes[b].displacement;
        match model.kind {
            // ĉ is +1 or −1 on the axis: the end further along comes first
            Kind::Axial if model.direction(i)[0] > 0.0 => doc.eq(&format!(
                "δ({}) = u({nb}) - u({na}) = {} - {} = {}",
                p.name,
                f.small_t(ub[0].value),
                f.small_t(ua[0].value),
                f.small(r.parts[i].elongation.value)
            )),
            Kind::Axial => doc.eq(&format!(
                "δ({}) = u({na}) - u({nb}) = {} - {} = {}",
                p.name,
                f.small_t(ua[0].value),
                f.small_t(ub[0].value),
                f.small(r.parts[i].elongation.value)
            )),
            Kind::Plane => {
                let (ax, ay) = (model.nodes[a].x.value, model.nodes[a].y.value);
                let (bx, by) = (model.nodes[b].x.value, model.nodes[b].y.value);
                let l = (bx - ax).hypot(by - ay);
                let (cx, cy) = ((bx - ax) / l, (by - ay) / l);
                doc.eq(&format!(
                    "δ({}) = (u({nb}) - u({na}))·cx + (v({nb}) - v({na}))·cy = ({} - {}) · {} + ({} - {}) · {} = {}",
                    p.name,
                    f.small_t(ub[0].value),
                    f.small_t(ua[0].value),
                    f.plain(cx),
                    f.small_t(ub[1].value),
                    f.small_t(ua[1].value),
                    f.plain(cy),
                    f.small(r.parts[i].elongation.value)
                ));
            }
        }
    }
    doc.end_list();
    for (_, _, g) in groups.iter().filter(|g| g.2.len() > 1) {
        let names: Vec<String> = g
            .iter()
            .map(|&i| format!("δ({})", model.parts[i].name))
            .collect();
        doc.p(&format!(
            "Parts spanning the same two nodes share one elongation: {} = {}.",
            names.join(" = "),
            f.small(r.parts[g[0]].elongation.value)
        ));
    }
    if model.kind == Kind::Plane {
        for (k, b) in model.rigids.iter().enumerate() {
            let n0 = b.nodes[0];
            let theta = r.rotations[k];
            doc.p(&format!(
                "Rigid body `{}` rotates θ = {} rad about `{}`; each of its nodes moves with it, v = v({}) + θ·Δx and u = u({}) − θ·Δy:",
                b.name,
                f.n(theta),
                model.nodes[n0].name,
                model.nodes[n0].name,
                model.nodes[n0].name
            ));
            for &n in &b.nodes[1..] {
                let dx = model.nodes[n].x.value - model.nodes[n0].x.value;
                let dy = model.nodes[n].y.value - model.nodes[n0].y.value;
                // v = v0 + θ·Δx always; u = u0 − θ·Δy where Δy is not 0
                for (d, symbol, sign, arm) in [(1, "v", '+', dx), (0, "u", '-', dy)] {
                    if d == 0 && dy == 0.0 {
                        continue;
                    }
                    doc.eq(&format!(
                        "{symbol}({}) = {} {sign} {} · {} = {}",
                        model.nodes[n].name,
                        f.small_t(r.nodes[n0].displacement[d].value),
                        f.plain_rad(theta),
                        f.small_t(arm),
                        f.small(r.nodes[n].displacement[d].value)
                    ));
                }
            }
            doc.end_list();
        }
    }
}

/// Each part's force and stress from its law, with its free elongation.
fn part_forces(doc: &mut Doc, c: &Combo<'_>) {
    let (f, model, r, ci) = (c.f, c.model, c.r, c.ci);
    doc.h(3, "Part forces and stresses");
    // every source of free elongation the solver added, by part
    let combo = &model.combinations[ci];
    let sources_of = crate::solve::free_sources(model, &combo.terms);
    let mut next_source = 0;
    for (i, p) in model.parts.iter().enumerate() {
        let pr = &r.parts[i];
        let k = p.stiffness(&model.materials).value;
        let free = pr.free_elongation.value;
        let _ = writeln!(doc.out, "**{}**\n", p.name);
        // Free elongation from its sources.
        let mut sources = Vec::new();
        let mut num = Vec::new();
        while let Some(&(_, source)) = sources_of.get(next_source).filter(|(j, _)| *j == i) {
            next_source += 1;
            let (symbols, numbers) = free_source(f, &source);
            sources.push(symbols);
            num.push(numbers);
        }
        if !sources.is_empty() {
            doc.eq(&format!(
                "δ₀ = {} = {} = {}",
                sources.join(" + "),
                num.join(" + "),
                f.small(free)
            ));
        }
        match pr.state {
            PartState::Slack => {
                let gap = if p.slack.value > 0.0 {
                    format!("within its gap of {}", f.small(p.slack.value))
                } else {
                    format!("in the sense it cannot carry ({} only)", p.carries.name())
                };
                let _ = writeln!(
                    doc.out,
                    "- N = 0 {}: the part is slack; its free movement δ − δ₀ of {} is {gap}",
                    f.d.force.name,
                    f.small(pr.elongation.value - free)
                );
            }
            PartState::Elastic => {
                let offset = match p.carries {
                    _ if p.slack.value == 0.0 => 0.0,
                    Carries::Tension => p.slack.value,
                    Carries::Compression => -p.slack.value,
                    Carries::Both => {
                        if pr.force.value >= 0.0 {
                            p.slack.value
                        } else {
                            -p.slack.value
                        }
                    }
                };
                if offset == 0.0 {
                    doc.eq(&format!(
                        "N = k·(δ − δ₀) = {} · ({} - {}) = {}",
                        f.stiffness(k),
                        f.small_t(pr.elongation.value),
                        f.small_t(free),
                        f.force(pr.force.value)
                    ));
                } else {
                    doc.eq(&format!(
                        "N = k·(δ − δ₀ − gap) = {} · ({} - {} - {}) = {}",
                        f.stiffness(k),
                        f.small_t(pr.elongation.value),
                        f.small_t(free),
                        f.small_t(offset),
                        f.force(pr.force.value)
                    ));
                }
                if let (Some(area), Some(stress)) = (p.area(), pr.stress) {
                    // a beam's stress is its extreme fibre's, written with
                    // its bending; here the axial part alone
                    let (symbol, stress) = if p.bend.is_some() {
                        ("σ_N", pr.force.value / area.value)
                    } else {
                        ("σ", stress.value)
                    };
                    doc.eq(&format!(
                        "{symbol} = N / A = {} / {} = {}",
                        f.force_t(pr.force.value),
                        f.area(area.value),
                        f.stress(stress)
                    ));
                    let e = p.material().map_or(0.0, |m| model.materials[m].e.value);
                    let extra = if offset == 0.0 {
                        String::new()
                    } else {
                        format!(" + {}", f.small_t(offset))
                    };
                    doc.eq(&format!(
                        "δ = N·L / (E·A) + δ₀{} = {} · {} / ({} · {}) + {}{extra} = {}",
                        if offset == 0.0 { "" } else { " + gap" },
                        f.force_t(pr.force.value),
                        f.with(p.length.value, &f.d.small),
                        f.stress(e),
                        f.area(area.value),
                        f.small_t(free),
                        f.small(pr.elongation.value)
                    ));
                }
            }
        }
        doc.end_list();
    }
}

/// The closed-form share of a pure parallel group, F(i) = P·k(i) / Σk.
fn parallel_share(doc: &mut Doc, c: &Combo<'_>) {
    let (f, groups, model, r, incidence, loads, in_body) =
        (c.f, c.groups, c.model, c.r, c.incidence, c.loads, c.in_body);
    // Closed-form share for a pure parallel group.
    for (a, b, g) in groups.iter().filter(|g| g.2.len() > 1) {
        if model.kind != Kind::Axial {
            continue;
        }
        let (fixed, free_node) = if model.nodes[*a].fixed[0] {
            (*a, *b)
        } else {
            (*b, *a)
        };
        let only = incidence[free_node].len() == g.len();
        let pure = model.nodes[fixed].fixed[0]
            && !model.nodes[free_node].fixed[0]
            && !in_body[free_node]
            && only
            && g.iter().all(|&i| {
                r.parts[i].free_elongation.value == 0.0
                    && r.parts[i].state == PartState::Elastic
                    && model.parts[i].slack.value == 0.0
            })
            && loads[free_node][0] != 0.0
            && r.nodes[fixed].displacement[0].value == 0.0;
        if !pure {
            continue;
        }
        let p_load = loads[free_node][0];
        // Sign: the load pushes the free node; parts from fixed to free elongate with it.
        let ks: Vec<f64> = g
            .iter()
            .map(|&i| model.parts[i].stiffness(&model.materials).value)
            .collect();
        let sum: f64 = ks.iter().sum();
        doc.p(&format!(
            "The parts between `{}` and `{}` act in parallel: each takes the load in proportion to its stiffness, F(i) = P·k(i) / Σk:",
            model.nodes[fixed].name, model.nodes[free_node].name
        ));
        // A large bundle states Σk once instead of in every line.
        let ksum = if ks.len() <= 8 {
            ks.iter()
                .map(|k| f.stiffness(*k))
                .collect::<Vec<_>>()
                .join(" + ")
        } else {
            doc.eq(&format!(
                "Σk = {} (the {} parts' k summed)",
                f.stiffness(sum),
                ks.len()
            ));
            f.stiffness(sum)
        };
        for (j, &i) in g.iter().enumerate() {
            // a load along the axis pulls a part whose far end lies further
            // along it, and pushes one whose far end lies back toward it
            let toward = if model.parts[i].ends[1] == free_node {
                1.0
            } else {
                -1.0
            };
            let sign = toward * model.direction(i)[0];
            let share = sign * p_load * ks[j] / sum;
            doc.eq(&format!(
                "F({}) = P·k({}) / Σk = {}{} · {} / ({ksum}) = {}",
                model.parts[i].name,
                model.parts[i].name,
                if sign < 0.0 { "-" } else { "" },
                f.force_t(p_load),
                f.stiffness(ks[j]),
                f.force(share)
            ));
        }
        doc.end_list();
    }
}

impl Fmt<'_> {
    /// A strain in microstrain, in parentheses when negative.
    pub(super) fn microstrain(&self, v: f64) -> String {
        bracket_negative(format!("{} µε", self.n(v * 1e6)))
    }

    pub(super) fn plain_rad(&self, v: f64) -> String {
        bracket_negative(format!("{} rad", self.n(v)))
    }
}

/// One source of free elongation: in symbols (`α·ΔT·L`, `1.2·ε·L`) and
/// with its numbers substituted.
fn free_source(f: &Fmt<'_>, source: &crate::solve::FreeSource) -> (String, String) {
    use crate::solve::FreeSource;
    // a factor other than 1 is written before the symbols and the numbers
    let factored = |factor: f64, symbols: &str| {
        if (factor - 1.0).abs() > 0.0 {
            (format!("{factor}·{symbols}"), format!("{factor} · "))
        } else {
            (symbols.to_string(), String::new())
        }
    };
    match *source {
        FreeSource::Misfit(m) => ("misfit".into(), f.small_t(m)),
        FreeSource::Thermal {
            factor,
            alpha,
            change,
            length,
        } => {
            let (symbols, times) = factored(factor, "α·ΔT·L");
            (
                symbols,
                format!(
                    "{times}{} · {} · {}",
                    f.alpha(alpha),
                    f.temp(change),
                    f.with(length, &f.d.small)
                ),
            )
        }
        FreeSource::Strain {
            factor,
            strain,
            length,
        } => {
            let (symbols, times) = factored(factor, "ε·L");
            (
                symbols,
                format!(
                    "{times}{} · {}",
                    f.microstrain(strain),
                    f.with(length, &f.d.small)
                ),
            )
        }
    }
}

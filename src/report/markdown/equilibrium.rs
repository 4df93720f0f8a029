//! Equilibrium of one combination: at every free node (forces, and moments
//! where a beam end turns the node), of each rigid body, and of the
//! assembly as a whole with its reactions.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::beams;
use super::combination::Combo;
use super::*;

/// The words before the equations of node equilibrium.
fn intro(r: &crate::solve::CombinationResult) -> &'static str {
    if r.beams.is_empty() {
        "At each free node the part forces (N, tension positive, pulling the node toward the part's other end) and the loads (P) balance:"
    } else {
        "At each free node the part forces (N, tension positive, pulling the node toward the part's other end), the beams' end shears (V, forces on the beam along n̂, so that the node takes −V), and the loads (P) balance; where a beam end turns the node, so do the beams' end moments (M_AB, M_BA on the beam, so that the node takes minus them) and the applied moments (M):"
    }
}

/// `ΣM at NODE: …` where beam ends turn a node that is free to rotate (not
/// held, not of a rigid body).
fn moment_balance(c: &Combo<'_>, n: usize) -> Option<String> {
    let (f, model, r) = (c.f, c.model, c.r);
    let node = &model.nodes[n];
    if node.fixed_rotation || c.in_body[n] {
        return None;
    }
    let mut sym = Vec::new();
    let mut num = Vec::new();
    for &(i, sign, _) in &c.incidence[n] {
        let k = usize::from(sign < 0.0);
        let Some(b) = r.beam(i) else { continue };
        let hinged = model.parts[i].bend.as_ref().is_none_or(|bd| bd.hinge[k]);
        if hinged {
            continue;
        }
        sym.push(format!("- M_{}({})", ["AB", "BA"][k], model.parts[i].name));
        num.push(format!("- {}", f.moment_t(b.end_moments[k])));
    }
    if sym.is_empty() {
        return None;
    }
    let applied = c.moments[n];
    if applied != 0.0 {
        sym.push("+ M".into());
        num.push(format!("+ {}", f.moment_t(applied)));
    }
    Some(format!(
        "ΣM at `{}`: {} = {} = {}",
        node.name,
        sym.join(" ").trim_start_matches("+ "),
        num.join(" ").trim_start_matches("+ "),
        f.moment(0.0)
    ))
}

/// Equilibrium at every free node component, with its numbers.
pub(super) fn equilibrium(doc: &mut Doc, c: &Combo<'_>) {
    let (f, model, r, incidence, loads, in_body, nd) =
        (c.f, c.model, c.r, c.incidence, c.loads, c.in_body, c.nd);
    let axis = ["x", "y"];
    doc.h(3, "Equilibrium");
    let mut first_equation = true;
    for (n, node) in model.nodes.iter().enumerate() {
        if in_body[n] {
            continue;
        }
        for d in 0..nd {
            if node.fixed[d] {
                continue;
            }
            let terms = &incidence[n];
            let mut sym = Vec::new();
            let mut num = Vec::new();
            for (i, sign, dir) in terms {
                let c = sign * dir[d];
                let name = &model.parts[*i].name;
                if let Some(b) = r.beam(*i) {
                    // a beam: its axial force at this end, and its end shear
                    let k = usize::from(*sign < 0.0);
                    let end = ["A", "B"][k];
                    let across = [-dir[1], dir[0]][d];
                    if c != 0.0 {
                        let n_sym = if b.load[0] == 0.0 {
                            format!("N({name})")
                        } else {
                            format!("N_{end}({name})")
                        };
                        sym.push(format!("+ {n_sym}·c{}({name})", axis[d]));
                        num.push(format!(
                            "+ {} · {}",
                            f.force_t(beams::axial_at(model, r, *i, k)),
                            f.plain(c)
                        ));
                    }
                    if across != 0.0 {
                        sym.push(format!("- V_{end}({name})·n{}({name})", axis[d]));
                        num.push(format!(
                            "- {} · {}",
                            f.force_t(b.end_shears[k]),
                            f.plain(across)
                        ));
                    }
                    continue;
                }
                if c == 0.0 {
                    continue;
                }
                let force = r.parts[*i].force.value;
                if model.kind == Kind::Axial {
                    sym.push(format!("{}N({name})", if c > 0.0 { "+ " } else { "- " }));
                    num.push(format!(
                        "{}{}",
                        if c > 0.0 { "+ " } else { "- " },
                        f.force_t(force)
                    ));
                } else {
                    sym.push(format!("+ N({name})·c{}({name})", axis[d]));
                    num.push(format!("+ {} · {}", f.force_t(force), f.plain(c)));
                }
            }
            if loads[n][d] != 0.0 {
                sym.push(format!("+ P{}", if nd == 2 { axis[d] } else { "" }));
                num.push(format!("+ {}", f.force_t(loads[n][d])));
            }
            if num.is_empty() {
                continue;
            }
            let clean = |v: Vec<String>| {
                let s = v.join(" ");
                s.strip_prefix("+ ").map_or(s.clone(), str::to_string)
            };
            let label = if nd == 2 {
                format!("ΣF{} at `{}`", axis[d], node.name)
            } else {
                format!("ΣF at `{}`", node.name)
            };
            if first_equation {
                doc.p(intro(r));
                first_equation = false;
            }
            doc.eq(&format!(
                "{label}: {} = {} = {}",
                clean(sym),
                clean(num),
                f.force(0.0)
            ));
        }
        if let Some(line) = moment_balance(c, n) {
            if first_equation {
                doc.p(intro(r));
                first_equation = false;
            }
            doc.eq(&line);
        }
    }
    if !first_equation {
        doc.end_list();
    }
    for b in &model.rigids {
        if model.kind != Kind::Plane {
            continue;
        }
        let x0 = model.nodes[b.nodes[0]].x.value;
        let y0 = model.nodes[b.nodes[0]].y.value;
        // Net force on each member from parts, loads and reactions.
        let mut fx = Vec::new();
        let mut moment_terms = Vec::new();
        let mut fsum = [Vec::new(), Vec::new()];
        let mut turning = Vec::new();
        for &n in &b.nodes {
            let mut net = [loads[n][0], loads[n][1]];
            for &(i, sign, _) in &incidence[n] {
                let k = usize::from(sign < 0.0);
                let end = beams::end_force(model, r, i, k);
                for d in 0..2 {
                    net[d] += end[d];
                }
                // a beam end rigidly joined to the body turns it
                if let Some(bm) = r.beam(i) {
                    if bm.end_moments[k] != 0.0 {
                        turning.push(format!("- {}", f.moment_t(bm.end_moments[k])));
                    }
                }
            }
            let applied = c.moments[n];
            if applied != 0.0 {
                turning.push(format!("+ {}", f.moment_t(applied)));
            }
            for d in 0..2 {
                net[d] += r.nodes[n].reaction[d].value;
            }
            fx.push((n, net));
        }
        for (n, net) in &fx {
            for d in 0..2 {
                if net[d] != 0.0 {
                    fsum[d].push(f.force_t(net[d]));
                }
            }
            let (dx, dy) = (model.nodes[*n].x.value - x0, model.nodes[*n].y.value - y0);
            if dx != 0.0 && net[1] != 0.0 {
                moment_terms.push(format!("{} · {}", f.small_t(dx), f.force_t(net[1])));
            }
            if dy != 0.0 && net[0] != 0.0 {
                moment_terms.push(format!("- {} · {}", f.small_t(dy), f.force_t(net[0])));
            }
        }
        doc.p(&format!(
            "Rigid body `{}`: the net forces on its nodes (parts, loads and reactions) balance in both directions and in moment about `{}`:",
            b.name,
            model.nodes[b.nodes[0]].name
        ));
        for d in 0..2 {
            if fsum[d].is_empty() {
                // Said rather than left out, so that the reader sees both
                // directions were looked at.
                doc.eq(&format!(
                    "ΣF{} = {}: no net force in {} on any of its nodes",
                    axis[d],
                    f.force(0.0),
                    axis[d]
                ));
            } else {
                doc.eq(&format!(
                    "ΣF{} = {} = {}",
                    axis[d],
                    fsum[d].join(" + "),
                    f.force(0.0)
                ));
            }
        }
        if !turning.is_empty() {
            // beam end moments on the body and moments applied at its nodes
            let all: Vec<String> = moment_terms.iter().chain(&turning).cloned().collect();
            let joined = all.join(" + ").replace("+ - ", "- ").replace("+ + ", "+ ");
            let joined = joined.trim_start_matches("+ ");
            doc.eq(&format!(
                "ΣM = Σ (Δx·Fy − Δy·Fx) − ΣM_end + ΣM = {joined} = {}",
                f.moment(0.0)
            ));
        } else if !moment_terms.is_empty() {
            let joined = moment_terms.join(" + ").replace("+ - ", "- ");
            doc.eq(&format!(
                "ΣM = Σ (Δx·Fy − Δy·Fx) = {joined} = 0 {}·{}",
                f.d.force.name, f.d.small.name
            ));
        }
        doc.end_list();
    }
}

/// The reactions, and overall equilibrium of reactions and loads.
pub(super) fn reactions(doc: &mut Doc, c: &Combo<'_>) {
    let (f, model, r, loads, nd) = (c.f, c.model, c.r, c.loads, c.nd);
    let axis = ["x", "y"];
    doc.h(3, "Reactions");
    let turns = model.rotating_nodes();
    let held = |n: usize| turns[n] && model.nodes[n].fixed_rotation;
    let any_held = (0..model.nodes.len()).any(held);
    let mut rows = Vec::new();
    let mut sum_r = [Vec::new(), Vec::new()];
    let mut sum_p = [Vec::new(), Vec::new()];
    // ΣM about the origin: every force at its node, the loads along beams
    // at their middles, and the moments
    let mut moment = Vec::new();
    let arm = |x: f64, y: f64, fx: f64, fy: f64, moment: &mut Vec<String>| {
        if x != 0.0 && fy != 0.0 {
            moment.push(format!("+ {} · {}", f.term(x, &f.d.length), f.force_t(fy)));
        }
        if y != 0.0 && fx != 0.0 {
            moment.push(format!("- {} · {}", f.term(y, &f.d.length), f.force_t(fx)));
        }
    };
    for (n, node) in model.nodes.iter().enumerate() {
        let (x, y) = (node.x.value, node.y.value);
        for d in 0..nd {
            if loads[n][d] != 0.0 {
                sum_p[d].push(f.force_t(loads[n][d]));
            }
        }
        if nd == 2 {
            arm(x, y, loads[n][0], loads[n][1], &mut moment);
            let applied = c.moments[n];
            if applied != 0.0 {
                moment.push(format!("+ {}", f.moment_t(applied)));
            }
        }
        if !node.fixed.iter().take(nd).any(|x| *x) && !held(n) {
            continue;
        }
        let mut row = vec![format!("`{}`", node.name)];
        for d in 0..nd {
            if node.fixed[d] {
                row.push(f.force_bare(r.nodes[n].reaction[d].value));
                if r.nodes[n].reaction[d].value != 0.0 {
                    sum_r[d].push(f.force_t(r.nodes[n].reaction[d].value));
                }
            } else {
                row.push("—".into());
            }
        }
        if nd == 2 {
            let rn = &r.nodes[n].reaction;
            arm(x, y, rn[0].value, rn[1].value, &mut moment);
        }
        if any_held {
            if held(n) {
                let m = r.nodes[n].reaction_moment;
                row.push(f.bare(f.scales.get().moment(m), &f.d.moment));
                if m != 0.0 {
                    moment.push(format!("+ {}", f.moment_t(m)));
                }
            } else {
                row.push("—".into());
            }
        }
        rows.push(row);
    }
    // loads along beams, as their resultants
    let mut sum_w = [Vec::new(), Vec::new()];
    for b in &r.beams {
        if b.load == [0.0, 0.0] {
            continue;
        }
        let p = &model.parts[b.part];
        let (l, dir) = (p.length.value, model.direction(b.part));
        let w = [
            (b.load[0] * dir[0] - b.load[1] * dir[1]) * l,
            (b.load[0] * dir[1] + b.load[1] * dir[0]) * l,
        ];
        for d in 0..2 {
            if w[d] != 0.0 {
                sum_w[d].push(f.force_t(w[d]));
            }
        }
        let (a, e) = (&model.nodes[p.ends[0]], &model.nodes[p.ends[1]]);
        arm(
            f64::midpoint(a.x.value, e.x.value),
            f64::midpoint(a.y.value, e.y.value),
            w[0],
            w[1],
            &mut moment,
        );
    }
    let along = !r.beams.iter().all(|b| b.load == [0.0, 0.0]);
    match (nd, any_held) {
        (1, _) => doc.table(&["Node", &head("R", &f.d.force)], &rows, &[1]),
        (_, false) => doc.table(
            &["Node", &head("Rx", &f.d.force), &head("Ry", &f.d.force)],
            &rows,
            &[1, 2],
        ),
        (_, true) => doc.table(
            &[
                "Node",
                &head("Rx", &f.d.force),
                &head("Ry", &f.d.force),
                &head("Mz", &f.d.moment),
            ],
            &rows,
            &[1, 2, 3],
        ),
    }
    doc.p(if along {
        "Overall equilibrium, reactions and loads together (W: the resultant of a load along a beam, w·L, acting at its middle):"
    } else {
        "Overall equilibrium, reactions and loads together:"
    });
    for d in 0..nd {
        let mut all: Vec<String> = sum_r[d].clone();
        all.extend(sum_p[d].iter().cloned());
        all.extend(sum_w[d].iter().cloned());
        if all.is_empty() {
            all.push(f.force(0.0));
        }
        let label = match (nd, along) {
            (1, _) => "ΣR + ΣP".to_string(),
            (_, false) => format!("ΣR{} + ΣP{}", axis[d], axis[d]),
            (_, true) => format!("ΣR{} + ΣP{} + ΣW{}", axis[d], axis[d], axis[d]),
        };
        doc.eq(&format!("{label} = {} = {}", all.join(" + "), f.force(0.0)));
    }
    // with beams the moments balance too, about the origin
    if !r.beams.is_empty() && !moment.is_empty() {
        let joined = moment.join(" ");
        doc.eq(&format!(
            "ΣM about (0, 0) = Σ (x·Fy − y·Fx) + ΣMz + ΣM = {} = {}",
            joined.trim_start_matches("+ "),
            f.moment(0.0)
        ));
    }
    doc.end_list();
    doc.p(&format!(
        "Largest out-of-balance force computed from the unrounded part forces, {}loads and reactions: {} (largest force in the combination {}).",
        if r.beams.is_empty() {
            ""
        } else {
            "beam end shears and moments (a moment counted as a force at the model's extent), "
        },
        if r.equilibrium_residual.value == 0.0 {
            format!("0 {}", f.d.force.name)
        } else {
            format!("{:.1e} {}", f.d.force.value(r.equilibrium_residual.value), f.d.force.name)
        },
        f.force(r.force_scale.value)
    ));
}

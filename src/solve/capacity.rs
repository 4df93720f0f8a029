//! Capacity of assemblies whose parts can yield: the loads of a combination
//! are scaled by a factor λ (self-straining actions stay at full value) and
//! the path is traced event to event. Each event is the next part reaching
//! its yield force, which it then carries unchanged (elastic–perfectly
//! plastic), until the assembly becomes a mechanism: the plastic limit.

use super::{SolveError, System, Take};
use crate::model::{Carries, Model};

/// A part reaching yield.
#[derive(Clone, Debug, PartialEq)]
pub struct YieldEvent {
    pub part: usize,
    /// Load factor at which it yields.
    pub lambda: f64,
    /// Yields in tension (else compression); for a release, the sense the
    /// part carried until it let go.
    pub tension: bool,
    /// A one-sense part letting go (its force reaching zero), not a yield.
    pub released: bool,
}

/// The capacity path of one combination.
#[derive(Clone, Debug, PartialEq)]
pub struct Capacity {
    pub combination: usize,
    /// Load factor at first yield.
    pub first_yield: Option<f64>,
    /// Load factor at the plastic limit (`None`: no mechanism forms, because
    /// parts without a yield strength keep carrying load).
    pub limit: Option<f64>,
    pub events: Vec<YieldEvent>,
    /// Part forces at the limit (N).
    pub limit_forces: Vec<f64>,
    /// Part forces after unloading elastically from the limit (N).
    pub residual: Vec<f64>,
    /// Why the analysis was not made, when it was not.
    pub note: Option<String>,
    /// The node the load pattern moves most (elastically), whose
    /// displacement the path records.
    pub path_node: Option<usize>,
    /// The path: (λ, displacement of `path_node` in m, along the direction
    /// it moves elastically), at the start and at each event.
    pub path: Vec<(f64, f64)>,
}

fn skipped(combination: usize, note: &str) -> Capacity {
    Capacity {
        combination,
        first_yield: None,
        limit: None,
        events: Vec::new(),
        limit_forces: Vec::new(),
        residual: Vec::new(),
        note: Some(note.to_string()),
        path_node: None,
        path: Vec::new(),
    }
}

/// Yield forces of a part in tension and compression (N), if it can yield.
fn yield_forces(model: &Model, i: usize) -> Option<(f64, f64)> {
    let p = &model.parts[i];
    let m = &model.materials[p.material()?];
    let fy = m.yield_strength?.value;
    let fyc = m.yield_compression.map_or(fy, |x| x.value);
    let a = p.area()?.value;
    Some((fy * a, fyc * a))
}

/// The capacity path of every combination, when any material has `yield`.
///
/// # Errors
/// A solver error other than the mechanism that ends a path.
pub fn capacity(model: &Model) -> Result<Vec<Capacity>, SolveError> {
    if !model.materials.iter().any(|m| m.yield_strength.is_some()) {
        return Ok(Vec::new());
    }
    let gapped = model.parts.iter().any(|p| p.slack.value > 0.0);
    if model.parts.iter().any(|p| p.bend.is_some()) {
        return Ok((0..model.combinations.len())
            .map(|ci| skipped(ci, "not traced: the plastic-hinge path of assemblies with beams is not yet modelled"))
            .collect());
    }
    let system = System::new(model)?;
    let k_full = system.stiffness();
    model
        .combinations
        .iter()
        .enumerate()
        .map(|(ci, combo)| path(model, &system, k_full, gapped, ci, combo))
        .collect()
}

/// The path of one combination: the loads scaled by λ from zero until the
/// assembly becomes a mechanism, with each event on the way.
fn path(
    model: &Model,
    system: &System<'_>,
    k_full: &[f64],
    gapped: bool,
    ci: usize,
    combo: &crate::model::Combination,
) -> Result<Capacity, SolveError> {
    let n = model.parts.len();
    let zero = vec![0.0; n];
    if gapped {
        return Ok(skipped(ci, "not traced: the assembly has parts with gaps, whose engagement would change along the path"));
    }
    let constant = system.actions(
        &combo.name,
        &combo.terms,
        Take {
            loads: false,
            strains: true,
            misfit: true,
        },
    )?;
    let load = system.actions(
        &combo.name,
        &combo.terms,
        Take {
            loads: true,
            strains: false,
            misfit: false,
        },
    )?;
    if load.loads.iter().all(|x| *x == 0.0) {
        return Ok(skipped(
            ci,
            "not traced: the combination has no loads to scale",
        ));
    }
    // Elastic response of the whole assembly to the load pattern, for unloading.
    let f_el = system.factor(k_full, &[])?;
    let (q_el, e_el) = system.respond(&f_el, k_full, &zero, &zero, &load);
    let n_el: Vec<f64> = (0..n).map(|i| k_full[i] * e_el[i]).collect();
    // the node the load pattern moves most, and the direction it moves
    let nd = model.kind.dofs();
    let moved = |node: usize| -> Vec<f64> {
        (0..nd)
            .map(|d| system.displacement(&q_el, &load.u0, node * nd + d))
            .collect()
    };
    let size = |v: &[f64]| v.iter().map(|x| x * x).sum::<f64>().sqrt();
    let (node, far) = (0..model.nodes.len())
        .map(|i| (i, size(&moved(i))))
        .fold((0, 0.0), |best, c| if c.1 > best.1 { c } else { best });
    let dir: Vec<f64> = if far > 0.0 {
        moved(node).iter().map(|x| x / far).collect()
    } else {
        vec![0.0; nd]
    };
    let along = |q: &[f64], u0: &[f64]| -> f64 {
        (0..nd)
            .map(|d| dir[d] * system.displacement(q, u0, node * nd + d))
            .sum()
    };
    let mut trace: Vec<(f64, f64)> = Vec::new();

    let mut yielded: Vec<Option<f64>> = vec![None; n];
    // one-sense parts that have let go: no stiffness, no force
    let mut released = vec![false; n];
    let mut lambda = 0.0;
    let mut events = Vec::new();
    let mut limit_forces = vec![0.0; n];
    let mut limit = None;
    let mut note = None;
    loop {
        let k: Vec<f64> = (0..n)
            .map(|i| {
                if yielded[i].is_some() || released[i] {
                    0.0
                } else {
                    k_full[i]
                }
            })
            .collect();
        let forces: Vec<f64> = yielded.iter().map(|y| y.unwrap_or(0.0)).collect();
        let factor = match system.factor(&k, &[]) {
            Ok(f) => f,
            Err(SolveError::Mechanism { .. }) => {
                limit = Some(lambda);
                break;
            }
            Err(e) => return Err(e),
        };
        let (qc, ec) = system.respond(&factor, &k, &constant.free, &forces, &constant);
        let (qp, ep) = system.respond(&factor, &k, &zero, &zero, &load);
        let (dc, dp) = (along(&qc, &constant.u0), along(&qp, &load.u0));
        if trace.is_empty() {
            trace.push((lambda, dc + lambda * dp));
        }
        let nc: Vec<f64> = (0..n)
            .map(|i| yielded[i].unwrap_or(k[i] * (ec[i] - constant.free[i])))
            .collect();
        let np: Vec<f64> = (0..n)
            .map(|i| {
                if yielded[i].is_some() {
                    0.0
                } else {
                    k[i] * ep[i]
                }
            })
            .collect();
        if let Some(i) = lets_go_now(model, &released, &yielded, &nc, &np, lambda) {
            released[i] = true;
            events.push(YieldEvent {
                part: i,
                lambda,
                tension: model.parts[i].carries == Carries::Tension,
                released: true,
            });
            continue;
        }
        let engages = |lam: f64| engages_again(model, &released, &ec, &ep, &constant.free, lam);
        let (candidates, next, past_yield) = next_events(
            model,
            &yielded,
            &released,
            &nc,
            &np,
            lambda,
            events.is_empty(),
        );
        if past_yield.is_some() {
            note = past_yield;
        }
        // Forces vary linearly over a stage, so a part that let go and
        // stays free at both ends of it stays free throughout.
        let end = if next.is_finite() { next } else { lambda };
        if let Some(i) = engages(lambda).or_else(|| engages(end)) {
            note = Some(format!(
                "traced to λ = {lambda:.4}: part `{}`, which let go, would engage again beyond it",
                model.parts[i].name
            ));
            for i in 0..n {
                limit_forces[i] = nc[i] + lambda * np[i];
            }
            break;
        }
        if note.is_some() || !next.is_finite() {
            for i in 0..n {
                limit_forces[i] = nc[i] + lambda * np[i];
            }
            break;
        }
        let tol = 1e-9 * next.abs().max(1.0);
        for &(i, l, tension, release) in &candidates {
            if l <= next + tol {
                if release {
                    released[i] = true;
                } else {
                    let (ft, fc) = yield_forces(model, i).unwrap_or((0.0, 0.0));
                    yielded[i] = Some(if tension { ft } else { -fc });
                }
                events.push(YieldEvent {
                    part: i,
                    lambda: next,
                    tension,
                    released: release,
                });
            }
        }
        trace.push((next, dc + next * dp));
        lambda = next;
        for i in 0..n {
            limit_forces[i] = if released[i] {
                0.0
            } else {
                yielded[i].unwrap_or(nc[i] + lambda * np[i])
            };
        }
        if events.len() >= n {
            limit = Some(lambda);
            break;
        }
    }
    let residual = match limit {
        Some(l) => (0..n).map(|i| limit_forces[i] - l * n_el[i]).collect(),
        None => Vec::new(),
    };
    Ok(Capacity {
        combination: ci,
        first_yield: events.iter().find(|e| !e.released).map(|e| e.lambda),
        limit,
        events,
        limit_forces,
        residual,
        note,
        path_node: (far > 0.0).then_some(node),
        path: trace,
    })
}

/// The events that may end the current stage of the path: each part that
/// lets go or reaches yield, at the load factor where it does; the nearest
/// such factor; and a note when a part is past yield under the
/// self-straining actions alone.
#[allow(clippy::type_complexity)]
fn next_events(
    model: &Model,
    yielded: &[Option<f64>],
    released: &[bool],
    nc: &[f64],
    np: &[f64],
    lambda: f64,
    first_stage: bool,
) -> (Vec<(usize, f64, bool, bool)>, f64, Option<String>) {
    let n = model.parts.len();
    let mut next = f64::INFINITY;
    let mut note = None;
    // (part, λ, tension, release)
    let mut candidates: Vec<(usize, f64, bool, bool)> = Vec::new();
    for i in 0..n {
        if yielded[i].is_some() || released[i] {
            continue;
        }
        let carries = model.parts[i].carries;
        let scale = nc[i].abs().max(np[i].abs()).max(1.0);
        // the force nc + λ·np reaches zero going the wrong way
        let lets_go = match carries {
            Carries::Compression => np[i] > 1e-12 * scale,
            Carries::Tension => np[i] < -1e-12 * scale,
            Carries::Both => false,
        };
        if lets_go {
            let l = (-nc[i] / np[i]).max(lambda);
            candidates.push((i, l, carries == Carries::Tension, true));
            next = next.min(l);
        }
    }
    for i in 0..n {
        if yielded[i].is_some() {
            continue;
        }
        let Some((ft, fc)) = yield_forces(model, i) else {
            continue;
        };
        let now = nc[i] + lambda * np[i];
        if first_stage && (now > ft || now < -fc) {
            note = Some(format!(
                "part `{}` is past yield under the self-straining actions alone",
                model.parts[i].name
            ));
        }
        let scale = nc[i].abs().max(np[i].abs()).max(ft);
        let (l, tension) = if np[i] > 1e-12 * scale {
            ((ft - nc[i]) / np[i], true)
        } else if np[i] < -1e-12 * scale {
            ((-fc - nc[i]) / np[i], false)
        } else {
            continue;
        };
        let l = l.max(lambda);
        candidates.push((i, l, tension, false));
        next = next.min(l);
    }
    (candidates, next, note)
}

/// A one-sense part already in the sense it cannot carry, which lets go at
/// once (at the start, under the self-straining actions alone).
fn lets_go_now(
    model: &Model,
    released: &[bool],
    yielded: &[Option<f64>],
    nc: &[f64],
    np: &[f64],
    lambda: f64,
) -> Option<usize> {
    (0..model.parts.len()).find(|&i| {
        !released[i] && yielded[i].is_none() && {
            let f = nc[i] + lambda * np[i];
            let tol = 1e-9 * nc[i].abs().max(np[i].abs() * lambda.abs()).max(1.0);
            match model.parts[i].carries {
                Carries::Tension => f < -tol,
                Carries::Compression => f > tol,
                Carries::Both => false,
            }
        }
    })
}

/// A part that has let go must stay free: the first whose movement δ − δ₀
/// at `lambda` turns back into the sense it carries.
fn engages_again(
    model: &Model,
    released: &[bool],
    ec: &[f64],
    ep: &[f64],
    free: &[f64],
    lambda: f64,
) -> Option<usize> {
    (0..model.parts.len()).find(|&i| {
        if !released[i] {
            return false;
        }
        let d = ec[i] - free[i] + lambda * ep[i];
        let tol = 1e-9 * model.parts[i].length.value.max(1e-3);
        match model.parts[i].carries {
            Carries::Tension => d > tol,
            Carries::Compression => d < -tol,
            Carries::Both => false,
        }
    })
}

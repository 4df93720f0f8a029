//! Results of a solve, and their verification: finite, and in equilibrium
//! within a stated tolerance.

#![allow(clippy::wildcard_imports)] // the solver's shared imports and helpers

use super::*;

/// The largest equilibrium residual a result may have, relative to the
/// largest load, part force or reaction of its combination; above it the
/// combination is an error, never a result (docs/language.md, "Trust").
pub const EQUILIBRIUM_TOLERANCE: f64 = 1e-8;

/// A combination's results made safe to print: every value finite (else an
/// error naming the combination and the value), negative zeros made
/// positive, and the equilibrium residual within [`EQUILIBRIUM_TOLERANCE`].
///
/// # Errors
/// [`SolveError::NotFinite`] or [`SolveError::OutOfEquilibrium`].
pub fn verified(
    model: &Model,
    mut r: CombinationResult,
    span: Span,
) -> Result<CombinationResult, SolveError> {
    let bad = |what: String| SolveError::NotFinite {
        combination: r.name.clone(),
        what,
        span,
    };
    // `x + 0.0` turns −0 into +0 and leaves every other value as it is.
    let clean = |x: &mut f64| {
        *x += 0.0;
        x.is_finite()
    };
    for (p, pr) in model.parts.iter().zip(&mut r.parts) {
        let mut ok = clean(&mut pr.force.value)
            & clean(&mut pr.strain)
            & clean(&mut pr.elongation.value)
            & clean(&mut pr.free_elongation.value);
        if let Some(s) = &mut pr.stress {
            ok &= clean(&mut s.value);
        }
        if !ok {
            return Err(bad(format!("part `{}`", p.name)));
        }
    }
    for (n, nr) in model.nodes.iter().zip(&mut r.nodes) {
        let mut ok = true;
        for d in 0..2 {
            ok &= clean(&mut nr.displacement[d].value) & clean(&mut nr.reaction[d].value);
        }
        if !ok {
            return Err(bad(format!("node `{}`", n.name)));
        }
    }
    for (b, rot) in model.rigids.iter().zip(&mut r.rotations) {
        if !clean(rot) {
            return Err(bad(format!("the rotation of `{}`", b.name)));
        }
    }
    let (res, mut scale) = (r.equilibrium_residual.value, r.force_scale.value);
    if !res.is_finite() || !scale.is_finite() {
        return Err(bad("the equilibrium residual".into()));
    }
    // The force of each part's own deformation (its elongation, its free
    // elongation, its gap) times its stiffness is a scale too: a heated part
    // whose gap stays open carries round-off only.
    for (p, pr) in model.parts.iter().zip(&r.parts) {
        let k = p.stiffness(&model.materials).value;
        let d = pr
            .free_elongation
            .value
            .abs()
            .max(pr.elongation.value.abs())
            .max(p.slack.value);
        scale = scale.max(k * d);
    }
    if res > EQUILIBRIUM_TOLERANCE * scale {
        return Err(SolveError::OutOfEquilibrium {
            combination: r.name.clone(),
            residual: format!("{res:.3e} N"),
            scale: format!("{scale:.3e} N"),
            tolerance: format!("{EQUILIBRIUM_TOLERANCE:e}"),
            span,
        });
    }
    Ok(r)
}

/// Whether a part carries force in a combination.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PartState {
    Elastic,
    Slack,
}

impl PartState {
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            PartState::Elastic => "elastic",
            PartState::Slack => "slack",
        }
    }
}

/// One part's results in one combination.
#[derive(Clone, Debug, PartialEq)]
pub struct PartResult {
    /// Axial force, tension positive.
    pub force: Force,
    /// Force over area (members only).
    pub stress: Option<Pressure>,
    /// Elongation over length (zero for zero-length springs).
    pub strain: f64,
    /// Change of length, from the node displacements.
    pub elongation: Length,
    /// Elongation the part would take free of force (misfit, temperature, free strain).
    pub free_elongation: Length,
    pub state: PartState,
}

/// One node's results in one combination.
#[derive(Clone, Debug, PartialEq)]
pub struct NodeResult {
    /// `[x, y]`; axial models use `x`.
    pub displacement: [Length; 2],
    /// Support reaction, `[x, y]`; zero in free directions.
    pub reaction: [Force; 2],
}

/// Results of one combination.
#[derive(Clone, Debug, PartialEq)]
pub struct CombinationResult {
    pub name: String,
    pub parts: Vec<PartResult>,
    pub nodes: Vec<NodeResult>,
    /// Rotation of each rigid body (radians; zero in axial models).
    pub rotations: Vec<f64>,
    /// Largest out-of-balance force, from part forces, loads and reactions.
    pub equilibrium_residual: Force,
    /// Largest load, part force or reaction: the scale of the residual.
    pub force_scale: Force,
    /// Active-set trials used (1 for a linear model).
    pub trials: usize,
}

/// Results of every combination.
#[derive(Clone, Debug, PartialEq)]
pub struct Solution {
    pub unknowns: usize,
    pub combinations: Vec<CombinationResult>,
    pub warnings: Vec<crate::warning::Warning>,
}

pub(super) struct ResultInputs<'a> {
    pub(super) q: &'a [f64],
    pub(super) u0: &'a [f64],
    pub(super) loads: &'a [f64],
    pub(super) elong: &'a [f64],
    pub(super) free: &'a [f64],
    /// The force in each part.
    pub(super) forces: &'a [f64],
    pub(super) states: &'a [PartState],
    pub(super) trials: usize,
}

pub(super) fn gather_results(
    model: &Model,
    map: &DofMap,
    elems: &Elements,
    name: String,
    r: &ResultInputs<'_>,
) -> CombinationResult {
    let nd = map.ndof;
    let nn = model.nodes.len();
    let mut u = r.u0.to_vec();
    for (c, t) in map.terms.iter().enumerate() {
        for (i, v) in t.iter() {
            u[c] += v * r.q[i];
        }
    }
    let mut parts = Vec::with_capacity(model.parts.len());
    // Net force on each node component from parts and loads.
    let mut net = r.loads.to_vec();
    let mut scale = r.loads.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    for (i, p) in model.parts.iter().enumerate() {
        let dir = elems.dir[i];
        let (force, state) = (r.forces[i], r.states[i]);
        scale = scale.max(force.abs());
        for d in 0..nd {
            net[p.ends[0] * nd + d] += force * dir[d];
            net[p.ends[1] * nd + d] -= force * dir[d];
        }
        let len = p.length.value;
        parts.push(PartResult {
            force: Force::new::<newton>(force),
            stress: p.area().map(|a| Pressure::new::<pascal>(force / a.value)),
            strain: if len > 0.0 { r.elong[i] / len } else { 0.0 },
            elongation: Length::new::<meter>(r.elong[i]),
            free_elongation: Length::new::<meter>(r.free[i]),
            state,
        });
    }
    // Reactions: plain supported components take their own imbalance; a body
    // shares its imbalance among its independent supports.
    let mut reaction = vec![0.0; nn * nd];
    for i in 0..nn {
        if map.node_body[i].is_some() {
            continue;
        }
        for d in 0..nd {
            if model.nodes[i].fixed[d] {
                reaction[i * nd + d] = -net[i * nd + d];
            }
        }
    }
    for body in &map.bodies {
        if body.pivot_rows.is_empty() {
            continue;
        }
        let mut rq = [0.0; 3];
        for &(m, px, py) in &body.members {
            for d in 0..nd {
                let row = body.kin(d, px, py);
                for c in 0..body.coords {
                    rq[c] += row[c] * net[m * nd + d];
                }
            }
        }
        let k = body.pivot_rows.len();
        for a in 0..k {
            // λ = −inv^T · rq[pivot cols]
            let mut lam = 0.0;
            for b in 0..k {
                lam -= body.inv[b][a] * rq[body.pivot_cols[b]];
            }
            let (n, d, _) = body.constraints[body.pivot_rows[a]];
            reaction[n * nd + d] += lam;
        }
    }
    let (residual, scale) = equilibrium_residual(model, map, &net, r.loads, &reaction, scale);
    // Reactions at round-off level of the largest force read as zero.
    for v in &mut reaction {
        if v.abs() < 1e-12 * scale {
            *v = 0.0;
        }
    }
    let nodes = (0..nn)
        .map(|i| NodeResult {
            displacement: [
                Length::new::<meter>(u[i * nd]),
                Length::new::<meter>(if nd == 2 { u[i * nd + 1] } else { 0.0 }),
            ],
            reaction: [
                Force::new::<newton>(reaction[i * nd]),
                Force::new::<newton>(if nd == 2 { reaction[i * nd + 1] } else { 0.0 }),
            ],
        })
        .collect();
    let rotations = model
        .rigids
        .iter()
        .map(|rb| {
            if model.kind == Kind::Axial {
                return 0.0;
            }
            // The rotation from the first node and any other at a distance.
            let a = rb.nodes[0];
            rb.nodes
                .iter()
                .skip(1)
                .map(|&b| {
                    let (dx, dy) = (
                        model.nodes[b].x.value - model.nodes[a].x.value,
                        model.nodes[b].y.value - model.nodes[a].y.value,
                    );
                    let l2 = dx * dx + dy * dy;
                    if l2 == 0.0 {
                        return 0.0;
                    }
                    // θ = (r × Δu) / |r|²
                    (dx * (u[b * 2 + 1] - u[a * 2 + 1]) - dy * (u[b * 2] - u[a * 2])) / l2
                })
                .find(|t| *t != 0.0)
                .unwrap_or(0.0)
        })
        .collect();
    CombinationResult {
        name,
        parts,
        nodes,
        rotations,
        equilibrium_residual: Force::new::<newton>(residual),
        force_scale: Force::new::<newton>(scale),
        trials: r.trials,
    }
}

/// The largest out-of-balance force, checked independently of the solve:
/// every free plain node component must balance, and loads and reactions
/// as a whole in force and (in a plane) moment about the origin, the
/// moment divided by the model's extent. Also the force scale grown by the
/// reactions.
fn equilibrium_residual(
    model: &Model,
    map: &DofMap,
    net: &[f64],
    loads: &[f64],
    reaction: &[f64],
    mut scale: f64,
) -> (f64, f64) {
    let (nn, nd) = (model.nodes.len(), map.ndof);
    // Independent equilibrium check: free plain components must balance;
    // loads and reactions must balance as a whole, in force and moment.
    let mut residual = 0.0f64;
    for i in 0..nn {
        if map.node_body[i].is_some() {
            continue;
        }
        for d in 0..nd {
            if !model.nodes[i].fixed[d] {
                residual = residual.max(net[i * nd + d].abs());
            }
        }
    }
    let mut sum = [0.0; 2];
    let mut moment = 0.0;
    let mut extent = 0.0f64;
    for i in 0..nn {
        let (x, y) = (model.nodes[i].x.value, model.nodes[i].y.value);
        extent = extent.max(x.abs()).max(y.abs());
        for d in 0..nd {
            let f = loads[i * nd + d] + reaction[i * nd + d];
            sum[d] += f;
            scale = scale.max(reaction[i * nd + d].abs());
        }
        if nd == 2 {
            moment +=
                x * (loads[i * 2 + 1] + reaction[i * 2 + 1]) - y * (loads[i * 2] + reaction[i * 2]);
        }
    }
    residual = residual.max(sum[0].abs()).max(sum[1].abs());
    if extent > 0.0 {
        residual = residual.max(moment.abs() / extent);
    }
    (residual, scale)
}

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
    for (n, nr) in model.nodes.iter().zip(&mut r.nodes) {
        if !(clean(&mut nr.rotation) & clean(&mut nr.reaction_moment)) {
            return Err(bad(format!("the rotation of node `{}`", n.name)));
        }
    }
    for b in &mut r.beams {
        let mut ok = true;
        for v in b
            .end_moments
            .iter_mut()
            .chain(b.end_shears.iter_mut())
            .chain([
                &mut b.moment_max.0,
                &mut b.shear_max,
                &mut b.deflection_max.0,
            ])
        {
            ok &= clean(v);
        }
        if !ok {
            return Err(bad(format!("beam `{}`", model.parts[b.part].name)));
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
    /// Rotation (rad, counter-clockwise) where a beam end is rigidly
    /// joined; zero elsewhere.
    pub rotation: f64,
    /// Reaction moment (N·m, counter-clockwise) where the rotation is held.
    pub reaction_moment: f64,
}

/// A beam's bending in one combination. End moments act on the beam,
/// counter-clockwise positive; shears are end forces across the beam
/// (local y, a quarter turn counter-clockwise from end A toward B). Along
/// the beam the moment is positive where the −y fibre is in tension
/// (sagging for a beam drawn left to right): M(0) = −Ma, M(L) = Mb.
#[derive(Clone, Debug, PartialEq)]
pub struct BeamResult {
    pub part: usize,
    /// `[Ma, Mb]` (N·m).
    pub end_moments: [f64; 2],
    /// `[Va, Vb]` (N).
    pub end_shears: [f64; 2],
    /// Load along the beam per unit length, `[along, across]` (N/m).
    pub load: [f64; 2],
    /// The moment of largest magnitude along the beam (N·m) and where it
    /// is, as a distance from end A (m).
    pub moment_max: (f64, f64),
    /// The shear along the beam (V = dM/dx) of largest magnitude (N).
    pub shear_max: f64,
    /// The largest deflection across the chord between the deflected ends
    /// (m, along local y) and where it is (m from end A).
    pub deflection_max: (f64, f64),
    /// Its length (m).
    pub length: f64,
    /// The deflection across the chord as a polynomial in x (m from end
    /// A): `v(x) = Σ deflection[k]·xᵏ`. A quartic for a uniform load; in a
    /// long-term state the sum of the sustained part's (at the creep-reduced
    /// E·I) and the transient part's.
    pub deflection: [f64; 5],
}

impl BeamResult {
    /// The moments at the two ends as the moment along the beam reads them
    /// (sagging positive): `[M(0), M(L)] = [−Ma, Mb]`.
    #[must_use]
    pub fn end_moments_along(&self) -> [f64; 2] {
        // `+ 0.0` keeps −0 out
        [-self.end_moments[0] + 0.0, self.end_moments[1]]
    }

    /// The shears at the two ends as the shear along the beam reads them,
    /// V = dM/dx: `[V(0), V(L)] = [Va, −Vb]`.
    #[must_use]
    pub fn end_shears_along(&self) -> [f64; 2] {
        [self.end_shears[0], -self.end_shears[1] + 0.0]
    }

    /// The deflection at `x` from end A across the chord between the
    /// deflected ends (m, along local y).
    #[must_use]
    pub fn deflection_at(&self, x: f64) -> f64 {
        self.deflection.iter().rev().fold(0.0, |acc, c| acc * x + c)
    }

    /// The largest deflection along the beam, sampled, and where.
    fn largest_deflection(&self) -> (f64, f64) {
        let mut defl = (0.0f64, 0.0);
        for k in 1..DEFLECTION_STEPS {
            let x = self.length * f64::from(k) / f64::from(DEFLECTION_STEPS);
            let d = self.deflection_at(x);
            if d.abs() > defl.0.abs() {
                defl = (d, x);
            }
        }
        defl
    }

    /// A long-term state's beam: this one's forces and moments, its
    /// deflection the sum of the sustained and transient states' (each at
    /// its own E·I).
    #[must_use]
    pub fn with_deflection_of(mut self, sustained: &Self, transient: &Self) -> Self {
        for k in 0..5 {
            self.deflection[k] = sustained.deflection[k] + transient.deflection[k];
        }
        self.deflection_max = self.largest_deflection();
        self
    }

    /// The moment at `x` from end A (sagging positive).
    #[must_use]
    pub fn moment_at(&self, x: f64) -> f64 {
        -self.end_moments[0] + self.end_shears[0] * x + self.load[1] * x * x / 2.0
    }
}

/// Points along a beam where its deflection is sampled for the largest.
const DEFLECTION_STEPS: u32 = 256;

/// A beam's results from its end moments and its load across it.
fn beam_result(part: usize, m: [f64; 2], w: [f64; 2], l: f64, ei: f64) -> BeamResult {
    let wt = w[1];
    let va = (m[0] + m[1]) / l - wt * l / 2.0;
    let vb = -(m[0] + m[1]) / l - wt * l / 2.0;
    let moment = |x: f64| -m[0] + va * x + wt * x * x / 2.0;
    let mut best = (moment(0.0), 0.0);
    let mut consider = |x: f64| {
        let v = moment(x);
        if v.abs() > best.0.abs() * (1.0 + 1e-12) {
            best = (v, x);
        }
    };
    consider(l);
    if wt != 0.0 {
        let x = -va / wt;
        if x > 0.0 && x < l {
            consider(x);
        }
    }
    // EI·v'' = M with v = 0 at both ends (the chord), integrated exactly:
    // EI·v = −Ma·x²/2 + Va·x³/6 + w·x⁴/24 + c·x with v(L) = 0
    let c1 = -(-m[0] * l * l / 2.0 + va * l.powi(3) / 6.0 + wt * l.powi(4) / 24.0) / l;
    let mut b = BeamResult {
        part,
        end_moments: m,
        end_shears: [va, vb],
        load: w,
        moment_max: best,
        shear_max: if va.abs() >= vb.abs() { va } else { -vb },
        deflection_max: (0.0, 0.0),
        length: l,
        deflection: [
            0.0,
            c1 / ei,
            -m[0] / 2.0 / ei,
            va / 6.0 / ei,
            wt / 24.0 / ei,
        ],
    };
    b.deflection_max = b.largest_deflection();
    b
}

/// Results of one combination.
#[derive(Clone, Debug, PartialEq)]
pub struct CombinationResult {
    pub name: String,
    pub parts: Vec<PartResult>,
    pub nodes: Vec<NodeResult>,
    /// Rotation of each rigid body (radians; zero in axial models).
    pub rotations: Vec<f64>,
    /// Each beam's bending, in the order of the parts.
    pub beams: Vec<BeamResult>,
    /// Largest out-of-balance force, from part forces, loads and reactions.
    pub equilibrium_residual: Force,
    /// Largest load, part force or reaction: the scale of the residual.
    pub force_scale: Force,
    /// Active-set trials used (1 for a linear model).
    pub trials: usize,
}

impl CombinationResult {
    /// The bending results of part `part`, when it is a beam.
    #[must_use]
    pub fn beam(&self, part: usize) -> Option<&BeamResult> {
        self.beams
            .binary_search_by_key(&part, |b| b.part)
            .ok()
            .map(|i| &self.beams[i])
    }
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
    /// Deformation from the prescribed movements: parts, then bending modes.
    pub(super) e0: &'a [f64],
    /// Each part's load along it, `[along, across]` per unit length.
    pub(super) along: &'a [[f64; 2]],
    pub(super) elong: &'a [f64],
    pub(super) free: &'a [f64],
    /// The force in each part.
    pub(super) forces: &'a [f64],
    pub(super) states: &'a [PartState],
    pub(super) trials: usize,
    /// How the bending modes carry moment.
    pub(super) modes: ModeLaw<'a>,
}

/// The moments of the bending modes in a result.
#[derive(Clone, Copy)]
pub(super) enum ModeLaw<'a> {
    /// Elastic: each mode's stiffness times its deformation.
    Elastic,
    /// The given stiffness per mode (a creep-reduced E·I) times its
    /// deformation; deflections at the E·I reduced in proportion.
    Stiffness(&'a [f64]),
    /// The given moment per mode (a long-term state's, summed).
    Moments(&'a [f64]),
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
    // Beams: each bending mode's moment pushes on its nodes; the end
    // moments gather the modes' and the fixed-end moments of the load along
    let np = model.parts.len();
    let mut end_m: Vec<[f64; 2]> = Vec::new();
    // each beam's place among the beams (none made for a calc without one)
    let mut beam_of = Vec::new();
    if model.parts.iter().any(|p| p.bend.is_some()) {
        beam_of.resize(np, usize::MAX);
        for (i, p) in model.parts.iter().enumerate() {
            if p.bend.is_some() {
                beam_of[i] = end_m.len();
                end_m.push([0.0; 2]);
            }
        }
    }
    // E·I for the deflection, relative to the elastic
    let mut ei_factor = vec![1.0; end_m.len()];
    for (j, m) in elems.modes.iter().enumerate() {
        let i = np + j;
        let e = r.e0[i] + elems.g(i).iter().map(|&(u, g)| g * r.q[u]).sum::<f64>();
        let f = match r.modes {
            ModeLaw::Elastic => elems.k[i] * e,
            ModeLaw::Stiffness(k) => {
                ei_factor[beam_of[m.part]] = k[j] / elems.k[i];
                k[j] * e
            }
            ModeLaw::Moments(mm) => mm[j],
        };
        for &(c, v) in &m.comps {
            net[c] -= f * v;
        }
        let b = &mut end_m[beam_of[m.part]];
        b[0] += f * m.ca;
        b[1] += f * m.cb;
    }
    let mut beams = Vec::with_capacity(end_m.len());
    for (i, p) in model.parts.iter().enumerate() {
        let (Some(bend), Some(mat)) = (&p.bend, p.material()) else {
            continue;
        };
        let l = p.length.value;
        let w = r.along[i];
        let [_, _, ma, mb] = super::actions::equivalent_loads(w[1], l, bend.hinge);
        let m = end_m[beam_of[i]];
        let ei = model.materials[mat].e.value * bend.inertia * ei_factor[beam_of[i]];
        let b = beam_result(i, [m[0] - ma, m[1] - mb], w, l, ei);
        // a beam's stress is its extreme fibre's: N/A ± M·c/I, the larger
        if let Some(area) = p.area() {
            let axial = parts[i].force.value / area.value;
            let bending = b.moment_max.0.abs() * bend.fibre / bend.inertia;
            let s = if axial >= 0.0 {
                axial + bending
            } else {
                axial - bending
            };
            parts[i].stress = Some(Pressure::new::<pascal>(s));
        }
        beams.push(b);
        for f in [m[0] - ma, m[1] - mb] {
            scale = scale.max(f.abs() / l);
        }
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
    let mut reaction_moment = vec![0.0; nn];
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
            // a beam end joined to the body turns it
            if let (Some(_), Some(c)) = (map.rigid_of[m], map.rot[m]) {
                rq[2] += net[c];
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
            if d == 2 {
                // the held rotation of a rigid body
                reaction_moment[n] += lam;
            } else {
                reaction[n * nd + d] += lam;
            }
        }
    }
    for i in 0..nn {
        if let (Some(c), true, None) = (map.rot[i], model.nodes[i].fixed_rotation, map.rigid_of[i])
        {
            reaction_moment[i] = -net[c];
        }
    }
    let (residual, scale) = equilibrium_residual(
        model,
        map,
        &net,
        r.loads,
        (&reaction, &reaction_moment),
        scale,
    );
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
            rotation: map.rot[i].map_or(0.0, |c| u[c]),
            reaction_moment: reaction_moment[i],
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
        beams,
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
    (reaction, reaction_moment): (&[f64], &[f64]),
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
        // moments at nodes: applied and held
        if let Some(c) = map.rot[i] {
            moment += loads[c] + reaction_moment[i];
        }
    }
    // a free rotation must balance too, its moment over the model's extent
    if extent > 0.0 {
        for i in 0..nn {
            if let (Some(c), false, None) =
                (map.rot[i], model.nodes[i].fixed_rotation, map.rigid_of[i])
            {
                residual = residual.max(net[c].abs() / extent);
            }
        }
    }
    residual = residual.max(sum[0].abs()).max(sum[1].abs());
    if extent > 0.0 {
        residual = residual.max(moment.abs() / extent);
    }
    (residual, scale)
}

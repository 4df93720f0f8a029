//! Direct stiffness solution of a [`Model`] in every load combination.
//!
//! Node displacements are expressed in the free unknowns (supports, ties and
//! rigid bodies eliminated exactly, see `dofs`); each part adds k·g·gᵀ to a
//! sparse matrix whose pattern and symbolic factorisation are built once per
//! model. Parts that carry one sense only or have a gap are solved by an
//! active-set iteration that refactorises only when the set of engaged parts
//! changes. Results are checked afterwards against equilibrium computed
//! from the part forces, loads and reactions alone.

pub mod capacity;
mod dofs;
mod error;
pub mod longterm;
mod sparse;

pub use error::SolveError;

use std::collections::HashSet;
use std::hash::{Hash, Hasher};

use uom::si::f64::{Force, Length, Pressure};
use uom::si::force::newton;
use uom::si::length::meter;
use uom::si::pressure::pascal;

use crate::model::{Carries, Kind, Model};
use crate::source::Span;
use dofs::{DofMap, Unknown};
use sparse::{Failure, Pattern};

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

/// Most active-set trials per combination before giving up.
pub const MAX_TRIALS: usize = 200;

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
    pub warnings: Vec<String>,
}

/// Each part's contribution: elongation = `Σ g·q + c·(u0[b] − u0[a])`.
/// Flat lists, one run per part, so that a million parts are a few large
/// arrays rather than millions of small ones.
struct Elements {
    /// Direction cosines per component.
    dir: Vec<[f64; 2]>,
    k: Vec<f64>,
    /// Part `i`'s coefficients `g` are `g[g_at[i]..g_at[i + 1]]`.
    g_at: Vec<usize>,
    g: Vec<(usize, f64)>,
    /// Positions in the value array of each (i ≤ j) pair of a part's `g`,
    /// with gi·gj; part `i`'s are `pos[pos_at[i]..pos_at[i + 1]]`.
    pos_at: Vec<usize>,
    pos: Vec<(usize, f64)>,
}

impl Elements {
    fn g(&self, i: usize) -> &[(usize, f64)] {
        &self.g[self.g_at[i]..self.g_at[i + 1]]
    }

    fn pos(&self, i: usize) -> &[(usize, f64)] {
        &self.pos[self.pos_at[i]..self.pos_at[i + 1]]
    }
}

/// How a nonlinear part is currently treated.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
enum Mode {
    /// Engaged with no offset (linear parts).
    Linear,
    /// Engaged in tension past its gap.
    Tension,
    /// Engaged in compression past its gap.
    Compression,
    Slack,
}

fn elements(model: &Model, map: &DofMap) -> Elements {
    let nd = map.ndof;
    let n = model.parts.len();
    let mut e = Elements {
        dir: Vec::with_capacity(n),
        k: Vec::with_capacity(n),
        g_at: Vec::with_capacity(n + 1),
        g: Vec::with_capacity(2 * nd * n),
        pos_at: Vec::new(),
        pos: Vec::new(),
    };
    e.g_at.push(0);
    for (pi, p) in model.parts.iter().enumerate() {
        let dir = model.direction(pi);
        let start = e.g.len();
        for (d, c) in dir.iter().enumerate().take(nd) {
            for (i, v) in map.terms[p.ends[1] * nd + d].iter() {
                e.g.push((i, c * v));
            }
            for (i, v) in map.terms[p.ends[0] * nd + d].iter() {
                e.g.push((i, -c * v));
            }
        }
        // merge repeated unknowns, drop zero coefficients
        e.g[start..].sort_by_key(|x| x.0);
        let mut len = start;
        for r in start..e.g.len() {
            let (i, v) = e.g[r];
            if len > start && e.g[len - 1].0 == i {
                e.g[len - 1].1 += v;
            } else {
                e.g[len] = (i, v);
                len += 1;
            }
        }
        e.g.truncate(len);
        let mut keep = start;
        for r in start..len {
            if e.g[r].1 != 0.0 {
                e.g[keep] = e.g[r];
                keep += 1;
            }
        }
        e.g.truncate(keep);
        e.g_at.push(keep);
        e.dir.push(dir);
        e.k.push(p.stiffness(&model.materials).value);
    }
    e
}

fn state_hash(modes: &[Mode]) -> u64 {
    let mut h = std::collections::hash_map::DefaultHasher::new();
    modes.hash(&mut h);
    h.finish()
}

/// The largest component of a free motion, in words.
fn describe_unknown(
    model: &Model,
    map: &DofMap,
    index: usize,
) -> (String, crate::source::Span, String) {
    let axis = |d: usize| match (model.kind, d) {
        (Kind::Axial, _) => String::new(),
        (Kind::Plane, 0) => " in x".into(),
        (Kind::Plane, _) => " in y".into(),
    };
    let fix_dir = |d: usize| match (model.kind, d) {
        (Kind::Axial, _) => String::new(),
        (Kind::Plane, 0) => " x".into(),
        (Kind::Plane, _) => " y".into(),
    };
    match &map.unknowns[index] {
        Unknown::Node(i, d) => {
            let n = &model.nodes[*i];
            (
                format!("node `{}`{}", n.name, axis(*d)),
                n.span,
                format!(
                    "add a support (`fix {}{}`) or a part that holds node `{}`{}",
                    n.name,
                    fix_dir(*d),
                    n.name,
                    axis(*d)
                ),
            )
        }
        Unknown::Tie(i, d) => {
            let n = &model.nodes[*i];
            (
                format!("the nodes tied to `{}`{}", n.name, axis(*d)),
                n.span,
                format!(
                    "add a support or a part that holds the tied nodes{}",
                    axis(*d)
                ),
            )
        }
        Unknown::Rigid(r, c) => {
            let body = &model.rigids[*r];
            let what = match c {
                0 => "moving in x",
                1 => "moving in y",
                _ => "rotating",
            };
            (
                format!("rigid body `{}` ({what})", body.name),
                body.span,
                format!(
                    "support rigid body `{}` at another point, or add a part that holds it",
                    body.name
                ),
            )
        }
    }
}

fn mechanism(model: &Model, map: &DofMap, index: usize, slack: &[usize]) -> SolveError {
    let (what, span, help) = describe_unknown(model, map, index);
    let when = if slack.is_empty() {
        String::new()
    } else {
        let names: Vec<String> = slack
            .iter()
            .take(4)
            .map(|&i| format!("`{}`", model.parts[i].name))
            .collect();
        let more = if slack.len() > 4 { ", ..." } else { "" };
        let verb = if slack.len() == 1 { "goes" } else { "go" };
        format!(" once {}{more} {verb} slack", names.join(", "))
    };
    SolveError::Mechanism {
        what,
        when,
        span,
        help: Some(help),
    }
}

/// What a set of factored cases does to the assembly.
pub(crate) struct Actions {
    /// Prescribed node displacements (support movements), per component.
    pub u0: Vec<f64>,
    /// Nodal loads, per component.
    pub loads: Vec<f64>,
    /// Free elongation of each part.
    pub free: Vec<f64>,
    /// Elongation of each part from the prescribed movements alone.
    pub e0: Vec<f64>,
    /// Loads in the free unknowns.
    pub f_loads: Vec<f64>,
}

/// Which actions of the cases to take.
#[derive(Clone, Copy, PartialEq, Eq)]
pub(crate) struct Take {
    pub loads: bool,
    /// Temperature, free strain, support movements.
    pub strains: bool,
    pub misfit: bool,
}

impl Take {
    pub const ALL: Take = Take {
        loads: true,
        strains: true,
        misfit: true,
    };
}

/// A model's numbered unknowns, elements and factorisation pattern, built
/// once and reused for every combination, trial and analysis.
pub(crate) struct System<'m> {
    pub model: &'m Model,
    pub map: DofMap,
    elems: Elements,
    pattern: Pattern,
}

impl<'m> System<'m> {
    pub fn new(model: &'m Model) -> Result<Self, SolveError> {
        let map = dofs::number(model)?;
        let mut elems = elements(model, &map);
        let n = model.parts.len();
        let pattern = Pattern::new(map.n, |pair| {
            for p in 0..n {
                let g = elems.g(p);
                for (a, &(i, _)) in g.iter().enumerate() {
                    for &(j, _) in &g[a..] {
                        pair(i, j);
                    }
                }
            }
        })
        .map_err(|r| numeric(model, r))?;
        let mut pos = Vec::with_capacity(elems.g.len() * 3 / 2);
        let mut pos_at = Vec::with_capacity(n + 1);
        pos_at.push(0);
        for p in 0..n {
            let g = elems.g(p);
            for (a, &(i, gi)) in g.iter().enumerate() {
                for &(j, gj) in &g[a..] {
                    pos.push((pattern.position(i, j), gi * gj));
                }
            }
            pos_at.push(pos.len());
        }
        elems.pos = pos;
        elems.pos_at = pos_at;
        Ok(Self {
            model,
            map,
            elems,
            pattern,
        })
    }

    /// Each part's elastic stiffness k = E A / L.
    pub fn stiffness(&self) -> Vec<f64> {
        self.elems.k.clone()
    }

    /// The actions of factored cases.
    pub fn actions(
        &self,
        name: &str,
        terms: &[(usize, f64)],
        take: Take,
    ) -> Result<Actions, SolveError> {
        let model = self.model;
        let map = &self.map;
        let nd = map.ndof;
        let nn = model.nodes.len();
        let mut u0 = vec![0.0; nn * nd];
        let mut loads = vec![0.0; nn * nd];
        let mut free = vec![0.0; model.parts.len()];
        if take.misfit {
            for (i, p) in model.parts.iter().enumerate() {
                free[i] = p.misfit.value;
            }
        }
        let mut moved: std::collections::HashMap<(usize, usize), f64> =
            std::collections::HashMap::new();
        for &(ci, factor) in terms {
            let case = &model.cases[ci];
            if take.strains {
                for s in &case.settlements {
                    *moved.entry((s.node, s.direction)).or_default() += factor * s.movement.value;
                }
            }
            if take.loads {
                for l in &case.loads {
                    for d in 0..nd {
                        loads[l.node * nd + d] += factor * l.force[d].value;
                    }
                }
            }
            if !take.strains {
                continue;
            }
            let on_part = if case.temperatures.is_empty() {
                Vec::new()
            } else {
                case.temperature_by_part(model.parts.len())
            };
            for ((i, p), t) in model.parts.iter().enumerate().zip(on_part) {
                let Some(m) = p.material() else { continue };
                if let Some(t) = t {
                    if let Some(alpha) = model.materials[m].alpha {
                        free[i] += factor * alpha.value * t.change.value * p.length.value;
                    }
                }
            }
            for s in &case.strains {
                free[s.part] += factor * s.strain.value * model.parts[s.part].length.value;
            }
        }
        for (&(node, d), &v) in &moved {
            if map.node_body[node].is_none() {
                u0[node * nd + d] = v;
            }
        }
        for body in &map.bodies {
            if body.constraints.is_empty() {
                continue;
            }
            let mv: Vec<f64> = body
                .constraints
                .iter()
                .map(|(n, d, _)| moved.get(&(*n, *d)).copied().unwrap_or(0.0))
                .collect();
            if mv.iter().all(|v| *v == 0.0) {
                continue;
            }
            let q = body.particular(&mv).map_err(|k| {
                let (n, _, _) = body.constraints[k];
                SolveError::SettlementConflict {
                    body: match body.rigid {
                        Some(r) => format!("rigid body `{}`", model.rigids[r].name),
                        None => format!("the nodes tied to `{}`", model.nodes[n].name),
                    },
                    combination: name.to_string(),
                    span: model.nodes[n].span,
                }
            })?;
            for &(m, px, py) in &body.members {
                for d in 0..nd {
                    let row = body.kin(d, px, py);
                    u0[m * nd + d] = row.iter().zip(q).map(|(a, b)| a * b).sum();
                }
            }
        }
        let e0: Vec<f64> = model
            .parts
            .iter()
            .zip(&self.elems.dir)
            .map(|(p, dir)| {
                (0..nd)
                    .map(|d| dir[d] * (u0[p.ends[1] * nd + d] - u0[p.ends[0] * nd + d]))
                    .sum()
            })
            .collect();
        let mut f_loads = vec![0.0; map.n];
        for (c, &f) in loads.iter().enumerate() {
            if f != 0.0 {
                for (i, v) in map.terms[c].iter() {
                    f_loads[i] += v * f;
                }
            }
        }
        Ok(Actions {
            u0,
            loads,
            free,
            e0,
            f_loads,
        })
    }

    /// Factorise with per-part stiffnesses (0 removes a part).
    pub fn factor(&self, k: &[f64], slack: &[usize]) -> Result<sparse::Factor<'_>, SolveError> {
        let mut values = vec![0.0; self.pattern.nnz()];
        for (i, &kk) in k.iter().enumerate() {
            if kk != 0.0 {
                for &(p, c) in self.elems.pos(i) {
                    values[p] += kk * c;
                }
            }
        }
        match self.pattern.factor(&values) {
            Ok(f) => Ok(f),
            Err(Failure::Unsupported(j)) => Err(mechanism(self.model, &self.map, j, slack)),
            Err(Failure::Mechanism(mode)) => {
                let j = dominant(self.model, &self.map, &mode);
                Err(mechanism(self.model, &self.map, j, slack))
            }
            Err(Failure::Other(reason)) => Err(numeric(self.model, reason)),
        }
    }

    /// Σ c_i·g_i over the parts: per-part coefficients into the unknowns.
    fn gather(&self, c: &[f64]) -> Vec<f64> {
        let mut out = vec![0.0; self.map.n];
        for (i, &ci) in c.iter().enumerate() {
            if ci != 0.0 {
                for &(j, g) in self.elems.g(i) {
                    out[j] += ci * g;
                }
            }
        }
        out
    }

    /// g_i·v for every part.
    fn project(&self, v: &[f64]) -> Vec<f64> {
        (0..self.elems.k.len())
            .map(|i| self.elems.g(i).iter().map(|&(j, g)| g * v[j]).sum())
            .collect()
    }

    /// Solve for the unknowns and the part elongations: parts with stiffness
    /// `k[i]` aim at elongation `target[i]` (free elongation plus any gap);
    /// `forces[i]` are constant part forces (yielded parts) pushed onto the
    /// nodes.
    pub fn respond(
        &self,
        factor: &sparse::Factor<'_>,
        k: &[f64],
        target: &[f64],
        forces: &[f64],
        a: &Actions,
    ) -> (Vec<f64>, Vec<f64>) {
        let mut rhs = a.f_loads.clone();
        for i in 0..self.elems.k.len() {
            let t = k[i] * (target[i] - a.e0[i]) - forces[i];
            if t != 0.0 {
                for &(j, g) in self.elems.g(i) {
                    rhs[j] += t * g;
                }
            }
        }
        let f = rhs.clone();
        factor.solve(&mut rhs);
        let mut q = rhs;
        // One step of iterative refinement: the residual f − K·q, solved
        // again with the same factor. A long chain of parts is ill-conditioned
        // (condition number ~ n²); refinement brings its equilibrium residual
        // from ~1e-7 to round-off of the largest force at 25,000 parts.
        let mut r = f;
        for i in 0..self.elems.k.len() {
            let g = self.elems.g(i);
            let s = k[i] * g.iter().map(|&(j, gj)| gj * q[j]).sum::<f64>();
            if s != 0.0 {
                for &(j, gj) in g {
                    r[j] -= s * gj;
                }
            }
        }
        factor.solve(&mut r);
        for (qj, dj) in q.iter_mut().zip(&r) {
            *qj += dj;
        }
        let elong =
            a.e0.iter()
                .enumerate()
                .map(|(i, base)| base + self.elems.g(i).iter().map(|&(j, g)| g * q[j]).sum::<f64>())
                .collect();
        (q, elong)
    }

    /// Results of a solved state.
    #[allow(clippy::too_many_arguments)]
    pub fn results(
        &self,
        name: String,
        q: &[f64],
        a: &Actions,
        elong: &[f64],
        forces: &[f64],
        states: &[PartState],
        trials: usize,
    ) -> CombinationResult {
        results(
            self.model,
            &self.map,
            &self.elems,
            name,
            &ResultInputs {
                q,
                u0: &a.u0,
                loads: &a.loads,
                elong,
                free: &a.free,
                forces,
                states,
                trials,
            },
        )
    }
}

fn numeric(model: &Model, reason: String) -> SolveError {
    SolveError::Numeric {
        reason,
        span: model.parts.first().map(|p| p.span).unwrap_or_default(),
    }
}

/// The force law of a part in a mode: (stiffness on, offset of the target).
fn law(model: &Model, i: usize, m: Mode) -> (bool, f64) {
    let s = model.parts[i].slack.value;
    match m {
        Mode::Slack => (false, 0.0),
        Mode::Linear => (true, 0.0),
        Mode::Tension => (true, s),
        Mode::Compression => (true, -s),
    }
}

/// The force of a part at free movement `delta` (elongation less free
/// elongation) by its law, and the mode that force belongs to.
fn law_force(model: &Model, i: usize, k: f64, delta: f64) -> (f64, Mode) {
    let p = &model.parts[i];
    let s = p.slack.value;
    match p.carries {
        Carries::Both if s == 0.0 => (k * delta, Mode::Linear),
        Carries::Tension | Carries::Both if delta > s => (k * (delta - s), Mode::Tension),
        Carries::Compression | Carries::Both if delta < -s => (k * (delta + s), Mode::Compression),
        _ => (0.0, Mode::Slack),
    }
}

/// The engaged set by damped Newton on the assembly's energy, when flipping
/// parts does not settle. The energy of parts that carry one sense or have
/// a gap is convex and piecewise quadratic, so Newton steps with an exact
/// line search always lower it; slack parts keep a trace of stiffness in the
/// Newton matrix only, so that an intermediate state is never singular.
fn newton_modes(
    system: &System<'_>,
    a: &Actions,
    k_full: &[f64],
    start: &[Mode],
    max_steps: usize,
) -> Result<Vec<Mode>, SolveError> {
    let model = system.model;
    let n = k_full.len();
    let zero = vec![0.0; n];
    // Start from the solution of the starting state (all one-sense parts engaged).
    let k0: Vec<f64> = (0..n)
        .map(|i| {
            if law(model, i, start[i]).0 {
                k_full[i]
            } else {
                1e-8 * k_full[i]
            }
        })
        .collect();
    let f0 = system.factor(&k0, &[])?;
    let target0: Vec<f64> = (0..n)
        .map(|i| a.free[i] + law(model, i, start[i]).1)
        .collect();
    let (mut q, _) = system.respond(&f0, &k0, &target0, &zero, a);
    let mut modes = start.to_vec();
    for _ in 0..max_steps {
        let base: Vec<f64> = system.project(&q);
        let delta: Vec<f64> = (0..n).map(|i| base[i] + a.e0[i] - a.free[i]).collect();
        let forces: Vec<(f64, Mode)> = (0..n)
            .map(|i| law_force(model, i, k_full[i], delta[i]))
            .collect();
        let new_modes: Vec<Mode> = forces.iter().map(|x| x.1).collect();
        // gradient of the energy: Σ N_i g_i − f
        let mut grad = system.gather(&forces.iter().map(|x| x.0).collect::<Vec<_>>());
        for (g, f) in grad.iter_mut().zip(&a.f_loads) {
            *g -= f;
        }
        let scale = a
            .f_loads
            .iter()
            .chain(grad.iter())
            .fold(0.0f64, |m, v| m.max(v.abs()))
            .max(1e-300);
        let gnorm = grad.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        if new_modes == modes && gnorm <= 1e-12 * scale {
            return Ok(modes);
        }
        modes = new_modes;
        let kh: Vec<f64> = (0..n)
            .map(|i| {
                if modes[i] == Mode::Slack {
                    1e-8 * k_full[i]
                } else {
                    k_full[i]
                }
            })
            .collect();
        let factor = system.factor(&kh, &[])?;
        let mut d: Vec<f64> = grad.iter().map(|g| -g).collect();
        factor.solve(&mut d);
        let gd = system.project(&d);
        let fd: f64 = a.f_loads.iter().zip(&d).map(|(f, x)| f * x).sum();
        let slope = |t: f64| -> f64 {
            (0..n)
                .map(|i| law_force(model, i, k_full[i], delta[i] + t * gd[i]).0 * gd[i])
                .sum::<f64>()
                - fd
        };
        // exact line search on the monotone derivative
        let t = if slope(1.0) <= 0.0 {
            1.0
        } else {
            let (mut lo, mut hi) = (0.0, 1.0);
            for _ in 0..60 {
                let mid = 0.5 * (lo + hi);
                if slope(mid) > 0.0 {
                    hi = mid;
                } else {
                    lo = mid;
                }
            }
            0.5 * (lo + hi)
        };
        for (x, dx) in q.iter_mut().zip(&d) {
            *x += t * dx;
        }
    }
    Ok(modes)
}

/// Each part's stiffness in its mode (zero when slack).
fn engaged_stiffness(model: &Model, modes: &[Mode], k_full: &[f64]) -> Vec<f64> {
    (0..modes.len())
        .map(|i| {
            if law(model, i, modes[i]).0 {
                k_full[i]
            } else {
                0.0
            }
        })
        .collect()
}

/// Solve every combination of a model.
///
/// # Errors
/// Mechanisms (naming the node or body and direction), active sets that do
/// not settle, conflicting support movements.
pub fn solve(model: &Model) -> Result<Solution, SolveError> {
    solve_with(model, MAX_TRIALS)
}

/// [`solve`] with a given limit on active-set trials per combination.
///
/// # Errors
/// As [`solve`].
pub fn solve_with(model: &Model, max_trials: usize) -> Result<Solution, SolveError> {
    let system = System::new(model)?;
    let k_full = system.stiffness();
    let mut warnings = Vec::new();
    let (kmin, kmax) = k_full.iter().fold((f64::INFINITY, 0.0f64), |(lo, hi), &k| {
        (lo.min(k), hi.max(k))
    });
    if kmax > 1e12 * kmin {
        warnings.push(format!(
            "part stiffnesses differ by a factor of {:.1e}; results may lose precision",
            kmax / kmin
        ));
    }
    let initial: Vec<Mode> = model
        .parts
        .iter()
        .map(|p| match (p.carries, p.slack.value > 0.0) {
            (Carries::Both, false) => Mode::Linear,
            (Carries::Tension, _) => Mode::Tension,
            (Carries::Compression, _) => Mode::Compression,
            (Carries::Both, true) => Mode::Slack,
        })
        .collect();
    let nonlinear: Vec<usize> = (0..model.parts.len())
        .filter(|&i| initial[i] != Mode::Linear)
        .collect();
    let zero = vec![0.0; model.parts.len()];

    let mut cache: Option<(u64, sparse::Factor<'_>)> = None;
    let mut combinations = Vec::new();
    for combo in &model.combinations {
        let a = system.actions(&combo.name, &combo.terms, Take::ALL)?;
        let mut modes = initial.clone();
        let mut seen: HashSet<u64> = HashSet::new();
        let mut trials = 0;
        // Flip every part whose state is wrong at once; if that comes back
        // to a state seen before, flip one part at a time, the most wrong
        // first; if that cycles too, or a trial state cannot stand, find the
        // set by damped Newton on the energy.
        let mut single = false;
        let mut newton_tried = false;
        let mut previous: Option<Vec<Mode>> = None;
        let (q, elong) = loop {
            trials += 1;
            let key = state_hash(&modes);
            if !seen.insert(key) {
                if single {
                    if newton_tried {
                        let flipping: Vec<String> = nonlinear
                            .iter()
                            .take(4)
                            .map(|&i| format!("`{}`", model.parts[i].name))
                            .collect();
                        return Err(SolveError::Cycling {
                            combination: combo.name.clone(),
                            parts: flipping.join(", "),
                            span: combo.span,
                        });
                    }
                    // Flipping does not settle: let Newton find the set.
                    newton_tried = true;
                    modes = newton_modes(&system, &a, &k_full, &initial, max_trials)?;
                    seen.clear();
                    continue;
                }
                single = true;
                seen.clear();
                seen.insert(key);
            }
            if trials > max_trials {
                return Err(SolveError::TooManyTrials {
                    combination: combo.name.clone(),
                    limit: max_trials,
                    span: combo.span,
                });
            }
            let k = engaged_stiffness(model, &modes, &k_full);
            if cache.as_ref().is_none_or(|(c, _)| *c != key) {
                let slack_parts: Vec<usize> = nonlinear
                    .iter()
                    .copied()
                    .filter(|&i| modes[i] == Mode::Slack)
                    .collect();
                match system.factor(&k, &slack_parts) {
                    Ok(f) => cache = Some((key, f)),
                    Err(SolveError::Mechanism { .. }) if !newton_tried && previous.is_some() => {
                        // A trial state that cannot stand: let Newton find the set.
                        newton_tried = true;
                        single = true;
                        modes = newton_modes(&system, &a, &k_full, &initial, max_trials)?;
                        seen.clear();
                        continue;
                    }
                    Err(e) => return Err(e),
                }
            }
            let target: Vec<f64> = (0..modes.len())
                .map(|i| a.free[i] + law(model, i, modes[i]).1)
                .collect();
            let Some((_, f)) = &cache else {
                return Err(numeric(model, "no factorisation".into()));
            };
            let (q, elong) = system.respond(f, &k, &target, &zero, &a);
            // Each wrong part and how far its elongation is from its state.
            let mut wrong: Vec<(usize, Mode, f64)> = Vec::new();
            for &i in &nonlinear {
                let p = &model.parts[i];
                let delta = elong[i] - a.free[i];
                let s = p.slack.value;
                // A part at the edge of its state by round-off keeps it.
                let tol = 1e-12 * p.length.value.max(1e-3);
                let want = match p.carries {
                    Carries::Tension | Carries::Both if delta > s => Mode::Tension,
                    Carries::Compression | Carries::Both if delta < -s => Mode::Compression,
                    _ => Mode::Slack,
                };
                let edge = match (modes[i], want) {
                    (Mode::Tension, _) | (_, Mode::Tension) => (delta - s).abs() <= tol,
                    (Mode::Compression, _) | (_, Mode::Compression) => (delta + s).abs() <= tol,
                    _ => false,
                };
                if want != modes[i] && !edge {
                    let by = match (modes[i], want) {
                        (Mode::Tension, _) | (_, Mode::Tension) => (delta - s).abs(),
                        _ => (delta + s).abs(),
                    };
                    wrong.push((i, want, by));
                }
            }
            if wrong.is_empty() {
                break (q, elong);
            }
            previous = Some(modes.clone());
            if single {
                let worst = wrong
                    .iter()
                    .copied()
                    .max_by(|x, y| x.2.total_cmp(&y.2))
                    .map(|(i, m, _)| (i, m));
                if let Some((i, m)) = worst {
                    modes[i] = m;
                }
            } else {
                for (i, m, _) in wrong {
                    modes[i] = m;
                }
            }
        };
        let k = engaged_stiffness(model, &modes, &k_full);
        let forces: Vec<f64> = (0..modes.len())
            .map(|i| k[i] * (elong[i] - a.free[i] - law(model, i, modes[i]).1))
            .collect();
        let states: Vec<PartState> = modes
            .iter()
            .map(|m| {
                if *m == Mode::Slack {
                    PartState::Slack
                } else {
                    PartState::Elastic
                }
            })
            .collect();
        let result = system.results(combo.name.clone(), &q, &a, &elong, &forces, &states, trials);
        combinations.push(verified(model, result, combo.span)?);
    }
    Ok(Solution {
        unknowns: system.map.n,
        combinations,
        warnings,
    })
}

/// The unknown that moves most in a free motion (rotations weighed by the
/// size of their body).
fn dominant(model: &Model, map: &DofMap, mode: &[f64]) -> usize {
    let mut best = (0.0, 0usize);
    for (i, v) in mode.iter().enumerate() {
        let w = match &map.unknowns[i] {
            Unknown::Rigid(r, 2) => {
                let nodes = &model.rigids[*r].nodes;
                let x0 = model.nodes[nodes[0]].x.value;
                let y0 = model.nodes[nodes[0]].y.value;
                nodes
                    .iter()
                    .map(|&n| (model.nodes[n].x.value - x0).hypot(model.nodes[n].y.value - y0))
                    .fold(0.0, f64::max)
            }
            _ => 1.0,
        };
        let a = v.abs() * w;
        if a > best.0 {
            best = (a, i);
        }
    }
    best.1
}

struct ResultInputs<'a> {
    q: &'a [f64],
    u0: &'a [f64],
    loads: &'a [f64],
    elong: &'a [f64],
    free: &'a [f64],
    /// The force in each part.
    forces: &'a [f64],
    states: &'a [PartState],
    trials: usize,
}

fn results(
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
            let f = r.loads[i * nd + d] + reaction[i * nd + d];
            sum[d] += f;
            scale = scale.max(reaction[i * nd + d].abs());
        }
        if nd == 2 {
            moment += x * (r.loads[i * 2 + 1] + reaction[i * 2 + 1])
                - y * (r.loads[i * 2] + reaction[i * 2]);
        }
    }
    residual = residual.max(sum[0].abs()).max(sum[1].abs());
    // Reactions at round-off level of the largest force read as zero.
    for v in &mut reaction {
        if v.abs() < 1e-12 * scale {
            *v = 0.0;
        }
    }
    if extent > 0.0 {
        residual = residual.max(moment.abs() / extent);
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

//! The assembled system: unknowns numbered once, each part's element, the
//! sparse pattern and factorisation, and the response to one set of actions.

#![allow(clippy::wildcard_imports)] // the solver's shared imports and helpers

use super::*;

/// Each part's contribution: elongation = `Σ g·q + c·(u0[b] − u0[a])`.
/// Flat lists, one run per part, so that a million parts are a few large
/// arrays rather than millions of small ones.
pub(super) struct Elements {
    /// The parts come first (`0..n_parts`), then the bending modes.
    pub(super) n_parts: usize,
    /// Each bending mode: its beam and how it is made of the end rotations.
    pub(super) modes: Vec<BendMode>,
    /// Direction cosines per component (parts only).
    pub(super) dir: Vec<[f64; 2]>,
    pub(super) k: Vec<f64>,
    /// Part `i`'s coefficients `g` are `g[g_at[i]..g_at[i + 1]]`.
    pub(super) g_at: Vec<usize>,
    pub(super) g: Vec<(usize, f64)>,
    /// Positions in the value array of each (i ≤ j) pair of a part's `g`,
    /// with gi·gj; part `i`'s are `pos[pos_at[i]..pos_at[i + 1]]`.
    pub(super) pos_at: Vec<usize>,
    pub(super) pos: Vec<(usize, f64)>,
}

/// One bending mode of a beam: the deformation `e = ca·φa + cb·φb`, where
/// φ is an end's rotation relative to the chord, with stiffness `k`. A
/// beam's 2×2 end-moment stiffness (EI/L)·[[4, 2], [2, 4]] is the sum of
/// the modes φa + φb (3EI/L) and φa − φb (EI/L); an end with a hinge is
/// condensed out, leaving one mode of 3EI/L on the other end.
#[derive(Clone, Debug)]
pub(crate) struct BendMode {
    pub part: usize,
    pub ca: f64,
    pub cb: f64,
    /// The deformation in node components: `e = Σ c·u[comp]`.
    pub comps: Vec<(usize, f64)>,
}

/// A beam's bending modes: `(ca, cb, k)`.
fn modes_of(hinge: [bool; 2], ei_l: f64) -> Vec<(f64, f64, f64)> {
    match hinge {
        [false, false] => vec![(1.0, 1.0, 3.0 * ei_l), (1.0, -1.0, ei_l)],
        [false, true] => vec![(1.0, 0.0, 3.0 * ei_l)],
        [true, false] => vec![(0.0, 1.0, 3.0 * ei_l)],
        [true, true] => Vec::new(),
    }
}

/// Push one element's `g` from its coefficients on node components.
fn push_g(e: &mut Elements, map: &DofMap, comps: &[(usize, f64)]) {
    let start = e.g.len();
    for &(c, coef) in comps {
        for (i, v) in map.terms[c].iter() {
            e.g.push((i, coef * v));
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
}

/// The components of φa and φb of a beam: each end's rotation less the
/// chord's, ψ = (v(B) − v(A)) / L with v the displacement across the beam.
pub(crate) fn end_rotations(model: &Model, map: &DofMap, part: usize) -> [Vec<(usize, f64)>; 2] {
    let p = &model.parts[part];
    let dir = model.direction(part);
    let nrm = [-dir[1], dir[0]];
    let l = p.length.value;
    let nd = map.ndof;
    let mut out = [Vec::new(), Vec::new()];
    for (k, phi) in out.iter_mut().enumerate() {
        if let Some(c) = map.rot[p.ends[k]] {
            phi.push((c, 1.0));
        }
        for d in 0..nd.min(2) {
            phi.push((p.ends[1] * nd + d, -nrm[d] / l));
            phi.push((p.ends[0] * nd + d, nrm[d] / l));
        }
    }
    out
}

impl Elements {
    pub(super) fn g(&self, i: usize) -> &[(usize, f64)] {
        &self.g[self.g_at[i]..self.g_at[i + 1]]
    }

    pub(super) fn pos(&self, i: usize) -> &[(usize, f64)] {
        &self.pos[self.pos_at[i]..self.pos_at[i + 1]]
    }
}

pub(super) fn elements(model: &Model, map: &DofMap) -> Elements {
    let nd = map.ndof;
    let n = model.parts.len();
    let mut e = Elements {
        n_parts: n,
        modes: Vec::new(),
        dir: Vec::with_capacity(n),
        k: Vec::with_capacity(n),
        g_at: Vec::with_capacity(n + 1),
        g: Vec::with_capacity(2 * nd * n),
        pos_at: Vec::new(),
        pos: Vec::new(),
    };
    e.g_at.push(0);
    let mut comps = Vec::with_capacity(2 * nd);
    for (pi, p) in model.parts.iter().enumerate() {
        let dir = model.direction(pi);
        comps.clear();
        for (d, c) in dir.iter().enumerate().take(nd) {
            comps.push((p.ends[1] * nd + d, *c));
            comps.push((p.ends[0] * nd + d, -c));
        }
        push_g(&mut e, map, &comps);
        e.dir.push(dir);
    }
    for (pi, p) in model.parts.iter().enumerate() {
        let (Some(b), Some(_)) = (&p.bend, p.material()) else {
            continue;
        };
        let [phi_a, phi_b] = end_rotations(model, map, pi);
        for (ca, cb, _) in modes_of(b.hinge, 0.0) {
            let mut mc: Vec<(usize, f64)> = Vec::new();
            for &(c, v) in &phi_a {
                mc.push((c, ca * v));
            }
            for &(c, v) in &phi_b {
                mc.push((c, cb * v));
            }
            mc.retain(|x| x.1 != 0.0);
            push_g(&mut e, map, &mc);
            e.modes.push(BendMode {
                part: pi,
                ca,
                cb,
                comps: mc,
            });
        }
    }
    stiffnesses(model, &mut e.k);
    e
}

/// Every element's stiffness, in the elements' order: each part's E·A/L
/// (or its spring's), then each beam's bending modes.
fn stiffnesses(model: &Model, k: &mut Vec<f64>) {
    k.clear();
    k.extend(
        model
            .parts
            .iter()
            .map(|p| p.stiffness(&model.materials).value),
    );
    for p in &model.parts {
        let (Some(b), Some(m)) = (&p.bend, p.material()) else {
            continue;
        };
        let ei_l = model.materials[m].e.value * b.inertia / p.length.value;
        k.extend(modes_of(b.hinge, ei_l).into_iter().map(|(_, _, k)| k));
    }
}

/// What a [`System`] keeps from one solve to the next of a model whose
/// numbers change but not its structure or geometry: the numbered
/// unknowns, the elements' coefficients and the factorisation pattern.
pub(crate) struct Skeleton {
    map: DofMap,
    elems: Elements,
    pattern: Pattern,
}

/// A model's numbered unknowns, elements and factorisation pattern, built
/// once and reused for every combination, trial and analysis.
pub(crate) struct System<'m> {
    pub model: &'m Model,
    pub map: DofMap,
    pub(super) elems: Elements,
    pub(super) pattern: Pattern,
}

pub(super) fn numeric(model: &Model, reason: String) -> SolveError {
    SolveError::Numeric {
        reason,
        span: model.parts.first().map(|p| p.span).unwrap_or_default(),
    }
}

impl<'m> System<'m> {
    pub fn new(model: &'m Model) -> Result<Self, SolveError> {
        let map = dofs::number(model)?;
        let mut elems = elements(model, &map);
        // every element: the parts, then the beams' bending modes
        let n = elems.k.len();
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

    /// The system of `model` on a kept skeleton: only the stiffnesses are
    /// computed again. `model` must have the structure and the node
    /// positions of the model the skeleton was built for.
    pub(crate) fn renew(model: &'m Model, kept: Skeleton) -> Self {
        let Skeleton {
            map,
            mut elems,
            pattern,
        } = kept;
        stiffnesses(model, &mut elems.k);
        Self {
            model,
            map,
            elems,
            pattern,
        }
    }

    /// What [`System::renew`] starts from.
    pub(crate) fn into_skeleton(self) -> Skeleton {
        Skeleton {
            map: self.map,
            elems: self.elems,
            pattern: self.pattern,
        }
    }

    /// Each part's elastic stiffness k = E A / L.
    pub fn stiffness(&self) -> &[f64] {
        &self.elems.k[..self.elems.n_parts]
    }

    /// The stiffness of every element: the parts' as given, the bending
    /// modes' elastic.
    /// A `k` as long as every element's gives the modes' stiffness too.
    fn all_k<'k>(&'k self, k: &'k [f64]) -> impl Iterator<Item = (usize, f64)> + 'k {
        let given = k.len();
        k.iter()
            .copied()
            .enumerate()
            .chain((given..self.elems.k.len()).map(|i| (i, self.elems.k[i])))
    }

    /// Each bending mode's elastic stiffness and the part (beam) it bends.
    pub(super) fn mode_stiffness(&self) -> impl Iterator<Item = (usize, f64)> + '_ {
        self.elems
            .modes
            .iter()
            .zip(&self.elems.k[self.elems.n_parts..])
            .map(|(m, &k)| (m.part, k))
    }

    /// Factorise with per-part stiffnesses (0 removes a part).
    pub fn factor(&self, k: &[f64], slack: &[usize]) -> Result<sparse::Factor<'_>, SolveError> {
        let mut values = vec![0.0; self.pattern.nnz()];
        for (i, kk) in self.all_k(k) {
            if kk != 0.0 {
                for &(p, c) in self.elems.pos(i) {
                    values[p] += kk * c;
                }
            }
        }
        match self.pattern.factor(&values) {
            Ok(f) => Ok(f),
            Err(Failure::Unsupported(j)) => Err(singular(self.model, &self.map, j, slack)),
            Err(Failure::Mechanism(mode)) => {
                let j = dominant(self.model, &self.map, &mode);
                Err(singular(self.model, &self.map, j, slack))
            }
            Err(Failure::Other(reason)) => Err(numeric(self.model, reason)),
        }
    }

    /// Σ c_i·g_i over the parts: per-part coefficients into the unknowns.
    pub(super) fn gather(&self, c: &[f64]) -> Vec<f64> {
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

    /// One node component's displacement from the unknowns `q` and the
    /// prescribed movements `u0`.
    pub(super) fn displacement(&self, q: &[f64], u0: &[f64], component: usize) -> f64 {
        u0[component]
            + self.map.terms[component]
                .iter()
                .map(|(i, v)| v * q[i])
                .sum::<f64>()
    }

    /// g_i·v for every part.
    pub(super) fn project(&self, v: &[f64]) -> Vec<f64> {
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
        let (mut q, mut elong, mut r) = (Vec::new(), Vec::new(), Vec::new());
        self.respond_into(factor, k, target, forces, a, [&mut q, &mut elong, &mut r]);
        (q, elong)
    }

    /// [`System::respond`] into `[q, elong, scratch]`, whose lists are
    /// reused (a sweep's steps).
    pub(super) fn respond_into(
        &self,
        factor: &sparse::Factor<'_>,
        k: &[f64],
        target: &[f64],
        forces: &[f64],
        a: &Actions,
        [q, elong, r]: [&mut Vec<f64>; 3],
    ) {
        q.clone_from(&a.f_loads);
        let rhs = q;
        let n = self.elems.n_parts;
        for (i, kk) in self.all_k(k) {
            // a bending mode aims at no deformation and carries no set force
            let (aim, set) = if i < n {
                (target[i], forces[i])
            } else {
                (0.0, 0.0)
            };
            let t = kk * (aim - a.e0[i]) - set;
            if t != 0.0 {
                for &(j, g) in self.elems.g(i) {
                    rhs[j] += t * g;
                }
            }
        }
        r.clone_from(rhs);
        factor.solve(rhs);
        let q = rhs;
        // One step of iterative refinement: the residual f − K·q, solved
        // again with the same factor. A long chain of parts is ill-conditioned
        // (condition number ~ n²); refinement brings its equilibrium residual
        // from ~1e-7 to round-off of the largest force at 25,000 parts.
        for (i, kk) in self.all_k(k) {
            let g = self.elems.g(i);
            let s = kk * g.iter().map(|&(j, gj)| gj * q[j]).sum::<f64>();
            if s != 0.0 {
                for &(j, gj) in g {
                    r[j] -= s * gj;
                }
            }
        }
        factor.solve(r);
        for (qj, dj) in q.iter_mut().zip(r.iter()) {
            *qj += dj;
        }
        elong.clear();
        elong.extend(
            a.e0.iter().take(n).enumerate().map(|(i, base)| {
                base + self.elems.g(i).iter().map(|&(j, g)| g * q[j]).sum::<f64>()
            }),
        );
    }

    /// Results of a solved state, the bending modes' moments by `modes`.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn results(
        &self,
        name: String,
        q: &[f64],
        a: &Actions,
        elong: &[f64],
        forces: &[f64],
        states: &[PartState],
        trials: usize,
        modes: ModeLaw<'_>,
    ) -> CombinationResult {
        gather_results(
            self.model,
            &self.map,
            &self.elems,
            name,
            &ResultInputs {
                q,
                u0: &a.u0,
                loads: &a.loads,
                e0: &a.e0,
                along: &a.along,
                elong,
                free: &a.free,
                forces,
                states,
                trials,
                modes,
            },
        )
    }
}

//! The actions of factored cases on the unknowns: loads, support
//! movements, and each part's free elongation (misfit, temperature,
//! free strain).

#![allow(clippy::wildcard_imports)] // the solver's shared imports and helpers

use super::*;

/// What a set of factored cases does to the assembly.
#[derive(Default)]
pub(crate) struct Actions {
    /// Prescribed node displacements (support movements), per component.
    pub u0: Vec<f64>,
    /// Nodal loads, per component (moments at rotation components), a
    /// beam's load along it included as the loads it puts on its ends.
    pub loads: Vec<f64>,
    /// Each part's load along it, per unit length, in its own axes
    /// `[along, across]` (beams only; zero for the others).
    pub along: Vec<[f64; 2]>,
    /// Free elongation of each part.
    pub free: Vec<f64>,
    /// Elongation of each part from the prescribed movements alone.
    pub e0: Vec<f64>,
    /// Loads in the free unknowns.
    pub f_loads: Vec<f64>,
}

/// One source of a part's free elongation δ₀, with its numbers, so that the
/// report shows exactly what the solver added.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum FreeSource {
    /// The part's `misfit`.
    Misfit(f64),
    /// factor · α · ΔT · L of a case's temperature change.
    Thermal {
        factor: f64,
        alpha: f64,
        change: f64,
        length: f64,
    },
    /// factor · ε · L of a case's free strain.
    Strain {
        factor: f64,
        strain: f64,
        length: f64,
    },
}

impl FreeSource {
    /// Its contribution to δ₀ (m).
    pub fn value(&self) -> f64 {
        match *self {
            FreeSource::Misfit(m) => m,
            FreeSource::Thermal {
                factor,
                alpha,
                change,
                length,
            } => factor * alpha * change * length,
            FreeSource::Strain {
                factor,
                strain,
                length,
            } => factor * strain * length,
        }
    }
}

/// Every source of free elongation of the factored cases `terms`, as
/// (part, source), by part; each part's in the order they add up: its
/// misfit, then each case's temperature and free strain.
pub fn free_sources(model: &Model, terms: &[(usize, f64)]) -> Vec<(usize, FreeSource)> {
    let mut out = Vec::new();
    each_free_source(model, terms, |i, s| out.push((i, s)));
    // stable: each part's sources keep the order they add up in
    out.sort_by_key(|(i, _)| *i);
    out
}

/// [`free_sources`] handed to `f` one by one, not by part: each part's
/// still come in the order they add up, so sums per part are the same.
fn each_free_source(model: &Model, terms: &[(usize, f64)], mut f: impl FnMut(usize, FreeSource)) {
    for (i, p) in model.parts.iter().enumerate() {
        if p.misfit.value != 0.0 {
            f(i, FreeSource::Misfit(p.misfit.value));
        }
    }
    for &(ci, factor) in terms {
        let case = &model.cases[ci];
        if !case.temperatures.is_empty() {
            let on_part = case.temperature_by_part(model.parts.len());
            for ((i, p), t) in model.parts.iter().enumerate().zip(on_part) {
                let (Some(t), Some(m)) = (t, p.material()) else {
                    continue;
                };
                if let Some(alpha) = model.materials[m].alpha {
                    f(
                        i,
                        FreeSource::Thermal {
                            factor,
                            alpha: alpha.value,
                            change: t.change.value,
                            length: p.length.value,
                        },
                    );
                }
            }
        }
        for s in &case.strains {
            f(
                s.part,
                FreeSource::Strain {
                    factor,
                    strain: s.strain.value,
                    length: model.parts[s.part].length.value,
                },
            );
        }
    }
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

impl System<'_> {
    /// The actions of factored cases.
    pub fn actions(
        &self,
        name: &str,
        terms: &[(usize, f64)],
        take: Take,
    ) -> Result<Actions, SolveError> {
        let mut a = Actions::default();
        self.actions_into(&mut a, name, terms, take)?;
        Ok(a)
    }

    /// [`System::actions`] written into `a`, whose lists are reused (a
    /// sweep's steps solve the same combinations again and again).
    pub fn actions_into(
        &self,
        a: &mut Actions,
        name: &str,
        terms: &[(usize, f64)],
        take: Take,
    ) -> Result<(), SolveError> {
        let model = self.model;
        let map = &self.map;
        let nd = map.ndof;
        let zeroed = |v: &mut Vec<f64>, n: usize| {
            v.clear();
            v.resize(n, 0.0);
        };
        let Actions {
            u0,
            loads,
            along,
            free,
            e0,
            f_loads,
        } = a;
        zeroed(u0, map.ncomp);
        zeroed(loads, map.ncomp);
        along.clear();
        along.resize(model.parts.len(), [0.0; 2]);
        zeroed(free, model.parts.len());
        each_free_source(model, terms, |i, source| {
            let wanted = match source {
                FreeSource::Misfit(_) => take.misfit,
                FreeSource::Thermal { .. } | FreeSource::Strain { .. } => take.strains,
            };
            if wanted {
                free[i] += source.value();
            }
        });
        let mut moved: crate::FixedMap<(usize, usize), f64> = crate::FixedMap::default();
        for &(ci, factor) in terms {
            let case = &model.cases[ci];
            if take.strains {
                for s in &case.settlements {
                    *moved.entry((s.node, s.direction)).or_default() += factor * s.movement.value;
                }
            }
            if take.strains {
                for t in &case.twists {
                    if map.rigid_of[t.node].is_some() {
                        // the rotation of a rigid body (direction 2)
                        *moved.entry((t.node, 2)).or_default() += factor * t.angle;
                    } else if let Some(c) = map.rot[t.node] {
                        u0[c] += factor * t.angle;
                    }
                }
            }
            if take.loads {
                for l in &case.loads {
                    for d in 0..nd {
                        loads[l.node * nd + d] += factor * l.force[d].value;
                    }
                }
                for m in &case.moments {
                    let Some(c) = map.rot[m.node] else {
                        return Err(SolveError::Mechanism {
                            what: format!("node `{}`", model.nodes[m.node].name),
                            moves: "rotate",
                            when: String::new(),
                            span: m.span,
                            help: Some(format!(
                                "a moment needs a beam rigidly joined at node `{}` to carry it",
                                model.nodes[m.node].name
                            )),
                        });
                    };
                    loads[c] += factor * m.moment;
                }
                for w in &case.distributed {
                    let dir = model.direction(w.part);
                    along[w.part][0] += factor * (w.w[0] * dir[0] + w.w[1] * dir[1]);
                    along[w.part][1] += factor * (-w.w[0] * dir[1] + w.w[1] * dir[0]);
                }
            }
        }
        for (&(node, d), &v) in &moved {
            if map.node_body[node].is_none() && d < nd {
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
                if let (Some(_), Some(c)) = (map.rigid_of[m], map.rot[m]) {
                    u0[c] = q[2];
                }
            }
        }
        // a beam's load along it, as the loads it puts on its end nodes
        for (i, w) in along.iter().enumerate() {
            if *w == [0.0, 0.0] {
                continue;
            }
            let p = &model.parts[i];
            let dir = model.direction(i);
            let nrm = [-dir[1], dir[0]];
            let hinge = p.bend.as_ref().map_or([true, true], |b| b.hinge);
            let l = p.length.value;
            let [fa, fb, ma, mb] = equivalent_loads(w[1], l, hinge);
            for d in 0..nd {
                loads[p.ends[0] * nd + d] += w[0] * l / 2.0 * dir[d] + fa * nrm[d];
                loads[p.ends[1] * nd + d] += w[0] * l / 2.0 * dir[d] + fb * nrm[d];
            }
            for (k, m) in [(0, ma), (1, mb)] {
                if let Some(c) = map.rot[p.ends[k]] {
                    loads[c] += m;
                }
            }
        }
        e0.clear();
        e0.extend(model.parts.iter().zip(&self.elems.dir).map(|(p, dir)| {
            (0..nd)
                .map(|d| dir[d] * (u0[p.ends[1] * nd + d] - u0[p.ends[0] * nd + d]))
                .sum::<f64>()
        }));
        e0.extend(
            self.elems
                .modes
                .iter()
                .map(|m| m.comps.iter().map(|&(c, v)| v * u0[c]).sum::<f64>()),
        );
        zeroed(f_loads, map.n);
        for (c, &f) in loads.iter().enumerate() {
            if f != 0.0 {
                for (i, v) in map.terms[c].iter() {
                    f_loads[i] += v * f;
                }
            }
        }
        Ok(())
    }
}

/// The loads a uniform load `wt` across a beam of length `l` puts on its
/// end nodes, `[Fa, Fb, Ma, Mb]` (forces across the beam, moments
/// counter-clockwise): the reverse of its fixed-end forces, a hinged end
/// carrying no moment (beam tables: fixed at both ends wL/2 and wL²/12;
/// fixed and hinged 5wL/8, 3wL/8 and wL²/8).
pub(crate) fn equivalent_loads(wt: f64, l: f64, hinge: [bool; 2]) -> [f64; 4] {
    match hinge {
        [false, false] => [
            wt * l / 2.0,
            wt * l / 2.0,
            wt * l * l / 12.0,
            -wt * l * l / 12.0,
        ],
        [false, true] => [
            5.0 * wt * l / 8.0,
            3.0 * wt * l / 8.0,
            wt * l * l / 8.0,
            0.0,
        ],
        [true, false] => [
            3.0 * wt * l / 8.0,
            5.0 * wt * l / 8.0,
            0.0,
            -wt * l * l / 8.0,
        ],
        [true, true] => [wt * l / 2.0, wt * l / 2.0, 0.0, 0.0],
    }
}

//! The actions of factored cases on the unknowns: loads, support
//! movements, and each part's free elongation (misfit, temperature,
//! free strain).

#![allow(clippy::wildcard_imports)] // the solver's shared imports and helpers

use super::*;

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

impl System<'_> {
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
}

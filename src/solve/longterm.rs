//! Sustained loads and creep by the effective modulus method (EN 1992-1-1
//! 7.4.3): the sustained part of a combination acts on members with
//! E_eff = E / (1 + φ), the transient part on E, and the long-term state is
//! their sum.

use super::{Actions, CombinationResult, PartState, SolveError, System, Take};
use crate::model::Model;

/// The long-term state of one combination.
#[derive(Clone, Debug, PartialEq)]
pub struct LongTerm {
    pub combination: usize,
    pub result: Option<CombinationResult>,
    /// How the result splits into the sustained and the other actions,
    /// for the report's equations.
    pub split: Option<Split>,
    pub note: Option<String>,
}

/// Per part: the two stiffnesses and the elongations of the two solves.
#[derive(Clone, Debug, PartialEq)]
pub struct Split {
    /// k / (1 + φ), the stiffness the sustained actions meet.
    pub k_eff: Vec<f64>,
    /// k, the stiffness the other actions meet.
    pub k: Vec<f64>,
    /// Elongation and free elongation under the sustained actions.
    pub sustained: (Vec<f64>, Vec<f64>),
    /// Elongation and free elongation under the other actions.
    pub transient: (Vec<f64>, Vec<f64>),
}

fn add(a: &Actions, b: &Actions) -> Actions {
    let sum = |x: &[f64], y: &[f64]| x.iter().zip(y).map(|(p, q)| p + q).collect::<Vec<_>>();
    Actions {
        u0: sum(&a.u0, &b.u0),
        loads: sum(&a.loads, &b.loads),
        along: a
            .along
            .iter()
            .zip(&b.along)
            .map(|(p, q)| [p[0] + q[0], p[1] + q[1]])
            .collect(),
        free: sum(&a.free, &b.free),
        e0: sum(&a.e0, &b.e0),
        f_loads: sum(&a.f_loads, &b.f_loads),
    }
}

/// Long-term states, when a material gives `creep` and a case is sustained.
///
/// # Errors
/// A solver error (a mechanism cannot arise that the short-term solve did
/// not already report, but the factorisation is checked again).
pub fn long_term(model: &Model) -> Result<Vec<LongTerm>, SolveError> {
    let creeps = model
        .materials
        .iter()
        .any(|m| m.creep.is_some_and(|c| c > 0.0));
    let sustained = model.cases.iter().any(|c| c.sustained);
    if !creeps || !sustained {
        return Ok(Vec::new());
    }
    // creep of bending stiffness is not modelled yet: the state is not
    // computed rather than computed with elastic bending
    let nonlinear = model.has_nonlinear_parts() || model.parts.iter().any(|p| p.bend.is_some());
    let system = System::new(model)?;
    let n = model.parts.len();
    let k_full = system.stiffness();
    let k_eff: Vec<f64> = model
        .parts
        .iter()
        .zip(&k_full)
        .map(|(p, k)| {
            let phi = p
                .material()
                .and_then(|m| model.materials[m].creep)
                .unwrap_or(0.0);
            k / (1.0 + phi)
        })
        .collect();
    let f_eff = system.factor(&k_eff, &[])?;
    let f_full = system.factor(&k_full, &[])?;
    let zero = vec![0.0; n];
    let mut out = Vec::new();
    for (ci, combo) in model.combinations.iter().enumerate() {
        if nonlinear {
            out.push(LongTerm {
                combination: ci,
                result: None,
                split: None,
                note: Some(if model.parts.iter().any(|p| p.bend.is_some()) {
                    "not computed: the long-term state of assemblies with beams is not yet modelled".into()
                } else {
                    "not computed: the long-term state adds two linear solves, which one-sense or gapped parts do not allow".into()
                }),
            });
            continue;
        }
        let sus: Vec<(usize, f64)> = combo
            .terms
            .iter()
            .copied()
            .filter(|(c, _)| model.cases[*c].sustained)
            .collect();
        let tra: Vec<(usize, f64)> = combo
            .terms
            .iter()
            .copied()
            .filter(|(c, _)| !model.cases[*c].sustained)
            .collect();
        let a_s = system.actions(&combo.name, &sus, Take::ALL)?;
        let a_t = system.actions(
            &combo.name,
            &tra,
            Take {
                loads: true,
                strains: true,
                misfit: false,
            },
        )?;
        let (qs, es) = system.respond(&f_eff, &k_eff, &a_s.free, &zero, &a_s);
        let (qt, et) = system.respond(&f_full, &k_full, &a_t.free, &zero, &a_t);
        let q: Vec<f64> = qs.iter().zip(&qt).map(|(a, b)| a + b).collect();
        let elong: Vec<f64> = es.iter().zip(&et).map(|(a, b)| a + b).collect();
        let forces: Vec<f64> = (0..n)
            .map(|i| k_eff[i] * (es[i] - a_s.free[i]) + k_full[i] * (et[i] - a_t.free[i]))
            .collect();
        let total = add(&a_s, &a_t);
        let states = vec![PartState::Elastic; n];
        let result = system.results(combo.name.clone(), &q, &total, &elong, &forces, &states, 1);
        let result = super::verified(model, result, combo.span)?;
        out.push(LongTerm {
            combination: ci,
            result: Some(result),
            split: Some(Split {
                k_eff: k_eff.clone(),
                k: k_full.clone(),
                sustained: (es, a_s.free),
                transient: (et, a_t.free),
            }),
            note: None,
        });
    }
    Ok(out)
}

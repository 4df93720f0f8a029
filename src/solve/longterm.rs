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
    /// Each beam's bending under the sustained actions (at E·I / (1 + φ))
    /// and under the others (at E·I), in the order of the result's beams.
    pub beams: Vec<(super::BeamResult, super::BeamResult)>,
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
    let nonlinear = model.has_nonlinear_parts();
    let system = System::new(model)?;
    let n = model.parts.len();
    let k_full = system.stiffness();
    let creep = |part: usize| {
        1.0 + model.parts[part]
            .material()
            .and_then(|m| model.materials[m].creep)
            .unwrap_or(0.0)
    };
    let k_eff: Vec<f64> = (0..n).map(|i| k_full[i] / creep(i)).collect();
    // a beam's bending creeps as its stretching does: E·I / (1 + φ)
    let (mode_k, mode_k_eff): (Vec<f64>, Vec<f64>) = system
        .mode_stiffness()
        .map(|(part, k)| (k, k / creep(part)))
        .unzip();
    let every =
        |parts: &[f64], modes: &[f64]| -> Vec<f64> { parts.iter().chain(modes).copied().collect() };
    let (all_eff, all_full) = (every(&k_eff, &mode_k_eff), every(k_full, &mode_k));
    let f_eff = system.factor(&all_eff, &[])?;
    let f_full = system.factor(&all_full, &[])?;
    let zero = vec![0.0; n];
    let mut out = Vec::new();
    for (ci, combo) in model.combinations.iter().enumerate() {
        if nonlinear {
            out.push(LongTerm {
                combination: ci,
                result: None,
                split: None,
                note: Some("not computed: the long-term state adds two linear solves, which one-sense or gapped parts do not allow".into()),
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
        let (qs, es) = system.respond(&f_eff, &all_eff, &a_s.free, &zero, &a_s);
        let (qt, et) = system.respond(&f_full, &all_full, &a_t.free, &zero, &a_t);
        let q: Vec<f64> = qs.iter().zip(&qt).map(|(a, b)| a + b).collect();
        let elong: Vec<f64> = es.iter().zip(&et).map(|(a, b)| a + b).collect();
        let (fs, ft): (Vec<f64>, Vec<f64>) = (0..n)
            .map(|i| {
                (
                    k_eff[i] * (es[i] - a_s.free[i]),
                    k_full[i] * (et[i] - a_t.free[i]),
                )
            })
            .unzip();
        let forces: Vec<f64> = fs.iter().zip(&ft).map(|(a, b)| a + b).collect();
        let total = add(&a_s, &a_t);
        let states = vec![PartState::Elastic; n];
        let name = || combo.name.clone();
        let mut beams = Vec::new();
        let mut result = if mode_k.is_empty() {
            system.results(
                name(),
                &q,
                &total,
                &elong,
                &forces,
                &states,
                1,
                super::ModeLaw::Elastic,
            )
        } else {
            // the modes' moments, sustained at the reduced E·I and the
            // rest at E·I; each state's deflection at its own E·I
            let (ps, pt) = (system.project(&qs), system.project(&qt));
            let moments: Vec<f64> = (0..mode_k.len())
                .map(|j| {
                    let i = n + j;
                    mode_k_eff[j] * (a_s.e0[i] + ps[i]) + mode_k[j] * (a_t.e0[i] + pt[i])
                })
                .collect();
            let law = super::ModeLaw::Stiffness;
            let rs = system.results(name(), &qs, &a_s, &es, &fs, &states, 1, law(&mode_k_eff));
            let rt = system.results(name(), &qt, &a_t, &et, &ft, &states, 1, law(&mode_k));
            let mut r = system.results(
                name(),
                &q,
                &total,
                &elong,
                &forces,
                &states,
                1,
                super::ModeLaw::Moments(&moments),
            );
            for ((b, s), t) in r.beams.iter_mut().zip(&rs.beams).zip(&rt.beams) {
                *b = b.clone().with_deflection_of(s, t);
            }
            beams = rs.beams.into_iter().zip(rt.beams).collect();
            r
        };
        result = super::verified(model, result, combo.span)?;
        out.push(LongTerm {
            combination: ci,
            result: Some(result),
            split: Some(Split {
                k_eff: k_eff.clone(),
                k: k_full.to_vec(),
                sustained: (es, a_s.free),
                transient: (et, a_t.free),
                beams,
            }),
            note: None,
        });
    }
    Ok(out)
}

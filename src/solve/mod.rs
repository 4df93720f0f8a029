//! Direct stiffness solution of a [`Model`] in every load combination.
//!
//! Node displacements are expressed in the free unknowns (supports, ties and
//! rigid bodies eliminated exactly, see `dofs`); each part adds k·g·gᵀ to a
//! sparse matrix whose pattern and symbolic factorisation are built once per
//! model. Parts that carry one sense only or have a gap are solved by an
//! active-set iteration that refactorises only when the set of engaged parts
//! changes. Results are checked afterwards against equilibrium computed
//! from the part forces, loads and reactions alone.

mod actions;
mod active_set;
pub mod buckling;
pub mod capacity;
mod dofs;
mod error;
pub mod longterm;
mod mechanism;
mod results;
mod sparse;
mod system;

pub use active_set::MAX_TRIALS;
pub use error::SolveError;
pub use results::{
    verified, BeamResult, CombinationResult, NodeResult, PartResult, PartState, Solution,
    EQUILIBRIUM_TOLERANCE,
};

pub(crate) use actions::{equivalent_loads, Actions, Take};
pub use actions::{free_sources, FreeSource};
pub(crate) use system::System;

// What the parts of the solver share (they see it through `use super::*`).
use active_set::{
    engaged_stiffness, initial_modes, law, newton_modes, state_hash, wrong_parts, Mode,
};
use mechanism::{dominant, singular};
use results::{gather_results, ModeLaw, ResultInputs};
use system::{numeric, Elements};

use std::hash::Hash;

use uom::si::f64::{Force, Length, Pressure};
use uom::si::force::newton;
use uom::si::length::meter;
use uom::si::pressure::pascal;

use crate::model::{Carries, Kind, Model};
use crate::source::Span;
use dofs::{DofMap, Unknown};
use sparse::{Failure, Pattern};

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
    solve_any(model, max_trials)
}

fn solve_any(model: &Model, max_trials: usize) -> Result<Solution, SolveError> {
    solve_on(&System::new(model)?, max_trials, &mut Work::default())
}

/// The lists a solve works in, reused from one combination to the next
/// and, kept by a [`Resolver`], from one solve to the next.
#[derive(Default)]
struct Work {
    actions: Actions,
    initial: Vec<Mode>,
    modes: Vec<Mode>,
    /// The states tried (a few: a linear model tries one).
    seen: Vec<u64>,
    zero: Vec<f64>,
    k: Vec<f64>,
    target: Vec<f64>,
    forces: Vec<f64>,
    states: Vec<PartState>,
    /// The unknowns, the elongations and the refinement's residual.
    q: Vec<f64>,
    elong: Vec<f64>,
    residual: Vec<f64>,
}

/// Solves of a model whose numbers change from one solve to the next but
/// not its structure or its nodes' positions (a sweep's or a sample's
/// steps): the numbered unknowns, the elements and the factorisation
/// pattern are kept, and each solve computes only the stiffnesses and the
/// numeric factorisation again.
#[derive(Default)]
pub struct Resolver {
    kept: Option<system::Skeleton>,
    work: Work,
}

impl Resolver {
    /// [`solve`] `model`, which must differ from the one of the last call
    /// only in numbers other than node positions.
    ///
    /// # Errors
    /// As [`solve`].
    pub fn solve(&mut self, model: &Model) -> Result<Solution, SolveError> {
        let system = match self.kept.take() {
            Some(s) => System::renew(model, s),
            None => System::new(model)?,
        };
        let solved = solve_on(&system, MAX_TRIALS, &mut self.work);
        self.kept = Some(system.into_skeleton());
        solved
    }
}

fn solve_on(
    system: &System<'_>,
    max_trials: usize,
    work: &mut Work,
) -> Result<Solution, SolveError> {
    let model = system.model;
    let Work {
        actions: a,
        initial,
        modes,
        seen,
        zero,
        k,
        target,
        forces,
        states,
        q,
        elong,
        residual,
    } = work;
    let k_full = system.stiffness();
    let mut warnings = Vec::new();
    let (kmin, kmax) = k_full.iter().fold((f64::INFINITY, 0.0f64), |(lo, hi), &k| {
        (lo.min(k), hi.max(k))
    });
    if kmax > 1e12 * kmin {
        warnings.push(crate::warning::Warning::StiffnessSpread { ratio: kmax / kmin });
    }
    initial_modes(model, initial);
    let nonlinear: Vec<usize> = (0..model.parts.len())
        .filter(|&i| initial[i] != Mode::Linear)
        .collect();
    zero.clear();
    zero.resize(model.parts.len(), 0.0);

    let mut cache: Option<(u64, sparse::Factor<'_>)> = None;
    let mut combinations = Vec::new();
    for combo in &model.combinations {
        system.actions_into(a, &combo.name, &combo.terms, Take::ALL)?;
        modes.clone_from(initial);
        seen.clear();
        let mut trials = 0;
        // Flip every part whose state is wrong at once; if that comes back
        // to a state seen before, flip one part at a time, the most wrong
        // first; if that cycles too, or a trial state cannot stand, find the
        // set by damped Newton on the energy.
        let mut single = false;
        let mut newton_tried = false;
        let mut previous: Option<Vec<Mode>> = None;
        loop {
            trials += 1;
            let key = state_hash(modes);
            let new = !seen.contains(&key);
            if new {
                seen.push(key);
            }
            if !new {
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
                    *modes = newton_modes(system, a, k_full, initial, max_trials)?;
                    seen.clear();
                    continue;
                }
                single = true;
                seen.clear();
                seen.push(key);
            }
            if trials > max_trials {
                return Err(SolveError::TooManyTrials {
                    combination: combo.name.clone(),
                    limit: max_trials,
                    span: combo.span,
                });
            }
            engaged_stiffness(model, modes, k_full, k);
            if cache.as_ref().is_none_or(|(c, _)| *c != key) {
                let slack_parts: Vec<usize> = nonlinear
                    .iter()
                    .copied()
                    .filter(|&i| modes[i] == Mode::Slack)
                    .collect();
                match system.factor(k, &slack_parts) {
                    Ok(f) => cache = Some((key, f)),
                    Err(SolveError::Mechanism { .. }) if !newton_tried && previous.is_some() => {
                        // A trial state that cannot stand: let Newton find the set.
                        newton_tried = true;
                        single = true;
                        *modes = newton_modes(system, a, k_full, initial, max_trials)?;
                        seen.clear();
                        continue;
                    }
                    Err(e) => return Err(e),
                }
            }
            target.clear();
            target.extend((0..modes.len()).map(|i| a.free[i] + law(model, i, modes[i]).1));
            let Some((_, f)) = &cache else {
                return Err(numeric(model, "no factorisation".into()));
            };
            system.respond_into(f, k, target, zero, a, [q, elong, residual]);
            let wrong = wrong_parts(model, &nonlinear, modes, elong, &a.free);
            if wrong.is_empty() {
                break;
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
        }
        forces.clear();
        forces.extend(
            (0..modes.len()).map(|i| k[i] * (elong[i] - a.free[i] - law(model, i, modes[i]).1)),
        );
        states.clear();
        states.extend(modes.iter().map(|m| {
            if *m == Mode::Slack {
                PartState::Slack
            } else {
                PartState::Elastic
            }
        }));
        let result = system.results(
            combo.name.clone(),
            q,
            a,
            elong,
            forces,
            states,
            trials,
            ModeLaw::Elastic,
        );
        combinations.push(verified(model, result, combo.span)?);
    }
    Ok(Solution {
        unknowns: system.map.n,
        combinations,
        warnings,
    })
}

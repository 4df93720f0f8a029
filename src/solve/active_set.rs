//! The active set: which parts carry, have let go or have yielded, found
//! by repeated solves until no part changes its mode.

#![allow(clippy::wildcard_imports)] // the solver's shared imports and helpers

use super::*;

/// Most active-set trials per combination before giving up.
pub const MAX_TRIALS: usize = 200;

/// How a nonlinear part is currently treated.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub(super) enum Mode {
    /// Engaged with no offset (linear parts).
    Linear,
    /// Engaged in tension past its gap.
    Tension,
    /// Engaged in compression past its gap.
    Compression,
    Slack,
}

pub(super) fn state_hash(modes: &[Mode]) -> u64 {
    // a fixed seed: the same state hashes alike in every solve
    std::hash::BuildHasher::hash_one(&foldhash::fast::FixedState::default(), modes)
}

/// The force law of a part in a mode: (stiffness on, offset of the target).
pub(super) fn law(model: &Model, i: usize, m: Mode) -> (bool, f64) {
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
pub(super) fn law_force(model: &Model, i: usize, k: f64, delta: f64) -> (f64, Mode) {
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
pub(super) fn newton_modes(
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

/// Each part's stiffness in its mode (zero when slack), written into `k`.
pub(super) fn engaged_stiffness(model: &Model, modes: &[Mode], k_full: &[f64], k: &mut Vec<f64>) {
    k.clear();
    k.extend((0..modes.len()).map(|i| {
        if law(model, i, modes[i]).0 {
            k_full[i]
        } else {
            0.0
        }
    }));
}

/// Each part's mode before the first trial: as its law says when it carries
/// both senses and has no gap; in the sense it carries, or slack, otherwise
/// (written into `modes`).
pub(super) fn initial_modes(model: &Model, modes: &mut Vec<Mode>) {
    modes.clear();
    modes.extend(
        model
            .parts
            .iter()
            .map(|p| match (p.carries, p.slack.value > 0.0) {
                (Carries::Both, false) => Mode::Linear,
                (Carries::Tension, _) => Mode::Tension,
                (Carries::Compression, _) => Mode::Compression,
                (Carries::Both, true) => Mode::Slack,
            }),
    );
}

/// Each one-sense or gapped part whose mode is wrong for its elongation,
/// with the mode it wants and how far its elongation is from its own mode.
/// A part at the edge of its mode by round-off keeps it.
pub(super) fn wrong_parts(
    model: &Model,
    nonlinear: &[usize],
    modes: &[Mode],
    elong: &[f64],
    free: &[f64],
) -> Vec<(usize, Mode, f64)> {
    let mut wrong = Vec::new();
    for &i in nonlinear {
        let p = &model.parts[i];
        let delta = elong[i] - free[i];
        let s = p.slack.value;
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
    wrong
}

//! What the result depends on: for every `let` that reaches the solve or a
//! check, the elasticity of the governing utilization and of each check's,
//! (dU/U)/(dx/x) at the design point, or dU/dx where the `let` is zero.
//!
//! Elasticities are central differences in ln x: U at x·e^h and x·e^−h,
//! (ln U₊ − ln U₋)/(2h). That is exact when U is a power of x (U ∝ P/A
//! gives +1 for P and −1 for A for any h); when the differences of steps h
//! and 10h agree to round-off the value is said to be exact, else it is
//! given as a central difference with its step (error of order h²). Each evaluation rebuilds and
//! re-solves the model with the one `let` fixed at its moved value.

use super::study::{Evaluator, Utilizations};
use crate::syntax::ast;
use crate::units::Quantity;

/// The step in ln x (a relative step of about 1e-4).
pub const STEP: f64 = 1e-4;

/// Beyond this many solved parts over all evaluations (parts × inputs × 4)
/// the sensitivity is not computed; the output says so.
pub const MAX_WORK: usize = 400_000;

/// The second step, a multiple of the first: two steps this far apart
/// agree only where the response is a power of the input (their error
/// terms differ by (WIDE² − 1)·h²).
const WIDE: f64 = 10.0;

/// Agreement of the two steps at round-off: the response is a power of the
/// input (or linear in it). Round-off in ln U over 2h is about 1e-12.
const AGREE: f64 = 1e-10;

/// An influence below this is round-off and reads as 0.
const ROUND_OFF: f64 = 1e-9;

/// How an influence was computed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Method {
    /// Central differences in ln x of steps h and 10h agree to round-off:
    /// U is a power of x over the range, so the elasticity is exact.
    Exact { step: f64 },
    /// A central difference in ln x of step h (error of order h²).
    Central { step: f64 },
    /// The input is zero: dU/dx per SI unit by a central difference of
    /// `step` (SI), `exact` when steps δ and 10δ agree (U linear in x).
    Absolute { step: f64, exact: bool },
}

impl Method {
    /// In words, for the report and JSON.
    #[must_use]
    pub fn words(self) -> String {
        match self {
            Method::Exact { step } => format!(
                "exact: central differences in ln x of steps {step:e} and {:e} agree to round-off (U is a power of x)",
                WIDE * step
            ),
            Method::Central { step } => format!("central difference in ln x, step {step:e}"),
            Method::Absolute { step, exact: true } => format!(
                "dU/dx, exact: central differences of steps {step:e} and {:e} (SI) agree to round-off (U is linear in x)",
                WIDE * step
            ),
            Method::Absolute { step, exact: false } => {
                format!("dU/dx, central difference of step {step:e} (SI)")
            }
        }
    }

    /// `exact`, `central` or `absolute` (JSON).
    #[must_use]
    pub fn key(self) -> &'static str {
        match self {
            Method::Exact { .. } => "exact",
            Method::Central { .. } => "central_difference",
            Method::Absolute { .. } => "absolute_derivative",
        }
    }
}

/// One input's influence.
#[derive(Clone, Debug, PartialEq)]
pub struct Input {
    pub name: String,
    pub value: Quantity,
    /// `None` when it could not be evaluated (see `failed`).
    pub method: Option<Method>,
    /// On the governing utilization (`None`: no checks, or undefined there).
    pub governing: Option<f64>,
    /// On each check's utilization, in the order of [`Sensitivity::labels`].
    pub checks: Vec<Option<f64>>,
    /// Why it could not be evaluated (a moved value that cannot stand).
    pub failed: Option<String>,
}

/// Every input's influence, most influential first.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Sensitivity {
    /// The checks, in the order of each input's `checks`.
    pub labels: Vec<String>,
    pub inputs: Vec<Input>,
    /// Why it was not computed, when it was not.
    pub note: Option<String>,
}

/// The governing utilization and each check's at the file's values, with
/// the `let` named `name` (if any) at each of `values` in turn.
fn at(file: &ast::File, name: Option<&str>, values: &[f64]) -> Result<Vec<Utilizations>, String> {
    let first = |e: &[crate::Error]| e.first().map_or_else(String::new, ToString::to_string);
    let names: Vec<&str> = name.into_iter().collect();
    let mut ev = Evaluator::new(file, &names, &[]).map_err(|e| match e {
        Ok(es) => first(&es),
        Err(msg) => msg,
    })?;
    let dim = name
        .and_then(|n| ev.model().lets.iter().find(|l| l.name == n))
        .map(|l| l.value.dim);
    let mut out = Vec::with_capacity(values.len().max(1));
    if let Some(dim) = dim {
        for &v in values {
            let e = ev
                .at(&[Quantity::new(v, dim)])
                .map_err(|e| format!("at {} = {v:e} (SI): {}", names[0], first(&e)))?;
            out.push(e.utilizations);
        }
    } else {
        out.push(ev.at(&[]).map_err(|e| first(&e))?.utilizations);
    }
    Ok(out)
}

/// (ln U₊ − ln U₋)/(2h), or where U is not positive on both sides the
/// plain difference over U₀; `None` where U is undefined or zero.
fn elasticity(plus: Option<f64>, minus: Option<f64>, at: Option<f64>, h: f64) -> Option<f64> {
    let (p, m, u) = (plus?, minus?, at?);
    if !(p.is_finite() && m.is_finite() && u.is_finite()) {
        return None;
    }
    if p > 0.0 && m > 0.0 {
        Some((p.ln() - m.ln()) / (2.0 * h))
    } else if u != 0.0 {
        Some((p - m) / (2.0 * h * u))
    } else {
        None
    }
}

/// dU/dx by a central difference of `d`.
fn slope(plus: Option<f64>, minus: Option<f64>, d: f64) -> Option<f64> {
    let (p, m) = (plus?, minus?);
    (p.is_finite() && m.is_finite()).then(|| (p - m) / (2.0 * d))
}

fn agree(a: Option<f64>, b: Option<f64>) -> bool {
    match (a, b) {
        (Some(a), Some(b)) => (a - b).abs() <= AGREE * a.abs().max(b.abs()),
        (None, None) => true,
        _ => false,
    }
}

/// The sensitivity of an analysed calc to each of its `let`s.
#[must_use]
pub fn sensitivity(file: &ast::File, a: &crate::Analysis) -> Sensitivity {
    let model = &a.model;
    let labels: Vec<String> = a
        .checks
        .governing()
        .iter()
        .map(|o| o.label.to_string())
        .collect();
    let lets: Vec<&crate::model::LetValue> = model
        .lets
        .iter()
        .filter(|l| crate::model::reaches(file, &l.name, true))
        .collect();
    let work = (model.parts.len() + model.nodes.len()).max(1) * lets.len() * 4;
    if work > MAX_WORK {
        return Sensitivity {
            labels,
            inputs: Vec::new(),
            note: Some(format!(
                "not computed: {} inputs on a model of {} parts take {} re-solves; vary the inputs that matter with `tandem sweep`",
                lets.len(),
                model.parts.len(),
                4 * lets.len()
            )),
        };
    }
    let base = at(file, None, &[])
        .ok()
        .and_then(|mut u| u.pop())
        .unwrap_or_else(|| Utilizations {
            governing: None,
            checks: vec![None; labels.len()],
        });
    let (u0, c0) = (base.governing, base.checks);
    let mut inputs: Vec<Input> =
        crate::parallel::each(lets.len(), |i| one(file, lets[i], u0, &c0, labels.len()));
    // most influential first; the undefined last, in file order
    inputs.sort_by(|x, y| {
        let key = |i: &Input| i.governing.map_or(-1.0, f64::abs);
        key(y).total_cmp(&key(x))
    });
    Sensitivity {
        labels,
        inputs,
        note: None,
    }
}

/// One input's influence.
fn one(
    file: &ast::File,
    l: &crate::model::LetValue,
    u0: Option<f64>,
    c0: &[Option<f64>],
    n: usize,
) -> Input {
    let x = l.value;
    let mut input = Input {
        name: l.name.clone(),
        value: x,
        method: None,
        governing: None,
        checks: vec![None; n],
        failed: None,
    };
    // x·e^±h and x·e^±10h, or ±δ, ±10δ about zero
    let zero = x.value == 0.0;
    let steps = [STEP, -STEP, WIDE * STEP, -WIDE * STEP];
    let points: Vec<f64> = if zero {
        steps.to_vec()
    } else {
        steps.iter().map(|s| x.value * s.exp()).collect()
    };
    let got = match at(file, Some(&l.name), &points) {
        Ok(got) => got,
        Err(e) => {
            input.failed = Some(e);
            return input;
        }
    };
    let diff =
        |k: usize, step: f64, u: Option<f64>, pick: &dyn Fn(&Utilizations) -> Option<f64>| {
            let (p, m) = (pick(&got[2 * k]), pick(&got[2 * k + 1]));
            let e = if zero {
                slope(p, m, step)
            } else {
                elasticity(p, m, u, step)
            };
            e.map(|e| if e.abs() < ROUND_OFF { 0.0 } else { e })
        };
    let gov = |r: &Utilizations| r.governing;
    let (g1, g2) = (diff(0, STEP, u0, &gov), diff(1, WIDE * STEP, u0, &gov));
    let mut exact = agree(g1, g2);
    input.governing = g1;
    for k in 0..n {
        let pick = |r: &Utilizations| r.checks.get(k).copied().flatten();
        let u = c0.get(k).copied().flatten();
        let (e1, e2) = (diff(0, STEP, u, &pick), diff(1, WIDE * STEP, u, &pick));
        exact &= agree(e1, e2);
        input.checks[k] = e1;
    }
    input.method = Some(match (zero, exact) {
        (true, exact) => Method::Absolute { step: STEP, exact },
        (false, true) => Method::Exact { step: STEP },
        (false, false) => Method::Central { step: STEP },
    });
    input
}

//! Monte Carlo over named `let`s (`tandem sample`): how likely the calc is
//! to fail when its inputs scatter.
//!
//! Each sample draws every varied `let` from its distribution with its own
//! generator (ChaCha8 seeded by the seed, on the stream of the sample's
//! index), so a seed gives the same samples whatever the number of cores.
//! Samples are solved in parallel in fixed-size batches and folded in
//! sample order into running counts and P² quantile estimators (Jain and
//! Chlamtac, CACM 28(10), 1985): the memory does not grow with the number
//! of samples. A sample that cannot be solved (a mechanism, a value out of
//! its sane range) is counted and reported with its reason, never dropped.

use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution, LogNormal, Normal, Triangular, Uniform};

use super::study::Evaluator;
use crate::model::{build_with, Limits};
use crate::source::Source;
use crate::syntax::ast;
use crate::units::{Dimension, Quantity};

/// Samples solved together between folds: the memory held at once.
const BATCH: usize = 2048;

/// The percentiles reported.
pub const PERCENTILES: [f64; 4] = [0.05, 0.50, 0.95, 0.99];

/// A distribution of a `let`, in SI.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Dist {
    Normal {
        mean: f64,
        sd: f64,
    },
    /// Mean and coefficient of variation (sd / mean).
    LogNormal {
        mean: f64,
        cov: f64,
    },
    Uniform {
        lo: f64,
        hi: f64,
    },
    Triangular {
        lo: f64,
        mode: f64,
        hi: f64,
    },
}

/// A varied `let`: its name, distribution and the dimension of its values.
#[derive(Clone, Debug, PartialEq)]
pub struct Varied {
    pub name: String,
    pub dist: Dist,
    pub dim: Dimension,
    /// As written, for messages and output.
    pub text: String,
}

/// Parse `NAME=kind(a, b[, c])`: `normal(mean, sd)`, `lognormal(mean,
/// coefficient of variation)`, `uniform(lo, hi)`, `triangular(lo, mode,
/// hi)`, each value with its unit.
///
/// # Errors
/// A message naming what is wrong: the form, an unknown kind, a value that
/// does not parse, values of different dimensions, a spread that is not
/// positive, bounds out of order.
pub fn parse_vary(spec: &str) -> Result<Varied, String> {
    let (name, rest) = spec.split_once('=').ok_or_else(|| {
        format!("`{spec}` is not `NAME=normal(mean, sd)` or another distribution")
    })?;
    let rest = rest.trim();
    let (kind, args) = rest
        .split_once('(')
        .and_then(|(k, a)| a.strip_suffix(')').map(|a| (k.trim(), a)))
        .ok_or_else(|| {
            format!("`{rest}` is not a distribution such as `normal(5 ksi, 0.5 ksi)`")
        })?;
    let values: Vec<Quantity> = args
        .split(',')
        .map(|a| crate::quantity(a.trim()).map_err(|e| format!("`{}`: {e}", a.trim())))
        .collect::<Result<_, _>>()?;
    let want = match kind {
        "normal" | "lognormal" | "uniform" => 2,
        "triangular" => 3,
        _ => {
            return Err(format!(
                "`{kind}` is not a distribution: normal(mean, sd), lognormal(mean, coefficient of variation), uniform(lo, hi) or triangular(lo, mode, hi)"
            ))
        }
    };
    if values.len() != want {
        return Err(format!(
            "`{kind}` takes {want} values, not {}",
            values.len()
        ));
    }
    let same = |k: usize| values[k].dim == values[0].dim;
    let dim = values[0].dim;
    let v = |k: usize| values[k].value;
    let dist = match kind {
        "normal" => {
            if !same(1) {
                return Err(format!(
                    "the mean and the sd of `{spec}` are not of one dimension"
                ));
            }
            if v(1).partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
                return Err(format!("the sd of `{spec}` must be positive"));
            }
            Dist::Normal {
                mean: v(0),
                sd: v(1),
            }
        }
        "lognormal" => {
            if !values[1].dim.is_none() {
                return Err(format!(
                    "the coefficient of variation of `{spec}` is a number (`0.03` or `3 percent`)"
                ));
            }
            if v(0).partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
                return Err(format!(
                    "the mean of `{spec}` must be positive (a lognormal value is)"
                ));
            }
            if v(1).partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
                return Err(format!(
                    "the coefficient of variation of `{spec}` must be positive"
                ));
            }
            Dist::LogNormal {
                mean: v(0),
                cov: v(1),
            }
        }
        "uniform" => {
            if !same(1) {
                return Err(format!("the bounds of `{spec}` are not of one dimension"));
            }
            if v(0).partial_cmp(&v(1)) != Some(std::cmp::Ordering::Less) {
                return Err(format!(
                    "the bounds of `{spec}` are out of order: lo must be below hi"
                ));
            }
            Dist::Uniform { lo: v(0), hi: v(1) }
        }
        _ => {
            if !same(1) || !same(2) {
                return Err(format!("the values of `{spec}` are not of one dimension"));
            }
            let ordered = v(0) < v(2) && v(0) <= v(1) && v(1) <= v(2);
            if !ordered {
                return Err(format!(
                    "the values of `{spec}` are out of order: lo ≤ mode ≤ hi with lo below hi"
                ));
            }
            Dist::Triangular {
                lo: v(0),
                mode: v(1),
                hi: v(2),
            }
        }
    };
    Ok(Varied {
        name: name.trim().to_string(),
        dist,
        dim,
        text: spec.trim().to_string(),
    })
}

/// A sampler of one distribution (built once).
enum Draw {
    Normal(Normal<f64>),
    LogNormal(LogNormal<f64>),
    Uniform(Uniform<f64>),
    Triangular(Triangular<f64>),
}

impl Draw {
    fn of(d: Dist) -> Option<Self> {
        Some(match d {
            Dist::Normal { mean, sd } => Draw::Normal(Normal::new(mean, sd).ok()?),
            Dist::LogNormal { mean, cov } => {
                // ln X is normal with σ² = ln(1 + cov²), μ = ln(mean) − σ²/2
                let s2 = cov.mul_add(cov, 1.0).ln();
                Draw::LogNormal(LogNormal::new(mean.ln() - s2 / 2.0, s2.sqrt()).ok()?)
            }
            Dist::Uniform { lo, hi } => Draw::Uniform(Uniform::new(lo, hi).ok()?),
            Dist::Triangular { lo, mode, hi } => {
                Draw::Triangular(Triangular::new(lo, hi, mode).ok()?)
            }
        })
    }

    fn sample(&self, r: &mut ChaCha8Rng) -> f64 {
        match self {
            Draw::Normal(d) => d.sample(r),
            Draw::LogNormal(d) => d.sample(r),
            Draw::Uniform(d) => d.sample(r),
            Draw::Triangular(d) => d.sample(r),
        }
    }
}

/// The P² estimator of one quantile: five markers, constant memory.
#[derive(Clone, Debug)]
struct P2 {
    p: f64,
    n: [f64; 5],
    want: [f64; 5],
    step: [f64; 5],
    q: [f64; 5],
    count: usize,
}

impl P2 {
    fn new(p: f64) -> Self {
        Self {
            p,
            n: [0.0, 1.0, 2.0, 3.0, 4.0],
            want: [0.0, 2.0 * p, 4.0 * p, 2.0 + 2.0 * p, 4.0],
            step: [0.0, p / 2.0, p, f64::midpoint(1.0, p), 1.0],
            q: [0.0; 5],
            count: 0,
        }
    }

    fn add(&mut self, x: f64) {
        if self.count < 5 {
            self.q[self.count] = x;
            self.count += 1;
            if self.count == 5 {
                self.q.sort_by(f64::total_cmp);
            }
            return;
        }
        self.count += 1;
        let k = if x < self.q[0] {
            self.q[0] = x;
            0
        } else if x >= self.q[4] {
            self.q[4] = x;
            3
        } else {
            (0..4).find(|&i| x < self.q[i + 1]).unwrap_or(3)
        };
        for i in k + 1..5 {
            self.n[i] += 1.0;
        }
        for i in 0..5 {
            self.want[i] += self.step[i];
        }
        for i in 1..4 {
            let d = self.want[i] - self.n[i];
            if (d >= 1.0 && self.n[i + 1] - self.n[i] > 1.0)
                || (d <= -1.0 && self.n[i - 1] - self.n[i] < -1.0)
            {
                let s = d.signum();
                let (qm, q0, qp) = (self.q[i - 1], self.q[i], self.q[i + 1]);
                let (nm, n0, np) = (self.n[i - 1], self.n[i], self.n[i + 1]);
                // the piecewise-parabolic prediction, else linear
                let parabolic = q0
                    + s / (np - nm)
                        * ((n0 - nm + s) * (qp - q0) / (np - n0)
                            + (np - n0 - s) * (q0 - qm) / (n0 - nm));
                self.q[i] = if qm < parabolic && parabolic < qp {
                    parabolic
                } else if s > 0.0 {
                    q0 + (qp - q0) / (np - n0)
                } else {
                    q0 - (qm - q0) / (nm - n0)
                };
                self.n[i] += s;
            }
        }
    }

    /// The estimate (with fewer than five values, the nearest of them).
    fn value(&self) -> Option<f64> {
        match self.count {
            0 => None,
            c if c < 5 => {
                let mut v = self.q[..c].to_vec();
                v.sort_by(f64::total_cmp);
                #[allow(
                    clippy::cast_possible_truncation,
                    clippy::cast_sign_loss,
                    clippy::cast_precision_loss
                )]
                let k = ((self.p * (c - 1) as f64).round() as usize).min(c - 1);
                Some(v[k])
            }
            _ => Some(self.q[2]),
        }
    }
}

/// Running statistics of one quantity over the samples.
#[derive(Clone, Debug)]
pub struct Tally {
    /// Samples where the quantity was defined.
    pub count: usize,
    /// Of those, samples where a utilization exceeded 1 (checks only).
    pub failures: usize,
    estimators: Vec<P2>,
}

impl Tally {
    fn new() -> Self {
        Self {
            count: 0,
            failures: 0,
            estimators: PERCENTILES.iter().map(|&p| P2::new(p)).collect(),
        }
    }

    fn add(&mut self, v: f64, fails: bool) {
        self.count += 1;
        if fails {
            self.failures += 1;
        }
        for e in &mut self.estimators {
            e.add(v);
        }
    }

    /// The estimated percentiles, in the order of [`PERCENTILES`].
    #[must_use]
    pub fn percentiles(&self) -> Vec<Option<f64>> {
        self.estimators.iter().map(P2::value).collect()
    }

    /// The probability of failure and its 95 % confidence interval (the
    /// Wilson score interval, E. B. Wilson, JASA 22, 1927).
    #[must_use]
    pub fn probability(&self) -> Option<(f64, [f64; 2])> {
        if self.count == 0 {
            return None;
        }
        #[allow(clippy::cast_precision_loss)]
        let (k, n) = (self.failures as f64, self.count as f64);
        let z = 1.959_963_984_540_054; // the 97.5 % point of the standard normal
        let p = k / n;
        let centre = (p + z * z / (2.0 * n)) / (1.0 + z * z / n);
        let half = z / (1.0 + z * z / n) * (p * (1.0 - p) / n + z * z / (4.0 * n * n)).sqrt();
        // at none or all failing the bound is exactly 0 or 1
        let lo = if self.failures == 0 {
            0.0
        } else {
            (centre - half).max(0.0)
        };
        let hi = if self.failures == self.count {
            1.0
        } else {
            (centre + half).min(1.0)
        };
        Some((p, [lo, hi]))
    }
}

/// A finished run.
#[derive(Clone, Debug)]
pub struct Summary {
    pub samples: usize,
    pub seed: u64,
    pub varied: Vec<Varied>,
    /// The checks, in the order of `checks`.
    pub labels: Vec<String>,
    pub checks: Vec<Tally>,
    /// The governing utilization: "any check fails".
    pub any: Tally,
    /// Each shown result (SI values; failures not counted).
    pub shown: Vec<(super::study::Shown, Dimension, Tally)>,
    /// Samples that could not be solved, and the reasons, most frequent
    /// first (at most five, each with its count).
    pub unsolved: usize,
    pub reasons: Vec<(String, usize)>,
}

/// A prepared run: the parsed file, the varied lets and the results shown.
pub struct Sampler {
    file: ast::File,
    varied: Vec<Varied>,
    draws: Vec<Draw>,
    shown: Vec<super::study::Shown>,
    labels: Vec<String>,
    shown_dims: Vec<Dimension>,
}

type Outcome = Result<(super::study::Utilizations, Vec<f64>), String>;

impl Sampler {
    /// Parse the file once and check the varied names, their units and
    /// the results shown.
    ///
    /// # Errors
    /// The file's own errors, or a message about a varied name or a shown
    /// result.
    pub fn new(
        source: &Source,
        varied: Vec<Varied>,
        shown: &[String],
    ) -> Result<Self, Result<Vec<crate::Error>, String>> {
        let file = crate::syntax::parse(&source.text)
            .map_err(|e| Ok(e.into_iter().map(Into::into).collect()))?;
        let model = build_with(&file, Limits::default(), &[])
            .map_err(|e| Ok(e.into_iter().map(Into::into).collect()))?;
        for v in &varied {
            let Some(l) = model.lets.iter().find(|l| l.name == v.name) else {
                let names: Vec<&str> = model.lets.iter().map(|l| l.name.as_str()).collect();
                return Err(Err(format!(
                    "`{}` is not a `let` of {}; the lets are {}",
                    v.name,
                    source.name,
                    if names.is_empty() {
                        "none".to_string()
                    } else {
                        names.join(", ")
                    }
                )));
            };
            if l.value.dim != v.dim {
                return Err(Err(format!(
                    "`{}` is {}, but `{}` gives {}",
                    v.name,
                    l.value.dim.describe(),
                    v.text,
                    v.dim.describe()
                )));
            }
        }
        let shown = super::study::shown_results(&model, shown, &source.name).map_err(Err)?;
        // the file's own values: the labels of the checks, the units shown
        let names: Vec<&str> = varied.iter().map(|v| v.name.as_str()).collect();
        let base: Vec<Quantity> = varied
            .iter()
            .filter_map(|v| model.lets.iter().find(|l| l.name == v.name))
            .map(|l| l.value)
            .collect();
        let (labels, shown_dims) = {
            let mut ev = Evaluator::new(&file, &names, &shown)?;
            let at = ev.at(&base).map_err(Ok)?;
            let labels = ev.labels();
            let dims: Vec<Dimension> = at.shown.iter().map(|q| q.dim).collect();
            (labels, dims)
        };
        let draws = varied
            .iter()
            .map(|v| Draw::of(v.dist))
            .collect::<Option<Vec<_>>>()
            .ok_or_else(|| Err("a distribution's parameters are out of range".to_string()))?;
        Ok(Self {
            file,
            varied,
            draws,
            shown,
            labels,
            shown_dims,
        })
    }

    /// The values of the varied lets in sample `i`, in their order.
    fn draw(&self, seed: u64, i: u64) -> Vec<Quantity> {
        let mut r = ChaCha8Rng::seed_from_u64(seed);
        r.set_stream(i);
        self.varied
            .iter()
            .zip(&self.draws)
            .map(|(v, d)| Quantity::new(d.sample(&mut r), v.dim))
            .collect()
    }

    /// One evaluation per core, each updating its own copy of the model.
    fn evaluators(&self) -> Vec<Result<Evaluator<'_>, String>> {
        let names: Vec<&str> = self.varied.iter().map(|v| v.name.as_str()).collect();
        (0..rayon::current_num_threads().max(1))
            .map(|_| {
                Evaluator::new(&self.file, &names, &self.shown).map_err(|e| match e {
                    Ok(es) => es.first().map_or_else(String::new, ToString::to_string),
                    Err(msg) => msg,
                })
            })
            .collect()
    }

    /// Draw and solve `samples` samples; `progress(done)` after each batch.
    #[must_use]
    pub fn run(&self, samples: usize, seed: u64, progress: &dyn Fn(usize)) -> Summary {
        let mut checks: Vec<Tally> = self.labels.iter().map(|_| Tally::new()).collect();
        let mut any = Tally::new();
        let mut shown: Vec<Tally> = self.shown.iter().map(|_| Tally::new()).collect();
        let mut unsolved = 0;
        let mut reasons: Vec<(String, usize)> = Vec::new();
        let mut done = 0;
        let mut evaluators = self.evaluators();
        while done < samples {
            let batch = BATCH.min(samples - done);
            let outcomes: Vec<Outcome> =
                crate::parallel::each_with(&mut evaluators, batch, |ev, j| {
                    let ev = ev.as_mut().map_err(|e| e.clone())?;
                    let e = ev
                        .at(&self.draw(seed, (done + j) as u64))
                        .map_err(|e| e.first().map_or_else(String::new, ToString::to_string))?;
                    Ok((e.utilizations, e.shown.iter().map(|q| q.value).collect()))
                });
            for o in outcomes {
                match o {
                    Ok((u, values)) => {
                        if let Some(g) = u.governing {
                            any.add(g, g > 1.0);
                        }
                        for (t, c) in checks.iter_mut().zip(&u.checks) {
                            // an undefined utilization (capacity not
                            // positive) counts as a failure
                            match c {
                                Some(c) => t.add(*c, *c > 1.0),
                                None => t.add(f64::INFINITY, true),
                            }
                        }
                        for (t, v) in shown.iter_mut().zip(values) {
                            t.add(v, false);
                        }
                    }
                    Err(why) => {
                        unsolved += 1;
                        match reasons.iter_mut().find(|(r, _)| *r == why) {
                            Some((_, n)) => *n += 1,
                            None => reasons.push((why, 1)),
                        }
                    }
                }
            }
            done += batch;
            progress(done);
        }
        reasons.sort_by_key(|r| std::cmp::Reverse(r.1));
        reasons.truncate(5);
        Summary {
            samples,
            seed,
            varied: self.varied.clone(),
            labels: self.labels.clone(),
            checks,
            any,
            shown: self
                .shown
                .iter()
                .cloned()
                .zip(self.shown_dims.iter().copied())
                .zip(shown)
                .map(|((s, d), t)| (s, d, t))
                .collect(),
            unsolved,
            reasons,
        }
    }
}

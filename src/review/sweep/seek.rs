//! Goal seek as the steps come: each pair of neighbouring steps along the
//! first parameter that brackets 1.0 is refined by bisection at once, so
//! nothing but the last step is kept.

use super::{Axis, Failed, Step};
use crate::units::Quantity;

/// The answer of a goal seek.
#[derive(Clone, Debug, PartialEq)]
pub enum Seek {
    /// The values of the first parameter at which the governing
    /// utilization reaches 1.0: `value` the first, `crossings` every one in
    /// the range, in order (on a grid, row by row, `second` holding each
    /// crossing's value of the second parameter); `monotonic` whether the
    /// utilization only rises or only falls along every row.
    Found {
        value: Quantity,
        crossings: Vec<Quantity>,
        second: Vec<Quantity>,
        monotonic: bool,
        tolerance: f64,
        evaluations: usize,
    },
    /// No step of the range brings the utilization to 1.0.
    NoRoot { lowest: f64, highest: f64 },
}

/// Bisection steps allowed per crossing (2^-200 of a bracket is far below
/// any tolerance).
const MAX_BISECTIONS: usize = 200;

/// Whether a run of utilizations only rises, only falls.
#[derive(Clone, Copy)]
struct Trend {
    rising: bool,
    falling: bool,
}

impl Trend {
    const ANY: Self = Self {
        rising: true,
        falling: true,
    };
}

/// A goal seek fed one step at a time.
pub(super) struct Seeker {
    tol: f64,
    dim: crate::units::Dimension,
    /// The last step: its value, utilization and second value.
    last: Option<(f64, Option<f64>, Option<Quantity>)>,
    /// Whether every row so far only rose or only fell.
    monotonic: bool,
    /// Along this row.
    row: Trend,
    lowest: f64,
    highest: f64,
    crossings: Vec<f64>,
    second: Vec<Quantity>,
    evaluations: usize,
}

/// The governing utilization, an undefined one (capacity not positive)
/// standing for ∞.
fn g(u: Option<f64>) -> Option<f64> {
    u.map(|u| if u.is_nan() { f64::INFINITY } else { u })
}

impl Seeker {
    pub(super) fn new(axis: &Axis, tolerance: f64) -> Self {
        let range = (axis.to.value - axis.from.value).abs();
        Self {
            tol: tolerance * range.max(f64::MIN_POSITIVE),
            dim: axis.from.dim,
            last: None,
            monotonic: true,
            row: Trend::ANY,
            lowest: f64::INFINITY,
            highest: f64::NEG_INFINITY,
            crossings: Vec::new(),
            second: Vec::new(),
            evaluations: 0,
        }
    }

    /// A new row of a grid (and the start of a sweep): the next step has
    /// no neighbour before it.
    pub(super) fn new_row(&mut self) {
        if let Some((x, u, second)) = self.last.take() {
            // a row ending exactly at 1.0 is its own crossing
            if g(u) == Some(1.0) {
                self.push_once(x, second);
            }
        }
        // monotonic is judged row by row: a grid may rise along one row
        // and fall along another
        let row = std::mem::replace(&mut self.row, Trend::ANY);
        self.monotonic &= row.rising || row.falling;
    }

    fn push(&mut self, x: f64, second: Option<Quantity>) {
        self.crossings.push(x);
        if let Some(s) = second {
            self.second.push(s);
        }
    }

    /// A step exactly at 1.0: a crossing, found once.
    fn push_once(&mut self, x: f64, second: Option<Quantity>) {
        let same_row = second.is_none_or(|s| self.second.last() == Some(&s));
        if !(same_row && self.crossings.last() == Some(&x)) {
            self.push(x, second);
        }
    }

    /// The next step; `at(x)` evaluates the governing utilization at a
    /// value of the first parameter (the rest as the step's).
    pub(super) fn feed(
        &mut self,
        step: &Step,
        at: &mut dyn FnMut(Quantity) -> Result<Option<f64>, Failed>,
    ) -> Result<(), Failed> {
        let x = step.value.value;
        let cur = g(step.governing);
        if let Some(u) = cur {
            self.lowest = self.lowest.min(u);
            self.highest = self.highest.max(u);
        }
        let prev = self.last.replace((x, step.governing, step.second));
        let Some((px, pu, _)) = prev else {
            return Ok(());
        };
        let (Some(ua), Some(ub)) = (g(pu), cur) else {
            return Ok(());
        };
        self.row.rising &= ub >= ua;
        self.row.falling &= ub <= ua;
        let (fa, fb) = (ua - 1.0, ub - 1.0);
        if fa == 0.0 {
            self.push_once(px, step.second);
            return Ok(());
        }
        if fb == 0.0 || (fa < 0.0) == (fb < 0.0) {
            return Ok(());
        }
        let (mut a, mut b, mut ga) = (px, x, fa);
        let mut n = 0;
        while (b - a).abs() > self.tol && n < MAX_BISECTIONS {
            let m = 0.5 * (a + b);
            let gm = g(at(Quantity::new(m, self.dim))?).unwrap_or(0.0) - 1.0;
            self.evaluations += 1;
            n += 1;
            if gm == 0.0 {
                a = m;
                b = m;
                break;
            }
            if (ga < 0.0) == (gm < 0.0) {
                a = m;
                ga = gm;
            } else {
                b = m;
            }
        }
        self.push(0.5 * (a + b), step.second);
        Ok(())
    }

    pub(super) fn finish(mut self) -> Seek {
        self.new_row();
        let Some(&first) = self.crossings.first() else {
            return Seek::NoRoot {
                lowest: self.lowest,
                highest: self.highest,
            };
        };
        Seek::Found {
            value: Quantity::new(first, self.dim),
            crossings: self
                .crossings
                .iter()
                .map(|&v| Quantity::new(v, self.dim))
                .collect(),
            second: self.second,
            monotonic: self.monotonic,
            tolerance: self.tol,
            evaluations: self.evaluations,
        }
    }
}

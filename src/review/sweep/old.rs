//! Parameter sweeps and goal seek (`tandem sweep`).
//!
//! The file is parsed once; each step re-evaluates the model from the syntax
//! tree with the swept `let` fixed at the step's value and evaluates the
//! checks. The assembly is re-solved only when something the solver uses
//! (a material, node, part or case) depends on the parameter; a parameter
//! that enters only the checks (a limit, an allowable used in a `check`)
//! keeps the one solution.

use serde_json::{json, Value};

use crate::checks::{evaluate_state, Checks, Refs};
use crate::model::{build_with, Limits, Model};
use crate::solve::solve;
use crate::source::Source;
use crate::syntax::ast;
use crate::units::{Dimension, Quantity};
use crate::Error;

/// A result to show in the table: `PART.force|stress|strain|elongation` or
/// `NODE.displacement|reaction|dx|dy|rx|ry`.
#[derive(Clone, Debug, PartialEq)]
pub struct Shown {
    pub object: String,
    pub field: String,
}

/// One step of a sweep.
#[derive(Clone, Debug, PartialEq)]
pub struct Step {
    pub value: Quantity,
    /// Highest utilization over every check and combination (`None`: no checks).
    pub governing: Option<f64>,
    /// Each check's highest utilization, in check order.
    pub checks: Vec<Option<f64>>,
    /// Each shown result: the value of largest magnitude over the combinations.
    pub shown: Vec<Quantity>,
}

/// A finished sweep.
#[derive(Clone, Debug, PartialEq)]
pub struct Sweep {
    pub name: String,
    /// The unit the range was written in (`deg`), for showing the
    /// parameter; `None`: the display's unit for its dimension.
    pub unit: Option<crate::report::display::Shown>,
    pub labels: Vec<String>,
    pub shown: Vec<Shown>,
    pub steps: Vec<Step>,
}

impl Sweep {
    /// The unit the parameter is shown in: the range's own, else the
    /// display's for its dimension.
    pub fn parameter_unit(
        &self,
        d: &crate::report::Display,
    ) -> Option<crate::report::display::Shown> {
        self.unit.clone().or_else(|| {
            self.steps
                .first()
                .and_then(|s| d.unit_for(s.value.dim).cloned())
        })
    }
}

/// The answer of a goal seek.
#[derive(Clone, Debug, PartialEq)]
pub enum Seek {
    /// The values at which the governing utilization reaches 1.0: `value`
    /// the first, `crossings` every one in the range, in order;
    /// `monotonic` whether the utilization only rises or only falls over
    /// the steps.
    Found {
        value: Quantity,
        crossings: Vec<Quantity>,
        monotonic: bool,
        tolerance: f64,
        evaluations: usize,
    },
    /// No step of the range brings the utilization to 1.0.
    NoRoot { lowest: f64, highest: f64 },
}

/// The results named in `--show` (`OBJECT.FIELD`), checked against the
/// model: a part's, a beam's or a node's result.
///
/// # Errors
/// A message naming the first that is not a result of the model.
pub(crate) fn shown_results(
    model: &Model,
    shown: &[String],
    file: &str,
) -> Result<Vec<Shown>, String> {
    let mut list = Vec::new();
    for s in shown {
        let Some((object, field)) = s.split_once('.') else {
            return Err(format!("`{s}` is not a result such as `core.stress`"));
        };
        let ok_part = model.part_index(object).is_some_and(|i| {
            crate::model::results::is_part_result(field)
                || (model.parts[i].bend.is_some() && crate::model::results::is_beam_result(field))
        });
        let ok_node = model.node_index(object).is_some()
            && crate::model::results::is_node_result(model.kind, field);
        if !ok_part && !ok_node {
            return Err(format!(
                "`{s}` is not a result of a part, beam or node of {file}"
            ));
        }
        list.push(Shown {
            object: object.into(),
            field: field.into(),
        });
    }
    Ok(list)
}

/// A shown result's value: the one of largest magnitude over the
/// combinations.
pub(crate) fn shown_value(
    model: &Model,
    solution: &crate::solve::Solution,
    refs: &Refs<'_>,
    s: &Shown,
) -> Quantity {
    let mut best = Quantity::number(0.0);
    for r in &solution.combinations {
        let scope = crate::checks::ResultScope {
            model,
            result: r,
            refs,
            capacity: None,
            combination: 0,
        };
        let id = |n: &str| ast::Ident {
            name: n.into(),
            span: crate::source::Span::default(),
        };
        if let Ok(q) = crate::model::eval::Scope::field(&scope, &id(&s.object), &id(&s.field)) {
            if q.value.abs() >= best.value.abs() {
                best = q;
            }
        }
    }
    best
}

/// The file rebuilt with some `let`s fixed at other values, solved and
/// checked: its utilizations and the values of the `shown` results (SI).
/// What a sensitivity and a sample evaluate, once per moved value.
///
/// # Errors
/// The first error, in words: a model that cannot be built (a value out
/// of its sane range), solved (a mechanism) or checked.
pub(crate) fn evaluate_with(
    file: &ast::File,
    overrides: &[(String, Quantity)],
    shown: &[Shown],
) -> Result<(Utilizations, Vec<f64>), String> {
    fn first<E: std::fmt::Display>(e: &[E]) -> String {
        e.first().map_or_else(String::new, ToString::to_string)
    }
    let model = build_with(file, Limits::default(), overrides).map_err(|e| first(&e))?;
    let solution = solve(&model).map_err(|e| e.to_string())?;
    let objects: Vec<&str> = shown.iter().map(|s| s.object.as_str()).collect();
    let refs = Refs::new(&model, &objects);
    let (_, u) = utilizations(&model, &solution, &refs).map_err(|e| first(&e))?;
    let values = shown
        .iter()
        .map(|s| shown_value(&model, &solution, &refs, s).value)
        .collect();
    Ok((u, values))
}

/// The checks of a solved model in every combination, short and long term;
/// the highest utilization over them all (`None`: no checks) and each
/// check's highest, in the order of the short-term governing list. What a
/// sweep step, a sensitivity and a sample read.
///
/// # Errors
/// A check that cannot be evaluated, a capacity or long-term state that
/// cannot be solved.
pub(crate) fn utilizations(
    model: &Model,
    solution: &crate::solve::Solution,
    refs: &Refs<'_>,
) -> Result<(Checks, Utilizations), Vec<Error>> {
    let capacity = crate::solve::capacity::capacity(model).map_err(|e| vec![Error::from(e)])?;
    let checks =
        evaluate_state(model, solution, refs, None, &capacity).map_err(|e| vec![Error::from(e)])?;
    // every check `solve` evaluates: the long-term state's too
    let (_, long) = crate::long_term_checks(model, solution, refs, &capacity)?;
    let long = long.map(|(_, c)| c);
    let all = checks
        .outcomes
        .iter()
        .chain(long.iter().flat_map(|c| &c.outcomes));
    let governing = all
        .map(|o| o.utilization.unwrap_or(f64::INFINITY))
        .fold(None, |m: Option<f64>, u| Some(m.map_or(u, |m| m.max(u))));
    let short = checks.governing();
    let long_gov = long.as_ref().map(Checks::governing).unwrap_or_default();
    let worse = |a: Option<f64>, b: Option<f64>| match (a, b) {
        (Some(a), Some(b)) => Some(a.max(b)),
        (None, _) | (_, None) => None,
    };
    let per_check = short
        .iter()
        .enumerate()
        .map(|(k, o)| match long_gov.get(k) {
            Some(l) if l.label == o.label => worse(o.utilization, l.utilization),
            _ => o.utilization,
        })
        .collect();
    Ok((
        checks,
        Utilizations {
            governing,
            checks: per_check,
        },
    ))
}

/// The utilizations of one evaluation of a calc.
#[derive(Clone, Debug, Default, PartialEq)]
pub(crate) struct Utilizations {
    /// The highest over every check, combination and state (`None`: no checks).
    pub governing: Option<f64>,
    /// Each check's highest, in the order of the governing list.
    pub checks: Vec<Option<f64>>,
}

/// A prepared sweep: the parsed file and the parameter.
pub struct Sweeper<'a> {
    file: ast::File,
    name: String,
    dim: Dimension,
    shown: Vec<Shown>,
    source: &'a Source,
    /// The solution at the file's own value, kept when the parameter only
    /// enters the checks (nothing the solver uses depends on it).
    fixed_solution: Option<crate::solve::Solution>,
}

fn errors<E: Into<Error>>(es: Vec<E>) -> Vec<Error> {
    es.into_iter().map(Into::into).collect()
}

impl<'a> Sweeper<'a> {
    /// Parse the file once and check the parameter and the shown results.
    ///
    /// # Errors
    /// The file's errors, or a message about the parameter.
    pub fn new(
        source: &'a Source,
        name: &str,
        shown: &[String],
    ) -> Result<Self, Result<Vec<Error>, String>> {
        let file = crate::syntax::parse(&source.text).map_err(|e| Ok(errors(e)))?;
        let model = crate::model::build(&file, Limits::default()).map_err(|e| Ok(errors(e)))?;
        let Some(l) = model.lets.iter().find(|l| l.name == name) else {
            let names: Vec<&str> = model.lets.iter().map(|l| l.name.as_str()).collect();
            return Err(Err(format!(
                "`{name}` is not a `let` of {}; the parameters are {}",
                source.name,
                if names.is_empty() {
                    "none".to_string()
                } else {
                    names.join(", ")
                }
            )));
        };
        let list = shown_results(&model, shown, &source.name).map_err(Err)?;
        let fixed_solution = if crate::model::solver_depends_on(&file, name) {
            None
        } else {
            Some(solve(&model).map_err(|e| Ok(vec![Error::from(e)]))?)
        };
        Ok(Self {
            file,
            name: name.into(),
            dim: l.value.dim,
            shown: list,
            source,
            fixed_solution,
        })
    }

    /// The parameter's dimension.
    pub fn dimension(&self) -> Dimension {
        self.dim
    }

    /// Evaluate, solve and check at one value of the parameter.
    ///
    /// # Errors
    /// Any error at that value (a mechanism, a non-positive area, ...).
    pub fn at(&self, value: Quantity) -> Result<(Model, Checks, Step), Vec<Error>> {
        let model = build_with(&self.file, Limits::default(), &[(self.name.clone(), value)])
            .map_err(errors)?;
        // Re-solve only when the solver's inputs depend on the parameter.
        let solved;
        let solution = match &self.fixed_solution {
            Some(s) => s,
            None => {
                solved = solve(&model).map_err(|e| vec![Error::from(e)])?;
                &solved
            }
        };
        // one lookup of the names for the checks and the results shown
        let objects: Vec<&str> = self.shown.iter().map(|s| s.object.as_str()).collect();
        let refs = Refs::new(&model, &objects);
        let (
            checks,
            Utilizations {
                governing,
                checks: per_check,
            },
        ) = utilizations(&model, solution, &refs)?;
        let shown = self
            .shown
            .iter()
            .map(|s| shown_value(&model, solution, &refs, s))
            .collect();
        let step = Step {
            value,
            governing,
            checks: per_check,
            shown,
        };
        Ok((model, checks, step))
    }

    /// Sweep `steps` evenly spaced values from `from` to `to`.
    ///
    /// # Errors
    /// The first step that cannot be solved, with its value.
    pub fn sweep(
        &self,
        from: Quantity,
        to: Quantity,
        steps: usize,
    ) -> Result<Sweep, (Quantity, Vec<Error>)> {
        self.sweep_with(from, to, steps, &|_| {})
    }

    /// [`Sweeper::sweep`], calling `progress(done)` every so often (the
    /// command shows it on a terminal).
    ///
    /// # Errors
    /// As [`Sweeper::sweep`].
    pub fn sweep_with(
        &self,
        from: Quantity,
        to: Quantity,
        steps: usize,
        progress: &dyn Fn(usize),
    ) -> Result<Sweep, (Quantity, Vec<Error>)> {
        let mut out = Vec::with_capacity(steps);
        let mut labels = Vec::new();
        for i in 0..steps {
            let t = if steps == 1 {
                0.0
            } else {
                i as f64 / (steps - 1) as f64
            };
            let v = Quantity::new(from.value + (to.value - from.value) * t, from.dim);
            let (_, checks, step) = self.at(v).map_err(|e| (v, e))?;
            if labels.is_empty() {
                labels = checks.governing().iter().map(|o| o.label.clone()).collect();
            }
            out.push(step);
            if (i + 1) % 1024 == 0 || i + 1 == steps {
                progress(i + 1);
            }
        }
        Ok(Sweep {
            name: self.name.clone(),
            unit: None,
            labels,
            shown: self.shown.clone(),
            steps: out,
        })
    }

    /// Find where the governing utilization reaches 1.0 inside the sweep's
    /// range: every pair of neighbouring steps that brackets 1.0, each
    /// refined by bisection to `tolerance` (as a fraction of the range).
    ///
    /// # Errors
    /// A value inside a bracket that cannot be solved.
    pub fn seek(&self, sweep: &Sweep, tolerance: f64) -> Result<Seek, (Quantity, Vec<Error>)> {
        // an undefined utilization (capacity not positive) stands for ∞
        let g = |s: &Step| {
            s.governing
                .map(|u| if u.is_nan() { f64::INFINITY } else { u })
        };
        let us: Vec<f64> = sweep.steps.iter().filter_map(g).collect();
        let lowest = us.iter().copied().fold(f64::INFINITY, f64::min);
        let highest = us.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let rising = us.windows(2).all(|w| w[1] >= w[0]);
        let falling = us.windows(2).all(|w| w[1] <= w[0]);
        let monotonic = rising || falling;
        let dim = sweep.steps.first().map_or(self.dim, |s| s.value.dim);
        let range = match (sweep.steps.first(), sweep.steps.last()) {
            (Some(a), Some(b)) => (b.value.value - a.value.value).abs(),
            _ => 0.0,
        };
        let tol = tolerance * range.max(f64::MIN_POSITIVE);
        let mut crossings = Vec::new();
        let mut evaluations = 0;
        for w in sweep.steps.windows(2) {
            let (Some(ua), Some(ub)) = (g(&w[0]), g(&w[1])) else {
                continue;
            };
            let (fa, fb) = (ua - 1.0, ub - 1.0);
            // a step exactly at 1.0 is its own crossing, found once
            if fa == 0.0 {
                if crossings.last() != Some(&w[0].value.value) {
                    crossings.push(w[0].value.value);
                }
                continue;
            }
            if fb == 0.0 || (fa < 0.0) == (fb < 0.0) {
                continue;
            }
            let (mut a, mut b, mut ga) = (w[0].value.value, w[1].value.value, fa);
            while (b - a).abs() > tol && evaluations < 200 * (crossings.len() + 1) {
                let m = 0.5 * (a + b);
                let q = Quantity::new(m, dim);
                let (_, _, step) = self.at(q).map_err(|e| (q, e))?;
                evaluations += 1;
                let gm = g(&step).unwrap_or(0.0) - 1.0;
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
            crossings.push(0.5 * (a + b));
        }
        if let Some(last) = sweep.steps.last() {
            if g(last) == Some(1.0) && crossings.last() != Some(&last.value.value) {
                crossings.push(last.value.value);
            }
        }
        let Some(&first) = crossings.first() else {
            return Ok(Seek::NoRoot { lowest, highest });
        };
        Ok(Seek::Found {
            value: Quantity::new(first, dim),
            crossings: crossings
                .into_iter()
                .map(|v| Quantity::new(v, dim))
                .collect(),
            monotonic,
            tolerance: tol,
            evaluations,
        })
    }

    /// The source this sweep reads.
    pub fn source(&self) -> &Source {
        self.source
    }
}

/// One step as JSON: its value, utilizations and shown results.
#[derive(serde::Serialize)]
struct StepJson<'a> {
    value_si: f64,
    governing_utilization: Option<f64>,
    checks: Vec<CheckJson<'a>>,
    shown: Vec<ShownJson>,
}

#[derive(serde::Serialize)]
struct CheckJson<'a> {
    label: &'a str,
    utilization: Option<f64>,
}

#[derive(serde::Serialize)]
struct ShownJson {
    result: String,
    value_si: f64,
}

fn seek_json(s: &Seek) -> Value {
    match s {
        Seek::Found {
            value,
            crossings,
            monotonic,
            tolerance,
            evaluations,
        } => {
            json!({"found": true, "value_si": value.value, "crossings_si": crossings.iter().map(|c| c.value).collect::<Vec<_>>(), "monotonic": monotonic, "tolerance_si": tolerance, "evaluations": evaluations})
        }
        Seek::NoRoot { lowest, highest } => {
            json!({"found": false, "lowest_utilization": lowest, "highest_utilization": highest})
        }
    }
}

/// The sweep as JSON (SI values), written as it is made: one step at a
/// time, each on its own line, never the whole document in memory.
///
/// # Errors
/// The writer's.
pub fn write_json(
    w: &mut impl std::io::Write,
    sweep: &Sweep,
    seek: Option<&Seek>,
) -> std::io::Result<()> {
    writeln!(w, "{{")?;
    writeln!(w, "  \"parameter\": {},", json!(sweep.name))?;
    writeln!(w, "  \"steps\": [")?;
    for (i, s) in sweep.steps.iter().enumerate() {
        let step = StepJson {
            value_si: s.value.value,
            governing_utilization: s.governing,
            checks: sweep
                .labels
                .iter()
                .zip(&s.checks)
                .map(|(l, u)| CheckJson {
                    label: l,
                    utilization: *u,
                })
                .collect(),
            shown: sweep
                .shown
                .iter()
                .zip(&s.shown)
                .map(|(d, q)| ShownJson {
                    result: format!("{}.{}", d.object, d.field),
                    value_si: q.value,
                })
                .collect(),
        };
        write!(w, "    ")?;
        serde_json::to_writer(&mut *w, &step)?;
        writeln!(w, "{}", if i + 1 < sweep.steps.len() { "," } else { "" })?;
    }
    writeln!(w, "  ],")?;
    writeln!(w, "  \"seek\": {}", seek.map_or(Value::Null, seek_json))?;
    writeln!(w, "}}")
}

/// The sweep as a JSON value (SI values): [`write_json`]'s document.
#[must_use]
pub fn json(sweep: &Sweep, seek: Option<&Seek>) -> Value {
    let mut bytes = Vec::new();
    if write_json(&mut bytes, sweep, seek).is_err() {
        return Value::Null;
    }
    serde_json::from_slice(&bytes).unwrap_or(Value::Null)
}

/// The sweep as an aligned text table, with the seek result.
pub fn text(sweep: &Sweep, seek: Option<&Seek>, d: &crate::report::Display) -> String {
    use crate::report::number;
    let unit_of = |q: &Quantity| d.unit_for(q.dim).map(|u| u.name.clone());
    let param_unit = sweep.parameter_unit(d);
    let param = |v: f64| match &param_unit {
        Some(u) => number(u.value(v), d.digits),
        None => number(v, d.digits),
    };
    let mut head = vec![match param_unit.as_ref().map(|u| u.name.clone()) {
        Some(u) => format!("{} ({u})", sweep.name),
        None => sweep.name.clone(),
    }];
    head.push("governing".into());
    head.extend(sweep.labels.iter().cloned());
    for (k, s) in sweep.shown.iter().enumerate() {
        let u = sweep.steps.first().and_then(|st| unit_of(&st.shown[k]));
        head.push(match u {
            Some(u) => format!("{}.{} ({u})", s.object, s.field),
            None => format!("{}.{}", s.object, s.field),
        });
    }
    let show = |q: &Quantity| match d.unit_for(q.dim) {
        Some(u) => number(u.value(q.value), d.digits),
        None => number(q.value, d.digits),
    };
    let util = |u: &Option<f64>| crate::report::utilization(*u);
    let mut rows = vec![head];
    for s in &sweep.steps {
        let mut r = vec![param(s.value.value), util(&s.governing)];
        r.extend(s.checks.iter().map(util));
        r.extend(s.shown.iter().map(show));
        rows.push(r);
    }
    let mut out = crate::report::text::aligned(&rows, &[], "");
    match seek {
        Some(Seek::Found {
            crossings,
            monotonic,
            tolerance,
            evaluations,
            ..
        }) => {
            let unit = param_unit
                .as_ref()
                .map_or(String::new(), |u| format!(" {}", u.name));
            let at: Vec<String> = crossings
                .iter()
                .map(|c| format!("{}{unit}", param(c.value)))
                .collect();
            out.push_str(&format!(
                "\nseek: the governing utilization reaches 1.0 at {} = {} (to within {:.1e}{unit}; {evaluations} extra solves)\n",
                sweep.name,
                at.join(", "),
                param_unit.as_ref().map_or(*tolerance, |u| u.value(*tolerance)),
            ));
            if crossings.len() > 1 {
                out.push_str(&format!(
                    "seek: it crosses 1.0 {} times in the range; each crossing is listed\n",
                    crossings.len()
                ));
            }
            if !monotonic {
                out.push_str("seek: the utilization is not monotonic over the range: a value between the steps may pass 1.0 unseen; use more steps to be sure\n");
            }
        }
        Some(Seek::NoRoot { lowest, highest }) => out.push_str(&format!(
            "\nseek: no value in the range brings the governing utilization to 1.0 (it runs from {} to {}); widen the range\n",
            crate::report::utilization(Some(*lowest)),
            crate::report::utilization(Some(*highest))
        )),
        None => {}
    }
    out
}

/// The sweep as an SVG chart: each check's utilization against the
/// parameter (axis titles with units), the limit 1.0, the values found by
/// `--seek` marked, and the legend outside the data. A utilization off the
/// scale or undefined (capacity not positive) is drawn at the top edge and
/// marked ▲, never left out.
#[must_use]
pub fn plot(sweep: &Sweep, seek: Option<&Seek>, d: &crate::report::Display) -> String {
    use crate::report::drawing::chart::{render, Chart, Mark, Series};
    let unit = sweep.parameter_unit(d);
    let x = |q: &Quantity| unit.as_ref().map_or(q.value, |u| u.value(q.value));
    let xs: Vec<f64> = sweep.steps.iter().map(|s| x(&s.value)).collect();
    let ymax = sweep
        .steps
        .iter()
        .filter_map(|s| s.governing)
        .filter(|u| u.is_finite())
        .fold(1.2f64, f64::max)
        * 1.05;
    let series = sweep
        .labels
        .iter()
        .enumerate()
        .map(|(k, label)| {
            let mut off = Vec::new();
            let points = sweep
                .steps
                .iter()
                .zip(&xs)
                .enumerate()
                .map(|(i, (s, &xv))| match s.checks.get(k).copied().flatten() {
                    Some(u) if u < ymax => (xv, u),
                    _ => {
                        off.push(i);
                        (xv, ymax)
                    }
                })
                .collect();
            Series {
                label: label.clone(),
                points,
                off,
            }
        })
        .collect();
    let marks = match seek {
        Some(Seek::Found { crossings, .. }) => crossings
            .iter()
            .map(|q| Mark {
                at: (x(q), 1.0),
                label: format!(
                    "{} = {}{}",
                    sweep.name,
                    crate::report::number(x(q), 4),
                    unit.as_ref()
                        .map_or(String::new(), |u| format!(" {}", u.name))
                ),
            })
            .collect(),
        _ => Vec::new(),
    };
    render(&Chart {
        title: "Utilization against the parameter".into(),
        x_label: match &unit {
            Some(u) => format!("{} ({})", sweep.name, u.name),
            None => sweep.name.clone(),
        },
        y_label: "utilization (demand / capacity)".into(),
        series,
        levels: vec![(1.0, "limit: utilization 1.0".into())],
        marks,
        marks_label: "where the governing utilization reaches 1.0 (--seek)".into(),
        y_min_top: ymax / 1.05,
    })
}

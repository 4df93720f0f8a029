//! What a sweep, a sensitivity and a sample share: the results a study
//! shows, the utilizations of one evaluation, and [`Evaluator`], a calc
//! built once and evaluated again at other values of some `let`s by
//! updating its numbers in place (see [`crate::model::Rebuild`] and
//! [`crate::solve::Resolver`]).

use crate::checks::{evaluate_into, Checks, Refs};
use crate::model::{Limits, Model, Rebuild};
use crate::solve::{Resolver, Solution};
use crate::syntax::ast;
use crate::units::Quantity;
use crate::Error;

/// A result to show in the table: `PART.force|stress|strain|elongation` or
/// `NODE.displacement|reaction|dx|dy|rx|ry`.
#[derive(Clone, Debug, PartialEq)]
pub struct Shown {
    pub object: String,
    pub field: String,
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

/// The checks of a solved model in every combination, short and long term,
/// the short-term ones written into `checks` (an earlier evaluation's,
/// see [`evaluate_into`]); the highest utilization over them all (`None`:
/// no checks) and each check's highest, in the order of the short-term
/// governing list. What a sweep step, a sensitivity and a sample read. The
/// capacity path is traced only with `capacity` (a check reads
/// `yield_factor` or `limit_factor`).
///
/// # Errors
/// A check that cannot be evaluated, a capacity or long-term state that
/// cannot be solved.
pub(crate) fn utilizations(
    model: &Model,
    solution: &crate::solve::Solution,
    refs: &Refs<'_>,
    capacity: bool,
    checks: &mut Checks,
) -> Result<Utilizations, Vec<Error>> {
    let capacity = if capacity {
        crate::solve::capacity::capacity(model).map_err(|e| vec![Error::from(e)])?
    } else {
        Vec::new()
    };
    evaluate_into(model, solution, refs, None, &capacity, checks)
        .map_err(|e| vec![Error::from(e)])?;
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
    Ok(Utilizations {
        governing,
        checks: per_check,
    })
}

/// The utilizations of one evaluation of a calc.
#[derive(Clone, Debug, Default, PartialEq)]
pub(crate) struct Utilizations {
    /// The highest over every check, combination and state (`None`: no checks).
    pub governing: Option<f64>,
    /// Each check's highest, in the order of the governing list.
    pub checks: Vec<Option<f64>>,
}

/// Whether a check reads `yield_factor` or `limit_factor`, which need the
/// capacity path traced.
fn reads_load_factor(model: &Model) -> bool {
    model.checks.iter().any(|c| {
        let mut found = false;
        for e in [&c.lhs, &c.rhs] {
            e.visit(&mut |x| {
                if let ast::ExprKind::Name(id) = &x.kind {
                    found |= crate::model::LOAD_FACTORS.contains(&id.name.as_str());
                }
            });
        }
        found
    })
}

/// One evaluation: the utilizations and the values of the results shown
/// (the checks' labels: [`Evaluator::labels`]).
pub(crate) struct Evaluation {
    pub utilizations: Utilizations,
    pub shown: Vec<Quantity>,
}

/// A calc built once and evaluated at other values of some `let`s: each
/// evaluation writes the changed numbers over the model (no parse, no new
/// names), solves on the kept unknowns and factorisation pattern when the
/// nodes stay where they are, keeps the one solution when only the checks
/// depend on the `let`s, and evaluates the checks. What every step of a
/// sweep, every sample and every sensitivity evaluation runs.
pub(crate) struct Evaluator<'f> {
    rebuild: Rebuild<'f>,
    model: Model,
    resolver: Resolver,
    /// The solution kept when nothing the solver reads changes.
    fixed: Option<Solution>,
    shown: Vec<Shown>,
    capacity: bool,
    /// Where the checks' and the shown results' names live in the model
    /// (the names do not change between evaluations).
    refs: Refs<'static>,
    /// The last evaluation's checks, written over by the next.
    checks: Checks,
}

impl<'f> Evaluator<'f> {
    /// Build `file` and prepare evaluations at other values of `varied`,
    /// showing `shown`.
    ///
    /// # Errors
    /// The file's errors, or in words a varied name that is not a `let`.
    pub fn new(
        file: &'f ast::File,
        varied: &[&str],
        shown: &[Shown],
    ) -> Result<Self, Result<Vec<Error>, String>> {
        let (rebuild, model) = Rebuild::new(file, Limits::default(), varied)
            .map_err(|e| e.map(|es| es.into_iter().map(Error::from).collect()))?;
        let fixed = if rebuild.changes_solver() {
            None
        } else {
            Some(crate::solve::solve(&model).map_err(|e| Ok(vec![Error::from(e)]))?)
        };
        let capacity = reads_load_factor(&model);
        let objects: Vec<&str> = shown.iter().map(|s| s.object.as_str()).collect();
        let refs = Refs::new(&model, &objects).into_owned();
        Ok(Self {
            rebuild,
            model,
            resolver: Resolver::default(),
            fixed,
            shown: shown.to_vec(),
            capacity,
            refs,
            checks: Checks::default(),
        })
    }

    /// The labels of the checks of the last evaluation, in the order of
    /// [`Utilizations::checks`].
    pub fn labels(&self) -> Vec<String> {
        self.checks
            .governing()
            .iter()
            .map(|o| o.label.to_string())
            .collect()
    }

    /// The model as last evaluated.
    pub fn model(&self) -> &Model {
        &self.model
    }

    /// Evaluate at `values` of the varied `let`s, in the order given to
    /// [`Evaluator::new`].
    ///
    /// # Errors
    /// What a full build, solve and check at these values would give: a
    /// value out of its sane range, a mechanism, a check that cannot be
    /// evaluated.
    pub fn at(&mut self, values: &[Quantity]) -> Result<Evaluation, Vec<Error>> {
        self.rebuild
            .update(&mut self.model, values)
            .map_err(|es| es.into_iter().map(Error::from).collect::<Vec<_>>())?;
        let model = &self.model;
        let solved;
        let solution = match &self.fixed {
            Some(s) => s,
            None => {
                solved = if self.rebuild.moves_geometry() {
                    crate::solve::solve(model)
                } else {
                    self.resolver.solve(model)
                }
                .map_err(|e| vec![Error::from(e)])?;
                &solved
            }
        };
        let refs = &self.refs;
        let utilizations = utilizations(model, solution, refs, self.capacity, &mut self.checks)?;
        let shown = self
            .shown
            .iter()
            .map(|s| shown_value(model, solution, refs, s))
            .collect();
        Ok(Evaluation {
            utilizations,
            shown,
        })
    }
}

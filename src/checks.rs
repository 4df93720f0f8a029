//! Design checks evaluated on solved results: every `check` line and the
//! automatic material checks (`allowable*`), in every combination, plus
//! flags where a part passes its material's yield strength.

use crate::model::eval::{constant, eval, Scope};
use crate::model::{Kind, Model, ModelError};
use crate::solve::buckling::euler;
pub use crate::solve::buckling::{buckling, Buckling};
use crate::solve::capacity::Capacity;
use crate::solve::{CombinationResult, Solution};
use crate::syntax::ast::{Compare, ExprKind, Ident};
use crate::units::{Dimension, Quantity};
use foldhash::{HashMap, HashSet};

pub use crate::model::LOAD_FACTORS;

/// Where a check comes from.
#[derive(Clone, Debug, PartialEq)]
pub enum Origin {
    /// The index of a `check` line.
    Line(usize),
    /// A material allowable on a part (part index).
    Allowable(usize),
    /// Compression within the Euler load of a part or parallel group with a
    /// `buckling_length` (index into [`buckling`]'s list).
    Buckling(usize),
}

pub use crate::model::Label;

/// One check in one combination.
#[derive(Clone, Debug, PartialEq)]
pub struct Outcome {
    pub label: Label,
    pub origin: Origin,
    pub combination: usize,
    pub demand: Quantity,
    pub capacity: Quantity,
    pub op: Compare,
    /// Demand over capacity; `None` when the capacity is not positive.
    pub utilization: Option<f64>,
    pub pass: bool,
}

impl Outcome {
    /// The two sides as the check is written, `(left, right)`: for `<=`
    /// the demand and the capacity, for `>=` the value provided and the
    /// value required. A table shows `left op right`, which reads true
    /// exactly when the check passes.
    #[must_use]
    pub fn written(&self) -> (Quantity, Quantity) {
        match self.op {
            Compare::Le | Compare::Lt => (self.demand, self.capacity),
            Compare::Ge | Compare::Gt => (self.capacity, self.demand),
        }
    }
}

/// All outcomes, grouped by check in file order, combinations in order.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct Checks {
    pub outcomes: Vec<Outcome>,
    /// Parts stressed past yield: (combination, part, |σ| / yield).
    pub yielded: Vec<(usize, usize, f64)>,
}

impl Checks {
    /// A warning for each part stressed beyond its yield strength.
    pub fn beyond_yield(&self, model: &Model, solution: &Solution) -> Vec<crate::warning::Warning> {
        self.yielded
            .iter()
            .map(|&(k, pi, ratio)| crate::warning::Warning::BeyondYield {
                combination: solution.combinations[k].name.clone(),
                part: model.parts[pi].name.to_string(),
                ratio,
            })
            .collect()
    }

    /// Each check's governing outcome (highest utilization, failures first).
    pub fn governing(&self) -> Vec<&Outcome> {
        self.governing_indices()
            .into_iter()
            .map(|i| &self.outcomes[i])
            .collect()
    }

    /// Indices into `outcomes` of each check's governing outcome, in check order.
    pub fn governing_indices(&self) -> Vec<usize> {
        // a check's outcomes share its origin (and so its label); they
        // come one after another, so a check is looked for only at a new
        // run: among the few seen so far, or in a map once there are many
        const FEW: usize = 16;
        let mut order: Vec<usize> = Vec::new();
        let mut keys: Vec<OriginKey> = Vec::new();
        let mut map: Option<foldhash::HashMap<OriginKey, usize>> = None;
        let mut last: Option<(OriginKey, usize)> = None;
        for (i, o) in self.outcomes.iter().enumerate() {
            let key = OriginKey::of(&o.origin);
            let found = match (last, &map) {
                (Some((k, at)), _) if k == key => Some(at),
                (_, Some(m)) => m.get(&key).copied(),
                (_, None) => keys.iter().position(|k| *k == key),
            };
            match found {
                Some(k) => {
                    if outranks(o, &self.outcomes[order[k]]) {
                        order[k] = i;
                    }
                    last = Some((key, k));
                }
                None => {
                    last = Some((key, order.len()));
                    match &mut map {
                        Some(m) => {
                            m.insert(key, order.len());
                        }
                        None if keys.len() >= FEW => {
                            let mut m: foldhash::HashMap<OriginKey, usize> =
                                keys.iter().enumerate().map(|(at, k)| (*k, at)).collect();
                            m.insert(key, order.len());
                            map = Some(m);
                        }
                        None => keys.push(key),
                    }
                    order.push(i);
                }
            }
        }
        order
    }

    /// Checks that fail in some combination.
    pub fn failures(&self) -> usize {
        self.governing().iter().filter(|o| !o.pass).count()
    }

    /// The outcome with the highest utilization overall (within round-off,
    /// the first).
    pub fn highest(&self) -> Option<&Outcome> {
        self.outcomes
            .iter()
            .fold(None, |best: Option<&Outcome>, o| match best {
                Some(b) if !outranks(o, b) => Some(b),
                _ => Some(o),
            })
    }
}

/// A hashable form of [`Origin`].
#[derive(Clone, Copy, PartialEq, Eq, Hash)]
enum OriginKey {
    Line(usize),
    Allowable(usize),
    Buckling(usize),
}

impl OriginKey {
    fn of(o: &Origin) -> Self {
        match o {
            Origin::Line(i) => OriginKey::Line(*i),
            Origin::Allowable(i) => OriginKey::Allowable(*i),
            Origin::Buckling(i) => OriginKey::Buckling(*i),
        }
    }
}

fn rank(o: &Outcome) -> (bool, f64) {
    (!o.pass, o.utilization.unwrap_or(f64::INFINITY))
}

/// Whether `o` governs over `than`: it fails where `than` passes, or it has
/// the higher utilization by more than round-off (so that combinations tied
/// in exact arithmetic keep the first, whatever the order of the solve).
fn outranks(o: &Outcome, than: &Outcome) -> bool {
    let ((fa, ua), (fb, ub)) = (rank(o), rank(than));
    if fa != fb {
        return fa;
    }
    exceeds(ua, ub)
}

/// `a > b` by more than round-off: a relative 1e-9 of `b` (common practice).
#[must_use]
pub fn exceeds(a: f64, b: f64) -> bool {
    a > b && a - b > 1e-9 * b.abs()
}

/// A part or a node, by its index in the model.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Object {
    Part(usize),
    Node(usize),
}

/// Where each name the checks refer to lives in the model, found in one
/// pass over its lets, parts and nodes: evaluating a check then costs no
/// search through the model per reference (many checks on a large model
/// would otherwise cost checks × parts).
/// The names are owned, so that one `Refs` serves a model whose numbers
/// change from one evaluation to the next (a sweep's steps).
#[derive(Debug, Default)]
pub struct Refs<'a> {
    lets: HashMap<compact_str::CompactString, usize>,
    objects: HashMap<compact_str::CompactString, Object>,
    model: std::marker::PhantomData<&'a Model>,
}

impl Refs<'_> {
    /// The same lookups, free of the model's lifetime (the names are owned).
    #[must_use]
    pub fn into_owned(self) -> Refs<'static> {
        Refs {
            lets: self.lets,
            objects: self.objects,
            model: std::marker::PhantomData,
        }
    }
}

impl<'a> Refs<'a> {
    /// The names the model's checks refer to, and `extra` objects (the
    /// results a sweep tabulates).
    #[must_use]
    pub fn new(model: &'a Model, extra: &[&str]) -> Self {
        let mut wanted: HashSet<&str> = extra.iter().copied().collect();
        for c in &model.checks {
            for e in [&c.lhs, &c.rhs] {
                e.visit(&mut |x| match &x.kind {
                    ExprKind::Name(id) => {
                        wanted.insert(id.name.as_str());
                    }
                    ExprKind::Field(f) => {
                        wanted.insert(f[0].name.as_str());
                    }
                    _ => {}
                });
            }
        }
        let mut refs = Refs::default();
        if wanted.is_empty() {
            return refs;
        }
        // the first of a name wins, and a part before a node, as a search
        // through the model in that order would find
        for (i, l) in model.lets.iter().enumerate() {
            if wanted.contains(l.name.as_str()) {
                refs.lets.entry(l.name.as_str().into()).or_insert(i);
            }
        }
        for (i, p) in model.parts.iter().enumerate() {
            if wanted.contains(p.name.as_str()) {
                refs.objects
                    .entry(p.name.clone())
                    .or_insert(Object::Part(i));
            }
        }
        for (i, n) in model.nodes.iter().enumerate() {
            if wanted.contains(n.name.as_str()) {
                refs.objects
                    .entry(n.name.clone())
                    .or_insert(Object::Node(i));
            }
        }
        refs
    }
}

/// Looks up results of one combination while evaluating a check.
pub struct ResultScope<'a> {
    pub model: &'a Model,
    pub result: &'a CombinationResult,
    /// Built once for the model (`Refs::new`) and shared by every scope.
    pub refs: &'a Refs<'a>,
    /// The combination's capacity path, for `yield_factor` and `limit_factor`.
    pub capacity: Option<&'a Capacity>,
    /// The model combination index.
    pub combination: usize,
}

impl Scope for ResultScope<'_> {
    fn name(&self, id: &Ident) -> Result<Quantity, ModelError> {
        if let Some(v) = constant(&id.name) {
            return Ok(Quantity::number(v));
        }
        if let Some(&i) = self.refs.lets.get(id.name.as_str()) {
            return Ok(self.model.lets[i].value);
        }
        if !LOAD_FACTORS.contains(&id.name.as_str()) {
            return Err(ModelError::poisoned());
        }
        let combination = &self.model.combinations[self.combination].name;
        let no = |reason: String| ModelError::NoLoadFactor {
            name: id.name.to_string(),
            combination: combination.clone(),
            reason,
            span: id.span,
        };
        let Some(c) = self.capacity else {
            return Err(no(
                "no capacity path is traced: no material gives `yield`".into()
            ));
        };
        if let Some(note) = &c.note {
            return Err(no(note.clone()));
        }
        let v = if id.name == "yield_factor" {
            c.first_yield
                .ok_or_else(|| no("no part yields along the path".into()))?
        } else {
            c.limit.ok_or_else(|| {
                no(
                    "no plastic limit forms: parts without a yield strength keep carrying load"
                        .into(),
                )
            })?
        };
        Ok(Quantity::number(v))
    }

    fn field(&self, object: &Ident, field: &Ident) -> Result<Quantity, ModelError> {
        let m = self.model;
        let found = self.refs.objects.get(object.name.as_str()).copied();
        if let Some(Object::Part(i)) = found {
            let p = &self.result.parts[i];
            let part = &m.parts[i];
            return Ok(match field.name.as_str() {
                "length" => Quantity::new(part.length.value, Dimension::LENGTH),
                "euler_load" | "slenderness" => {
                    let found = euler(m, i);
                    let Some((pe, kl_r)) = found else {
                        return Err(ModelError::MissingKey {
                            block: format!("part `{}`", part.name),
                            key: "buckling_length",
                            span: field.span,
                            help: Some(format!(
                                "`.{}` needs the part's effective length: give `buckling_length` or `buckling_factor` and a `section`",
                                field.name
                            )),
                        });
                    };
                    if field.name == "euler_load" {
                        Quantity::new(pe, Dimension::FORCE)
                    } else {
                        Quantity::number(kl_r)
                    }
                }
                "moment_a" | "moment_b" | "moment" | "shear" | "deflection" => {
                    let b = self.result.beam(i).ok_or_else(ModelError::poisoned)?;
                    let moment = Dimension::MOMENT;
                    match field.name.as_str() {
                        "moment_a" => Quantity::new(b.end_moments_along()[0], moment),
                        "moment_b" => Quantity::new(b.end_moments_along()[1], moment),
                        "moment" => Quantity::new(b.moment_max.0, moment),
                        "shear" => Quantity::new(b.shear_max, Dimension::FORCE),
                        _ => Quantity::new(b.deflection_max.0, Dimension::LENGTH),
                    }
                }
                "force" => Quantity::new(p.force.value, Dimension::FORCE),
                "stress" => Quantity::new(p.stress.map_or(0.0, |s| s.value), Dimension::PRESSURE),
                "strain" => Quantity::number(p.strain),
                _ => Quantity::new(p.elongation.value, Dimension::LENGTH),
            });
        }
        if let Some(Object::Node(i)) = found {
            let n = &self.result.nodes[i];
            return Ok(match (m.kind, field.name.as_str()) {
                (Kind::Axial, "displacement") | (Kind::Plane, "dx") => {
                    Quantity::new(n.displacement[0].value, Dimension::LENGTH)
                }
                (Kind::Plane, "dy") => Quantity::new(n.displacement[1].value, Dimension::LENGTH),
                (Kind::Plane, "ry") => Quantity::new(n.reaction[1].value, Dimension::FORCE),
                (Kind::Plane, "rotation") => Quantity::number(n.rotation),
                (Kind::Plane, "mz") => Quantity::new(n.reaction_moment, Dimension::MOMENT),
                _ => Quantity::new(n.reaction[0].value, Dimension::FORCE),
            });
        }
        Err(ModelError::poisoned())
    }
}

fn outcome(
    label: Label,
    origin: Origin,
    combination: usize,
    lhs: Quantity,
    op: Compare,
    rhs: Quantity,
) -> Outcome {
    let (demand, capacity, utilization, pass) = judge(lhs, op, rhs);
    Outcome {
        label,
        origin,
        combination,
        demand,
        capacity,
        op,
        utilization,
        pass,
    }
}

/// A check's `lhs op rhs` judged: the demand, the capacity, the
/// utilization and whether it passes.
fn judge(lhs: Quantity, op: Compare, rhs: Quantity) -> (Quantity, Quantity, Option<f64>, bool) {
    // Sides equal within round-off (`exceeds`) count as equal: a stress of
    // 1 kN over 10 mm² against 100 MPa passes `<=` and fails `<`, although
    // the floating-point quotient is a last digit above 100 MPa.
    let (l, r) = (lhs.value, rhs.value);
    let pass = !l.is_nan()
        && !r.is_nan()
        && match op {
            Compare::Le => !exceeds(l, r),
            Compare::Lt => exceeds(r, l),
            Compare::Ge => !exceeds(r, l),
            Compare::Gt => exceeds(l, r),
        };
    // For `a <= b` the demand is a and the capacity b; for `a >= b` the
    // requirement reads "a must reach b", so b is the demand.
    let (demand, capacity) = match op {
        Compare::Le | Compare::Lt => (lhs, rhs),
        Compare::Ge | Compare::Gt => (rhs, lhs),
    };
    let utilization = if capacity.value > 0.0 {
        Some(demand.value / capacity.value)
    } else if capacity.value == 0.0 && demand.value <= 0.0 {
        Some(0.0)
    } else {
        None
    };
    (demand, capacity, utilization, pass)
}

/// Evaluate every check in every combination.
///
/// # Errors
/// A check that cannot be evaluated (e.g. a division by a zero result).
pub fn evaluate(model: &Model, solution: &Solution) -> Result<Checks, ModelError> {
    evaluate_with(model, solution, &Refs::new(model, &[]))
}

/// [`evaluate`] with the model's names already looked up (`refs` must
/// come from `Refs::new` on this model).
///
/// # Errors
/// As [`evaluate`].
pub fn evaluate_with(
    model: &Model,
    solution: &Solution,
    refs: &Refs<'_>,
) -> Result<Checks, ModelError> {
    evaluate_state(model, solution, refs, None, &[])
}

/// [`evaluate_with`] in one state: the short-term one (`long_of` `None`:
/// `solution`'s combinations are the model's), or the long-term one, whose
/// `k`-th state is model combination `long_of[k]`. Each check is evaluated
/// where its `under` lets it apply; `capacity` gives `yield_factor` and
/// `limit_factor` (empty: none traced).
///
/// # Errors
/// As [`evaluate`].
pub fn evaluate_state(
    model: &Model,
    solution: &Solution,
    refs: &Refs<'_>,
    long_of: Option<&[usize]>,
    capacity: &[Capacity],
) -> Result<Checks, ModelError> {
    let mut out = Checks::default();
    evaluate_into(model, solution, refs, long_of, capacity, &mut out)?;
    Ok(out)
}

/// Outcomes written over the list of an earlier evaluation of the same
/// model: an outcome of the same origin in the same place keeps its label
/// (the label depends on the origin alone). Counting a shared label up and
/// down once per outcome costs more than the rest of the outcome.
struct Writer<'c> {
    list: &'c mut Vec<Outcome>,
    at: usize,
}

impl Writer<'_> {
    fn put(
        &mut self,
        origin: Origin,
        label: impl FnOnce() -> Label,
        combination: usize,
        lhs: Quantity,
        op: Compare,
        rhs: Quantity,
    ) {
        match self.list.get_mut(self.at) {
            Some(o) if o.origin == origin => {
                let (demand, capacity, utilization, pass) = judge(lhs, op, rhs);
                o.combination = combination;
                o.demand = demand;
                o.capacity = capacity;
                o.op = op;
                o.utilization = utilization;
                o.pass = pass;
            }
            Some(o) => *o = outcome(label(), origin, combination, lhs, op, rhs),
            None => self
                .list
                .push(outcome(label(), origin, combination, lhs, op, rhs)),
        }
        self.at += 1;
    }
}

/// [`evaluate_state`] into `out`, which is empty or holds an earlier
/// evaluation of this model (a sweep's last step): its lists are written
/// over rather than made again.
///
/// # Errors
/// As [`evaluate`]; `out` then holds part of the evaluation.
pub fn evaluate_into(
    model: &Model,
    solution: &Solution,
    refs: &Refs<'_>,
    long_of: Option<&[usize]>,
    capacity: &[Capacity],
    out: &mut Checks,
) -> Result<(), ModelError> {
    out.yielded.clear();
    out.outcomes
        .reserve(model.checks.len() * solution.combinations.len() + model.parts.len());
    let mut w = Writer {
        list: &mut out.outcomes,
        at: 0,
    };
    for (ci, check) in model.checks.iter().enumerate() {
        for (k, result) in solution.combinations.iter().enumerate() {
            let combination = long_of.map_or(k, |m| m[k]);
            if !check.applies.to(combination, long_of.is_some()) {
                continue;
            }
            let scope = ResultScope {
                model,
                result,
                refs,
                capacity: capacity.iter().find(|c| c.combination == combination),
                combination,
            };
            let l = eval(&check.lhs, &scope)?;
            let r = eval(&check.rhs, &scope)?;
            w.put(Origin::Line(ci), || check.label.clone(), k, l, check.op, r);
        }
    }
    for (pi, part) in model.parts.iter().enumerate() {
        let Some(mi) = part.material() else { continue };
        let mat = &model.materials[mi];
        let tension = mat.allowable_tension.or(mat.allowable);
        let compression = mat.allowable_compression.or(mat.allowable);
        if tension.is_none() && compression.is_none() {
            continue;
        }
        // one check per part whatever the sense: one label for all, made
        // when first needed
        let mut label: Option<Label> = None;
        for (k, result) in solution.combinations.iter().enumerate() {
            // a beam has two extreme fibres, N/A + M·c/I and N/A − M·c/I,
            // each against the allowable of its own sense; the one nearer
            // its allowable governs
            let (both, one);
            let fibres: &[f64] = match (&part.bend, part.area()) {
                (Some(bend), Some(area)) => {
                    let axial = result.parts[pi].force.value / area.value;
                    let bending = result
                        .beams
                        .binary_search_by_key(&pi, |b| b.part)
                        .map_or(0.0, |b| {
                            result.beams[b].moment_max.0.abs() * bend.fibre / bend.inertia
                        });
                    both = [axial + bending, axial - bending];
                    &both
                }
                _ => {
                    one = [result.parts[pi].stress.map_or(0.0, |s| s.value)];
                    &one
                }
            };
            let governing = fibres
                .iter()
                .filter_map(|&sigma| {
                    let (demand, limit, sense) = if sigma >= 0.0 {
                        (sigma, tension, "tension")
                    } else {
                        (-sigma, compression, "compression")
                    };
                    limit.map(|l| (demand, l, sense))
                })
                .max_by(|a, b| (a.0 / a.1.value).total_cmp(&(b.0 / b.1.value)));
            let Some((demand, limit, _)) = governing else {
                continue;
            };
            w.put(
                Origin::Allowable(pi),
                || {
                    label
                        .get_or_insert_with(|| {
                            format!("{}: stress within allowable ({})", part.name, mat.name).into()
                        })
                        .clone()
                },
                k,
                Quantity::new(demand, Dimension::PRESSURE),
                Compare::Le,
                Quantity::new(limit.value, Dimension::PRESSURE),
            );
        }
    }
    // A compression part or group past its Euler load (times its
    // `euler_fraction`) fails, like an allowable.
    // A part of a parallel group (a filled pipe) buckles with its group,
    // not alone: the group's check gates it.
    let list = buckling(model, solution);
    let mut grouped = crate::FixedSet::default();
    for b in list.iter().filter(|b| b.parts.len() > 1) {
        grouped.extend(b.parts.iter().copied());
    }
    for (bi, b) in list.iter().enumerate() {
        if b.parts.len() == 1 && grouped.contains(&b.parts[0]) {
            continue;
        }
        let mut label: Option<Label> = None;
        for (k, result) in solution.combinations.iter().enumerate() {
            let compression = -b
                .parts
                .iter()
                .map(|&i| result.parts[i].force.value)
                .sum::<f64>();
            w.put(
                Origin::Buckling(bi),
                || {
                    label
                        .get_or_insert_with(|| {
                            format!(
                                "{}: compression within Euler load",
                                b.parts
                                    .iter()
                                    .map(|&i| model.parts[i].name.as_str())
                                    .collect::<Vec<_>>()
                                    .join(" + ")
                            )
                            .into()
                        })
                        .clone()
                },
                k,
                Quantity::new(compression.max(0.0), Dimension::FORCE),
                Compare::Le,
                Quantity::new(b.euler_fraction * b.euler, Dimension::FORCE),
            );
        }
    }
    let end = w.at;
    out.outcomes.truncate(end);
    for (k, result) in solution.combinations.iter().enumerate() {
        for (pi, part) in model.parts.iter().enumerate() {
            let Some(mi) = part.material() else { continue };
            let mat = &model.materials[mi];
            let sigma = result.parts[pi].stress.map_or(0.0, |s| s.value);
            let fy = if sigma < 0.0 {
                mat.yield_compression.or(mat.yield_strength)
            } else {
                mat.yield_strength
            };
            if let Some(fy) = fy {
                if sigma.abs() > fy.value {
                    out.yielded.push((k, pi, sigma.abs() / fy.value));
                }
            }
        }
    }
    Ok(())
}

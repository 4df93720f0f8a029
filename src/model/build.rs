//! Syntax tree to [`Model`]: every name resolved, every expression evaluated
//! and its dimension checked. All errors in a file are collected.

use std::collections::BTreeMap;

use foldhash::{HashMap, HashMapExt, HashSet, HashSetExt};

use uom::si::area::square_meter;
use uom::si::f64::{
    Area, Force, Length, Pressure, Ratio, TemperatureCoefficient, TemperatureInterval,
};
use uom::si::force::newton;
use uom::si::length::meter;
use uom::si::pressure::pascal;
use uom::si::ratio::ratio;
use uom::si::surface_tension::newton_per_meter;
use uom::si::temperature_coefficient::per_kelvin;
use uom::si::temperature_interval::kelvin;

use super::eval::{constant, eval, eval_val, Scope, Val, CONSTANTS, FUNCTIONS};
use super::{
    did_you_mean, range, Applies, Carries, Case, Check, Combination, FreeStrain, Kind, Law,
    LetValue, Load, Material, Model, ModelError, Node, Part, Rigid, Settlement, State, Stiffness,
    Temperature, Tie, Title, UnitChoice,
};
use crate::source::Span;
use crate::syntax::ast::{self, Axis, Coord, Decl, Entry, Expr, ExprKind, Ident, Stmt, Value};
use crate::units::{Dimension, Quantity};

/// Size limits, so that hostile input gets a diagnostic, not exhaustion.
#[derive(Clone, Copy, Debug)]
pub struct Limits {
    pub max_declarations: usize,
    pub max_name_len: usize,
}

impl Default for Limits {
    fn default() -> Self {
        Self {
            max_declarations: 5_000_000,
            max_name_len: 128,
        }
    }
}

/// What a declared name stands for.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum NameKind {
    Let,
    Material,
    Node,
    Part,
    Rigid,
    Case,
    Combination,
    Group,
}

impl NameKind {
    /// How many kinds there are.
    const COUNT: usize = NameKind::Group as usize + 1;

    fn word(self) -> &'static str {
        match self {
            NameKind::Let => "value",
            NameKind::Material => "material",
            NameKind::Node => "node",
            NameKind::Part => "part",
            NameKind::Rigid => "rigid body",
            NameKind::Case => "case",
            NameKind::Combination => "combination",
            NameKind::Group => "group",
        }
    }
}

/// The declared names of a file. The table holds only the position of each
/// first declaration in the file's list, so that it stays small (a few
/// bytes a name) and a lookup among millions of names touches little
/// memory; the name itself is compared in the declaration, which for names
/// looked up in file order is close to the last one. Large files split the
/// table into shards by hash, one filled on each core.
struct Names<'a> {
    shards: Vec<hashbrown::HashTable<u32>>,
    hasher: foldhash::fast::FixedState,
    /// For each declaration, its number among the declarations of its kind.
    number: Vec<u32>,
    file: &'a ast::File,
    /// Suggestions left to make: each scans every name of a kind, so a file
    /// with thousands of wrong names gets suggestions for the first ones
    /// only (the rest are not shown anyway).
    suggestions: std::sync::atomic::AtomicUsize,
}

impl<'a> Names<'a> {
    /// The name declared by declaration `i`.
    fn declared(&self, i: u32) -> Option<(&'a Ident, NameKind)> {
        declared_name(&self.file.decls[i as usize])
    }

    fn position(&self, name: &str) -> Option<u32> {
        let hash = std::hash::BuildHasher::hash_one(&self.hasher, name);
        self.shards[shard(hash, self.shards.len())]
            .find(hash, |&i| {
                self.declared(i).is_some_and(|(id, _)| id.name == name)
            })
            .copied()
    }

    fn get(&self, name: &str) -> Option<(NameKind, usize, Span)> {
        let i = self.position(name)?;
        let (id, kind) = self.declared(i)?;
        Some((kind, self.number[i as usize] as usize, id.span))
    }

    /// The registered names of `kind`, in file order (a duplicate is left
    /// out: only its first declaration is registered).
    fn of_kind(&self, kind: NameKind) -> impl Iterator<Item = &'a str> + '_ {
        self.file
            .decls
            .iter()
            .enumerate()
            .filter_map(move |(i, d)| {
                let (id, k) = declared_name(d)?;
                let first = self.position(&id.name) == u32::try_from(i).ok();
                (k == kind && first).then_some(id.name.as_str())
            })
    }

    /// The closest name of `kind`, while the budget of suggestions lasts.
    fn suggest(&self, name: &str, kind: NameKind) -> Option<String> {
        self.suggest_among(name, self.of_kind(kind))
    }

    /// The closest of `candidates`, while the budget of suggestions lasts.
    fn suggest_among<'c>(
        &self,
        name: &str,
        candidates: impl IntoIterator<Item = &'c str>,
    ) -> Option<String> {
        use std::sync::atomic::Ordering;
        let left = self
            .suggestions
            .fetch_update(Ordering::Relaxed, Ordering::Relaxed, |n| n.checked_sub(1));
        if left.is_err() {
            return None;
        }
        did_you_mean(name, candidates)
    }

    /// Resolve a name that must be of `kind`, with a suggestion when not.
    fn resolve(&self, id: &Ident, kind: NameKind) -> Result<usize, ModelError> {
        match self.get(&id.name) {
            Some((k, i, _)) if k == kind => Ok(i),
            Some((k, _, _)) => Err(ModelError::WrongKind {
                name: id.name.to_string(),
                found: k.word(),
                expected: kind.word(),
                span: id.span,
                help: self.suggest(&id.name, kind),
            }),
            None => Err(ModelError::UnknownName {
                kind: kind.word(),
                name: id.name.to_string(),
                span: id.span,
                help: self.suggest(&id.name, kind).or_else(|| {
                    let all: Vec<_> = self.of_kind(kind).take(6).collect();
                    if all.is_empty() {
                        Some(format!("the file declares no {}", kind.word()))
                    } else {
                        Some(format!(
                            "the {}s are {}",
                            kind.word(),
                            all.iter()
                                .map(|n| format!("`{n}`"))
                                .collect::<Vec<_>>()
                                .join(", ")
                        ))
                    }
                }),
            }),
        }
    }
}

/// Resolves `let` names while evaluating.
struct LetScope<'a, 'n> {
    names: &'n Names<'a>,
    values: &'n [Option<Result<Quantity, ()>>],
}

impl Scope for LetScope<'_, '_> {
    fn name(&self, id: &Ident) -> Result<Quantity, ModelError> {
        if let Some(v) = constant(&id.name) {
            return Ok(Quantity::number(v));
        }
        match self.names.get(&id.name) {
            Some((NameKind::Let, i, _)) => match self.values.get(i) {
                Some(Some(Ok(q))) => Ok(*q),
                _ => Err(ModelError::poisoned()),
            },
            Some((k, _, _)) => Err(ModelError::WrongKind {
                name: id.name.to_string(),
                found: k.word(),
                expected: "value",
                span: id.span,
                help: if matches!(k, NameKind::Part | NameKind::Node) {
                    Some(format!(
                        "results such as `{}.force` can be used in a `check`",
                        id.name
                    ))
                } else {
                    None
                },
            }),
            None => Err(ModelError::UnknownName {
                kind: "name",
                name: id.name.to_string(),
                span: id.span,
                help: self
                    .names
                    .suggest_among(
                        &id.name,
                        self.names
                            .of_kind(NameKind::Let)
                            .chain(CONSTANTS.iter().copied()),
                    )
                    .or_else(|| crate::units::temperature_hint(&id.name).map(str::to_string))
                    .or_else(|| Some(format!("declare it with `let {} = ...`", id.name))),
            }),
        }
    }

    fn field(&self, object: &Ident, field: &Ident) -> Result<Quantity, ModelError> {
        Err(ModelError::ResultOutsideCheck {
            name: format!("{}.{}", object.name, field.name),
            span: object.span.to(field.span),
        })
    }
}

/// Results a check may use, and their dimensions.
pub(crate) const PART_FIELDS: &[(&str, Dimension)] = &[
    ("force", Dimension::FORCE),
    ("stress", Dimension::PRESSURE),
    ("strain", Dimension::NONE),
    ("elongation", Dimension::LENGTH),
    ("length", Dimension::LENGTH),
    ("euler_load", Dimension::FORCE),
    ("slenderness", Dimension::NONE),
];
pub(crate) const AXIAL_NODE_FIELDS: &[(&str, Dimension)] = &[
    ("displacement", Dimension::LENGTH),
    ("reaction", Dimension::FORCE),
];
pub(crate) const PLANE_NODE_FIELDS: &[(&str, Dimension)] = &[
    ("dx", Dimension::LENGTH),
    ("dy", Dimension::LENGTH),
    ("rx", Dimension::FORCE),
    ("ry", Dimension::FORCE),
];

/// Checks are validated by dimension only: every result stands at one SI
/// unit of its dimension, and the evaluator lets no value (a root of a
/// negative, a division by zero) refuse a check that results in other
/// combinations make valid ([`Scope::validating`]).
struct CheckScope<'a, 'n> {
    lets: LetScope<'a, 'n>,
    kind: Kind,
}

impl Scope for CheckScope<'_, '_> {
    fn validating(&self) -> bool {
        true
    }

    fn name(&self, id: &Ident) -> Result<Quantity, ModelError> {
        // the load factors of the capacity path, unless a `let` takes the name
        if self.lets.names.get(&id.name).is_none()
            && crate::checks::LOAD_FACTORS.contains(&id.name.as_str())
        {
            return Ok(Quantity::number(1.0));
        }
        self.lets.name(id)
    }

    fn field(&self, object: &Ident, field: &Ident) -> Result<Quantity, ModelError> {
        let (on, fields) = match self.lets.names.get(&object.name) {
            Some((NameKind::Part, _, _)) => ("part", PART_FIELDS),
            Some((NameKind::Node, _, _)) => (
                "node",
                match self.kind {
                    Kind::Axial => AXIAL_NODE_FIELDS,
                    Kind::Plane => PLANE_NODE_FIELDS,
                },
            ),
            Some((k, _, _)) => {
                return Err(ModelError::WrongKind {
                    name: object.name.to_string(),
                    found: k.word(),
                    expected: "part or node",
                    span: object.span,
                    help: None,
                })
            }
            None => {
                return Err(ModelError::UnknownName {
                    kind: "part or node",
                    name: object.name.to_string(),
                    span: object.span,
                    help: self.lets.names.suggest_among(
                        &object.name,
                        self.lets
                            .names
                            .of_kind(NameKind::Part)
                            .chain(self.lets.names.of_kind(NameKind::Node)),
                    ),
                })
            }
        };
        match fields.iter().find(|(f, _)| *f == field.name) {
            Some((_, dim)) => Ok(Quantity::new(1.0, *dim)),
            None => Err(ModelError::UnknownField {
                field: field.name.to_string(),
                on,
                name: object.name.to_string(),
                span: field.span,
                help: Some(
                    did_you_mean(&field.name, fields.iter().map(|(f, _)| *f)).unwrap_or_else(
                        || {
                            format!(
                                "a {on} has {}",
                                fields
                                    .iter()
                                    .map(|(f, _)| format!("`{f}`"))
                                    .collect::<Vec<_>>()
                                    .join(", ")
                            )
                        },
                    ),
                ),
            }),
        }
    }
}

/// Build the checked model of a parsed file.
///
/// # Errors
/// Every problem found, in file order.
pub fn build(file: &ast::File, limits: Limits) -> Result<Model, Vec<ModelError>> {
    Builder::new(limits).run(file)
}

/// The shard of the name table a hash belongs to: bits that neither the
/// table's bucket index (low bits) nor its tag (top seven) use.
fn shard(hash: u64, shards: usize) -> usize {
    ((hash >> 32) & 0xFF_FFFF) as usize % shards
}

/// One shard of the name table, and the errors found filling it, each with
/// its declaration's position.
type Shard = (hashbrown::HashTable<u32>, Vec<(usize, ModelError)>);

/// Register the names whose hash falls in shard `which` of `shards`, in
/// file order: the table of first declarations, and the errors (names too
/// long, reserved words, duplicates), each with its declaration's position.
fn fill_shard(
    file: &ast::File,
    hasher: &foldhash::fast::FixedState,
    which: usize,
    shards: usize,
    limits: Limits,
) -> Shard {
    use std::hash::BuildHasher;
    let mut table = hashbrown::HashTable::with_capacity(file.decls.len() / shards + 16);
    let mut errors = Vec::new();
    let name_at = |j: u32| declared_name(&file.decls[j as usize]).map(|(id, _)| id);
    for (i, d) in file.decls.iter().enumerate() {
        let Some((id, _)) = declared_name(d) else {
            continue;
        };
        let hash = hasher.hash_one(id.name.as_str());
        if shard(hash, shards) != which {
            continue;
        }
        if id.name.len() > limits.max_name_len {
            errors.push((i, ModelError::TooMany {
                what: "characters in a name",
                count: id.name.len(),
                limit: limits.max_name_len,
                span: id.span,
                help: Some("use a shorter name; the title block and comments can carry a longer description".into()),
            }));
        }
        if let Some(what) = reserved(&id.name) {
            errors.push((
                i,
                ModelError::Reserved {
                    name: id.name.to_string(),
                    what,
                    span: id.span,
                },
            ));
        }
        match table.entry(
            hash,
            |&j| name_at(j).is_some_and(|n| n.name == id.name),
            |&j| name_at(j).map_or(0, |n| hasher.hash_one(n.name.as_str())),
        ) {
            hashbrown::hash_table::Entry::Occupied(o) => {
                let first = name_at(*o.get()).map_or(id.span, |n| n.span);
                errors.push((
                    i,
                    ModelError::Duplicate {
                        name: id.name.to_string(),
                        span: id.span,
                        first,
                    },
                ));
            }
            hashbrown::hash_table::Entry::Vacant(v) => {
                // at most `max_declarations` (checked before), far below 2^32
                v.insert(u32::try_from(i).unwrap_or(u32::MAX));
            }
        }
    }
    (table, errors)
}

/// The name a declaration declares, and what it stands for.
fn declared_name(d: &Decl) -> Option<(&Ident, NameKind)> {
    Some(match d {
        Decl::Let(l) => (&l.name, NameKind::Let),
        Decl::Material(nb) => (&nb.name, NameKind::Material),
        Decl::Part(nb) => (&nb.name, NameKind::Part),
        Decl::Rigid(nb) => (&nb.name, NameKind::Rigid),
        Decl::Node(n) => (&n.name, NameKind::Node),
        Decl::Case(c) => (&c.name, NameKind::Case),
        Decl::Combine(c) => (&c.name, NameKind::Combination),
        Decl::Group(g) => (&g.name, NameKind::Group),
        _ => return None,
    })
}

/// What a name already means (a unit, a function or a constant), if it
/// cannot be declared: one lookup in a table of every such word.
fn reserved(name: &str) -> Option<&'static str> {
    static WORDS: std::sync::OnceLock<HashMap<&'static str, &'static str>> =
        std::sync::OnceLock::new();
    let words = WORDS.get_or_init(|| {
        let mut m = HashMap::new();
        // units first: a word that is both is reported as a unit
        for u in crate::units::units() {
            m.entry(u.name).or_insert("a unit");
        }
        for f in FUNCTIONS {
            m.entry(*f).or_insert("a function");
        }
        for c in CONSTANTS {
            m.entry(*c).or_insert("a constant");
        }
        m
    });
    words.get(name).copied()
}

/// For each declaration of `kind`, its place among the `built` items of
/// that kind (`None` if it did not build); empty when every one built, the
/// i-th declared then being the i-th built. Read with [`place`].
fn places<'n>(
    names: &Names<'_>,
    kind: NameKind,
    declared: usize,
    built: impl ExactSizeIterator<Item = &'n str>,
) -> Vec<Option<usize>> {
    if built.len() == declared {
        return Vec::new();
    }
    let mut at = vec![None; declared];
    for (k, name) in built.enumerate() {
        if let Some((found, i, _)) = names.get(name) {
            if found == kind {
                at[i].get_or_insert(k);
            }
        }
    }
    at
}

/// The place among the built items of declaration number `i` (see [`places`]).
fn place(at: &[Option<usize>], i: usize) -> Option<usize> {
    if at.is_empty() {
        Some(i)
    } else {
        at.get(i).copied().flatten()
    }
}

/// What a case refers to: the built materials, parts and nodes, and for
/// each part declaration its place among the parts (empty when all built).
#[derive(Clone, Copy)]
struct Built<'m> {
    materials: &'m [Material],
    parts: &'m [Part],
    part_at: &'m [Option<usize>],
    nodes: &'m [Node],
    kind: Kind,
}

/// The materials that built, and their places (see [`places`]).
type Materials<'m> = (&'m [Material], &'m [Option<usize>]);

/// Build with some `let`s given fixed values instead of their expressions
/// (a parameter sweep re-evaluates a parsed file this way, without parsing
/// it again).
///
/// # Errors
/// As [`build`].
pub fn build_with(
    file: &ast::File,
    limits: Limits,
    overrides: &[(String, Quantity)],
) -> Result<Model, Vec<ModelError>> {
    let mut b = Builder::new(limits);
    b.overrides = overrides.to_vec();
    b.run(file)
}

struct Builder {
    errors: Vec<ModelError>,
    limits: Limits,
    /// Materials whose `alpha` is written but did not evaluate.
    alpha_failed: HashSet<String>,
    overrides: Vec<(String, Quantity)>,
    /// Published sources behind each `let`, by name.
    let_sources: HashMap<String, Vec<&'static str>>,
}

fn push_err<T>(errors: &mut Vec<ModelError>, r: Result<T, ModelError>) -> Option<T> {
    match r {
        Ok(v) => Some(v),
        Err(e) => {
            if !e.is_poisoned() {
                errors.push(e);
            }
            None
        }
    }
}

/// What a block declares, for messages (`part \`p1\``); written out only
/// when a message needs it, not once per part.
#[derive(Clone, Copy)]
struct What<'a> {
    kind: &'static str,
    name: Option<&'a str>,
}

impl<'a> What<'a> {
    fn named(kind: &'static str, name: &'a str) -> Self {
        Self {
            kind,
            name: Some(name),
        }
    }
}

impl std::fmt::Display for What<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self.name {
            Some(n) => write!(f, "{} `{n}`", self.kind),
            None => f.write_str(self.kind),
        }
    }
}

/// A block's entries by key: a short list searched in order (a block has a
/// dozen keys at most), cheaper than a map for each of a million parts.
struct Keys<'a>(Vec<(&'static str, &'a Entry)>);

impl<'a> Keys<'a> {
    fn get(&self, key: &str) -> Option<&'a Entry> {
        self.0.iter().find(|(k, _)| *k == key).map(|(_, e)| *e)
    }

    fn contains_key(&self, key: &str) -> bool {
        self.get(key).is_some()
    }

    fn insert(&mut self, key: &'static str, e: &'a Entry) {
        self.0.push((key, e));
    }
}

/// The entries of one block, by key, after unknown and repeated keys.
struct Fields<'a> {
    block: What<'a>,
    span: Span,
    map: Keys<'a>,
}

/// An input value: evaluated, of dimension `dim`, and within the sane range
/// of its kind ([`super::range`]). `what` names it for messages.
fn typed(
    e: &Expr,
    dim: Dimension,
    what: impl Fn() -> String,
    scope: &dyn Scope,
) -> Result<Quantity, ModelError> {
    let q = eval(e, scope)?;
    if q.dim != dim {
        return Err(ModelError::WrongDimension {
            what: what(),
            expected: dim.describe(),
            found: q.dim.describe(),
            span: e.span,
            help: example_for(dim),
        });
    }
    ModelError::guard(q, what, e.span)
}

fn example_for(dim: Dimension) -> Option<String> {
    dim.example()
        .map(|e| format!("expected {} such as {e}", dim.describe()))
}

impl<'a> Fields<'a> {
    fn new(
        block: &'a ast::Block,
        what: What<'a>,
        keys: &[&'static str],
        errors: &mut Vec<ModelError>,
    ) -> Self {
        let mut map = Keys(Vec::with_capacity(block.entries.len()));
        for e in &block.entries {
            match keys.iter().find(|k| **k == e.key.name) {
                Some(k) => {
                    if let Some(first) = map.get(k) {
                        errors.push(ModelError::DuplicateKey {
                            key: e.key.name.to_string(),
                            block: what.to_string(),
                            span: e.key.span,
                            first: first.key.span,
                        });
                    } else {
                        map.insert(k, e);
                    }
                }
                None => errors.push(ModelError::UnknownKey {
                    key: e.key.name.to_string(),
                    block: what.to_string(),
                    span: e.key.span,
                    help: Some(
                        did_you_mean(&e.key.name, keys.iter().copied()).unwrap_or_else(|| {
                            format!(
                                "the keys are {}",
                                keys.iter()
                                    .map(|k| format!("`{k}`"))
                                    .collect::<Vec<_>>()
                                    .join(", ")
                            )
                        }),
                    ),
                }),
            }
        }
        Self {
            block: what,
            span: block.span,
            map,
        }
    }

    fn has(&self, key: &str) -> bool {
        self.map.contains_key(key)
    }

    fn missing(&self, key: &'static str, help: Option<String>) -> ModelError {
        ModelError::MissingKey {
            block: self.block.to_string(),
            key,
            span: self.span,
            help,
        }
    }

    /// The single expression of a key.
    fn expr(&self, key: &str) -> Option<Result<&'a Expr, ModelError>> {
        let e = self.map.get(key)?;
        Some(match &e.value {
            Value::Exprs(list) if list.len() == 1 => Ok(&list[0]),
            Value::Exprs(list) => Err(ModelError::Expected {
                expected: format!("one value for `{key}`"),
                span: list[0].span.to(list[list.len() - 1].span),
                found: format!("{} values", list.len()),
                help: None,
            }),
            Value::Str(s) => Err(ModelError::Expected {
                expected: format!("a value for `{key}`, not a string"),
                span: s.span,
                found: "a string".into(),
                help: None,
            }),
        })
    }

    /// A key's value, checked to have `dim`.
    fn quantity(
        &self,
        key: &str,
        dim: Dimension,
        scope: &dyn Scope,
    ) -> Option<Result<Quantity, ModelError>> {
        let e = match self.expr(key)? {
            Ok(e) => e,
            Err(err) => return Some(Err(err)),
        };
        Some(typed(
            e,
            dim,
            || format!("`{key}` of {}", self.block),
            scope,
        ))
    }

    /// A key whose value is a list of bare names.
    fn names(&self, key: &str) -> Option<Result<Vec<&'a Ident>, ModelError>> {
        let e = self.map.get(key)?;
        Some(match &e.value {
            Value::Exprs(list) => list
                .iter()
                .map(|x| match &x.kind {
                    ExprKind::Name(id) => Ok(id),
                    // `node m at ...` is refused (`m` is a unit); its uses
                    // say why rather than only that `m` is not a name.
                    ExprKind::Unit(u) if u.factors.len() == 1 && u.factors[0].power == 1 => {
                        Err(ModelError::Expected {
                            expected: "a name".into(),
                            span: x.span,
                            found: format!("`{}`, which is a unit", u.factors[0].name),
                            help: Some(
                                "unit names cannot name nodes, parts or materials; \
                                 rename the declaration and its uses (e.g. `m_1`)"
                                    .into(),
                            ),
                        })
                    }
                    _ => Err(ModelError::Expected {
                        expected: "a name".into(),
                        span: x.span,
                        found: "not a plain name".into(),
                        help: None,
                    }),
                })
                .collect(),
            Value::Str(s) => Err(ModelError::Expected {
                expected: "a name, without quotes".into(),
                span: s.span,
                found: "a string".into(),
                help: None,
            }),
        })
    }
}

fn si_length(q: Quantity) -> Length {
    Length::new::<meter>(q.value)
}

fn si_pressure(q: Quantity) -> Pressure {
    Pressure::new::<pascal>(q.value)
}

fn si_force(q: Quantity) -> Force {
    Force::new::<newton>(q.value)
}

/// Count the unit names an expression writes.
fn walk_units(e: &Expr, counts: &mut BTreeMap<String, usize>) {
    e.visit(&mut |x| {
        if let ExprKind::Quantity { unit: Some(u), .. } | ExprKind::Unit(u) = &x.kind {
            for f in &u.factors {
                match counts.get_mut(f.name.as_str()) {
                    Some(c) => *c += 1,
                    None => {
                        counts.insert(f.name.to_string(), 1);
                    }
                }
            }
        }
    });
}

/// Names a bare expression refers to (for ordering `let`s).
fn walk_names<'e>(e: &'e Expr, out: &mut Vec<&'e Ident>) {
    e.visit(&mut |x| {
        if let ExprKind::Name(id) = &x.kind {
            out.push(id);
        }
    });
}

fn decl_exprs<'e>(d: &'e Decl, out: &mut Vec<&'e Expr>) {
    let block = |b: &'e ast::Block, out: &mut Vec<&'e Expr>| {
        for e in &b.entries {
            if let Value::Exprs(list) = &e.value {
                out.extend(list.iter());
            }
        }
    };
    let coord = |c: &'e Coord, out: &mut Vec<&'e Expr>| match c {
        Coord::Axial(e) => out.push(e),
        Coord::Plane(xy, _) => {
            let [x, y] = &**xy;
            out.push(x);
            out.push(y);
        }
    };
    let stmt = |s: &'e Stmt, out: &mut Vec<&'e Expr>| match s {
        Stmt::Load { force, .. } => coord(force, out),
        Stmt::Temperature { change, .. } => out.push(change),
        Stmt::Strain { value, .. } => out.push(value),
        Stmt::Settle { movement, .. } => out.push(movement),
    };
    match d {
        Decl::Calc(b) => block(b, out),
        Decl::Material(nb) | Decl::Part(nb) | Decl::Rigid(nb) => block(&nb.block, out),
        Decl::Let(l) => out.push(&l.value),
        Decl::Node(n) => coord(&n.at, out),
        Decl::Case(c) => {
            for s in &c.stmts {
                stmt(s, out);
            }
        }
        Decl::Stmt(s) => stmt(s, out),
        Decl::Check(c) => {
            out.push(&c.lhs);
            out.push(&c.rhs);
        }
        // no expressions of their own
        Decl::Fix(_) | Decl::Tie(_) | Decl::Combine(_) | Decl::Units(_) | Decl::Group(_) => {}
    }
}

impl Builder {
    fn new(limits: Limits) -> Self {
        Self {
            errors: Vec::new(),
            limits,
            alpha_failed: HashSet::new(),
            overrides: Vec::new(),
            let_sources: HashMap::new(),
        }
    }

    fn ok<T>(&mut self, r: Result<T, ModelError>) -> Option<T> {
        push_err(&mut self.errors, r)
    }

    fn opt<T>(&mut self, r: Option<Result<T, ModelError>>) -> Option<T> {
        r.and_then(|r| self.ok(r))
    }

    fn register<'a>(&mut self, file: &'a ast::File) -> Names<'a> {
        // Numbers among each kind, in file order.
        let mut number = vec![0u32; file.decls.len()];
        let mut counters = [0u32; NameKind::COUNT];
        for (n, d) in number.iter_mut().zip(&file.decls) {
            if let Some((_, kind)) = declared_name(d) {
                *n = counters[kind as usize];
                counters[kind as usize] += 1;
            }
        }
        let workers = crate::parallel::runs_for(file.decls.len(), 20_000);
        let hasher = foldhash::fast::FixedState::default();
        let limits = self.limits;
        let filled: Vec<Shard> = crate::parallel::each(workers, |which| {
            fill_shard(file, &hasher, which, workers, limits)
        });
        let mut shards = Vec::with_capacity(workers);
        let mut errors = Vec::new();
        for (table, e) in filled {
            shards.push(table);
            errors.extend(e);
        }
        // in file order; one declaration's errors all come from one shard,
        // in the order it found them
        errors.sort_by_key(|(i, _)| *i);
        self.errors.extend(errors.into_iter().map(|(_, e)| e));
        Names {
            shards,
            hasher,
            number,
            file,
            suggestions: std::sync::atomic::AtomicUsize::new(crate::diagnostic::MAX_SHOWN),
        }
    }

    /// Evaluate `let`s in dependency order (their order in the file does not matter).
    fn lets(
        &mut self,
        file: &ast::File,
        names: &Names<'_>,
    ) -> (Vec<LetValue>, Vec<Option<Result<Quantity, ()>>>) {
        let lets = file_lets(file);
        // Only the first declaration of a name is registered.
        let registered = |i: usize, l: &ast::Let| {
            names.get(&l.name.name) == Some((NameKind::Let, i, l.name.span))
        };
        let deps: Vec<Vec<usize>> = lets
            .iter()
            .map(|l| {
                let mut refs = Vec::new();
                walk_names(&l.value, &mut refs);
                refs.iter()
                    .filter_map(|id| match names.get(&id.name) {
                        Some((NameKind::Let, j, _)) => Some(j),
                        _ => None,
                    })
                    .collect()
            })
            .collect();
        // Iterative depth-first ordering with cycle detection.
        let n = lets.len();
        let mut state = vec![0u8; n]; // 0 new, 1 on stack, 2 done
        let mut order = Vec::with_capacity(n);
        let mut in_cycle = vec![false; n];
        for root in 0..n {
            if state[root] != 0 {
                continue;
            }
            let mut stack: Vec<(usize, usize)> = vec![(root, 0)];
            state[root] = 1;
            while let Some(&mut (v, ref mut next)) = stack.last_mut() {
                if let Some(&w) = deps[v].get(*next) {
                    *next += 1;
                    match state[w] {
                        0 => {
                            state[w] = 1;
                            stack.push((w, 0));
                        }
                        1 => {
                            let pos = stack.iter().position(|(x, _)| *x == w).unwrap_or(0);
                            let chain: Vec<&str> = stack[pos..]
                                .iter()
                                .map(|(x, _)| lets[*x].name.name.as_str())
                                .chain(std::iter::once(lets[w].name.name.as_str()))
                                .collect();
                            if !in_cycle[w] {
                                self.errors.push(ModelError::Cycle {
                                    name: lets[w].name.name.to_string(),
                                    chain: chain.join(" → "),
                                    span: lets[w].name.span,
                                });
                            }
                            for (x, _) in &stack[pos..] {
                                in_cycle[*x] = true;
                            }
                        }
                        _ => {}
                    }
                } else {
                    state[v] = 2;
                    order.push(v);
                    stack.pop();
                }
            }
        }
        let mut values: Vec<Option<Result<Quantity, ()>>> = vec![None; n];
        let order_copy = order.clone();
        for i in order {
            if in_cycle[i] || !registered(i, lets[i]) {
                values[i] = Some(Err(()));
                continue;
            }
            let scope = LetScope {
                names,
                values: &values,
            };
            let r = match self.overrides.iter().find(|(n, _)| *n == lets[i].name.name) {
                Some((_, q)) => Ok(*q),
                None => eval(&lets[i].value, &scope),
            };
            values[i] = Some(match push_err(&mut self.errors, r) {
                Some(q) => Ok(q),
                None => Err(()),
            });
        }
        let mut srcs: Vec<Vec<&'static str>> = vec![Vec::new(); n];
        for &i in &order_copy {
            let mut s = Vec::new();
            super::eval::sources(&lets[i].value, &mut s);
            for &j in &deps[i] {
                if j != i {
                    for x in srcs[j].clone() {
                        if !s.contains(&x) {
                            s.push(x);
                        }
                    }
                }
            }
            srcs[i] = s;
        }
        for (l, s) in lets.iter().zip(&srcs) {
            self.let_sources.insert(l.name.name.to_string(), s.clone());
        }
        let out = lets
            .iter()
            .zip(&values)
            .zip(srcs)
            .filter_map(|((l, v), sources)| match v {
                Some(Ok(q)) => Some(LetValue {
                    name: l.name.name.to_string(),
                    value: *q,
                    expr: l.value.clone(),
                    sources,
                    span: l.span,
                }),
                _ => None,
            })
            .collect();
        (out, values)
    }

    #[allow(clippy::too_many_lines)]
    fn run(mut self, file: &ast::File) -> Result<Model, Vec<ModelError>> {
        if file.decls.len() > self.limits.max_declarations {
            self.errors.push(ModelError::TooMany {
                what: "declarations",
                count: file.decls.len(),
                limit: self.limits.max_declarations,
                span: Span::new(0, 0),
                help: Some("split the calc into smaller files".into()),
            });
            return Err(self.errors);
        }
        let names = self.register(file);
        let (lets, let_values) = self.lets(file, &names);
        let scope = LetScope {
            names: &names,
            values: &let_values,
        };

        let mut title = Title::default();
        let mut materials = Vec::new();
        let mut material_decls = 0;
        let mut kind: Option<(Kind, Span)> = None;
        let mut units = UnitChoice::Auto;

        // Title block, materials, nodes, units.
        for d in &file.decls {
            match d {
                Decl::Calc(b) => {
                    let f = Fields::new(
                        b,
                        What {
                            kind: "the title block",
                            name: None,
                        },
                        Title::KEYS,
                        &mut self.errors,
                    );
                    for key in Title::KEYS {
                        if let Some(e) = f.map.get(key) {
                            match &e.value {
                                Value::Str(s) => title.fields.push((key, s.text.clone())),
                                Value::Exprs(list) => self.errors.push(ModelError::Expected {
                                    expected: format!("a quoted string for `{key}`"),
                                    span: list[0].span.to(list[list.len() - 1].span),
                                    found: "not a string".into(),
                                    help: Some(format!("write `{key} = \"...\"`")),
                                }),
                            }
                        }
                    }
                }
                Decl::Material(nb) => {
                    material_decls += 1;
                    materials.extend(self.material(nb, &scope));
                }
                Decl::Units(u) => units = self.units(u),
                _ => {}
            }
        }
        let material_at = places(
            &names,
            NameKind::Material,
            material_decls,
            materials.iter().map(|m| m.name.as_str()),
        );
        // Nodes: the first fixes the kind of model, which the rest must share.
        let node_decls: Vec<&ast::Node> = file
            .decls
            .iter()
            .filter_map(|d| match d {
                Decl::Node(n) => Some(&**n),
                _ => None,
            })
            .collect();
        let mut nodes: Vec<Node> = Vec::with_capacity(node_decls.len());
        if let Some(&first) = node_decls.first() {
            nodes.push(self.node(first, &scope, &mut kind));
            let known = kind;
            nodes.extend(self.in_runs(&node_decls[1..], |b, &n| {
                let mut k = known;
                Some(b.node(n, &scope, &mut k))
            }));
        }
        let Some((kind, _)) = kind else {
            if !self.errors.is_empty() {
                return Err(self.errors);
            }
            self.errors.push(ModelError::Empty {
                what: "nodes",
                span: Span::new(0, 0),
                help: Some("declare the points parts connect, e.g. `node base at 0 ft`".into()),
            });
            return Err(self.errors);
        };

        // Supports.
        for d in &file.decls {
            if let Decl::Fix(list) = d {
                for s in list {
                    let Some(i) = self.ok(names.resolve(&s.node, NameKind::Node)) else {
                        continue;
                    };
                    match (kind, s.axis) {
                        (Kind::Axial, Some((_, sp))) => self.errors.push(ModelError::ModelKind {
                            message: "an axial model has one direction; `fix` takes no `x` or `y`"
                                .into(),
                            span: sp,
                            help: Some(format!("write `fix {}`", s.node.name)),
                        }),
                        (_, None) => nodes[i].fixed = [true, kind == Kind::Plane],
                        (Kind::Plane, Some((Axis::X, _))) => nodes[i].fixed[0] = true,
                        (Kind::Plane, Some((Axis::Y, _))) => nodes[i].fixed[1] = true,
                    }
                }
            }
        }

        // Parts.
        let part_decls: Vec<&ast::NamedBlock> = file
            .decls
            .iter()
            .filter_map(|d| match d {
                Decl::Part(nb) => Some(&**nb),
                _ => None,
            })
            .collect();
        let parts = self.parts(
            &part_decls,
            &scope,
            &names,
            (&materials, &material_at),
            &nodes,
            kind,
        );
        let part_at = places(
            &names,
            NameKind::Part,
            part_decls.len(),
            parts.iter().map(|p| p.name.as_str()),
        );

        // Rigid bodies and ties.
        let mut rigids = Vec::new();
        let mut ties = Vec::new();
        let mut rigid_of: HashMap<usize, Span> = HashMap::new();
        for d in &file.decls {
            match d {
                Decl::Rigid(nb) => {
                    let what = What::named("rigid body", &nb.name.name);
                    let f = Fields::new(&nb.block, what, &["nodes"], &mut self.errors);
                    let Some(list) = self.opt(f.names("nodes")) else {
                        if !f.has("nodes") {
                            self.errors.push(
                                f.missing(
                                    "nodes",
                                    Some(
                                        "list the nodes that move together, e.g. `nodes = a, b, c`"
                                            .into(),
                                    ),
                                ),
                            );
                        }
                        continue;
                    };
                    let mut idx = Vec::new();
                    // a body whose nodes failed (unknown, or in another
                    // body) is not also "too small": one fault, one error
                    let mut faulted = false;
                    for id in list {
                        let Some(i) = self.ok(names.resolve(id, NameKind::Node)) else {
                            faulted = true;
                            continue;
                        };
                        if let Some(first) = rigid_of.get(&i) {
                            faulted = true;
                            self.errors.push(ModelError::RigidShared {
                                node: id.name.to_string(),
                                span: id.span,
                                first: *first,
                            });
                        } else {
                            rigid_of.insert(i, nb.name.span);
                            idx.push(i);
                        }
                    }
                    if faulted {
                        continue;
                    }
                    if idx.len() < 2 {
                        self.errors.push(ModelError::Expected {
                            expected: "at least two nodes in a rigid body".into(),
                            span: nb.block.span,
                            found: format!("{} node(s)", idx.len()),
                            help: None,
                        });
                        continue;
                    }
                    rigids.push(Rigid {
                        name: nb.name.name.to_string(),
                        nodes: idx,
                        span: nb.span,
                    });
                }
                Decl::Tie(t) => {
                    let idx: Vec<usize> = t
                        .nodes
                        .iter()
                        .filter_map(|id| {
                            push_err(&mut self.errors, names.resolve(id, NameKind::Node))
                        })
                        .collect();
                    if idx.len() == t.nodes.len() {
                        // In a plane, nodes that move together without
                        // rotating must coincide: two separated points held
                        // to one translation would be a link that takes
                        // moment from nowhere.
                        let apart = kind == Kind::Plane
                            && idx.iter().any(|&i| {
                                let (a, b) = (&nodes[idx[0]], &nodes[i]);
                                (a.x - b.x).value.abs() + (a.y - b.y).value.abs() > 0.0
                            });
                        let mut seen = HashSet::new();
                        let twice = t
                            .nodes
                            .iter()
                            .zip(&idx)
                            .find(|(_, &i)| !seen.insert(i))
                            .map(|(id, _)| id);
                        if let Some(id) = twice {
                            self.errors.push(ModelError::ModelKind {
                                message: format!("node `{}` is tied to itself", id.name),
                                span: id.span,
                                help: Some("a tie joins different nodes, e.g. `tie a, b`".into()),
                            });
                        } else if apart {
                            self.errors.push(ModelError::ModelKind {
                                message: "in a plane model a tie joins nodes at one position".into(),
                                span: t.span,
                                help: Some("to join separated points, list them in a `rigid` body; a tie is a pin between nodes that coincide".into()),
                            });
                        } else {
                            ties.push(Tie {
                                nodes: idx,
                                span: t.span,
                            });
                        }
                    }
                }
                _ => {}
            }
        }

        // Cases.
        let built = Built {
            materials: &materials,
            parts: &parts,
            part_at: &part_at,
            nodes: &nodes,
            kind,
        };
        let mut cases = Vec::new();
        let first_case = file.decls.iter().find_map(|d| match d {
            Decl::Case(c) => Some(c.name.span),
            _ => None,
        });
        let mut loose = Vec::new();
        for d in &file.decls {
            match d {
                Decl::Case(c) => {
                    let mut sustained = false;
                    for f in &c.flags {
                        sustained = f.name == "sustained";
                    }
                    let case = self.case(
                        &c.name.name,
                        sustained,
                        &c.stmts.iter().collect::<Vec<_>>(),
                        c.span,
                        &scope,
                        &names,
                        built,
                    );
                    cases.push(case);
                }
                Decl::Stmt(s) => match first_case {
                    Some(case) => self.errors.push(ModelError::LooseStatement {
                        span: s.span(),
                        case,
                    }),
                    None => loose.push(&**s),
                },
                _ => {}
            }
        }
        if first_case.is_none() {
            let case = self.case(
                "loads",
                false,
                &loose,
                Span::new(0, 0),
                &scope,
                &names,
                built,
            );
            cases.push(case);
        }

        // Combinations.
        let mut combinations = Vec::new();
        for d in &file.decls {
            if let Decl::Combine(c) = d {
                let mut terms: Vec<(usize, f64)> = Vec::new();
                for t in &c.terms {
                    if let Some(i) = self.ok(names.resolve(&t.case, NameKind::Case)) {
                        if terms.iter().any(|(j, _)| *j == i) {
                            self.errors.push(ModelError::CaseTwice {
                                case: t.case.name.to_string(),
                                combination: c.name.name.to_string(),
                                span: t.span,
                            });
                        } else if self
                            .ok(ModelError::guard(
                                Quantity::number(t.factor),
                                || format!("the factor of `{}`", t.case.name),
                                t.span,
                            ))
                            .is_some()
                        {
                            terms.push((i, t.factor));
                        }
                    }
                }
                if !terms.is_empty() && terms.iter().all(|(_, f)| *f == 0.0) {
                    self.errors.push(ModelError::ZeroCombination {
                        combination: c.name.name.to_string(),
                        span: c.span,
                    });
                }
                combinations.push(Combination {
                    name: c.name.name.to_string(),
                    terms,
                    declared: true,
                    span: c.span,
                });
            }
        }
        if combinations.is_empty() {
            for (i, c) in cases.iter().enumerate() {
                combinations.push(Combination {
                    name: c.name.clone(),
                    terms: vec![(i, 1.0)],
                    declared: false,
                    span: c.span,
                });
            }
        }

        // Checks.
        let mut checks = Vec::new();
        let cscope = CheckScope {
            lets: LetScope {
                names: &names,
                values: &let_values,
            },
            kind,
        };
        // Groups: each member a part, resolved once.
        let mut groups: HashMap<&str, Vec<&Ident>> = HashMap::new();
        for d in &file.decls {
            if let Decl::Group(g) = d {
                let members: Vec<&Ident> = g
                    .members
                    .iter()
                    .filter(|m| self.ok(names.resolve(m, NameKind::Part)).is_some())
                    .collect();
                groups.insert(g.name.name.as_str(), members);
            }
        }
        let combination_at: HashMap<&str, usize> = combinations
            .iter()
            .enumerate()
            .map(|(i, c)| (c.name.as_str(), i))
            .collect();
        let declared_combinations = combinations.iter().any(|c| c.declared);
        let long_term = materials.iter().any(|m| m.creep.is_some_and(|c| c > 0.0))
            && cases.iter().any(|c| c.sustained)
            && !parts
                .iter()
                .any(|p| p.carries != Carries::Both || p.slack.value > 0.0);
        for d in &file.decls {
            let Decl::Check(c) = d else { continue };
            let Some(applies) =
                self.applies(c, &names, &combination_at, declared_combinations, long_term)
            else {
                continue;
            };
            // `for x in GROUP`: one check per member, `x` standing for it
            let members: Vec<Option<&Ident>> = match &c.each {
                None => vec![None],
                Some(e) => {
                    if self.ok(names.resolve(&e.group, NameKind::Group)).is_none() {
                        continue;
                    }
                    groups
                        .get(e.group.name.as_str())
                        .map(|m| m.iter().map(|m| Some(*m)).collect())
                        .unwrap_or_default()
                }
            };
            for member in members {
                let (mut lhs, mut rhs) = (c.lhs.clone(), c.rhs.clone());
                let mut label = c.label.text.clone();
                if let (Some(e), Some(m)) = (&c.each, member) {
                    for x in [&mut lhs, &mut rhs] {
                        x.visit_mut(&mut |x| {
                            if let ExprKind::Field(f) = &mut x.kind {
                                if f[0].name == e.var.name {
                                    f[0].name.clone_from(&m.name);
                                }
                            }
                        });
                    }
                    label = format!("{label} ({})", m.name);
                }
                let l = eval(&lhs, &cscope);
                let r = eval(&rhs, &cscope);
                let (Some(l), Some(r)) = (self.ok(l), self.ok(r)) else {
                    break;
                };
                if l.dim != r.dim {
                    self.errors.push(ModelError::CheckDimensions {
                        left: l.dim.describe(),
                        right: r.dim.describe(),
                        lhs: c.lhs.span,
                        rhs: c.rhs.span,
                    });
                    break;
                }
                checks.push(Check {
                    label,
                    lhs,
                    op: c.op,
                    rhs,
                    span: c.span,
                    applies: applies.clone(),
                    member: c
                        .each
                        .as_ref()
                        .zip(member)
                        .map(|(e, m)| (e.var.name.to_string(), m.name.to_string())),
                });
            }
        }

        if parts.is_empty() && self.errors.is_empty() {
            self.errors.push(ModelError::Empty {
                what: "parts",
                span: Span::new(0, 0),
                help: Some("declare the parts that share the load with `part NAME { ... }`".into()),
            });
        }

        let mut counts = BTreeMap::new();
        let mut exprs = Vec::new();
        for d in &file.decls {
            decl_exprs(d, &mut exprs);
        }
        for e in exprs {
            walk_units(e, &mut counts);
        }

        if !self.errors.is_empty() {
            return Err(self.errors);
        }
        Ok(Model {
            title,
            kind,
            lets,
            materials,
            nodes,
            parts,
            rigids,
            ties,
            cases,
            combinations,
            checks,
            units,
            unit_usage: counts.into_iter().collect(),
        })
    }

    /// One node: its position evaluated, and the kind of model (axial or
    /// plane) held to the first node's.
    fn node(&mut self, n: &ast::Node, scope: &dyn Scope, kind: &mut Option<(Kind, Span)>) -> Node {
        let this = match n.at {
            Coord::Axial(_) => Kind::Axial,
            Coord::Plane(..) => Kind::Plane,
        };
        match *kind {
            None => *kind = Some((this, n.span)),
            Some((k, first)) if k != this => {
                self.errors.push(ModelError::MixedModel {
                    this: this.name(),
                    first: k.name(),
                    span: n.at.span(),
                    first_span: first,
                });
            }
            _ => {}
        }
        let coord = |e: &Expr, b: &mut Self| {
            let what = || format!("the position of node `{}`", n.name.name);
            b.ok(typed(e, Dimension::LENGTH, what, scope))
                .map(si_length)
        };
        let (x, y) = match &n.at {
            Coord::Axial(e) => (coord(e, self), Some(Length::new::<meter>(0.0))),
            Coord::Plane(xy, _) => (coord(&xy[0], self), coord(&xy[1], self)),
        };
        // A position that failed is NaN, so that the parts at the node are
        // not reported again (as zero length); its error ends the build.
        let failed = Length::new::<meter>(f64::NAN);
        Node {
            name: n.name.name.clone(),
            x: x.unwrap_or(failed),
            y: y.unwrap_or(failed),
            fixed: [false; 2],
            span: n.span,
        }
    }

    /// Where a check applies, from its `under`.
    fn applies(
        &mut self,
        c: &ast::Check,
        names: &Names<'_>,
        combination_at: &HashMap<&str, usize>,
        declared: bool,
        long_term: bool,
    ) -> Option<Applies> {
        let Some(u) = &c.under else {
            return Some(Applies::default());
        };
        let kind = if declared {
            NameKind::Combination
        } else {
            NameKind::Case
        };
        let mut list = Vec::new();
        let mut ok = true;
        for n in &u.names {
            match self.ok(names.resolve(n, kind)) {
                Some(_) => list.extend(combination_at.get(n.name.as_str()).copied()),
                None => ok = false,
            }
        }
        if let Some((State::Long, span)) = u.state {
            if !long_term {
                self.errors.push(ModelError::NoLongTerm { span });
                ok = false;
            }
        }
        ok.then(|| Applies {
            combinations: (!u.names.is_empty()).then_some(list),
            state: u.state.map(|(s, _)| s),
        })
    }

    fn units(&mut self, u: &ast::Units) -> UnitChoice {
        match u {
            ast::Units::System(id) if id.name == "us" => UnitChoice::Us,
            ast::Units::System(_) => UnitChoice::Si,
            ast::Units::List(list) => {
                let mut out: Vec<(String, Quantity)> = Vec::new();
                for ue in list {
                    if let Some(q) = self.ok(super::eval::unit_value(ue)) {
                        let text = ue
                            .factors
                            .iter()
                            .enumerate()
                            .map(|(i, f)| {
                                let op = if i == 0 {
                                    ""
                                } else if f.divide {
                                    "/"
                                } else {
                                    "*"
                                };
                                if f.power == 1 {
                                    format!("{op}{}", f.name)
                                } else {
                                    format!("{op}{}^{}", f.name, f.power)
                                }
                            })
                            .collect::<String>();
                        if let Some((first, _)) = out.iter().find(|(_, o)| o.dim == q.dim) {
                            self.errors.push(ModelError::SameKindUnits {
                                first: first.clone(),
                                second: text,
                                kind: q.dim.describe(),
                                span: ue.span,
                            });
                            continue;
                        }
                        out.push((text, q));
                    }
                }
                UnitChoice::List(out)
            }
        }
    }

    fn material(&mut self, nb: &ast::NamedBlock, scope: &dyn Scope) -> Option<Material> {
        const KEYS: &[&str] = &[
            "E",
            "alpha",
            "yield",
            "yield_compression",
            "allowable",
            "allowable_tension",
            "allowable_compression",
            "creep",
        ];
        let what = What::named("material", &nb.name.name);
        let f = Fields::new(&nb.block, what, KEYS, &mut self.errors);
        let e = self.opt(f.quantity("E", Dimension::PRESSURE, scope));
        if !f.has("E") {
            self.errors.push(f.missing(
                "E",
                Some("give the modulus of elasticity, e.g. `E = 29000 ksi`".into()),
            ));
        }
        let alpha = self
            .opt(f.quantity("alpha", Dimension::PER_TEMPERATURE, scope))
            .map(|q| TemperatureCoefficient::new::<per_kelvin>(q.value));
        if alpha.is_none() && f.has("alpha") {
            // its error is reported; a temperature change does not repeat it
            self.alpha_failed.insert(nb.name.name.to_string());
        }
        let stress = |key: &str, b: &mut Self, strict: bool| {
            let q = b.opt(f.quantity(key, Dimension::PRESSURE, scope))?;
            if q.value < 0.0 || (strict && q.value == 0.0) {
                let sp = f.map.get(key).map(|e| e.span).unwrap_or_default();
                b.errors.push(ModelError::NotPositive {
                    what: format!("`{key}` of {what}"),
                    value: "zero or less".into(),
                    span: sp,
                    help: None,
                });
                return None;
            }
            Some(si_pressure(q))
        };
        let yield_strength = stress("yield", self, true);
        let yield_compression = stress("yield_compression", self, true);
        let allowable = stress("allowable", self, false);
        let allowable_tension = stress("allowable_tension", self, false);
        let allowable_compression = stress("allowable_compression", self, false);
        let creep = self
            .opt(f.quantity("creep", Dimension::NONE, scope))
            .map(|q| q.value);
        if let Some(c) = creep {
            if c < 0.0 {
                self.errors.push(ModelError::NotPositive {
                    what: format!("`creep` of {what}"),
                    value: format!("{c}"),
                    span: f.map.get("creep").map(|e| e.span).unwrap_or_default(),
                    help: Some("a creep coefficient is zero or more, typically 1.5 to 3".into()),
                });
            }
        }
        let mut e_sources = Vec::new();
        if let Some(Ok(expr)) = f.expr("E") {
            super::eval::sources(expr, &mut e_sources);
            let mut refs = Vec::new();
            walk_names(expr, &mut refs);
            for id in refs {
                for s in self
                    .let_sources
                    .get(id.name.as_str())
                    .cloned()
                    .unwrap_or_default()
                {
                    if !e_sources.contains(&s) {
                        e_sources.push(s);
                    }
                }
            }
        }
        let e = e?;
        if e.value <= 0.0 {
            let sp = f.map.get("E").map(|x| x.span).unwrap_or_default();
            self.errors.push(ModelError::NotPositive {
                what: format!("`E` of {what}"),
                value: "zero or less".into(),
                span: sp,
                help: Some("the modulus of elasticity is a positive pressure".into()),
            });
            return None;
        }
        // keys derived from other names, for the report's substitution
        let mut derived = Vec::new();
        for key in KEYS {
            if let Some(Ok(e)) = f.expr(key) {
                let mut named = false;
                e.visit(&mut |x| named |= matches!(x.kind, ExprKind::Name(_)));
                if named {
                    derived.push((*key, e.clone()));
                }
            }
        }
        Some(Material {
            derived,
            name: nb.name.name.to_string(),
            e: si_pressure(e),
            alpha,
            yield_strength,
            yield_compression,
            allowable,
            allowable_tension,
            allowable_compression,
            creep,
            e_sources,
            span: nb.span,
        })
    }

    /// Every part: a part needs only the names, materials and nodes.
    fn parts(
        &mut self,
        decls: &[&ast::NamedBlock],
        scope: &LetScope<'_, '_>,
        names: &Names<'_>,
        materials: Materials<'_>,
        nodes: &[Node],
        kind: Kind,
    ) -> Vec<Part> {
        self.in_runs(decls, |b, &nb| {
            b.part(nb, scope, names, materials, nodes, kind)
        })
    }

    /// `work` on each item, in file order. From 20,000 items on, on every
    /// core: contiguous runs, each with a builder of its own, joined in file
    /// order with their errors and unit counts.
    fn in_runs<I: Sync, T: Send>(
        &mut self,
        items: &[I],
        work: impl Fn(&mut Builder, &I) -> Option<T> + Sync,
    ) -> Vec<T> {
        let runs = crate::parallel::runs_for(items.len(), 20_000);
        if runs == 1 {
            return items.iter().filter_map(|i| work(self, i)).collect();
        }
        let (limits, total) = (self.limits, items.len());
        let runs: Vec<(Vec<T>, Builder)> = crate::parallel::in_runs(items, runs, |k, run| {
            let mut b = Builder::new(limits);
            // the first run's list has room for all: the others are moved
            // onto it without growing it
            let mut out = Vec::with_capacity(if k == 0 { total } else { run.len() });
            out.extend(run.iter().filter_map(|i| work(&mut b, i)));
            (out, b)
        });
        let mut out: Vec<T> = Vec::new();
        for (k, (o, b)) in runs.into_iter().enumerate() {
            if k == 0 {
                out = o;
            } else {
                out.extend(o);
            }
            self.errors.extend(b.errors);
        }
        out
    }

    #[allow(clippy::too_many_lines)]
    fn part(
        &mut self,
        nb: &ast::NamedBlock,
        scope: &dyn Scope,
        names: &Names<'_>,
        materials: Materials<'_>,
        nodes: &[Node],
        kind: Kind,
    ) -> Option<Part> {
        const KEYS: &[&str] = &[
            "ends",
            "material",
            "area",
            "section",
            "inertia",
            "stiffness",
            "misfit",
            "carries",
            "slack",
            "buckling_length",
            "buckling_factor",
            "slenderness_limit",
            "euler_fraction",
        ];
        let (materials, material_at) = materials;
        let pname = &nb.name.name;
        let what = What::named("part", pname);
        let f = Fields::new(&nb.block, what, KEYS, &mut self.errors);
        let before = self.errors.len();

        // ends
        let mut ends = None;
        match self.opt(f.names("ends")) {
            Some(list) if list.len() == 2 => {
                let a = self.ok(names.resolve(list[0], NameKind::Node));
                let b = self.ok(names.resolve(list[1], NameKind::Node));
                if let (Some(a), Some(b)) = (a, b) {
                    if a == b {
                        self.errors.push(ModelError::SameNode {
                            part: pname.to_string(),
                            node: list[0].name.to_string(),
                            span: list[0].span.to(list[1].span),
                        });
                    } else {
                        ends = Some([a, b]);
                    }
                }
            }
            Some(list) => self.errors.push(ModelError::Expected {
                expected: "two nodes for `ends`".into(),
                span: list
                    .first()
                    .map_or(nb.block.span, |i| i.span)
                    .to(list.last().map_or(nb.block.span, |i| i.span)),
                found: format!("{} node(s)", list.len()),
                help: Some("write `ends = bottom, top`".into()),
            }),
            None => {
                if !f.has("ends") {
                    self.errors.push(f.missing(
                        "ends",
                        Some("give the two nodes it spans, e.g. `ends = base, cap`".into()),
                    ));
                }
            }
        }

        // law
        let spring = f.has("stiffness");
        let law = if spring {
            for other in ["material", "area", "section", "inertia"] {
                if let Some(e) = f.map.get(other) {
                    self.errors.push(ModelError::Conflict {
                        key: other.into(),
                        other: "stiffness".into(),
                        block: what.to_string(),
                        span: e.key.span,
                        help: Some("a spring takes `stiffness` alone; a member takes `material` and `area`".into()),
                    });
                }
            }
            let k = self.opt(f.quantity("stiffness", Dimension::STIFFNESS, scope));
            k.and_then(|k| {
                if k.value > 0.0 {
                    Some(Law::Spring {
                        stiffness: Stiffness::new::<newton_per_meter>(k.value),
                    })
                } else {
                    self.errors.push(ModelError::NotPositive {
                        what: format!("`stiffness` of {what}"),
                        value: "zero or less".into(),
                        span: f.map.get("stiffness").map(|e| e.span).unwrap_or_default(),
                        help: None,
                    });
                    None
                }
            })
        } else {
            let material = match f.map.get("material") {
                None => {
                    self.errors.push(f.missing(
                        "material",
                        Some("name a declared material, e.g. `material = steel`, or give `stiffness` for a spring".into()),
                    ));
                    None
                }
                Some(_) => match self.opt(f.names("material")) {
                    Some(list) if list.len() == 1 => {
                        let i = self.ok(names.resolve(list[0], NameKind::Material));
                        // only materials that built are in `materials`
                        i.and_then(|i| place(material_at, i))
                    }
                    Some(list) => {
                        self.errors.push(ModelError::Expected {
                            expected: "one material".into(),
                            span: list[0].span.to(list[list.len() - 1].span),
                            found: format!("{} names", list.len()),
                            help: None,
                        });
                        None
                    }
                    None => None,
                },
            };
            if let (Some(a), Some(s)) = (f.map.get("area"), f.map.get("section")) {
                self.errors.push(ModelError::Conflict {
                    key: "section".into(),
                    other: "area".into(),
                    block: what.to_string(),
                    span: s.key.span.to(a.key.span),
                    help: Some("`section` gives the area; drop `area`".into()),
                });
            }
            let mut area = None;
            let mut inertia = None;
            let mut shape = None;
            for key in ["area", "section"] {
                let Some(e) = self.opt(f.expr(key)) else {
                    continue;
                };
                let guard = |b: &mut Self, v: f64, dim: Dimension, of: &str| {
                    let q = Quantity::new(v, dim);
                    b.ok(ModelError::guard(
                        q,
                        || format!("the {of} of {what}"),
                        e.span,
                    ))
                    .map(|q| q.value)
                };
                match self.ok(eval_val(e, scope)) {
                    Some(Val::Section(s)) => {
                        area = guard(self, s.area, Dimension::AREA, "area");
                        shape = Some(s.shape);
                        if key == "section" {
                            inertia =
                                guard(self, s.inertia(), Dimension::SECOND_MOMENT, "second moment");
                        }
                    }
                    Some(Val::Q(q)) if key == "area" && q.dim == Dimension::AREA => {
                        area = guard(self, q.value, Dimension::AREA, "area");
                    }
                    Some(Val::Q(q)) => self.errors.push(ModelError::WrongDimension {
                        what: format!("`{key}` of {what}"),
                        expected: if key == "area" {
                            "an area".into()
                        } else {
                            "a section such as `ring(d = 10.75 in, t = 0.365 in)`".into()
                        },
                        found: q.dim.describe(),
                        span: e.span,
                        help: if key == "area" {
                            example_for(Dimension::AREA)
                        } else {
                            Some("the section helpers are circle, ring, rect, box, ishape".into())
                        },
                    }),
                    None => {}
                }
            }
            if let Some(q) = self.opt(f.quantity("inertia", Dimension::SECOND_MOMENT, scope)) {
                inertia = Some(q.value);
            }
            if area.is_none() && !f.has("area") && !f.has("section") {
                self.errors.push(f.missing(
                    "area",
                    Some("give `area = 11.9 in^2`, `area = circle(d = 10 in)` or `section = ...`".into()),
                ));
            }
            match (material, area) {
                (Some(m), Some(a)) if a > 0.0 => Some(Law::Member {
                    material: m,
                    area: Area::new::<square_meter>(a),
                    inertia,
                    section: shape,
                }),
                (_, Some(_)) => {
                    let sp = f
                        .map
                        .get("area")
                        .or_else(|| f.map.get("section"))
                        .map(|e| e.span)
                        .unwrap_or_default();
                    if material.is_some() {
                        self.errors.push(ModelError::NotPositive {
                            what: format!("the area of {what}"),
                            value: "zero or less".into(),
                            span: sp,
                            help: None,
                        });
                    }
                    None
                }
                _ => None,
            }
        };

        // `Some(help)`: the value must be zero or more (`Some(None)`: more
        // than zero), with that help.
        let length_key = |key: &str, b: &mut Self, sign: Option<Option<&str>>| -> Option<Length> {
            let q = b.opt(f.quantity(key, Dimension::LENGTH, scope))?;
            let bad = match sign {
                None => false,
                Some(Some(_)) => q.value < 0.0,
                Some(None) => q.value <= 0.0,
            };
            if bad {
                b.errors.push(ModelError::NotPositive {
                    what: format!("`{key}` of {what}"),
                    value: if q.value < 0.0 { "negative" } else { "zero" }.into(),
                    span: f.map.get(key).map(|e| e.span).unwrap_or_default(),
                    help: sign.flatten().map(str::to_string),
                });
                return None;
            }
            Some(si_length(q))
        };
        let misfit = length_key("misfit", self, None).unwrap_or_default();
        let slack = length_key(
            "slack",
            self,
            Some(Some("a gap is zero or more; `carries` gives its sense")),
        )
        .unwrap_or_default();
        let buckling_length = length_key("buckling_length", self, Some(None));
        let ratio_key = |key: &str, default: f64, b: &mut Self| -> f64 {
            match b.opt(f.quantity(key, Dimension::NONE, scope)) {
                Some(q) if q.value > 0.0 => q.value,
                Some(_) => {
                    b.errors.push(ModelError::NotPositive {
                        what: format!("`{key}` of {what}"),
                        value: "zero or less".into(),
                        span: f.map.get(key).map(|e| e.span).unwrap_or_default(),
                        help: None,
                    });
                    default
                }
                None => default,
            }
        };
        // AISC 360-16 E2 (user note): KL/r preferably not over 200 (from memory).
        let slenderness_limit = ratio_key("slenderness_limit", 200.0, self);
        let euler_fraction = ratio_key("euler_fraction", 1.0, self);
        // K, the effective-length factor: K·L from the part's own length
        let buckling_factor = f
            .has("buckling_factor")
            .then(|| ratio_key("buckling_factor", 1.0, self));
        if let (Some(_), Some(e)) = (buckling_factor, f.map.get("buckling_length")) {
            self.errors.push(ModelError::Conflict {
                key: "buckling_length".into(),
                other: "buckling_factor".into(),
                block: what.to_string(),
                span: e.key.span,
                help: Some("give the effective length K·L as `buckling_length`, or K alone as `buckling_factor`".into()),
            });
        }
        if (buckling_length.is_some() || buckling_factor.is_some())
            && !matches!(
                law,
                Some(Law::Member {
                    inertia: Some(_),
                    ..
                })
            )
        {
            let sp = f
                .map
                .get("buckling_length")
                .or_else(|| f.map.get("buckling_factor"))
                .map_or(nb.span, |e| e.span);
            self.errors.push(ModelError::MissingKey {
                block: what.to_string(),
                key: "inertia",
                span: sp,
                help: Some("a buckling check needs a second moment: give `section = ring(...)` or `inertia = ...`".into()),
            });
        }

        let carries = match self.opt(f.names("carries")) {
            Some(list) if list.len() == 1 => match list[0].name.as_str() {
                "both" => Carries::Both,
                "tension" => Carries::Tension,
                "compression" => Carries::Compression,
                other => {
                    self.errors.push(ModelError::Expected {
                        expected: "`both`, `tension` or `compression`".into(),
                        span: list[0].span,
                        found: format!("`{other}`"),
                        help: did_you_mean(other, ["both", "tension", "compression"]),
                    });
                    Carries::Both
                }
            },
            Some(list) => {
                self.errors.push(ModelError::Expected {
                    expected: "one of `both`, `tension`, `compression`".into(),
                    span: list[0].span.to(list[list.len() - 1].span),
                    found: format!("{} names", list.len()),
                    help: None,
                });
                Carries::Both
            }
            None => Carries::Both,
        };

        let ends = ends?;
        let law = law?;
        if self.errors.len() > before {
            return None;
        }
        let (a, b) = (&nodes[ends[0]], &nodes[ends[1]]);
        let dx = (b.x - a.x).value;
        let dy = (b.y - a.y).value;
        let length = dx.hypot(dy);
        if length.is_nan() {
            // an end's position failed and was reported
            return None;
        }
        let scale =
            a.x.value
                .abs()
                .max(b.x.value.abs())
                .max(a.y.value.abs())
                .max(b.y.value.abs())
                .max(1e-300);
        if length <= 1e-12 * scale || length < range::range_of(Dimension::LENGTH).0 {
            let allowed = matches!(law, Law::Spring { .. }) && kind == Kind::Axial;
            if !allowed {
                self.errors.push(ModelError::ZeroLength {
                    part: pname.to_string(),
                    a: a.name.to_string(),
                    b: b.name.to_string(),
                    span: f.map.get("ends").map_or(nb.span, |e| e.span),
                });
                return None;
            }
        }
        let part = Part {
            name: pname.clone(),
            ends,
            law,
            length: Length::new::<meter>(length),
            misfit,
            carries,
            slack,
            buckling_length: buckling_length
                .or_else(|| buckling_factor.map(|k| Length::new::<meter>(k * length))),
            slenderness_limit,
            euler_fraction,
            span: nb.span,
        };
        let k = part.stiffness(materials).value;
        if !k.is_finite() || k <= 0.0 {
            self.errors.push(ModelError::NotFinite {
                what: format!("the stiffness E·A/L of {what}"),
                reason: "it overflows or vanishes".into(),
                span: nb.name.span,
            });
            return None;
        }
        let k = Quantity::new(k, Dimension::STIFFNESS);
        self.ok(ModelError::guard(
            k,
            || format!("the stiffness E·A/L of {what}"),
            nb.name.span,
        ))?;
        Some(part)
    }

    #[allow(clippy::too_many_arguments, clippy::too_many_lines)]
    fn case(
        &mut self,
        name: &str,
        sustained: bool,
        stmts: &[&Stmt],
        span: Span,
        scope: &dyn Scope,
        names: &Names<'_>,
        built: Built<'_>,
    ) -> Case {
        let Built {
            materials,
            parts,
            part_at,
            nodes,
            kind,
        } = built;
        let mut case = Case {
            name: name.to_string(),
            sustained,
            loads: Vec::new(),
            temperatures: Vec::new(),
            strains: Vec::new(),
            settlements: Vec::new(),
            span,
        };
        let typed = |e: &Expr, dim: Dimension, what: String, b: &mut Self| -> Option<Quantity> {
            b.ok(typed(e, dim, || what.clone(), scope))
        };
        let part_of = |id: &Ident, b: &mut Self| -> Option<usize> {
            let i = b.ok(names.resolve(id, NameKind::Part))?;
            place(part_at, i)
        };
        let mut seen_temp: HashMap<Option<usize>, Span> = HashMap::new();
        let mut seen_strain: HashMap<usize, Span> = HashMap::new();
        let mut seen_settle: HashMap<(usize, usize), Span> = HashMap::new();
        for s in stmts {
            match s {
                Stmt::Load { node, force, span } => {
                    let Some(i) = self.ok(names.resolve(node, NameKind::Node)) else {
                        continue;
                    };
                    let what = format!("the load on `{}`", node.name);
                    let f = match (kind, force) {
                        (Kind::Axial, Coord::Axial(e)) => typed(e, Dimension::FORCE, what, self)
                            .map(|q| [si_force(q), Force::default()]),
                        (Kind::Plane, Coord::Plane(xy, _)) => {
                            let [ex, ey] = &**xy;
                            let x = typed(ex, Dimension::FORCE, what.clone(), self);
                            let y = typed(ey, Dimension::FORCE, what, self);
                            x.zip(y).map(|(x, y)| [si_force(x), si_force(y)])
                        }
                        (Kind::Axial, Coord::Plane(_, sp)) => {
                            self.errors.push(ModelError::ModelKind {
                                message: "an axial model takes a load as one force".into(),
                                span: *sp,
                                help: Some(format!("write `load {} = -95 kip`", node.name)),
                            });
                            None
                        }
                        (Kind::Plane, Coord::Axial(e)) => {
                            self.errors.push(ModelError::ModelKind {
                                message: "a plane model takes a load as a pair (FX, FY)".into(),
                                span: e.span,
                                help: Some(format!(
                                    "write `load {} = (0 kip, -12 kip)`",
                                    node.name
                                )),
                            });
                            None
                        }
                    };
                    if let Some(force) = f {
                        case.loads.push(Load {
                            node: i,
                            force,
                            span: *span,
                        });
                    }
                }
                Stmt::Temperature { part, change, span } => {
                    let target = match part {
                        Some(id) => match part_of(id, self) {
                            Some(i) => Some(i),
                            None => continue,
                        },
                        None => None,
                    };
                    if let (Some(i), Some(id)) = (target, part) {
                        if parts[i].material().is_none() {
                            self.errors.push(ModelError::SpringTemperature {
                                part: id.name.to_string(),
                                span: *span,
                            });
                            continue;
                        }
                    }
                    if let Some(first) = seen_temp.get(&target) {
                        self.errors.push(ModelError::DuplicateInCase {
                            what: "a temperature change".into(),
                            case: name.to_string(),
                            span: *span,
                            first: *first,
                        });
                        continue;
                    }
                    seen_temp.insert(target, *span);
                    let Some(q) = typed(
                        change,
                        Dimension::TEMPERATURE,
                        "a temperature change".into(),
                        self,
                    ) else {
                        continue;
                    };
                    // Every member the change acts on needs an alpha.
                    let affected: Vec<usize> = match target {
                        Some(i) => vec![i],
                        None => (0..parts.len()).collect(),
                    };
                    let mut reported: HashSet<usize> = HashSet::new();
                    for i in affected {
                        if let Some(m) = parts[i].material() {
                            if materials[m].alpha.is_none()
                                && !reported.contains(&m)
                                && !self.alpha_failed.contains(&materials[m].name)
                            {
                                reported.insert(m);
                                self.errors.push(ModelError::NoAlpha {
                                    part: parts[i].name.to_string(),
                                    material: materials[m].name.clone(),
                                    span: *span,
                                    material_span: materials[m].span,
                                });
                            }
                        }
                    }
                    case.temperatures.push(Temperature {
                        part: target,
                        change: TemperatureInterval::new::<kelvin>(q.value),
                        span: *span,
                    });
                }
                Stmt::Strain { part, value, span } => {
                    let Some(i) = part_of(part, self) else {
                        continue;
                    };
                    if let Some(first) = seen_strain.get(&i) {
                        self.errors.push(ModelError::DuplicateInCase {
                            what: format!("a free strain of `{}`", part.name),
                            case: name.to_string(),
                            span: *span,
                            first: *first,
                        });
                        continue;
                    }
                    seen_strain.insert(i, *span);
                    if let Some(q) = typed(value, Dimension::NONE, "a free strain".into(), self) {
                        case.strains.push(FreeStrain {
                            part: i,
                            strain: Ratio::new::<ratio>(q.value),
                            span: *span,
                        });
                    }
                }
                Stmt::Settle {
                    node,
                    axis,
                    movement,
                    span,
                } => {
                    let Some(i) = self.ok(names.resolve(node, NameKind::Node)) else {
                        continue;
                    };
                    let direction = match (kind, axis) {
                        (Kind::Axial, None) | (Kind::Plane, Some((Axis::X, _))) => 0,
                        (Kind::Plane, Some((Axis::Y, _))) => 1,
                        (Kind::Axial, Some((_, sp))) => {
                            self.errors.push(ModelError::ModelKind {
                                message:
                                    "an axial model has one direction; `settle` takes no `x` or `y`"
                                        .into(),
                                span: *sp,
                                help: Some(format!("write `settle {} = -0.1 in`", node.name)),
                            });
                            continue;
                        }
                        (Kind::Plane, None) => {
                            self.errors.push(ModelError::ModelKind {
                                message: "in a plane model `settle` needs a direction".into(),
                                span: node.span,
                                help: Some(format!("write `settle {} y = -0.1 in`", node.name)),
                            });
                            continue;
                        }
                    };
                    if !nodes[i].fixed[direction] {
                        let dir = if kind == Kind::Plane {
                            if direction == 0 {
                                " in x"
                            } else {
                                " in y"
                            }
                        } else {
                            ""
                        };
                        self.errors.push(ModelError::SettleFree {
                            node: node.name.to_string(),
                            direction: dir.into(),
                            span: *span,
                            help: Some(format!(
                                "add `fix {}{}` for the support that moves",
                                node.name,
                                dir.replace(" in", "")
                            )),
                        });
                        continue;
                    }
                    if let Some(first) = seen_settle.get(&(i, direction)) {
                        self.errors.push(ModelError::DuplicateInCase {
                            what: format!("a movement of `{}`", node.name),
                            case: name.to_string(),
                            span: *span,
                            first: *first,
                        });
                        continue;
                    }
                    seen_settle.insert((i, direction), *span);
                    if let Some(q) = typed(
                        movement,
                        Dimension::LENGTH,
                        "a support movement".into(),
                        self,
                    ) {
                        case.settlements.push(Settlement {
                            node: i,
                            direction,
                            movement: si_length(q),
                            span: *span,
                        });
                    }
                }
            }
        }
        case
    }
}

/// The `let` declarations of a file, in file order.
fn file_lets(file: &ast::File) -> Vec<&ast::Let> {
    file.decls
        .iter()
        .filter_map(|d| match d {
            Decl::Let(l) => Some(&**l),
            _ => None,
        })
        .collect()
}

/// Whether anything the solver uses depends on a `let` (directly or through
/// other `let`s): materials, nodes, parts, cases. When not, a change of the
/// `let` changes only the checks, and the solution can be kept.
#[must_use]
pub fn solver_depends_on(file: &ast::File, name: &str) -> bool {
    // Lets that depend on `name`: a walk over the reverse references.
    let lets = file_lets(file);
    let mut users: HashMap<String, Vec<usize>> = HashMap::new();
    for (i, l) in lets.iter().enumerate() {
        let mut v = Vec::new();
        walk_names(&l.value, &mut v);
        for id in v {
            users.entry(id.name.to_string()).or_default().push(i);
        }
    }
    let mut dependent: std::collections::HashSet<String> = std::collections::HashSet::new();
    dependent.insert(name.to_string());
    let mut stack = vec![name.to_string()];
    while let Some(n) = stack.pop() {
        for &i in users.get(&n).map_or(&[][..], Vec::as_slice) {
            let l = &lets[i].name.name;
            if dependent.insert(l.to_string()) {
                stack.push(l.to_string());
            }
        }
    }
    file.decls.iter().any(|d| {
        if matches!(d, Decl::Let(_) | Decl::Check(_) | Decl::Calc(_)) {
            return false;
        }
        let mut exprs = Vec::new();
        decl_exprs(d, &mut exprs);
        exprs.iter().any(|e| {
            let mut v = Vec::new();
            walk_names(e, &mut v);
            v.iter().any(|i| dependent.contains(i.name.as_str()))
        })
    })
}

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

use super::eval::{constant, eval, eval_val, Scope, Val, CONSTANTS};
use super::{
    did_you_mean, range, Applies, Bend, Carries, Case, Check, Combination, Distributed, FreeStrain,
    Kind, Law, LetValue, Load, Material, Model, ModelError, Node, NodeMoment, Part, Rigid,
    Settlement, State, Stiffness, Temperature, Tie, Title, Twist, UnitChoice,
};
use crate::source::Span;
use crate::syntax::ast::{self, Axis, Coord, Decl, Entry, Expr, ExprKind, Ident, Stmt, Value};
use crate::units::{Dimension, Quantity};

/// Size limits, so that hostile input gets a diagnostic, not exhaustion.
mod case;
mod check;
mod fields;
mod lets;
mod material;
mod names;
mod node;
mod part;
mod rebuild;

// What the stages share (the files below see it through `use super::*`).
use check::CheckScope;
use fields::{example_for, si_force, si_length, si_pressure, typed, Fields, What};
use lets::{unit_usage, walk_names, LetScope};
use names::{NameKind, Names};

pub use lets::{reaches, solver_depends_on};
pub use rebuild::Rebuild;

/// The keys a block of a declaration may hold (`material`, `part`, `beam`,
/// `rigid`, `calc`): what an editor offers to complete.
#[must_use]
pub fn block_keys(declaration: &str) -> &'static [&'static str] {
    match declaration {
        "material" => material::MATERIAL_KEYS,
        "part" => part::PART_KEYS,
        "beam" => part::BEAM_KEYS,
        "rigid" => node::RIGID_KEYS,
        "calc" => Title::KEYS,
        _ => &[],
    }
}

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

/// Build the checked model of a parsed file.
///
/// # Errors
/// Every problem found, in file order.
pub fn build(file: &ast::File, limits: Limits) -> Result<Model, Vec<ModelError>> {
    Builder::new(limits).run(file)
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

/// How many declarations `is` picks out.
fn count(file: &ast::File, is: impl Fn(&Decl) -> bool) -> usize {
    file.decls.iter().filter(|d| is(d)).count()
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
    /// Per node: a beam end is rigidly joined there (it turns and carries
    /// a moment).
    turns: &'m [bool],
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
    /// The `let`s (by file order) in the order they were evaluated.
    let_order: Vec<usize>,
    /// A [`Rebuild`]'s update: what does not change with the values (a
    /// material's name, its published sources and the expressions the report
    /// substitutes) is kept from the first build, not made again.
    numbers_only: bool,
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

impl Builder {
    fn new(limits: Limits) -> Self {
        Self {
            errors: Vec::new(),
            limits,
            alpha_failed: HashSet::new(),
            overrides: Vec::new(),
            let_sources: HashMap::new(),
            let_order: Vec::new(),
            numbers_only: false,
        }
    }

    fn ok<T>(&mut self, r: Result<T, ModelError>) -> Option<T> {
        push_err(&mut self.errors, r)
    }

    fn opt<T>(&mut self, r: Option<Result<T, ModelError>>) -> Option<T> {
        r.and_then(|r| self.ok(r))
    }

    /// The stages of a build, in the order each needs the last.
    fn run(mut self, file: &ast::File) -> Result<Model, Vec<ModelError>> {
        match self.run_keeping(file) {
            Some((model, _)) => Ok(model),
            None => Err(self.errors),
        }
    }

    /// [`Builder::run`], keeping what a [`Rebuild`] needs: the names and
    /// the `let` values. `None` when there are errors (in `self.errors`).
    fn run_keeping<'f>(&mut self, file: &'f ast::File) -> Option<(Model, Kept<'f>)> {
        if file.decls.len() > self.limits.max_declarations {
            self.errors.push(ModelError::too_many(
                "declarations",
                file.decls.len(),
                self.limits.max_declarations,
                Span::new(0, 0),
            ));
            return None;
        }
        let names = self.register(file);
        let (lets, let_values) = self.lets(file, &names);
        let scope = LetScope {
            names: &names,
            values: &let_values,
        };
        let (title, materials, units) = self.title_materials_units(file, &scope);
        let material_at = places(
            &names,
            NameKind::Material,
            count(file, |d| matches!(d, Decl::Material(_))),
            materials.iter().map(|m| m.name.as_str()),
        );
        let (mut nodes, kind) = self.nodes(file, &scope)?;
        self.supports(file, &names, kind, &mut nodes);
        // parts and beams in file order; `true` marks a beam
        let part_decls: Vec<(&ast::NamedBlock, bool)> = file
            .decls
            .iter()
            .filter_map(|d| match d {
                Decl::Part(nb) => Some((&**nb, false)),
                Decl::Beam(nb) => Some((&**nb, true)),
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
        let (rigids, ties) = self.rigids_and_ties(file, &names, kind, &nodes);
        let turns = super::rotating_nodes(&parts, nodes.len());
        let built = Built {
            materials: &materials,
            parts: &parts,
            part_at: &part_at,
            nodes: &nodes,
            kind,
            turns: &turns,
        };
        let cases = self.cases(file, &scope, &names, built);
        let combinations = self.combinations(file, &names, &cases);
        let checks = self.checks(
            file,
            &CheckScope { lets: scope, kind },
            &names,
            built,
            &cases,
            &combinations,
        );
        if parts.is_empty() && self.errors.is_empty() {
            self.errors
                .push(ModelError::empty("parts", Span::new(0, 0)));
        }
        if !self.errors.is_empty() {
            return None;
        }
        let model = Model {
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
            unit_usage: unit_usage(file),
        };
        Some((model, Kept { names, let_values }))
    }
}

/// What a build keeps for a [`Rebuild`]: the name table and each `let`'s
/// value (by file order).
struct Kept<'f> {
    names: Names<'f>,
    let_values: Vec<Option<Result<Quantity, ()>>>,
}

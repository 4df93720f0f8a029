//! A model built once and updated in place for other values of some
//! `let`s: what a sweep, a sensitivity and a sample do thousands of times.
//!
//! The names are registered once and the `let`s ordered once; each update
//! evaluates again only the `let`s that depend on the varied ones and the
//! declarations that use them, with the builder's own functions for each
//! kind of declaration, and writes the results over the model's. The
//! structure (names, nodes, parts, their ends, cases, combinations,
//! checks) stays; the result equals a full [`build_with`] at those values,
//! which a test checks on every example.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// A model's build kept for updates (see the module's words).
pub struct Rebuild<'f> {
    file: &'f ast::File,
    names: Names<'f>,
    builder: Builder,
    lets: Vec<&'f ast::Let>,
    /// Each `let`'s value by file order (the builder's scope reads them).
    values: Vec<Option<Result<Quantity, ()>>>,
    /// The varied `let`s, by file order.
    varied: Vec<usize>,
    /// The `let`s evaluated again, in evaluation order (varied ones too).
    order: Vec<usize>,
    /// The material declarations evaluated again, with their places.
    materials: Vec<(&'f ast::NamedBlock, usize)>,
    /// The part and beam declarations (`true`: a beam).
    part_decls: Vec<(&'f ast::NamedBlock, bool)>,
    /// The parts built again, by place (all when the nodes move).
    parts: Vec<usize>,
    /// The parts whose material changes but not their own expressions:
    /// only their E·A/L is checked again.
    restiffened: Vec<usize>,
    /// Whether the nodes (and so every length and direction) are built again.
    nodes: bool,
    /// Whether the cases are built again.
    cases: bool,
}

/// Whether any of `exprs` names one of `dependent`.
fn uses(exprs: &[&Expr], dependent: &HashSet<&str>) -> bool {
    exprs.iter().any(|e| {
        let mut v = Vec::new();
        walk_names(e, &mut v);
        v.iter().any(|i| dependent.contains(i.name.as_str()))
    })
}

impl<'f> Rebuild<'f> {
    /// Build the model of `file` and prepare updates of the `let`s named
    /// `varied`.
    ///
    /// # Errors
    /// The file's errors; a varied name that is not a `let` is an error in
    /// words.
    pub fn new(
        file: &'f ast::File,
        limits: Limits,
        varied: &[&str],
    ) -> Result<(Self, Model), Result<Vec<ModelError>, String>> {
        let mut builder = Builder::new(limits);
        let Some((model, kept)) = builder.run_keeping(file) else {
            return Err(Ok(builder.errors));
        };
        let lets = lets::file_lets(file);
        // a successful build keeps every declaration, in file order
        let same = model.lets.len() == lets.len()
            && model
                .lets
                .iter()
                .zip(&lets)
                .all(|(m, l)| m.name == l.name.name.as_str());
        if !same {
            return Err(Err("the calc's `let`s could not be numbered".into()));
        }
        let mut varied_at = Vec::new();
        for name in varied {
            match lets.iter().position(|l| l.name.name == *name) {
                Some(i) => varied_at.push(i),
                None => return Err(Err(format!("`{name}` is not a `let` of the calc"))),
            }
        }
        // the lets that depend on a varied one, through any chain
        let mut dependent: HashSet<&str> = varied.iter().copied().collect();
        loop {
            let before = dependent.len();
            for l in &lets {
                if !dependent.contains(l.name.name.as_str()) && uses(&[&l.value], &dependent) {
                    dependent.insert(l.name.name.as_str());
                }
            }
            if dependent.len() == before {
                break;
            }
        }
        let order: Vec<usize> = builder
            .let_order
            .iter()
            .copied()
            .filter(|&i| dependent.contains(lets[i].name.name.as_str()))
            .collect();
        let depends = |d: &Decl| {
            let mut exprs = Vec::new();
            lets::decl_exprs(d, &mut exprs);
            uses(&exprs, &dependent)
        };
        let mut materials = Vec::new();
        let mut part_decls = Vec::new();
        let mut parts = Vec::new();
        let (mut nodes, mut cases) = (false, false);
        for d in &file.decls {
            match d {
                Decl::Material(nb) if depends(d) => {
                    let at = model.materials.iter().position(|m| m.name == nb.name.name);
                    match at {
                        Some(at) => materials.push((&**nb, at)),
                        None => return Err(Err("a material could not be placed".into())),
                    }
                }
                Decl::Node(_) | Decl::Rigid(_) => nodes |= depends(d),
                Decl::Case(_) | Decl::Stmt(_) => cases |= depends(d),
                Decl::Part(nb) | Decl::Beam(nb) => {
                    if depends(d) {
                        parts.push(part_decls.len());
                    }
                    part_decls.push((&**nb, matches!(d, Decl::Beam(_))));
                }
                _ => {}
            }
        }
        if part_decls.len() != model.parts.len() {
            return Err(Err("the calc's parts could not be numbered".into()));
        }
        // a part of a changed material has its E·A/L checked again
        let changed: HashSet<usize> = materials.iter().map(|&(_, at)| at).collect();
        let mut restiffened: Vec<usize> = (0..model.parts.len())
            .filter(|i| {
                model.parts[*i]
                    .material()
                    .is_some_and(|m| changed.contains(&m))
                    && !parts.contains(i)
            })
            .collect();
        if nodes {
            parts = (0..part_decls.len()).collect();
            restiffened.clear();
        }
        let Kept { names, let_values } = kept;
        builder.numbers_only = true;
        Ok((
            Self {
                file,
                names,
                builder,
                lets,
                values: let_values,
                varied: varied_at,
                order,
                materials,
                part_decls,
                parts,
                restiffened,
                nodes,
                cases,
            },
            model,
        ))
    }

    /// Whether an update moves nodes (and so lengths and directions), not
    /// only stiffnesses, loads and limits.
    #[must_use]
    pub fn moves_geometry(&self) -> bool {
        self.nodes
    }

    /// Whether an update changes anything the solver reads (not only the
    /// checks).
    #[must_use]
    pub fn changes_solver(&self) -> bool {
        self.nodes || self.cases || !self.materials.is_empty() || !self.parts.is_empty()
    }

    /// Write the model for the varied `let`s at `values` (in the order
    /// given to [`Rebuild::new`]) over `model`, which must be the one
    /// [`Rebuild::new`] returned (or updated since).
    ///
    /// # Errors
    /// The errors a full build at these values gives (a value out of its
    /// sane range, a non-positive stiffness, ...); the model is then
    /// partly updated, and the next successful update mends it.
    pub fn update(
        &mut self,
        model: &mut Model,
        values: &[Quantity],
    ) -> Result<(), Vec<ModelError>> {
        let b = &mut self.builder;
        b.errors.clear();
        b.alpha_failed.clear();
        for &i in &self.order {
            let r = match self.varied.iter().position(|&v| v == i) {
                Some(k) => values.get(k).copied().ok_or_else(ModelError::poisoned),
                None => eval(
                    &self.lets[i].value,
                    &LetScope {
                        names: &self.names,
                        values: &self.values,
                    },
                ),
            };
            self.values[i] = Some(match push_err(&mut b.errors, r) {
                Some(q) => {
                    model.lets[i].value = q;
                    Ok(q)
                }
                None => Err(()),
            });
        }
        let scope = LetScope {
            names: &self.names,
            values: &self.values,
        };
        for &(nb, at) in &self.materials {
            if let Some(mut m) = b.material(nb, &scope) {
                let old = &mut model.materials[at];
                m.name = std::mem::take(&mut old.name);
                m.e_sources = std::mem::take(&mut old.e_sources);
                m.derived = std::mem::take(&mut old.derived);
                *old = m;
            }
        }
        if self.nodes {
            if let Some((mut nodes, _)) = b.nodes(self.file, &scope) {
                b.supports(self.file, &self.names, model.kind, &mut nodes);
                let (rigids, ties) = b.rigids_and_ties(self.file, &self.names, model.kind, &nodes);
                model.nodes = nodes;
                model.rigids = rigids;
                model.ties = ties;
            }
        }
        for &i in &self.parts {
            let (nb, beam) = self.part_decls[i];
            let built = b.part(
                nb,
                beam,
                &scope,
                &self.names,
                (&model.materials, &[]),
                &model.nodes,
                model.kind,
            );
            if let Some(p) = built {
                model.parts[i] = p;
            }
        }
        for &i in &self.restiffened {
            let (nb, beam) = self.part_decls[i];
            let what = What::named(if beam { "beam" } else { "part" }, &nb.name.name);
            b.stiffness_ok(&model.parts[i], &model.materials, what, nb.name.span);
        }
        if self.cases || self.nodes {
            let turns = super::super::rotating_nodes(&model.parts, model.nodes.len());
            let built = Built {
                materials: &model.materials,
                parts: &model.parts,
                part_at: &[],
                nodes: &model.nodes,
                kind: model.kind,
                turns: &turns,
            };
            let cases = b.cases(self.file, &scope, &self.names, built);
            model.cases = cases;
        }
        if b.errors.is_empty() {
            Ok(())
        } else {
            Err(std::mem::take(&mut b.errors))
        }
    }
}

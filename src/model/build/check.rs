//! Checks: where each applies (`under`), and the scope that validates
//! their expressions against the results a solve will give.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// Checks are validated by dimension only: every result stands at one SI
/// unit of its dimension, and the evaluator lets no value (a root of a
/// negative, a division by zero) refuse a check that results in other
/// combinations make valid ([`Scope::validating`]).
pub(super) struct CheckScope<'a, 'n> {
    pub(super) lets: LetScope<'a, 'n>,
    pub(super) kind: Kind,
}

impl Scope for CheckScope<'_, '_> {
    fn validating(&self) -> bool {
        true
    }

    fn name(&self, id: &Ident) -> Result<Quantity, ModelError> {
        // the load factors of the capacity path, unless a `let` takes the name
        if self.lets.names.get(&id.name).is_none()
            && crate::model::LOAD_FACTORS.contains(&id.name.as_str())
        {
            return Ok(Quantity::number(1.0));
        }
        self.lets.name(id)
    }

    fn field(&self, object: &Ident, field: &Ident) -> Result<Quantity, ModelError> {
        let (on, fields) = match self.lets.names.get(&object.name) {
            Some((NameKind::Part, _, _)) if self.lets.names.is_beam(&object.name) => (
                "beam",
                crate::model::results::PART_RESULTS
                    .iter()
                    .chain(crate::model::results::BENDING_RESULTS)
                    .copied()
                    .collect(),
            ),
            Some((NameKind::Part, _, _)) => ("part", crate::model::results::PART_RESULTS.to_vec()),
            Some((NameKind::Node, _, _)) => (
                "node",
                crate::model::results::node_results(self.kind).to_vec(),
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

impl Builder {
    /// Every check, one per member of its group for `for x in GROUP`, each
    /// validated against results of the dimensions a solve gives.
    pub(super) fn checks(
        &mut self,
        file: &ast::File,
        cscope: &CheckScope<'_, '_>,
        names: &Names<'_>,
        built: Built<'_>,
        cases: &[Case],
        combinations: &[Combination],
    ) -> Vec<Check> {
        let mut checks = Vec::new();
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
        let long_term = built
            .materials
            .iter()
            .any(|m| m.creep.is_some_and(|c| c > 0.0))
            && cases.iter().any(|c| c.sustained)
            && !built
                .parts
                .iter()
                .any(|p| p.carries != Carries::Both || p.slack.value > 0.0);
        for d in &file.decls {
            let Decl::Check(c) = d else { continue };
            let Some(applies) =
                self.applies(c, names, &combination_at, declared_combinations, long_term)
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
                let l = eval(&lhs, cscope);
                let r = eval(&rhs, cscope);
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
                    label: label.into(),
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
        checks
    }

    /// Where a check applies, from its `under`.
    pub(super) fn applies(
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
}

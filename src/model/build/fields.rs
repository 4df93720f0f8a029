//! The keys of a block: which are allowed, which are required, and the
//! dimension each value must have.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// What a block declares, for messages (`part \`p1\``); written out only
/// when a message needs it, not once per part.
#[derive(Clone, Copy)]
pub(super) struct What<'a> {
    pub(super) kind: &'static str,
    pub(super) name: Option<&'a str>,
}

impl<'a> What<'a> {
    pub(super) fn named(kind: &'static str, name: &'a str) -> Self {
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
pub(super) struct Keys<'a>(pub(super) Vec<(&'static str, &'a Entry)>);

impl<'a> Keys<'a> {
    pub(super) fn get(&self, key: &str) -> Option<&'a Entry> {
        self.0.iter().find(|(k, _)| *k == key).map(|(_, e)| *e)
    }

    pub(super) fn contains_key(&self, key: &str) -> bool {
        self.get(key).is_some()
    }

    pub(super) fn insert(&mut self, key: &'static str, e: &'a Entry) {
        self.0.push((key, e));
    }
}

/// The entries of one block, by key, after unknown and repeated keys.
pub(super) struct Fields<'a> {
    pub(super) block: What<'a>,
    pub(super) span: Span,
    pub(super) map: Keys<'a>,
}

/// An input value: evaluated, of dimension `dim`, and within the sane range
/// of its kind ([`crate::model::range`]). `what` names it for messages.
pub(super) fn typed(
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

pub(super) fn example_for(dim: Dimension) -> Option<String> {
    dim.example()
        .map(|e| format!("expected {} such as {e}", dim.describe()))
}

impl<'a> Fields<'a> {
    pub(super) fn new(
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

    pub(super) fn has(&self, key: &str) -> bool {
        self.map.contains_key(key)
    }

    pub(super) fn missing(&self, key: &'static str) -> ModelError {
        ModelError::missing_key(self.block.to_string(), key, self.span)
    }

    /// The single expression of a key.
    pub(super) fn expr(&self, key: &str) -> Option<Result<&'a Expr, ModelError>> {
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
    pub(super) fn quantity(
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
    pub(super) fn names(&self, key: &str) -> Option<Result<Vec<&'a Ident>, ModelError>> {
        let e = self.map.get(key)?;
        Some(match &e.value {
            Value::Exprs(list) => list
                .iter()
                .map(|x| match &x.kind {
                    ExprKind::Name(id) => Ok(id),
                    // `node m at ...` is refused (`m` is a unit); its uses
                    // say why rather than only that `m` is not a name.
                    ExprKind::Unit(u) if u.factors.len() == 1 && u.factors[0].power == 1 => {
                        Err(ModelError::unit_as_name(&u.factors[0].name, x.span))
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

pub(super) fn si_length(q: Quantity) -> Length {
    Length::new::<meter>(q.value)
}

pub(super) fn si_pressure(q: Quantity) -> Pressure {
    Pressure::new::<pascal>(q.value)
}

pub(super) fn si_force(q: Quantity) -> Force {
    Force::new::<newton>(q.value)
}

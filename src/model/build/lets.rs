//! `let`s: their order (dependencies, cycles), their values, and what a
//! name in a file depends on.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// Resolves `let` names while evaluating.
pub(super) struct LetScope<'a, 'n> {
    pub(super) names: &'n Names<'a>,
    pub(super) values: &'n [Option<Result<Quantity, ()>>],
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

/// Count the unit names an expression writes.
pub(super) fn walk_units(e: &Expr, counts: &mut BTreeMap<String, usize>) {
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
pub(super) fn walk_names<'e>(e: &'e Expr, out: &mut Vec<&'e Ident>) {
    e.visit(&mut |x| {
        if let ExprKind::Name(id) = &x.kind {
            out.push(id);
        }
    });
}

pub(super) fn decl_exprs<'e>(d: &'e Decl, out: &mut Vec<&'e Expr>) {
    d.exprs(out);
}

/// The `let` declarations of a file, in file order.
pub(super) fn file_lets(file: &ast::File) -> Vec<&ast::Let> {
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
    reaches(file, name, false)
}

/// Whether anything the solver uses (or, with `checks`, a check) depends on
/// the `let` named `name`, directly or through other lets.
#[must_use]
pub fn reaches(file: &ast::File, name: &str, checks: bool) -> bool {
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
        if matches!(d, Decl::Let(_) | Decl::Calc(_)) || (!checks && matches!(d, Decl::Check(_))) {
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

impl Builder {
    /// Evaluate `let`s in dependency order (their order in the file does not matter).
    pub(super) fn lets(
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
        self.let_order.clone_from(&order);
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
            crate::model::functions::sources(&lets[i].value, &mut s);
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
}

/// How often each unit is written in the file, by name.
pub(super) fn unit_usage(file: &ast::File) -> Vec<(String, usize)> {
    let mut counts = BTreeMap::new();
    let mut exprs = Vec::new();
    for d in &file.decls {
        decl_exprs(d, &mut exprs);
    }
    for e in exprs {
        walk_units(e, &mut counts);
    }
    counts.into_iter().collect()
}

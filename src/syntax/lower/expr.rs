//! Expressions and units: pest pairs to flat sums and products, quantities
//! with their units, calls and results.

#![allow(clippy::wildcard_imports)] // the lowering's shared imports and helpers

use super::*;

pub(super) fn unit_expr(p: Pair<'_, Rule>) -> Result<UnitExpr> {
    let sp = span(&p);
    let mut factors = Vec::new();
    let mut divide = false;
    for q in parts(p) {
        match q.as_rule() {
            Rule::unit_op => divide = q.as_str() == "/",
            Rule::unit_power => {
                let whole = span(&q);
                let mut it = parts(q);
                let name_pair = need(it.next(), whole)?;
                let name = name_pair.as_str().into();
                let mut fsp = span(&name_pair);
                let power = match it.next() {
                    Some(e) => {
                        fsp = fsp.to(span(&e));
                        e.as_str()
                            .parse::<i32>()
                            .ok()
                            .filter(|p| p.abs() <= 12)
                            .ok_or(SyntaxError::BadUnitPower { span: span(&e) })?
                    }
                    None => 1,
                };
                factors.push(UnitFactor {
                    name,
                    power,
                    divide,
                    span: fsp,
                });
            }
            _ => {}
        }
    }
    let span = match (factors.first(), factors.last()) {
        (Some(a), Some(b)) => a.span.to(b.span),
        _ => sp,
    };
    Ok(UnitExpr { factors, span })
}

pub(super) fn expr(p: Pair<'_, Rule>) -> Result<Expr> {
    // The commonest expression is one name (`material = steel`, `ends = a,
    // b`): read from its text, the tree of levels it went through (an
    // expression of a term of a power of a word) is not walked.
    if p.as_rule() == Rule::expr {
        let text = p.as_str().trim_end_matches([' ', '\t', '\r']);
        let mut chars = text.chars();
        if chars
            .next()
            .is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
            && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
        {
            let start = base() + p.as_span().start();
            return Ok(word_expr(text.into(), Span::new(start, start + text.len())));
        }
    }
    // A level that holds one operand (a sum of one term, a power without
    // exponent, ...) is that operand.
    if matches!(
        p.as_rule(),
        Rule::expr | Rule::term | Rule::unary | Rule::power
    ) {
        let mut inner = p.clone().into_inner();
        if let (Some(only), None) = (inner.next(), inner.next()) {
            return expr(only);
        }
    }
    // The span of a level is worked out only where it is used.
    let at = p.clone();
    let sp = || span(&at);
    match p.as_rule() {
        Rule::expr => chain(
            p,
            sp,
            |op| if op == "+" { AddOp::Add } else { AddOp::Sub },
            ExprKind::Sum,
        ),
        Rule::term => chain(
            p,
            sp,
            |op| if op == "*" { MulOp::Mul } else { MulOp::Div },
            ExprKind::Product,
        ),
        Rule::power => {
            let mut operands = parts(p).map(expr).collect::<Result<Vec<_>>>()?;
            // right-associative: a ^ b ^ c = a ^ (b ^ c)
            let mut acc = operands.pop().ok_or_else(|| internal(sp()))?;
            while let Some(base) = operands.pop() {
                let s = base.span.to(acc.span);
                acc = Expr {
                    kind: ExprKind::Power(Box::new(base), Box::new(acc)),
                    span: s,
                };
            }
            Ok(acc)
        }
        Rule::unary | Rule::signed => {
            let mut negs = 0usize;
            let mut atom = None;
            for q in parts(p) {
                if q.as_rule() == Rule::neg {
                    negs += 1;
                } else {
                    atom = Some(expr(q)?);
                }
            }
            let mut e = atom.ok_or_else(|| internal(sp()))?;
            if negs % 2 == 1 {
                let span = Span::new(at.as_span().start() + base(), e.span.end());
                e = Expr {
                    kind: ExprKind::Neg(Box::new(e)),
                    span,
                };
            }
            Ok(e)
        }
        Rule::paren => {
            let inner = expr(need(parts(p).next(), sp())?)?;
            Ok(Expr {
                kind: inner.kind,
                span: sp(),
            })
        }
        Rule::quantity => {
            let mut it = parts(p);
            let num = need(it.next(), sp())?;
            let value = number(&num)?;
            let Some(u) = it.next() else {
                return Ok(Expr {
                    kind: ExprKind::Quantity { value, unit: None },
                    span: span(&num),
                });
            };
            let u = unit_expr(u)?;
            quantity_with_unit(value, at.as_span().start() + base(), u).map_err(|f| not_a_unit(&f))
        }
        Rule::word => {
            let mut it = parts(p);
            let id = ident(&need(it.next(), sp())?);
            match it.next() {
                None => Ok(word_expr(id.name, id.span)),
                Some(q) if q.as_rule() == Rule::field => {
                    let f = ident(&need(parts(q).next(), sp())?);
                    let span = id.span.to(f.span);
                    Ok(Expr {
                        kind: ExprKind::Field(Box::new([id, f])),
                        span,
                    })
                }
                Some(q) => {
                    let end = span(&q).end();
                    let mut args = Vec::new();
                    for a in parts(q) {
                        let asp = span(&a);
                        let inner: Vec<_> = parts(a).collect();
                        let arg = match inner.as_slice() {
                            [n, v] if n.as_rule() == Rule::name => Arg {
                                name: Some(ident(n)),
                                value: expr(v.clone())?,
                                span: asp,
                            },
                            [v] => Arg {
                                name: None,
                                value: expr(v.clone())?,
                                span: asp,
                            },
                            _ => return Err(internal(asp)),
                        };
                        args.push(arg);
                    }
                    let span = Span::new(id.span.start(), end);
                    Ok(Expr {
                        kind: ExprKind::Call(Box::new(Call { func: id, args })),
                        span,
                    })
                }
            }
        }
        _ => Err(internal(sp())),
    }
}

/// `a op b op c ...` (a sum or a product): its operands and operators, as
/// one flat node.
pub(super) fn chain<O>(
    p: Pair<'_, Rule>,
    sp: impl Fn() -> Span,
    op_of: fn(&str) -> O,
    make: fn(Box<Expr>, Vec<(O, Expr)>) -> ExprKind,
) -> Result<Expr> {
    let mut it = parts(p);
    let first = expr(need(it.next(), sp())?)?;
    let mut rest = Vec::new();
    while let Some(op) = it.next() {
        rest.push((op_of(op.as_str()), expr(need(it.next(), sp())?)?));
    }
    Ok(flat(first, rest, make))
}

pub(super) fn flat<O>(
    first: Expr,
    rest: Vec<(O, Expr)>,
    make: fn(Box<Expr>, Vec<(O, Expr)>) -> ExprKind,
) -> Expr {
    if rest.is_empty() {
        first
    } else {
        // The span runs from the first operand to the last, so that trailing
        // blanks and comments are never part of it.
        let span = rest
            .last()
            .map_or(first.span, |(_, e)| first.span.to(e.span));
        Expr {
            kind: make(Box::new(first), rest),
            span,
        }
    }
}

/// A number starting at `start` followed by the words `u` of a unit. The
/// unit is the leading run of unit names; what follows a word that is not a
/// unit multiplies or divides the quantity (`10 ft * b`). The first word
/// when it is not a unit. Shared by both parsers.
pub(super) fn quantity_with_unit(
    value: f64,
    start: usize,
    u: UnitExpr,
) -> std::result::Result<Expr, UnitFactor> {
    let lead = u
        .factors
        .iter()
        .take_while(|f| lookup(&f.name).is_some())
        .count();
    let mut factors = u.factors;
    if lead == 0 {
        return Err(factors.swap_remove(0));
    }
    let rest: Vec<UnitFactor> = factors.split_off(lead);
    let unit_span = factors[0].span.to(factors[factors.len() - 1].span);
    let q = Expr {
        kind: ExprKind::Quantity {
            value,
            unit: Some(UnitExpr {
                factors,
                span: unit_span,
            }),
        },
        span: Span::new(start, unit_span.end()),
    };
    if rest.is_empty() {
        return Ok(q);
    }
    let mut ops = Vec::with_capacity(rest.len());
    let mut end = q.span.end();
    for f in rest {
        end = f.span.end();
        let op = if f.divide { MulOp::Div } else { MulOp::Mul };
        ops.push((op, factor_expr(f)));
    }
    Ok(Expr {
        kind: ExprKind::Product(Box::new(q), ops),
        span: Span::new(start, end),
    })
}

/// A word standing alone: a unit when the table has it, else a name.
pub(super) fn word_expr(name: compact_str::CompactString, span: Span) -> Expr {
    let kind = if lookup(&name).is_some() {
        ExprKind::Unit(UnitExpr {
            factors: vec![UnitFactor {
                name,
                power: 1,
                divide: false,
                span,
            }],
            span,
        })
    } else {
        ExprKind::Name(Ident { name, span })
    };
    Expr { kind, span }
}

/// A word standing after a unit: a unit factor, or a name to multiply by.
pub(super) fn factor_expr(f: UnitFactor) -> Expr {
    let span = f.span;
    let base = word_expr(f.name, span);
    if f.power == 1 {
        return base;
    }
    let exp = Expr {
        kind: ExprKind::Quantity {
            value: f64::from(f.power),
            unit: None,
        },
        span,
    };
    Expr {
        kind: ExprKind::Power(Box::new(base), Box::new(exp)),
        span,
    }
}

pub(super) fn not_a_unit(f: &UnitFactor) -> SyntaxError {
    let names = crate::units::units().iter().map(|u| u.name);
    // `mm2` for `mm^2`, `SI` for `si`
    let digits = f.name.trim_start_matches(|c: char| !c.is_ascii_digit());
    let stem = &f.name[..f.name.len() - digits.len()];
    let power_hint = (!digits.is_empty()
        && digits.chars().all(|c| c.is_ascii_digit())
        && lookup(stem).is_some())
    .then(|| format!("a power of a unit is written with `^`: `{stem}^{digits}`"));
    let system_hint = matches!(f.name.to_ascii_lowercase().as_str(), "si" | "us").then(|| {
        format!(
            "the unit systems are written in lower case: `units {}`",
            f.name.to_ascii_lowercase()
        )
    });
    if let Some(help) = power_hint.or(system_hint) {
        return SyntaxError::NotAUnit {
            name: f.name.to_string(),
            span: f.span,
            help: Some(help),
        };
    }
    let help = match (
        crate::units::temperature_hint(&f.name),
        crate::words::did_you_mean(&f.name, names),
    ) {
        (Some(h), _) => h.to_string(),
        (None, Some(s)) => format!("{s} To multiply by a value, write `* {}`", f.name),
        (None, None) => format!(
            "`tandem units` lists the units; to multiply by a value, write `* {}`",
            f.name
        ),
    };
    SyntaxError::NotAUnit {
        name: f.name.to_string(),
        span: f.span,
        help: Some(help),
    }
}

/// A unit expression that must consist of units only (`units kip, in`).
pub(super) fn only_units(u: UnitExpr) -> Result<UnitExpr> {
    match u.factors.iter().find(|f| lookup(&f.name).is_none()) {
        Some(f) => Err(not_a_unit(f)),
        None => Ok(u),
    }
}

//! pest pairs to the owned syntax tree, and pest errors to [`SyntaxError`].

use pest::iterators::Pair;
use pest::Parser;

use super::ast::{
    AddOp, Arg, Axis, Block, Call, Case, Check, Combine, ComboTerm, Compare, Coord, Decl, Each,
    Entry, Expr, ExprKind, File, Group, Ident, Let, MulOp, NamedBlock, Node, State, Stmt, Str,
    Support, Tie, Under, UnitExpr, UnitFactor, Units, Value,
};
use super::parser::{CalcParser, Rule};
use super::{SyntaxError, MAX_NESTING};
use crate::source::Span;
use crate::units::lookup;

mod expected;
mod expr;
mod scan;

pub use scan::{parse, MAX_SYNTAX_ERRORS};

// What the parts of the lowering share (they see it through `use super::*`).
use expected::from_pest;
use expr::{expr, only_units, unit_expr};

type Result<T> = std::result::Result<T, SyntaxError>;

thread_local! {
    /// Offset of the statement being lowered within the file.
    static BASE: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

/// The span of a pair, from its first token to the end of its last one.
/// (A pest pair also takes in blanks and comments skipped before an
/// optional part that then did not match; those are left out, so that the
/// spans equal the hand-written parser's.)
fn span(p: &Pair<'_, Rule>) -> Span {
    let base = base();
    Span::new(base + p.as_span().start(), base + tight_end(p))
}

/// Where the statement being lowered starts in the file.
fn base() -> usize {
    BASE.with(std::cell::Cell::get)
}

/// Where a pair's last token ends. A rule that ends in an optional or a
/// repetition has skipped the blanks (and a comment) after its last token
/// before the attempt failed; those are not part of it. Strings hold no
/// line end, so the last line of the text starts outside any string.
fn tight_end(p: &Pair<'_, Rule>) -> usize {
    let s = p.as_span();
    let text = s.as_str();
    if p.as_rule() == Rule::string {
        return s.end();
    }
    let line = text.rfind('\n').map_or(0, |i| i + 1);
    if !text[line..].contains('#') {
        return s.start() + text.trim_end_matches([' ', '\t', '\r']).len();
    }
    let mut code = text.len();
    let mut quoted = false;
    let mut chars = text[line..].char_indices();
    while let Some((i, c)) = chars.next() {
        match c {
            '"' => quoted = !quoted,
            '\\' if quoted => {
                chars.next();
            }
            '#' if !quoted => {
                code = line + i;
                break;
            }
            _ => {}
        }
    }
    s.start() + text[..code].trim_end_matches([' ', '\t', '\r']).len()
}

fn ident(p: &Pair<'_, Rule>) -> Ident {
    Ident {
        name: p.as_str().into(),
        span: span(p),
    }
}

/// Inner pairs without punctuation and line ends.
fn parts(p: Pair<'_, Rule>) -> impl Iterator<Item = Pair<'_, Rule>> {
    p.into_inner().filter(|q| {
        !matches!(
            q.as_rule(),
            Rule::eol
                | Rule::eq
                | Rule::open
                | Rule::close
                | Rule::lparen
                | Rule::rparen
                | Rule::comma
                | Rule::colon
                | Rule::kw_calc
                | Rule::kw_let
                | Rule::kw_material
                | Rule::kw_node
                | Rule::kw_at
                | Rule::kw_fix
                | Rule::kw_settle
                | Rule::kw_part
                | Rule::kw_beam
                | Rule::kw_pin
                | Rule::kw_moment
                | Rule::kw_rigid
                | Rule::kw_tie
                | Rule::kw_case
                | Rule::kw_combine
                | Rule::kw_check
                | Rule::kw_for
                | Rule::kw_in
                | Rule::kw_under
                | Rule::kw_group
                | Rule::kw_units
                | Rule::kw_load
                | Rule::kw_temperature
                | Rule::kw_strain
        )
    })
}

fn decl(p: Pair<'_, Rule>) -> Result<Decl> {
    let sp = span(&p);
    let rule = p.as_rule();
    if matches!(
        rule,
        Rule::load_stmt
            | Rule::moment_stmt
            | Rule::temperature_stmt
            | Rule::strain_stmt
            | Rule::settle_stmt
    ) {
        return Ok(Decl::Stmt(Box::new(stmt(p)?)));
    }
    let mut it = parts(p);
    let mut next = || it.next();
    Ok(match rule {
        Rule::calc_decl => Decl::Calc(block(need(next(), sp)?)?),
        Rule::let_decl => {
            let name = ident(&need(next(), sp)?);
            let value = expr(need(next(), sp)?)?;
            Decl::Let(Box::new(Let {
                name,
                value,
                span: sp,
            }))
        }
        Rule::material_decl | Rule::part_decl | Rule::beam_decl | Rule::rigid_decl => {
            let name = ident(&need(next(), sp)?);
            let nb = NamedBlock {
                name,
                block: block(need(next(), sp)?)?,
                span: sp,
            };
            match rule {
                Rule::material_decl => Decl::Material(Box::new(nb)),
                Rule::part_decl => Decl::Part(Box::new(nb)),
                Rule::beam_decl => Decl::Beam(Box::new(nb)),
                _ => Decl::Rigid(Box::new(nb)),
            }
        }
        Rule::node_decl => {
            let name = ident(&need(next(), sp)?);
            let at = coord(need(next(), sp)?)?;
            Decl::Node(Box::new(Node { name, at, span: sp }))
        }
        Rule::fix_decl => {
            let mut supports = Vec::new();
            while let Some(s) = next() {
                let ssp = span(&s);
                let mut inner = parts(s);
                let node = ident(&need(inner.next(), ssp)?);
                let axis = inner.next().map(|a| axis(&a));
                supports.push(Support {
                    node,
                    axis,
                    span: ssp,
                });
            }
            Decl::Fix(supports)
        }
        Rule::pin_decl => {
            let mut nodes = Vec::new();
            while let Some(n) = next() {
                nodes.push(ident(&n));
            }
            Decl::Pin(nodes, sp)
        }
        Rule::tie_decl => {
            let mut nodes = Vec::new();
            while let Some(n) = next() {
                nodes.push(ident(&n));
            }
            Decl::Tie(Tie { nodes, span: sp })
        }
        Rule::case_decl => {
            let name = ident(&need(next(), sp)?);
            let mut flags = Vec::new();
            let mut stmts = Vec::new();
            while let Some(q) = next() {
                match q.as_rule() {
                    Rule::case_flag => flags.push(ident(&q)),
                    Rule::case_body => {
                        for s in parts(q) {
                            stmts.push(stmt(s)?);
                        }
                    }
                    _ => {}
                }
            }
            Decl::Case(Box::new(Case {
                name,
                flags,
                stmts,
                span: sp,
            }))
        }
        Rule::combine_decl => combine(&mut it, sp)?,
        Rule::check_decl => check(&mut it, sp)?,
        Rule::group_decl => {
            let name = ident(&need(next(), sp)?);
            let mut members = Vec::new();
            while let Some(n) = next() {
                members.push(ident(&n));
            }
            Decl::Group(Box::new(Group {
                name,
                members,
                span: sp,
            }))
        }
        Rule::units_decl => {
            let first = need(next(), sp)?;
            if first.as_rule() == Rule::unit_system {
                Decl::Units(Units::System(ident(&first)))
            } else {
                let mut list = vec![only_units(unit_expr(first)?)?];
                while let Some(q) = next() {
                    list.push(only_units(unit_expr(q)?)?);
                }
                Decl::Units(Units::List(list))
            }
        }
        _ => return Err(internal(sp)),
    })
}

/// `combine NAME = [±] [FACTOR [*]] CASE ...`: the pairs after the keyword.
fn combine<'i>(it: &mut impl Iterator<Item = Pair<'i, Rule>>, sp: Span) -> Result<Decl> {
    let mut next = || it.next();
    let name = ident(&need(next(), sp)?);
    let mut terms = Vec::new();
    let mut negative = false;
    while let Some(q) = next() {
        match q.as_rule() {
            Rule::sign => negative = q.as_str() == "-",
            Rule::combo_term => {
                let tsp = span(&q);
                let mut factor = 1.0;
                let mut case = None;
                for t in parts(q) {
                    match t.as_rule() {
                        Rule::number => factor = number(&t)?,
                        _ => case = Some(ident(&t)),
                    }
                }
                if negative {
                    factor = -factor;
                }
                negative = false;
                terms.push(ComboTerm {
                    factor,
                    case: need_ident(case, tsp)?,
                    span: tsp,
                });
            }
            _ => {}
        }
    }
    Ok(Decl::Combine(Box::new(Combine {
        name,
        terms,
        span: sp,
    })))
}

/// `check "LABEL" [for X in GROUP] [under ...]: LHS OP RHS`: the pairs after
/// the keyword.
fn check<'i>(it: &mut impl Iterator<Item = Pair<'i, Rule>>, sp: Span) -> Result<Decl> {
    let mut next = || it.next();
    let label = string(&need(next(), sp)?);
    let mut q = need(next(), sp)?;
    let mut each = None;
    let mut under = None;
    if q.as_rule() == Rule::check_each {
        let esp = span(&q);
        let mut it = parts(q);
        let var = ident(&need(it.next(), esp)?);
        let group = ident(&need(it.next(), esp)?);
        each = Some(Each {
            var,
            group,
            span: esp,
        });
        q = need(next(), sp)?;
    }
    if q.as_rule() == Rule::check_under {
        let usp = span(&q);
        let mut names = Vec::new();
        let mut state = None;
        for r in parts(q) {
            if r.as_rule() == Rule::check_state {
                let st = if r.as_str() == "long_term" {
                    State::Long
                } else {
                    State::Short
                };
                state = Some((st, span(&r)));
            } else {
                names.push(ident(&r));
            }
        }
        under = Some(Under {
            names,
            state,
            span: usp,
        });
        q = need(next(), sp)?;
    }
    let lhs = expr(q)?;
    let op = match need(next(), sp)?.as_str() {
        "<=" => Compare::Le,
        "<" => Compare::Lt,
        ">=" => Compare::Ge,
        _ => Compare::Gt,
    };
    let rhs = expr(need(next(), sp)?)?;
    Ok(Decl::Check(Box::new(Check {
        label,
        each,
        under,
        lhs,
        op,
        rhs,
        span: sp,
    })))
}

fn internal(sp: Span) -> SyntaxError {
    SyntaxError::Expected {
        expected: "a declaration".into(),
        after: String::new(),
        span: sp,
        found: "not understood".into(),
        help: None,
    }
}

fn need(p: Option<Pair<'_, Rule>>, sp: Span) -> Result<Pair<'_, Rule>> {
    p.ok_or_else(|| internal(sp))
}

fn need_ident(i: Option<Ident>, sp: Span) -> Result<Ident> {
    i.ok_or_else(|| internal(sp))
}

fn axis(p: &Pair<'_, Rule>) -> (Axis, Span) {
    let a = match p.as_str() {
        "x" => Axis::X,
        "y" => Axis::Y,
        _ => Axis::Rotation,
    };
    (a, span(p))
}

fn stmt(p: Pair<'_, Rule>) -> Result<Stmt> {
    let sp = span(&p);
    let rule = p.as_rule();
    let mut it = parts(p);
    Ok(match rule {
        Rule::load_stmt => Stmt::Load {
            node: ident(&need(it.next(), sp)?),
            force: coord(need(it.next(), sp)?)?,
            span: sp,
        },
        Rule::moment_stmt => Stmt::Moment {
            node: ident(&need(it.next(), sp)?),
            value: expr(need(it.next(), sp)?)?,
            span: sp,
        },
        Rule::temperature_stmt => {
            let a = need(it.next(), sp)?;
            if a.as_rule() == Rule::name {
                Stmt::Temperature {
                    part: Some(ident(&a)),
                    change: expr(need(it.next(), sp)?)?,
                    span: sp,
                }
            } else {
                Stmt::Temperature {
                    part: None,
                    change: expr(a)?,
                    span: sp,
                }
            }
        }
        Rule::strain_stmt => Stmt::Strain {
            part: ident(&need(it.next(), sp)?),
            value: expr(need(it.next(), sp)?)?,
            span: sp,
        },
        Rule::settle_stmt => {
            let node = ident(&need(it.next(), sp)?);
            let mut q = need(it.next(), sp)?;
            let mut ax = None;
            if q.as_rule() == Rule::axis {
                ax = Some(axis(&q));
                q = need(it.next(), sp)?;
            }
            Stmt::Settle {
                node,
                axis: ax,
                movement: expr(q)?,
                span: sp,
            }
        }
        _ => return Err(internal(sp)),
    })
}

fn coord(p: Pair<'_, Rule>) -> Result<Coord> {
    let sp = span(&p);
    if p.as_rule() == Rule::pair {
        let mut it = parts(p);
        let x = expr(need(it.next(), sp)?)?;
        let y = expr(need(it.next(), sp)?)?;
        Ok(Coord::Plane(Box::new([x, y]), sp))
    } else {
        Ok(Coord::Axial(expr(p)?))
    }
}

fn block(p: Pair<'_, Rule>) -> Result<Block> {
    let sp = span(&p);
    let mut entries = Vec::new();
    for e in parts(p) {
        let esp = span(&e);
        let mut it = parts(e);
        let key = ident(&need(it.next(), esp)?);
        let first = need(it.next(), esp)?;
        let value = if first.as_rule() == Rule::string {
            Value::Str(string(&first))
        } else {
            let mut list = vec![expr(first)?];
            for q in it {
                list.push(expr(q)?);
            }
            Value::Exprs(list)
        };
        entries.push(Entry {
            key,
            value,
            span: esp,
        });
    }
    Ok(Block { entries, span: sp })
}

fn string(p: &Pair<'_, Rule>) -> Str {
    let raw = p.as_str();
    let body = raw.get(1..raw.len().saturating_sub(1)).unwrap_or("");
    let mut text = String::with_capacity(body.len());
    let mut chars = body.chars();
    while let Some(c) = chars.next() {
        if c == '\\' {
            if let Some(n) = chars.next() {
                text.push(n);
            }
        } else {
            text.push(c);
        }
    }
    Str {
        text,
        span: span(p),
    }
}

fn number(p: &Pair<'_, Rule>) -> Result<f64> {
    let clean: String = p.as_str().chars().filter(|c| *c != '_').collect();
    match clean.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(SyntaxError::BadNumber { span: span(p) }),
    }
}

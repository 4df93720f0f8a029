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

type Result<T> = std::result::Result<T, SyntaxError>;

/// Parse a calc file's text into its syntax tree.
///
/// # Errors
/// The syntax errors found: unbalanced braces, unterminated strings and
/// too-deep nesting from a pre-scan, else each statement's first error,
/// worded for an engineer.
pub fn parse(text: &str) -> std::result::Result<File, Vec<SyntaxError>> {
    parse_with(text)
}

fn parse_with(text: &str) -> std::result::Result<File, Vec<SyntaxError>> {
    let (pre, chunks) = prescan(text);
    if !pre.is_empty() {
        return Err(pre);
    }
    // Large files are parsed on every core; statements are independent.
    // They differ in length (a file's nodes come before its longer parts),
    // so the text is cut into many runs for the pool to balance.
    let total = chunks.len();
    let runs = match crate::parallel::runs_for(total, 2000) {
        1 => 1,
        cores => cores * 16,
    };
    let parts = crate::parallel::in_runs(&chunks, runs, |k, group| {
        // the first list has room for all: the others are moved onto it
        // without growing it
        parse_chunks(text, group, if k == 0 { total } else { group.len() })
    });
    let mut decls = Vec::new();
    let mut errors = Vec::new();
    for (k, (d, e)) in parts.into_iter().enumerate() {
        if k == 0 {
            decls = d;
        } else {
            decls.extend(d);
        }
        errors.extend(e);
    }
    if errors.is_empty() {
        Ok(File { decls })
    } else {
        errors.truncate(MAX_SYNTAX_ERRORS);
        Err(errors)
    }
}

/// At most this many syntax errors are reported from one file.
pub const MAX_SYNTAX_ERRORS: usize = 50;

thread_local! {
    /// Offset of the statement being lowered within the file.
    static BASE: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

fn parse_chunks(
    text: &str,
    chunks: &[(usize, usize)],
    room: usize,
) -> (Vec<Decl>, Vec<SyntaxError>) {
    let mut decls = Vec::with_capacity(room);
    let mut errors = Vec::new();
    for &(start, end) in chunks {
        match statement(text, start, end) {
            Ok(Some(d)) => decls.push(d),
            Ok(None) => {}
            Err(e) => errors.push(e),
        }
        if errors.len() >= MAX_SYNTAX_ERRORS {
            break;
        }
    }
    (decls, errors)
}

/// One statement (`text[start..end]`) through pest and the lowering;
/// `Ok(None)` for a statement that declares nothing.
fn statement(text: &str, start: usize, end: usize) -> Result<Option<Decl>> {
    let body = &text[start..end];
    let first = body.trim_start_matches([' ', '\t', '\r']);
    let word = first
        .split(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
        .next();
    let shortcut = match word {
        Some("node") => Some(Rule::node_statement),
        Some("part") => Some(Rule::part_statement),
        Some("let") => Some(Rule::let_statement),
        _ => None,
    };
    BASE.with(|b| b.set(start));
    let mut out = None;
    if let Some(rule) = shortcut {
        if let Ok(mut pairs) = CalcParser::parse(rule, body) {
            out = pairs.next().and_then(|stmt| {
                stmt.into_inner()
                    .find(|p| p.as_rule() != Rule::EOI)
                    .map(decl)
            });
        }
    }
    if out.is_none() {
        out = match CalcParser::parse(Rule::statement, body) {
            Ok(mut pairs) => pairs.next().and_then(|stmt| {
                stmt.into_inner()
                    .find(|p| p.as_rule() != Rule::EOI)
                    .map(decl)
            }),
            Err(e) => Some(Err(from_pest(&e, text, start))),
        };
    }
    BASE.with(|b| b.set(0));
    out.transpose()
}

/// Braces, strings and nesting depth, checked before pest runs so that the
/// messages can point at the opening brace or quote, and so that hostile
/// nesting never reaches the recursive parser.
fn prescan(text: &str) -> (Vec<SyntaxError>, Vec<(usize, usize)>) {
    let mut errors = Vec::new();
    let mut braces: Vec<usize> = Vec::new();
    let mut depth = 0usize;
    let bytes = text.as_bytes();
    let mut chunks = Vec::new();
    let mut chunk_start = 0usize;
    let mut has_code = false;
    // `^` is right-associative, so a chain of them nests; count per statement.
    let mut carets = 0usize;
    let mut i = 0;
    while i < bytes.len() {
        let b = bytes[i];
        if !b.is_ascii_whitespace() && b != b'#' && b != b';' {
            has_code = true;
        }
        match b {
            b'#' => {
                while i < bytes.len() && bytes[i] != b'\n' {
                    i += 1;
                }
                continue;
            }
            b'"' => {
                let start = i;
                i += 1;
                loop {
                    match bytes.get(i) {
                        None | Some(b'\n' | b'\r') => {
                            errors.push(SyntaxError::UnclosedString {
                                span: Span::new(start, i),
                            });
                            break;
                        }
                        Some(b'\\') => i += 2,
                        Some(b'"') => break,
                        Some(_) => i += 1,
                    }
                }
            }
            b'{' => braces.push(i),
            b'}' if braces.pop().is_none() => {
                errors.push(SyntaxError::StrayBrace {
                    span: Span::new(i, i + 1),
                });
            }
            b'(' => {
                depth += 1;
                if depth > MAX_NESTING {
                    errors.push(SyntaxError::TooDeep {
                        span: Span::new(i, i + 1),
                        limit: MAX_NESTING,
                    });
                    return (errors, chunks);
                }
            }
            b')' => depth = depth.saturating_sub(1),
            b'^' => {
                carets += 1;
                if carets > MAX_NESTING {
                    errors.push(SyntaxError::TooManyPowers {
                        span: Span::new(i, i + 1),
                        limit: MAX_NESTING,
                    });
                    return (errors, chunks);
                }
            }
            b'\n' | b';' => {
                if b == b'\n' {
                    depth = 0;
                }
                // A statement ends at a line end or `;` outside braces.
                if braces.is_empty() {
                    if has_code {
                        chunks.push((chunk_start, i));
                    }
                    chunk_start = i + 1;
                    has_code = false;
                }
                carets = 0;
            }
            _ => {}
        }
        i += 1;
    }
    if has_code {
        chunks.push((chunk_start, bytes.len()));
    }
    for open in braces {
        errors.push(SyntaxError::UnclosedBlock {
            span: Span::new(open, open + 1),
        });
    }
    (errors, chunks)
}

/// What the user is told a rule stands for.
fn describe(rule: Rule) -> Option<&'static str> {
    Some(match rule {
        Rule::expr
        | Rule::term
        | Rule::power
        | Rule::unary
        | Rule::signed
        | Rule::quantity
        | Rule::paren
        | Rule::word
        | Rule::number
        | Rule::neg
        | Rule::arg => "a value",
        Rule::unit_expr | Rule::unit_name | Rule::unit_power => "a unit",
        Rule::field => "`.`",
        Rule::mul_op | Rule::add_op | Rule::unit_op => "an operator",
        Rule::eol | Rule::EOI => "the end of the line",
        Rule::name => "a name",
        Rule::string => "a quoted string",
        Rule::open => "`{`",
        Rule::close => "`}`",
        Rule::eq => "`=`",
        Rule::lparen | Rule::args => "`(`",
        Rule::rparen => "`)`",
        Rule::comma => "`,`",
        Rule::colon => "`:`",
        Rule::compare => "a comparison (`<=`, `<`, `>=`, `>`)",
        Rule::pair => "a pair `(x, y)`",
        Rule::axis => "`x` or `y`",
        Rule::sign => "`+` or `-`",
        Rule::combo_term => "a case name",
        Rule::case_flag => "`sustained`",
        Rule::check_each | Rule::kw_for => "`for`",
        Rule::kw_in => "`in`",
        Rule::check_under | Rule::kw_under => "`under`",
        Rule::check_state => "`short_term` or `long_term`",
        Rule::unit_system => "`us`, `si`",
        Rule::kw_at => "`at`",
        Rule::entry => "a `key = value` line",
        Rule::calc_decl
        | Rule::let_decl
        | Rule::material_decl
        | Rule::node_decl
        | Rule::fix_decl
        | Rule::part_decl
        | Rule::rigid_decl
        | Rule::tie_decl
        | Rule::case_decl
        | Rule::combine_decl
        | Rule::check_decl
        | Rule::group_decl
        | Rule::units_decl
        | Rule::statement
        | Rule::kw_calc
        | Rule::kw_let
        | Rule::kw_material
        | Rule::kw_node
        | Rule::kw_fix
        | Rule::kw_part
        | Rule::kw_rigid
        | Rule::kw_tie
        | Rule::kw_case
        | Rule::kw_combine
        | Rule::kw_check
        | Rule::kw_group
        | Rule::kw_units => "a declaration (`let`, `material`, `node`, `part`, `case`, ...)",
        Rule::load_stmt
        | Rule::temperature_stmt
        | Rule::strain_stmt
        | Rule::settle_stmt
        | Rule::kw_load
        | Rule::kw_temperature
        | Rule::kw_strain
        | Rule::kw_settle => "a case statement (`load`, `temperature`, `strain`, `settle`)",
        _ => return None,
    })
}

fn join_or(words: &[&str]) -> String {
    match words {
        [] => "something else".into(),
        [one] => (*one).to_string(),
        [init @ .., last] => format!("{} or {last}", init.join(", ")),
    }
}

/// The word or symbol that starts at `pos`, for "found ..." labels.
fn token_at(text: &str, pos: usize) -> String {
    let rest = text.get(pos..).unwrap_or("");
    let Some(c) = rest.chars().next() else {
        return "end of file".into();
    };
    if c == '\n' || c == '\r' {
        return "end of line".into();
    }
    let word: String = if c.is_ascii_alphanumeric() || c == '_' || c == '.' {
        rest.chars()
            .take_while(|c| c.is_ascii_alphanumeric() || *c == '_' || *c == '.')
            .collect()
    } else {
        c.to_string()
    };
    format!("found `{word}`")
}

/// A hint for a word an engineer may start a statement with that is not
/// one of tandem's keywords: the keyword that says it.
fn keyword_hint(word: &str) -> Option<String> {
    let w = word.to_ascii_lowercase();
    match w.as_str() {
        "support" | "supports" | "fixed" | "fixity" | "restrain" | "restraint" | "anchor"
        | "pin" | "pinned" | "hinge" | "roller" | "bc" => Some(
            "supports are written `fix NODE` (every direction), or in a plane model `fix NODE x` or `fix NODE y` (a roller)".into(),
        ),
        "temp" | "temps" | "dt" | "delta_t" | "thermal" | "heat" => Some(
            "a temperature change is written `temperature = 20 degC` (every part) or `temperature PART = 20 degC`".into(),
        ),
        "force" | "point_load" | "loads" => {
            Some("a load is written `load NODE = -10 kN` (or `(FX, FY)` in a plane)".into())
        }
        _ => {
            const KEYWORDS: &[&str] = &[
                "let", "material", "node", "part", "case", "combine", "check", "fix", "tie",
                "rigid", "units", "calc", "load", "temperature", "strain", "settle",
            ];
            crate::words::did_you_mean(&w, KEYWORDS.iter().copied())
        }
    }
}

/// The token just before `pos` on the same line, for "after ...".
fn token_before(text: &str, pos: usize) -> String {
    let head = text.get(..pos).unwrap_or("");
    let line = head.rsplit('\n').next().unwrap_or("");
    let line = line.split('#').next().unwrap_or("").trim_end();
    let word: String = line
        .chars()
        .rev()
        .take_while(|c| !c.is_whitespace())
        .collect::<Vec<_>>()
        .into_iter()
        .rev()
        .collect();
    if word.is_empty() {
        String::new()
    } else {
        format!(" after `{word}`")
    }
}

fn from_pest(e: &pest::error::Error<Rule>, text: &str, base: usize) -> SyntaxError {
    let pos = base
        + match e.location {
            pest::error::InputLocation::Pos(p) => p,
            pest::error::InputLocation::Span((s, _)) => s,
        };
    let mut words: Vec<&str> = Vec::new();
    if let pest::error::ErrorVariant::ParsingError { positives, .. } = &e.variant {
        for r in positives {
            if let Some(w) = describe(*r) {
                if !words.contains(&w) {
                    words.push(w);
                }
            }
        }
    }
    // Order from the most to the least specific for a readable message.
    let rank = |w: &str| match w {
        "a unit" => 0,
        "an operator" => 1,
        "the end of the line" => 9,
        "the end of the file" => 10,
        _ => 5,
    };
    words.sort_by_key(|w| rank(w));
    let line_start = text
        .get(..pos)
        .unwrap_or("")
        .rsplit('\n')
        .next()
        .is_some_and(|l| l.trim().is_empty());
    if line_start {
        words.retain(|w| *w != "the end of the line");
    }
    if words.contains(&"the end of the line") {
        words.retain(|w| *w != "the end of the file");
    }
    let found = token_at(text, pos);
    let help = if found.starts_with("found `") && words.contains(&"a unit") {
        Some(
            "units are written after the number, e.g. `29000 ksi`; `tandem units` lists them"
                .into(),
        )
    } else if let Some(h) = (line_start || words.iter().any(|w| w.starts_with("a case statement")))
        .then(|| keyword_hint(found.trim_start_matches("found `").trim_end_matches('`')))
        .flatten()
    {
        Some(h)
    } else if words.iter().any(|w| w.starts_with("a declaration")) {
        Some("each line starts with a keyword such as `let`, `material`, `node`, `part`, `case`, `combine` or `check`".into())
    } else {
        None
    };
    let end = (pos + found.len().saturating_sub(9).max(1)).min(text.len());
    let end = if text.is_char_boundary(end) { end } else { pos };
    SyntaxError::Expected {
        expected: join_or(&words),
        after: token_before(text, pos),
        span: Span::new(pos, end.max(pos)),
        found,
        help,
    }
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
        Rule::load_stmt | Rule::temperature_stmt | Rule::strain_stmt | Rule::settle_stmt
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
        Rule::material_decl | Rule::part_decl | Rule::rigid_decl => {
            let name = ident(&need(next(), sp)?);
            let nb = NamedBlock {
                name,
                block: block(need(next(), sp)?)?,
                span: sp,
            };
            match rule {
                Rule::material_decl => Decl::Material(Box::new(nb)),
                Rule::part_decl => Decl::Part(Box::new(nb)),
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
        Rule::combine_decl => {
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
            Decl::Combine(Box::new(Combine {
                name,
                terms,
                span: sp,
            }))
        }
        Rule::check_decl => {
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
            Decl::Check(Box::new(Check {
                label,
                each,
                under,
                lhs,
                op,
                rhs,
                span: sp,
            }))
        }
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
    let a = if p.as_str() == "x" { Axis::X } else { Axis::Y };
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

fn unit_expr(p: Pair<'_, Rule>) -> Result<UnitExpr> {
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

fn expr(p: Pair<'_, Rule>) -> Result<Expr> {
    // Most levels of an expression hold one operand and need no span of
    // their own: it is worked out only where it is used.
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
fn chain<O>(
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

fn flat<O>(
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
fn factor_expr(f: UnitFactor) -> Expr {
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

fn not_a_unit(f: &UnitFactor) -> SyntaxError {
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
fn only_units(u: UnitExpr) -> Result<UnitExpr> {
    match u.factors.iter().find(|f| lookup(&f.name).is_none()) {
        Some(f) => Err(not_a_unit(f)),
        None => Ok(u),
    }
}

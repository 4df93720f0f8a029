//! A hand-written parser for one statement that follows `grammar/tandem.pest`
//! rule for rule, for speed on large files.
//!
//! The grammar stays the definition of the language. This parser only
//! accepts: it returns the same syntax tree the pest parser and its lowering
//! would build, or `None` whenever pest would report an error (or whenever
//! it is unsure), and the caller then asks pest, which gives the worded
//! error. `tests/language.rs` compares the two on every calc the tests know
//! and on thousands of random and mutated ones.
//!
//! Conventions: every token reader skips blanks and comments before it (the
//! grammar's implicit `WHITESPACE`/`COMMENT` between tokens), atomic rules
//! (names, numbers, strings, unit powers) are read without skipping, and
//! spans run from the first token of a rule to the end of its last one.
//! A failed alternative restores the position, as a PEG does.

use super::ast::{
    AddOp, Arg, Axis, Block, Call, Case, Check, Combine, ComboTerm, Compare, Coord, Decl, Each,
    Entry, Expr, ExprKind, Group, Ident, Let, MulOp, NamedBlock, Node, State, Stmt, Str, Stub,
    StubKind, Support, Tie, Under, UnitExpr, UnitFactor, Units, Value,
};
use super::lower::{quantity_with_unit, word_expr};
use crate::source::Span;
use crate::units::lookup;

/// The declaration of one statement (text between separators), or `None`
/// when pest should parse it.
///
/// `trim` keeps every list at its length: for a tree that is kept (a million
/// blocks make the growth slack count), not for one dropped at once.
pub(super) fn statement(chunk: &str, base: usize, trim: bool) -> Option<Decl> {
    let mut p = P::new(chunk, base, trim);
    let d = p.decl()?;
    p.skip();
    if p.pos != p.s.len() || p.bad {
        return None;
    }
    Some(d)
}

/// The head of a `node` or `part` statement (its keyword, its name, and
/// `at` or the opening brace after it) as a stub for the outline parse;
/// `None` for any other statement. The rest is read when it is built.
pub(super) fn head(chunk: &str, base: usize) -> Option<Stub> {
    let mut p = P::new(chunk, base, false);
    let kind = if p.keyword("node") {
        StubKind::Node
    } else if p.keyword("part") {
        StubKind::Part
    } else {
        return None;
    };
    let name = p.ident()?;
    let follows = match kind {
        StubKind::Node => p.keyword("at"),
        StubKind::Part => {
            p.skip();
            p.peek() == Some(b'{')
        }
    };
    follows.then(|| Stub {
        kind,
        name,
        span: Span::new(base, base + chunk.len()),
    })
}

struct P<'a> {
    s: &'a [u8],
    text: &'a str,
    pos: usize,
    base: usize,
    /// Set when the grammar matched but the lowering would refuse the
    /// text (a bad number, a word that is not a unit, ...).
    bad: bool,
    /// Trim lists to their length (see [`statement`]).
    trim: bool,
}

/// A point to return to when an alternative fails.
#[derive(Clone, Copy)]
struct Mark(usize, bool);

fn ident_char(b: u8) -> bool {
    b.is_ascii_alphanumeric() || b == b'_'
}

impl<'a> P<'a> {
    /// A parser at the start of `chunk`, which begins at `base` in the file.
    fn new(chunk: &'a str, base: usize, trim: bool) -> Self {
        P {
            s: chunk.as_bytes(),
            text: chunk,
            pos: 0,
            base,
            bad: false,
            trim,
        }
    }

    fn mark(&self) -> Mark {
        Mark(self.pos, self.bad)
    }

    fn reset(&mut self, m: Mark) {
        self.pos = m.0;
        self.bad = m.1;
    }

    fn span(&self, start: usize, end: usize) -> Span {
        Span::new(self.base + start, self.base + end)
    }

    fn peek(&self) -> Option<u8> {
        self.s.get(self.pos).copied()
    }

    /// Blanks and comments (not line ends).
    fn skip(&mut self) {
        while let Some(&b) = self.s.get(self.pos) {
            match b {
                b' ' | b'\t' | b'\r' => self.pos += 1,
                b'#' => {
                    while let Some(&c) = self.s.get(self.pos) {
                        if c == b'\n' || c == b'\r' {
                            break;
                        }
                        self.pos += 1;
                    }
                }
                _ => break,
            }
        }
    }

    /// Skip, then take `b` if it is next.
    fn eat(&mut self, b: u8) -> bool {
        self.skip();
        if self.peek() == Some(b) {
            self.pos += 1;
            true
        } else {
            false
        }
    }

    /// Skip, then take a name; `(start, end)`.
    fn word(&mut self) -> Option<(usize, usize)> {
        self.skip();
        let start = self.pos;
        match self.peek() {
            Some(b) if b.is_ascii_alphabetic() || b == b'_' => {}
            _ => return None,
        }
        self.pos += 1;
        while self.peek().is_some_and(ident_char) {
            self.pos += 1;
        }
        Some((start, self.pos))
    }

    fn ident(&mut self) -> Option<Ident> {
        let (a, b) = self.word()?;
        Some(Ident {
            name: self.text[a..b].into(),
            span: self.span(a, b),
        })
    }

    /// A name that must be exactly `kw` (an atomic keyword rule).
    fn keyword(&mut self, kw: &str) -> bool {
        let m = self.mark();
        match self.word() {
            Some((a, b)) if &self.text[a..b] == kw => true,
            _ => {
                self.reset(m);
                false
            }
        }
    }

    /// `x` or `y` as a whole word.
    fn axis(&mut self) -> Option<(Axis, Span)> {
        let m = self.mark();
        if let Some((a, b)) = self.word() {
            match &self.text[a..b] {
                "x" => return Some((Axis::X, self.span(a, b))),
                "y" => return Some((Axis::Y, self.span(a, b))),
                _ => {}
            }
        }
        self.reset(m);
        None
    }

    fn decl(&mut self) -> Option<Decl> {
        let m = self.mark();
        let (a, b) = self.word()?;
        let start = a;
        let d = match &self.text[a..b] {
            "calc" => Decl::Calc(self.block()?),
            "let" => {
                let name = self.ident()?;
                if !self.eat(b'=') {
                    return None;
                }
                let value = self.expr()?;
                let span = self.span(start, value.span.end() - self.base);
                Decl::Let(Box::new(Let { name, value, span }))
            }
            kw @ ("material" | "part" | "rigid") => {
                let name = self.ident()?;
                let block = self.block()?;
                let span = self.span(start, block.span.end() - self.base);
                let nb = NamedBlock { name, block, span };
                match kw {
                    "material" => Decl::Material(Box::new(nb)),
                    "part" => Decl::Part(Box::new(nb)),
                    _ => Decl::Rigid(Box::new(nb)),
                }
            }
            "node" => {
                let name = self.ident()?;
                if !self.keyword("at") {
                    return None;
                }
                let at = self.coord()?;
                let span = self.span(start, at.span().end() - self.base);
                Decl::Node(Box::new(Node { name, at, span }))
            }
            "fix" => {
                let supports = self.list(Self::support)?;
                Decl::Fix(supports)
            }
            "tie" => {
                let nodes = self.list(Self::ident)?;
                if nodes.len() < 2 {
                    return None;
                }
                let end = nodes[nodes.len() - 1].span.end() - self.base;
                Decl::Tie(Tie {
                    nodes,
                    span: self.span(start, end),
                })
            }
            "case" => {
                let name = self.ident()?;
                let mut flags = Vec::new();
                loop {
                    let m = self.mark();
                    match self.word() {
                        Some((fa, fb)) if &self.text[fa..fb] == "sustained" => flags.push(Ident {
                            name: "sustained".into(),
                            span: self.span(fa, fb),
                        }),
                        _ => {
                            self.reset(m);
                            break;
                        }
                    }
                }
                let (stmts, end) = self.body(Self::case_stmt)?;
                Decl::Case(Box::new(Case {
                    name,
                    flags,
                    stmts,
                    span: self.span(start, end),
                }))
            }
            "combine" => self.combine(start)?,
            "group" => {
                let name = self.ident()?;
                if !self.eat(b'=') {
                    return None;
                }
                let members = self.list(Self::ident)?;
                let end = members[members.len() - 1].span.end() - self.base;
                Decl::Group(Box::new(Group {
                    name,
                    members,
                    span: self.span(start, end),
                }))
            }
            "check" => {
                let label = self.string()?;
                let each = self.each()?;
                let under = self.under()?;
                if !self.eat(b':') {
                    return None;
                }
                let lhs = self.expr()?;
                self.skip();
                let op = match (self.peek(), self.s.get(self.pos + 1)) {
                    (Some(b'<'), Some(b'=')) => Compare::Le,
                    (Some(b'>'), Some(b'=')) => Compare::Ge,
                    (Some(b'<'), _) => Compare::Lt,
                    (Some(b'>'), _) => Compare::Gt,
                    _ => return None,
                };
                self.pos += if matches!(op, Compare::Le | Compare::Ge) {
                    2
                } else {
                    1
                };
                let rhs = self.expr()?;
                let span = self.span(start, rhs.span.end() - self.base);
                Decl::Check(Box::new(Check {
                    label,
                    each,
                    under,
                    lhs,
                    op,
                    rhs,
                    span,
                }))
            }
            "units" => {
                let m = self.mark();
                if let Some((ua, ub)) = self.word() {
                    let w = &self.text[ua..ub];
                    if w == "us" || w == "si" {
                        return Some(Decl::Units(Units::System(Ident {
                            name: w.into(),
                            span: self.span(ua, ub),
                        })));
                    }
                }
                self.reset(m);
                let list = self.list(Self::unit_expr)?;
                if list
                    .iter()
                    .flat_map(|u| &u.factors)
                    .any(|f| lookup(&f.name).is_none())
                {
                    self.bad = true;
                }
                Decl::Units(Units::List(list))
            }
            _ => {
                self.reset(m);
                Decl::Stmt(Box::new(self.case_stmt()?))
            }
        };
        Some(d)
    }

    /// `item (, item)*`: at least one; a comma not followed by an item is
    /// left for the caller, as the grammar's repetition backtracks.
    /// `for x in GROUP`, if present; `None` when it is malformed.
    #[allow(clippy::option_option)]
    fn each(&mut self) -> Option<Option<Each>> {
        let m = self.mark();
        let Some((a, _)) = self.word().filter(|&(a, b)| &self.text[a..b] == "for") else {
            self.reset(m);
            return Some(None);
        };
        let var = self.ident()?;
        if !self.keyword("in") {
            return None;
        }
        let group = self.ident()?;
        let end = group.span.end() - self.base;
        Some(Some(Each {
            var,
            group,
            span: self.span(a, end),
        }))
    }

    /// `under NAME, ... [short_term|long_term]`, if present.
    #[allow(clippy::option_option)]
    fn under(&mut self) -> Option<Option<Under>> {
        let m = self.mark();
        let Some((a, _)) = self.word().filter(|&(a, b)| &self.text[a..b] == "under") else {
            self.reset(m);
            return Some(None);
        };
        let state = |p: &mut Self| {
            let m = p.mark();
            match p.word() {
                Some((x, y)) if matches!(&p.text[x..y], "short_term" | "long_term") => {
                    let st = if &p.text[x..y] == "long_term" {
                        State::Long
                    } else {
                        State::Short
                    };
                    Some((st, p.span(x, y)))
                }
                _ => {
                    p.reset(m);
                    None
                }
            }
        };
        let (names, state) = match state(self) {
            Some(st) => (Vec::new(), Some(st)),
            None => {
                let names = self.list(Self::ident)?;
                (names, state(self))
            }
        };
        let end = match (&state, names.last()) {
            (Some((_, sp)), _) => sp.end(),
            (None, Some(n)) => n.span.end(),
            (None, None) => return None,
        } - self.base;
        Some(Some(Under {
            names,
            state,
            span: self.span(a, end),
        }))
    }

    fn list<T>(&mut self, mut item: impl FnMut(&mut Self) -> Option<T>) -> Option<Vec<T>> {
        let mut items = vec![item(self)?];
        loop {
            let m = self.mark();
            if !self.eat(b',') {
                self.reset(m);
                break;
            }
            match item(self) {
                Some(x) => items.push(x),
                None => {
                    self.reset(m);
                    break;
                }
            }
        }
        Some(items)
    }

    fn support(&mut self) -> Option<Support> {
        let node = self.ident()?;
        let axis = self.axis();
        let end = axis.map_or(node.span.end(), |a| a.1.end());
        let span = Span::new(node.span.start(), end);
        Some(Support { node, axis, span })
    }

    /// `{ item (sep item)* }` with optional separators at both ends; the
    /// items and the end of the closing brace.
    fn body<T>(&mut self, mut item: impl FnMut(&mut Self) -> Option<T>) -> Option<(Vec<T>, usize)> {
        if !self.eat(b'{') {
            return None;
        }
        let mut items = Vec::new();
        loop {
            let mut seps = 0;
            loop {
                self.skip();
                match self.peek() {
                    Some(b'\n' | b';') => {
                        self.pos += 1;
                        seps += 1;
                    }
                    _ => break,
                }
            }
            if self.peek() == Some(b'}') {
                self.pos += 1;
                // Growth leaves room for four.
                if self.trim {
                    items.shrink_to_fit();
                }
                return Some((items, self.pos));
            }
            if !items.is_empty() && seps == 0 {
                return None;
            }
            items.push(item(self)?);
        }
    }

    fn block(&mut self) -> Option<Block> {
        self.skip();
        let start = self.pos;
        let (entries, end) = self.body(Self::entry)?;
        Some(Block {
            entries,
            span: self.span(start, end),
        })
    }

    fn entry(&mut self) -> Option<Entry> {
        let key = self.ident()?;
        if !self.eat(b'=') {
            return None;
        }
        self.skip();
        let value = if self.peek() == Some(b'"') {
            Value::Str(self.string()?)
        } else {
            let mut list = self.list(Self::expr)?;
            if self.trim {
                list.shrink_to_fit();
            }
            Value::Exprs(list)
        };
        let end = match &value {
            Value::Str(s) => s.span.end(),
            Value::Exprs(list) => list[list.len() - 1].span.end(),
        };
        let span = Span::new(key.span.start(), end);
        Some(Entry { key, value, span })
    }

    fn string(&mut self) -> Option<Str> {
        self.skip();
        let start = self.pos;
        if self.peek() != Some(b'"') {
            return None;
        }
        self.pos += 1;
        let mut text = String::new();
        loop {
            match self.peek()? {
                b'"' => break,
                b'\\' => match self.s.get(self.pos + 1) {
                    Some(&c @ (b'"' | b'\\')) => {
                        text.push(char::from(c));
                        self.pos += 2;
                    }
                    _ => return None,
                },
                b'\n' | b'\r' => return None,
                _ => {
                    let c = self.text[self.pos..].chars().next()?;
                    text.push(c);
                    self.pos += c.len_utf8();
                }
            }
        }
        self.pos += 1;
        Some(Str {
            text,
            span: self.span(start, self.pos),
        })
    }

    fn case_stmt(&mut self) -> Option<Stmt> {
        let (a, b) = self.word()?;
        let start = a;
        Some(match &self.text[a..b] {
            "load" => {
                let node = self.ident()?;
                if !self.eat(b'=') {
                    return None;
                }
                let force = self.coord()?;
                let span = self.span(start, force.span().end() - self.base);
                Stmt::Load { node, force, span }
            }
            "temperature" => {
                let m = self.mark();
                let part = self.ident();
                if part.is_none() {
                    self.reset(m);
                }
                if !self.eat(b'=') {
                    return None;
                }
                let change = self.expr()?;
                let span = self.span(start, change.span.end() - self.base);
                Stmt::Temperature { part, change, span }
            }
            "strain" => {
                let part = self.ident()?;
                if !self.eat(b'=') {
                    return None;
                }
                let value = self.expr()?;
                let span = self.span(start, value.span.end() - self.base);
                Stmt::Strain { part, value, span }
            }
            "settle" => {
                let node = self.ident()?;
                let axis = self.axis();
                if !self.eat(b'=') {
                    return None;
                }
                let movement = self.expr()?;
                let span = self.span(start, movement.span.end() - self.base);
                Stmt::Settle {
                    node,
                    axis,
                    movement,
                    span,
                }
            }
            _ => return None,
        })
    }

    fn combine(&mut self, start: usize) -> Option<Decl> {
        let name = self.ident()?;
        if !self.eat(b'=') {
            return None;
        }
        let mut terms = Vec::new();
        // `sign? term (sign term)*`
        let mut negative = self.sign(true);
        terms.push(self.combo_term(negative == Some(true))?);
        loop {
            let m = self.mark();
            negative = self.sign(false);
            let Some(neg) = negative else {
                self.reset(m);
                break;
            };
            match self.combo_term(neg) {
                Some(t) => terms.push(t),
                None => {
                    self.reset(m);
                    break;
                }
            }
        }
        let end = terms[terms.len() - 1].span.end() - self.base;
        Some(Decl::Combine(Box::new(Combine {
            name,
            terms,
            span: self.span(start, end),
        })))
    }

    /// `+` (false) or `-` (true); `optional` leaves the position when none.
    fn sign(&mut self, optional: bool) -> Option<bool> {
        let m = self.mark();
        self.skip();
        match self.peek() {
            Some(b'+') => {
                self.pos += 1;
                Some(false)
            }
            Some(b'-') => {
                self.pos += 1;
                Some(true)
            }
            _ => {
                if optional {
                    self.reset(m);
                }
                None
            }
        }
    }

    fn combo_term(&mut self, negative: bool) -> Option<ComboTerm> {
        self.skip();
        let start = self.pos;
        let m = self.mark();
        let mut factor = 1.0;
        if let Some(v) = self.number() {
            let after = self.mark();
            if !self.eat(b'*') {
                self.reset(after);
            }
            factor = v;
        }
        let case = match self.ident() {
            Some(c) => c,
            None => {
                // the optional number group backtracks; a name cannot start
                // where a number did
                self.reset(m);
                self.ident()?
            }
        };
        if negative {
            factor = -factor;
        }
        let span = self.span(start, case.span.end() - self.base);
        Some(ComboTerm { factor, case, span })
    }

    /// The atomic `number` rule at the current position (no skipping); its
    /// value, or a bad mark when it does not fit an `f64`.
    fn number(&mut self) -> Option<f64> {
        let start = self.pos;
        let digit = |p: &Self, i: usize| p.s.get(i).is_some_and(u8::is_ascii_digit);
        let digits = |p: &mut Self| -> bool {
            if !digit(p, p.pos) {
                return false;
            }
            p.pos += 1;
            loop {
                if digit(p, p.pos) {
                    p.pos += 1;
                } else if p.peek() == Some(b'_') && digit(p, p.pos + 1) {
                    p.pos += 2;
                } else {
                    return true;
                }
            }
        };
        if digits(self) {
            if self.peek() == Some(b'.') {
                self.pos += 1;
                digits(self);
            }
        } else if self.peek() == Some(b'.') && digit(self, self.pos + 1) {
            self.pos += 1;
            digits(self);
        } else {
            self.pos = start;
            return None;
        }
        if matches!(self.peek(), Some(b'e' | b'E')) {
            let save = self.pos;
            self.pos += 1;
            if matches!(self.peek(), Some(b'+' | b'-')) {
                self.pos += 1;
            }
            if digit(self, self.pos) {
                while digit(self, self.pos) {
                    self.pos += 1;
                }
            } else {
                self.pos = save;
            }
        }
        let raw = &self.text[start..self.pos];
        let parsed = if raw.contains('_') {
            raw.replace('_', "").parse::<f64>()
        } else {
            raw.parse::<f64>()
        };
        match parsed {
            Ok(v) if v.is_finite() => Some(v),
            _ => {
                self.bad = true;
                Some(0.0)
            }
        }
    }

    fn coord(&mut self) -> Option<Coord> {
        self.skip();
        let start = self.pos;
        let m = self.mark();
        if self.eat(b'(') {
            if let Some(x) = self.expr() {
                if self.eat(b',') {
                    if let Some(y) = self.expr() {
                        if self.eat(b')') {
                            return Some(Coord::Plane(
                                Box::new([x, y]),
                                self.span(start, self.pos),
                            ));
                        }
                    }
                }
            }
        }
        self.reset(m);
        Some(Coord::Axial(self.expr()?))
    }

    // ------------------------------------------------------------ expressions

    fn expr(&mut self) -> Option<Expr> {
        let first = self.term()?;
        let mut rest = Vec::new();
        loop {
            let m = self.mark();
            self.skip();
            let op = match self.peek() {
                Some(b'+') => AddOp::Add,
                Some(b'-') => AddOp::Sub,
                _ => {
                    self.reset(m);
                    break;
                }
            };
            self.pos += 1;
            match self.term() {
                Some(t) => rest.push((op, t)),
                None => {
                    self.reset(m);
                    break;
                }
            }
        }
        Some(flat(first, rest, ExprKind::Sum))
    }

    fn term(&mut self) -> Option<Expr> {
        let first = self.unary(true)?;
        let mut rest = Vec::new();
        loop {
            let m = self.mark();
            self.skip();
            let op = match self.peek() {
                Some(b'*') => MulOp::Mul,
                Some(b'/') => MulOp::Div,
                _ => {
                    self.reset(m);
                    break;
                }
            };
            self.pos += 1;
            match self.unary(true) {
                Some(t) => rest.push((op, t)),
                None => {
                    self.reset(m);
                    break;
                }
            }
        }
        Some(flat(first, rest, ExprKind::Product))
    }

    /// `neg* power` (`unary`) or `neg* atom` (`signed`).
    fn unary(&mut self, power: bool) -> Option<Expr> {
        self.skip();
        let start = self.pos;
        let mut negs = 0usize;
        while self.peek() == Some(b'-') {
            negs += 1;
            self.pos += 1;
            self.skip();
        }
        let e = if power { self.power()? } else { self.atom()? };
        if negs % 2 == 1 {
            let span = Span::new(self.base + start, e.span.end());
            Some(Expr {
                kind: ExprKind::Neg(Box::new(e)),
                span,
            })
        } else {
            Some(e)
        }
    }

    fn power(&mut self) -> Option<Expr> {
        let first = self.atom()?;
        // most atoms have no power: no list for them
        let m = self.mark();
        if !self.eat(b'^') {
            self.reset(m);
            return Some(first);
        }
        self.reset(m);
        let mut operands = vec![first];
        loop {
            let m = self.mark();
            if !self.eat(b'^') {
                self.reset(m);
                break;
            }
            match self.unary(false) {
                Some(e) => operands.push(e),
                None => {
                    self.reset(m);
                    break;
                }
            }
        }
        let mut acc = operands.pop()?;
        while let Some(base) = operands.pop() {
            let s = base.span.to(acc.span);
            acc = Expr {
                kind: ExprKind::Power(Box::new(base), Box::new(acc)),
                span: s,
            };
        }
        Some(acc)
    }

    fn atom(&mut self) -> Option<Expr> {
        self.skip();
        match self.peek()? {
            b'0'..=b'9' | b'.' => self.quantity(),
            b'(' => {
                let start = self.pos;
                self.pos += 1;
                let inner = self.expr()?;
                if !self.eat(b')') {
                    return None;
                }
                Some(Expr {
                    kind: inner.kind,
                    span: self.span(start, self.pos),
                })
            }
            _ => self.word_atom(),
        }
    }

    fn quantity(&mut self) -> Option<Expr> {
        let start = self.pos;
        let value = self.number()?;
        let num_span = self.span(start, self.pos);
        let m = self.mark();
        let Some(u) = self.unit_expr() else {
            self.reset(m);
            return Some(Expr {
                kind: ExprKind::Quantity { value, unit: None },
                span: num_span,
            });
        };
        match quantity_with_unit(value, num_span.start(), u) {
            Ok(e) => Some(e),
            Err(_) => {
                // not a unit: pest's lowering words the error
                self.bad = true;
                Some(Expr {
                    kind: ExprKind::Quantity { value, unit: None },
                    span: num_span,
                })
            }
        }
    }

    /// `unit_power (unit_op unit_power)*`, names not yet looked up.
    fn unit_expr(&mut self) -> Option<UnitExpr> {
        let mut factors = vec![self.unit_power(false)?];
        loop {
            let m = self.mark();
            self.skip();
            let divide = match self.peek() {
                Some(b'*') => false,
                Some(b'/') => true,
                _ => {
                    self.reset(m);
                    break;
                }
            };
            self.pos += 1;
            match self.unit_power(divide) {
                Some(f) => factors.push(f),
                None => {
                    self.reset(m);
                    break;
                }
            }
        }
        let span = factors[0].span.to(factors[factors.len() - 1].span);
        Some(UnitExpr { factors, span })
    }

    fn unit_power(&mut self, divide: bool) -> Option<UnitFactor> {
        let (a, b) = self.word()?;
        // a word followed by `(` or `.` is a call or a result, not a unit
        let after = self.mark();
        self.skip();
        if matches!(self.peek(), Some(b'(' | b'.')) {
            return None;
        }
        self.reset(after);
        let mut span = self.span(a, b);
        let mut power = 1;
        let m = self.mark();
        if self.eat(b'^') {
            self.skip();
            let es = self.pos;
            if self.peek() == Some(b'-') {
                self.pos += 1;
            }
            let ds = self.pos;
            while self.peek().is_some_and(|c| c.is_ascii_digit()) {
                self.pos += 1;
            }
            if self.pos == ds {
                self.reset(m);
            } else {
                span = span.to(self.span(es, self.pos));
                match self.text[es..self.pos].parse::<i32>() {
                    Ok(p) if p.abs() <= 12 => power = p,
                    _ => self.bad = true,
                }
            }
        }
        Some(UnitFactor {
            name: self.text[a..b].into(),
            power,
            divide,
            span,
        })
    }

    fn word_atom(&mut self) -> Option<Expr> {
        let (a, b) = self.word()?;
        let id_span = self.span(a, b);
        let m = self.mark();
        self.skip();
        match self.peek() {
            Some(b'(') => {
                if let Some((args, end)) = self.args() {
                    let func = Ident {
                        name: self.text[a..b].into(),
                        span: id_span,
                    };
                    return Some(Expr {
                        kind: ExprKind::Call(Box::new(Call { func, args })),
                        span: self.span(a, end),
                    });
                }
                self.reset(m);
            }
            Some(b'.') => {
                self.pos += 1;
                if let Some(f) = self.ident() {
                    let span = id_span.to(f.span);
                    let id = Ident {
                        name: self.text[a..b].into(),
                        span: id_span,
                    };
                    return Some(Expr {
                        kind: ExprKind::Field(Box::new([id, f])),
                        span,
                    });
                }
                self.reset(m);
            }
            _ => self.reset(m),
        }
        Some(word_expr(self.text[a..b].into(), id_span))
    }

    /// `( arg, ... )` at the current position; the arguments and the end.
    fn args(&mut self) -> Option<(Vec<Arg>, usize)> {
        if !self.eat(b'(') {
            return None;
        }
        let mut args = Vec::new();
        let m = self.mark();
        if let Some(a) = self.arg() {
            args.push(a);
            while self.eat(b',') {
                args.push(self.arg()?);
            }
        } else {
            self.reset(m);
        }
        if !self.eat(b')') {
            return None;
        }
        Some((args, self.pos))
    }

    fn arg(&mut self) -> Option<Arg> {
        self.skip();
        let start = self.pos;
        let m = self.mark();
        let mut name = None;
        if let Some(id) = self.ident() {
            if self.eat(b'=') {
                name = Some(id);
            } else {
                self.reset(m);
            }
        } else {
            self.reset(m);
        }
        let value = self.expr()?;
        let span = Span::new(self.base + start, value.span.end());
        Some(Arg { name, value, span })
    }
}

/// The flat sum or product of `first` and `rest`, or `first` alone.
fn flat<O>(
    first: Expr,
    rest: Vec<(O, Expr)>,
    make: fn(Box<Expr>, Vec<(O, Expr)>) -> ExprKind,
) -> Expr {
    match rest.last() {
        None => first,
        Some((_, last)) => {
            let span = first.span.to(last.span);
            Expr {
                kind: make(Box::new(first), rest),
                span,
            }
        }
    }
}

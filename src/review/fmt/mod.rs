//! The canonical layout of a calc file (`tandem fmt`).
//!
//! Blocks are indented two spaces with `=` aligned inside them; runs of
//! one-line declarations of one keyword stay together with their `=` (or
//! `at`, `:`) aligned; one blank line separates everything else. Comments
//! stay where they were: an own-line comment before the line it preceded, a
//! trailing comment at the end of its line. Expressions, numbers and units
//! are kept as written (runs of blanks inside them fold to one space), so the
//! formatted file means exactly what the original did.

use crate::source::{Source, Span};
use crate::syntax::ast::{self, Axis, Compare, Coord, Decl, Stmt, Value};
use crate::syntax::SyntaxError;

mod comments;

use comments::{attach, comments, line_of, line_starts};

/// One output line: `left` is padded to the group's width before `right`.
#[derive(Clone, Debug, Default)]
struct Line {
    indent: usize,
    left: String,
    right: String,
    comment: Option<String>,
    /// Own-line comments to print before this line.
    before: Vec<String>,
    /// Where this line starts and which source line it ends on (for comments).
    anchor: usize,
    ends_on: usize,
    /// The entries of a block written on one line (`right` is then empty):
    /// in a run of such blocks they are aligned as the columns of a table.
    cells: Vec<String>,
}

/// A declaration as output lines: one line, or a block of lines.
#[derive(Clone, Debug)]
struct Item {
    /// Keyword of a one-line declaration (for runs), `None` for blocks.
    run: Option<&'static str>,
    lines: Vec<Line>,
    /// Lines of a block body (aligned together).
    body: std::ops::Range<usize>,
    /// Whether a blank line separates it from the declaration before it in
    /// the source (a run of one-line declarations breaks there).
    blank_before: bool,
    /// A block written on one line: its kind and that line. It stays so
    /// when the block before or after it is one too (a table of blocks).
    row: Option<(&'static str, Line)>,
}

impl Item {
    /// A one-line declaration of a run kind.
    fn one(run: &'static str, line: Line) -> Item {
        Item {
            run: Some(run),
            lines: vec![line],
            body: 0..0,
            blank_before: false,
            row: None,
        }
    }
}

fn fold(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}

struct Ctx<'a> {
    text: &'a str,
    starts: Vec<usize>,
}

impl Ctx<'_> {
    fn slice(&self, sp: Span) -> String {
        fold(self.text.get(sp.start()..sp.end()).unwrap_or(""))
    }
    fn line(&self, offset: usize) -> usize {
        line_of(&self.starts, offset)
    }
    fn coord(&self, c: &Coord) -> (String, usize) {
        match c {
            Coord::Axial(e) => (self.slice(e.span), e.span.end()),
            Coord::Plane(xy, sp) => (
                format!("({}, {})", self.slice(xy[0].span), self.slice(xy[1].span)),
                sp.end(),
            ),
        }
    }
    fn single(&self, left: String, right: String, start: usize, end: usize) -> Line {
        Line {
            indent: 0,
            left,
            right,
            anchor: start,
            ends_on: self.line(end.saturating_sub(1).max(start)),
            ..Line::default()
        }
    }
    fn stmt(&self, s: &Stmt) -> Line {
        let axis = |a: &Option<(Axis, Span)>| match a {
            Some((Axis::X, _)) => " x",
            Some((Axis::Y, _)) => " y",
            Some((Axis::Rotation, _)) => " rotation",
            None => "",
        };
        let (left, right, end) = match s {
            Stmt::Load { node, force, .. } => {
                let (c, end) = self.coord(force);
                (format!("load {}", node.name), format!("= {c}"), end)
            }
            Stmt::Temperature { part, change, .. } => (
                match part {
                    Some(p) => format!("temperature {}", p.name),
                    None => "temperature".into(),
                },
                format!("= {}", self.slice(change.span)),
                change.span.end(),
            ),
            Stmt::Moment { node, value, .. } => (
                format!("moment {}", node.name),
                format!("= {}", self.slice(value.span)),
                value.span.end(),
            ),
            Stmt::Strain { part, value, .. } => (
                format!("strain {}", part.name),
                format!("= {}", self.slice(value.span)),
                value.span.end(),
            ),
            Stmt::Settle {
                node,
                axis: a,
                movement,
                ..
            } => (
                format!("settle {}{}", node.name, axis(a)),
                format!("= {}", self.slice(movement.span)),
                movement.span.end(),
            ),
        };
        self.single(left, right, s.span().start(), end)
    }

    fn block(&self, run: &'static str, header: &str, start: usize, block: &ast::Block) -> Item {
        let close = block.span.end().saturating_sub(1);
        let mut lines = vec![Line {
            left: format!("{header} {{"),
            anchor: start,
            ends_on: self.line(block.span.start()),
            ..Line::default()
        }];
        for e in &block.entries {
            let (value, end) = self.entry_value(e);
            let mut l = self.single(
                e.key.name.to_string(),
                format!("= {value}"),
                e.key.span.start(),
                end,
            );
            l.indent = 2;
            lines.push(l);
        }
        let mut item = self.closed(lines, close);
        if !block.entries.is_empty() && self.line(start) == self.line(close) {
            let cells = block
                .entries
                .iter()
                .map(|e| format!("{} = {}", e.key.name, self.entry_value(e).0))
                .collect();
            let line = self.single(header.to_string(), String::new(), start, close + 1);
            item.row = Some((run, Line { cells, ..line }));
        }
        item
    }

    /// A block entry's value as written, and where it ends.
    fn entry_value(&self, e: &ast::Entry) -> (String, usize) {
        match &e.value {
            Value::Str(s) => (self.slice(s.span), s.span.end()),
            Value::Exprs(list) => (
                list.iter()
                    .map(|x| self.slice(x.span))
                    .collect::<Vec<_>>()
                    .join(", "),
                list.last().map_or(e.key.span.end(), |x| x.span.end()),
            ),
        }
    }

    /// A block item: its header and body lines, closed by `}` at `close`.
    fn closed(&self, mut lines: Vec<Line>, close: usize) -> Item {
        lines.push(Line {
            left: "}".into(),
            anchor: close,
            ends_on: self.line(close),
            ..Line::default()
        });
        let n = lines.len();
        Item {
            run: None,
            lines,
            body: 1..n - 1,
            blank_before: false,
            row: None,
        }
    }

    fn item(&self, d: &Decl) -> Item {
        match d {
            Decl::Calc(b) => self.block("calc {}", "calc", b.span.start(), b),
            Decl::Material(nb) => self.block(
                "material {}",
                &format!("material {}", nb.name.name),
                nb.span.start(),
                &nb.block,
            ),
            Decl::Part(nb) => self.block(
                "part {}",
                &format!("part {}", nb.name.name),
                nb.span.start(),
                &nb.block,
            ),
            Decl::Beam(nb) => self.block(
                "beam {}",
                &format!("beam {}", nb.name.name),
                nb.span.start(),
                &nb.block,
            ),
            Decl::Rigid(nb) => self.block(
                "rigid {}",
                &format!("rigid {}", nb.name.name),
                nb.span.start(),
                &nb.block,
            ),
            Decl::Let(l) => Item::one(
                "let",
                self.single(
                    format!("let {}", l.name.name),
                    format!("= {}", self.slice(l.value.span)),
                    l.span.start(),
                    l.value.span.end(),
                ),
            ),
            Decl::Node(n) => {
                let (c, end) = self.coord(&n.at);
                Item::one(
                    "node",
                    self.single(
                        format!("node {}", n.name.name),
                        format!("at {c}"),
                        n.span.start(),
                        end,
                    ),
                )
            }
            Decl::Fix(list) => {
                let text: Vec<String> = list
                    .iter()
                    .map(|s| match s.axis {
                        Some((Axis::X, _)) => format!("{} x", s.node.name),
                        Some((Axis::Y, _)) => format!("{} y", s.node.name),
                        Some((Axis::Rotation, _)) => format!("{} rotation", s.node.name),
                        None => s.node.name.to_string(),
                    })
                    .collect();
                let start = list.first().map_or(0, |s| s.span.start());
                let end = list
                    .last()
                    .map_or(start, |s| s.axis.map_or(s.node.span.end(), |a| a.1.end()));
                // the keyword sits just before the first support
                let kw = self.text[..start].rfind("fix").unwrap_or(start);
                Item::one(
                    "fix",
                    self.single(format!("fix {}", text.join(", ")), String::new(), kw, end),
                )
            }
            Decl::Pin(nodes, sp) => {
                let names: Vec<&str> = nodes.iter().map(|n| n.name.as_str()).collect();
                let end = nodes.last().map_or(sp.start(), |n| n.span.end());
                Item::one(
                    "pin",
                    self.single(
                        format!("pin {}", names.join(", ")),
                        String::new(),
                        sp.start(),
                        end,
                    ),
                )
            }
            Decl::Tie(t) => {
                let names: Vec<&str> = t.nodes.iter().map(|n| n.name.as_str()).collect();
                let end = t.nodes.last().map_or(t.span.start(), |n| n.span.end());
                Item::one(
                    "tie",
                    self.single(
                        format!("tie {}", names.join(", ")),
                        String::new(),
                        t.span.start(),
                        end,
                    ),
                )
            }
            Decl::Group(g) => {
                let names: Vec<&str> = g.members.iter().map(|n| n.name.as_str()).collect();
                let end = g.members.last().map_or(g.span.end(), |n| n.span.end());
                Item::one(
                    "group",
                    self.single(
                        format!("group {}", g.name.name),
                        format!("= {}", names.join(", ")),
                        g.span.start(),
                        end,
                    ),
                )
            }
            Decl::Combine(c) => {
                let end = c.terms.last().map_or(c.name.span.end(), |t| t.span.end());
                let after_name = &self.text[c.name.span.end()..end];
                let eq = after_name
                    .find('=')
                    .map_or(c.name.span.end(), |i| c.name.span.end() + i + 1);
                let terms = self.slice(Span::new(eq, end));
                Item::one(
                    "combine",
                    self.single(
                        format!("combine {}", c.name.name),
                        format!("= {terms}"),
                        c.span.start(),
                        end,
                    ),
                )
            }
            Decl::Check(c) => self.check_item(c),
            Decl::Units(u) => {
                let (text, end) = match u {
                    ast::Units::System(id) => (id.name.to_string(), id.span.end()),
                    ast::Units::List(list) => (
                        list.iter()
                            .map(|x| self.slice(x.span))
                            .collect::<Vec<_>>()
                            .join(", "),
                        list.last().map_or(0, |x| x.span.end()),
                    ),
                };
                let start = self.text[..end].rfind("units").unwrap_or(0);
                Item::one(
                    "units",
                    self.single(format!("units {text}"), String::new(), start, end),
                )
            }
            Decl::Stmt(s) => Item::one("stmt", self.stmt(s)),
            Decl::Case(c) => self.case_item(c),
        }
    }

    /// `check "LABEL" [for X in G] [under ...]: LHS OP RHS` on one line.
    fn check_item(&self, c: &ast::Check) -> Item {
        let op = match c.op {
            Compare::Le => "<=",
            Compare::Lt => "<",
            Compare::Ge => ">=",
            Compare::Gt => ">",
        };
        let mut head = format!("check {}", self.slice(c.label.span));
        if let Some(e) = &c.each {
            head.push_str(&format!(" for {} in {}", e.var.name, e.group.name));
        }
        if let Some(u) = &c.under {
            head.push_str(" under");
            let names: Vec<&str> = u.names.iter().map(|n| n.name.as_str()).collect();
            if !names.is_empty() {
                head.push(' ');
                head.push_str(&names.join(", "));
            }
            match u.state {
                Some((crate::syntax::ast::State::Short, _)) => head.push_str(" short_term"),
                Some((crate::syntax::ast::State::Long, _)) => head.push_str(" long_term"),
                None => {}
            }
        }
        Item::one(
            "check",
            self.single(
                head,
                format!(
                    ": {} {op} {}",
                    self.slice(c.lhs.span),
                    self.slice(c.rhs.span)
                ),
                c.span.start(),
                c.rhs.span.end(),
            ),
        )
    }

    /// A case: on one line when it has at most one statement and no
    /// comment inside, else a block.
    fn case_item(&self, c: &ast::Case) -> Item {
        let flags: String = c
            .flags
            .iter()
            .fold(String::new(), |acc, f| acc + " " + &f.name);
        let header = format!("case {}{flags}", c.name.name);
        let body_open = c.stmts.first().map_or(c.span.end(), |s| s.span().start());
        let open = self.text[c.name.span.end()..body_open]
            .find('{')
            .map_or(c.name.span.end(), |i| c.name.span.end() + i);
        let close = self.text[..c.span.end()].rfind('}').unwrap_or(c.span.end());
        let has_comment_inside = self.text[open..close].contains('#');
        if c.stmts.len() <= 1 && !has_comment_inside {
            let inner = c.stmts.first().map(|s| {
                let l = self.stmt(s);
                format!("{} {}", l.left, l.right)
            });
            let code = match inner {
                Some(s) => format!("{{ {s} }}"),
                None => "{ }".to_string(),
            };
            return Item::one("case", self.single(header, code, c.span.start(), close + 1));
        }
        let mut lines = vec![Line {
            left: format!("{header} {{"),
            anchor: c.span.start(),
            ends_on: self.line(open),
            ..Line::default()
        }];
        for s in &c.stmts {
            let mut l = self.stmt(s);
            l.indent = 2;
            lines.push(l);
        }
        self.closed(lines, close)
    }
}

/// Pad `left`s of a group of lines to a common width and align their
/// trailing comments; the entries of one-line blocks line up as columns.
fn align(lines: &mut [Line]) {
    let columns = lines.iter().map(|l| l.cells.len()).max().unwrap_or(0);
    if columns > 0 {
        // every entry but a row's last ends in `;`, padded to its column
        let widths: Vec<usize> = (0..columns)
            .map(|k| {
                lines
                    .iter()
                    .filter(|l| k + 1 < l.cells.len())
                    .map(|l| crate::words::width(&l.cells[k]) + 1)
                    .max()
                    .unwrap_or(0)
            })
            .collect();
        for l in lines.iter_mut().filter(|l| !l.cells.is_empty()) {
            let last = l.cells.len() - 1;
            let mut right = String::from("{ ");
            for (k, c) in l.cells.iter().enumerate() {
                if k < last {
                    let cell = format!("{c};");
                    let pad = widths[k] - crate::words::width(&cell);
                    right.push_str(&cell);
                    right.push_str(&" ".repeat(pad + 1));
                } else {
                    right.push_str(c);
                }
            }
            right.push_str(" }");
            l.right = right;
            l.cells.clear();
        }
    }
    let width = lines
        .iter()
        .filter(|l| !l.right.is_empty())
        .map(|l| crate::words::width(&l.left))
        .max()
        .unwrap_or(0);
    let mut code_width = 0;
    for l in lines.iter_mut() {
        if !l.right.is_empty() {
            let pad = width - crate::words::width(&l.left);
            l.left = format!("{}{} {}", l.left, " ".repeat(pad), l.right);
            l.right.clear();
        }
        if l.comment.is_some() {
            code_width = code_width.max(l.indent + crate::words::width(&l.left));
        }
    }
    for l in lines.iter_mut() {
        if let Some(c) = &l.comment {
            let pad = code_width - l.indent - crate::words::width(&l.left);
            l.left = format!("{}{}  {c}", l.left, " ".repeat(pad));
            l.comment = None;
        }
    }
}

/// Format a calc file.
///
/// # Errors
/// The syntax errors of a file that does not parse (it is then left alone).
pub fn format(source: &Source) -> Result<String, Vec<SyntaxError>> {
    let file = crate::syntax::parse(&source.text)?;
    let ctx = Ctx {
        text: &source.text,
        starts: line_starts(&source.text),
    };
    let mut items: Vec<Item> = file.decls.iter().map(|d| ctx.item(d)).collect();

    // A blank source line between two declarations is kept where it
    // separates runs of one-line declarations.
    for k in 1..items.len() {
        let after = items[k - 1].lines.last().map_or(0, |l| l.ends_on);
        let before = ctx.line(items[k].lines[0].anchor);
        items[k].blank_before = (after + 1..before).any(|n| {
            let end = ctx.starts.get(n + 1).map_or(source.text.len(), |&e| e);
            source.text[ctx.starts[n]..end].trim().is_empty()
        });
    }
    // Blocks written on one line, one after another, stay one line each.
    let is_row = |k: usize| items.get(k).is_some_and(|it| it.row.is_some());
    let kind = |k: usize| items.get(k).and_then(|it| it.row.as_ref()).map(|r| r.0);
    let rows: Vec<bool> = (0..items.len())
        .map(|k| {
            is_row(k)
                && ((k > 0 && !items[k].blank_before && kind(k - 1) == kind(k))
                    || (is_row(k + 1) && !items[k + 1].blank_before && kind(k + 1) == kind(k)))
        })
        .collect();
    for (it, row) in items.iter_mut().zip(rows) {
        if row {
            if let Some((run, line)) = it.row.take() {
                it.run = Some(run);
                it.lines = vec![line];
                it.body = 0..0;
            }
        }
    }
    let tail = attach(&mut items, comments(&source.text, &ctx.starts));

    // Align block bodies and runs of one-line declarations.
    for it in &mut items {
        let body = it.body.clone();
        if !body.is_empty() {
            align(&mut it.lines[body]);
        }
    }
    let mut out = String::new();
    let mut i = 0;
    while i < items.len() {
        let mut j = i + 1;
        if let Some(kw) = items[i].run {
            while j < items.len() && items[j].run == Some(kw) && !items[j].blank_before {
                j += 1;
            }
            let mut run: Vec<Line> = items[i..j].iter().map(|it| it.lines[0].clone()).collect();
            align(&mut run);
            for (k, l) in run.into_iter().enumerate() {
                items[i + k].lines[0] = l;
            }
        } else {
            for l in &mut items[i].lines {
                if l.comment.is_some() || !l.right.is_empty() {
                    align(std::slice::from_mut(l));
                }
            }
        }
        if i > 0 {
            out.push('\n');
        }
        for it in &items[i..j] {
            for l in &it.lines {
                let pad = " ".repeat(l.indent);
                // comments before a closing brace belong to the block's body
                let before_pad = if l.left == "}" {
                    "  ".to_string()
                } else {
                    pad.clone()
                };
                for b in &l.before {
                    out.push_str(&format!("{before_pad}{b}\n"));
                }
                let mut text = l.left.clone();
                if !l.right.is_empty() {
                    text = format!("{text} {}", l.right);
                }
                if let Some(c) = &l.comment {
                    text = format!("{text}  {c}");
                }
                out.push_str(&format!("{pad}{text}\n"));
            }
        }
        i = j;
    }
    if !tail.is_empty() {
        if !out.is_empty() {
            out.push('\n');
        }
        for t in tail {
            out.push_str(&t);
            out.push('\n');
        }
    }
    Ok(out)
}

/// What formatting changes, as a unified diff (three lines of context)
/// from `name` as it is to `name` formatted.
#[must_use]
pub fn unified_diff(name: &str, before: &str, after: &str) -> String {
    similar::TextDiff::from_lines(before, after)
        .unified_diff()
        .context_radius(3)
        .header(name, &format!("{name} (formatted)"))
        .to_string()
}

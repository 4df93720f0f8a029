//! One open calc as the language server sees it: its text, what parsed and
//! built, and the answers to an editor's questions (diagnostics, hover,
//! definition, references, completion, symbols, formatting). A file with
//! errors still answers from what parsed: names are found by a scan of the
//! text's words when the parse fails.

use serde_json::{json, Value};

use crate::model::Model;
use crate::source::Source;
use crate::syntax::ast::{self, Decl};

/// A word of the text that may be a name: outside comments and strings.
#[derive(Clone, Debug)]
struct Word {
    start: usize,
    end: usize,
    /// A block's key (`E = ...` inside `material s { }`): not a name.
    key: bool,
}

/// A declared name: where it is declared and what it is.
#[derive(Clone, Debug)]
pub(crate) struct Declared {
    pub name: String,
    /// The name's own span (a byte range).
    pub at: (usize, usize),
    /// The whole declaration's span.
    pub whole: (usize, usize),
    /// `let`, `material`, `node`, `part`, `beam`, `rigid`, `case`,
    /// `combine`, `group`.
    pub kind: &'static str,
}

/// An open document.
pub(crate) struct Document {
    pub source: Source,
    file: Option<ast::File>,
    model: Option<Model>,
    errors: Vec<crate::Error>,
    words: Vec<Word>,
    declared: Vec<Declared>,
}

const DECLARING: &[&str] = &[
    "let", "material", "node", "part", "beam", "rigid", "case", "combine", "group",
];

fn is_word_start(c: char) -> bool {
    c.is_alphabetic() || c == '_'
}

fn is_word(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// The words of a calc's text, comments and strings skipped.
fn words(text: &str) -> Vec<Word> {
    let mut out = Vec::new();
    let mut it = text.char_indices().peekable();
    let mut depth = 0usize;
    // whether the next word is the first on its line or after `;` or `{`
    let mut line_start = true;
    while let Some((i, c)) = it.next() {
        match c {
            '#' => {
                while it.peek().is_some_and(|&(_, c)| c != '\n') {
                    it.next();
                }
            }
            '"' => {
                for (_, c) in it.by_ref() {
                    if c == '"' || c == '\n' {
                        break;
                    }
                }
                line_start = false;
            }
            '{' => {
                depth += 1;
                line_start = true;
            }
            '}' => {
                depth = depth.saturating_sub(1);
                line_start = false;
            }
            '\n' | ';' => line_start = true,
            c if c.is_whitespace() => {}
            c if c.is_ascii_digit() => {
                // a number, with its exponent (`5.5e-6`): not a word
                while it
                    .peek()
                    .is_some_and(|&(_, c)| c.is_ascii_alphanumeric() || c == '.')
                {
                    let (_, c) = it.next().unwrap_or((0, ' '));
                    if (c == 'e' || c == 'E')
                        && it.peek().is_some_and(|&(_, c)| c == '-' || c == '+')
                    {
                        it.next();
                    }
                }
                line_start = false;
            }
            c if is_word_start(c) => {
                let mut end = i + c.len_utf8();
                while let Some(&(j, c)) = it.peek() {
                    if !is_word(c) {
                        break;
                    }
                    end = j + c.len_utf8();
                    it.next();
                }
                let rest = text[end..].trim_start_matches([' ', '\t']);
                let key =
                    depth > 0 && line_start && rest.starts_with('=') && !rest.starts_with("==");
                out.push(Word { start: i, end, key });
                line_start = false;
            }
            _ => line_start = false,
        }
    }
    out
}

/// The declarations of a parsed file.
fn declared_in(file: &ast::File) -> Vec<Declared> {
    let span = |s: crate::source::Span| (s.start(), s.end());
    file.decls
        .iter()
        .filter_map(|d| {
            let (id, whole, kind) = match d {
                Decl::Let(l) => (&l.name, l.span, "let"),
                Decl::Material(nb) => (&nb.name, nb.span, "material"),
                Decl::Part(nb) => (&nb.name, nb.span, "part"),
                Decl::Beam(nb) => (&nb.name, nb.span, "beam"),
                Decl::Rigid(nb) => (&nb.name, nb.span, "rigid"),
                Decl::Node(n) => (&n.name, n.span, "node"),
                Decl::Case(c) => (&c.name, c.span, "case"),
                Decl::Combine(c) => (&c.name, c.span, "combine"),
                Decl::Group(g) => (&g.name, g.span, "group"),
                _ => return None,
            };
            Some(Declared {
                name: id.name.to_string(),
                at: span(id.span),
                whole: span(whole),
                kind,
            })
        })
        .collect()
}

/// The declarations found by their keywords, for a text that does not parse.
fn declared_by_words(text: &str, words: &[Word]) -> Vec<Declared> {
    let mut out = Vec::new();
    for w in words.windows(2) {
        let keyword = &text[w[0].start..w[0].end];
        if let Some(kind) = DECLARING.iter().find(|k| **k == keyword) {
            // the keyword must start its line
            let line_start = text[..w[0].start].rfind('\n').map_or(0, |i| i + 1);
            if !text[line_start..w[0].start].trim().is_empty() {
                continue;
            }
            let end = text[w[1].end..]
                .find('\n')
                .map_or(text.len(), |i| w[1].end + i);
            out.push(Declared {
                name: text[w[1].start..w[1].end].to_string(),
                at: (w[1].start, w[1].end),
                whole: (w[0].start, end),
                kind,
            });
        }
    }
    out
}

impl Document {
    pub(crate) fn new(name: &str, text: String) -> Self {
        let source = Source::new(name, text);
        let words = words(&source.text);
        let (file, errors) = match crate::syntax::parse(&source.text) {
            Ok(f) => (Some(f), Vec::new()),
            Err(es) => (None, es.into_iter().map(crate::Error::from).collect()),
        };
        let (model, errors) = match &file {
            Some(f) => match crate::model::build(f, crate::model::Limits::default()) {
                Ok(m) => (Some(m), errors),
                Err(es) => (None, es.into_iter().map(crate::Error::from).collect()),
            },
            None => (None, errors),
        };
        let declared = match &file {
            Some(f) => declared_in(f),
            None => declared_by_words(&source.text, &words),
        };
        Self {
            source,
            file,
            model,
            errors,
            words,
            declared,
        }
    }

    pub(crate) fn declared(&self) -> &[Declared] {
        &self.declared
    }

    /// The diagnostics `check` gives, as LSP objects.
    pub(crate) fn diagnostics(&self, uri: &str) -> Vec<Value> {
        use miette::Diagnostic as _;
        let text = &self.source.text;
        self.errors
            .iter()
            .map(|e| {
                let labels: Vec<(usize, usize, Option<String>)> = e
                    .labels()
                    .map(|ls| {
                        ls.map(|l| {
                            (
                                l.offset(),
                                l.offset() + l.len(),
                                l.label().map(str::to_string),
                            )
                        })
                        .collect()
                    })
                    .unwrap_or_default();
                let (start, end) = labels.first().map_or((0, 0), |l| (l.0, l.1));
                let mut message = e.to_string();
                if let Some(label) = labels.first().and_then(|l| l.2.clone()) {
                    message.push_str(&format!(" ({label})"));
                }
                if let Some(help) = e.help() {
                    message.push_str(&format!("\nhelp: {help}"));
                }
                let related: Vec<Value> = labels
                    .iter()
                    .skip(1)
                    .map(|(s, e, label)| {
                        json!({
                            "location": {"uri": uri, "range": super::range(text, *s, *e)},
                            "message": label.clone().unwrap_or_default(),
                        })
                    })
                    .collect();
                json!({
                    "range": super::range(text, start, end),
                    "severity": 1,
                    "code": e.code().map(|c| c.to_string()),
                    "source": "tandem",
                    "message": message,
                    "relatedInformation": related,
                })
            })
            .collect()
    }

    /// The word at a byte offset (a cursor just after a word counts).
    fn word_at(&self, offset: usize) -> Option<&Word> {
        self.words
            .iter()
            .find(|w| w.start <= offset && offset <= w.end)
    }

    fn text_of(&self, w: &Word) -> &str {
        &self.source.text[w.start..w.end]
    }

    /// The declaration of the name at `offset`.
    pub(crate) fn definition(&self, offset: usize) -> Option<&Declared> {
        let w = self.word_at(offset)?;
        if w.key {
            return None;
        }
        let name = self.text_of(w);
        // the first declaration of a name is the one that counts
        self.declared.iter().find(|d| d.name == name)
    }

    /// Every use of the name at `offset`, its declaration first.
    pub(crate) fn references(&self, offset: usize) -> Vec<(usize, usize)> {
        let Some(d) = self.definition(offset) else {
            return Vec::new();
        };
        let mut out = vec![d.at];
        for w in &self.words {
            if !w.key && self.text_of(w) == d.name && (w.start, w.end) != d.at {
                out.push((w.start, w.end));
            }
        }
        out
    }

    /// What the name, unit or function at `offset` is, in Markdown.
    pub(crate) fn hover(&self, offset: usize) -> Option<String> {
        let w = self.word_at(offset)?;
        let word = self.text_of(w);
        if let Some(d) = self.definition(offset) {
            let written = self.source.text[d.whole.0..d.whole.1].trim();
            let first_lines: String = written.lines().take(12).collect::<Vec<_>>().join("\n");
            let mut out = format!("```\n{first_lines}\n```\n");
            out.push_str(&self.about(d));
            return Some(out);
        }
        if let Some(f) = crate::model::functions::find(word) {
            return Some(format!(
                "`{}`: {}{}",
                f.call,
                f.help,
                f.source
                    .map_or(String::new(), |s| format!("\n\nsource: {s}"))
            ));
        }
        if let Some(u) = crate::units::lookup(word) {
            return Some(format!(
                "unit `{}`: {} = {} SI ({}; {})",
                u.name,
                u.name,
                crate::words::number(u.factor, 10),
                u.dim.describe(),
                u.source
            ));
        }
        None
    }

    /// The values the model gives a declared name, when it built.
    fn about(&self, d: &Declared) -> String {
        let Some(m) = &self.model else {
            return "(the file has errors: values are shown once it checks)".into();
        };
        let q = |q: crate::units::Quantity| {
            let disp = crate::report::Display::for_model(m, 4);
            disp.quantity(q)
        };
        match d.kind {
            "let" => m
                .lets
                .iter()
                .find(|l| l.name == d.name)
                .map_or(String::new(), |l| format!("= {}", q(l.value))),
            "part" | "beam" => {
                let Some(i) = m.part_index(&d.name) else {
                    return String::new();
                };
                let p = &m.parts[i];
                let mut out = Vec::new();
                if let Some(mi) = p.material() {
                    let e = m.materials[mi].e.value;
                    out.push(format!(
                        "E = {}",
                        q(crate::units::Quantity::new(
                            e,
                            crate::units::Dimension::PRESSURE
                        ))
                    ));
                }
                if let Some(a) = p.area() {
                    out.push(format!(
                        "A = {}",
                        q(crate::units::Quantity::new(
                            a.value,
                            crate::units::Dimension::AREA
                        ))
                    ));
                }
                out.push(format!(
                    "L = {}",
                    q(crate::units::Quantity::new(
                        p.length.value,
                        crate::units::Dimension::LENGTH
                    ))
                ));
                out.push(format!(
                    "k = E·A/L = {}",
                    q(crate::units::Quantity::new(
                        p.stiffness(&m.materials).value,
                        crate::units::Dimension::STIFFNESS
                    ))
                ));
                out.join(", ")
            }
            "material" => {
                m.materials
                    .iter()
                    .find(|x| x.name == d.name)
                    .map_or(String::new(), |x| {
                        format!(
                            "E = {}",
                            q(crate::units::Quantity::new(
                                x.e.value,
                                crate::units::Dimension::PRESSURE
                            ))
                        )
                    })
            }
            "node" => m.node_index(&d.name).map_or(String::new(), |i| {
                let n = &m.nodes[i];
                format!(
                    "at {}",
                    q(crate::units::Quantity::new(
                        n.x.value,
                        crate::units::Dimension::LENGTH
                    ))
                )
            }),
            _ => String::new(),
        }
    }

    /// What may be written at `offset`: a block's keys at the start of a
    /// line inside a block, else the names, functions and units. Each is
    /// `(label, kind, detail)` with LSP's completion kinds.
    pub(crate) fn completion(&self, offset: usize) -> Vec<(String, u8, String)> {
        let text = &self.source.text;
        let offset = offset.min(text.len());
        let line_start = text[..offset].rfind('\n').map_or(0, |i| i + 1);
        let before = &text[line_start..offset];
        let typed: String = before
            .chars()
            .rev()
            .take_while(|c| is_word(*c))
            .collect::<Vec<_>>()
            .into_iter()
            .rev()
            .collect();
        let at_key = before[..before.len() - typed.len()].trim().is_empty()
            || before
                .trim_end_matches(|c: char| is_word(c))
                .trim_end()
                .ends_with([';', '{']);
        // the block the cursor is in: the keyword before the last open `{`
        let mut depth = 0i32;
        let mut block = None;
        for (i, c) in text[..offset].char_indices().rev() {
            match c {
                '}' => depth += 1,
                '{' if depth == 0 => {
                    let head = text[..i].trim_end();
                    let line = head.rfind('\n').map_or(head, |k| &head[k + 1..]);
                    block = line.split_whitespace().next().map(str::to_string);
                    break;
                }
                '{' => depth -= 1,
                _ => {}
            }
        }
        let mut out: Vec<(String, u8, String)> = Vec::new();
        if let (Some(b), true) = (&block, at_key) {
            for k in crate::model::block_keys(b) {
                out.push(((*k).to_string(), 10, format!("key of a `{b}` block")));
            }
        }
        if out.is_empty() {
            for d in &self.declared {
                out.push((d.name.clone(), 6, d.kind.to_string()));
            }
            for f in crate::model::functions::FUNCTIONS {
                out.push((f.name.to_string(), 3, f.call.to_string()));
            }
            for u in crate::units::units() {
                out.push((
                    u.name.to_string(),
                    11,
                    format!("unit of {}", u.dim.describe()),
                ));
            }
        }
        out.retain(|(l, _, _)| l.starts_with(&typed));
        out.dedup_by(|a, b| a.0 == b.0);
        out
    }

    /// The whole text in the canonical layout, when it parses.
    pub(crate) fn formatted(&self) -> Option<String> {
        self.file.as_ref()?;
        crate::review::fmt::format(&self.source).ok()
    }
}

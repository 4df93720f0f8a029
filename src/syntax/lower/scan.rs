//! The text cut into statements: a pre-scan for braces, strings and
//! nesting, then each statement parsed (on every core for a large file).

#![allow(clippy::wildcard_imports)] // the lowering's shared imports and helpers

use super::*;

/// Parse a calc file's text into its syntax tree.
///
/// # Errors
/// The syntax errors found: unbalanced braces, unterminated strings and
/// too-deep nesting from a pre-scan, else each statement's first error,
/// worded for an engineer.
pub fn parse(text: &str) -> std::result::Result<File, Vec<SyntaxError>> {
    parse_with(text)
}

pub(super) fn parse_with(text: &str) -> std::result::Result<File, Vec<SyntaxError>> {
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

pub(super) fn parse_chunks(
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
pub(super) fn statement(text: &str, start: usize, end: usize) -> Result<Option<Decl>> {
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
pub(super) fn prescan(text: &str) -> (Vec<SyntaxError>, Vec<(usize, usize)>) {
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
            b'(' | b'^' => {
                let (count, error): (_, fn(Span, usize) -> SyntaxError) = if b == b'(' {
                    depth += 1;
                    (depth, |span, limit| SyntaxError::TooDeep { span, limit })
                } else {
                    carets += 1;
                    (carets, |span, limit| SyntaxError::TooManyPowers {
                        span,
                        limit,
                    })
                };
                if count > MAX_NESTING {
                    errors.push(error(Span::new(i, i + 1), MAX_NESTING));
                    return (errors, chunks);
                }
            }
            b')' => depth = depth.saturating_sub(1),
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

//! Source files and byte spans.

use miette::{NamedSource, SourceSpan};

/// A calc file's name (as the user gave it) and text.
#[derive(Clone, Debug)]
pub struct Source {
    pub name: String,
    pub text: String,
}

impl Source {
    #[must_use]
    pub fn new(name: impl Into<String>, text: impl Into<String>) -> Self {
        Self {
            name: name.into(),
            text: text.into(),
        }
    }

    /// The text of a span.
    #[must_use]
    pub fn slice(&self, span: Span) -> &str {
        self.text.get(span.start()..span.end()).unwrap_or("")
    }

    /// The source in the form miette renders.
    #[must_use]
    pub fn named(&self) -> NamedSource<String> {
        NamedSource::new(&self.name, self.text.clone())
    }

    /// 1-based line number of a byte offset.
    #[must_use]
    pub fn line_of(&self, offset: usize) -> usize {
        let end = offset.min(self.text.len());
        self.text.as_bytes()[..end]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1
    }
}

/// Where a byte offset falls in a text: its line (from 0) and the part of
/// that line before it (an offset inside a character counts from the
/// character's start). Diagnostics count columns in characters, the
/// language server in UTF-16 units: both from this.
#[must_use]
pub fn locate(text: &str, offset: usize) -> (usize, &str) {
    let offset = offset.min(text.len());
    let offset = (0..=offset)
        .rev()
        .find(|&i| text.is_char_boundary(i))
        .unwrap_or(0);
    let before = &text[..offset];
    let line = before.bytes().filter(|&b| b == b'\n').count();
    let start = before.rfind('\n').map_or(0, |i| i + 1);
    (line, &before[start..])
}

/// A byte range in a source file, kept in 32 bits a side (files are at most
/// `MAX_FILE_BYTES`), so that the syntax tree of a large calc stays small.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default, PartialOrd, Ord)]
pub struct Span {
    start: u32,
    end: u32,
}

impl Span {
    #[must_use]
    pub fn new(start: usize, end: usize) -> Self {
        Self {
            start: narrow(start),
            end: narrow(end),
        }
    }

    /// The first byte.
    #[must_use]
    pub fn start(self) -> usize {
        self.start as usize
    }

    /// One past the last byte.
    #[must_use]
    pub fn end(self) -> usize {
        self.end as usize
    }

    /// The smallest span covering both.
    #[must_use]
    pub fn to(self, other: Self) -> Self {
        Self {
            start: self.start.min(other.start),
            end: self.end.max(other.end),
        }
    }
}

/// An offset in 32 bits; offsets past 4 GiB (never reached: files are read
/// up to 128 MiB) are held at the largest value rather than wrapped.
fn narrow(x: usize) -> u32 {
    u32::try_from(x).unwrap_or(u32::MAX)
}

impl From<Span> for SourceSpan {
    fn from(s: Span) -> Self {
        SourceSpan::new(s.start().into(), s.end().saturating_sub(s.start()))
    }
}

//! One error type over every stage, and its rendering. The library returns
//! plain error data; only [`render`] turns it into text.

use miette::{Diagnostic, GraphicalReportHandler, GraphicalTheme};
use thiserror::Error;

use crate::model::ModelError;
use crate::source::Source;
use crate::syntax::SyntaxError;

/// An error from any stage.
#[derive(Debug, Error, Diagnostic, Clone, PartialEq)]
pub enum Error {
    #[error(transparent)]
    #[diagnostic(transparent)]
    Syntax(#[from] SyntaxError),
    #[error(transparent)]
    #[diagnostic(transparent)]
    Model(ModelError),
    #[error(transparent)]
    #[diagnostic(transparent)]
    Solve(#[from] crate::solve::SolveError),
    /// An error that arose in one load combination only: the others are
    /// still solved and reported ([`crate::analyse_partial`]).
    #[error("in combination `{combination}`: {inner}")]
    #[diagnostic(forward(inner))]
    InCombination {
        combination: String,
        inner: Box<Error>,
    },
    /// A failure with no place in the file (an output that cannot be
    /// written during a sweep).
    #[error("{0}")]
    Message(String),
}

impl Error {
    /// This error, said to arise in `combination` (unless it names it).
    #[must_use]
    pub fn in_combination(self, combination: &str) -> Self {
        if self.to_string().contains(&format!("`{combination}`")) {
            self
        } else {
            Error::InCombination {
                combination: combination.to_string(),
                inner: Box::new(self),
            }
        }
    }
}

impl From<ModelError> for Error {
    fn from(e: ModelError) -> Self {
        Error::Model(e)
    }
}

pub use crate::words::MAX_SHOWN;

/// Render diagnostics against their source, without colour unless asked,
/// wrapped at `width` columns: the first [`MAX_SHOWN`], then how many more.
#[must_use]
pub fn render(errors: &[Error], source: &Source, width: usize, color: bool) -> String {
    let theme = if color {
        GraphicalTheme::unicode()
    } else {
        GraphicalTheme::unicode_nocolor()
    };
    let handler = GraphicalReportHandler::new_themed(theme).with_width(width);
    let mut out = String::new();
    // One shared copy of the text for every report, not one each.
    let text: std::sync::Arc<str> = std::sync::Arc::from(source.text.as_str());
    for e in errors.iter().take(MAX_SHOWN) {
        let named = miette::NamedSource::new(&source.name, text.clone());
        let report = miette::Report::new(e.clone()).with_source_code(named);
        let mut one = String::new();
        if handler.render_report(&mut one, report.as_ref()).is_err() {
            one = format!("{e}\n");
        }
        out.push_str(&one);
    }
    if errors.len() > MAX_SHOWN {
        let more = errors.len() - MAX_SHOWN;
        out.push_str(&format!(
            "\n… and {more} more error{} not shown; fix these first, the rest often follow from them\n",
            if more == 1 { "" } else { "s" }
        ));
    }
    out
}

/// How diagnostics are written (`--message-format`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// Drawn against the source with labels and help.
    Human,
    /// One line each: `file:line:column: error[code]: message`.
    Short,
    /// One JSON object per line, for tools that annotate a change.
    Json,
}

/// Line and column (both from 1, the column in characters) of a byte offset.
fn line_column(text: &str, offset: usize) -> (usize, usize) {
    let (line, before) = crate::source::locate(text, offset);
    (line + 1, before.chars().count() + 1)
}

/// Diagnostics in `format` (see [`Format`]); [`Format::Human`] wraps at
/// `width` columns and colours with `color`.
#[must_use]
pub fn write(
    errors: &[Error],
    source: &Source,
    format: Format,
    width: usize,
    color: bool,
) -> String {
    use std::fmt::Write as _;
    let mut out = String::new();
    match format {
        Format::Human => return render(errors, source, width, color),
        Format::Short => {
            for e in errors {
                let (line, column) = e
                    .labels()
                    .and_then(|mut l| l.next())
                    .map_or((1, 1), |l| line_column(&source.text, l.offset()));
                let code = e.code().map_or(String::new(), |c| format!("[{c}]"));
                let _ = writeln!(out, "{}:{line}:{column}: error{code}: {e}", source.name);
            }
        }
        Format::Json => {
            for e in errors {
                let labels: Vec<serde_json::Value> = e
                    .labels()
                    .map(|ls| {
                        ls.map(|l| {
                            let (line, column) = line_column(&source.text, l.offset());
                            serde_json::json!({
                                "label": l.label(),
                                "line": line,
                                "column": column,
                                "offset": l.offset(),
                                "length": l.len(),
                            })
                        })
                        .collect()
                    })
                    .unwrap_or_default();
                let first = labels.first();
                let at = |k: &str| first.map_or(serde_json::Value::Null, |l| l[k].clone());
                let doc = serde_json::json!({
                    "severity": "error",
                    "code": e.code().map(|c| c.to_string()),
                    "message": e.to_string(),
                    "file": source.name,
                    "line": at("line"),
                    "column": at("column"),
                    "span": first.map_or(serde_json::Value::Null, |l| serde_json::json!({"offset": l["offset"], "length": l["length"]})),
                    "labels": labels,
                    "help": e.help().map(|h| h.to_string()),
                });
                let _ = writeln!(out, "{doc}");
            }
        }
    }
    out
}

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

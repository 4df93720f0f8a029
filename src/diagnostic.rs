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
    Model(#[from] ModelError),
    #[error(transparent)]
    #[diagnostic(transparent)]
    Solve(#[from] crate::solve::SolveError),
}

/// Render diagnostics against their source, without colour unless asked,
/// wrapped at `width` columns.
#[must_use]
pub fn render(errors: &[Error], source: &Source, width: usize, color: bool) -> String {
    let theme = if color {
        GraphicalTheme::unicode()
    } else {
        GraphicalTheme::unicode_nocolor()
    };
    let handler = GraphicalReportHandler::new_themed(theme).with_width(width);
    let mut out = String::new();
    for e in errors {
        let report = miette::Report::new(e.clone()).with_source_code(source.named());
        let mut one = String::new();
        if handler.render_report(&mut one, report.as_ref()).is_err() {
            one = format!("{e}\n");
        }
        out.push_str(&one);
    }
    out
}

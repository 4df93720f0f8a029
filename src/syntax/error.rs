//! Syntax errors, worded for an engineer (never pest rule names).

use miette::Diagnostic;
use thiserror::Error;

use crate::source::Span;

/// A file that does not parse. pest stops at the first error, so a file has
/// at most one of these (plus any found by the pre-scan).
#[derive(Debug, Error, Diagnostic, Clone, PartialEq)]
pub enum SyntaxError {
    #[error("expected {expected}{after}")]
    #[diagnostic(code(tandem::syntax))]
    Expected {
        expected: String,
        after: String,
        #[label("{found}")]
        span: Span,
        found: String,
        #[help]
        help: Option<String>,
    },

    #[error("unterminated block")]
    #[diagnostic(
        code(tandem::syntax::unclosed_block),
        help("add a `}}` to close the block opened here")
    )]
    UnclosedBlock {
        #[label("this `{{` is never closed")]
        span: Span,
    },

    #[error("`}}` without a matching `{{`")]
    #[diagnostic(
        code(tandem::syntax::stray_brace),
        help("remove it, or open the block with `{{`")
    )]
    StrayBrace {
        #[label("nothing to close here")]
        span: Span,
    },

    #[error("unterminated string")]
    #[diagnostic(
        code(tandem::syntax::unclosed_string),
        help("close the string with `\"` on the same line; write `\\\"` for a quote inside it")
    )]
    UnclosedString {
        #[label("this string is never closed")]
        span: Span,
    },

    #[error("expression nested too deeply")]
    #[diagnostic(
        code(tandem::limit::nesting),
        help("parentheses may nest at most {limit} deep; name inner parts with `let`")
    )]
    TooDeep {
        #[label("nesting passes {limit} here")]
        span: Span,
        limit: usize,
    },

    #[error("too many powers chained in one expression")]
    #[diagnostic(
        code(tandem::limit::powers),
        help("an expression may chain at most {limit} `^`; name inner parts with `let`")
    )]
    TooManyPowers {
        #[label("the limit is passed here")]
        span: Span,
        limit: usize,
    },

    #[error("number out of range")]
    #[diagnostic(
        code(tandem::syntax::number),
        help("write the value in a larger unit, or check the exponent")
    )]
    BadNumber {
        #[label("not a finite number")]
        span: Span,
    },

    #[error("`{name}` is not a unit")]
    #[diagnostic(code(tandem::syntax::unit))]
    NotAUnit {
        name: String,
        #[label("not a unit")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("a power of a unit must be a small whole number")]
    #[diagnostic(code(tandem::syntax::unit_power), help("write e.g. `in^2` or `m^-1`"))]
    BadUnitPower {
        #[label("here")]
        span: Span,
    },
}

impl SyntaxError {
    /// Where the error is.
    #[must_use]
    pub fn span(&self) -> Span {
        match self {
            SyntaxError::Expected { span, .. }
            | SyntaxError::UnclosedBlock { span, .. }
            | SyntaxError::StrayBrace { span, .. }
            | SyntaxError::UnclosedString { span, .. }
            | SyntaxError::TooDeep { span, .. }
            | SyntaxError::TooManyPowers { span, .. }
            | SyntaxError::BadNumber { span, .. }
            | SyntaxError::NotAUnit { span, .. }
            | SyntaxError::BadUnitPower { span, .. } => *span,
        }
    }
}

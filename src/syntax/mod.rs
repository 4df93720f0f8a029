//! Text to syntax tree. pest lives here and nowhere else: [`parse`] returns an
//! owned [`ast::File`] or a [`SyntaxError`] worded for an engineer.

pub mod ast;
mod error;
mod lower;
mod parser;

pub use error::SyntaxError;
pub use lower::{parse, MAX_SYNTAX_ERRORS};

/// Deepest nesting of parentheses an expression may have.
pub const MAX_NESTING: usize = 64;

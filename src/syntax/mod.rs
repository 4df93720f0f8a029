//! Text to syntax tree. pest lives here and nowhere else: [`parse`] returns an
//! owned [`ast::File`] or a [`SyntaxError`] worded for an engineer.

pub mod ast;
mod error;
mod fast;
mod lower;
mod parser;

pub use error::SyntaxError;
pub use lower::{compare_parsers, parse};

/// Deepest nesting of parentheses an expression may have.
pub const MAX_NESTING: usize = 64;

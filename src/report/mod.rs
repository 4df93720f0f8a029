//! Output of solved calcs: display units and number formatting, the solve
//! tables, JSON.

pub mod display;
pub mod json;
pub mod table;

pub use display::{number, Display};

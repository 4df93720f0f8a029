//! Review tools: the canonical formatter, the revision diff and the
//! parameter sweep.

pub mod diff;
pub mod fmt;
pub mod sample;
pub mod sensitivity;
pub mod study;
pub mod sweep;

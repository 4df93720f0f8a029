//! Review tools: the canonical formatter, the revision diff and the
//! parameter sweep.

pub mod fmt;

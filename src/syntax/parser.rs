//! The pest parser generated from `grammar/tandem.pest`.

#[derive(pest_derive::Parser)]
#[grammar = "grammar/tandem.pest"]
pub(crate) struct CalcParser;

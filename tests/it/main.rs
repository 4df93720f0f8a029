//! The integration tests, one crate (one link) with a module per subject.

mod architecture;
mod beams;
mod capacity;
mod checks;
mod cli;
mod closed_form;
mod common;
mod csv;
mod diagnostics;
mod diff;
mod drawings;
mod fmt;
mod language;
mod large;
mod limits;
mod mutation;
mod oracle;
mod output;
mod print;
mod random_calcs;
mod reports;
mod schema;
mod sweep;
mod trace;
mod trust;
mod units;

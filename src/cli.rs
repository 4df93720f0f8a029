//! Command-line arguments (clap derive types only).

use std::path::PathBuf;

use clap::{Parser, Subcommand};

/// Load sharing in statically indeterminate assemblies: write the assembly as
/// a unit-carrying calc file, and tandem checks it, solves it and writes a
/// calculation a reviewer can follow.
///
/// tandem is a design aid. Its results must be checked by a qualified
/// engineer; local codes and licensed practice govern.
#[derive(Debug, Parser)]
#[command(name = "tandem", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Check calc files: syntax, names and units, without solving.
    ///
    /// Prints one line per file (model kind and counts) or the problems found.
    /// Exit code 0 when every file is sound, 2 when any has an error.
    Check {
        /// Calc files (`.tandem`).
        #[arg(required = true)]
        files: Vec<PathBuf>,
    },
    /// List every unit tandem knows, with its dimension and factor to SI.
    Units,
}

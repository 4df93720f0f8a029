//! Command-line arguments (clap derive types only).

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand};

/// Load sharing in statically indeterminate assemblies: write the assembly as
/// a unit-carrying calc file, and tandem checks it, solves it and writes a
/// calculation a reviewer can follow.
///
/// tandem is a design aid. Its results must be checked by a qualified
/// engineer; local codes and licensed practice govern.
#[derive(Debug, Parser)]
#[command(name = "tandem", version, after_help = EXIT_CODES)]
pub struct Cli {
    #[command(flatten)]
    pub global: Global,
    #[command(subcommand)]
    pub command: Command,
}

/// The exit codes, shown at the end of `--help`.
pub const EXIT_CODES: &str = "Exit codes: 0 every check passes; 1 a check fails (or `fmt --check` \
finds a file to format); 2 a calc file or the assembly is wrong (a syntax, name or unit error, \
a mechanism) or a file cannot be read or written; 64 the command line itself is wrong (an \
unknown option, a missing argument).";

/// Options of every command.
#[derive(Debug, Args)]
pub struct Global {
    /// When to colour diagnostics: `auto` colours on a terminal unless
    /// NO_COLOR is set and not empty or TERM is `dumb` (CLICOLOR_FORCE set
    /// and not `0` colours anyway).
    #[arg(long, global = true, value_enum, default_value_t = ColorWhen::Auto, value_name = "WHEN")]
    pub color: ColorWhen,
    /// Errors only: no per-file `ok` lines, notes or progress on stderr.
    #[arg(short, long, global = true)]
    pub quiet: bool,
    /// How diagnostics are written: `human` (drawn against the source),
    /// `short` (one `file:line:column: error[code]: message` line each) or
    /// `json` (one JSON object per line: severity, code, message, file,
    /// line, column, byte span, labels, help).
    #[arg(long, global = true, value_enum, default_value_t = MessageFormat::Human, value_name = "FORMAT")]
    pub message_format: MessageFormat,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum ColorWhen {
    Auto,
    Always,
    Never,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum MessageFormat {
    Human,
    Short,
    Json,
}

/// How results are shown.
#[derive(Clone, Debug, Args)]
pub struct Show {
    /// Units to show results in: `us`, `si`, or a list such as `kip,in,ksi`
    /// (one per dimension). Default: the file's `units` line, else the units
    /// the file writes most.
    #[arg(long, value_name = "UNITS")]
    pub units: Option<String>,
    /// Significant figures in printed values.
    #[arg(long, default_value_t = 4, value_parser = clap::value_parser!(u8).range(2..=10))]
    pub digits: u8,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Check calc files: syntax, names and units, without solving.
    ///
    /// Prints one line per file (model kind and counts) or the problems found.
    /// A folder is walked for `*.tandem` files (hidden folders skipped); `-`
    /// reads standard input. Exit code 0 when every file is sound, 2 when
    /// any has an error.
    Check {
        /// Calc files (`.tandem`), folders, or `-` for standard input.
        #[arg(required = true)]
        files: Vec<PathBuf>,
    },
    /// Solve a calc file: part forces, stresses, displacements and reactions
    /// in every load combination, and the design checks.
    ///
    /// Several files are solved in turn (a heading before each; with
    /// `--json`, an array of documents); a folder is walked for `*.tandem`
    /// files; `-` reads standard input. Exit code 0 when every check
    /// passes, 1 when a check fails, 2 when a file has an error or the
    /// assembly cannot stand (a mechanism).
    Solve {
        /// Calc files (`.tandem`), folders, or `-` for standard input.
        #[arg(required = true)]
        files: Vec<PathBuf>,
        /// Write machine-readable JSON (SI units) instead of tables.
        #[arg(long)]
        json: bool,
        /// Also write parts.csv, nodes.csv and checks.csv into this folder
        /// (created if needed): one row per combination and item, units in
        /// the column headers.
        #[arg(long, value_name = "DIR")]
        csv: Option<PathBuf>,
        #[command(flatten)]
        show: Show,
    },
    /// Write the calculation report: inputs, every equation with its numbers
    /// substituted, equilibrium and compatibility, and the design checks.
    ///
    /// With one file and no `-o` (or `-o -`), the Markdown goes to standard
    /// output. With `-o FILE` it is written there; with several files or a
    /// folder (walked for `*.tandem`), `-o DIR` writes one report per file
    /// into that folder. `-` reads the calc from standard input. Files are
    /// written atomically and an input file is never overwritten. Exit code
    /// 0 when every check passes, 1 when a check fails, 2 on an error.
    Report {
        /// Calc files (`.tandem`), folders, or `-` for standard input.
        #[arg(required = true)]
        files: Vec<PathBuf>,
        /// Output file (one input; `-` for standard output) or folder
        /// (several inputs).
        #[arg(short, long, value_name = "OUT")]
        output: Option<PathBuf>,
        /// Write a self-contained HTML page instead of Markdown (also when
        /// `-o` names one `.html` or `.htm` file).
        #[arg(long)]
        html: bool,
        /// Also write parts.csv, nodes.csv and checks.csv into this folder
        /// (with several files, into DIR/STEM/).
        #[arg(long, value_name = "DIR")]
        csv: Option<PathBuf>,
        #[command(flatten)]
        show: Show,
    },
    /// Show what a revision changed: inputs, parts and nodes added or
    /// removed, results per combination, and the checks (status flips first).
    ///
    /// Either side may be `REV:PATH` to read it from git, the path taken
    /// from the current folder (as `git show REV:./PATH` takes it), e.g.
    /// `tandem diff HEAD~1:post.tandem post.tandem` or `tandem diff
    /// v1:post.tandem v2:post.tandem`. Exit code 1 when a check that passed
    /// now fails, 2 on an error.
    Diff {
        /// The earlier revision (a file, or `REV:PATH`).
        old: String,
        /// The later revision (a file, or `REV:PATH`).
        new: String,
        /// Smallest change of a result to list, in percent.
        #[arg(long, default_value_t = 0.1, value_name = "PERCENT")]
        min_change: f64,
        /// Write JSON instead of Markdown.
        #[arg(long)]
        json: bool,
        #[command(flatten)]
        show: Show,
    },
    /// Re-solve a calc for a range of one `let` parameter, or a grid of two,
    /// and tabulate the utilizations; optionally find where the governing
    /// utilization reaches 1.0.
    ///
    /// Example: `tandem sweep post.tandem --vary t=0.25in..0.75in --steps 11
    /// --show shell.stress --seek`. Give `--vary` twice for a grid: the
    /// first parameter varies fastest, and `--steps 21,5` gives each its
    /// count. Steps stream to the output as they are solved. Exit code 0 on
    /// success (whatever the utilizations), 2 on an error.
    Sweep {
        /// The calc file.
        file: PathBuf,
        /// The parameter and its range, `NAME=FROM..TO`, with units
        /// (`t=0.25 in..0.75 in`). Twice for a grid of two parameters.
        #[arg(long, value_name = "NAME=FROM..TO", required = true, num_args = 1)]
        vary: Vec<String>,
        /// Number of evenly spaced values, ends included: one count for
        /// every parameter, or one each (`21,5`).
        #[arg(long, default_value = "11", value_delimiter = ',', value_name = "N[,M]", value_parser = clap::value_parser!(u32).range(2..=1_000_000))]
        steps: Vec<u32>,
        /// Results to tabulate, e.g. `core.stress,cap.displacement`.
        #[arg(long, value_delimiter = ',', value_name = "RESULTS")]
        show: Vec<String>,
        /// Find the value at which the governing utilization reaches 1.0
        /// (on a grid: along the first parameter, for each value of the
        /// second).
        #[arg(long)]
        seek: bool,
        /// Draw utilization against the parameter into this SVG file (on a
        /// grid: the governing utilization, one curve per value of the
        /// second parameter).
        #[arg(long, value_name = "OUT.svg")]
        plot: Option<PathBuf>,
        /// Write JSON (SI values) instead of the table.
        #[arg(long)]
        json: bool,
        #[command(flatten)]
        display: Show,
    },
    /// Monte Carlo over named `let`s: the probability that each check fails
    /// (with its 95 % confidence interval) and the utilizations' percentiles
    /// when the inputs scatter.
    ///
    /// Example: `tandem sample post.tandem --vary "fc=normal(5 ksi, 0.5 ksi)"
    /// --vary "Es=lognormal(29000 ksi, 3 percent)" --samples 10000 --seed 7`.
    /// The same seed gives the same samples on any number of cores. A sample
    /// that cannot be solved is counted and reported. Exit code 0 on success
    /// (whatever the probabilities), 2 on an error.
    Sample {
        /// The calc file.
        file: PathBuf,
        /// A `let` and its distribution: `NAME=normal(mean, sd)`,
        /// `NAME=lognormal(mean, coefficient of variation)`,
        /// `NAME=uniform(lo, hi)` or `NAME=triangular(lo, mode, hi)`, values
        /// with units. Give it once per varied `let`.
        #[arg(long, value_name = "NAME=DIST(...)", required = true)]
        vary: Vec<String>,
        /// Number of samples.
        #[arg(long, default_value_t = 10_000, value_parser = clap::value_parser!(u64).range(1..=100_000_000))]
        samples: u64,
        /// Seed of the random draws.
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Results whose percentiles to give, e.g. `core.stress,cap.displacement`.
        #[arg(long, value_delimiter = ',', value_name = "RESULTS")]
        show: Vec<String>,
        /// Write JSON (SI values) instead of the table.
        #[arg(long)]
        json: bool,
        #[command(flatten)]
        display: Show,
    },
    /// Rewrite calc files in the canonical layout (two-space blocks, aligned
    /// `=`, one blank line between declarations, comments kept).
    ///
    /// A file that does not parse is never written; files are replaced
    /// atomically. With `--check`, nothing is written: the files that would
    /// change are listed and the exit code is 1 if there are any. With
    /// `--diff`, nothing is written either: a unified diff of each change
    /// is printed (exit code 1 if there is any). `-` formats standard input
    /// to standard output; a folder is walked for `*.tandem` files.
    Fmt {
        /// Calc files (`.tandem`), folders, or `-` for standard input.
        #[arg(required = true)]
        files: Vec<PathBuf>,
        /// List the files that are not formatted, and change nothing.
        #[arg(long, conflicts_with = "diff")]
        check: bool,
        /// Print a unified diff of what would change, and change nothing.
        #[arg(long)]
        diff: bool,
    },
    /// Print a completion script for a shell: bash, zsh, fish, powershell or
    /// elvish (README "Install" gives the lines to install it).
    Completions {
        /// The shell.
        #[arg(value_enum)]
        shell: clap_complete::Shell,
    },
    /// Serve the HTML report of a calc on 127.0.0.1 and make it again on
    /// every save: the page reloads itself, and shows the diagnostics when
    /// the file has errors. Ctrl-C stops it.
    Watch {
        /// The calc file.
        file: PathBuf,
        /// The port (on 127.0.0.1 only); 0 picks a free one.
        #[arg(long, default_value_t = 8421)]
        port: u16,
        #[command(flatten)]
        show: Show,
    },
    /// Run the language server on standard input and output (for editors:
    /// diagnostics as you type, hover, go to definition, references,
    /// completion, formatting, document symbols).
    Lsp,
    /// Print the manual page (roff), for `man`: `tandem manual >
    /// ~/.local/share/man/man1/tandem.1`.
    Manual,
    /// List the built-in functions: section helpers and published moduli,
    /// each with its source.
    Functions,
    /// List every unit tandem knows, with its dimension and factor to SI.
    Units,
}

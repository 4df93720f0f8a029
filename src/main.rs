//! The `tandem` command: parse arguments, call the library, map to an exit code.

mod cli;

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::Parser;

use cli::{Cli, Command, Show};
use tandem::diagnostic::render;
use tandem::report::Display;
use tandem::source::Source;

fn color() -> bool {
    std::io::stderr().is_terminal() && std::env::var_os("NO_COLOR").is_none()
}

/// Exit code 2: the input is wrong.
fn bad() -> ExitCode {
    ExitCode::from(2)
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match cli.command {
        Command::Check { files } => check(&files),
        Command::Solve { file, json, show } => solve(&file, json, &show),
        Command::Units => {
            print!("{}", tandem::units::listing());
            ExitCode::SUCCESS
        }
    }
}

fn read(path: &Path) -> Option<Source> {
    match tandem::read_source(path) {
        Ok(s) => Some(s),
        Err(msg) => {
            eprintln!("error: {msg}");
            None
        }
    }
}

fn report_errors(errors: &[tandem::Error], source: &Source) {
    eprint!("{}", render(errors, source, 100, color()));
    eprintln!(
        "{}: {} error{}",
        source.name,
        errors.len(),
        if errors.len() == 1 { "" } else { "s" }
    );
}

fn check(files: &[PathBuf]) -> ExitCode {
    let mut failed = false;
    for path in files {
        let Some(source) = read(path) else {
            failed = true;
            continue;
        };
        match tandem::check(&source) {
            Ok(model) => println!("{}: ok, {}", source.name, tandem::model::summary(&model)),
            Err(errors) => {
                report_errors(&errors, &source);
                failed = true;
            }
        }
    }
    if failed {
        bad()
    } else {
        ExitCode::SUCCESS
    }
}

fn display(model: &tandem::model::Model, show: &Show) -> Result<Display, String> {
    let digits = usize::from(show.digits);
    Ok(match &show.units {
        Some(text) => Display::choose(&tandem::parse_units(text)?, &model.unit_usage, digits),
        None => Display::for_model(model, digits),
    })
}

fn solve(path: &Path, json: bool, show: &Show) -> ExitCode {
    let Some(source) = read(path) else {
        return bad();
    };
    let a = match tandem::analyse(&source) {
        Ok(a) => a,
        Err(errors) => {
            report_errors(&errors, &source);
            return bad();
        }
    };
    if json {
        let v = tandem::report::json::solution_json(&source.name, &a.model, &a.solution, &a.checks);
        match serde_json::to_string_pretty(&v) {
            Ok(s) => println!("{s}"),
            Err(e) => {
                eprintln!("error: {e}");
                return bad();
            }
        }
    } else {
        let d = match display(&a.model, show) {
            Ok(d) => d,
            Err(msg) => {
                eprintln!("error: {msg}");
                return bad();
            }
        };
        print!(
            "{}",
            tandem::report::table::solve_text(&a.model, &a.solution, &a.checks, &d)
        );
    }
    if a.checks.failures() > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    }
}

//! The `tandem` command: parse arguments, call the library, map to an exit code.

mod cli;

use std::io::IsTerminal;
use std::process::ExitCode;

use clap::Parser;

use cli::{Cli, Command};
use tandem::diagnostic::render;

fn color() -> bool {
    std::io::stderr().is_terminal() && std::env::var_os("NO_COLOR").is_none()
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match cli.command {
        Command::Check { files } => check(&files),
        Command::Units => {
            print!("{}", tandem::units::listing());
            ExitCode::SUCCESS
        }
    }
}

fn check(files: &[std::path::PathBuf]) -> ExitCode {
    let mut failed = false;
    for path in files {
        let source = match tandem::read_source(path) {
            Ok(s) => s,
            Err(msg) => {
                eprintln!("error: {msg}");
                failed = true;
                continue;
            }
        };
        match tandem::check(&source) {
            Ok(model) => println!("{}: ok, {}", source.name, tandem::model::summary(&model)),
            Err(errors) => {
                eprint!("{}", render(&errors, &source, 100, color()));
                eprintln!(
                    "{}: {} error{}",
                    source.name,
                    errors.len(),
                    if errors.len() == 1 { "" } else { "s" }
                );
                failed = true;
            }
        }
    }
    if failed {
        ExitCode::from(2)
    } else {
        ExitCode::SUCCESS
    }
}

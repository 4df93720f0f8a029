//! The `tandem` command: parse arguments, call the library, map to an exit code.

mod cli;

// Output that a closed pipe (`tandem report x | head`) cannot turn into a
// panic: write errors are ignored, as there is no one left to read them.
macro_rules! out {
    ($($t:tt)*) => {{
        use std::io::Write as _;
        let _ = write!(std::io::stdout(), $($t)*);
    }};
}
macro_rules! outln {
    ($($t:tt)*) => {{
        use std::io::Write as _;
        let _ = writeln!(std::io::stdout(), $($t)*);
    }};
}
macro_rules! err {
    ($($t:tt)*) => {{
        use std::io::Write as _;
        let _ = write!(std::io::stderr(), $($t)*);
    }};
}
macro_rules! errln {
    ($($t:tt)*) => {{
        use std::io::Write as _;
        let _ = writeln!(std::io::stderr(), $($t)*);
    }};
}

mod report_command;
mod sample_command;
mod sweep_command;

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

#[cfg(all(feature = "jemalloc", not(target_env = "msvc")))]
#[global_allocator]
static ALLOC: tikv_jemallocator::Jemalloc = tikv_jemallocator::Jemalloc;

fn main() -> ExitCode {
    // Interrupted (SIGINT, SIGTERM): leave no temporary file behind.
    let _ = ctrlc::set_handler(|| {
        tandem::output::remove_pending();
        std::process::exit(130);
    });
    let cli = Cli::parse();
    match cli.command {
        Command::Check { files } => check(&files),
        Command::Solve {
            file,
            json,
            csv,
            show,
        } => solve(&file, json, csv.as_deref(), &show),
        Command::Report {
            files,
            output,
            html,
            csv,
            show,
        } => report_command::report(&files, output.as_deref(), html, csv.as_deref(), &show),
        Command::Fmt { files, check } => fmt(&files, check),
        Command::Sweep {
            file,
            vary,
            steps,
            show,
            seek,
            plot,
            json,
            display,
        } => sweep_command::sweep(&sweep_command::Args {
            file: &file,
            vary: &vary,
            steps: &steps,
            show: &show,
            seek,
            plot: plot.as_deref(),
            json,
            display: &display,
        }),
        Command::Sample {
            file,
            vary,
            samples,
            seed,
            show,
            json,
            display,
        } => sample_command::sample(&sample_command::Args {
            file: &file,
            vary: &vary,
            samples: usize::try_from(samples).unwrap_or(usize::MAX),
            seed,
            show: &show,
            json,
            display: &display,
        }),
        Command::Diff {
            old,
            new,
            min_change,
            json,
            show,
        } => diff(&old, &new, min_change, json, &show),
        Command::Functions => {
            out!("{}", tandem::model::functions::listing());
            ExitCode::SUCCESS
        }
        Command::Units => {
            out!("{}", tandem::units::listing());
            ExitCode::SUCCESS
        }
    }
}

fn read(path: &Path) -> Option<Source> {
    match tandem::read_source(path) {
        Ok(s) => Some(s),
        Err(msg) => {
            errln!("error: {msg}");
            None
        }
    }
}

fn report_errors(errors: &[tandem::Error], source: &Source) {
    err!("{}", render(errors, source, 100, color()));
    errln!(
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
            Ok(model) => outln!("{}: ok, {}", source.name, tandem::model::summary(&model)),
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
        Some(text) => Display::for_model_with(model, &tandem::parse_units(text)?, digits),
        None => Display::for_model(model, digits),
    })
}

/// Write a calc's results as CSV tables into `dir` (created if needed);
/// false (with the error on stderr) when they cannot be written.
fn write_csv(dir: &Path, a: &tandem::Analysis, show: &Show, inputs: &[PathBuf]) -> bool {
    let d = match display(&a.model, show) {
        Ok(d) => d,
        Err(msg) => {
            errln!("error: {msg}");
            return false;
        }
    };
    if let Err(e) = std::fs::create_dir_all(dir) {
        errln!("error: cannot create {}: {e}", dir.display());
        return false;
    }
    let mut ok = true;
    for (name, bytes) in tandem::report::csv::tables(a, &d) {
        let path = dir.join(name);
        if tandem::output::is_input(&path, inputs) {
            errln!(
                "error: refusing to write over the input file {}",
                path.display()
            );
            ok = false;
        } else if let Err(e) = tandem::output::write_atomic(&path, &bytes) {
            errln!("error: cannot write {}: {e}", path.display());
            ok = false;
        }
    }
    ok
}

fn solve(path: &Path, json: bool, csv: Option<&Path>, show: &Show) -> ExitCode {
    let Some(source) = read(path) else {
        return bad();
    };
    let Some((mut a, incomplete)) = analyse_shown(&source) else {
        return bad();
    };
    if json {
        tandem::with_sensitivity(&source, &mut a);
    }
    if let Some(dir) = csv {
        if !write_csv(dir, &a, show, &[path.to_path_buf()]) {
            return bad();
        }
    }
    if json {
        // written as it is serialized: a million parts never sit in memory
        // as one tree or one string
        use std::io::Write as _;
        let doc = tandem::report::json::document(&source.name, &a);
        let mut w = std::io::BufWriter::new(std::io::stdout().lock());
        match serde_json::to_writer_pretty(&mut w, &doc) {
            // like every other output, a closed pipe is not an error
            Ok(()) => {
                let _ = writeln!(w).and_then(|()| w.flush());
            }
            Err(e) if e.is_io() => {}
            Err(e) => {
                errln!("error: {e}");
                return bad();
            }
        }
    } else {
        let d = match display(&a.model, show) {
            Ok(d) => d,
            Err(msg) => {
                errln!("error: {msg}");
                return bad();
            }
        };
        out!("{}", tandem::report::text::solve_text(&a, &d));
    }
    if incomplete {
        bad()
    } else if a.failures() > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    }
}

/// The analysis to show of a calc file, and whether it is incomplete: the
/// errors are drawn on stderr; a calc whose every combination fails has
/// nothing to show (`None`). A combination that fails leaves the others
/// shown, and the calc still fails (exit 2).
fn analyse_shown(source: &Source) -> Option<(tandem::Analysis, bool)> {
    let (a, errors) = tandem::analyse_partial(source);
    if !errors.is_empty() {
        report_errors(&errors, source);
    }
    a.map(|a| (a, !errors.is_empty()))
}

fn fmt(files: &[PathBuf], check: bool) -> ExitCode {
    let mut code = ExitCode::SUCCESS;
    let mut unformatted = false;
    for path in files {
        let Some(source) = read(path) else {
            code = bad();
            continue;
        };
        match tandem::review::fmt::format(&source) {
            Ok(text) if text == source.text => {}
            Ok(text) => {
                if check {
                    outln!("{}", source.name);
                    unformatted = true;
                } else if let Err(e) = tandem::output::replace_if_unchanged(
                    path,
                    source.text.as_bytes(),
                    text.as_bytes(),
                ) {
                    errln!("error: cannot write {}: {e}", path.display());
                    code = bad();
                }
            }
            Err(errors) => {
                let errors: Vec<tandem::Error> = errors.into_iter().map(Into::into).collect();
                report_errors(&errors, &source);
                code = bad();
            }
        }
    }
    if code == ExitCode::SUCCESS && unformatted {
        ExitCode::from(1)
    } else {
        code
    }
}

/// Read a revision: a file, or `REV:PATH` through `git show`.
fn read_revision(spec: &str) -> Option<Source> {
    let path = Path::new(spec);
    if path.exists() {
        return read(path);
    }
    let Some((rev, file)) = spec.split_once(':') else {
        return read(path);
    };
    if rev.is_empty() || file.is_empty() {
        return read(path);
    }
    // User text never reaches git as an option: `--end-of-options` first.
    // The object must be a file (a blob) within the size limit.
    let git = |args: &[&str]| {
        std::process::Command::new("git")
            .args(args)
            .args(["--end-of-options", spec])
            .output()
    };
    match git(&["cat-file", "-t"]) {
        Ok(out) if out.status.success() => {
            let kind = String::from_utf8_lossy(&out.stdout).trim().to_string();
            if kind != "blob" {
                errln!("error: {spec} is a {kind} in git, not a file");
                return None;
            }
        }
        Ok(out) => {
            errln!(
                "error: cannot read {file} at revision {rev}: {}",
                String::from_utf8_lossy(&out.stderr).trim()
            );
            return None;
        }
        Err(e) => {
            errln!("error: cannot run git to read {spec}: {e}");
            return None;
        }
    }
    if let Ok(out) = git(&["cat-file", "-s"]) {
        let size: u64 = String::from_utf8_lossy(&out.stdout)
            .trim()
            .parse()
            .unwrap_or(u64::MAX);
        if size > tandem::MAX_FILE_BYTES {
            errln!(
                "error: {spec} is {size} bytes; tandem reads calc files of at most {} bytes",
                tandem::MAX_FILE_BYTES
            );
            return None;
        }
    }
    match git(&["cat-file", "blob"]) {
        Ok(out) if out.status.success() => match String::from_utf8(out.stdout) {
            Ok(text) => Some(Source::new(spec, text)),
            Err(_) => {
                errln!("error: {spec} is not UTF-8 text");
                None
            }
        },
        Ok(out) => {
            errln!(
                "error: cannot read {file} at revision {rev}: {}",
                String::from_utf8_lossy(&out.stderr).trim()
            );
            None
        }
        Err(e) => {
            errln!("error: cannot run git to read {spec}: {e}");
            None
        }
    }
}

fn diff(old: &str, new: &Path, min_change: f64, json: bool, show: &Show) -> ExitCode {
    let (Some(old_src), Some(new_src)) = (read_revision(old), read(new)) else {
        return bad();
    };
    let analyse = |s: &Source| match tandem::analyse(s) {
        Ok(a) => Some(a),
        Err(errors) => {
            report_errors(&errors, s);
            None
        }
    };
    let (Some(a), Some(b)) = (analyse(&old_src), analyse(&new_src)) else {
        return bad();
    };
    let d = match display(&b.model, show) {
        Ok(d) => d,
        Err(msg) => {
            errln!("error: {msg}");
            return bad();
        }
    };
    let result = tandem::review::diff::diff(&old_src, &a, &new_src, &b, &d, min_change.max(0.0));
    if json {
        match serde_json::to_string_pretty(&tandem::review::diff::json(&result)) {
            Ok(s) => outln!("{s}"),
            Err(e) => {
                errln!("error: {e}");
                return bad();
            }
        }
    } else {
        out!("{}", tandem::review::diff::markdown(&result, &d));
    }
    if result.newly_failing() > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    }
}

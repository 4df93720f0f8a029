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

mod progress;
mod report_command;
mod sample_command;
mod sweep_command;
mod watch_command;

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::Parser;

use cli::{Cli, Command, Show};
use tandem::report::Display;
use tandem::source::Source;

/// The options every command shares, set once from the command line.
struct Settings {
    color: bool,
    quiet: bool,
    format: tandem::diagnostic::Format,
    /// Columns to draw diagnostics in.
    width: usize,
}

static SETTINGS: std::sync::OnceLock<Settings> = std::sync::OnceLock::new();

/// Set while a batch of reports renders in parallel: its bar counts the
/// files, and no calc shows a spinner of its own.
static IN_BATCH: std::sync::atomic::AtomicBool = std::sync::atomic::AtomicBool::new(false);

fn settings() -> &'static Settings {
    SETTINGS.get_or_init(|| Settings {
        color: false,
        quiet: false,
        format: tandem::diagnostic::Format::Human,
        width: 100,
    })
}

/// Whether to colour: `--color`, then CLICOLOR_FORCE (set and not `0`),
/// NO_COLOR (set and not empty), TERM=dumb, and whether stderr is a terminal.
fn colour_wanted(when: cli::ColorWhen) -> bool {
    let set = |k: &str| std::env::var_os(k).filter(|v| !v.is_empty());
    match when {
        cli::ColorWhen::Always => true,
        cli::ColorWhen::Never => false,
        cli::ColorWhen::Auto => {
            if set("CLICOLOR_FORCE").is_some_and(|v| v != "0") {
                true
            } else if set("NO_COLOR").is_some() || set("TERM").is_some_and(|t| t == "dumb") {
                false
            } else {
                std::io::stderr().is_terminal()
            }
        }
    }
}

/// The width of the terminal stderr writes to (`COLUMNS` when it is not
/// one), within 40 to 200 columns; 100 when unknown.
fn terminal_width() -> usize {
    let measured = terminal_size::terminal_size_of(std::io::stderr())
        .map(|(w, _)| usize::from(w.0))
        .or_else(|| {
            std::env::var("COLUMNS")
                .ok()
                .and_then(|c| c.trim().parse().ok())
        });
    measured.unwrap_or(100).clamp(40, 200)
}

/// Whether output besides results and errors is wanted (`-q` says no).
fn chatty() -> bool {
    !settings().quiet
}

/// Exit code 2: the input is wrong.
fn bad() -> ExitCode {
    ExitCode::from(2)
}

/// Exit code of a wrong command line (an unknown option): EX_USAGE of
/// sysexits.h, apart from a wrong calc file's 2.
const USAGE: u8 = 64;

#[cfg(all(feature = "jemalloc", not(target_env = "msvc")))]
#[global_allocator]
static ALLOC: tikv_jemallocator::Jemalloc = tikv_jemallocator::Jemalloc;

fn main() -> ExitCode {
    // Interrupted (SIGINT, SIGTERM): leave no temporary file behind.
    let _ = ctrlc::set_handler(|| {
        tandem::output::remove_pending();
        std::process::exit(130);
    });
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            // help and version are answers, not errors
            let usage = e.use_stderr();
            let _ = e.print();
            return if usage {
                ExitCode::from(USAGE)
            } else {
                ExitCode::SUCCESS
            };
        }
    };
    let _ = SETTINGS.set(Settings {
        color: colour_wanted(cli.global.color),
        quiet: cli.global.quiet,
        format: match cli.global.message_format {
            cli::MessageFormat::Human => tandem::diagnostic::Format::Human,
            cli::MessageFormat::Short => tandem::diagnostic::Format::Short,
            cli::MessageFormat::Json => tandem::diagnostic::Format::Json,
        },
        width: terminal_width(),
    });
    match cli.command {
        Command::Check { files } => check(&files),
        Command::Solve {
            files,
            json,
            csv,
            show,
        } => solve(&files, json, csv.as_deref(), &show),
        Command::Report {
            files,
            output,
            html,
            csv,
            show,
        } => report_command::report(&files, output.as_deref(), html, csv.as_deref(), &show),
        Command::Fmt { files, check, diff } => fmt(&files, check, diff),
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
        Command::Completions { shell } => {
            use clap::CommandFactory as _;
            let mut cmd = Cli::command();
            let mut buf = Vec::new();
            clap_complete::generate(shell, &mut cmd, "tandem", &mut buf);
            out!("{}", String::from_utf8_lossy(&buf));
            ExitCode::SUCCESS
        }
        Command::Watch { file, port, show } => watch_command::watch(&file, port, &show),
        Command::Lsp => match tandem::lsp::serve() {
            Ok(()) => ExitCode::SUCCESS,
            Err(msg) => {
                errln!("error: the language server stopped: {msg}");
                bad()
            }
        },
        Command::Manual => {
            use clap::CommandFactory as _;
            let mut buf = Vec::new();
            if let Err(e) = clap_mangen::Man::new(Cli::command()).render(&mut buf) {
                errln!("error: {e}");
                return bad();
            }
            out!("{}", String::from_utf8_lossy(&buf));
            ExitCode::SUCCESS
        }
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
    let read = if path.as_os_str() == "-" {
        tandem::read_stdin()
    } else {
        tandem::read_source(path)
    };
    match read {
        Ok(s) => Some(s),
        Err(msg) => {
            errln!("error: {msg}");
            None
        }
    }
}

fn report_errors(errors: &[tandem::Error], source: &Source) {
    let s = settings();
    err!(
        "{}",
        tandem::diagnostic::write(errors, source, s.format, s.width, s.color)
    );
    if s.format == tandem::diagnostic::Format::Human {
        errln!(
            "{}: {} error{}",
            source.name,
            errors.len(),
            if errors.len() == 1 { "" } else { "s" }
        );
    }
}

/// The calc files a batch command is given, folders walked (see
/// [`tandem::calc_files`]); `None` (the error on stderr) when a folder
/// cannot be read.
fn inputs(files: &[PathBuf]) -> Option<Vec<PathBuf>> {
    match tandem::calc_files(files) {
        Ok(f) => Some(f),
        Err(msg) => {
            errln!("error: {msg}");
            None
        }
    }
}

/// In a batch, the line on stderr that names a file that failed and why.
fn failed_in_batch(batch: bool, path: &Path, why: &str) {
    if batch {
        errln!("failed: {}: {why}", path.display());
    }
}

/// How many errors, in words.
fn errors_word(n: usize) -> String {
    format!("{n} error{}", if n == 1 { "" } else { "s" })
}

fn check(files: &[PathBuf]) -> ExitCode {
    let Some(files) = inputs(files) else {
        return bad();
    };
    let batch = files.len() > 1;
    let mut failed = false;
    let bar = progress::Progress::new(files.len() as u64, "check");
    for (k, path) in files.iter().enumerate() {
        bar.at(k);
        let Some(source) = read(path) else {
            failed_in_batch(batch, path, "cannot be read");
            failed = true;
            continue;
        };
        match tandem::check(&source) {
            Ok(model) => {
                if chatty() {
                    outln!("{}: ok, {}", source.name, tandem::model::summary(&model));
                }
            }
            Err(errors) => {
                report_errors(&errors, &source);
                failed_in_batch(batch, path, &errors_word(errors.len()));
                failed = true;
            }
        }
    }
    bar.done();
    if failed {
        bad()
    } else {
        ExitCode::SUCCESS
    }
}

/// The display of a calc checked again (for a study's tables): `Err` (the
/// diagnostics or the message on stderr) with exit code 2.
fn display_of(source: &Source, show: &Show) -> Result<Display, ExitCode> {
    let model = match tandem::check(source) {
        Ok(m) => m,
        Err(errors) => {
            report_errors(&errors, source);
            return Err(bad());
        }
    };
    display(&model, show).map_err(|msg| {
        errln!("error: {msg}");
        bad()
    })
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

fn solve(files: &[PathBuf], json: bool, csv: Option<&Path>, show: &Show) -> ExitCode {
    let Some(files) = inputs(files) else {
        return bad();
    };
    let batch = files.len() > 1;
    if csv.is_some() && batch {
        errln!("error: `--csv DIR` takes one calc file; `tandem report FILES --csv DIR` writes one folder per file");
        return bad();
    }
    let mut worst = 0u8;
    if json && batch {
        outln!("[");
    }
    for (k, path) in files.iter().enumerate() {
        if batch && !json {
            outln!(
                "{}== {} ==\n",
                if k > 0 { "\n" } else { "" },
                path.display()
            );
        }
        if json && k > 0 {
            outln!(",");
        }
        let code = solve_one(path, json, csv, show);
        match code {
            2 => failed_in_batch(batch, path, "an error (above)"),
            1 => failed_in_batch(batch, path, "a check fails"),
            _ => {}
        }
        worst = worst.max(code);
    }
    if json && batch {
        outln!("]");
    }
    ExitCode::from(worst)
}

/// One calc solved and shown: its exit code (0, 1 or 2).
fn solve_one(path: &Path, json: bool, csv: Option<&Path>, show: &Show) -> u8 {
    let Some(source) = read(path) else {
        return 2;
    };
    let Some((mut a, incomplete)) = analyse_shown(&source) else {
        return 2;
    };
    if json {
        tandem::with_sensitivity(&source, &mut a);
    }
    if let Some(dir) = csv {
        if !write_csv(dir, &a, show, &[path.to_path_buf()]) {
            return 2;
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
                return 2;
            }
        }
    } else {
        let d = match display(&a.model, show) {
            Ok(d) => d,
            Err(msg) => {
                errln!("error: {msg}");
                return 2;
            }
        };
        out!("{}", tandem::report::text::solve_text(&a, &d));
    }
    if incomplete {
        2
    } else {
        u8::from(a.failures() > 0)
    }
}

/// The analysis to show of a calc file, and whether it is incomplete: the
/// errors are drawn on stderr; a calc whose every combination fails has
/// nothing to show (`None`). A combination that fails leaves the others
/// shown, and the calc still fails (exit 2).
fn analyse_shown(source: &Source) -> Option<(tandem::Analysis, bool)> {
    let (a, errors) = {
        // a large calc takes seconds: a spinner after the first (a batch
        // shows its own bar instead)
        let _spinner = (!IN_BATCH.load(std::sync::atomic::Ordering::Relaxed))
            .then(|| progress::Spinner::new(&format!("analysing {}", source.name)));
        tandem::analyse_partial(source)
    };
    if !errors.is_empty() {
        report_errors(&errors, source);
    }
    a.map(|a| (a, !errors.is_empty()))
}

fn fmt(files: &[PathBuf], check: bool, diff: bool) -> ExitCode {
    let Some(files) = inputs(files) else {
        return bad();
    };
    let batch = files.len() > 1;
    let mut code = ExitCode::SUCCESS;
    let mut unformatted = false;
    for path in &files {
        let Some(source) = read(path) else {
            failed_in_batch(batch, path, "cannot be read");
            code = bad();
            continue;
        };
        let stdin = path.as_os_str() == "-";
        match tandem::review::fmt::format(&source) {
            // standard input is written back out whole, changed or not
            Ok(text) if stdin && !check && !diff => out!("{text}"),
            Ok(text) if text == source.text => {}
            Ok(text) => {
                unformatted = true;
                if diff {
                    out!(
                        "{}",
                        tandem::review::fmt::unified_diff(&source.name, &source.text, &text)
                    );
                } else if check {
                    outln!("{}", source.name);
                } else if let Err(e) = tandem::output::replace_if_unchanged(
                    path,
                    source.text.as_bytes(),
                    text.as_bytes(),
                ) {
                    errln!("error: cannot write {}: {e}", path.display());
                    failed_in_batch(batch, path, "cannot be written");
                    code = bad();
                }
            }
            Err(errors) => {
                let errors: Vec<tandem::Error> = errors.into_iter().map(Into::into).collect();
                report_errors(&errors, &source);
                failed_in_batch(batch, path, &errors_word(errors.len()));
                code = bad();
            }
        }
    }
    if code == ExitCode::SUCCESS && unformatted && (check || diff) {
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
    // the path is taken from the current folder, as `git show REV:./PATH`
    // takes it (git's own `REV:PATH` starts at the repository's top)
    let relative = if file.starts_with("./") || file.starts_with("../") {
        spec.to_string()
    } else {
        format!("{rev}:./{file}")
    };
    let given = spec;
    let spec = relative.as_str();
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
            Ok(text) => Some(Source::new(given, text)),
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

fn diff(old: &str, new: &str, min_change: f64, json: bool, show: &Show) -> ExitCode {
    let (Some(old_src), Some(new_src)) = (read_revision(old), read_revision(new)) else {
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

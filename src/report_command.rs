//! The `report` command: where each report goes, rendering in parallel,
//! the drawings written beside a Markdown report, the CSV tables, and the
//! exit code of a batch.

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use crate::cli::Show;
use crate::{analyse_shown, bad, display, read, write_csv};

/// One rendered report.
struct Rendered {
    text: String,
    /// The drawings to write beside a Markdown report: (path, SVG).
    drawings: Vec<(PathBuf, String)>,
    /// Some check fails.
    fails: bool,
    /// Some combination could not be analysed.
    incomplete: bool,
}

/// One report, for `target` (standard output when `None`).
fn render_report(
    path: &Path,
    target: Option<&Path>,
    html: bool,
    csv: Option<&Path>,
    show: &Show,
) -> Result<Rendered, ExitCode> {
    use tandem::report::markdown::{report_with, Figures, Options};
    let Some(source) = read(path) else {
        return Err(bad());
    };
    let Some((mut a, incomplete)) = analyse_shown(&source) else {
        return Err(bad());
    };
    tandem::with_sensitivity(&source, &mut a);
    let d = display(&a.model, show).map_err(|msg| {
        errln!("error: {msg}");
        bad()
    })?;
    if let Some(dir) = csv {
        if !write_csv(dir, &a, show, &[path.to_path_buf()]) {
            return Err(bad());
        }
    }
    let stem = target
        .and_then(Path::file_stem)
        .map_or_else(|| "report".to_string(), |s| s.to_string_lossy().to_string());
    let figures = if html || target.is_some() {
        Figures::Beside(stem.clone())
    } else {
        Figures::Omitted
    };
    let options = Options {
        figures,
        // a calc from standard input has no file in a repository
        history: if path.as_os_str() == "-" {
            None
        } else {
            tandem::history::of(path)
        },
    };
    let written = report_with(&source, &a, &d, &options);
    let (text, drawings) = if html {
        let page =
            tandem::report::html(&written.markdown, &a.model.title, &stem, &written.drawings);
        (page, Vec::new())
    } else {
        let folder = target.and_then(Path::parent).unwrap_or(Path::new(""));
        let files = written
            .drawings
            .into_iter()
            .map(|g| (folder.join(format!("{stem}.{}", g.suffix)), g.svg))
            .collect();
        (written.markdown, files)
    };
    Ok(Rendered {
        text,
        drawings,
        fails: a.failures() > 0,
        incomplete,
    })
}

pub(crate) fn report(
    files: &[PathBuf],
    output: Option<&Path>,
    html: bool,
    csv: Option<&Path>,
    show: &Show,
) -> ExitCode {
    let ext = if html { "html" } else { "md" };
    let Some(files) = crate::inputs(files) else {
        return bad();
    };
    let files = files.as_slice();
    if files.iter().filter(|f| f.as_os_str() == "-").count() > 1 {
        errln!("error: `-` (standard input) can be given once");
        return bad();
    }
    let batch = files.len() > 1;
    // `-o -`: standard output
    let output = output.filter(|o| o.as_os_str() != "-");
    // Where each report goes.
    let targets: Vec<Option<PathBuf>> = match output {
        None if files.len() == 1 => vec![None],
        None => {
            errln!("error: several files need `-o DIR` for the reports");
            return bad();
        }
        Some(out) if files.len() == 1 && !out.is_dir() => vec![Some(out.to_path_buf())],
        Some(dir) => {
            if !dir.is_dir() {
                errln!(
                    "error: {} is not a folder; several files need `-o DIR`",
                    dir.display()
                );
                return bad();
            }
            files
                .iter()
                .map(|f| {
                    let stem = f
                        .file_stem()
                        .map_or_else(|| "report".into(), |s| s.to_string_lossy().to_string());
                    Some(dir.join(format!("{stem}.{ext}")))
                })
                .collect()
        }
    };
    // `-o post.html` asks for HTML as plainly as `--html` does
    let html = html
        || (files.len() == 1
            && targets.first().and_then(Option::as_ref).is_some_and(|t| {
                t.extension().is_some_and(|e| {
                    e.eq_ignore_ascii_case("html") || e.eq_ignore_ascii_case("htm")
                })
            }));
    // Two inputs whose reports would land on one file: refused before
    // anything is written.
    let mut seen: std::collections::HashMap<&Path, &Path> = std::collections::HashMap::new();
    for (t, f) in targets.iter().zip(files) {
        let Some(t) = t else { continue };
        if let Some(first) = seen.insert(t.as_path(), f.as_path()) {
            errln!(
                "error: {} and {} would both be reported to {}; report them into different folders",
                first.display(),
                f.display(),
                t.display()
            );
            return bad();
        }
    }
    for t in targets.iter().flatten() {
        if tandem::output::is_input(t, files) {
            errln!(
                "error: refusing to write the report over the input file {}",
                t.display()
            );
            return bad();
        }
    }
    // Render in parallel, one worker per core.
    // CSV tables: in DIR for one file, in DIR/STEM/ for several
    let csv_dirs: Vec<Option<PathBuf>> = files
        .iter()
        .map(|f| {
            csv.map(|dir| {
                if files.len() == 1 {
                    dir.to_path_buf()
                } else {
                    let stem = f
                        .file_stem()
                        .map_or_else(|| "report".into(), |s| s.to_string_lossy().to_string());
                    dir.join(stem)
                }
            })
        })
        .collect();
    let jobs: Vec<(&PathBuf, Option<&Path>, Option<&Path>)> = files
        .iter()
        .zip(targets.iter().map(Option::as_deref))
        .zip(csv_dirs.iter().map(Option::as_deref))
        .map(|((f, t), c)| (f, t, c))
        .collect();
    let bar = crate::progress::Progress::new(jobs.len() as u64, "report");
    crate::IN_BATCH.store(jobs.len() > 1, std::sync::atomic::Ordering::Relaxed);
    let finished = std::sync::atomic::AtomicUsize::new(0);
    let results: Vec<Result<Rendered, ExitCode>> = tandem::parallel::map(&jobs, |(f, t, c)| {
        let r = render_report(f, *t, html, *c, show);
        bar.at(finished.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1);
        r
    });
    bar.done();
    let mut code = ExitCode::SUCCESS;
    let mut failed_check = false;
    for ((result, target), path) in results.into_iter().zip(&targets).zip(files) {
        match result {
            Ok(r) => {
                failed_check |= r.fails;
                if r.incomplete {
                    crate::failed_in_batch(batch, path, "a combination cannot be solved (above)");
                    code = bad();
                } else if r.fails {
                    crate::failed_in_batch(batch, path, "a check fails");
                }
                match target {
                    None => out!("{}", r.text),
                    Some(path) => {
                        let all = std::iter::once((path.as_path(), r.text.as_str()))
                            .chain(r.drawings.iter().map(|(p, s)| (p.as_path(), s.as_str())));
                        for (p, bytes) in all {
                            if tandem::output::is_input(p, files) {
                                errln!(
                                    "error: refusing to write over the input file {}",
                                    p.display()
                                );
                                code = bad();
                            } else if let Err(e) = tandem::output::write_atomic(p, bytes.as_bytes())
                            {
                                errln!("error: cannot write {}: {e}", p.display());
                                code = bad();
                            }
                        }
                    }
                }
            }
            Err(c) => {
                crate::failed_in_batch(batch, path, "an error (above)");
                code = c;
            }
        }
    }
    if code == ExitCode::SUCCESS && failed_check {
        ExitCode::from(1)
    } else {
        code
    }
}

//! The `sweep` command: one parameter or a grid of two, streamed to a
//! table, JSON or a chart.

use std::path::Path;
use std::process::ExitCode;

use tandem::report::display;
use tandem::review::sweep::{Axis, JsonSink, PlotSink, Sink, Sweeper, Tee, TextSink};

use crate::cli::Show;
use crate::{bad, read, report_errors};

pub(crate) struct Args<'a> {
    pub file: &'a Path,
    pub vary: &'a [String],
    pub steps: &'a [u32],
    pub show: &'a [String],
    pub seek: bool,
    pub plot: Option<&'a Path>,
    pub json: bool,
    pub display: &'a Show,
}

/// Steps in all, at most (a grid of two is their product).
const MAX_STEPS: usize = 10_000_000;

/// Curves a grid's chart can tell apart.
const MAX_CURVES: usize = 12;

/// `NAME=FROM..TO`: the name, the two ends and the unit written.
fn parse_range(
    vary: &str,
) -> Result<
    (
        String,
        tandem::units::Quantity,
        tandem::units::Quantity,
        Option<display::Shown>,
    ),
    String,
> {
    let Some((name, range)) = vary.split_once('=') else {
        return Err(format!(
            "`--vary {vary}` needs the form NAME=FROM..TO, e.g. `t=0.25 in..0.75 in`"
        ));
    };
    let Some((from_text, to_text)) = range.split_once("..") else {
        return Err(format!(
            "`{range}` needs the form FROM..TO, e.g. `0.25 in..0.75 in`"
        ));
    };
    // `10 kN...100 kN` would read as 10 kN to .100 kN
    if to_text.trim_start().starts_with('.') || to_text.contains("..") {
        return Err(format!(
            "`{range}` needs the form FROM..TO with two dots, e.g. `10 kN..100 kN`"
        ));
    }
    let (from, to) = (tandem::quantity(from_text)?, tandem::quantity(to_text)?);
    // the unit the range is written in (`deg`), to answer in
    let unit = from_text
        .find(|c: char| c.is_ascii_alphabetic())
        .map(|i| from_text[i..].trim().to_string())
        .filter(|u| !u.is_empty())
        .and_then(|u| {
            tandem::quantity(&format!("1 {u}"))
                .ok()
                .map(|q| display::Shown {
                    name: u,
                    factor: q.value,
                })
        });
    Ok((name.trim().to_string(), from, to, unit))
}

pub(crate) fn sweep(args: &Args<'_>) -> ExitCode {
    let fail = |msg: String| {
        errln!("error: {msg}");
        bad()
    };
    if args.vary.len() > 2 {
        return fail(format!(
            "`--vary` is given {} times; a sweep takes one parameter or a grid of two",
            args.vary.len()
        ));
    }
    if args.steps.len() > args.vary.len() {
        return fail(format!(
            "`--steps` gives {} counts for {} parameter(s)",
            args.steps.len(),
            args.vary.len()
        ));
    }
    let mut axes = Vec::new();
    for (k, v) in args.vary.iter().enumerate() {
        let (name, from, to, unit) = match parse_range(v) {
            Ok(r) => r,
            Err(msg) => return fail(msg),
        };
        let steps = args
            .steps
            .get(k)
            .or(args.steps.first())
            .copied()
            .unwrap_or(11) as usize;
        axes.push(Axis {
            name,
            from,
            to,
            steps,
            unit,
        });
    }
    let total: usize = axes.iter().map(|a| a.steps).product();
    if total > MAX_STEPS {
        return fail(format!(
            "the grid has {total} steps; at most {MAX_STEPS} are swept at once"
        ));
    }
    if args.plot.is_some() && axes.get(1).is_some_and(|a| a.steps > MAX_CURVES) {
        return fail(format!(
            "the chart draws one curve per value of `{}`: give it at most {MAX_CURVES} steps (`--steps N,{MAX_CURVES}`)",
            axes[1].name
        ));
    }
    let Some(source) = read(args.file) else {
        return bad();
    };
    let names: Vec<&str> = axes.iter().map(|a| a.name.as_str()).collect();
    let sweeper = match Sweeper::grid(&source, &names, args.show) {
        Ok(s) => s,
        Err(Ok(errors)) => {
            report_errors(&errors, &source);
            return bad();
        }
        Err(Err(msg)) => return fail(msg),
    };
    for (a, dim) in axes.iter().zip(sweeper.dimensions()) {
        for q in [a.from, a.to] {
            if q.dim != *dim {
                return fail(format!(
                    "`{}` is {}, but the range is given as {}; write the range with units of the parameter",
                    a.name,
                    dim.describe(),
                    q.dim.describe()
                ));
            }
        }
    }
    if let Some(out) = args.plot {
        if tandem::output::is_input(out, &[args.file.to_path_buf()]) {
            return fail(format!(
                "refusing to write the plot over the input file {}",
                out.display()
            ));
        }
    }
    let d = match crate::display_of(&source, args.display) {
        Ok(d) => d,
        Err(code) => return code,
    };
    let bar = crate::progress::Progress::new(total as u64, "sweep");
    let progress = |done: usize| bar.at(done);
    let stdout = std::io::BufWriter::new(std::io::stdout().lock());
    let mut plot = PlotSink::new(&d);
    let mut json;
    let mut text;
    let main: &mut dyn Sink = if args.json {
        json = JsonSink::new(stdout);
        &mut json
    } else {
        text = TextSink::new(stdout, &d);
        &mut text
    };
    let mut sinks = Tee(vec![main]);
    if args.plot.is_some() {
        sinks.0.push(&mut plot);
    }
    let swept = sweeper.run(&axes, args.seek.then_some(1e-6), &mut sinks, &progress);
    bar.done();
    if let Err((values, errors)) = swept {
        let at: Vec<String> = axes
            .iter()
            .zip(&values)
            .map(|(a, q)| match &a.unit {
                Some(u) => format!(
                    "{} = {} {}",
                    a.name,
                    tandem::report::number(u.value(q.value), 6),
                    u.name
                ),
                None => format!("{} = {}", a.name, q.value),
            })
            .collect();
        if !at.is_empty() {
            errln!("at {}:", at.join(", "));
        }
        report_errors(&errors, &source);
        return bad();
    }
    drop(sinks);
    if let Some(out) = args.plot {
        if let Err(e) = tandem::output::write_atomic(out, plot.svg().as_bytes()) {
            return fail(format!("cannot write {}: {e}", out.display()));
        }
    }
    ExitCode::SUCCESS
}

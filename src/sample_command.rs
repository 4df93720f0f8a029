//! The `sample` command: Monte Carlo over named `let`s, its table and JSON.

use std::path::Path;
use std::process::ExitCode;

use serde_json::{json, Value};
use tandem::report::display::utilization;
use tandem::report::{number, Display};
use tandem::review::sample::{parse_vary, Sampler, Summary, Tally, PERCENTILES};

use crate::cli::Show;
use crate::{bad, read, report_errors};

pub(crate) struct Args<'a> {
    pub file: &'a Path,
    pub vary: &'a [String],
    pub samples: usize,
    pub seed: u64,
    pub show: &'a [String],
    pub json: bool,
    pub display: &'a Show,
}

pub(crate) fn sample(args: &Args<'_>) -> ExitCode {
    let fail = |msg: String| {
        errln!("error: {msg}");
        bad()
    };
    let mut varied = Vec::new();
    for v in args.vary {
        match parse_vary(v) {
            Ok(x) => varied.push(x),
            Err(msg) => return fail(format!("--vary {v}: {msg}")),
        }
    }
    let Some(source) = read(args.file) else {
        return bad();
    };
    let sampler = match Sampler::new(&source, varied, args.show) {
        Ok(s) => s,
        Err(Ok(errors)) => {
            report_errors(&errors, &source);
            return bad();
        }
        Err(Err(msg)) => return fail(msg),
    };
    let bar = crate::progress::Progress::new(args.samples as u64, "sample");
    let progress = |done: usize| bar.at(done);
    let summary = sampler.run(args.samples, args.seed, &progress);
    bar.done();
    if args.json {
        match serde_json::to_string_pretty(&to_json(&summary)) {
            Ok(s) => outln!("{s}"),
            Err(e) => return fail(e.to_string()),
        }
        return ExitCode::SUCCESS;
    }
    let d = match crate::display_of(&source, args.display) {
        Ok(d) => d,
        Err(code) => return code,
    };
    out!("{}", text(&summary, &d));
    ExitCode::SUCCESS
}

/// `5 %` and the like, for the column headers.
fn percent_words() -> Vec<String> {
    PERCENTILES
        .iter()
        .map(|p| format!("{:.0} %", p * 100.0))
        .collect()
}

fn text(s: &Summary, d: &Display) -> String {
    let mut out = String::new();
    let names: Vec<&str> = s.varied.iter().map(|v| v.text.as_str()).collect();
    out.push_str(&format!(
        "{} samples (seed {}) of {}\n",
        s.samples,
        s.seed,
        names.join(", ")
    ));
    if s.unsolved > 0 {
        out.push_str(&format!(
            "{} could not be solved and are left out of the counts below:\n",
            s.unsolved
        ));
        for (why, n) in &s.reasons {
            out.push_str(&format!("  {n} × {why}\n"));
        }
    }
    let mut rows = vec![{
        let mut h = vec![
            "check".to_string(),
            "P(fail)".to_string(),
            "95 % interval".to_string(),
        ];
        h.extend(percent_words().into_iter().map(|p| format!("U {p}")));
        h
    }];
    let row = |label: &str, t: &Tally| {
        let mut r = vec![label.to_string()];
        match t.probability() {
            Some((p, [lo, hi])) => {
                r.push(number(p, 3));
                r.push(format!("{} – {}", number(lo, 3), number(hi, 3)));
            }
            None => {
                r.push("—".into());
                r.push("—".into());
            }
        }
        r.extend(t.percentiles().into_iter().map(utilization));
        r
    };
    for (label, t) in s.labels.iter().zip(&s.checks) {
        rows.push(row(label, t));
    }
    if !s.labels.is_empty() {
        rows.push(row("any check fails", &s.any));
    }
    out.push('\n');
    out.push_str(&tandem::report::text::aligned(&rows, &[0], "  "));
    if !s.shown.is_empty() {
        let mut rows = vec![{
            let mut h = vec!["result".to_string()];
            h.extend(percent_words());
            h
        }];
        for (shown, dim, t) in &s.shown {
            let unit = d.unit_for(*dim);
            let mut r = vec![match unit {
                Some(u) => format!("{}.{} ({})", shown.object, shown.field, u.name),
                None => format!("{}.{}", shown.object, shown.field),
            }];
            r.extend(t.percentiles().into_iter().map(|v| {
                v.map_or("—".into(), |v| {
                    number(unit.map_or(v, |u| u.value(v)), d.digits)
                })
            }));
            rows.push(r);
        }
        out.push('\n');
        out.push_str(&tandem::report::text::aligned(&rows, &[0], "  "));
    }
    out
}

fn tally_json(t: &Tally) -> Value {
    let p = t.probability();
    json!({
        "samples": t.count,
        "failures": t.failures,
        "probability_of_failure": p.map(|x| x.0),
        "interval_95": p.map(|x| x.1),
        "percentiles": PERCENTILES
            .iter()
            .zip(t.percentiles())
            .map(|(q, v)| json!({"percentile": q * 100.0, "utilization": v}))
            .collect::<Vec<_>>(),
    })
}

fn to_json(s: &Summary) -> Value {
    json!({
        "samples": s.samples,
        "seed": s.seed,
        "varied": s.varied.iter().map(|v| json!({"name": v.name, "distribution": v.text})).collect::<Vec<_>>(),
        "unsolved": s.unsolved,
        "unsolved_reasons": s.reasons.iter().map(|(why, n)| json!({"reason": why, "samples": n})).collect::<Vec<_>>(),
        "checks": s.labels.iter().zip(&s.checks).map(|(l, t)| {
            let mut v = tally_json(t);
            v["label"] = json!(l);
            v
        }).collect::<Vec<_>>(),
        "any_check_fails": tally_json(&s.any),
        "shown": s.shown.iter().map(|(sh, dim, t)| json!({
            "result": format!("{}.{}", sh.object, sh.field),
            "unit": dim.si_symbol(),
            "percentiles": PERCENTILES.iter().zip(t.percentiles())
                .map(|(q, v)| json!({"percentile": q * 100.0, "value_si": v}))
                .collect::<Vec<_>>(),
        })).collect::<Vec<_>>(),
    })
}

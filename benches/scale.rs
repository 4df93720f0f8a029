//! Scaling benchmark: generated assemblies of 10^2 to 10^6 parts, timed for
//! parse, check, solve and the full report, with the peak memory of the
//! process.
//!
//! `cargo bench --bench scale` runs every size; `cargo bench --bench scale --
//! 100000` stops at that many parts, `-- 1000000 chain` runs one kind, and
//! `-- 1000000 chain one` that kind at that size only. For profiling one
//! stage, `STOP_AFTER_CHECK=1` or `STOP_AFTER_SOLVE=1` in the environment
//! ends the run after that stage. Figures go in docs/performance.md.

use std::fmt::Write as _;
use std::time::Instant;

use tandem::source::Source;

/// An axial chain fixed at one end and loaded at the other.
fn chain(n: usize) -> String {
    let mut t = String::with_capacity(n * 60);
    t.push_str("material s { E = 29000 ksi }\nlet a = 2 in^2\nnode n0 at 0 in\nfix n0\n");
    for i in 1..=n {
        let _ = writeln!(t, "node n{i} at {i} in");
    }
    for i in 1..=n {
        let _ = writeln!(
            t,
            "part p{i} {{ material = s; area = a; ends = n{}, n{i} }}",
            i - 1
        );
    }
    let _ = writeln!(t, "load n{n} = 10 kip");
    t
}

/// Parallel parts between one pair of nodes (a bundle of strands).
fn bundle(n: usize) -> String {
    let mut t = String::with_capacity(n * 60);
    t.push_str("material s { E = 29000 ksi }\nnode a at 0 in\nnode b at 120 in\nfix a\n");
    for i in 1..=n {
        let _ = writeln!(
            t,
            "part p{i} {{ material = s; area = {} in^2; ends = a, b }}",
            1 + i % 7
        );
    }
    t.push_str("load b = 500 kip\n");
    t
}

/// A plane braced strip of bays (five parts a bay), with every fifth vertical
/// pair of nodes made a rigid body.
fn grid(parts: usize) -> String {
    let bays = (parts / 5).max(1);
    let mut t = String::with_capacity(parts * 70);
    t.push_str("material s { E = 29000 ksi }\nlet a = 2 in^2\n");
    for i in 0..=bays {
        let _ = writeln!(t, "node b{i} at ({} in, 0 in)", i * 40);
        let _ = writeln!(t, "node t{i} at ({} in, 30 in)", i * 40);
    }
    // pinned at the left, on a roller under every bottom node
    t.push_str("fix b0\n");
    for i in 0..bays {
        let j = i + 1;
        let _ = writeln!(t, "fix b{j} y");
        let _ = writeln!(
            t,
            "part h{i} {{ material = s; area = a; ends = b{i}, b{j} }}"
        );
        let _ = writeln!(
            t,
            "part g{i} {{ material = s; area = a; ends = t{i}, t{j} }}"
        );
        let _ = writeln!(
            t,
            "part d{i} {{ material = s; area = a; ends = b{i}, t{j} }}"
        );
        let _ = writeln!(
            t,
            "part e{i} {{ material = s; area = a; ends = t{i}, b{j} }}"
        );
        if j % 5 == 0 {
            let _ = writeln!(t, "rigid r{j} {{ nodes = b{j}, t{j} }}");
        } else {
            let _ = writeln!(
                t,
                "part v{j} {{ material = s; area = a; ends = b{j}, t{j} }}"
            );
        }
    }
    let _ = writeln!(t, "load t{bays} = (0 kip, -5 kip)");
    t
}

/// Makes the text of an assembly of about `n` parts.
type Generator = fn(usize) -> String;

// The command-line tool's allocator, so that the figures are its figures.
#[cfg(all(feature = "jemalloc", not(target_env = "msvc")))]
#[global_allocator]
static ALLOC: tikv_jemallocator::Jemalloc = tikv_jemallocator::Jemalloc;

/// A long continuous beam on springs: `n` beams in a line, each node held
/// up by a spring to the ground, a uniform load along every beam.
fn beams(n: usize) -> String {
    let mut s = String::with_capacity(n * 200);
    s.push_str("material s { E = 200 GPa }\n");
    for i in 0..=n {
        s.push_str(&format!(
            "node n{i} at ({i} m, 0 m)\nnode g{i} at ({i} m, -1 m)\nfix g{i}\n"
        ));
        s.push_str(&format!(
            "part k{i} {{ stiffness = 5000 kN/m; ends = g{i}, n{i} }}\n"
        ));
    }
    s.push_str("fix n0 x\n");
    for i in 0..n {
        s.push_str(&format!(
            "beam b{i} {{ material = s; section = rect(b = 200 mm, h = 400 mm); ends = n{i}, n{} }}\n",
            i + 1
        ));
    }
    s.push_str("case dead {\n");
    for i in 0..n {
        s.push_str(&format!("  load b{i} = (0 kN/m, -5 kN/m)\n"));
    }
    s.push_str("}\n");
    s
}

fn peak_rss_mib() -> f64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines().find(|l| l.starts_with("VmHWM:")).and_then(|l| {
                l.split_whitespace()
                    .nth(1)
                    .and_then(|v| v.parse::<f64>().ok())
            })
        })
        .map_or(0.0, |kb| kb / 1024.0)
}

fn main() {
    let limit: usize = std::env::args()
        .skip(1)
        .find_map(|a| a.parse().ok())
        .unwrap_or(1_000_000);
    // `chain`, `bundle`, `grid` or `beams` among the arguments runs that kind only.
    let only: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| ["chain", "bundle", "grid", "beams"].contains(&a.as_str()))
        .collect();
    println!("| assembly | parts | unknowns | text MiB | parse s | check s | solve s | peak RSS MiB | report s | report MiB | peak after report MiB |");
    println!("|---|---|---|---|---|---|---|---|---|---|---|");
    let kinds: [(&str, Generator); 4] = [
        ("chain", chain),
        ("bundle", bundle),
        ("plane grid", grid),
        ("beams on springs", beams),
    ];
    for (name, make) in kinds {
        if !only.is_empty() && !only.iter().any(|o| name.contains(o.as_str())) {
            continue;
        }
        // `one` among the arguments runs the largest size only (for profiling).
        let mut n = if std::env::args().any(|a| a == "one") {
            limit
        } else {
            100
        };
        while n <= limit {
            let text = make(n);
            let mib = text.len() as f64 / (1024.0 * 1024.0);
            let src = Source::new("bench.tandem", text);
            let t0 = Instant::now();
            // As `tandem::check` reads a file: parsed, then built.
            let Ok(file) = tandem::syntax::parse(&src.text) else {
                eprintln!("generated file does not parse");
                return;
            };
            let tp = Instant::now();
            let rss_parsed = peak_rss_mib();
            let model = match tandem::model::build(&file, tandem::model::Limits::default()) {
                Ok(m) => m,
                Err(e) => {
                    let e: Vec<tandem::Error> = e.into_iter().map(Into::into).collect();
                    eprintln!("{}", tandem::diagnostic::render(&e, &src, 100, false));
                    return;
                }
            };
            let t1 = Instant::now();
            eprintln!(
                "  parse {:.3} s (peak {rss_parsed:.0} MiB), check {:.3} s (peak {:.0} MiB)",
                (tp - t0).as_secs_f64(),
                (t1 - tp).as_secs_f64(),
                peak_rss_mib()
            );
            if std::env::var_os("STOP_AFTER_CHECK").is_some() {
                return;
            }
            // As `tandem::check` does, the syntax tree goes once the model is built.
            tandem::release(file);
            let solved = tandem::solve::solve(&model);
            let sol = match solved {
                Ok(s) => s,
                Err(e) => {
                    eprintln!("{e}");
                    return;
                }
            };
            let t2 = Instant::now();
            if std::env::var_os("STOP_AFTER_SOLVE").is_some() {
                eprintln!(
                    "  solve {:.3} s (peak {:.0} MiB)",
                    (t2 - t1).as_secs_f64(),
                    peak_rss_mib()
                );
                return;
            }
            let unknowns = sol.unknowns;
            let rss_solved = peak_rss_mib();
            // The full report: checks, every equation.
            let (report, report_mib) = {
                let checks = tandem::checks::evaluate(&model, &sol).unwrap_or_default();
                let a = tandem::Analysis {
                    model,
                    solution: sol,
                    checks,
                    capacity: Vec::new(),
                    long_term: Vec::new(),
                    buckling: Vec::new(),
                    long_term_checks: None,
                    left_out: Vec::new(),
                    sensitivity: None,
                };
                let d = tandem::report::Display::for_model(&a.model, 4);
                let t = Instant::now();
                let md = tandem::report::markdown::report(&src, &a, &d);
                let dt = t.elapsed().as_secs_f64();
                let size = md.len() as f64 / (1024.0 * 1024.0);
                drop(md);
                (dt, size)
            };
            println!(
                "| {name} | {} | {} | {mib:.1} | {:.3} | {:.3} | {:.3} | {rss_solved:.0} | {report:.3} | {report_mib:.0} | {:.0} |",
                n,
                unknowns,
                (tp - t0).as_secs_f64(),
                (t1 - tp).as_secs_f64(),
                (t2 - t1).as_secs_f64(),
                peak_rss_mib()
            );
            n *= 10;
        }
    }
}

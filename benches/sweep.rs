//! Sweep speed, in release mode: `cargo bench --bench sweep`.
//!
//! - 100,000 steps of `examples/filled_post.tandem` over `fc` (the fill's
//!   modulus and allowable move; the structure stays);
//! - the same over `height` (the nodes move: every length is built again);
//! - 10,000 steps of a generated 10-part calc over a plate thickness;
//! - a 41 × 41 grid of the filled post over `fc` and `height`.
//!
//! Steps go to a sink that only counts them, so the figures are the
//! evaluations alone (no formatting or writing). Each figure is the best of
//! three runs (the machine is shared: single runs scatter by half).

use std::time::Instant;

use tandem::review::sweep::{Axis, Head, Seek, Sink, Step, Sweeper};
use tandem::source::Source;
use tandem::units::Quantity;

// The command-line tool's allocator, so that the figures are its figures.
#[cfg(all(feature = "jemalloc", not(target_env = "msvc")))]
#[global_allocator]
static ALLOC: tikv_jemallocator::Jemalloc = tikv_jemallocator::Jemalloc;

/// Counts the steps and keeps the last governing utilization (so that the
/// work cannot be optimised away).
#[derive(Default)]
struct Count {
    steps: usize,
    last: f64,
}

impl Sink for Count {
    fn begin(&mut self, _: &Head) -> std::io::Result<()> {
        Ok(())
    }
    fn step(&mut self, s: &Step) -> std::io::Result<()> {
        self.steps += 1;
        self.last = s.governing.unwrap_or(0.0);
        Ok(())
    }
    fn end(&mut self, _: Option<&Seek>) -> std::io::Result<()> {
        Ok(())
    }
}

fn q(text: &str) -> Quantity {
    tandem::quantity(text).unwrap_or(Quantity::number(0.0))
}

fn axis(name: &str, from: &str, to: &str, steps: usize) -> Axis {
    Axis {
        name: name.into(),
        from: q(from),
        to: q(to),
        steps,
        unit: None,
    }
}

fn time(what: &str, src: &Source, axes: &[Axis]) {
    // `cargo bench --bench sweep -- WORD` times only the runs whose name
    // has WORD (cargo adds `--bench`)
    if let Some(word) = std::env::args().skip(1).find(|a| !a.starts_with('-')) {
        if !what.contains(&word) {
            return;
        }
    }
    let names: Vec<&str> = axes.iter().map(|a| a.name.as_str()).collect();
    let Ok(sweeper) = Sweeper::grid(src, &names, &[]) else {
        eprintln!("{what}: the file does not build");
        return;
    };
    let mut count = Count::default();
    let mut dt = f64::INFINITY;
    for _ in 0..3 {
        count = Count::default();
        let t0 = Instant::now();
        if sweeper.run(axes, None, &mut count, &|_| {}).is_err() {
            eprintln!("{what}: a step failed");
            return;
        }
        dt = dt.min(t0.elapsed().as_secs_f64());
    }
    println!(
        "{what}: {} steps in {dt:.3} s ({:.2} µs a step, {:.0} steps/s; last governing {:.4})",
        count.steps,
        dt / count.steps as f64 * 1e6,
        count.steps as f64 / dt,
        count.last
    );
}

/// The steps of the long runs: 100,000, or `TANDEM_BENCH_STEPS` (fewer,
/// to count instructions under valgrind, where times mean nothing).
fn steps() -> usize {
    std::env::var("TANDEM_BENCH_STEPS")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(100_000)
}

fn main() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let post =
        std::fs::read_to_string(root.join("examples/filled_post.tandem")).unwrap_or_default();
    let post = Source::new("filled_post.tandem", post);
    time(
        "filled_post over fc",
        &post,
        &[axis("fc", "3 ksi", "8 ksi", steps())],
    );
    time(
        "filled_post over height (nodes move)",
        &post,
        &[axis("height", "10 ft", "20 ft", steps())],
    );
    time(
        "filled_post grid fc x height",
        &post,
        &[
            axis("fc", "3 ksi", "8 ksi", 41),
            axis("height", "10 ft", "20 ft", 41),
        ],
    );
    let mut text = String::from("let t = 0.5 in\nmaterial s { E = 29000 ksi }\nmaterial c { E = 4000 ksi }\nnode n0 at 0 in\nfix n0\n");
    for i in 1..=5 {
        text.push_str(&format!("node n{i} at {} in\n", i * 20));
        text.push_str(&format!(
            "part a{i} {{ material = s; area = 10 in * t; ends = n{}, n{i} }}\n",
            i - 1
        ));
        text.push_str(&format!(
            "part b{i} {{ material = c; area = 50 in^2; ends = n{}, n{i} }}\n",
            i - 1
        ));
    }
    text.push_str("load n5 = -300 kip\ncheck \"plate\" : -a1.stress <= 20 ksi\n");
    let src = Source::new("bench.tandem", text);
    time(
        "10-part calc over t",
        &src,
        &[axis("t", "0.2 in", "1.5 in", 10_000)],
    );
}

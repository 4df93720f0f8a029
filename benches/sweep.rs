//! Sweep speed: 10,000 steps over a 10-part calc, in release mode.
//! `cargo bench --bench sweep`.

use std::time::Instant;

use tandem::review::sweep::Sweeper;
use tandem::source::Source;

// The command-line tool's allocator, so that the figures are its figures.
#[cfg(all(feature = "jemalloc", not(target_env = "msvc")))]
#[global_allocator]
static ALLOC: tikv_jemallocator::Jemalloc = tikv_jemallocator::Jemalloc;

fn main() {
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
    let Ok(sweeper) = Sweeper::new(&src, "t", &[]) else {
        eprintln!("bench file does not build");
        return;
    };
    let from = tandem::quantity("0.2 in").unwrap_or(tandem::units::Quantity::number(0.0));
    let to = tandem::quantity("1.5 in").unwrap_or(tandem::units::Quantity::number(0.0));
    let t0 = Instant::now();
    match sweeper.sweep(from, to, 10_000) {
        Ok(s) => {
            let dt = t0.elapsed().as_secs_f64();
            println!(
                "sweep: {} steps over a 10-part calc in {dt:.3} s ({:.1} µs a step)",
                s.steps.len(),
                dt / s.steps.len() as f64 * 1e6
            );
        }
        Err(_) => eprintln!("sweep failed"),
    }
}

//! Helpers shared by the integration tests.
#![allow(dead_code)]

use tandem::source::Source;
use tandem::units::Quantity;

/// A minimal assembly to append to `let` lines so that a file checks.
pub const ASSEMBLY: &str = "
material helper_steel { E = 29000 ksi }
node helper_a at 0 ft
node helper_b at 10 ft
fix helper_a
part helper_p {
  material = helper_steel
  area     = 1 in^2
  ends     = helper_a, helper_b
}
";

/// Check `text`, panicking with the rendered diagnostics on failure.
pub fn model(text: &str) -> tandem::model::Model {
    let src = Source::new("test.tandem", text);
    match tandem::check(&src) {
        Ok(m) => m,
        Err(e) => panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)),
    }
}

/// The value of `let name` in `lets` (plus a minimal assembly).
pub fn value(lets: &str, name: &str) -> Quantity {
    let m = model(&format!("{lets}\n{ASSEMBLY}"));
    m.let_value(name).unwrap_or_else(|| panic!("no let {name}"))
}

/// Relative difference.
pub fn rel(a: f64, b: f64) -> f64 {
    if b == 0.0 {
        a.abs()
    } else {
        ((a - b) / b).abs()
    }
}

/// The whole analysis of `text` (solve, checks, capacity, long term, buckling).
pub fn analyse(text: &str) -> tandem::Analysis {
    let src = Source::new("test.tandem", text);
    tandem::analyse(&src)
        .unwrap_or_else(|e| panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)))
}

/// Check and solve `text`.
pub fn solve(text: &str) -> (tandem::model::Model, tandem::solve::Solution) {
    let m = model(text);
    let src = Source::new("test.tandem", text);
    match tandem::solve::solve(&m) {
        Ok(s) => (m, s),
        Err(e) => panic!(
            "{}",
            tandem::diagnostic::render(&[tandem::Error::from(e)], &src, 100, false)
        ),
    }
}

/// Solve and return the solver's error.
pub fn solve_err(text: &str) -> String {
    let m = model(text);
    let src = Source::new("test.tandem", text);
    match tandem::solve::solve(&m) {
        Ok(_) => panic!("expected a solver error"),
        Err(e) => tandem::diagnostic::render(&[tandem::Error::from(e)], &src, 100, false),
    }
}

/// Force in part `name` of combination `combo`, in newtons.
pub fn force(
    m: &tandem::model::Model,
    s: &tandem::solve::Solution,
    combo: &str,
    name: &str,
) -> f64 {
    let c = s
        .combinations
        .iter()
        .find(|c| c.name == combo)
        .unwrap_or_else(|| panic!("combination {combo}"));
    c.parts[m.part_index(name).unwrap_or_else(|| panic!("part {name}"))]
        .force
        .value
}

/// A small deterministic generator (xorshift), so random tests reproduce.
pub struct Rng(pub u64);

impl Rng {
    /// Uniform in [0, 1).
    pub fn next(&mut self) -> f64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
    pub fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.next()
    }
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    pub fn below(&mut self, n: usize) -> usize {
        ((self.next() * n as f64) as usize).min(n.saturating_sub(1))
    }
    pub fn chance(&mut self, p: f64) -> bool {
        self.next() < p
    }
    pub fn pick<'a>(&mut self, xs: &[&'a str]) -> &'a str {
        xs[self.below(xs.len())]
    }
}

/// Every calc file shipped (examples/) or used by the tests (tests/).
pub fn calc_files() -> Vec<std::path::PathBuf> {
    fn walk(dir: &std::path::Path, out: &mut Vec<std::path::PathBuf>) {
        let Ok(entries) = std::fs::read_dir(dir) else {
            return;
        };
        for e in entries.filter_map(Result::ok) {
            let p = e.path();
            if p.is_dir() {
                walk(&p, out);
            } else if p.extension().is_some_and(|x| x == "tandem") {
                out.push(p);
            }
        }
    }
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    walk(&root.join("examples"), &mut files);
    walk(&root.join("tests"), &mut files);
    files.sort();
    files
}

/// Run the tandem binary in the repository's root folder.
pub fn tandem(args: &[&str]) -> std::process::Output {
    std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(args)
        .output()
        .expect("run tandem")
}

/// Run `git args` in `dir` as a throwaway identity, asserting it succeeds;
/// its standard output, trimmed.
pub fn git(dir: &std::path::Path, args: &[&str]) -> String {
    let out = std::process::Command::new("git")
        .current_dir(dir)
        .args(["-c", "user.name=t", "-c", "user.email=t@example.invalid"])
        .args(args)
        .output()
        .expect("git");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).trim().to_string()
}

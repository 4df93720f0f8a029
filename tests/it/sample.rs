//! `tandem sample`: Monte Carlo over named `let`s, against closed forms of
//! structural reliability. For a linear limit state of normal variables,
//! g = R − S, the probability of failure is Φ(−β) with β = (μR − μS) /
//! √(σR² + σS²) (Cornell 1969; Melchers, Structural Reliability Analysis
//! and Prediction, ch. 3, from memory). Percentiles of a normal result are
//! μ + z·σ with z from the standard normal table.

use super::common::tandem;

/// The standard normal distribution function, Φ(x) = (1 + erf(x/√2))/2,
/// erf by Abramowitz and Stegun 7.1.26 (error below 1.5e-7).
fn phi(x: f64) -> f64 {
    let z = x.abs() / std::f64::consts::SQRT_2;
    let t = 1.0 / (1.0 + 0.327_591_1 * z);
    let poly = t
        * (0.254_829_592
            + t * (-0.284_496_736
                + t * (1.421_413_741 + t * (-1.453_152_027 + t * 1.061_405_429))));
    let erf = 1.0 - poly * (-z * z).exp();
    if x >= 0.0 {
        0.5 * (1.0 + erf)
    } else {
        0.5 * (1.0 - erf)
    }
}

/// A rod of 100 mm² and a stress check against `fy`: the load P and the
/// strength fy scatter, U > 1 exactly when P − A·fy > 0.
const ROD: &str = "let P  = 20 kN\nlet fy = 250 MPa\nmaterial s { E = 200 GPa }\n\
                   node a at 0 m\nnode b at 2 m\nfix a\n\
                   part rod { material = s; area = 100 mm^2; ends = a, b }\nload b = P\n\
                   check \"stress\" : rod.stress <= fy\n";

fn run(file: &std::path::Path, extra: &[&str]) -> std::process::Output {
    let mut args = vec!["sample", file.to_str().expect("utf-8")];
    args.extend_from_slice(extra);
    tandem(&args)
}

fn rod_file(dir: &tempfile::TempDir) -> std::path::PathBuf {
    let f = dir.path().join("rod.tandem");
    std::fs::write(&f, ROD).expect("write");
    f
}

#[test]
fn the_probability_of_failure_of_a_linear_limit_state_is_phi_of_minus_beta() {
    let dir = tempfile::tempdir().expect("tempdir");
    let file = rod_file(&dir);
    // R = A·fy: mean 25 kN, sd 2 kN; S = P: mean 20.757 kN, sd 2 kN
    let beta = (25.0 - 20.757) / (2.0f64 * 2.0 + 2.0 * 2.0).sqrt();
    let want = phi(-beta);
    let out = run(
        &file,
        &[
            "--vary",
            "P=normal(20.757 kN, 2 kN)",
            "--vary",
            "fy=normal(250 MPa, 20 MPa)",
            "--samples",
            "10000",
            "--seed",
            "11",
            "--json",
        ],
    );
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    let c = &j["checks"][0];
    let p = c["probability_of_failure"].as_f64().expect("p");
    let lo = c["interval_95"][0].as_f64().expect("lo");
    let hi = c["interval_95"][1].as_f64().expect("hi");
    // four standard errors of the estimate
    let se = (want * (1.0 - want) / 10_000.0).sqrt();
    assert!((p - want).abs() <= 4.0 * se, "{p} against Φ(−β) = {want}");
    assert!(lo < p && p < hi && hi - lo < 8.0 * se, "[{lo}, {hi}]");
    assert_eq!(j["any_check_fails"]["failures"], c["failures"]);
    assert_eq!(j["unsolved"], 0);
}

/// With the load alone scattering, U = P / (A·fy) is normal: its
/// percentiles are (μ + z·σ)/(A·fy) with z = −1.645, 0, 1.645, 2.326.
#[test]
fn percentiles_of_a_normal_utilization() {
    let dir = tempfile::tempdir().expect("tempdir");
    let file = rod_file(&dir);
    let out = run(
        &file,
        &[
            "--vary",
            "P=normal(20 kN, 2 kN)",
            "--samples",
            "10000",
            "--seed",
            "5",
            "--show",
            "rod.force",
            "--json",
        ],
    );
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    let (mu, sd) = (20.0 / 25.0, 2.0 / 25.0);
    let z = [-1.644_853_6, 0.0, 1.644_853_6, 2.326_347_9];
    // sampling error of a quantile, σ·√(p(1−p))/(φ(z)·√N), about 0.02σ to
    // 0.04σ here; the P² estimate adds little
    let tolerance = [0.08, 0.08, 0.08, 0.15];
    for k in 0..4 {
        let got = j["checks"][0]["percentiles"][k]["utilization"]
            .as_f64()
            .expect("percentile");
        let want = mu + z[k] * sd;
        assert!(
            (got - want).abs() <= tolerance[k] * sd,
            "percentile {k}: {got} against {want}"
        );
        let force = j["shown"][0]["percentiles"][k]["value_si"]
            .as_f64()
            .expect("force");
        let want_force = 20e3 + z[k] * 2e3;
        assert!(
            (force - want_force).abs() <= tolerance[k] * 2e3,
            "force percentile {k}: {force} against {want_force}"
        );
    }
}

/// The same seed gives the same samples on one core and on two; another
/// seed gives others.
#[test]
fn a_seed_gives_the_same_answer_whatever_the_cores() {
    let dir = tempfile::tempdir().expect("tempdir");
    let file = rod_file(&dir);
    let args = [
        "sample",
        file.to_str().expect("utf-8"),
        "--vary",
        "P=lognormal(20 kN, 10 percent)",
        "--vary",
        "fy=triangular(220 MPa, 250 MPa, 270 MPa)",
        "--samples",
        "3000",
        "--json",
    ];
    let with = |threads: &str, seed: &str| {
        let mut a = args.to_vec();
        a.extend(["--seed", seed]);
        let o = std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
            .args(&a)
            .env("RAYON_NUM_THREADS", threads)
            .output()
            .expect("runs");
        assert_eq!(o.status.code(), Some(0), "{o:?}");
        o.stdout
    };
    let one = with("1", "9");
    assert_eq!(one, with("2", "9"));
    assert_ne!(one, with("2", "10"));
}

/// A sample that cannot be solved (here an area drawn negative) is counted
/// and its reason reported, not dropped.
#[test]
fn samples_that_cannot_be_solved_are_counted() {
    let dir = tempfile::tempdir().expect("tempdir");
    let file = dir.path().join("area.tandem");
    std::fs::write(
        &file,
        ROD.replace("let fy", "let A = 100 mm^2\nlet fy")
            .replace("area = 100 mm^2", "area = A"),
    )
    .expect("write");
    let out = run(
        &file,
        &[
            "--vary",
            "A=normal(100 mm^2, 60 mm^2)",
            "--samples",
            "400",
            "--json",
        ],
    );
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    let unsolved = j["unsolved"].as_u64().expect("count");
    // P(A < 0) = Φ(−100/60) ≈ 0.048: about 19 of 400
    assert!((5..=45).contains(&unsolved), "{unsolved}");
    assert_eq!(
        j["checks"][0]["samples"].as_u64().expect("n") + unsolved,
        400
    );
    assert!(j["unsolved_reasons"][0]["reason"].is_string());
    let text = run(
        &file,
        &["--vary", "A=normal(100 mm^2, 60 mm^2)", "--samples", "400"],
    );
    assert!(String::from_utf8_lossy(&text.stdout).contains("could not be solved"));
}

/// Bad input is an error (exit 2) that says what is wrong.
#[test]
fn bad_distributions_are_errors() {
    let dir = tempfile::tempdir().expect("tempdir");
    let file = rod_file(&dir);
    for (vary, says) in [
        ("P=normal(20 kN, 0 kN)", "sd of"),
        ("P=normal(20 kN, -1 kN)", "sd of"),
        ("P=uniform(30 kN, 10 kN)", "out of order"),
        ("P=triangular(10 kN, 40 kN, 30 kN)", "out of order"),
        ("P=lognormal(20 kN, 0 percent)", "coefficient of variation"),
        ("P=lognormal(20 kN, 2 kN)", "is a number"),
        ("P=normal(20 kN, 2 MPa)", "not of one dimension"),
        ("P=gamma(2, 3)", "is not a distribution"),
        ("Q=normal(20 kN, 2 kN)", "is not a `let`"),
        ("P=normal(20 MPa, 2 MPa)", "`P` is a force"),
        ("P normal(20 kN, 2 kN)", "is not `NAME="),
    ] {
        let out = run(&file, &["--vary", vary, "--samples", "10"]);
        assert_eq!(out.status.code(), Some(2), "{vary}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains(says), "{vary}: {err}");
    }
}

//! Revision diffs: golden outputs for revision pairs, exit codes, git
//! revisions and JSON.
//!
//! Each `tests/diffs/NAME.old.tandem` / `NAME.new.tandem` pair gives
//! `tests/diffs/NAME.md`; `UPDATE_GOLDEN=1 cargo test --test it diff::` rewrites them.

use std::path::PathBuf;
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

use super::common::{git, tandem};

const PAIRS: &[(&str, i32)] = &[
    ("wall", 0),
    ("part", 0),
    ("rename", 0),
    ("flip", 1),
    ("flitch", 0),
];

#[test]
fn golden_diffs() {
    let update = std::env::var_os("UPDATE_GOLDEN").is_some();
    for (name, code) in PAIRS {
        let old = format!("tests/diffs/{name}.old.tandem");
        let new = format!("tests/diffs/{name}.new.tandem");
        let out = tandem(&["diff", &old, &new]);
        assert_eq!(
            out.status.code(),
            Some(*code),
            "{name}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        let text = String::from_utf8_lossy(&out.stdout).to_string();
        let golden = root().join(format!("tests/diffs/{name}.md"));
        if update {
            std::fs::write(&golden, &text).expect("write");
        } else {
            assert_eq!(
                std::fs::read_to_string(&golden).unwrap_or_default(),
                text,
                "{name} changed (UPDATE_GOLDEN=1)"
            );
        }
    }
}

#[test]
fn what_each_pair_shows() {
    let run = |n: &str| {
        String::from_utf8_lossy(
            &tandem(&[
                "diff",
                &format!("tests/diffs/{n}.old.tandem"),
                &format!("tests/diffs/{n}.new.tandem"),
            ])
            .stdout,
        )
        .to_string()
    };
    // a thicker flitch plate: its section's area and inertia change, it
    // takes more of the moment and the timber less
    let flitch = run("flitch");
    assert!(
        flitch.contains("| beam `p1` inertia | 5333000 mm⁴ | 8000000 mm⁴ |"),
        "{flitch}"
    );
    assert!(
        flitch.contains("| beam `p1` moment | 7.249 kN·m | 8.758 kN·m | +20.8 % |"),
        "{flitch}"
    );
    assert!(
        flitch.contains("| beam `t1` moment | 7.751 kN·m | 6.242 kN·m | -19.5 % |"),
        "{flitch}"
    );
    let wall = run("wall");
    assert!(
        wall.contains("| part `shell` area | 11.91 in² | 16.10 in² |"),
        "{wall}"
    );
    assert!(wall.contains("part `core` force"));
    let part = run("part");
    assert!(part.contains("- part `rod3` added") && part.contains("- node `hang3` added"));
    let rename = run("rename");
    assert!(rename.contains("case `hot` renamed to `upset`"));
    let flip = run("flip");
    // the flip is listed before everything else
    let flips = flip.find("## Checks that changed status").expect("flips");
    assert!(flips < flip.find("## Inputs changed").expect("inputs"));
    assert!(flip.contains("pass | 1.043 **FAIL** |"));
}

#[test]
fn identical_files_show_nothing() {
    let out = tandem(&[
        "diff",
        "examples/filled_post.tandem",
        "examples/filled_post.tandem",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(s.contains("No input changed.") && s.contains("No result changed"));
}

#[test]
fn threshold_hides_small_changes() {
    let out = tandem(&[
        "diff",
        "tests/diffs/wall.old.tandem",
        "tests/diffs/wall.new.tandem",
        "--min-change",
        "50",
    ]);
    let s = String::from_utf8_lossy(&out.stdout);
    assert!(!s.contains("part `core` force"), "{s}");
    assert!(s.contains("node `cap` displacement")); // +552 %
}

#[test]
fn json_output() {
    let out = tandem(&[
        "diff",
        "tests/diffs/flip.old.tandem",
        "tests/diffs/flip.new.tandem",
        "--json",
    ]);
    assert_eq!(out.status.code(), Some(1));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("JSON");
    assert_eq!(v["newly_failing"], 2);
    assert!(v["results"].as_array().is_some_and(|r| !r.is_empty()));
    assert!(v["inputs"][0]["input"].is_string());
}

/// `REV:PATH` reads the old revision from git.
#[test]
fn old_revision_from_git() {
    if Command::new("git").arg("--version").output().is_err() {
        return; // no git on this machine: nothing to test against
    }
    let dir = std::env::temp_dir().join(format!("tandem-git-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(dir.join("calcs")).expect("mkdir");
    let git = |args: &[&str]| {
        git(&dir, args);
    };
    git(&["init", "-q"]);
    let calc = dir.join("calcs/post.tandem");
    std::fs::copy(root().join("tests/diffs/wall.old.tandem"), &calc).expect("copy");
    git(&["add", "."]);
    git(&["commit", "-qm", "first"]);
    std::fs::copy(root().join("tests/diffs/wall.new.tandem"), &calc).expect("copy");
    git(&["commit", "-qam", "second"]);
    let out = Command::new(env!("CARGO_BIN_EXE_tandem"))
        .current_dir(&dir)
        .args(["diff", "HEAD~1:calcs/post.tandem", "calcs/post.tandem"])
        .output()
        .expect("run");
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(String::from_utf8_lossy(&out.stdout).contains("part `shell` area"));
    let missing = Command::new(env!("CARGO_BIN_EXE_tandem"))
        .current_dir(&dir)
        .args(["diff", "HEAD~5:calcs/post.tandem", "calcs/post.tandem"])
        .output()
        .expect("run");
    assert_eq!(missing.status.code(), Some(2));
    let _ = std::fs::remove_dir_all(&dir);
}

//! The command line's conventions: pipes, folders, completions and manual,
//! colour and width, quiet, batches, machine-readable diagnostics, exit
//! codes, revisions. Each flag's exit code and output.

use std::io::Write as _;
use std::process::{Command, Output, Stdio};

const GOOD: &str = "let a = 1 m\nnode x at 0 m\nnode y at a\nfix x\nmaterial s { E = 200 GPa }\npart p { material = s; area = 100 mm^2; ends = x, y }\nload y = 1 kN\ncheck \"rod stress\" : p.stress <= 100 MPa\n";

/// GOOD with a rod a hundredth the area: 1000 MPa against 100 MPa, fails.
fn fails() -> String {
    GOOD.replace("100 mm^2", "1 mm^2")
}

const BAD: &str = "node x at 0 m\nnode y at 1 m\nfix x\npart p { material = steel; area = 1 mm^2; ends = x, y }\n";

/// Run tandem in `dir` with `env` set, `input` on stdin.
fn run_in(
    dir: &std::path::Path,
    args: &[&str],
    input: Option<&str>,
    env: &[(&str, &str)],
) -> Output {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_tandem"));
    cmd.current_dir(dir)
        .args(args)
        .env_remove("NO_COLOR")
        .env_remove("CLICOLOR_FORCE")
        .env_remove("COLUMNS")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped());
    for (k, v) in env {
        cmd.env(k, v);
    }
    let mut child = cmd.spawn().expect("run tandem");
    if let Some(mut stdin) = child.stdin.take() {
        if let Some(text) = input {
            stdin.write_all(text.as_bytes()).expect("stdin");
        }
    }
    child.wait_with_output().expect("wait")
}

fn run(args: &[&str], input: Option<&str>) -> Output {
    run_in(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")),
        args,
        input,
        &[],
    )
}

fn text(b: &[u8]) -> String {
    String::from_utf8_lossy(b).into_owned()
}

#[test]
fn a_calc_reads_from_standard_input() {
    let out = run(&["check", "-"], Some(GOOD));
    assert_eq!(out.status.code(), Some(0));
    assert!(
        text(&out.stdout).starts_with("<stdin>: ok"),
        "{}",
        text(&out.stdout)
    );
    let out = run(&["check", "-"], Some(BAD));
    assert_eq!(out.status.code(), Some(2));
    assert!(
        text(&out.stderr).contains("<stdin>"),
        "{}",
        text(&out.stderr)
    );
    let out = run(&["solve", "-"], Some(GOOD));
    assert_eq!(out.status.code(), Some(0));
    assert!(text(&out.stdout).contains("rod stress"));
    let out = run(&["solve", "-"], Some(&fails()));
    assert_eq!(
        out.status.code(),
        Some(1),
        "the rod's stress is ten times its limit"
    );
    let out = run(&["report", "-"], Some(GOOD));
    assert_eq!(out.status.code(), Some(0));
    assert!(text(&out.stdout).contains("# "), "Markdown on stdout");
    // fmt - writes the formatted calc to stdout
    let out = run(&["fmt", "-"], Some("let  a = 1 m\n"));
    assert_eq!(out.status.code(), Some(0));
    assert_eq!(text(&out.stdout), "let a = 1 m\n");
    let out = run(&["fmt", "--check", "-"], Some("let  a = 1 m\n"));
    assert_eq!(out.status.code(), Some(1));
    // -o - is standard output
    let out = run(&["report", "examples/filled_post.tandem", "-o", "-"], None);
    assert_eq!(out.status.code(), Some(0));
    assert!(text(&out.stdout).contains("filled pipe") || text(&out.stdout).contains("Column C-3"));
}

#[test]
fn folders_are_walked_and_batches_name_each_failure() {
    let dir = tempfile::tempdir().expect("dir");
    let root = dir.path();
    std::fs::create_dir_all(root.join("sub")).expect("sub");
    std::fs::create_dir_all(root.join(".hidden")).expect("hidden");
    std::fs::write(root.join("a.tandem"), fails()).expect("a");
    std::fs::write(root.join("sub/b.tandem"), GOOD).expect("b");
    std::fs::write(root.join(".hidden/c.tandem"), BAD).expect("c");
    std::fs::write(root.join("notes.txt"), "not a calc").expect("txt");
    let out = run_in(root, &["check", "."], None, &[]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    // the hidden folder's calc is not read, nor the text file
    assert_eq!(
        text(&out.stdout).lines().count(),
        2,
        "{}",
        text(&out.stdout)
    );
    // -q: errors only
    let out = run_in(root, &["check", "-q", "."], None, &[]);
    assert_eq!(out.status.code(), Some(0));
    assert!(out.stdout.is_empty() && out.stderr.is_empty());
    // a batch names the file that failed and why
    std::fs::write(root.join("sub/bad.tandem"), BAD).expect("bad");
    let out = run_in(root, &["check", "-q", "."], None, &[]);
    assert_eq!(out.status.code(), Some(2));
    let err = text(&out.stderr);
    assert!(err.contains("failed: ./sub/bad.tandem: 1 error"), "{err}");
    // report DIR -o OUT writes one report per calc
    let reports = root.join("reports");
    std::fs::create_dir_all(&reports).expect("reports");
    std::fs::remove_file(root.join("sub/bad.tandem")).expect("rm");
    let out = run_in(root, &["report", ".", "-o", "reports"], None, &[]);
    assert_eq!(out.status.code(), Some(1), "{}", text(&out.stderr));
    assert!(reports.join("a.md").exists() && reports.join("b.md").exists());
    assert!(text(&out.stderr).contains("failed: ./a.tandem: a check fails"));
    // solve takes several files: a heading each, or a JSON array
    let out = run_in(root, &["solve", "a.tandem", "sub/b.tandem"], None, &[]);
    assert_eq!(out.status.code(), Some(1));
    assert!(text(&out.stdout).contains("== sub/b.tandem =="));
    let out = run_in(
        root,
        &["solve", "--json", "a.tandem", "sub/b.tandem"],
        None,
        &[],
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("a JSON array");
    assert_eq!(v.as_array().map(Vec::len), Some(2));
    // a folder with no calc is an error
    let empty = root.join("empty");
    std::fs::create_dir_all(&empty).expect("empty");
    let out = run_in(root, &["check", "empty"], None, &[]);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("holds no `.tandem` file"));
}

#[test]
fn completions_and_the_manual() {
    for shell in ["bash", "zsh", "fish", "powershell"] {
        let out = run(&["completions", shell], None);
        assert_eq!(out.status.code(), Some(0), "{shell}");
        let script = text(&out.stdout);
        assert!(
            script.contains("tandem") && script.contains("sweep"),
            "{shell}"
        );
    }
    let out = run(&["completions", "tcsh"], None);
    assert_eq!(out.status.code(), Some(64));
    let out = run(&["manual"], None);
    assert_eq!(out.status.code(), Some(0));
    let page = text(&out.stdout);
    assert!(
        page.contains(".TH tandem 1") && page.contains("Exit codes"),
        "{page}"
    );
}

#[test]
fn colour_follows_the_flag_and_the_environment() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let coloured = |args: &[&str], env: &[(&str, &str)]| {
        let mut all = vec!["check"];
        all.extend(args);
        all.push("-");
        let out = run_in(root, &all, Some(BAD), env);
        assert_eq!(out.status.code(), Some(2));
        text(&out.stderr).contains("\u{1b}[")
    };
    // not a terminal: no colour unless asked
    assert!(!coloured(&[], &[]));
    assert!(coloured(&["--color", "always"], &[]));
    assert!(!coloured(&["--color", "never"], &[("CLICOLOR_FORCE", "1")]));
    assert!(coloured(&[], &[("CLICOLOR_FORCE", "1")]));
    assert!(!coloured(&[], &[("CLICOLOR_FORCE", "0")]));
    // NO_COLOR counts only when not empty
    assert!(!coloured(&[], &[("NO_COLOR", "1")]));
    assert!(!coloured(&[], &[("NO_COLOR", ""), ("TERM", "dumb")]));
}

/// Help text is wrapped at the terminal's width (`COLUMNS` when stderr is
/// not a terminal).
#[test]
fn diagnostics_take_the_terminal_width() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let calc = format!("{GOOD}check \"buckles\" : p.euler_load <= 100 kN\n");
    let help_lines = |columns: &str| {
        let out = run_in(root, &["solve", "-"], Some(&calc), &[("COLUMNS", columns)]);
        assert_eq!(out.status.code(), Some(2));
        let err = text(&out.stderr);
        let help: Vec<String> = err
            .lines()
            .skip_while(|l| !l.contains("help:"))
            .take_while(|l| !l.contains("<stdin>:"))
            .map(str::to_string)
            .collect();
        help
    };
    let (narrow, wide) = (help_lines("40"), help_lines("200"));
    assert_eq!(wide.len(), 1, "{wide:?}");
    assert!(narrow.len() > 2, "{narrow:?}");
    assert!(narrow.iter().all(|l| l.chars().count() <= 40), "{narrow:?}");
}

#[test]
fn a_label_in_wide_characters_keeps_its_row_aligned() {
    let calc = format!("{GOOD}check \"鋼棒の応力\" : p.stress <= 200 MPa\n");
    let out = run(&["solve", "-"], Some(&calc));
    let table: Vec<String> = text(&out.stdout)
        .lines()
        .skip_while(|l| !l.starts_with("checks"))
        .skip(1)
        .take(3)
        .map(str::to_string)
        .collect();
    assert_eq!(table.len(), 3, "{}", text(&out.stdout));
    // the next column starts at the same display column in every row
    // (East Asian Width: a kanji takes two)
    let column_of = |l: &str, word: &str| {
        let at = l.find(word).expect("word");
        l[..at]
            .chars()
            .map(|c| {
                if ('\u{3040}'..='\u{9fff}').contains(&c) {
                    2
                } else {
                    1
                }
            })
            .sum::<usize>()
    };
    let at: Vec<usize> = table[1..].iter().map(|l| column_of(l, "loads")).collect();
    assert_eq!(at[0], at[1], "{table:?}");
    assert_eq!(at[0], column_of(&table[0], "combination"), "{table:?}");
}

#[test]
fn diagnostics_in_short_and_json_form() {
    let out = run(&["check", "--message-format", "short", "-"], Some(BAD));
    assert_eq!(out.status.code(), Some(2));
    let err = text(&out.stderr);
    let line = err.lines().next().expect("a line");
    assert!(line.starts_with("<stdin>:4:"), "{line}");
    assert!(line.contains(": error[tandem::"), "{line}");
    let out = run(&["check", "--message-format", "json", "-"], Some(BAD));
    assert_eq!(out.status.code(), Some(2));
    for l in text(&out.stderr).lines() {
        let v: serde_json::Value = serde_json::from_str(l).expect("one object a line");
        assert_eq!(v["severity"], "error");
        assert_eq!(v["file"], "<stdin>");
        assert_eq!(v["line"], 4);
        assert!(v["column"].as_u64().is_some() && v["span"]["offset"].as_u64().is_some());
        assert!(v["message"].as_str().is_some_and(|m| m.contains("steel")));
        assert!(v["code"].as_str().is_some() && v["labels"].is_array());
        // the byte span points at the name
        let off = usize::try_from(v["span"]["offset"].as_u64().unwrap_or(0)).unwrap_or(0);
        assert!(BAD[off..].starts_with("steel"), "{v}");
    }
}

#[test]
fn usage_errors_have_their_own_exit_code() {
    let out = run(&["check", "--bogus", "x.tandem"], None);
    assert_eq!(out.status.code(), Some(64));
    let out = run(&["solve"], None);
    assert_eq!(out.status.code(), Some(64));
    let out = run(&["--help"], None);
    assert_eq!(out.status.code(), Some(0));
    assert!(text(&out.stdout).contains("Exit codes"));
    // a wrong calc is 2, not 64
    let out = run(&["check", "-"], Some(BAD));
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn fmt_diff_shows_what_would_change() {
    let dir = tempfile::tempdir().expect("dir");
    let file = dir.path().join("u.tandem");
    std::fs::write(&file, "let  a = 1 m\n").expect("write");
    let f = file.display().to_string();
    let out = run(&["fmt", "--diff", &f], None);
    assert_eq!(out.status.code(), Some(1));
    let d = text(&out.stdout);
    assert!(
        d.contains("-let  a = 1 m") && d.contains("+let a = 1 m") && d.contains("@@"),
        "{d}"
    );
    // nothing written
    assert_eq!(
        std::fs::read_to_string(&file).expect("read"),
        "let  a = 1 m\n"
    );
    std::fs::write(&file, "let a = 1 m\n").expect("write");
    let out = run(&["fmt", "--diff", &f], None);
    assert_eq!(out.status.code(), Some(0));
    assert!(out.stdout.is_empty());
}

/// `diff REV:PATH REV:PATH`, the paths taken from the current folder (a
/// subfolder of the repository), as `git show REV:./PATH` takes them.
#[test]
fn diff_reads_both_sides_from_git_relative_to_the_current_folder() {
    let git_ok = Command::new("git").arg("--version").output().is_ok();
    if !git_ok {
        eprintln!("skipped: git is not installed");
        return;
    }
    let dir = tempfile::tempdir().expect("dir");
    let root = dir.path();
    let sub = root.join("calcs");
    std::fs::create_dir_all(&sub).expect("sub");
    let git = |args: &[&str]| {
        super::common::git(root, args);
    };
    git(&["init", "-q"]);
    std::fs::write(sub.join("rod.tandem"), GOOD).expect("v1");
    git(&["add", "."]);
    git(&["commit", "-qm", "one"]);
    std::fs::write(sub.join("rod.tandem"), GOOD.replace("100 mm^2", "50 mm^2")).expect("v2");
    git(&["commit", "-qam", "two"]);
    let out = run_in(
        &sub,
        &["diff", "HEAD~1:rod.tandem", "HEAD:rod.tandem"],
        None,
        &[],
    );
    assert!(
        matches!(out.status.code(), Some(0 | 1)),
        "{}",
        text(&out.stderr)
    );
    let d = text(&out.stdout);
    assert!(d.contains("HEAD~1:rod.tandem") && d.contains("area"), "{d}");
    // git's own `REV:PATH` from the top would miss it from here: ./ is added
    let out = run_in(
        &sub,
        &["diff", "HEAD~1:rod.tandem", "rod.tandem"],
        None,
        &[],
    );
    assert!(
        matches!(out.status.code(), Some(0 | 1)),
        "{}",
        text(&out.stderr)
    );
}

/// README's own calc ("A calc file") is in the canonical layout and checks.
#[test]
fn the_readme_calc_is_canonical_and_sound() {
    let readme =
        std::fs::read_to_string(std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md"))
            .expect("README");
    let after = readme
        .split_once("## A calc file")
        .map(|(_, r)| r)
        .expect("the section");
    let calc = after
        .split_once("```\n")
        .and_then(|(_, r)| r.split_once("```\n"))
        .map(|(c, _)| c)
        .expect("a fenced calc");
    let out = run(&["fmt", "--check", "-"], Some(calc));
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stdout));
    let out = run(&["check", "-"], Some(calc));
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
}

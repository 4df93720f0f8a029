//! Traceability: the title block names the input by its SHA-256 (checked
//! against the FIPS 180-2 example digests) and the tandem version, and
//! inside a git repository the commit, whether the file has uncommitted
//! changes and its revisions from `git log --follow`; file names reach git
//! only after `--end-of-options`.

use std::path::Path;
use std::process::Command;

#[test]
fn sha256_matches_the_published_examples() {
    // FIPS 180-2, Appendix B.1 and B.2 (one- and two-block messages)
    assert_eq!(
        tandem::report::sha256_hex(b"abc"),
        "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
    );
    assert_eq!(
        tandem::report::sha256_hex(b"abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
        "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"
    );
}

fn git(dir: &Path, args: &[&str]) {
    let out = Command::new("git")
        .current_dir(dir)
        .args([
            "-c",
            "user.name=Test",
            "-c",
            "user.email=test@example.invalid",
        ])
        .args(["-c", "commit.gpgsign=false"])
        .args(args)
        .env("GIT_AUTHOR_DATE", "2026-11-02T10:00:00Z")
        .env("GIT_COMMITTER_DATE", "2026-11-02T10:00:00Z")
        .output()
        .expect("git");
    assert!(out.status.success(), "git {args:?}: {out:?}");
}

fn report(dir: &Path, file: &str) -> String {
    let out = Command::new(env!("CARGO_BIN_EXE_tandem"))
        .current_dir(dir)
        .args(["report", "--", file])
        .output()
        .expect("tandem");
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    String::from_utf8_lossy(&out.stdout).to_string()
}

#[test]
fn the_title_block_carries_the_input_digest_version_and_git_history() {
    let calc = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/filled_post.tandem"),
    )
    .expect("example");
    let dir = tempfile::tempdir().expect("tempdir");
    // a name git would read as an option, were it not for --end-of-options
    let name = "--output=post.tandem";
    let file = dir.path().join(name);
    std::fs::write(&file, &calc).expect("write");

    // outside a repository: digest and version, no git rows
    let md = report(dir.path(), name);
    let digest = tandem::report::sha256_hex(calc.as_bytes());
    assert!(
        md.contains(&format!("| Input SHA-256 | `{digest}` |")),
        "{md}"
    );
    assert!(md.contains(&format!(
        "| Written by | tandem {} |",
        env!("CARGO_PKG_VERSION")
    )));
    assert!(!md.contains("| Commit |"));

    if Command::new("git").arg("--version").output().is_err() {
        eprintln!("notice: git is not installed; the history part is skipped");
        return;
    }
    git(dir.path(), &["init", "-q"]);
    let md = report(dir.path(), name);
    assert!(
        md.contains("| Uncommitted changes | yes: the file is not in the repository |"),
        "{md}"
    );
    git(dir.path(), &["add", "--", name]);
    git(
        dir.path(),
        &["commit", "-q", "-m", "First issue of the column calc"],
    );
    std::fs::write(&file, calc.replace("-95 kip", "-97 kip")).expect("write");
    git(
        dir.path(),
        &[
            "commit",
            "-q",
            "-a",
            "-m",
            "Dead load from the revised survey",
        ],
    );
    let md = report(dir.path(), name);
    assert!(
        md.contains("| Uncommitted changes | none: the file is as committed |"),
        "{md}"
    );
    assert!(md.contains("| Commit | `"), "{md}");
    // the revisions, newest first, with their dates and subjects
    let newest = md
        .find("| Dead load from the revised survey |")
        .expect("newest revision");
    let first = md
        .find("| First issue of the column calc |")
        .expect("first revision");
    assert!(newest < first);
    assert!(md.contains("| 2026-11-02 | `"));
    // the git output file that `--output=` would have named was not written
    assert!(!dir.path().join("post.tandem").exists());

    std::fs::write(&file, calc.replace("-95 kip", "-99 kip")).expect("write");
    let md = report(dir.path(), name);
    assert!(md.contains("| Uncommitted changes | yes: the file differs from the commit |"));
}

#[test]
fn the_signature_block_and_contents_list_follow_the_title() {
    let md = report(
        Path::new(env!("CARGO_MANIFEST_DIR")),
        "examples/hung_platform.tandem",
    );
    assert!(
        md.contains("| Prepared | designer initials | 2026-12-01 |  |"),
        "{md}"
    );
    assert!(md.contains("| Checked | checker initials |  |  |"));
    assert!(md.contains("| Approved |  |  |  |"));
    // the contents list links every section by its anchor
    let contents = md.find("**Contents**").expect("contents");
    assert!(contents < md.find("## Summary").expect("summary"));
    for (title, anchor) in [
        ("Summary", "#summary"),
        ("Sketch of the assembly", "#sketch-of-the-assembly"),
        (
            "Combination `operating` = equipment + summer",
            "#combination-operating--equipment--summer",
        ),
        ("Design checks", "#design-checks"),
    ] {
        assert!(
            md.contains(&format!("- [{title}]({anchor})")),
            "{title}\n{md}"
        );
    }
    // the HTML gives each section that anchor
    let out = Command::new(env!("CARGO_BIN_EXE_tandem"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(["report", "--html", "examples/hung_platform.tandem"])
        .output()
        .expect("tandem");
    let html = String::from_utf8_lossy(&out.stdout);
    assert!(html.contains("id=\"combination-operating--equipment--summer\""));
    assert!(html.contains("@top-left { content: \"NWW-207 · Platform SP-2"));
    assert!(html.contains("counter(page) \" of \" counter(pages)"));
}

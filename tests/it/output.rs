//! The atomic writer leaves the target untouched when a write fails midway.

use std::fs::File;
use std::io::{self, Write};

use tandem::output::{write_atomic, write_atomic_with, Sink};

/// The writer's list of pending temporary files is one per process: the
/// test that interrupts a write clears it, so the tests here take turns.
static TURN: std::sync::Mutex<()> = std::sync::Mutex::new(());

fn turn() -> std::sync::MutexGuard<'static, ()> {
    TURN.lock()
        .unwrap_or_else(std::sync::PoisonError::into_inner)
}

/// Writes half the bytes, then fails as a full disk would.
struct FailHalfway;

impl Sink for FailHalfway {
    fn write(&mut self, file: &mut File, bytes: &[u8]) -> io::Result<()> {
        file.write_all(&bytes[..bytes.len() / 2])?;
        Err(io::Error::other("simulated: no space left on device"))
    }
}

#[test]
fn failed_write_leaves_old_file_and_no_temporary() {
    let _turn = turn();
    let dir = std::env::temp_dir().join(format!("tandem-atomic-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("mkdir");
    let target = dir.join("report.md");
    write_atomic(&target, b"first version\n").expect("write");
    let err = write_atomic_with(&target, b"second version, longer\n", &mut FailHalfway);
    assert!(err.is_err());
    assert_eq!(
        std::fs::read_to_string(&target).expect("read"),
        "first version\n"
    );
    let names: Vec<String> = std::fs::read_dir(&dir)
        .expect("dir")
        .flatten()
        .map(|e| e.file_name().to_string_lossy().to_string())
        .collect();
    assert_eq!(names, vec!["report.md".to_string()]);
    write_atomic(&target, b"third\n").expect("write");
    assert_eq!(std::fs::read_to_string(&target).expect("read"), "third\n");
    let _ = std::fs::remove_dir_all(&dir);
}

fn fresh_dir(name: &str) -> std::path::PathBuf {
    let dir = std::path::Path::new(env!("CARGO_TARGET_TMPDIR"))
        .join(format!("output-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("mkdir");
    dir
}

fn names(dir: &std::path::Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .expect("dir")
        .flatten()
        .map(|e| e.file_name().to_string_lossy().to_string())
        .collect();
    v.sort();
    v
}

#[cfg(unix)]
#[test]
fn a_write_through_a_link_keeps_the_link_and_the_mode() {
    use std::os::unix::fs::PermissionsExt;
    let _turn = turn();
    let dir = fresh_dir("link");
    let real = dir.join("real.md");
    std::fs::write(&real, "old\n").expect("write");
    std::fs::set_permissions(&real, std::fs::Permissions::from_mode(0o600)).expect("chmod");
    let link = dir.join("link.md");
    std::os::unix::fs::symlink("real.md", &link).expect("symlink");
    write_atomic(&link, b"new\n").expect("write");
    // before: the link was replaced by a regular file and the mode widened
    assert!(std::fs::symlink_metadata(&link)
        .expect("meta")
        .file_type()
        .is_symlink());
    assert_eq!(std::fs::read_to_string(&real).expect("read"), "new\n");
    let mode = std::fs::metadata(&real).expect("meta").permissions().mode() & 0o777;
    assert_eq!(mode, 0o600);
    assert_eq!(names(&dir), ["link.md", "real.md"]);
}

#[cfg(unix)]
#[test]
fn a_planted_link_at_the_old_temporary_name_redirects_nothing() {
    let _turn = turn();
    let dir = fresh_dir("planted");
    let victim = dir.join("victim.txt");
    std::fs::write(&victim, "keep me\n").expect("write");
    // the name the writer used to choose: `.NAME.PID.tmp`
    let guess = dir.join(format!(".report.md.{}.tmp", std::process::id()));
    std::os::unix::fs::symlink(&victim, &guess).expect("symlink");
    write_atomic(&dir.join("report.md"), b"report\n").expect("write");
    assert_eq!(std::fs::read_to_string(&victim).expect("read"), "keep me\n");
    assert_eq!(
        std::fs::read_to_string(dir.join("report.md")).expect("read"),
        "report\n"
    );
}

#[cfg(unix)]
#[test]
fn a_device_is_written_in_place_not_replaced() {
    let _turn = turn();
    // /dev/null stays a device (before: replaced by a regular file, or refused)
    write_atomic(std::path::Path::new("/dev/null"), b"discarded\n").expect("write");
    let m = std::fs::metadata("/dev/null").expect("meta");
    assert!(!m.is_file());
}

#[test]
fn a_file_changed_after_it_was_read_is_not_replaced() {
    let _turn = turn();
    let dir = fresh_dir("changed");
    let f = dir.join("calc.tandem");
    std::fs::write(&f, "edited meanwhile\n").expect("write");
    let err = tandem::output::replace_if_unchanged(&f, b"as read\n", b"formatted\n")
        .expect_err("refused");
    assert!(
        err.to_string().contains("changed after it was read"),
        "{err}"
    );
    assert_eq!(
        std::fs::read_to_string(&f).expect("read"),
        "edited meanwhile\n"
    );
    assert_eq!(names(&dir), ["calc.tandem"]);
    tandem::output::replace_if_unchanged(&f, b"edited meanwhile\n", b"formatted\n")
        .expect("unchanged: replaced");
    assert_eq!(std::fs::read_to_string(&f).expect("read"), "formatted\n");
}

/// Stands for the signal handler: interrupts the write midway.
struct Interrupted;

impl Sink for Interrupted {
    fn write(&mut self, file: &mut File, bytes: &[u8]) -> io::Result<()> {
        file.write_all(&bytes[..1])?;
        tandem::output::remove_pending();
        Err(io::Error::other("interrupted"))
    }
}

#[test]
fn an_interrupted_write_leaves_no_temporary() {
    let _turn = turn();
    let dir = fresh_dir("interrupted");
    let target = dir.join("report.md");
    assert!(write_atomic_with(&target, b"report\n", &mut Interrupted).is_err());
    assert!(names(&dir).is_empty(), "{:?}", names(&dir));
}

fn tandem(args: &[&str], dir: &std::path::Path) -> std::process::Output {
    std::process::Command::new(env!("CARGO_BIN_EXE_tandem"))
        .current_dir(dir)
        .args(args)
        .output()
        .expect("run tandem")
}

#[test]
fn a_batch_whose_reports_collide_is_refused_before_writing() {
    let _turn = turn();
    let dir = fresh_dir("collide");
    let calc = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/filled_post.tandem"),
    )
    .expect("example");
    for sub in ["a", "b", "out"] {
        std::fs::create_dir_all(dir.join(sub)).expect("mkdir");
    }
    std::fs::write(dir.join("a/post.tandem"), &calc).expect("write");
    std::fs::write(dir.join("b/post.tandem"), &calc).expect("write");
    let out = tandem(
        &["report", "a/post.tandem", "b/post.tandem", "-o", "out"],
        &dir,
    );
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("a/post.tandem and b/post.tandem"), "{err}");
    assert!(names(&dir.join("out")).is_empty());
}

#[test]
fn a_revision_that_looks_like_an_option_never_reaches_git_as_one() {
    let _turn = turn();
    let dir = fresh_dir("git");
    let calc = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/filled_post.tandem");
    let planted = dir.join("planted");
    let spec = format!("--output={}:calc.tandem", planted.display());
    let out = tandem(&["diff", "--", &spec, &calc.display().to_string()], &dir);
    assert_eq!(out.status.code(), Some(2));
    // before: git took `--output=...` as its option and wrote the file
    assert!(!planted.exists());
}

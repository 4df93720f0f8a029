//! The atomic writer leaves the target untouched when a write fails midway.

use std::fs::File;
use std::io::{self, Write};

use tandem::output::{write_atomic, write_atomic_with, Sink};

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

//! Every file tandem writes goes through [`write_atomic`]: a temporary file in
//! the same folder, flushed to disk, then renamed over the target, so a
//! failed run never leaves a partial file and a reader never sees one.

use std::fs::{self, File};
use std::io::{self, Write};
use std::path::{Path, PathBuf};

/// Where the bytes are in the middle of being written; tests use this to
/// simulate a failure mid-write.
pub trait Sink {
    /// Write all of `bytes` to `file`.
    ///
    /// # Errors
    /// Any I/O error.
    fn write(&mut self, file: &mut File, bytes: &[u8]) -> io::Result<()>;
}

/// The ordinary sink.
pub struct Plain;

impl Sink for Plain {
    fn write(&mut self, file: &mut File, bytes: &[u8]) -> io::Result<()> {
        file.write_all(bytes)
    }
}

fn temp_path(target: &Path) -> PathBuf {
    let name = target
        .file_name()
        .map_or_else(|| "out".into(), |n| n.to_string_lossy().to_string());
    let dir = target.parent().unwrap_or_else(|| Path::new("."));
    dir.join(format!(".{name}.{}.tmp", std::process::id()))
}

/// Write `bytes` to `target` atomically.
///
/// # Errors
/// Any I/O error; the target is then unchanged and no temporary file is left.
pub fn write_atomic(target: &Path, bytes: &[u8]) -> io::Result<()> {
    write_atomic_with(target, bytes, &mut Plain)
}

/// [`write_atomic`] through a given sink.
///
/// # Errors
/// As [`write_atomic`].
pub fn write_atomic_with(target: &Path, bytes: &[u8], sink: &mut dyn Sink) -> io::Result<()> {
    let tmp = temp_path(target);
    let result = (|| {
        let mut f = File::create(&tmp)?;
        sink.write(&mut f, bytes)?;
        f.sync_all()?;
        drop(f);
        fs::rename(&tmp, target)
    })();
    if result.is_err() {
        let _ = fs::remove_file(&tmp);
    }
    result
}

/// True when `out` names the same file as any of `inputs`.
pub fn is_input(out: &Path, inputs: &[PathBuf]) -> bool {
    let canon = |p: &Path| fs::canonicalize(p).ok();
    let Some(o) = canon(out) else {
        return false;
    };
    inputs.iter().any(|i| canon(i).as_ref() == Some(&o))
}

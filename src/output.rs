//! Every file tandem writes goes through [`write_atomic`]: a temporary file in
//! the same folder, flushed to disk, then renamed over the target, so a
//! failed run never leaves a partial file and a reader never sees one.
//!
//! The writer keeps what it does not own: through a symbolic link it writes
//! the link's target and keeps the link; it keeps an existing file's mode; a
//! device or pipe is written in place, never replaced by a regular file.
//! The temporary file is created exclusively under an unpredictable name
//! (`tempfile`), so a link planted at a guessable name cannot redirect the
//! write, and it is removed on every error path and, through
//! [`remove_pending`], when the process is interrupted.

use std::fs::{self, File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::Mutex;

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

/// Temporary files being written now, removed by [`remove_pending`] when
/// the process is interrupted.
static PENDING: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

fn pending() -> std::sync::MutexGuard<'static, Vec<PathBuf>> {
    PENDING
        .lock()
        .unwrap_or_else(std::sync::PoisonError::into_inner)
}

/// Remove every temporary file still being written: for a signal handler
/// (SIGINT, SIGTERM) before the process exits.
pub fn remove_pending() {
    for p in pending().drain(..) {
        let _ = fs::remove_file(p);
    }
}

/// Write `bytes` to `target` atomically.
///
/// # Errors
/// Any I/O error; the target is then unchanged and no temporary file is left.
pub fn write_atomic(target: &Path, bytes: &[u8]) -> io::Result<()> {
    write_atomic_with(target, bytes, &mut Plain)
}

/// [`write_atomic`], refusing when the target no longer holds `expected`
/// (it changed after it was read: `fmt` must not lose an edit made
/// meanwhile).
///
/// # Errors
/// As [`write_atomic`], or an error of kind `Other` saying the file changed.
pub fn replace_if_unchanged(target: &Path, expected: &[u8], bytes: &[u8]) -> io::Result<()> {
    write_checked(target, bytes, &mut Plain, Some(expected))
}

/// [`write_atomic`] through a given sink.
///
/// # Errors
/// As [`write_atomic`].
pub fn write_atomic_with(target: &Path, bytes: &[u8], sink: &mut dyn Sink) -> io::Result<()> {
    write_checked(target, bytes, sink, None)
}

fn write_checked(
    target: &Path,
    bytes: &[u8],
    sink: &mut dyn Sink,
    expected: Option<&[u8]>,
) -> io::Result<()> {
    // Through a link: write where it points, and keep the link.
    let target = match fs::symlink_metadata(target) {
        Ok(m) if m.file_type().is_symlink() => match fs::canonicalize(target) {
            Ok(real) => real,
            // a dangling link: its target does not exist yet
            Err(_) => link_target(target)?,
        },
        _ => target.to_path_buf(),
    };
    let existing = fs::metadata(&target).ok();
    if let Some(m) = &existing {
        if m.is_dir() {
            return Err(io::Error::other(format!(
                "{} is a folder",
                target.display()
            )));
        }
        if !m.is_file() {
            // a device or a pipe: written in place, never replaced
            if expected.is_some() {
                return Err(io::Error::other("not a regular file"));
            }
            let mut f = OpenOptions::new().write(true).open(&target)?;
            return sink.write(&mut f, bytes);
        }
    }
    let dir = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let name = target
        .file_name()
        .map_or_else(|| "out".into(), |n| n.to_string_lossy().to_string());
    let prefix = format!(".{name}.");
    let mut builder = tempfile::Builder::new();
    builder.prefix(&prefix).suffix(".tmp");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        // a new file gets the usual mode, less the umask
        builder.permissions(fs::Permissions::from_mode(0o666));
    }
    let tmp = builder.tempfile_in(dir)?;
    let tmp_path = tmp.path().to_path_buf();
    pending().push(tmp_path.clone());
    let result = (|| {
        let (mut f, path) = tmp.into_parts();
        if let Some(m) = &existing {
            // keep the mode of the file replaced (0600 stays 0600)
            f.set_permissions(m.permissions())?;
        }
        sink.write(&mut f, bytes)?;
        f.sync_all()?;
        drop(f);
        if let Some(old) = expected {
            // a leading byte-order mark, dropped when it was read, is no change
            let now = fs::read(&target).ok();
            let now = now
                .as_deref()
                .map(|b| b.strip_prefix(&[0xEF, 0xBB, 0xBF]).unwrap_or(b));
            if now != Some(old) {
                return Err(io::Error::other(format!(
                    "{} changed after it was read; not replaced",
                    target.display()
                )));
            }
        }
        // `keep` hands the path back to us: the rename replaces the target
        let kept = path.keep().map_err(|e| e.error)?;
        fs::rename(&kept, &target)
    })();
    if result.is_err() {
        let _ = fs::remove_file(&tmp_path);
    }
    pending().retain(|p| p != &tmp_path);
    result
}

/// Where a link points, resolved against the link's folder.
fn link_target(link: &Path) -> io::Result<PathBuf> {
    let to = fs::read_link(link)?;
    Ok(if to.is_absolute() {
        to
    } else {
        link.parent().unwrap_or_else(|| Path::new(".")).join(to)
    })
}

/// True when `out` names the same file as any of `inputs`.
pub fn is_input(out: &Path, inputs: &[PathBuf]) -> bool {
    let canon = |p: &Path| fs::canonicalize(p).ok();
    let Some(o) = canon(out) else {
        return false;
    };
    inputs.iter().any(|i| canon(i).as_ref() == Some(&o))
}

//! Where a calc file stands in version control, for the report's title
//! block: the commit checked out, whether the file differs from it, and the
//! file's revisions (`git log --follow`). git is always called with
//! `--end-of-options` before the file's name, so no name is ever read as an
//! option. Without git, or outside a repository, there is no history.

use std::path::Path;
use std::process::Command;

/// One commit that changed the file.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Revision {
    /// `YYYY-MM-DD`, the author date.
    pub date: String,
    pub commit: String,
    pub subject: String,
}

/// Whether the file as read is the one committed.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FileState {
    Committed,
    /// Changed since the commit (staged or not).
    Changed,
    /// Not in the repository.
    Untracked,
}

impl FileState {
    #[must_use]
    pub fn words(self) -> &'static str {
        match self {
            FileState::Committed => "none: the file is as committed",
            FileState::Changed => "yes: the file differs from the commit",
            FileState::Untracked => "yes: the file is not in the repository",
        }
    }
}

/// A calc file's place in git.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct History {
    /// The commit checked out (`HEAD`), abbreviated; `None` before the
    /// first commit.
    pub commit: Option<String>,
    pub state: FileState,
    /// Newest first, at most [`MAX_REVISIONS`].
    pub revisions: Vec<Revision>,
    /// Earlier revisions left out of `revisions`.
    pub earlier: usize,
}

/// At most this many revisions are listed; the report says how many more.
pub const MAX_REVISIONS: usize = 20;

fn git(dir: &Path, args: &[&str], file: Option<&str>) -> Option<String> {
    let mut c = Command::new("git");
    c.arg("-C").arg(dir).args(args);
    if let Some(f) = file {
        c.args(["--end-of-options", "--", f]);
    }
    let out = c.output().ok()?;
    out.status
        .success()
        .then(|| String::from_utf8_lossy(&out.stdout).to_string())
}

/// The history of the calc file at `path`, when git is installed and the
/// file is inside a work tree.
#[must_use]
pub fn of(path: &Path) -> Option<History> {
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let name = path.file_name()?.to_str()?;
    let inside = git(dir, &["rev-parse", "--is-inside-work-tree"], None)?;
    if inside.trim() != "true" {
        return None;
    }
    let commit = git(
        dir,
        &["rev-parse", "--short=12", "--verify", "-q", "HEAD"],
        None,
    )
    .map(|s| s.trim().to_string())
    .filter(|s| !s.is_empty());
    let status = git(dir, &["status", "--porcelain"], Some(name)).unwrap_or_default();
    let state = if status.starts_with("??") {
        FileState::Untracked
    } else if status.trim().is_empty() {
        FileState::Committed
    } else {
        FileState::Changed
    };
    let log = if commit.is_some() {
        git(
            dir,
            &[
                "log",
                "--follow",
                "--no-color",
                "--date=short",
                "--format=%ad%x09%h%x09%s",
            ],
            Some(name),
        )
        .unwrap_or_default()
    } else {
        String::new()
    };
    let mut revisions = Vec::new();
    let mut more = 0;
    for line in log.lines() {
        let mut f = line.splitn(3, '\t');
        let (Some(date), Some(commit), Some(subject)) = (f.next(), f.next(), f.next()) else {
            continue;
        };
        if revisions.len() == MAX_REVISIONS {
            more += 1;
            continue;
        }
        revisions.push(Revision {
            date: date.into(),
            commit: commit.into(),
            subject: subject.into(),
        });
    }
    Some(History {
        commit,
        state,
        revisions,
        earlier: more,
    })
}

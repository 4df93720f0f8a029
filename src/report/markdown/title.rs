//! The title block (with what identifies the input), the signature block,
//! the file's revisions and the contents list.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::*;

/// The title, the title block's table (with what identifies the input:
/// its SHA-256, the tool's version, its place in git), the signature block
/// and the file's revisions.
pub(super) fn title_block(
    doc: &mut Doc,
    source: &Source,
    model: &Model,
    history: Option<&History>,
) {
    let title = model
        .title
        .get("title")
        .unwrap_or("Load-sharing calculation");
    let _ = write!(doc.out, "# {}\n\n", text(title));
    let signed: Vec<&str> = crate::model::Title::SIGNATURES
        .iter()
        .flat_map(|(_, who, when)| [*who, *when])
        .collect();
    let mut rows = Vec::new();
    for key in crate::model::Title::KEYS.iter().skip(1) {
        if signed.contains(key) {
            continue;
        }
        if let Some(v) = model.title.get(key) {
            let mut k = (*key).to_string();
            if let Some(c) = k.get_mut(0..1) {
                c.make_ascii_uppercase();
            }
            rows.push(vec![k, text(v)]);
        }
    }
    rows.push(vec!["Calc file".into(), code(&source.name)]);
    rows.push(vec![
        "Input SHA-256".into(),
        code(&crate::report::sha256_hex(source.text.as_bytes())),
    ]);
    rows.push(vec![
        "Written by".into(),
        format!("tandem {}", env!("CARGO_PKG_VERSION")),
    ]);
    if let Some(h) = history {
        rows.push(vec![
            "Commit".into(),
            h.commit
                .as_deref()
                .map_or("none yet (a repository without commits)".into(), code),
        ]);
        rows.push(vec!["Uncommitted changes".into(), h.state.words().into()]);
    }
    doc.table(&["Item", "Value"], &rows, &[]);
    let rows: Vec<Vec<String>> = crate::model::Title::SIGNATURES
        .iter()
        .map(|(role, who, when)| {
            vec![
                (*role).to_string(),
                model.title.get(who).map_or(String::new(), text),
                model.title.get(when).map_or(String::new(), text),
                String::new(),
            ]
        })
        .collect();
    doc.table(&["", "Name", "Date", "Signature"], &rows, &[]);
    if let Some(h) = history {
        if h.revisions.is_empty() {
            doc.p("Revisions: the file has no commits in its repository yet.");
        } else {
            doc.p("Revisions of the calc file (from `git log --follow`, newest first):");
            let rows: Vec<Vec<String>> = h
                .revisions
                .iter()
                .map(|r| vec![text(&r.date), code(&r.commit), text(&r.subject)])
                .collect();
            doc.table(&["Date", "Commit", "Subject"], &rows, &[]);
            if h.earlier > 0 {
                doc.p(&format!("… and {} earlier revisions.", h.earlier));
            }
        }
    }
}

/// The contents list: every section (level-2 heading), linked by the
/// anchor a Markdown renderer gives it.
pub(super) fn contents(headings: &[String]) -> String {
    let mut anchors = comrak::Anchorizer::new();
    let mut out = String::from("**Contents**\n\n");
    for h in headings {
        // the heading's text as rendered: no code fences or escapes
        let plain: String = {
            let mut t = String::with_capacity(h.len());
            let mut escaped = false;
            for c in h.chars() {
                if escaped {
                    t.push(c);
                    escaped = false;
                } else if c == '\\' {
                    escaped = true;
                } else if c != '`' {
                    t.push(c);
                }
            }
            t
        };
        let _ = writeln!(out, "- [{h}](#{})", anchors.anchorize(&plain));
    }
    out.push('\n');
    out
}

//! Comments in `tandem fmt`: found in the source, then given to the line
//! they belong to, so that formatting keeps every one where it was.

use super::Item;

/// A comment in the source.
#[derive(Clone, Debug)]
pub(super) struct Comment {
    start: usize,
    line: usize,
    trailing: bool,
    text: String,
}

pub(super) fn line_starts(text: &str) -> Vec<usize> {
    let mut v = vec![0];
    for (i, b) in text.bytes().enumerate() {
        if b == b'\n' {
            v.push(i + 1);
        }
    }
    v
}

pub(super) fn line_of(starts: &[usize], offset: usize) -> usize {
    starts.partition_point(|&s| s <= offset).saturating_sub(1)
}

pub(super) fn comments(text: &str, starts: &[usize]) -> Vec<Comment> {
    let bytes = text.as_bytes();
    let mut out = Vec::new();
    let mut i = 0;
    while i < bytes.len() {
        match bytes[i] {
            b'"' => {
                i += 1;
                while i < bytes.len() && bytes[i] != b'"' && bytes[i] != b'\n' {
                    if bytes[i] == b'\\' {
                        i += 1;
                    }
                    i += 1;
                }
            }
            b'#' => {
                let start = i;
                while i < bytes.len() && bytes[i] != b'\n' {
                    i += 1;
                }
                let line = line_of(starts, start);
                let before = &text[starts[line]..start];
                out.push(Comment {
                    start,
                    line,
                    trailing: !before.trim().is_empty(),
                    text: text[start..i].trim_end().to_string(),
                });
                continue;
            }
            _ => {}
        }
        i += 1;
    }
    out
}

/// Give each comment to its line: an own-line comment to the first line
/// that starts after it, a trailing one to the last line that ends on its
/// source line and starts before it. One pass over the lines and comments
/// (both in file order), so a long commented file formats in linear time.
pub(super) fn attach(items: &mut [Item], comments: Vec<Comment>) -> Vec<String> {
    let mut flat: Vec<(usize, usize)> = Vec::new();
    let mut anchors: Vec<usize> = Vec::new();
    let mut reach: Vec<usize> = Vec::new();
    let mut by_end: std::collections::HashMap<usize, Vec<usize>> = std::collections::HashMap::new();
    let mut furthest = 0;
    for (i, it) in items.iter().enumerate() {
        for (j, l) in it.lines.iter().enumerate() {
            by_end.entry(l.ends_on).or_default().push(flat.len());
            flat.push((i, j));
            anchors.push(l.anchor);
            // the furthest anchor so far: the first line starting after a
            // point is where this first passes it
            furthest = furthest.max(l.anchor);
            reach.push(furthest);
        }
    }
    let mut tail = Vec::new();
    for c in comments {
        let trailing = if c.trailing {
            by_end
                .get(&c.line)
                .and_then(|v| v.iter().rev().copied().find(|&k| anchors[k] < c.start))
        } else {
            None
        };
        if let Some(k) = trailing {
            let (i, j) = flat[k];
            let l = &mut items[i].lines[j];
            match &mut l.comment {
                Some(existing) => {
                    existing.push(' ');
                    existing.push_str(&c.text);
                }
                None => l.comment = Some(c.text),
            }
            continue;
        }
        let k = reach.partition_point(|&a| a <= c.start);
        match flat.get(k) {
            Some(&(i, j)) => items[i].lines[j].before.push(c.text),
            None => tail.push(c.text),
        }
    }
    tail
}

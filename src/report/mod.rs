//! Output of solved calcs: display units and number formatting, the solve
//! tables, JSON.

pub mod csv;
pub mod display;
pub mod drawing;
pub mod json;
pub mod markdown;
pub mod substitute;
pub mod text;

pub use display::{number, utilization, Display};

/// The sentence naming the combinations an analysis had to leave out
/// ([`crate::analyse_partial`]), worded once for every output.
#[must_use]
pub fn left_out(names: &[String]) -> String {
    let list: Vec<String> = names.iter().map(|n| format!("`{n}`")).collect();
    format!(
        "combination{} {} could not be solved or checked and {} left out (the errors say why)",
        if names.len() == 1 { "" } else { "s" },
        list.join(", "),
        if names.len() == 1 { "is" } else { "are" }
    )
}

/// The SHA-256 of some bytes (FIPS 180-4), in lowercase hex.
#[must_use]
pub fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::Digest as _;
    let digest = sha2::Sha256::digest(bytes);
    let mut out = String::with_capacity(64);
    for b in &digest {
        let _ = std::fmt::Write::write_fmt(&mut out, format_args!("{b:02x}"));
    }
    out
}

/// A print-ready, self-contained HTML page of a Markdown report: CSS paged
/// media gives every sheet a running header (calc number, title, revision)
/// and "Sheet X of Y"; headings keep with what follows and a table that
/// splits repeats its header row. The drawings the report links as
/// `STEM.SUFFIX` are put inline in place of their links.
#[must_use]
pub fn html(
    markdown: &str,
    title: &crate::model::Title,
    stem: &str,
    drawings: &[drawing::Drawing],
) -> String {
    let mut options = comrak::Options::default();
    options.extension.table = true;
    options.extension.strikethrough = true;
    options.extension.header_id_prefix = Some(String::new());
    options.render.escape = true;
    let mut body = comrak::markdown_to_html(markdown, &options);
    for (k, d) in drawings.iter().enumerate() {
        let img = format!("<img src=\"{}.{}\"", markdown::link_target(stem), d.suffix);
        let Some(at) = body.find(&img) else { continue };
        let start = body[..at].rfind("<p>").unwrap_or(at);
        let end = body[at..].find("</p>").map_or_else(
            || body[at..].find("/>").map_or(body.len(), |e| at + e + 2),
            |e| at + e + 4,
        );
        let figure = format!(
            "<figure class=\"drawing\">\n{}<figcaption>Figure {}. {}</figcaption>\n</figure>",
            d.svg,
            k + 1,
            drawing::escape(&d.caption)
        );
        body.replace_range(start..end, &figure);
    }
    let name = title.get("title").unwrap_or("Load-sharing calculation");
    let head_left = match title.get("number") {
        Some(n) => format!("{n} · {name}"),
        None => name.to_string(),
    };
    let head_right = title
        .get("revision")
        .map_or_else(String::new, |r| format!("Revision {r}"));
    let page = format!(
        "@page {{\n  margin: 20mm 16mm 18mm 16mm;\n  @top-left {{ content: {}; font: 9pt Georgia, serif; }}\n  @top-right {{ content: {}; font: 9pt Georgia, serif; }}\n  @bottom-left {{ content: {}; font: 8pt Georgia, serif; }}\n  @bottom-right {{ content: \"Sheet \" counter(page) \" of \" counter(pages); font: 9pt Georgia, serif; }}\n}}\n",
        css_string(&head_left),
        css_string(&head_right),
        css_string(&format!("tandem {}", env!("CARGO_PKG_VERSION"))),
    );
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>{}</title>\n<style>\n{CSS}{page}</style>\n</head>\n<body>\n{body}</body>\n</html>\n",
        drawing::escape(name)
    )
}

/// Text as a CSS string literal: quotes and backslashes escaped, and every
/// character that could end the style element or the string written as a
/// hex escape.
fn css_string(s: &str) -> String {
    let mut out = String::from("\"");
    for c in s.chars() {
        match c {
            '"' | '\\' | '<' | '>' | '&' => {
                let _ = std::fmt::Write::write_fmt(&mut out, format_args!("\\{:x} ", u32::from(c)));
            }
            c if c.is_control() => out.push(' '),
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

const CSS: &str = "body { font-family: Georgia, 'Times New Roman', serif; max-width: 52em; margin: 2em auto; padding: 0 1em; color: #111; line-height: 1.45; }
h1 { font-size: 1.6em; border-bottom: 2px solid #111; padding-bottom: .2em; }
h2 { font-size: 1.25em; border-bottom: 1px solid #999; margin-top: 1.8em; }
h3 { font-size: 1.05em; margin-top: 1.3em; }
h2, h3, h4 { break-after: avoid-page; page-break-after: avoid; }
h2 a.anchor, h3 a.anchor { display: none; }
table { border-collapse: collapse; margin: .6em 0 1em; font-size: .92em; max-width: 100%; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
th, td { border: 1px solid #888; padding: .25em .6em; vertical-align: top; overflow-wrap: anywhere; }
th { background: #eee; }
code { font-family: 'DejaVu Sans Mono', Menlo, monospace; font-size: .9em; }
li { margin: .15em 0; }
figure.drawing { margin: 1em 0; break-inside: avoid; page-break-inside: avoid; }
p:has(+ figure.drawing) { break-after: avoid-page; page-break-after: avoid; }
figure.drawing svg { max-width: 100%; height: auto; }
figcaption { font-size: .9em; font-style: italic; }
@media print { body { margin: 0; max-width: none; padding: 0; font-size: 10pt; } table { font-size: 8.5pt; } h2 { break-before: auto; } a { color: inherit; text-decoration: none; } }
";

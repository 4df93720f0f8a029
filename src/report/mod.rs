//! Output of solved calcs: display units and number formatting, the solve
//! tables, JSON.

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

/// A print-friendly, self-contained HTML page of a Markdown report; the
/// drawings the report links as `STEM.SUFFIX` are put inline in place of
/// their links.
#[must_use]
pub fn html(markdown: &str, title: &str, stem: &str, drawings: &[drawing::Drawing]) -> String {
    let mut options = comrak::Options::default();
    options.extension.table = true;
    options.extension.strikethrough = true;
    options.render.escape = true;
    let mut body = comrak::markdown_to_html(markdown, &options);
    for d in drawings {
        let img = format!("<img src=\"{}.{}\"", markdown::link_target(stem), d.suffix);
        let Some(at) = body.find(&img) else { continue };
        let start = body[..at].rfind("<p>").unwrap_or(at);
        let end = body[at..].find("</p>").map_or_else(
            || body[at..].find("/>").map_or(body.len(), |e| at + e + 2),
            |e| at + e + 4,
        );
        let figure = format!(
            "<figure class=\"drawing\">\n{}<figcaption>{}</figcaption>\n</figure>",
            d.svg,
            drawing::escape(&d.caption)
        );
        body.replace_range(start..end, &figure);
    }
    let title = title
        .replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;");
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>{title}</title>\n<style>\n{CSS}</style>\n</head>\n<body>\n{body}</body>\n</html>\n"
    )
}

const CSS: &str = "body { font-family: Georgia, 'Times New Roman', serif; max-width: 52em; margin: 2em auto; padding: 0 1em; color: #111; line-height: 1.45; }
h1 { font-size: 1.6em; border-bottom: 2px solid #111; padding-bottom: .2em; }
h2 { font-size: 1.25em; border-bottom: 1px solid #999; margin-top: 1.8em; }
h3 { font-size: 1.05em; margin-top: 1.3em; }
table { border-collapse: collapse; margin: .6em 0 1em; font-size: .92em; }
th, td { border: 1px solid #888; padding: .25em .6em; vertical-align: top; }
th { background: #eee; }
code { font-family: 'DejaVu Sans Mono', Menlo, monospace; font-size: .9em; }
li { margin: .15em 0; }
@media print { body { margin: 0; max-width: none; } h2 { page-break-after: avoid; } table { page-break-inside: avoid; } }
";

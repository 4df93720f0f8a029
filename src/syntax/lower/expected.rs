//! pest's errors in an engineer's words: what was expected, after what,
//! and a hint for a misspelled keyword.

#![allow(clippy::wildcard_imports)] // the lowering's shared imports and helpers

use super::*;

/// What the user is told a rule stands for.
pub(super) fn describe(rule: Rule) -> Option<&'static str> {
    Some(match rule {
        Rule::expr
        | Rule::term
        | Rule::power
        | Rule::unary
        | Rule::signed
        | Rule::quantity
        | Rule::paren
        | Rule::word
        | Rule::number
        | Rule::neg
        | Rule::arg => "a value",
        Rule::unit_expr | Rule::unit_name | Rule::unit_power => "a unit",
        Rule::field => "`.`",
        Rule::mul_op | Rule::add_op | Rule::unit_op => "an operator",
        Rule::eol | Rule::EOI => "the end of the line",
        Rule::name => "a name",
        Rule::string => "a quoted string",
        Rule::open => "`{`",
        Rule::close => "`}`",
        Rule::eq => "`=`",
        Rule::lparen | Rule::args => "`(`",
        Rule::rparen => "`)`",
        Rule::comma => "`,`",
        Rule::colon => "`:`",
        Rule::compare => "a comparison (`<=`, `<`, `>=`, `>`)",
        Rule::pair => "a pair `(x, y)`",
        Rule::axis => "`x`, `y` or `rotation`",
        Rule::sign => "`+` or `-`",
        Rule::combo_term => "a case name",
        Rule::case_flag => "`sustained`",
        Rule::check_each | Rule::kw_for => "`for`",
        Rule::kw_in => "`in`",
        Rule::check_under | Rule::kw_under => "`under`",
        Rule::check_state => "`short_term` or `long_term`",
        Rule::unit_system => "`us`, `si`",
        Rule::kw_at => "`at`",
        Rule::entry => "a `key = value` line",
        Rule::calc_decl
        | Rule::let_decl
        | Rule::material_decl
        | Rule::node_decl
        | Rule::fix_decl
        | Rule::pin_decl
        | Rule::part_decl
        | Rule::beam_decl
        | Rule::rigid_decl
        | Rule::tie_decl
        | Rule::case_decl
        | Rule::combine_decl
        | Rule::check_decl
        | Rule::group_decl
        | Rule::units_decl
        | Rule::statement
        | Rule::kw_calc
        | Rule::kw_let
        | Rule::kw_material
        | Rule::kw_node
        | Rule::kw_fix
        | Rule::kw_part
        | Rule::kw_beam
        | Rule::kw_pin
        | Rule::kw_rigid
        | Rule::kw_tie
        | Rule::kw_case
        | Rule::kw_combine
        | Rule::kw_check
        | Rule::kw_group
        | Rule::kw_units => "a declaration (`let`, `material`, `node`, `part`, `case`, ...)",
        Rule::load_stmt
        | Rule::moment_stmt
        | Rule::temperature_stmt
        | Rule::strain_stmt
        | Rule::settle_stmt
        | Rule::kw_load
        | Rule::kw_moment
        | Rule::kw_temperature
        | Rule::kw_strain
        | Rule::kw_settle => {
            "a case statement (`load`, `moment`, `temperature`, `strain`, `settle`)"
        }
        _ => return None,
    })
}

pub(super) fn join_or(words: &[&str]) -> String {
    match words {
        [] => "something else".into(),
        [one] => (*one).to_string(),
        [init @ .., last] => format!("{} or {last}", init.join(", ")),
    }
}

/// The word or symbol that starts at `pos`, for "found ..." labels.
pub(super) fn token_at(text: &str, pos: usize) -> String {
    let rest = text.get(pos..).unwrap_or("");
    let Some(c) = rest.chars().next() else {
        return "end of file".into();
    };
    if c == '\n' || c == '\r' {
        return "end of line".into();
    }
    let word: String = if c.is_ascii_alphanumeric() || c == '_' || c == '.' {
        rest.chars()
            .take_while(|c| c.is_ascii_alphanumeric() || *c == '_' || *c == '.')
            .collect()
    } else {
        c.to_string()
    };
    format!("found `{word}`")
}

/// A hint for a word an engineer may start a statement with that is not
/// one of tandem's keywords: the keyword that says it.
pub(super) fn keyword_hint(word: &str) -> Option<String> {
    let w = word.to_ascii_lowercase();
    match w.as_str() {
        "support" | "supports" | "fixed" | "fixity" | "restrain" | "restraint" | "anchor"
        | "pinned" | "roller" | "bc" => Some(
            "supports are written `fix NODE` (every direction), or in a plane model `fix NODE x` or `fix NODE y` (a roller), `pin NODE` (held in x and y, free to rotate)".into(),
        ),
        "temp" | "temps" | "dt" | "delta_t" | "thermal" | "heat" => Some(
            "a temperature change is written `temperature = 20 degC` (every part) or `temperature PART = 20 degC`".into(),
        ),
        "force" | "point_load" | "loads" => {
            Some("a load is written `load NODE = -10 kN` (or `(FX, FY)` in a plane)".into())
        }
        _ => {
            const KEYWORDS: &[&str] = &[
                "let", "material", "node", "part", "case", "combine", "check", "fix", "tie",
                "rigid", "units", "calc", "load", "temperature", "strain", "settle", "beam",
                "pin", "moment",
            ];
            crate::words::did_you_mean(&w, KEYWORDS.iter().copied())
        }
    }
}

/// The token just before `pos` on the same line, for "after ...".
pub(super) fn token_before(text: &str, pos: usize) -> String {
    let head = text.get(..pos).unwrap_or("");
    let line = head.rsplit('\n').next().unwrap_or("");
    let line = line.split('#').next().unwrap_or("").trim_end();
    let word: String = line
        .chars()
        .rev()
        .take_while(|c| !c.is_whitespace())
        .collect::<Vec<_>>()
        .into_iter()
        .rev()
        .collect();
    if word.is_empty() {
        String::new()
    } else {
        format!(" after `{word}`")
    }
}

pub(super) fn from_pest(e: &pest::error::Error<Rule>, text: &str, base: usize) -> SyntaxError {
    let pos = base
        + match e.location {
            pest::error::InputLocation::Pos(p) => p,
            pest::error::InputLocation::Span((s, _)) => s,
        };
    let mut words: Vec<&str> = Vec::new();
    if let pest::error::ErrorVariant::ParsingError { positives, .. } = &e.variant {
        for r in positives {
            if let Some(w) = describe(*r) {
                if !words.contains(&w) {
                    words.push(w);
                }
            }
        }
    }
    // Order from the most to the least specific for a readable message.
    let rank = |w: &str| match w {
        "a unit" => 0,
        "an operator" => 1,
        "the end of the line" => 9,
        "the end of the file" => 10,
        _ => 5,
    };
    words.sort_by_key(|w| rank(w));
    let line_start = text
        .get(..pos)
        .unwrap_or("")
        .rsplit('\n')
        .next()
        .is_some_and(|l| l.trim().is_empty());
    if line_start {
        words.retain(|w| *w != "the end of the line");
    }
    if words.contains(&"the end of the line") {
        words.retain(|w| *w != "the end of the file");
    }
    let found = token_at(text, pos);
    let help = if found.starts_with("found `") && words.contains(&"a unit") {
        Some(
            "units are written after the number, e.g. `29000 ksi`; `tandem units` lists them"
                .into(),
        )
    } else if let Some(h) = (line_start || words.iter().any(|w| w.starts_with("a case statement")))
        .then(|| keyword_hint(found.trim_start_matches("found `").trim_end_matches('`')))
        .flatten()
    {
        Some(h)
    } else if words.iter().any(|w| w.starts_with("a declaration")) {
        Some("each line starts with a keyword such as `let`, `material`, `node`, `part`, `case`, `combine` or `check`".into())
    } else {
        None
    };
    let end = (pos + found.len().saturating_sub(9).max(1)).min(text.len());
    let end = if text.is_char_boundary(end) { end } else { pos };
    SyntaxError::Expected {
        expected: join_or(&words),
        after: token_before(text, pos),
        span: Span::new(pos, end.max(pos)),
        found,
        help,
    }
}

//! The model errors whose help depends on what went wrong: one table per
//! kind (missing keys, key conflicts, limits, ...), so that every wording
//! stays in the model's error files and call sites pass only their data.

use super::error::ModelError;
use crate::source::Span;

impl ModelError {
    /// A file without any of `what` (`nodes`, `parts`).
    #[must_use]
    pub fn empty(what: &'static str, span: Span) -> Self {
        let help = match what {
            "nodes" => Some("declare the points parts connect, e.g. `node base at 0 ft`"),
            "parts" => Some("declare the parts that share the load with `part NAME { ... }`"),
            _ => None,
        };
        ModelError::Empty { what, span, help }
    }

    /// More of `what` than a file may have.
    #[must_use]
    pub fn too_many(what: &'static str, count: usize, limit: usize, span: Span) -> Self {
        let help = match what {
            "declarations" => Some("split the calc into smaller files"),
            "characters in a name" => Some(
                "use a shorter name; the title block and comments can carry a longer description",
            ),
            _ => None,
        };
        ModelError::TooMany {
            what,
            count,
            limit,
            span,
            help,
        }
    }

    /// Two keys of a block that exclude each other, with which to keep.
    #[must_use]
    pub fn conflict(key: &str, other: &'static str, block: String, span: Span) -> Self {
        let help = match (key, other) {
            (_, "stiffness") => {
                Some("a spring takes `stiffness` alone; a member takes `material` and `area`")
            }
            ("section", "area") => Some("`section` gives the area; drop `area`"),
            ("buckling_length", "buckling_factor") => Some(
                "give the effective length K·L as `buckling_length`, or K alone as `buckling_factor`",
            ),
            _ => None,
        };
        ModelError::Conflict {
            key: key.to_string(),
            other: other.to_string(),
            block,
            span,
            help: help.map(str::to_string),
        }
    }

    /// A title-block value that is not a quoted string.
    #[must_use]
    pub fn title_not_string(key: &str, span: Span) -> Self {
        ModelError::Expected {
            expected: format!("a quoted string for `{key}`"),
            span,
            found: "not a string".into(),
            help: Some(format!("write `{key} = \"...\"`")),
        }
    }

    /// `ends` that are not two nodes.
    #[must_use]
    pub fn ends_count(count: usize, span: Span) -> Self {
        ModelError::Expected {
            expected: "two nodes for `ends`".into(),
            span,
            found: format!("{count} node(s)"),
            help: Some("write `ends = bottom, top`".into()),
        }
    }

    /// A unit's name where a declared name is expected (`ends = m, b`).
    #[must_use]
    pub fn unit_as_name(unit: &str, span: Span) -> Self {
        ModelError::Expected {
            expected: "a name".into(),
            span,
            found: format!("`{unit}`, which is a unit"),
            help: Some(
                "unit names cannot name nodes, parts or materials; \
                 rename the declaration and its uses (e.g. `m_1`)"
                    .into(),
            ),
        }
    }

    /// A negative creep coefficient.
    #[must_use]
    pub fn negative_creep(what: String, value: f64, span: Span) -> Self {
        ModelError::NotPositive {
            what,
            value: format!("{value}"),
            span,
            help: Some("a creep coefficient is zero or more, typically 1.5 to 3".into()),
        }
    }

    /// A modulus of elasticity that is zero or less.
    #[must_use]
    pub fn modulus_not_positive(what: String, span: Span) -> Self {
        ModelError::NotPositive {
            what,
            value: "zero or less".into(),
            span,
            help: Some("the modulus of elasticity is a positive pressure".into()),
        }
    }

    /// A block without a key it needs, with how to give that key.
    #[must_use]
    pub fn missing_key(block: String, key: &'static str, span: Span) -> Self {
        let help = match key {
            "E" => Some("give the modulus of elasticity, e.g. `E = 29000 ksi`"),
            "nodes" => Some("list the nodes that move together, e.g. `nodes = a, b, c`"),
            "ends" => Some("give the two nodes it spans, e.g. `ends = base, cap`"),
            "material" => Some(
                "name a declared material, e.g. `material = steel`, or give `stiffness` for a spring",
            ),
            "area" => {
                Some("give `area = 11.9 in^2`, `area = circle(d = 10 in)` or `section = ...`")
            }
            "inertia" => Some(
                "a buckling check needs a second moment: give `section = ring(...)` or `inertia = ...`",
            ),
            _ => None,
        };
        ModelError::MissingKey {
            block,
            key,
            span,
            help: help.map(str::to_string),
        }
    }
}

//! Every warning about a result that stands but needs the engineer's care,
//! worded once. A warning carries its data; the Markdown, the text tables
//! and the JSON all use [`Warning`]'s sentence, and the JSON adds its code
//! and raw values.

use std::fmt;

use serde::Serialize;

use crate::words::number;

/// A warning, with the values it is about.
#[derive(Clone, Debug, PartialEq, Serialize, schemars::JsonSchema)]
#[serde(tag = "code", rename_all = "snake_case")]
pub enum Warning {
    /// Part stiffnesses so far apart that the solve may lose precision.
    StiffnessSpread {
        /// The largest part stiffness over the smallest.
        ratio: f64,
    },
    /// A part or parallel group above its slenderness limit.
    Slender {
        /// "part `strut`" or "the parallel group `core` + `shell`".
        what: String,
        /// K·L / r.
        slenderness: f64,
        limit: f64,
    },
    /// A part stressed beyond its yield strength in a combination, where the
    /// elastic results no longer hold.
    BeyondYield {
        combination: String,
        part: String,
        /// Stress over yield strength.
        ratio: f64,
    },
}

impl Warning {
    /// The machine-readable code (as in the JSON).
    pub fn code(&self) -> &'static str {
        match self {
            Warning::StiffnessSpread { .. } => "stiffness_spread",
            Warning::Slender { .. } => "slender",
            Warning::BeyondYield { .. } => "beyond_yield",
        }
    }
}

impl fmt::Display for Warning {
    /// The sentence, without a final stop.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Warning::StiffnessSpread { ratio } => write!(
                f,
                "part stiffnesses differ by a factor of {ratio:.1e}; results may lose precision"
            ),
            Warning::Slender {
                what,
                slenderness,
                limit,
            } => write!(
                f,
                "{what} has KL/r = {} above the limit {}",
                number(*slenderness, 4),
                number(*limit, 4)
            ),
            Warning::BeyondYield {
                combination,
                part,
                ratio,
            } => write!(
                f,
                "in combination `{combination}` part `{part}` is stressed to {} × its yield strength; elastic results are not valid beyond yield",
                number(*ratio, 3)
            ),
        }
    }
}

/// A warning in the JSON: its code and values, and its sentence.
#[derive(Serialize, schemars::JsonSchema)]
pub struct Json {
    #[serde(flatten)]
    pub warning: Warning,
    pub message: String,
}

impl From<Warning> for Json {
    fn from(warning: Warning) -> Self {
        Json {
            message: warning.to_string(),
            warning,
        }
    }
}

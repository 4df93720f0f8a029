//! The one table of results a check, a sweep's `--show` and the report can
//! name: each field of a part or a node, with its dimension. Checks read
//! the values (`checks::ResultScope`); a name not in this table is refused
//! with the list of those that are.

use super::Kind;
use crate::units::Dimension;

/// A part's results: `rod.force`, `rod.stress`, ...
pub const PART_RESULTS: &[(&str, Dimension)] = &[
    ("force", Dimension::FORCE),
    ("stress", Dimension::PRESSURE),
    ("strain", Dimension::NONE),
    ("elongation", Dimension::LENGTH),
    ("length", Dimension::LENGTH),
    ("euler_load", Dimension::FORCE),
    ("slenderness", Dimension::NONE),
];

/// A beam's results beyond a part's ([`PART_RESULTS`]): its bending
/// (moments positive where the fibre on the beam's right-hand side, looking
/// from end A to B, is in tension: sagging for a beam drawn left to right).
pub const BENDING_RESULTS: &[(&str, Dimension)] = &[
    ("moment_a", Dimension::MOMENT),
    ("moment_b", Dimension::MOMENT),
    ("moment", Dimension::MOMENT),
    ("shear", Dimension::FORCE),
    ("deflection", Dimension::LENGTH),
];

/// A node's results in an axial model.
pub const AXIAL_NODE_RESULTS: &[(&str, Dimension)] = &[
    ("displacement", Dimension::LENGTH),
    ("reaction", Dimension::FORCE),
];

/// A node's results in a plane model.
pub const PLANE_NODE_RESULTS: &[(&str, Dimension)] = &[
    ("dx", Dimension::LENGTH),
    ("dy", Dimension::LENGTH),
    ("rx", Dimension::FORCE),
    ("ry", Dimension::FORCE),
    ("rotation", Dimension::NONE),
    ("mz", Dimension::MOMENT),
];

/// A node's results in a model of this kind.
#[must_use]
pub fn node_results(kind: Kind) -> &'static [(&'static str, Dimension)] {
    match kind {
        Kind::Axial => AXIAL_NODE_RESULTS,
        Kind::Plane => PLANE_NODE_RESULTS,
    }
}

/// Whether `field` is a result of a part.
#[must_use]
pub fn is_part_result(field: &str) -> bool {
    PART_RESULTS.iter().any(|(n, _)| *n == field)
}

/// Whether `field` is a result only a beam has (its bending).
#[must_use]
pub fn is_beam_result(field: &str) -> bool {
    BENDING_RESULTS.iter().any(|(n, _)| *n == field)
}

/// Whether `field` is a result of a node in a model of this kind.
#[must_use]
pub fn is_node_result(kind: Kind, field: &str) -> bool {
    node_results(kind).iter().any(|(n, _)| *n == field)
}

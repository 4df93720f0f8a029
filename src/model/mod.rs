//! Names resolved, expressions evaluated, dimensions checked: the typed
//! [`Model`] the solver works on. [`build`] collects every error in a file
//! rather than stopping at the first.

mod build;
mod error;
mod error_help;
pub mod eval;
pub mod functions;
pub mod range;
pub mod results;

pub use build::{block_keys, build, build_with, reaches, solver_depends_on, Limits, Rebuild};
pub use error::ModelError;

use uom::si::f64::{
    Area, Force, Length, Pressure, Ratio, TemperatureCoefficient, TemperatureInterval,
};

use crate::source::Span;
pub use crate::syntax::ast::State;
use crate::syntax::ast::{Compare, Expr};
use crate::units::Quantity;

/// Axial stiffness (force per length). uom files this dimension under
/// surface tension; the alias gives it the engineer's name.
pub type Stiffness = uom::si::f64::SurfaceTension;

/// One displacement per node along an axis, or two per node in a plane.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    Axial,
    Plane,
}

impl Kind {
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            Kind::Axial => "axial",
            Kind::Plane => "plane",
        }
    }

    /// Displacement components per node.
    #[must_use]
    pub fn dofs(self) -> usize {
        match self {
            Kind::Axial => 1,
            Kind::Plane => 2,
        }
    }
}

/// The `calc { }` title block.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Title {
    /// `(key, value)` in the order the keys are shown.
    pub fields: Vec<(&'static str, String)>,
}

impl Title {
    /// The keys a title block may hold, in report order.
    pub const KEYS: &'static [&'static str] = &[
        "title",
        "project",
        "number",
        "revision",
        "by",
        "checked",
        "approved",
        "date",
        "checked_date",
        "approved_date",
        "basis",
    ];

    /// The keys the signature block shows rather than the title table.
    pub const SIGNATURES: &'static [(&'static str, &'static str, &'static str)] = &[
        ("Prepared", "by", "date"),
        ("Checked", "checked", "checked_date"),
        ("Approved", "approved", "approved_date"),
    ];

    #[must_use]
    pub fn get(&self, key: &str) -> Option<&str> {
        self.fields
            .iter()
            .find(|(k, _)| *k == key)
            .map(|(_, v)| v.as_str())
    }
}

/// A `let` with its evaluated value.
#[derive(Clone, Debug, PartialEq)]
pub struct LetValue {
    pub name: String,
    pub value: Quantity,
    pub expr: Expr,
    /// Published formulas the value comes from (directly or through other lets).
    pub sources: Vec<&'static str>,
    pub span: Span,
}

/// A material law.
#[derive(Clone, Debug, PartialEq)]
pub struct Material {
    pub name: String,
    pub e: Pressure,
    pub alpha: Option<TemperatureCoefficient>,
    pub yield_strength: Option<Pressure>,
    pub yield_compression: Option<Pressure>,
    pub allowable: Option<Pressure>,
    pub allowable_tension: Option<Pressure>,
    pub allowable_compression: Option<Pressure>,
    pub creep: Option<f64>,
    /// Published formulas `E` comes from.
    pub e_sources: Vec<&'static str>,
    /// The keys written as expressions of other names, with their
    /// expressions (the report shows them substituted).
    pub derived: Vec<(&'static str, Expr)>,
    pub span: Span,
}

/// A node and its supports.
#[derive(Clone, Debug, PartialEq)]
pub struct Node {
    pub name: compact_str::CompactString,
    pub x: Length,
    /// Zero in axial models.
    pub y: Length,
    /// Fixed directions: `[x, y]` (axial models use `x` only).
    pub fixed: [bool; 2],
    /// Held against rotation (`fix NODE` or `fix NODE rotation`): matters
    /// where a beam end is rigidly joined to the node.
    pub fixed_rotation: bool,
    pub span: Span,
}

/// Which sense of force a part can carry.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Carries {
    Both,
    Tension,
    Compression,
}

impl Carries {
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            Carries::Both => "both",
            Carries::Tension => "tension",
            Carries::Compression => "compression",
        }
    }
}

/// How a part resists elongation.
#[derive(Clone, Debug, PartialEq)]
pub enum Law {
    /// A member of a material and cross-section: k = E A / L.
    Member {
        material: usize,
        area: Area,
        /// Smaller principal second moment (m⁴) when a section or `inertia` gives it.
        inertia: Option<f64>,
        section: Option<&'static str>,
    },
    /// A spring of given stiffness.
    Spring { stiffness: Stiffness },
}

/// How a beam bends (plane models).
#[derive(Clone, Debug, PartialEq)]
pub struct Bend {
    /// Second moment of area about the axis it bends about (m⁴).
    pub inertia: f64,
    /// Extreme-fibre distance from that axis (m), for the fibre stress.
    pub fibre: f64,
    /// Ends that carry no moment (`hinge`), `[a, b]`.
    pub hinge: [bool; 2],
}

/// An axial part between two nodes.
#[derive(Clone, Debug, PartialEq)]
pub struct Part {
    pub name: compact_str::CompactString,
    /// Elongation is measured from `ends[0]` to `ends[1]` (along the unit
    /// vector from the first to the second; in an axial model ±1 by their
    /// order on the axis).
    pub ends: [usize; 2],
    pub law: Law,
    pub length: Length,
    pub misfit: Length,
    pub carries: Carries,
    pub slack: Length,
    pub buckling_length: Option<Length>,
    /// Slenderness KL/r above which a warning is given.
    pub slenderness_limit: f64,
    /// Fraction of the Euler load above which a compression warning is given.
    pub euler_fraction: f64,
    /// A beam's bending (`None`: a pin-ended part).
    pub bend: Option<Bend>,
    pub span: Span,
}

impl Part {
    /// Axial stiffness k = E A / L (or the spring's).
    #[must_use]
    pub fn stiffness(&self, materials: &[Material]) -> Stiffness {
        match &self.law {
            Law::Member { material, area, .. } => {
                // E·A/L is a force per length; uom files that under another
                // kind, so the value is carried over explicitly.
                let k = materials[*material].e * *area / self.length;
                Stiffness::new::<uom::si::surface_tension::newton_per_meter>(k.value)
            }
            Law::Spring { stiffness } => *stiffness,
        }
    }

    /// The area, for members.
    #[must_use]
    pub fn area(&self) -> Option<Area> {
        match &self.law {
            Law::Member { area, .. } => Some(*area),
            Law::Spring { .. } => None,
        }
    }

    /// Smaller principal second moment (m⁴), for members that give one.
    #[must_use]
    pub fn inertia(&self) -> Option<f64> {
        match &self.law {
            Law::Member { inertia, .. } => *inertia,
            Law::Spring { .. } => None,
        }
    }

    /// The material index, for members.
    #[must_use]
    pub fn material(&self) -> Option<usize> {
        match &self.law {
            Law::Member { material, .. } => Some(*material),
            Law::Spring { .. } => None,
        }
    }
}

/// A set of nodes that move as one rigid body.
#[derive(Clone, Debug, PartialEq)]
pub struct Rigid {
    pub name: String,
    pub nodes: Vec<usize>,
    pub span: Span,
}

/// Nodes that move together (`tie`).
#[derive(Clone, Debug, PartialEq)]
pub struct Tie {
    pub nodes: Vec<usize>,
    pub span: Span,
}

/// A nodal load.
#[derive(Clone, Debug, PartialEq)]
pub struct Load {
    pub node: usize,
    /// `[x, y]`; axial models use `x`.
    pub force: [Force; 2],
    pub span: Span,
}

/// A prescribed support movement.
#[derive(Clone, Debug, PartialEq)]
pub struct Settlement {
    pub node: usize,
    /// 0 for x (or the axis), 1 for y.
    pub direction: usize,
    pub movement: Length,
    pub span: Span,
}

/// A moment applied at a node (N·m, counter-clockwise positive).
#[derive(Clone, Debug, PartialEq)]
pub struct NodeMoment {
    pub node: usize,
    pub moment: f64,
    pub span: Span,
}

/// A uniform load along a beam: force per unit length of the beam itself,
/// global `[x, y]` components (N/m).
#[derive(Clone, Debug, PartialEq)]
pub struct Distributed {
    pub part: usize,
    pub w: [f64; 2],
    pub span: Span,
}

/// A prescribed rotation of a node held against rotation (rad).
#[derive(Clone, Debug, PartialEq)]
pub struct Twist {
    pub node: usize,
    pub angle: f64,
    pub span: Span,
}

/// A temperature change acting on one part or (with `part: None`) all.
#[derive(Clone, Debug, PartialEq)]
pub struct Temperature {
    pub part: Option<usize>,
    pub change: TemperatureInterval,
    pub span: Span,
}

/// A free strain (shrinkage, swelling) on one part.
#[derive(Clone, Debug, PartialEq)]
pub struct FreeStrain {
    pub part: usize,
    pub strain: Ratio,
    pub span: Span,
}

/// A load case.
#[derive(Clone, Debug, PartialEq)]
pub struct Case {
    pub name: String,
    pub sustained: bool,
    pub loads: Vec<Load>,
    pub temperatures: Vec<Temperature>,
    pub strains: Vec<FreeStrain>,
    pub settlements: Vec<Settlement>,
    pub moments: Vec<NodeMoment>,
    pub distributed: Vec<Distributed>,
    pub twists: Vec<Twist>,
    pub span: Span,
}

impl Case {
    /// The temperature change acting on each of `parts` parts: its own (the
    /// first written for it), else the case's change for every part. One
    /// pass over the case's statements, so that a case with a change for
    /// each of a million parts stays linear.
    #[must_use]
    pub fn temperature_by_part(&self, parts: usize) -> Vec<Option<&Temperature>> {
        let global = self.temperatures.iter().find(|t| t.part.is_none());
        let mut out = vec![global; parts];
        let mut own = vec![false; parts];
        for t in &self.temperatures {
            if let Some(i) = t.part {
                if !own[i] {
                    own[i] = true;
                    out[i] = Some(t);
                }
            }
        }
        out
    }

    /// The free strain on each of `parts` parts (the first written for it).
    #[must_use]
    pub fn strain_by_part(&self, parts: usize) -> Vec<Option<&FreeStrain>> {
        let mut out = vec![None; parts];
        for s in &self.strains {
            if out[s.part].is_none() {
                out[s.part] = Some(s);
            }
        }
        out
    }
}

/// A load combination: factored cases, solved directly.
#[derive(Clone, Debug, PartialEq)]
pub struct Combination {
    pub name: String,
    /// `(case index, factor)`.
    pub terms: Vec<(usize, f64)>,
    /// False when made from a lone case because the file has no `combine`.
    pub declared: bool,
    pub span: Span,
}

/// A design check, evaluated after solving.
#[derive(Clone, Debug, PartialEq)]
pub struct Check {
    pub label: Label,
    pub lhs: Expr,
    pub op: Compare,
    pub rhs: Expr,
    pub span: Span,
    /// Where it applies (`under ...`).
    pub applies: Applies,
    /// `(x, member)` for one check of a `for x in GROUP`.
    pub member: Option<(String, String)>,
}

/// A check's label, shared by the check and its outcomes (made once, not
/// once per combination and evaluation).
pub type Label = std::sync::Arc<str>;

/// Where a check applies: some combinations (all when `None`) and one
/// state (both when `None`).
#[derive(Clone, Debug, PartialEq, Default)]
pub struct Applies {
    pub combinations: Option<Vec<usize>>,
    pub state: Option<State>,
}

impl Applies {
    /// Whether the check is evaluated in combination `k` (a model
    /// combination index), in the long-term state or the short-term one.
    #[must_use]
    pub fn to(&self, k: usize, long_term: bool) -> bool {
        let state = match self.state {
            None => true,
            Some(State::Short) => !long_term,
            Some(State::Long) => long_term,
        };
        state && self.combinations.as_ref().is_none_or(|c| c.contains(&k))
    }

    /// "all combinations", "`service`, long term", for reports.
    #[must_use]
    pub fn describe(&self, model: &Model) -> String {
        let combos = match &self.combinations {
            None => "every combination".to_string(),
            Some(list) => list
                .iter()
                .map(|&k| format!("`{}`", model.combinations[k].name))
                .collect::<Vec<_>>()
                .join(", "),
        };
        match self.state {
            None => combos,
            Some(State::Short) => format!("{combos}, short term"),
            Some(State::Long) => format!("{combos}, long term"),
        }
    }
}

/// Display units chosen by `units`.
#[derive(Clone, Debug, PartialEq, Default)]
pub enum UnitChoice {
    /// Decide from the units the file uses most.
    #[default]
    Auto,
    Us,
    Si,
    /// An explicit list of unit expressions (as written), one per dimension.
    List(Vec<(String, Quantity)>),
}

/// The checked model of one calc file.
#[derive(Clone, Debug, PartialEq)]
pub struct Model {
    pub title: Title,
    pub kind: Kind,
    pub lets: Vec<LetValue>,
    pub materials: Vec<Material>,
    pub nodes: Vec<Node>,
    pub parts: Vec<Part>,
    pub rigids: Vec<Rigid>,
    pub ties: Vec<Tie>,
    pub cases: Vec<Case>,
    pub combinations: Vec<Combination>,
    pub checks: Vec<Check>,
    pub units: UnitChoice,
    /// How often each unit name is written in the file (for display defaults).
    pub unit_usage: Vec<(String, usize)>,
}

impl Model {
    /// The value of a `let`, by a scan of the lets: for a single lookup
    /// (checks use `checks::Refs`, built once).
    #[must_use]
    pub fn let_value(&self, name: &str) -> Option<Quantity> {
        self.lets.iter().find(|l| l.name == name).map(|l| l.value)
    }

    /// Unit vector from a part's end A to end B (`[1, 0]` in axial models).
    #[must_use]
    pub fn direction(&self, part: usize) -> [f64; 2] {
        let p = &self.parts[part];
        let (a, b) = (&self.nodes[p.ends[0]], &self.nodes[p.ends[1]]);
        match self.kind {
            // along the axis from A to B; a spring between coincident nodes
            // measures u(B) − u(A)
            Kind::Axial => [if b.x < a.x { -1.0 } else { 1.0 }, 0.0],
            Kind::Plane => {
                let (dx, dy) = ((b.x - a.x).value, (b.y - a.y).value);
                let l = dx.hypot(dy);
                [dx / l, dy / l]
            }
        }
    }

    /// True when some part carries one sense only or has a gap, so that
    /// its response is not linear.
    #[must_use]
    pub fn has_nonlinear_parts(&self) -> bool {
        self.parts
            .iter()
            .any(|p| p.carries != Carries::Both || p.slack.value > 0.0)
    }

    /// True when some member bends (a `beam`) or some case applies a
    /// moment, a distributed load or a rotation.
    #[must_use]
    pub fn has_bending(&self) -> bool {
        self.parts.iter().any(|p| p.bend.is_some())
            || self
                .cases
                .iter()
                .any(|c| !c.moments.is_empty() || !c.distributed.is_empty() || !c.twists.is_empty())
    }

    /// For each node, whether it has a rotation: some beam end is rigidly
    /// joined to it (not through a `hinge`).
    #[must_use]
    pub fn rotating_nodes(&self) -> Vec<bool> {
        rotating_nodes(&self.parts, self.nodes.len())
    }

    /// A node by name, by a scan: for a single lookup, not in a loop.
    #[must_use]
    pub fn node_index(&self, name: &str) -> Option<usize> {
        self.nodes.iter().position(|n| n.name == name)
    }

    /// A part by name, by a scan: for a single lookup, not in a loop.
    #[must_use]
    pub fn part_index(&self, name: &str) -> Option<usize> {
        self.parts.iter().position(|p| p.name == name)
    }
}

pub(crate) use crate::words::did_you_mean;

/// For each of `nodes` nodes, whether some beam end of `parts` is rigidly
/// joined to it (not through a `hinge`), so that it turns.
pub(crate) fn rotating_nodes(parts: &[Part], nodes: usize) -> Vec<bool> {
    let mut has = vec![false; nodes];
    for p in parts {
        if let Some(b) = &p.bend {
            for k in 0..2 {
                if !b.hinge[k] {
                    has[p.ends[k]] = true;
                }
            }
        }
    }
    has
}

/// Names a check may use for the load factors of its combination's
/// capacity path: λ at first yield and at the plastic limit.
pub const LOAD_FACTORS: &[&str] = &["yield_factor", "limit_factor"];

/// `2 parts, 1 node, ...`
#[must_use]
pub fn counts(items: &[(usize, &str)]) -> String {
    items
        .iter()
        .map(|(n, w)| plural(*n, w))
        .collect::<Vec<_>>()
        .join(", ")
}

fn plural(n: usize, word: &str) -> String {
    if n == 1 {
        format!("{n} {word}")
    } else {
        format!("{n} {word}s")
    }
}

/// A one-line description: model kind and counts.
#[must_use]
pub fn summary(m: &Model) -> String {
    let mut s = format!(
        "{} model, {}, {}, {}, {}",
        m.kind.name(),
        plural(m.materials.len(), "material"),
        plural(m.parts.len(), "part"),
        plural(m.nodes.len(), "node"),
        plural(m.combinations.len(), "combination"),
    );
    if !m.checks.is_empty() {
        s.push_str(&format!(", {}", plural(m.checks.len(), "check")));
    }
    s
}

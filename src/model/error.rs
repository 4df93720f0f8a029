//! Every error the model builder can report, worded in one place.

use miette::Diagnostic;
use thiserror::Error;

use crate::source::Span;

/// A problem with the meaning of a calc file: names, units, structure.
#[derive(Debug, Error, Diagnostic, Clone, PartialEq)]
pub enum ModelError {
    #[error("{what} must be {expected}, found {found}")]
    #[diagnostic(code(tandem::units::mismatch))]
    WrongDimension {
        what: String,
        expected: String,
        found: String,
        #[label("this is {found}")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("cannot {op} {left} and {right}")]
    #[diagnostic(
        code(tandem::units::arithmetic),
        help("both sides must have one dimension; check the units")
    )]
    Incompatible {
        op: &'static str,
        left: String,
        right: String,
        #[label("{left} {op_word} {right}")]
        span: Span,
        op_word: &'static str,
    },

    #[error("{message}")]
    #[diagnostic(code(tandem::units::power))]
    BadPower {
        message: String,
        #[label("here")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("{what} is not a finite number: {reason}")]
    #[diagnostic(code(tandem::number), help("check the values this expression uses"))]
    NotFinite {
        what: String,
        reason: String,
        #[label("{reason}")]
        span: Span,
    },

    #[error("{what} is {why}: {value}")]
    #[diagnostic(code(tandem::number::range))]
    OutOfRange {
        what: String,
        why: &'static str,
        value: String,
        #[label("{why}")]
        span: Span,
        #[help]
        help: String,
    },

    #[error("unknown {kind} `{name}`")]
    #[diagnostic(code(tandem::name::unknown))]
    UnknownName {
        kind: &'static str,
        name: String,
        #[label("not declared")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("`{name}` is a {found}, not a {expected}")]
    #[diagnostic(code(tandem::name::kind))]
    WrongKind {
        name: String,
        found: &'static str,
        expected: &'static str,
        #[label("expected a {expected} here")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("`{name}` is declared twice")]
    #[diagnostic(
        code(tandem::name::duplicate),
        help("a name is declared once in a file; rename one of them")
    )]
    Duplicate {
        name: String,
        #[label("declared again here")]
        span: Span,
        #[label("first declared here")]
        first: Span,
    },

    #[error("`{name}` is {what} and cannot be declared")]
    #[diagnostic(
        code(tandem::name::reserved),
        help("choose another name, e.g. `{name}_1`")
    )]
    Reserved {
        name: String,
        what: &'static str,
        #[label("reserved name")]
        span: Span,
    },

    #[error("{block} needs `{key}`")]
    #[diagnostic(code(tandem::key::missing))]
    MissingKey {
        block: String,
        key: &'static str,
        #[label("`{key}` missing in this block")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("unknown key `{key}` in {block}")]
    #[diagnostic(code(tandem::key::unknown))]
    UnknownKey {
        key: String,
        block: String,
        #[label("not a key of {block}")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("`{key}` is given twice in {block}")]
    #[diagnostic(code(tandem::key::duplicate), help("keep one of them"))]
    DuplicateKey {
        key: String,
        block: String,
        #[label("given again here")]
        span: Span,
        #[label("first given here")]
        first: Span,
    },

    #[error("`{key}` and `{other}` cannot both be given in {block}")]
    #[diagnostic(code(tandem::key::conflict))]
    Conflict {
        key: String,
        other: String,
        block: String,
        #[label("remove this or `{other}`")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("expected {expected}")]
    #[diagnostic(code(tandem::value))]
    Expected {
        expected: String,
        #[label("{found}")]
        span: Span,
        found: String,
        #[help]
        help: Option<String>,
    },

    #[error("this is a {this} model position, but the model is {first}")]
    #[diagnostic(
        code(tandem::model::mixed),
        help("a file is either axial (`at 14 ft`) or plane (`at (3 ft, 10 ft)`); write every node the same way")
    )]
    MixedModel {
        this: &'static str,
        first: &'static str,
        #[label("{this}")]
        span: Span,
        #[label("this node made the model {first}")]
        first_span: Span,
    },

    #[error("an axial model has one direction; `{statement}` takes no `x` or `y`")]
    #[diagnostic(
        code(tandem::model::plane_only),
        help("write `{statement} {node}{example}`")
    )]
    AxialDirection {
        /// `fix` or `settle`.
        statement: &'static str,
        node: String,
        /// What follows the node in the example (` = -0.1 in` for `settle`).
        example: &'static str,
        #[label("here")]
        span: Span,
    },

    #[error("{what} needs a plane model: an axial model has no bending and no rotation")]
    #[diagnostic(
        code(tandem::model::plane_only),
        help("give the nodes positions as pairs, `node a at (0 m, 0 m)`; in an axial model hold a node with `fix NODE` and join nodes with `part`")
    )]
    BendingInAxial {
        /// "`beam deck`", "a `moment`", "`pin`".
        what: String,
        #[label("here")]
        span: Span,
    },

    #[error("beam `{beam}` needs a second moment of area and its depth")]
    #[diagnostic(
        code(tandem::model::beam_bending),
        help("give `section = rect(b = 100 mm, h = 300 mm)` (or another section helper), or `area`, `inertia` and `depth`")
    )]
    BeamBending {
        beam: String,
        #[label("this beam")]
        span: Span,
    },

    #[error("a hinge of beam `{beam}` must be at one of its ends; `{node}` is not")]
    #[diagnostic(
        code(tandem::model::hinge),
        help("write `hinge = {a}`, `hinge = {b}`, or both")
    )]
    HingeNotEnd {
        beam: String,
        node: String,
        a: String,
        b: String,
        #[label("not an end of `{beam}`")]
        span: Span,
    },

    #[error("{what} at `{node}` needs a beam rigidly joined there")]
    #[diagnostic(
        code(tandem::model::no_rotation),
        help("only a node a beam frames into without a hinge turns and carries a moment; join a beam at `{node}`, or load the node with a force")
    )]
    NoRotation {
        /// "a moment", "a prescribed rotation".
        what: &'static str,
        node: String,
        #[label("no beam is rigidly joined at `{node}`")]
        span: Span,
    },

    #[error("a distributed load needs a beam; `{part}` is a pin-ended part")]
    #[diagnostic(
        code(tandem::model::distributed_on_part),
        help("load its end nodes, or declare `{part}` as a `beam`")
    )]
    DistributedOnPart {
        part: String,
        #[label("a part carries no load along its length")]
        span: Span,
    },

    #[error("an axial model takes a load as one force")]
    #[diagnostic(code(tandem::model::plane_only), help("write `load {node} = -95 kip`"))]
    AxialLoad {
        node: String,
        #[label("here")]
        span: Span,
    },

    #[error("a plane model takes a load as a pair (FX, FY)")]
    #[diagnostic(
        code(tandem::model::plane_only),
        help("write `load {node} = (0 kip, -12 kip)`")
    )]
    PlaneLoad {
        node: String,
        #[label("here")]
        span: Span,
    },

    #[error("in a plane model `settle` needs a direction")]
    #[diagnostic(
        code(tandem::model::plane_only),
        help("write `settle {node} y = -0.1 in`")
    )]
    SettleDirection {
        node: String,
        #[label("here")]
        span: Span,
    },

    #[error("node `{node}` is tied to itself")]
    #[diagnostic(
        code(tandem::model::plane_only),
        help("a tie joins different nodes, e.g. `tie a, b`")
    )]
    TiedToItself {
        node: String,
        #[label("here")]
        span: Span,
    },

    #[error("in a plane model a tie joins nodes at one position")]
    #[diagnostic(
        code(tandem::model::plane_only),
        help("to join separated points, list them in a `rigid` body; a tie is a pin between nodes that coincide")
    )]
    TieApart {
        #[label("here")]
        span: Span,
    },

    #[error("part `{part}` has both ends at node `{node}`")]
    #[diagnostic(
        code(tandem::part::same_node),
        help("a part spans two different nodes; check `ends`")
    )]
    SameNode {
        part: String,
        node: String,
        #[label("both ends are `{node}`")]
        span: Span,
    },

    #[error("part `{part}` has zero length: nodes `{a}` and `{b}` are at the same position")]
    #[diagnostic(
        code(tandem::part::zero_length),
        help("move one node, or model the part as a spring with `stiffness`")
    )]
    ZeroLength {
        part: String,
        a: String,
        b: String,
        #[label("zero length")]
        span: Span,
    },

    #[error("{what} must be positive, found {value}")]
    #[diagnostic(code(tandem::value::positive))]
    NotPositive {
        what: String,
        value: String,
        #[label("not positive")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("unknown function `{name}`")]
    #[diagnostic(code(tandem::function::unknown))]
    UnknownFunction {
        name: String,
        #[label("not a function")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("{message}")]
    #[diagnostic(code(tandem::function::arguments))]
    BadArguments {
        message: String,
        #[label("{label}")]
        span: Span,
        label: String,
        #[help]
        help: Option<String>,
    },

    #[error(
        "a temperature change acts on part `{part}`, but its material `{material}` has no `alpha`"
    )]
    #[diagnostic(
        code(tandem::material::alpha),
        help(
            "add `alpha = 6.5e-6 / degF` (or the material's coefficient) to material `{material}`"
        )
    )]
    NoAlpha {
        part: String,
        material: String,
        #[label("temperature change here")]
        span: Span,
        #[label("material declared here")]
        material_span: Span,
    },

    #[error("this check compares {left} with {right}")]
    #[diagnostic(
        code(tandem::check::dimensions),
        help("both sides of a check must have one dimension")
    )]
    CheckDimensions {
        left: String,
        right: String,
        #[label("{left}")]
        lhs: Span,
        #[label("{right}")]
        rhs: Span,
    },

    #[error("unknown result `{field}` of {on} `{name}`")]
    #[diagnostic(code(tandem::check::field))]
    UnknownField {
        field: String,
        on: &'static str,
        name: String,
        #[label("not a result of a {on}")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("results such as `{name}` can only be used in a `check`")]
    #[diagnostic(
        code(tandem::check::result_outside),
        help("results are known only after solving; compare them in a `check` line")
    )]
    ResultOutsideCheck {
        name: String,
        #[label("a result")]
        span: Span,
    },

    #[error(
        "`settle` moves a support, but node `{node}` is not fixed{}",
        in_axis(axis)
    )]
    #[diagnostic(
        code(tandem::support::settle),
        help("add `fix {node}{axis}` for the support that moves")
    )]
    SettleFree {
        node: String,
        /// ` x` or ` y` in a plane model, empty in an axial one.
        axis: &'static str,
        #[label("no support here")]
        span: Span,
    },

    #[error("{what} is given twice in case `{case}`")]
    #[diagnostic(code(tandem::case::duplicate), help("combine them into one line"))]
    DuplicateInCase {
        what: String,
        case: String,
        #[label("given again here")]
        span: Span,
        #[label("first given here")]
        first: Span,
    },

    #[error("this statement stands outside any case, but the file declares cases")]
    #[diagnostic(
        code(tandem::case::loose),
        help("move it into one of the `case` blocks; top-level loads are only for files without cases")
    )]
    LooseStatement {
        #[label("outside a case")]
        span: Span,
        #[label("a case is declared here")]
        case: Span,
    },

    #[error("case `{case}` appears twice in combination `{combination}`")]
    #[diagnostic(
        code(tandem::combine::duplicate),
        help("give each case once, with its factor")
    )]
    CaseTwice {
        case: String,
        combination: String,
        #[label("again here")]
        span: Span,
    },

    #[error(
        "`{part}` is a spring: it has no material, so a temperature change does not act on it"
    )]
    #[diagnostic(
        code(tandem::case::spring_temperature),
        help("give the spring's free elongation with `misfit`, or model it as a member with a material and `alpha`")
    )]
    SpringTemperature {
        part: String,
        #[label("on a spring")]
        span: Span,
    },

    #[error("`{first}` and `{second}` are both {kind}; give one unit of each kind")]
    #[diagnostic(code(tandem::units::twice))]
    SameKindUnits {
        first: String,
        second: String,
        kind: String,
        #[label("a second unit for {kind}")]
        span: Span,
    },

    #[error("`{name}` has no value in combination `{combination}`: {reason}")]
    #[diagnostic(
        code(tandem::check::load_factor),
        help("`yield_factor` and `limit_factor` are the load factors λ at first yield and at the plastic limit; narrow the check with `under` to combinations where they exist")
    )]
    NoLoadFactor {
        name: String,
        combination: String,
        reason: String,
        #[label("no {name} here")]
        span: Span,
    },

    #[error("`long_term`: this file has no long-term state")]
    #[diagnostic(
        code(tandem::check::no_long_term),
        help("a long-term state needs a material with `creep`, a `sustained` case, and no one-sense or gapped parts; drop `long_term` or add them")
    )]
    NoLongTerm {
        #[label("no long-term state to check")]
        span: Span,
    },

    #[error("every factor of combination `{combination}` is zero: it loads nothing")]
    #[diagnostic(
        code(tandem::combine::zero),
        help("give the cases their factors, e.g. `combine service = dead + live`, or remove the combination")
    )]
    ZeroCombination {
        combination: String,
        #[label("all factors zero")]
        span: Span,
    },

    #[error("node `{node}` belongs to more than one rigid body")]
    #[diagnostic(
        code(tandem::rigid::shared),
        help(
            "list the node in one rigid body; to join two bodies at a point, merge them into one"
        )
    )]
    RigidShared {
        node: String,
        #[label("listed again here")]
        span: Span,
        #[label("first rigid body")]
        first: Span,
    },

    #[error("the file declares no {what}")]
    #[diagnostic(code(tandem::model::empty))]
    Empty {
        what: &'static str,
        #[label("in this file")]
        span: Span,
        #[help]
        help: Option<&'static str>,
    },

    #[error("`{name}` depends on itself")]
    #[diagnostic(
        code(tandem::name::cycle),
        help("break the chain of definitions: {chain}")
    )]
    Cycle {
        name: String,
        chain: String,
        #[label("defined in terms of itself")]
        span: Span,
    },

    #[error("too many {what}: {count} (the limit is {limit})")]
    #[diagnostic(code(tandem::limit))]
    TooMany {
        what: &'static str,
        count: usize,
        limit: usize,
        #[label("limit passed here")]
        span: Span,
        #[help]
        help: Option<&'static str>,
    },
}

impl ModelError {
    /// Errors caused only by an earlier error are not shown again.
    #[must_use]
    pub fn poisoned() -> Self {
        ModelError::NotFinite {
            what: String::new(),
            reason: POISON.into(),
            span: Span::default(),
        }
    }

    /// A value outside its sane range ([`super::range`]), or `Ok`.
    ///
    /// # Errors
    /// [`ModelError::OutOfRange`] at `span`.
    pub fn guard(
        q: crate::units::Quantity,
        what: impl FnOnce() -> String,
        span: Span,
    ) -> Result<crate::units::Quantity, ModelError> {
        super::range::check(q)
            .map(|()| q)
            .map_err(|r| ModelError::OutOfRange {
                what: what(),
                why: r.why,
                value: super::range::si_words(q),
                span,
                help: format!(
                    "tandem takes {} of magnitude {} (or zero); check the value and its unit",
                    q.dim.describe(),
                    r.range
                ),
            })
    }

    #[must_use]
    pub fn is_poisoned(&self) -> bool {
        matches!(self, ModelError::NotFinite { reason, .. } if reason == POISON)
    }
}

const POISON: &str = "\u{0}poisoned";

/// ` in x` for the axis ` x` (empty for an axial model's one direction).
fn in_axis(axis: &str) -> String {
    if axis.is_empty() {
        String::new()
    } else {
        format!(" in{axis}")
    }
}

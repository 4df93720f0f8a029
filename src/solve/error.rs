//! Errors the solver can report, worded in one place.

use miette::Diagnostic;
use thiserror::Error;

use crate::source::Span;

/// The assembly cannot be solved as written.
#[derive(Debug, Error, Diagnostic, Clone, PartialEq)]
pub enum SolveError {
    #[error("the assembly is a mechanism{when}: {what} can {moves} freely")]
    #[diagnostic(code(tandem::solve::mechanism))]
    Mechanism {
        what: String,
        /// `move` or `rotate`.
        moves: &'static str,
        when: String,
        #[label("free to move")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("in combination `{combination}` the engaged and slack parts keep changing")]
    #[diagnostic(
        code(tandem::solve::cycling),
        help("the one-sense or slack parts {parts} flip between engaged and slack; check their `carries` and `slack`, or the loads")
    )]
    Cycling {
        combination: String,
        parts: String,
        #[label("in this combination")]
        span: Span,
    },

    #[error(
        "in combination `{combination}` the engaged parts did not settle after {limit} trials"
    )]
    #[diagnostic(
        code(tandem::limit::active_set),
        help("an assembly with this many gaps and one-sense parts needs a closer look; split it or check the gaps")
    )]
    TooManyTrials {
        combination: String,
        limit: usize,
        #[label("in this combination")]
        span: Span,
    },

    #[error("the support movements of {body} do not fit together in combination `{combination}`")]
    #[diagnostic(
        code(tandem::solve::settlement),
        help("the movements prescribed on one rigid body or tie group must be a possible rigid motion")
    )]
    SettlementConflict {
        body: String,
        combination: String,
        #[label("this movement conflicts")]
        span: Span,
    },

    #[error("{message}")]
    #[diagnostic(code(tandem::solve::link))]
    Link {
        message: String,
        #[label("here")]
        span: Span,
        #[help]
        help: Option<String>,
    },

    #[error("combination `{combination}` is out of equilibrium by {residual} (largest force {scale}): the result is not trustworthy")]
    #[diagnostic(
        code(tandem::solve::equilibrium),
        help("the loads, part forces and reactions must balance to within {tolerance} of the largest force; parts whose stiffnesses differ by many orders of magnitude lose precision: check units and values, or model the stiffest parts as a rigid body or a tie")
    )]
    OutOfEquilibrium {
        combination: String,
        residual: String,
        scale: String,
        tolerance: String,
        #[label("in this combination")]
        span: Span,
    },

    #[error("combination `{combination}` gives a result that is not a finite number ({what})")]
    #[diagnostic(
        code(tandem::solve::not_finite),
        help("check the values of the parts and loads for magnitudes far outside the usual")
    )]
    NotFinite {
        combination: String,
        what: String,
        #[label("in this combination")]
        span: Span,
    },

    #[error("the stiffness system could not be solved: {reason}")]
    #[diagnostic(
        code(tandem::solve::numeric),
        help("this is likely a bug in tandem; please report the file")
    )]
    Numeric {
        reason: String,
        #[label("in this model")]
        span: Span,
    },
}

//! Expression evaluation with units, over a [`Scope`] that resolves names.

use std::f64::consts::PI;

use super::error::ModelError;
use crate::source::Span;
use crate::syntax::ast::{AddOp, Expr, ExprKind, Ident, MulOp, UnitExpr};
use crate::units::{lookup, Dimension, Quantity, UnitError};

/// A cross-section from a section helper: area and second moments about the
/// two principal axes, in SI (m², m⁴).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Section {
    pub shape: &'static str,
    pub area: f64,
    /// Second moment about the strong axis, and about the weak one.
    pub ix: f64,
    pub iy: f64,
    /// Extreme-fibre distance from the strong axis (half the depth), and
    /// from the weak one (half the width).
    pub cx: f64,
    pub cy: f64,
}

impl Section {
    /// The smaller principal second moment, which governs buckling.
    #[must_use]
    pub fn inertia(&self) -> f64 {
        self.ix.min(self.iy)
    }
}

/// What an expression evaluates to.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Val {
    Q(Quantity),
    Section(Section),
}

impl Val {
    /// A section stands for its area wherever a number is needed.
    #[must_use]
    pub fn quantity(self) -> Quantity {
        match self {
            Val::Q(q) => q,
            Val::Section(s) => Quantity::new(s.area, Dimension::AREA),
        }
    }
}

/// Resolves names while evaluating.
pub trait Scope {
    /// The value of a bare name (a `let`, a constant).
    ///
    /// # Errors
    /// Unknown or not-yet-valid names.
    fn name(&self, id: &Ident) -> Result<Quantity, ModelError>;
    /// The value of `object.field` (a result, inside checks).
    ///
    /// # Errors
    /// Results outside checks, unknown objects or fields.
    fn field(&self, object: &Ident, field: &Ident) -> Result<Quantity, ModelError>;
    /// True while a check is validated by dimension only: values that no
    /// real result would give (a root of a negative, a division by zero)
    /// stand for any value of their dimension instead of failing.
    fn validating(&self) -> bool {
        false
    }
}

/// Built-in constant names.
pub const CONSTANTS: &[&str] = &["pi"];

/// The value of a built-in constant.
#[must_use]
pub fn constant(name: &str) -> Option<f64> {
    match name {
        "pi" => Some(PI),
        _ => None,
    }
}

/// Evaluate to a quantity (sections give their area).
///
/// # Errors
/// Unit mismatches, unknown names, bad arguments, non-finite results.
pub fn eval(e: &Expr, scope: &dyn Scope) -> Result<Quantity, ModelError> {
    eval_val(e, scope).map(Val::quantity)
}

/// The factor to SI and the dimension of a unit expression.
///
/// # Errors
/// An unknown unit name.
pub fn unit_value(u: &UnitExpr) -> Result<Quantity, ModelError> {
    let mut q = Quantity::number(1.0);
    for f in &u.factors {
        let unit = lookup(&f.name).ok_or_else(|| ModelError::UnknownName {
            kind: "unit",
            name: f.name.to_string(),
            span: f.span,
            help: Some("`tandem units` lists the units".into()),
        })?;
        let mut power = f.power;
        if f.divide {
            power = -power;
        }
        let base = Quantity::new(unit.factor, unit.dim);
        // most units stand alone (`psi`, not `in^2`): x¹ is x exactly
        let p = if power == 1 {
            base
        } else {
            base.pow(Quantity::number(f64::from(power)))
                .map_err(|e| unit_error(&e, f.span, "raise"))?
        };
        q = q.mul(p).map_err(|e| unit_error(&e, f.span, "multiply"))?;
    }
    Ok(q)
}

pub(super) fn unit_error(e: &UnitError, span: Span, op: &'static str) -> ModelError {
    match e {
        UnitError::Mismatch { left, right } => {
            let (op, op_word) = match op {
                "add" => ("add", "+"),
                "subtract" => ("subtract", "-"),
                "compare" => ("compare", "vs"),
                other => (other, "with"),
            };
            ModelError::Incompatible {
                op,
                left: left.describe(),
                right: right.describe(),
                span,
                op_word,
            }
        }
        UnitError::BadPower { base, exponent } => ModelError::BadPower {
            message: format!("cannot raise {} to the power {exponent}", base.describe()),
            span,
            help: Some("only whole and half powers of a quantity with units have a meaning; divide by a unit first, e.g. `(fc / psi)^0.3`".into()),
        },
        UnitError::DimensionedExponent(d) => ModelError::BadPower {
            message: format!("an exponent must be a plain number, found {}", d.describe()),
            span,
            help: Some("divide the exponent by its unit".into()),
        },
        UnitError::NotFinite(reason) => ModelError::NotFinite {
            what: "this expression".into(),
            reason: (*reason).to_string(),
            span,
        },
    }
}

/// Evaluate, keeping sections as sections.
///
/// # Errors
/// As [`eval`].
pub fn eval_val(e: &Expr, scope: &dyn Scope) -> Result<Val, ModelError> {
    let q = match &e.kind {
        ExprKind::Quantity { value, unit } => {
            let n = Quantity::number(*value);
            match unit {
                Some(u) => n
                    .mul(unit_value(u)?)
                    .map_err(|err| unit_error(&err, e.span, "multiply"))?,
                None => n,
            }
        }
        ExprKind::Unit(u) => unit_value(u)?,
        ExprKind::Name(id) => scope.name(id)?,
        ExprKind::Field(f) => scope.field(&f[0], &f[1])?,
        ExprKind::Neg(inner) => {
            let q = eval(inner, scope)?;
            Quantity::new(-q.value, q.dim)
        }
        ExprKind::Sum(first, rest) => {
            let mut acc = eval(first, scope)?;
            for (op, x) in rest {
                let v = eval(x, scope)?;
                let span = first.span.to(x.span);
                acc = match op {
                    AddOp::Add => acc.add(v).map_err(|err| unit_error(&err, span, "add"))?,
                    AddOp::Sub => acc
                        .sub(v)
                        .map_err(|err| unit_error(&err, span, "subtract"))?,
                };
            }
            acc
        }
        ExprKind::Product(first, rest) => {
            let mut acc = eval(first, scope)?;
            for (op, x) in rest {
                let v = eval(x, scope)?;
                let span = first.span.to(x.span);
                acc = match op {
                    MulOp::Mul => acc
                        .mul(v)
                        .map_err(|err| unit_error(&err, span, "multiply"))?,
                    MulOp::Div if v.value == 0.0 && scope.validating() => {
                        Quantity::new(1.0, acc.dim.div(v.dim))
                    }
                    MulOp::Div => acc.div(v).map_err(|err| unit_error(&err, span, "divide"))?,
                };
            }
            acc
        }
        ExprKind::Power(base, exp) => {
            let b = eval(base, scope)?;
            let x = eval(exp, scope)?;
            b.pow(x).map_err(|err| unit_error(&err, e.span, "raise"))?
        }
        ExprKind::Call(c) => return super::functions::call(&c.func, &c.args, e.span, scope),
    };
    if q.value.is_finite() && !q.value.is_subnormal() {
        Ok(Val::Q(q))
    } else if scope.validating() {
        Ok(Val::Q(Quantity::new(1.0, q.dim)))
    } else {
        Err(ModelError::NotFinite {
            what: "this expression".into(),
            reason: if q.value.is_subnormal() {
                "the result underflows (too small for a normal number)"
            } else {
                "the result overflows"
            }
            .into(),
            span: e.span,
        })
    }
}

//! Expression evaluation with units, over a [`Scope`] that resolves names.

use std::f64::consts::PI;

use super::did_you_mean;
use super::error::ModelError;
use crate::source::Span;
use crate::syntax::ast::{AddOp, Arg, Expr, ExprKind, Ident, MulOp, UnitExpr};
use crate::units::{lookup, Dimension, Quantity, UnitError};

/// A cross-section from a section helper: area and second moments about the
/// two principal axes, in SI (m², m⁴).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Section {
    pub shape: &'static str,
    pub area: f64,
    pub ix: f64,
    pub iy: f64,
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

/// Built-in function names.
pub const FUNCTIONS: &[&str] = &[
    "sqrt",
    "abs",
    "min",
    "max",
    "sin",
    "cos",
    "tan",
    "asin",
    "acos",
    "atan",
    "atan2",
    "circle",
    "ring",
    "rect",
    "box",
    "ishape",
    "ec_aci",
    "ec_aci_weight",
    "ec_aci_si",
    "ecm_en1992",
];

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
        let p = base
            .pow(Quantity::number(f64::from(power)))
            .map_err(|e| unit_error(&e, f.span, "raise"))?;
        q = q.mul(p).map_err(|e| unit_error(&e, f.span, "multiply"))?;
    }
    Ok(q)
}

fn unit_error(e: &UnitError, span: Span, op: &'static str) -> ModelError {
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
        ExprKind::Call(c) => return call(&c.func, &c.args, e.span, scope),
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

fn positional<'a>(
    func: &Ident,
    args: &'a [Arg],
    count: Option<usize>,
    span: Span,
) -> Result<Vec<&'a Expr>, ModelError> {
    if let Some(a) = args.iter().find(|a| a.name.is_some()) {
        return Err(ModelError::BadArguments {
            message: format!("`{}` takes its arguments without names", func.name),
            span: a.span,
            label: "named argument".into(),
            help: Some(format!("write `{}(x)`", func.name)),
        });
    }
    let ok = match count {
        Some(n) => args.len() == n,
        None => !args.is_empty(),
    };
    if !ok {
        let want = match count {
            Some(1) => "one argument".to_string(),
            Some(n) => format!("{n} arguments"),
            None => "at least one argument".to_string(),
        };
        return Err(ModelError::BadArguments {
            message: format!("`{}` takes {want}, found {}", func.name, args.len()),
            span,
            label: format!("{} argument(s)", args.len()),
            help: None,
        });
    }
    Ok(args.iter().map(|a| &a.value).collect())
}

/// Named length arguments of a section helper, in the order of `names`.
fn lengths(
    func: &Ident,
    args: &[Arg],
    names: &[&'static str],
    span: Span,
    scope: &dyn Scope,
) -> Result<Vec<f64>, ModelError> {
    let dims = vec![Dimension::LENGTH; names.len()];
    named(func, args, names, &dims, span, scope)
}

/// Named positive arguments of given dimensions, in the order of `names`.
fn named(
    func: &Ident,
    args: &[Arg],
    names: &[&'static str],
    dims: &[Dimension],
    span: Span,
    scope: &dyn Scope,
) -> Result<Vec<f64>, ModelError> {
    let expected = names
        .iter()
        .map(|n| format!("`{n}`"))
        .collect::<Vec<_>>()
        .join(", ");
    let mut values: Vec<Option<f64>> = vec![None; names.len()];
    for a in args {
        let Some(name) = &a.name else {
            return Err(ModelError::BadArguments {
                message: format!("`{}` takes named arguments", func.name),
                span: a.span,
                label: "argument without a name".into(),
                help: Some(format!(
                    "write e.g. `{}({} = ...)`; it takes {expected}",
                    func.name, names[0]
                )),
            });
        };
        let Some(i) = names.iter().position(|n| *n == name.name) else {
            let mut help = format!("`{}` takes {expected}", func.name);
            if let Some(s) = did_you_mean(&name.name, names.iter().copied()) {
                help = format!("{s} {help}");
            }
            return Err(ModelError::BadArguments {
                message: format!("unknown argument `{}` of `{}`", name.name, func.name),
                span: name.span,
                label: "unknown argument".into(),
                help: Some(help),
            });
        };
        if values[i].is_some() {
            return Err(ModelError::BadArguments {
                message: format!("argument `{}` is given twice", name.name),
                span: a.span,
                label: "again here".into(),
                help: None,
            });
        }
        let q = eval(&a.value, scope)?;
        if q.dim != dims[i] {
            return Err(ModelError::WrongDimension {
                what: format!("`{}` of `{}`", name.name, func.name),
                expected: dims[i].describe(),
                found: q.dim.describe(),
                span: a.value.span,
                help: dims[i]
                    .example()
                    .map(|e| format!("expected {} such as {e}", dims[i].describe())),
            });
        }
        if q.value <= 0.0 {
            return Err(ModelError::NotPositive {
                what: format!("`{}` of `{}`", name.name, func.name),
                value: "zero or less".into(),
                span: a.value.span,
                help: None,
            });
        }
        values[i] = Some(q.value);
    }
    let mut out = Vec::with_capacity(names.len());
    for (n, v) in names.iter().zip(values) {
        match v {
            Some(x) => out.push(x),
            None => {
                return Err(ModelError::BadArguments {
                    message: format!("`{}` needs `{n}`", func.name),
                    span,
                    label: format!("`{n}` missing"),
                    help: Some(format!("`{}` takes {expected}", func.name)),
                })
            }
        }
    }
    Ok(out)
}

/// A published modulus formula: its function name, arguments and source.
pub struct Formula {
    pub name: &'static str,
    pub args: &'static str,
    pub source: &'static str,
    pub help: &'static str,
}

/// The published moduli tandem knows, for `tandem functions` and reports.
pub const FORMULAS: &[Formula] = &[
    Formula {
        name: "ec_aci",
        args: "fc = f'c",
        source: "ACI 318-19 19.2.2.1(b)",
        help: "modulus of normalweight concrete, Ec = 57,000 sqrt(f'c) with f'c and Ec in psi",
    },
    Formula {
        name: "ec_aci_weight",
        args: "wc = unit weight, fc = f'c",
        source: "ACI 318-19 19.2.2.1(a)",
        help: "modulus for unit weight wc of 90 to 160 lb/ft³, Ec = wc^1.5 · 33 sqrt(f'c) with wc in lb/ft³ and f'c, Ec in psi",
    },
    Formula {
        name: "ec_aci_si",
        args: "fc = f'c",
        source: "ACI 318-19 19.2.2.1(b), SI form",
        help: "modulus of normalweight concrete, Ec = 4700 sqrt(f'c) with f'c and Ec in MPa",
    },
    Formula {
        name: "ecm_en1992",
        args: "fck = characteristic cylinder strength",
        source: "EN 1992-1-1 Table 3.1",
        help: "secant modulus Ecm = 22 (fcm/10)^0.3 GPa with fcm = fck + 8 MPa (the table prints it rounded to whole GPa)",
    },
];

/// The source of a published formula used by name.
#[must_use]
pub fn formula_source(name: &str) -> Option<&'static str> {
    FORMULAS.iter().find(|f| f.name == name).map(|f| f.source)
}

/// Published sources of the formulas an expression calls.
pub fn sources(e: &Expr, out: &mut Vec<&'static str>) {
    e.visit(&mut |x| {
        if let ExprKind::Call(c) = &x.kind {
            let func = &c.func;
            if let Some(s) = formula_source(&func.name) {
                if !out.contains(&s) {
                    out.push(s);
                }
            }
        }
    });
}

fn too_thick(func: &Ident, span: Span, rule: &str) -> ModelError {
    ModelError::BadArguments {
        message: format!("the walls of this `{}` overlap", func.name),
        span,
        label: "not a hollow section".into(),
        help: Some(format!("`{}` needs {rule}", func.name)),
    }
}

fn call(func: &Ident, args: &[Arg], span: Span, scope: &dyn Scope) -> Result<Val, ModelError> {
    let name = func.name.as_str();
    let q = match name {
        "sqrt" => {
            let a = positional(func, args, Some(1), span)?;
            let mut x = eval(a[0], scope)?;
            if scope.validating() {
                x.value = x.value.abs();
            }
            x.sqrt()
                .map_err(|e| unit_error(&e, span, "take the root of"))?
        }
        "sin" | "cos" | "tan" => {
            let a = positional(func, args, Some(1), span)?;
            let x = eval(a[0], scope)?;
            dimensionless(
                func,
                &x,
                a[0].span,
                "an angle such as `30 deg` or `0.5 rad`",
            )?;
            Quantity::number(match name {
                "sin" => x.value.sin(),
                "cos" => x.value.cos(),
                _ => x.value.tan(),
            })
        }
        "asin" | "acos" | "atan" => {
            let a = positional(func, args, Some(1), span)?;
            let x = eval(a[0], scope)?;
            dimensionless(func, &x, a[0].span, "a dimensionless number")?;
            let v = if scope.validating() {
                x.value.clamp(-1.0, 1.0)
            } else {
                x.value
            };
            if name != "atan" && v.abs() > 1.0 {
                return Err(ModelError::NotFinite {
                    what: format!("`{name}` of {}", x.value),
                    reason: "the argument must lie between -1 and 1".into(),
                    span: a[0].span,
                });
            }
            Quantity::number(match name {
                "asin" => v.asin(),
                "acos" => v.acos(),
                _ => v.atan(),
            })
        }
        "atan2" => {
            let a = positional(func, args, Some(2), span)?;
            let y = eval(a[0], scope)?;
            let x = eval(a[1], scope)?;
            y.same(x)
                .map_err(|e| unit_error(&e, a[0].span.to(a[1].span), "compare"))?;
            Quantity::number(y.value.atan2(x.value))
        }
        "abs" => {
            let a = positional(func, args, Some(1), span)?;
            let x = eval(a[0], scope)?;
            Quantity::new(x.value.abs(), x.dim)
        }
        "min" | "max" => {
            let a = positional(func, args, None, span)?;
            let mut acc = eval(a[0], scope)?;
            for x in &a[1..] {
                let v = eval(x, scope)?;
                acc.same(v)
                    .map_err(|e| unit_error(&e, a[0].span.to(x.span), "compare"))?;
                let pick = if name == "min" {
                    v.value < acc.value
                } else {
                    v.value > acc.value
                };
                if pick {
                    acc = v;
                }
            }
            acc
        }
        "circle" => {
            let v = lengths(func, args, &["d"], span, scope)?;
            return Ok(Val::Section(circle(v[0])));
        }
        "ring" => {
            let v = lengths(func, args, &["d", "t"], span, scope)?;
            if 2.0 * v[1] > v[0] {
                return Err(too_thick(func, span, "`t` at most half of `d`"));
            }
            return Ok(Val::Section(ring(v[0], v[1])));
        }
        "rect" => {
            let v = lengths(func, args, &["b", "h"], span, scope)?;
            return Ok(Val::Section(rect(v[0], v[1])));
        }
        "box" => {
            let v = lengths(func, args, &["b", "h", "t"], span, scope)?;
            if 2.0 * v[2] >= v[0].min(v[1]) {
                return Err(too_thick(func, span, "`t` less than half of `b` and `h`"));
            }
            return Ok(Val::Section(hollow_rect(v[0], v[1], v[2])));
        }
        "ishape" => {
            let v = lengths(func, args, &["d", "bf", "tf", "tw"], span, scope)?;
            if 2.0 * v[2] >= v[0] || v[3] > v[1] {
                return Err(too_thick(
                    func,
                    span,
                    "`tf` less than half of `d` and `tw` at most `bf`",
                ));
            }
            return Ok(Val::Section(ishape(v[0], v[1], v[2], v[3])));
        }
        "ec_aci" | "ec_aci_si" | "ecm_en1992" | "ec_aci_weight" => {
            return modulus(func, args, span, scope).map(Val::Q);
        }
        _ => {
            return Err(ModelError::UnknownFunction {
                name: func.name.to_string(),
                span: func.span,
                help: Some(match did_you_mean(name, FUNCTIONS.iter().copied()) {
                    Some(s) => s,
                    None => format!("the functions are {}", FUNCTIONS.join(", ")),
                }),
            })
        }
    };
    Ok(Val::Q(q))
}

/// An error unless `x` is dimensionless (an angle in radians is).
fn dimensionless(func: &Ident, x: &Quantity, span: Span, expected: &str) -> Result<(), ModelError> {
    if x.dim.is_none() {
        return Ok(());
    }
    Err(ModelError::WrongDimension {
        what: format!("the argument of `{}`", func.name),
        expected: expected.into(),
        found: x.dim.describe(),
        span,
        help: None,
    })
}

/// Solid circle of diameter `d`.
#[must_use]
pub fn circle(d: f64) -> Section {
    let i = PI * d.powi(4) / 64.0;
    Section {
        shape: "circle",
        area: PI * d * d / 4.0,
        ix: i,
        iy: i,
    }
}

/// Hollow circle, outside diameter `d`, wall `t`.
#[must_use]
pub fn ring(d: f64, t: f64) -> Section {
    let di = d - 2.0 * t;
    let i = PI * (d.powi(4) - di.powi(4)) / 64.0;
    Section {
        shape: "ring",
        area: PI * (d * d - di * di) / 4.0,
        ix: i,
        iy: i,
    }
}

/// Solid rectangle, width `b`, depth `h`.
#[must_use]
pub fn rect(b: f64, h: f64) -> Section {
    Section {
        shape: "rect",
        area: b * h,
        ix: b * h.powi(3) / 12.0,
        iy: h * b.powi(3) / 12.0,
    }
}

/// Hollow rectangle, outside `b` × `h`, wall `t`.
#[must_use]
pub fn hollow_rect(b: f64, h: f64, t: f64) -> Section {
    let (bi, hi) = (b - 2.0 * t, h - 2.0 * t);
    Section {
        shape: "box",
        area: b * h - bi * hi,
        ix: (b * h.powi(3) - bi * hi.powi(3)) / 12.0,
        iy: (h * b.powi(3) - hi * bi.powi(3)) / 12.0,
    }
}

/// Doubly symmetric I from plates: depth `d`, flange `bf` × `tf`, web `tw`.
#[must_use]
pub fn ishape(d: f64, bf: f64, tf: f64, tw: f64) -> Section {
    let hw = d - 2.0 * tf;
    Section {
        shape: "ishape",
        area: 2.0 * bf * tf + hw * tw,
        ix: (bf * d.powi(3) - (bf - tw) * hw.powi(3)) / 12.0,
        iy: 2.0 * tf * bf.powi(3) / 12.0 + hw * tw.powi(3) / 12.0,
    }
}

/// The published modulus formulas, evaluated in their own units.
fn modulus(
    func: &Ident,
    args: &[Arg],
    span: Span,
    scope: &dyn Scope,
) -> Result<Quantity, ModelError> {
    let unit = |n: &str| lookup(n).map_or(1.0, |u| u.factor);
    let p = Dimension::PRESSURE;
    let value = match func.name.as_str() {
        "ec_aci" => {
            let v = named(func, args, &["fc"], &[p], span, scope)?;
            57_000.0 * (v[0] / unit("psi")).sqrt() * unit("psi")
        }
        "ec_aci_si" => {
            let v = named(func, args, &["fc"], &[p], span, scope)?;
            4_700.0 * (v[0] / unit("MPa")).sqrt() * unit("MPa")
        }
        "ec_aci_weight" => {
            let w = Dimension::new(-2, 1, -2, 0);
            let v = named(func, args, &["wc", "fc"], &[w, p], span, scope)?;
            (v[0] / unit("pcf")).powf(1.5) * 33.0 * (v[1] / unit("psi")).sqrt() * unit("psi")
        }
        _ => {
            let v = named(func, args, &["fck"], &[p], span, scope)?;
            let fcm = v[0] / unit("MPa") + 8.0;
            22.0 * (fcm / 10.0).powf(0.3) * unit("GPa")
        }
    };
    Ok(Quantity::new(value, p))
}

/// The built-in functions as text, for `tandem functions`.
#[must_use]
pub fn listing() -> String {
    let mut out = String::from("Functions (arguments are named where shown):\n\n");
    let rows: &[(&str, &str)] = &[
        (
            "sqrt(x)",
            "square root; the dimension must allow it (whole or half powers)",
        ),
        ("abs(x)", "absolute value"),
        ("min(a, b, ...)", "smallest of values of one dimension"),
        ("max(a, b, ...)", "largest of values of one dimension"),
        (
            "sin(x), cos(x), tan(x)",
            "of an angle (`30 deg`, `0.5 rad`, or a number taken as radians)",
        ),
        (
            "asin(x), acos(x), atan(x)",
            "an angle (in radians; shown in `deg` with `/ deg`)",
        ),
        (
            "atan2(y, x)",
            "the angle of (x, y); y and x of one dimension",
        ),
        ("circle(d = ...)", "solid round: A = π d²/4, I = π d⁴/64"),
        (
            "ring(d = ..., t = ...)",
            "hollow round, outside diameter and wall: A = π (d² − (d − 2t)²)/4",
        ),
        (
            "rect(b = ..., h = ...)",
            "solid rectangle: A = b h, I = b h³/12 and h b³/12",
        ),
        (
            "box(b = ..., h = ..., t = ...)",
            "hollow rectangle, outside size and wall",
        ),
        (
            "ishape(d = ..., bf = ..., tf = ..., tw = ...)",
            "doubly symmetric I from plates, no fillets",
        ),
    ];
    for (f, h) in rows {
        out.push_str(&format!("  {f:<46} {h}\n"));
    }
    out.push_str("\nPublished moduli (the report prints the source beside the value):\n\n");
    for f in FORMULAS {
        out.push_str(&format!(
            "  {:<46} {}\n  {:<46} source: {}\n",
            format!("{}({})", f.name, f.args),
            f.help,
            "",
            f.source
        ));
    }
    out.push_str("\nSection helpers give an area wherever a number is needed; `section = ...` in a part also gives the second moment.\n");
    out
}

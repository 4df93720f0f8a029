//! The built-in functions: one table, each entry with its name, how it is
//! called, what it does, its published source (for the formulas) and its
//! evaluation. `tandem functions`, "did you mean", the reserved words and
//! the sources a report prints all read this table.

use std::f64::consts::PI;

use super::error::ModelError;
use super::eval::{eval, unit_error, Scope, Section, Val};
use crate::source::Span;
use crate::syntax::ast::{Arg, Expr, ExprKind, Ident};
use crate::units::{lookup, Dimension, Quantity};
use crate::words::did_you_mean;

/// A built-in function.
pub struct Function {
    pub name: &'static str,
    /// How it is called, as `tandem functions` shows it.
    pub call: &'static str,
    /// What it gives.
    pub help: &'static str,
    /// The published source of a formula; reports print it beside the value.
    pub source: Option<&'static str>,
    /// Its value for the arguments of a call.
    pub eval: fn(&Call<'_>) -> Result<Val, ModelError>,
}

/// A call being evaluated: the function's name as written, its arguments,
/// the call's span and the scope its arguments are evaluated in.
pub struct Call<'a> {
    pub func: &'a Ident,
    pub args: &'a [Arg],
    pub span: Span,
    pub scope: &'a dyn Scope,
}

const ANGLE: &str = "of an angle (`30 deg`, `0.5 rad`, or a number taken as radians)";
const INVERSE: &str = "an angle (in radians; shown in `deg` with `/ deg`)";

/// Every built-in function, in the order help texts list them.
pub const FUNCTIONS: &[Function] = &[
    Function {
        name: "sqrt",
        call: "sqrt(x)",
        help: "square root; the dimension must allow it (whole or half powers)",
        source: None,
        eval: sqrt,
    },
    Function {
        name: "abs",
        call: "abs(x)",
        help: "absolute value",
        source: None,
        eval: |c| {
            let a = positional(c.func, c.args, Some(1), c.span)?;
            let x = eval(&a[0], c.scope)?;
            Ok(Val::Q(Quantity::new(x.value.abs(), x.dim)))
        },
    },
    Function {
        name: "min",
        call: "min(a, b, ...)",
        help: "smallest of values of one dimension",
        source: None,
        eval: |c| extreme(c, true),
    },
    Function {
        name: "max",
        call: "max(a, b, ...)",
        help: "largest of values of one dimension",
        source: None,
        eval: |c| extreme(c, false),
    },
    Function {
        name: "sin",
        call: "sin(x), cos(x), tan(x)",
        help: ANGLE,
        source: None,
        eval: |c| trig(c, f64::sin),
    },
    Function {
        name: "cos",
        call: "sin(x), cos(x), tan(x)",
        help: ANGLE,
        source: None,
        eval: |c| trig(c, f64::cos),
    },
    Function {
        name: "tan",
        call: "sin(x), cos(x), tan(x)",
        help: ANGLE,
        source: None,
        eval: |c| trig(c, f64::tan),
    },
    Function {
        name: "asin",
        call: "asin(x), acos(x), atan(x)",
        help: INVERSE,
        source: None,
        eval: |c| inverse(c, f64::asin, true),
    },
    Function {
        name: "acos",
        call: "asin(x), acos(x), atan(x)",
        help: INVERSE,
        source: None,
        eval: |c| inverse(c, f64::acos, true),
    },
    Function {
        name: "atan",
        call: "asin(x), acos(x), atan(x)",
        help: INVERSE,
        source: None,
        eval: |c| inverse(c, f64::atan, false),
    },
    Function {
        name: "atan2",
        call: "atan2(y, x)",
        help: "the angle of (x, y); y and x of one dimension",
        source: None,
        eval: atan2,
    },
    Function {
        name: "circle",
        call: "circle(d = ...)",
        help: "solid round: A = π d²/4, I = π d⁴/64",
        source: None,
        eval: |c| {
            let v = lengths(c.func, c.args, &["d"], c.span, c.scope)?;
            Ok(Val::Section(circle(v[0])))
        },
    },
    Function {
        name: "ring",
        call: "ring(d = ..., t = ...)",
        help: "hollow round, outside diameter and wall: A = π (d² − (d − 2t)²)/4",
        source: None,
        eval: |c| {
            let v = lengths(c.func, c.args, &["d", "t"], c.span, c.scope)?;
            if 2.0 * v[1] > v[0] {
                return Err(too_thick(c.func, c.span, "`t` at most half of `d`"));
            }
            Ok(Val::Section(ring(v[0], v[1])))
        },
    },
    Function {
        name: "rect",
        call: "rect(b = ..., h = ...)",
        help: "solid rectangle: A = b h, I = b h³/12 and h b³/12",
        source: None,
        eval: |c| {
            let v = lengths(c.func, c.args, &["b", "h"], c.span, c.scope)?;
            Ok(Val::Section(rect(v[0], v[1])))
        },
    },
    Function {
        name: "box",
        call: "box(b = ..., h = ..., t = ...)",
        help: "hollow rectangle, outside size and wall",
        source: None,
        eval: |c| {
            let v = lengths(c.func, c.args, &["b", "h", "t"], c.span, c.scope)?;
            if 2.0 * v[2] >= v[0].min(v[1]) {
                return Err(too_thick(c.func, c.span, "`t` less than half of `b` and `h`"));
            }
            Ok(Val::Section(hollow_rect(v[0], v[1], v[2])))
        },
    },
    Function {
        name: "ishape",
        call: "ishape(d = ..., bf = ..., tf = ..., tw = ...)",
        help: "doubly symmetric I from plates, no fillets",
        source: None,
        eval: |c| {
            let v = lengths(c.func, c.args, &["d", "bf", "tf", "tw"], c.span, c.scope)?;
            if 2.0 * v[2] >= v[0] || v[3] > v[1] {
                return Err(too_thick(
                    c.func,
                    c.span,
                    "`tf` less than half of `d` and `tw` at most `bf`",
                ));
            }
            Ok(Val::Section(ishape(v[0], v[1], v[2], v[3])))
        },
    },
    Function {
        name: "ec_aci",
        call: "ec_aci(fc = f'c)",
        help: "modulus of normalweight concrete, Ec = 57,000 sqrt(f'c) with f'c and Ec in psi",
        source: Some("ACI 318-19 19.2.2.1(b)"),
        eval: |c| modulus(c.func, c.args, c.span, c.scope).map(Val::Q),
    },
    Function {
        name: "ec_aci_weight",
        call: "ec_aci_weight(wc = unit weight, fc = f'c)",
        help: "modulus for unit weight wc of 90 to 160 lb/ft³, Ec = wc^1.5 · 33 sqrt(f'c) with wc in lb/ft³ and f'c, Ec in psi",
        source: Some("ACI 318-19 19.2.2.1(a)"),
        eval: |c| modulus(c.func, c.args, c.span, c.scope).map(Val::Q),
    },
    Function {
        name: "ec_aci_si",
        call: "ec_aci_si(fc = f'c)",
        help: "modulus of normalweight concrete, Ec = 4700 sqrt(f'c) with f'c and Ec in MPa",
        source: Some("ACI 318-19 19.2.2.1(b), SI form"),
        eval: |c| modulus(c.func, c.args, c.span, c.scope).map(Val::Q),
    },
    Function {
        name: "ecm_en1992",
        call: "ecm_en1992(fck = characteristic cylinder strength)",
        help: "secant modulus Ecm = 22 (fcm/10)^0.3 GPa with fcm = fck + 8 MPa (the table prints it rounded to whole GPa)",
        source: Some("EN 1992-1-1 Table 3.1"),
        eval: |c| modulus(c.func, c.args, c.span, c.scope).map(Val::Q),
    },
];

/// The built-in function of this name.
#[must_use]
pub fn find(name: &str) -> Option<&'static Function> {
    // by a map made once: a sweep calls a function hundreds of thousands
    // of times, and the table is searched by name each time
    static INDEX: std::sync::OnceLock<foldhash::HashMap<&'static str, usize>> =
        std::sync::OnceLock::new();
    let index = INDEX.get_or_init(|| {
        let mut m = foldhash::HashMap::default();
        for (i, f) in FUNCTIONS.iter().enumerate() {
            // the first of a name wins, as in table order
            m.entry(f.name).or_insert(i);
        }
        m
    });
    index.get(name).map(|&i| &FUNCTIONS[i])
}

/// The names of the built-in functions, in the table's order.
pub fn names() -> impl Iterator<Item = &'static str> {
    FUNCTIONS.iter().map(|f| f.name)
}

/// Published sources of the formulas an expression calls.
pub fn sources(e: &Expr, out: &mut Vec<&'static str>) {
    e.visit(&mut |x| {
        if let ExprKind::Call(c) = &x.kind {
            if let Some(s) = find(&c.func.name).and_then(|f| f.source) {
                if !out.contains(&s) {
                    out.push(s);
                }
            }
        }
    });
}

/// Evaluate a call of a built-in function.
///
/// # Errors
/// An unknown function (with "did you mean"), or the function's own errors.
pub fn call(func: &Ident, args: &[Arg], span: Span, scope: &dyn Scope) -> Result<Val, ModelError> {
    let Some(f) = find(&func.name) else {
        return Err(ModelError::UnknownFunction {
            name: func.name.to_string(),
            span: func.span,
            help: Some(match did_you_mean(&func.name, names()) {
                Some(s) => s,
                None => format!(
                    "the functions are {}",
                    names().collect::<Vec<_>>().join(", ")
                ),
            }),
        });
    };
    (f.eval)(&Call {
        func,
        args,
        span,
        scope,
    })
}

/// The built-in functions as text, for `tandem functions`.
#[must_use]
pub fn listing() -> String {
    let mut out = String::from("Functions (arguments are named where shown):\n\n");
    let mut last = "";
    for f in FUNCTIONS.iter().filter(|f| f.source.is_none()) {
        // functions listed together (sin, cos, tan) share one line
        if f.call != last {
            out.push_str(&format!("  {:<46} {}\n", f.call, f.help));
        }
        last = f.call;
    }
    out.push_str("\nPublished moduli (the report prints the source beside the value):\n\n");
    for f in FUNCTIONS {
        if let Some(source) = f.source {
            out.push_str(&format!(
                "  {:<46} {}\n  {:<46} source: {source}\n",
                f.call, f.help, ""
            ));
        }
    }
    out.push_str("\nSection helpers give an area wherever a number is needed; `section = ...` in a part also gives the second moment.\n");
    out
}

fn sqrt(c: &Call<'_>) -> Result<Val, ModelError> {
    let a = positional(c.func, c.args, Some(1), c.span)?;
    let mut x = eval(&a[0], c.scope)?;
    if c.scope.validating() {
        x.value = x.value.abs();
    }
    x.sqrt()
        .map(Val::Q)
        .map_err(|e| unit_error(&e, c.span, "take the root of"))
}

/// `sin`, `cos`, `tan`: of a dimensionless angle.
fn trig(c: &Call<'_>, f: fn(f64) -> f64) -> Result<Val, ModelError> {
    let a = positional(c.func, c.args, Some(1), c.span)?;
    let x = eval(&a[0], c.scope)?;
    dimensionless(
        c.func,
        &x,
        a[0].span,
        "an angle such as `30 deg` or `0.5 rad`",
    )?;
    Ok(Val::Q(Quantity::number(f(x.value))))
}

/// `asin`, `acos` (`bounded`: the argument within ±1) and `atan`.
fn inverse(c: &Call<'_>, f: fn(f64) -> f64, bounded: bool) -> Result<Val, ModelError> {
    let a = positional(c.func, c.args, Some(1), c.span)?;
    let x = eval(&a[0], c.scope)?;
    dimensionless(c.func, &x, a[0].span, "a dimensionless number")?;
    let v = if c.scope.validating() {
        x.value.clamp(-1.0, 1.0)
    } else {
        x.value
    };
    if bounded && v.abs() > 1.0 {
        return Err(ModelError::NotFinite {
            what: format!("`{}` of {}", c.func.name, x.value),
            reason: "the argument must lie between -1 and 1".into(),
            span: a[0].span,
        });
    }
    Ok(Val::Q(Quantity::number(f(v))))
}

fn atan2(c: &Call<'_>) -> Result<Val, ModelError> {
    let a = positional(c.func, c.args, Some(2), c.span)?;
    let y = eval(&a[0], c.scope)?;
    let x = eval(&a[1], c.scope)?;
    y.same(x)
        .map_err(|e| unit_error(&e, a[0].span.to(a[1].span), "compare"))?;
    Ok(Val::Q(Quantity::number(y.value.atan2(x.value))))
}

/// `min` (`smallest`) or `max` of values of one dimension.
fn extreme(c: &Call<'_>, smallest: bool) -> Result<Val, ModelError> {
    let a = positional(c.func, c.args, None, c.span)?;
    let mut acc = eval(&a[0], c.scope)?;
    for x in a.rest() {
        let v = eval(x, c.scope)?;
        acc.same(v)
            .map_err(|e| unit_error(&e, a[0].span.to(x.span), "compare"))?;
        if (smallest && v.value < acc.value) || (!smallest && v.value > acc.value) {
            acc = v;
        }
    }
    Ok(Val::Q(acc))
}

fn positional<'a>(
    func: &Ident,
    args: &'a [Arg],
    count: Option<usize>,
    span: Span,
) -> Result<Positional<'a>, ModelError> {
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
    Ok(Positional(args))
}

/// The arguments of a call that takes them without names (checked by
/// [`positional`]), read in place.
struct Positional<'a>(&'a [Arg]);

impl std::ops::Index<usize> for Positional<'_> {
    type Output = Expr;
    fn index(&self, i: usize) -> &Expr {
        &self.0[i].value
    }
}

impl<'a> Positional<'a> {
    /// Every argument after the first.
    fn rest(&self) -> impl Iterator<Item = &'a Expr> {
        self.0.iter().skip(1).map(|a| &a.value)
    }
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

fn too_thick(func: &Ident, span: Span, rule: &str) -> ModelError {
    ModelError::BadArguments {
        message: format!("the walls of this `{}` overlap", func.name),
        span,
        label: "not a hollow section".into(),
        help: Some(format!("`{}` needs {rule}", func.name)),
    }
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
        cx: d / 2.0,
        cy: d / 2.0,
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
        cx: d / 2.0,
        cy: d / 2.0,
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
        cx: h / 2.0,
        cy: b / 2.0,
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
        cx: h / 2.0,
        cy: b / 2.0,
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
        cx: d / 2.0,
        cy: bf / 2.0,
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

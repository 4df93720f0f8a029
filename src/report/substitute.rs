//! An expression written again with the values of its names substituted,
//! for the inputs section: `57000 · √(fc / psi) · psi` becomes
//! `57000 · √(5.000 ksi / psi) · psi`. Numbers and units stand as written;
//! the operators read as in the report's equations (·, /, √).

use crate::source::Source;
use crate::syntax::ast::{AddOp, Expr, ExprKind, MulOp};

/// Whether `e` uses a name whose value would be substituted.
pub fn uses_names(e: &Expr) -> bool {
    let mut found = false;
    e.visit(&mut |x| {
        if matches!(x.kind, ExprKind::Name(_)) {
            found = true;
        }
    });
    found
}

/// `e` with each name replaced by `value_of(name)` (a name without one
/// stands as written).
pub fn substituted(e: &Expr, source: &Source, value_of: &dyn Fn(&str) -> Option<String>) -> String {
    write(e, source, value_of).0
}

/// The text and its binding strength: 1 sum, 2 product, 3 negation,
/// 4 power, 5 an atom.
fn write(e: &Expr, src: &Source, value_of: &dyn Fn(&str) -> Option<String>) -> (String, u8) {
    let wrap = |(t, p): (String, u8), min: u8| if p < min { format!("({t})") } else { t };
    match &e.kind {
        ExprKind::Quantity { .. } | ExprKind::Unit(_) => {
            let t = src.slice(e.span).trim().to_string();
            let strength = if t.contains(' ') { 2 } else { 5 };
            (t, strength)
        }
        ExprKind::Field(_) => (src.slice(e.span).trim().to_string(), 5),
        ExprKind::Name(id) => match value_of(&id.name) {
            Some(v) => {
                let strength = if v.contains(' ') || v.starts_with('-') {
                    2
                } else {
                    5
                };
                (v, strength)
            }
            None => (id.name.to_string(), 5),
        },
        ExprKind::Neg(x) => (format!("−{}", wrap(write(x, src, value_of), 3)), 3),
        ExprKind::Sum(first, rest) => {
            let mut t = wrap(write(first, src, value_of), 1);
            for (op, x) in rest {
                let sign = match op {
                    AddOp::Add => " + ",
                    AddOp::Sub => " − ",
                };
                t.push_str(sign);
                t.push_str(&wrap(write(x, src, value_of), 2));
            }
            (t, 1)
        }
        ExprKind::Product(first, rest) => {
            let mut t = wrap(write(first, src, value_of), 2);
            for (op, x) in rest {
                let (sign, min) = match op {
                    MulOp::Mul => (" · ", 2),
                    MulOp::Div => (" / ", 3),
                };
                t.push_str(sign);
                t.push_str(&wrap(write(x, src, value_of), min));
            }
            (t, 2)
        }
        ExprKind::Power(b, x) => (
            format!(
                "{}^{}",
                wrap(write(b, src, value_of), 5),
                wrap(write(x, src, value_of), 5)
            ),
            4,
        ),
        ExprKind::Call(c) => {
            let args: Vec<String> = c
                .args
                .iter()
                .map(|a| {
                    let v = write(&a.value, src, value_of).0;
                    match &a.name {
                        Some(n) => format!("{} = {v}", n.name),
                        None => v,
                    }
                })
                .collect();
            if c.func.name == "sqrt" {
                (format!("√({})", args.join(", ")), 5)
            } else {
                (format!("{}({})", c.func.name, args.join(", ")), 5)
            }
        }
    }
}

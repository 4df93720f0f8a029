//! The language evaluated: precedence, published formulas, section helpers.

use crate::common;

use common::{rel, value};
use tandem::units::{lookup, Dimension};

fn psi() -> f64 {
    lookup("psi").map_or(f64::NAN, |u| u.factor)
}

/// ACI 318-19 19.2.2.1(b): Ec = 57,000 sqrt(f'c) psi. For f'c = 3000 / 4000 /
/// 5000 psi the formula gives 3,122,019 / 3,604,997 / 4,030,509 psi (hand
/// calculation, rounded to the psi).
#[test]
fn aci_modulus_formula() {
    for (fc, expected) in [
        (3000, 3_122_019.0),
        (4000, 3_604_997.0),
        (5000, 4_030_509.0),
    ] {
        let q = value(
            &format!("let fc = {fc} psi\nlet ec = 57000 * sqrt(fc / psi) * psi"),
            "ec",
        );
        assert_eq!(q.dim, Dimension::PRESSURE);
        let in_psi = q.value / psi();
        assert!((in_psi - expected).abs() < 0.5, "f'c {fc}: {in_psi}");
    }
}

/// EN 1992-1-1 Table 3.1: Ecm = 22 (fcm/10)^0.3 `GPa` with fcm in `MPa`; for
/// C30/37, fcm = 38 `MPa` and the formula gives 32.84 `GPa` (the table prints 33).
#[test]
fn en1992_modulus_formula() {
    let q = value(
        "let fcm = 30 MPa + 8 MPa\nlet ecm = 22 * (fcm / (10 MPa))^0.3 * GPa",
        "ecm",
    );
    assert_eq!(q.dim, Dimension::PRESSURE);
    assert!((q.value / 1e9 - 32.84).abs() < 0.005, "{}", q.value);
}

/// A number followed by a unit binds tighter than any operator.
#[test]
fn unit_binding_rule() {
    let q = value("let a = 10 ft\nlet r = a / 2 ft", "r");
    assert!(rel(q.value, 5.0) < 1e-15 && q.dim.is_none());
    let q = value("let b = 3\nlet l = 10 ft * b", "l");
    assert!(rel(q.value, 30.0 * 0.3048) < 1e-15);
    // a word followed by `(` or `.` is a call or a result, not a unit:
    // 57000·√5000 psi = 4031 ksi (ACI 318-19 19.2.2.1(b), as written with
    // the unit first)
    let q = value("let fc = 5000 psi\nlet e = 57000 psi * sqrt(fc / psi)", "e");
    assert!(rel(q.value, 57000.0 * 5000f64.sqrt() * 6_894.757_293_168_361) < 1e-12);
    let q = value("let f = 50 kN * max(1, 2)", "f");
    assert!(rel(q.value, 100e3) < 1e-15);
    let q = value("let a = 3 ft^2", "a");
    assert!(rel(q.value, 3.0 * 0.3048 * 0.3048) < 1e-15);
    assert_eq!(q.dim, Dimension::AREA);
    let q = value("let k = 850 kip/in", "k");
    assert!(rel(q.value, 850.0 * 4_448.221_615_260_5 / 0.0254) < 1e-15);
    assert_eq!(q.dim, Dimension::STIFFNESS);
    let q = value("let w = 150 kN/m^3", "w");
    assert!(rel(q.value, 150e3) < 1e-15);
    let q = value("let alpha = 6.5e-6 / degF", "alpha");
    assert!(rel(q.value, 6.5e-6 * 9.0 / 5.0) < 1e-15);
    assert_eq!(q.dim, Dimension::PER_TEMPERATURE);
}

#[test]
fn arithmetic_precedence() {
    assert!(rel(value("let x = 2^3^2", "x").value, 512.0) < 1e-15);
    assert!(rel(value("let x = -2^2", "x").value, -4.0) < 1e-15);
    assert!(rel(value("let x = 2^-1", "x").value, 0.5) < 1e-15);
    assert!(rel(value("let x = --3", "x").value, 3.0) < 1e-15);
    assert!(rel(value("let x = 1 + 2 * 3 - 4 / 2", "x").value, 5.0) < 1e-15);
    assert!(rel(value("let x = min(3 ft, 30 in, 1 m)", "x").value, 0.762) < 1e-15);
    assert!(rel(value("let x = max(-2, abs(-5))", "x").value, 5.0) < 1e-15);
    assert!(rel(value("let x = 29_000", "x").value, 29000.0) < 1e-15);
    assert!(rel(value("let x = 2 * pi", "x").value, std::f64::consts::TAU) < 1e-15);
}

/// Declaration order does not matter.
#[test]
fn lets_in_any_order() {
    let q = value("let b = 2 * a\nlet a = 3 in", "b");
    assert!(rel(q.value, 6.0 * 0.0254) < 1e-15);
}

/// Area and second-moment formulas of solid and hollow shapes (any
/// mechanics-of-materials text, e.g. Roark's Formulas for Stress and Strain, from memory:
/// Table A.1): circle pi d^2/4, pi d^4/64; rectangle b h, b h^3/12.
#[test]
fn section_areas() {
    let inch = 0.0254;
    let a = value("let a = circle(d = 10 in)", "a");
    assert_eq!(a.dim, Dimension::AREA);
    assert!(rel(a.value, std::f64::consts::PI * 25.0 * inch * inch) < 1e-14);
    // ring: pi/4 (d^2 - (d - 2t)^2); d = 10.75, t = 0.365 gives 11.908 in^2
    let r = value("let a = ring(d = 10.75 in, t = 0.365 in)", "a");
    let di: f64 = 10.75 - 0.73;
    let exact = std::f64::consts::PI / 4.0 * (10.75f64.powi(2) - di.powi(2));
    assert!(rel(r.value / (inch * inch), exact) < 1e-14);
    assert!((exact - 11.908).abs() < 0.001);
    let b = value("let a = rect(b = 4 in, h = 6 in)", "a");
    assert!(rel(b.value / (inch * inch), 24.0) < 1e-14);
    // box 6 x 4 x 0.25: 24 - 5.5 x 3.5 = 4.75 in^2
    let h = value("let a = box(b = 6 in, h = 4 in, t = 0.25 in)", "a");
    assert!(rel(h.value / (inch * inch), 4.75) < 1e-14);
    // I from plates: 2 x 8 x 0.5 + (12 - 1) x 0.3 = 11.3 in^2
    let i = value(
        "let a = ishape(d = 12 in, bf = 8 in, tf = 0.5 in, tw = 0.3 in)",
        "a",
    );
    assert!(rel(i.value / (inch * inch), 11.3) < 1e-14);
}

#[test]
fn section_second_moments() {
    use tandem::model::functions::{circle, hollow_rect, ishape, rect, ring};
    let pi = std::f64::consts::PI;
    assert!(rel(circle(2.0).ix, pi / 4.0) < 1e-15); // pi d^4 / 64, d = 2
    assert!(rel(ring(2.0, 0.5).ix, pi * (16.0 - 1.0) / 64.0) < 1e-15);
    let r = rect(2.0, 3.0);
    assert!(rel(r.ix, 2.0 * 27.0 / 12.0) < 1e-15);
    assert!(rel(r.iy, 3.0 * 8.0 / 12.0) < 1e-15);
    assert!(rel(r.inertia(), 2.0) < 1e-15); // the smaller of the two
    let b = hollow_rect(6.0, 4.0, 0.25);
    assert!(rel(b.ix, (6.0 * 64.0 - 5.5 * 3.5f64.powi(3)) / 12.0) < 1e-15);
    let i = ishape(12.0, 8.0, 0.5, 0.3);
    assert!(rel(i.ix, (8.0 * 1728.0 - 7.7 * 11.0f64.powi(3)) / 12.0) < 1e-13);
    assert!(rel(i.iy, 2.0 * 0.5 * 512.0 / 12.0 + 11.0 * 0.027 / 12.0) < 1e-13);
}

#[test]
fn strings_and_title_block() {
    let m = common::model(&format!(
        "calc {{\n  title = \"Post \\\"M-4\\\"\"\n  revision = \"B\"\n}}\n{}",
        common::ASSEMBLY
    ));
    assert_eq!(m.title.get("title"), Some("Post \"M-4\""));
    assert_eq!(m.title.get("revision"), Some("B"));
}

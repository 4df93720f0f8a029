//! Unit factors against their exact definitions.

use tandem::units::{lookup, Dimension};
use uom::si::{force, pressure};
use uom::Conversion;
use uom::ConversionFactor;

fn factor(name: &str) -> f64 {
    lookup(name).unwrap_or_else(|| panic!("unit {name}")).factor
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// NIST SP 811 (2008), Appendix B.8/B.9: the exact factors.
#[test]
fn factors_match_nist_sp811_exact_values() {
    let cases: &[(&str, f64)] = &[
        ("m", 1.0),
        ("cm", 0.01),
        ("mm", 0.001),
        ("in", 0.0254), // SP 811 B.8: inch = 2.54 E-02 m (exact)
        ("ft", 0.3048), // SP 811 B.8: foot = 3.048 E-01 m (exact)
        ("N", 1.0),
        ("kN", 1.0e3),
        ("MN", 1.0e6),
        ("lbf", 4.448_221_615_260_5), // SP 811 B.8: pound-force = 4.448 221 615 260 5 N (exact)
        ("kip", 4_448.221_615_260_5), // SP 811 B.8: kip = 4.448 222 E+03 N (1000 lbf)
        ("Pa", 1.0),
        ("kPa", 1.0e3),
        ("MPa", 1.0e6),
        ("GPa", 1.0e9),
        // lbf / in^2 from the exact lbf and inch: 4.4482216152605 / 0.00064516
        ("psi", 4.448_221_615_260_5 / 0.000_645_16),
        ("ksi", 4_448.221_615_260_5 / 0.000_645_16),
        // lbf / ft^2 from the exact lbf and foot: 4.4482216152605 / 0.09290304
        ("psf", 4.448_221_615_260_5 / 0.092_903_04),
        ("ksf", 4_448.221_615_260_5 / 0.092_903_04),
        ("degC", 1.0),       // SP 811 4.2.1.1: a Celsius interval equals a kelvin
        ("degF", 5.0 / 9.0), // SP 811 B.8: degree Fahrenheit interval = 5/9 K
        ("rad", 1.0),
        ("deg", std::f64::consts::PI / 180.0), // SP 811 B.8: degree = pi/180 rad
        ("percent", 0.01),
        ("microstrain", 1.0e-6),
    ];
    for (name, exact) in cases {
        let f = factor(name);
        assert!(rel(f, *exact) < 1e-15, "{name}: {f} vs exact {exact}");
    }
}

/// SP 811 B.8 prints psi as 6.894 757 E+03 Pa; the exact ratio carries on.
#[test]
fn psi_to_thirteen_digits() {
    assert!((factor("psi") - 6_894.757_293_168).abs() < 1e-9);
}

fn uom_factor<U: Conversion<f64>>() -> f64 {
    U::coefficient().value()
}

/// uom rounds the US force and pressure units to seven digits: ours must agree
/// with uom to 1e-6 while being exact.
#[test]
fn us_units_agree_with_uom_to_1e6() {
    let pairs = [
        ("lbf", uom_factor::<force::pound_force>()),
        ("kip", uom_factor::<force::kip>()),
        ("psi", uom_factor::<pressure::pound_force_per_square_inch>()),
        ("ksi", uom_factor::<pressure::kip_per_square_inch>()),
        ("psf", uom_factor::<pressure::pound_force_per_square_foot>()),
    ];
    for (name, u) in pairs {
        assert!(
            rel(factor(name), u) < 1e-6,
            "{name}: {} vs uom {u}",
            factor(name)
        );
    }
}

#[test]
fn dimensions_of_the_table() {
    assert_eq!(lookup("ksi").map(|u| u.dim), Some(Dimension::PRESSURE));
    assert_eq!(lookup("kip").map(|u| u.dim), Some(Dimension::FORCE));
    assert_eq!(lookup("ft").map(|u| u.dim), Some(Dimension::LENGTH));
    assert_eq!(lookup("degF").map(|u| u.dim), Some(Dimension::TEMPERATURE));
    assert_eq!(lookup("microstrain").map(|u| u.dim), Some(Dimension::NONE));
    assert_eq!(lookup("deg").map(|u| u.dim), Some(Dimension::NONE));
}

/// Every unit in the table is a unit name to the grammar, and so reserved.
#[test]
fn every_table_unit_parses_as_a_unit() {
    for u in tandem::units::units() {
        let text = format!("let x = 2 {}\nlet {} = 3\n", u.name, u.name);
        let src = tandem::source::Source::new("t", text);
        let errs = tandem::check(&src).expect_err("a unit cannot be declared");
        let msg = format!("{errs:?}");
        assert!(msg.contains("Reserved"), "{}: {msg}", u.name);
    }
}

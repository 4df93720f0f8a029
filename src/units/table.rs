//! The unit table: every unit name the language knows, its dimension and its
//! factor to SI.
//!
//! Factors and dimensions come from `uom`'s unit definitions where those are
//! exact (SI units and prefixes, inch, foot, angles, temperature intervals).
//! uom rounds the US customary force and pressure units to seven digits, so
//! those are derived here from the exact definitions of the pound
//! (0.453 592 37 kg), standard gravity (9.806 65 m/s²) and the inch
//! (0.0254 m), as NIST SP 811 gives them.

use std::sync::OnceLock;

use uom::si::{angle, force, length, pressure, ratio, temperature_interval};
use uom::typenum::Integer;
use uom::{Conversion, ConversionFactor};

use super::Dimension;

/// One unit name.
#[derive(Clone, Debug)]
pub struct Unit {
    pub name: &'static str,
    /// Multiply a value in this unit by `factor` to get SI base units.
    pub factor: f64,
    pub dim: Dimension,
    /// Where the factor comes from, for `tandem units`.
    pub source: &'static str,
}

fn coefficient<U: Conversion<f64>>() -> f64 {
    U::coefficient().value()
}

fn dimension<D: uom::si::Dimension + ?Sized>() -> Dimension {
    Dimension::new(
        D::L::to_i16(),
        D::M::to_i16(),
        D::T::to_i16(),
        D::Th::to_i16(),
    )
}

/// One pound-force in newtons: 0.453 592 37 kg × 9.806 65 m/s² (exact).
pub const LBF: f64 = 0.453_592_37 * 9.806_65;
/// One inch in metres (exact).
const INCH: f64 = 0.0254;
/// One foot in metres (exact).
const FOOT: f64 = 0.3048;

fn build() -> Vec<Unit> {
    let l = dimension::<length::Dimension>();
    let f = dimension::<force::Dimension>();
    let p = dimension::<pressure::Dimension>();
    let t = dimension::<temperature_interval::Dimension>();
    let a = dimension::<angle::Dimension>();
    let r = dimension::<ratio::Dimension>();
    let uom = "uom";
    let exact = "exact, from lb, g_n and in";
    vec![
        Unit {
            name: "m",
            factor: coefficient::<length::meter>(),
            dim: l,
            source: uom,
        },
        Unit {
            name: "cm",
            factor: coefficient::<length::centimeter>(),
            dim: l,
            source: uom,
        },
        Unit {
            name: "mm",
            factor: coefficient::<length::millimeter>(),
            dim: l,
            source: uom,
        },
        Unit {
            name: "in",
            factor: coefficient::<length::inch>(),
            dim: l,
            source: uom,
        },
        Unit {
            name: "ft",
            factor: coefficient::<length::foot>(),
            dim: l,
            source: uom,
        },
        Unit {
            name: "N",
            factor: coefficient::<force::newton>(),
            dim: f,
            source: uom,
        },
        Unit {
            name: "kN",
            factor: coefficient::<force::kilonewton>(),
            dim: f,
            source: uom,
        },
        Unit {
            name: "MN",
            factor: coefficient::<force::meganewton>(),
            dim: f,
            source: uom,
        },
        Unit {
            name: "lbf",
            factor: LBF,
            dim: f,
            source: exact,
        },
        Unit {
            name: "kip",
            factor: 1000.0 * LBF,
            dim: f,
            source: exact,
        },
        Unit {
            name: "Pa",
            factor: coefficient::<pressure::pascal>(),
            dim: p,
            source: uom,
        },
        Unit {
            name: "kPa",
            factor: coefficient::<pressure::kilopascal>(),
            dim: p,
            source: uom,
        },
        Unit {
            name: "MPa",
            factor: coefficient::<pressure::megapascal>(),
            dim: p,
            source: uom,
        },
        Unit {
            name: "GPa",
            factor: coefficient::<pressure::gigapascal>(),
            dim: p,
            source: uom,
        },
        Unit {
            name: "psi",
            factor: LBF / (INCH * INCH),
            dim: p,
            source: exact,
        },
        Unit {
            name: "ksi",
            factor: 1000.0 * LBF / (INCH * INCH),
            dim: p,
            source: exact,
        },
        Unit {
            name: "psf",
            factor: LBF / (FOOT * FOOT),
            dim: p,
            source: exact,
        },
        Unit {
            name: "ksf",
            factor: 1000.0 * LBF / (FOOT * FOOT),
            dim: p,
            source: exact,
        },
        Unit {
            name: "pcf",
            factor: LBF / (FOOT * FOOT * FOOT),
            dim: Dimension::new(-2, 1, -2, 0),
            source: exact,
        },
        Unit {
            name: "degC",
            factor: coefficient::<temperature_interval::degree_celsius>(),
            dim: t,
            source: uom,
        },
        Unit {
            name: "degF",
            factor: coefficient::<temperature_interval::degree_fahrenheit>(),
            dim: t,
            source: uom,
        },
        Unit {
            name: "deg",
            factor: coefficient::<angle::degree>(),
            dim: a,
            source: uom,
        },
        Unit {
            name: "rad",
            factor: coefficient::<angle::radian>(),
            dim: a,
            source: uom,
        },
        Unit {
            name: "percent",
            factor: coefficient::<ratio::percent>(),
            dim: r,
            source: uom,
        },
        Unit {
            name: "microstrain",
            factor: coefficient::<ratio::part_per_million>(),
            dim: r,
            source: uom,
        },
    ]
}

/// Every unit, in table order.
pub fn units() -> &'static [Unit] {
    static TABLE: OnceLock<Vec<Unit>> = OnceLock::new();
    TABLE.get_or_init(build)
}

/// The unit of this name, if it is one.
#[must_use]
pub fn lookup(name: &str) -> Option<&'static Unit> {
    static INDEX: OnceLock<foldhash::HashMap<&'static str, usize>> = OnceLock::new();
    let index = INDEX.get_or_init(|| {
        let mut m = foldhash::HashMap::default();
        for (i, u) in units().iter().enumerate() {
            // the first of a name wins, as in table order
            m.entry(u.name).or_insert(i);
        }
        m
    });
    index.get(name).map(|&i| &units()[i])
}

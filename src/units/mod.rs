//! Dimensions, run-time quantities and the unit table.
//!
//! A [`Quantity`] is a value in SI base units with a [`Dimension`] (an exponent
//! vector over length, mass, time and temperature). Unit arithmetic returns
//! span-free [`UnitError`]s; the model builder attaches the span.

mod table;

pub use table::{lookup, units, Unit};

/// The help for a word an engineer may write for a temperature change that
/// is not one of tandem's units (`K`, `C`, `F`, ...): temperature changes
/// are written in `degC` or `degF`. `K` is left free as a name because it
/// is the usual one for an effective-length factor.
#[must_use]
pub fn temperature_hint(word: &str) -> Option<&'static str> {
    match word {
        "K" | "kelvin" | "degK" => Some(
            "temperature changes are written in `degC` (a change of 1 K is 1 degC) or `degF`; a coefficient of expansion per kelvin is `/ degC`",
        ),
        "C" | "celsius" | "Celsius" | "F" | "fahrenheit" | "Fahrenheit" | "degc" | "degf" => {
            Some("temperature changes are written in `degC` or `degF`")
        }
        _ => None,
    }
}

use std::fmt;

/// Exponents of length, mass, time and temperature, stored in halves so that
/// `sqrt` of any quantity stays exact.
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug, Default, PartialOrd, Ord)]
pub struct Dimension {
    half: [i16; 4],
}

const BASE_SYMBOLS: [&str; 4] = ["m", "kg", "s", "K"];

impl Dimension {
    pub const NONE: Self = Self::new(0, 0, 0, 0);
    pub const LENGTH: Self = Self::new(1, 0, 0, 0);
    pub const AREA: Self = Self::new(2, 0, 0, 0);
    pub const SECOND_MOMENT: Self = Self::new(4, 0, 0, 0);
    pub const FORCE: Self = Self::new(1, 1, -2, 0);
    pub const PRESSURE: Self = Self::new(-1, 1, -2, 0);
    pub const STIFFNESS: Self = Self::new(0, 1, -2, 0);
    /// Force times length: a bending moment.
    pub const MOMENT: Self = Self::new(2, 1, -2, 0);
    pub const TEMPERATURE: Self = Self::new(0, 0, 0, 1);
    pub const PER_TEMPERATURE: Self = Self::new(0, 0, 0, -1);

    /// A dimension from whole exponents of length, mass, time, temperature.
    #[must_use]
    pub const fn new(l: i16, m: i16, t: i16, th: i16) -> Self {
        Self {
            half: [2 * l, 2 * m, 2 * t, 2 * th],
        }
    }

    /// The SI unit of this dimension as JSON writes it: `N`, `Pa`, `m`,
    /// `m^2`, `N/m`, `K`, `1` for a pure number, else the base units.
    #[must_use]
    pub fn si_symbol(self) -> String {
        match self {
            d if d == Self::NONE => "1".into(),
            d if d == Self::FORCE => "N".into(),
            d if d == Self::PRESSURE => "Pa".into(),
            d if d == Self::LENGTH => "m".into(),
            d if d == Self::AREA => "m^2".into(),
            d if d == Self::SECOND_MOMENT => "m^4".into(),
            d if d == Self::STIFFNESS => "N/m".into(),
            d if d == Self::MOMENT => "N*m".into(),
            d if d == Self::TEMPERATURE => "K".into(),
            d if d == Self::PER_TEMPERATURE => "1/K".into(),
            d => d.to_string(),
        }
    }

    #[must_use]
    pub fn is_none(self) -> bool {
        self == Self::NONE
    }

    #[must_use]
    pub fn mul(self, o: Self) -> Self {
        let mut half = self.half;
        for (h, x) in half.iter_mut().zip(o.half) {
            *h += x;
        }
        Self { half }
    }

    #[must_use]
    pub fn div(self, o: Self) -> Self {
        self.mul(o.recip())
    }

    #[must_use]
    pub fn recip(self) -> Self {
        Self {
            half: self.half.map(|h| -h),
        }
    }

    /// Raise to a power; `None` when an exponent would not be a multiple of 1/2.
    #[must_use]
    pub fn powf(self, p: f64) -> Option<Self> {
        let mut half = [0i16; 4];
        for (out, h) in half.iter_mut().zip(self.half) {
            let x = f64::from(h) * p;
            let r = x.round();
            if (x - r).abs() > 1e-9 || r.abs() > 1000.0 {
                return None;
            }
            // r is a small whole number, checked above
            #[allow(clippy::cast_possible_truncation)]
            {
                *out = r as i16;
            }
        }
        Some(Self { half })
    }

    /// The engineer's name for this dimension, when it has one.
    #[must_use]
    pub fn name(self) -> Option<&'static str> {
        NAMES.iter().find(|(d, _)| *d == self).map(|(_, n)| *n)
    }

    /// The name if it has one, else the SI base-unit form.
    #[must_use]
    pub fn describe(self) -> String {
        match self.name() {
            Some(n) => n.to_string(),
            None => format!("a quantity in {self}"),
        }
    }

    /// A unit that reads well as an example of this dimension.
    #[must_use]
    pub fn example(self) -> Option<&'static str> {
        EXAMPLES.iter().find(|(d, _)| *d == self).map(|(_, e)| *e)
    }
}

/// Names for messages. uom's kind names do not fit an engineer's ear
/// (stiffness would read "surface tension"), so we keep our own.
const NAMES: &[(Dimension, &str)] = &[
    (Dimension::NONE, "a dimensionless number"),
    (Dimension::LENGTH, "a length"),
    (Dimension::AREA, "an area"),
    (Dimension::new(3, 0, 0, 0), "a volume"),
    (Dimension::SECOND_MOMENT, "a second moment of area"),
    (Dimension::FORCE, "a force"),
    (Dimension::PRESSURE, "a pressure or stress"),
    (Dimension::STIFFNESS, "a force per length (stiffness)"),
    (Dimension::MOMENT, "a moment"),
    (
        Dimension::new(-2, 1, -2, 0),
        "a force per volume (unit weight)",
    ),
    (Dimension::TEMPERATURE, "a temperature change"),
    (Dimension::PER_TEMPERATURE, "a per-temperature coefficient"),
    (Dimension::new(0, 1, 0, 0), "a mass"),
    (Dimension::new(0, 0, 1, 0), "a time"),
];

const EXAMPLES: &[(Dimension, &str)] = &[
    (Dimension::NONE, "`2.0`"),
    (Dimension::LENGTH, "`14 ft` or `4.2 m`"),
    (Dimension::AREA, "`11.9 in^2` or `7680 mm^2`"),
    (Dimension::SECOND_MOMENT, "`160 in^4`"),
    (Dimension::FORCE, "`95 kip` or `420 kN`"),
    (Dimension::PRESSURE, "`29000 ksi` or `200 GPa`"),
    (Dimension::STIFFNESS, "`850 kip/in` or `150 kN/mm`"),
    (Dimension::TEMPERATURE, "`40 degF` or `25 degC`"),
    (
        Dimension::PER_TEMPERATURE,
        "`6.5e-6 / degF` or `12e-6 / degC`",
    ),
];

impl fmt::Display for Dimension {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.is_none() {
            return f.write_str("1");
        }
        let mut first = true;
        for (sym, h) in BASE_SYMBOLS.iter().zip(self.half) {
            if h == 0 {
                continue;
            }
            if !first {
                f.write_str("·")?;
            }
            first = false;
            if h == 2 {
                write!(f, "{sym}")?;
            } else if h % 2 == 0 {
                write!(f, "{sym}^{}", h / 2)?;
            } else {
                write!(f, "{sym}^({h}/2)")?;
            }
        }
        Ok(())
    }
}

/// A value in SI base units with its dimension.
#[derive(Clone, Copy, PartialEq, Debug)]
pub struct Quantity {
    pub value: f64,
    pub dim: Dimension,
}

/// Unit arithmetic failures, without a span; the caller attaches one.
#[derive(Clone, Debug, PartialEq)]
pub enum UnitError {
    /// `+`, `-`, `min`, `max` or a comparison of unlike dimensions.
    Mismatch { left: Dimension, right: Dimension },
    /// A power that would leave a fractional dimension, or a dimensioned exponent.
    BadPower { base: Dimension, exponent: f64 },
    /// The exponent itself carries a dimension.
    DimensionedExponent(Dimension),
    /// A computation gave NaN or an infinite value.
    NotFinite(&'static str),
}

impl Quantity {
    #[must_use]
    pub const fn new(value: f64, dim: Dimension) -> Self {
        Self { value, dim }
    }

    #[must_use]
    pub const fn number(value: f64) -> Self {
        Self::new(value, Dimension::NONE)
    }

    fn finite(self, what: &'static str) -> Result<Self, UnitError> {
        if self.value.is_finite() {
            Ok(self)
        } else {
            Err(UnitError::NotFinite(what))
        }
    }

    /// Sum of two quantities of one dimension.
    pub fn add(self, o: Self) -> Result<Self, UnitError> {
        self.same(o)?;
        Self::new(self.value + o.value, self.dim).finite("the sum overflows")
    }

    /// Difference of two quantities of one dimension.
    pub fn sub(self, o: Self) -> Result<Self, UnitError> {
        self.same(o)?;
        Self::new(self.value - o.value, self.dim).finite("the difference overflows")
    }

    /// Product.
    pub fn mul(self, o: Self) -> Result<Self, UnitError> {
        Self::new(self.value * o.value, self.dim.mul(o.dim)).finite("the product overflows")
    }

    /// Quotient.
    pub fn div(self, o: Self) -> Result<Self, UnitError> {
        if o.value == 0.0 {
            return Err(UnitError::NotFinite("division by zero"));
        }
        Self::new(self.value / o.value, self.dim.div(o.dim)).finite("the quotient overflows")
    }

    /// Power with a dimensionless exponent.
    pub fn pow(self, e: Self) -> Result<Self, UnitError> {
        if !e.dim.is_none() {
            return Err(UnitError::DimensionedExponent(e.dim));
        }
        let dim = self.dim.powf(e.value).ok_or(UnitError::BadPower {
            base: self.dim,
            exponent: e.value,
        })?;
        Self::new(self.value.powf(e.value), dim).finite("the power is not a finite number")
    }

    /// Square root.
    pub fn sqrt(self) -> Result<Self, UnitError> {
        if self.value < 0.0 {
            return Err(UnitError::NotFinite("square root of a negative value"));
        }
        self.pow(Self::number(0.5))
    }

    /// Error unless both have one dimension.
    pub fn same(self, o: Self) -> Result<(), UnitError> {
        if self.dim == o.dim {
            Ok(())
        } else {
            Err(UnitError::Mismatch {
                left: self.dim,
                right: o.dim,
            })
        }
    }
}

/// The unit table as aligned text, for `tandem units`.
#[must_use]
pub fn listing() -> String {
    let mut out = String::from(
        "unit         dimension                          SI factor                source\n",
    );
    for u in units() {
        out.push_str(&format!(
            "{:<12} {:<34} {:<24} {}\n",
            u.name,
            u.dim
                .name()
                .unwrap_or("?")
                .trim_start_matches("a ")
                .trim_start_matches("an "),
            format!(
                "{:e} {}",
                u.factor,
                if u.dim.is_none() {
                    String::new()
                } else {
                    u.dim.to_string()
                }
            ),
            u.source
        ));
    }
    out.push_str("\nCompound units are written with *, / and ^: in^2, kip/in, kN/m^3.\n");
    out
}

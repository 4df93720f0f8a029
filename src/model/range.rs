//! The sane range of every value that reaches the solver or a check.
//!
//! A value that is finite but absurd (an area of 1e-320 m², a node a
//! light-year away) would solve to forces of zero or infinity and pass; so
//! every input value of a known kind must be zero or a normal floating-point
//! number (no subnormals) whose magnitude lies within its kind's range
//! below. The ranges are wide enough for any assembly built by people (a
//! bolt thread to a bridge) and narrow enough that every product the solver
//! forms stays far from overflow and underflow. Documented in
//! `docs/language.md` ("Sane ranges").

use crate::units::{Dimension, Quantity};

/// `(dimension, smallest non-zero magnitude, largest magnitude)`, SI.
pub const RANGES: &[(Dimension, f64, f64, &str)] = &[
    (Dimension::LENGTH, 1e-9, 1e6, "1 nm to 1000 km"),
    (Dimension::AREA, 1e-12, 1e4, "1 µm² to 10⁴ m²"),
    (Dimension::SECOND_MOMENT, 1e-24, 1e6, "1e-24 m⁴ to 1e6 m⁴"),
    (Dimension::FORCE, 1e-6, 1e12, "1 µN to 10¹² N"),
    (Dimension::PRESSURE, 1e-3, 1e14, "1 mPa to 10¹⁴ Pa"),
    (Dimension::STIFFNESS, 1e-6, 1e18, "1 µN/m to 10¹⁸ N/m"),
    (
        Dimension::TEMPERATURE,
        1e-6,
        1e4,
        "1 µK to 10⁴ K (as a change)",
    ),
    (Dimension::PER_TEMPERATURE, 1e-12, 0.1, "1e-12 /K to 0.1 /K"),
    (Dimension::NONE, 1e-12, 1e9, "1e-12 to 1e9"),
];

/// A value in SI words, for messages: `1e-320 m²`.
#[must_use]
pub fn si_words(q: Quantity) -> String {
    let unit = match q.dim {
        Dimension::LENGTH => " m".to_string(),
        Dimension::AREA => " m²".to_string(),
        Dimension::SECOND_MOMENT => " m⁴".to_string(),
        Dimension::FORCE => " N".to_string(),
        Dimension::PRESSURE => " Pa".to_string(),
        Dimension::STIFFNESS => " N/m".to_string(),
        Dimension::TEMPERATURE => " K".to_string(),
        Dimension::PER_TEMPERATURE => " /K".to_string(),
        Dimension::NONE => String::new(),
        d => format!(" {d}"),
    };
    format!("{:e}{unit}", q.value)
}

/// Magnitudes of a kind not in [`RANGES`]: any normal number within these.
const OTHER: (f64, f64, &str) = (1e-30, 1e30, "1e-30 to 1e30 in SI units");

/// Why a value is out of its sane range, for the diagnostic.
#[derive(Clone, Debug, PartialEq)]
pub struct OutOfRange {
    /// "too small" or "too large" or "not a normal number".
    pub why: &'static str,
    /// The range in words.
    pub range: &'static str,
}

/// The range of a dimension: smallest non-zero and largest magnitude, in words.
#[must_use]
pub fn range_of(dim: Dimension) -> (f64, f64, &'static str) {
    RANGES
        .iter()
        .find(|r| r.0 == dim)
        .map_or(OTHER, |r| (r.1, r.2, r.3))
}

/// Whether `q` is zero or a normal number within its kind's range.
///
/// # Errors
/// What is wrong, and the range.
pub fn check(q: Quantity) -> Result<(), OutOfRange> {
    let v = q.value;
    let (lo, hi, range) = range_of(q.dim);
    if !v.is_finite() || v.is_subnormal() {
        return Err(OutOfRange {
            why: "not a normal number",
            range,
        });
    }
    let m = v.abs();
    if m == 0.0 {
        Ok(())
    } else if m < lo {
        Err(OutOfRange {
            why: "too small",
            range,
        })
    } else if m > hi {
        Err(OutOfRange {
            why: "too large",
            range,
        })
    } else {
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn subnormal_tiny_and_huge_values_are_refused() {
        let area = |v| check(Quantity::new(v, Dimension::AREA));
        assert!(area(0.0).is_ok());
        assert!(area(1e-4).is_ok());
        assert_eq!(
            area(1e-320).expect_err("refused").why,
            "not a normal number"
        );
        assert_eq!(area(1e-300).expect_err("refused").why, "too small");
        assert_eq!(area(1e300).expect_err("refused").why, "too large");
        assert_eq!(
            check(Quantity::new(f64::NAN, Dimension::LENGTH))
                .expect_err("refused")
                .why,
            "not a normal number"
        );
        assert!(check(Quantity::new(1e308, Dimension::LENGTH)).is_err());
    }
}

//! Display units and engineering number formatting.

use crate::model::{Model, UnitChoice};
use crate::units::{lookup, Dimension, Quantity};

/// A unit to show values in.
#[derive(Clone, Debug, PartialEq)]
pub struct Shown {
    pub name: String,
    pub factor: f64,
}

impl Shown {
    fn of(name: &str) -> Self {
        Self {
            name: name.to_string(),
            factor: lookup(name).map_or(1.0, |u| u.factor),
        }
    }

    /// A unit shown under another name (`°F` for `degF`).
    fn named(shown: &str, unit: &str) -> Self {
        Self {
            name: shown.to_string(),
            factor: lookup(unit).map_or(1.0, |u| u.factor),
        }
    }

    /// A compound such as `kip/in` from its parts.
    fn ratio(a: &Shown, b: &Shown) -> Self {
        Self {
            name: format!("{}/{}", a.name, b.name),
            factor: a.factor / b.factor,
        }
    }

    /// A product such as `kip·ft` from its parts.
    fn product(a: &Shown, b: &Shown) -> Self {
        Self {
            name: format!("{}·{}", a.name, b.name),
            factor: a.factor * b.factor,
        }
    }

    fn squared(a: &Shown) -> Self {
        Self {
            name: format!("{}²", a.name),
            factor: a.factor * a.factor,
        }
    }

    /// The value of an SI amount in this unit.
    pub fn value(&self, si: f64) -> f64 {
        si / self.factor
    }
}

/// The units and precision a report or table uses.
#[derive(Clone, Debug, PartialEq)]
pub struct Display {
    pub force: Shown,
    pub stress: Shown,
    /// Lengths of parts and node positions.
    pub length: Shown,
    /// Displacements, elongations, misfits, gaps.
    pub small: Shown,
    pub area: Shown,
    pub stiffness: Shown,
    pub temperature: Shown,
    /// Bending moments: the force unit times the length unit (`kip·ft`,
    /// `kN·m`) unless a moment unit is listed.
    pub moment: Shown,
    /// Significant figures.
    pub digits: usize,
}

const US: &[&str] = &[
    "in", "ft", "lbf", "kip", "psi", "ksi", "psf", "ksf", "degF", "pcf",
];

impl Display {
    /// US customary: kip, ksi, ft, in.
    pub fn us(digits: usize) -> Self {
        let small = Shown::of("in");
        Self {
            force: Shown::of("kip"),
            stress: Shown::of("ksi"),
            length: Shown::of("ft"),
            area: Shown::squared(&small),
            stiffness: Shown::ratio(&Shown::of("kip"), &small),
            small,
            temperature: Shown::named("°F", "degF"),
            moment: Shown::product(&Shown::of("kip"), &Shown::of("ft")),
            digits,
        }
    }

    /// SI: kN, MPa, m, mm.
    pub fn si(digits: usize) -> Self {
        let small = Shown::of("mm");
        Self {
            force: Shown::of("kN"),
            stress: Shown::of("MPa"),
            length: Shown::of("m"),
            area: Shown::squared(&small),
            stiffness: Shown::ratio(&Shown::of("kN"), &small),
            small,
            temperature: Shown::named("°C", "degC"),
            moment: Shown::product(&Shown::of("kN"), &Shown::of("m")),
            digits,
        }
    }

    /// From the file's `units` line, else from the units it writes most.
    pub fn for_model(model: &Model, digits: usize) -> Self {
        Self::for_model_with(model, &model.units, digits)
    }

    /// The display for a model under a unit choice (from the file or the
    /// command line). Unless the choice lists a length unit, an assembly
    /// whose every position and part length is under one foot (or metre) is
    /// shown in inches (or millimetres), so that a 4 in bolt grip does not
    /// read as 0.3333 ft.
    pub fn for_model_with(model: &Model, choice: &UnitChoice, digits: usize) -> Self {
        let mut d = Self::choose(choice, &model.unit_usage, digits);
        if !matches!(choice, UnitChoice::List(_)) {
            let longest = model
                .parts
                .iter()
                .map(|p| p.length.value)
                .chain(
                    model
                        .nodes
                        .iter()
                        .flat_map(|n| [n.x.value.abs(), n.y.value.abs()]),
                )
                .fold(0.0, f64::max);
            if longest > 0.0 && longest < d.length.factor {
                d.length = d.small.clone();
            }
        }
        if !matches!(choice, UnitChoice::List(l) if l.iter().any(|(_, q)| q.dim == Dimension::MOMENT))
        {
            d.moment = Shown::product(&d.force, &d.length);
        }
        d
    }

    /// Resolve a choice against the file's unit usage.
    pub fn choose(choice: &UnitChoice, usage: &[(String, usize)], digits: usize) -> Self {
        match choice {
            UnitChoice::Us => Self::us(digits),
            UnitChoice::Si => Self::si(digits),
            UnitChoice::Auto => {
                let us: usize = usage
                    .iter()
                    .filter(|(n, _)| US.contains(&n.as_str()))
                    .map(|(_, c)| c)
                    .sum();
                let all: usize = usage.iter().map(|(_, c)| c).sum();
                let mut d = if us * 2 >= all && us > 0 {
                    Self::us(digits)
                } else {
                    Self::si(digits)
                };
                let system_us = d.force.name == "kip";
                // Within the system, the force and stress units written most.
                let most = |dim: Dimension| {
                    usage
                        .iter()
                        .filter(|(n, _)| {
                            lookup(n).is_some_and(|u| u.dim == dim)
                                && US.contains(&n.as_str()) == system_us
                                // GPa is written for moduli; stresses read in MPa
                                && n != "GPa"
                        })
                        .max_by_key(|(_, c)| *c)
                        .map(|(n, _)| Shown::of(n))
                };
                if let Some(f) = most(Dimension::FORCE) {
                    d.stiffness = Shown::ratio(&f, &d.small);
                    d.force = f;
                }
                if let Some(s) = most(Dimension::PRESSURE) {
                    d.stress = s;
                }
                d
            }
            UnitChoice::List(list) => {
                let us = list
                    .iter()
                    .filter(|(n, _)| n.split(['/', '*', '^']).any(|p| US.contains(&p)))
                    .count();
                let mut d = if us * 2 >= list.len() {
                    Self::us(digits)
                } else {
                    Self::si(digits)
                };
                for (name, q) in list {
                    let s = Shown {
                        name: name.clone(),
                        factor: q.value,
                    };
                    match q.dim {
                        Dimension::FORCE => d.force = s,
                        Dimension::PRESSURE => d.stress = s,
                        Dimension::LENGTH => {
                            // positions and lengths in the unit listed;
                            // displacements, elongations and gaps in its
                            // smaller companion, so that a displacement
                            // never reads as 0.0003340 m
                            d.small = match s.name.as_str() {
                                "ft" | "yd" | "mi" => Shown::of("in"),
                                "m" | "km" => Shown::of("mm"),
                                _ => s.clone(),
                            };
                            d.length = s;
                        }
                        Dimension::AREA => d.area = s,
                        Dimension::MOMENT => d.moment = s,
                        Dimension::STIFFNESS => d.stiffness = s,
                        Dimension::TEMPERATURE => {
                            d.temperature = match s.name.as_str() {
                                "degF" => Shown::named("°F", "degF"),
                                "degC" => Shown::named("°C", "degC"),
                                _ => s,
                            }
                        }
                        _ => {}
                    }
                }
                d
            }
        }
    }

    /// The unit of a load along a beam: force over length (`kN/m`).
    #[must_use]
    pub fn per_length(&self) -> Shown {
        Shown::ratio(&self.force, &self.length)
    }

    /// The unit for a quantity of this dimension, if the display has one.
    pub fn unit_for(&self, dim: Dimension) -> Option<&Shown> {
        Some(match dim {
            Dimension::FORCE => &self.force,
            Dimension::PRESSURE => &self.stress,
            Dimension::LENGTH => &self.small,
            Dimension::AREA => &self.area,
            Dimension::STIFFNESS => &self.stiffness,
            Dimension::TEMPERATURE => &self.temperature,
            Dimension::MOMENT => &self.moment,
            _ => return None,
        })
    }

    /// A quantity as `value unit` (SI base form for unnamed dimensions).
    pub fn quantity(&self, q: Quantity) -> String {
        match self.unit_for(q.dim) {
            Some(u) => format!("{} {}", number(u.value(q.value), self.digits), u.name),
            None if q.dim.is_none() => number(q.value, self.digits),
            None if q.dim == Dimension::PER_TEMPERATURE => format!(
                "{} /{}",
                number(q.value * self.temperature.factor, self.digits),
                self.temperature.name
            ),
            None if q.dim == Dimension::SECOND_MOMENT => {
                let f = self.small.factor.powi(4);
                format!("{} {}⁴", number(q.value / f, self.digits), self.small.name)
            }
            None => format!("{} {}", number(q.value, self.digits), q.dim),
        }
    }
}

/// A utilization (demand over capacity) to three decimals, `1.076`,
/// `0.904`; `—` where it is undefined (a capacity that is not positive).
/// The one place a utilization is rounded for printing.
#[must_use]
pub fn utilization(u: Option<f64>) -> String {
    match u {
        // `+ 0.0` and the check for a rounded zero keep `-0.000` out
        Some(u) if (u * 1000.0).round() == 0.0 => "0.000".into(),
        Some(u) if u.is_finite() => format!("{:.3}", u + 0.0),
        _ => "—".into(),
    }
}

/// A check's value and limit as a table shows them, `value` and `<= limit`:
/// the line reads true exactly when the check passes.
pub fn written(o: &crate::checks::Outcome, d: &Display) -> [String; 2] {
    let (value, limit) = o.written();
    [
        d.quantity(value),
        format!("{} {}", o.op.symbol(), d.quantity(limit)),
    ]
}

/// A check's result cell: `pass`, or a failure marked for the eye
/// (`**FAIL**` in Markdown, `FAIL` in plain text).
pub fn verdict(pass: bool, markdown: bool) -> String {
    match (pass, markdown) {
        (true, _) => "pass",
        (false, true) => "**FAIL**",
        (false, false) => "FAIL",
    }
    .into()
}

/// Values of one kind below this fraction of the largest of that kind in
/// their combination are round-off and print as 0 in text and Markdown
/// (JSON keeps the raw value). The same relative 1e-9 as the band within
/// which two utilizations tie (common practice).
pub const ROUND_OFF: f64 = 1e-9;

/// The largest magnitudes of one combination's results, by kind, for
/// printing round-off as 0 ([`ROUND_OFF`]). All zero: nothing is chopped.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Scales {
    pub force: f64,
    pub stress: f64,
    /// Displacements and elongations.
    pub small: f64,
    pub strain: f64,
    /// Bending moments.
    pub moment: f64,
}

impl Scales {
    /// The scales of a combination's results.
    #[must_use]
    pub fn of(r: &crate::solve::CombinationResult) -> Self {
        let mut s = Self {
            force: r.force_scale.value,
            ..Self::default()
        };
        for p in &r.parts {
            s.stress = s.stress.max(p.stress.map_or(0.0, |x| x.value.abs()));
            s.small = s.small.max(p.elongation.value.abs());
            s.strain = s.strain.max(p.strain.abs());
        }
        for n in &r.nodes {
            for d in 0..2 {
                s.small = s.small.max(n.displacement[d].value.abs());
            }
            s.moment = s.moment.max(n.reaction_moment.abs());
        }
        for b in &r.beams {
            s.moment = s.moment.max(b.moment_max.0.abs());
            s.force = s.force.max(b.shear_max.abs());
            s.small = s.small.max(b.deflection_max.0.abs());
        }
        s
    }

    #[must_use]
    pub fn force(&self, v: f64) -> f64 {
        chop(v, self.force)
    }
    #[must_use]
    pub fn stress(&self, v: f64) -> f64 {
        chop(v, self.stress)
    }
    #[must_use]
    pub fn small(&self, v: f64) -> f64 {
        chop(v, self.small)
    }
    #[must_use]
    pub fn strain(&self, v: f64) -> f64 {
        chop(v, self.strain)
    }
    #[must_use]
    pub fn moment(&self, v: f64) -> f64 {
        chop(v, self.moment)
    }
}

fn chop(v: f64, scale: f64) -> f64 {
    if v.abs() < ROUND_OFF * scale {
        0.0
    } else {
        v
    }
}

pub use crate::words::number;

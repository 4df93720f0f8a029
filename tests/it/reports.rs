#![allow(
    clippy::cast_possible_truncation,
    clippy::cast_possible_wrap,
    clippy::unnecessary_lazy_evaluations,
    clippy::same_item_push,
    clippy::float_cmp
)]
//! Golden reports, report structure (parsed back with comrak), HTML sanity,
//! and a check that every substituted equation adds up.
//!
//! Goldens: every `examples/NAME.tandem` and `tests/reports/NAME.tandem`
//! writes `tests/reports/NAME.md`. Regenerate with
//! `UPDATE_GOLDEN=1 cargo test --test it reports::` and review the diff.

use std::path::{Path, PathBuf};

use comrak::nodes::NodeValue;
use tandem::report::Display;
use tandem::source::Source;
use tandem::units::{lookup, Dimension};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn inputs() -> Vec<PathBuf> {
    let mut v = Vec::new();
    for dir in ["examples", "tests/reports"] {
        for e in std::fs::read_dir(root().join(dir))
            .expect("folder")
            .flatten()
        {
            let p = e.path();
            if p.extension().is_some_and(|x| x == "tandem") {
                v.push(p);
            }
        }
    }
    v.sort();
    v
}

fn name_of(p: &Path) -> String {
    p.strip_prefix(root()).unwrap_or(p).display().to_string()
}

fn render(path: &Path) -> (String, tandem::Analysis) {
    let text = std::fs::read_to_string(path).expect("read");
    let src = Source::new(name_of(path), text);
    let a = match tandem::analyse(&src) {
        Ok(a) => a,
        Err(e) => panic!("{}", tandem::diagnostic::render(&e, &src, 100, false)),
    };
    let d = Display::for_model(&a.model, 4);
    let md = tandem::report::markdown::report(&src, &a, &d);
    (md, a)
}

#[test]
fn golden_reports() {
    let update = std::env::var_os("UPDATE_GOLDEN").is_some();
    let mut changed = Vec::new();
    for path in inputs() {
        let (md, _) = render(&path);
        let stem = path
            .file_stem()
            .map(|s| s.to_string_lossy().to_string())
            .unwrap_or_default();
        let golden = root().join("tests/reports").join(format!("{stem}.md"));
        if update {
            std::fs::write(&golden, &md).expect("write golden");
        } else if std::fs::read_to_string(&golden).unwrap_or_default() != md {
            changed.push(stem);
        }
    }
    assert!(
        changed.is_empty(),
        "reports changed (UPDATE_GOLDEN=1 to accept): {changed:?}"
    );
}

#[test]
fn reports_are_deterministic() {
    for path in inputs() {
        assert_eq!(render(&path).0, render(&path).0);
    }
}

fn text_of<'a>(node: &'a comrak::nodes::AstNode<'a>) -> String {
    let mut s = String::new();
    for d in node.descendants() {
        match &d.data.borrow().value {
            NodeValue::Text(t) => s.push_str(t),
            NodeValue::Code(c) => s.push_str(&c.literal),
            _ => {}
        }
    }
    s
}

/// The Markdown parses as GFM with the expected headings and table sizes.
#[test]
fn report_structure() {
    for path in inputs() {
        let (md, a) = render(&path);
        let arena = comrak::Arena::new();
        let mut options = comrak::Options::default();
        options.extension.table = true;
        let root = comrak::parse_document(&arena, &md, &options);
        let mut headings = Vec::new();
        let mut tables: Vec<(String, usize)> = Vec::new();
        for node in root.children() {
            match &node.data.borrow().value {
                NodeValue::Heading(_) => headings.push(text_of(node)),
                NodeValue::Table(_) => {
                    let rows = node.children().count();
                    let head = node.first_child().map(|h| text_of(h)).unwrap_or_default();
                    tables.push((head, rows));
                }
                _ => {}
            }
        }
        for h in [
            "Summary",
            "Cautions",
            "Method and sign convention",
            "Inputs",
            "Materials",
            "Parts",
            "Design checks",
        ] {
            assert!(
                headings.iter().any(|x| x == h),
                "{}: heading {h} missing",
                name_of(&path)
            );
        }
        for c in &a.model.combinations {
            assert!(
                headings
                    .iter()
                    .any(|x| x.starts_with(&format!("Combination {} ", c.name))),
                "{}: combination {} missing in {headings:?}",
                name_of(&path),
                c.name
            );
        }
        let parts_table = tables
            .iter()
            .find(|(h, _)| h.starts_with("PartEndsMaterial"))
            .expect("parts table");
        assert_eq!(parts_table.1, a.model.parts.len() + 1, "{}", name_of(&path));
        if !a.checks.outcomes.is_empty() {
            let checks_table = tables
                .iter()
                .find(|(h, _)| h.starts_with("CheckCombinationValueLimit"))
                .expect("checks table");
            assert_eq!(checks_table.1, a.checks.outcomes.len() + 1);
        }
        assert!(md.contains("qualified engineer"));
        assert!(!md.contains('$'), "no math markup");
    }
}

#[test]
fn html_is_self_contained() {
    for path in inputs() {
        let (md, _) = render(&path);
        let html = tandem::report::html(&md, &tandem::model::Title::default(), "t", &[]);
        let dom = tl::parse(&html, tl::ParserOptions::default()).expect("HTML parses");
        let parser = dom.parser();
        assert!(dom
            .query_selector("table")
            .is_some_and(|mut q| q.next().is_some()));
        assert!(dom
            .query_selector("h1")
            .is_some_and(|mut q| q.next().is_some()));
        for tag in ["script", "link", "img", "iframe"] {
            assert!(
                dom.query_selector(tag)
                    .is_none_or(|mut q| q.next().is_none()),
                "{tag}"
            );
        }
        let _ = parser;
        assert!(
            !html.contains("http://") && !html.contains("https://"),
            "external URL"
        );
    }
}

// ---------------------------------------------------------------- arithmetic

/// An interval of SI values with a dimension.
#[derive(Clone, Copy, Debug)]
struct Iv {
    lo: f64,
    hi: f64,
    dim: Dimension,
}

impl Iv {
    fn add(self, o: Iv) -> Option<Iv> {
        (self.dim == o.dim || self.lo == 0.0 && self.hi == 0.0 || o.lo == 0.0 && o.hi == 0.0).then(
            || Iv {
                lo: self.lo + o.lo,
                hi: self.hi + o.hi,
                dim: if self.lo == 0.0 && self.hi == 0.0 {
                    o.dim
                } else {
                    self.dim
                },
            },
        )
    }
    fn neg(self) -> Iv {
        Iv {
            lo: -self.hi,
            hi: -self.lo,
            dim: self.dim,
        }
    }
    fn mul(self, o: Iv) -> Iv {
        let c = [
            self.lo * o.lo,
            self.lo * o.hi,
            self.hi * o.lo,
            self.hi * o.hi,
        ];
        Iv {
            lo: c.iter().copied().fold(f64::INFINITY, f64::min),
            hi: c.iter().copied().fold(f64::NEG_INFINITY, f64::max),
            dim: self.dim.mul(o.dim),
        }
    }
    fn div(self, o: Iv) -> Option<Iv> {
        if o.lo <= 0.0 && o.hi >= 0.0 {
            return None;
        }
        let inv = Iv {
            lo: 1.0 / o.hi,
            hi: 1.0 / o.lo,
            dim: o.dim.recip(),
        };
        Some(self.mul(inv))
    }
    fn overlaps(self, o: Iv) -> bool {
        let tol = 1e-9
            * self
                .hi
                .abs()
                .max(o.hi.abs())
                .max(self.lo.abs())
                .max(o.lo.abs());
        (self.dim == o.dim || self.lo == 0.0 && self.hi == 0.0 || o.lo == 0.0 && o.hi == 0.0)
            && self.lo <= o.hi + tol
            && o.lo <= self.hi + tol
    }
}

/// A printed number's interval given `sig` significant figures.
fn number_interval(text: &str, sig: i32) -> Option<(f64, f64)> {
    let v: f64 = text.parse().ok()?;
    if v == 0.0 {
        return Some((0.0, 0.0));
    }
    let (mantissa, exp) = match text.split_once(['e', 'E']) {
        Some((m, e)) => (m, e.parse::<i32>().ok()?),
        None => (text, 0),
    };
    let decimals = mantissa.split_once('.').map_or(0, |(_, d)| d.len() as i32);
    let ulp_written = 10f64.powi(exp - decimals);
    let ulp_sig = 10f64.powi(v.abs().log10().floor() as i32 - (sig - 1));
    let half = 0.5 * ulp_written.max(ulp_sig);
    Some((v - half, v + half))
}

fn unit_factor(token: &str) -> Option<(f64, Dimension)> {
    let mut factor = 1.0;
    let mut dim = Dimension::NONE;
    let mut divide = false;
    let mut name = String::new();
    let flush =
        |name: &mut String, divide: bool, factor: &mut f64, dim: &mut Dimension| -> Option<()> {
            if name.is_empty() {
                return Some(());
            }
            let (base, power) = match name.chars().last() {
                Some('²') => (name.trim_end_matches('²').to_string(), 2),
                Some('³') => (name.trim_end_matches('³').to_string(), 3),
                Some('⁴') => (name.trim_end_matches('⁴').to_string(), 4),
                _ => (name.clone(), 1),
            };
            let base = match base.as_str() {
                "°F" => "degF".to_string(),
                "°C" => "degC".to_string(),
                _ => base,
            };
            let u = lookup(&base)?;
            let p = if divide { -power } else { power };
            *factor *= u.factor.powi(p);
            for _ in 0..power {
                *dim = if divide {
                    dim.div(u.dim)
                } else {
                    dim.mul(u.dim)
                };
            }
            name.clear();
            Some(())
        };
    for ch in token.chars() {
        match ch {
            '/' => {
                flush(&mut name, divide, &mut factor, &mut dim)?;
                divide = true;
            }
            '·' => {
                flush(&mut name, divide, &mut factor, &mut dim)?;
                divide = false;
            }
            c => name.push(c),
        }
    }
    flush(&mut name, divide, &mut factor, &mut dim)?;
    Some((factor, dim))
}

/// Parse and evaluate a substituted expression as intervals; `None` when the
/// text is not purely numbers, units and operators.
struct Eval<'a> {
    toks: Vec<&'a str>,
    pos: usize,
    sig: i32,
}

impl<'a> Eval<'a> {
    fn new(text: &'a str, sig: i32) -> Self {
        // Tokens are separated by spaces; parentheses stick to what they enclose.
        let mut toks = Vec::new();
        for word in text.split(' ').filter(|w| !w.is_empty()) {
            let mut w = word;
            while let Some(rest) = w.strip_prefix('(') {
                toks.push("(");
                w = rest;
            }
            let mut closes = 0;
            while let Some(rest) = w.strip_suffix(')') {
                closes += 1;
                w = rest;
            }
            if !w.is_empty() {
                toks.push(w);
            }
            for _ in 0..closes {
                toks.push(")");
            }
        }
        Self { toks, pos: 0, sig }
    }
    fn peek(&self) -> Option<&'a str> {
        self.toks.get(self.pos).copied()
    }
    fn expr(&mut self) -> Option<Iv> {
        let mut acc = self.term()?;
        while let Some(op @ ("+" | "-")) = self.peek() {
            self.pos += 1;
            let t = self.term()?;
            acc = if op == "+" {
                acc.add(t)?
            } else {
                acc.add(t.neg())?
            };
        }
        Some(acc)
    }
    fn term(&mut self) -> Option<Iv> {
        let mut acc = self.factor()?;
        while let Some(op @ ("·" | "/")) = self.peek() {
            self.pos += 1;
            let t = self.factor()?;
            acc = if op == "·" { acc.mul(t) } else { acc.div(t)? };
        }
        Some(acc)
    }
    fn factor(&mut self) -> Option<Iv> {
        let t = self.peek()?;
        self.pos += 1;
        if t == "-" {
            return Some(self.factor()?.neg());
        }
        if t == "π²" {
            let v = std::f64::consts::PI * std::f64::consts::PI;
            return Some(Iv {
                lo: v,
                hi: v,
                dim: Dimension::NONE,
            });
        }
        if t == "(" {
            let v = self.expr()?;
            if self.peek()? != ")" {
                return None;
            }
            self.pos += 1;
            return Some(v);
        }
        // A number, possibly with an attached `/unit`.
        let (num, attached) = match t.find('/') {
            Some(i) if t[..i].parse::<f64>().is_ok() => (&t[..i], Some(&t[i..])),
            _ => (t, None),
        };
        let (lo, hi) = number_interval(num, self.sig)?;
        let mut iv = Iv {
            lo,
            hi,
            dim: Dimension::NONE,
        };
        let unit = match attached {
            Some(u) => Some(u.to_string()),
            None => match self.peek() {
                Some(u) if u.starts_with(|c: char| c.is_alphabetic() || c == '°' || c == 'µ') => {
                    self.pos += 1;
                    Some(u.to_string())
                }
                _ => None,
            },
        };
        if let Some(u) = unit {
            let (f, d) = unit_factor(&u)?;
            iv = iv.mul(Iv {
                lo: f,
                hi: f,
                dim: d,
            });
        }
        Some(iv)
    }
    fn whole(mut self) -> Option<Iv> {
        let v = self.expr()?;
        (self.pos == self.toks.len()).then_some(v)
    }
}

/// Every equation line: its numeric parts evaluate to one another within the
/// precision they are printed to.
#[test]
fn substituted_equations_add_up() {
    let mut checked = 0;
    for path in inputs() {
        let (md, _) = render(&path);
        for line in md.lines().filter_map(|l| l.strip_prefix("- ")) {
            let segments: Vec<&str> = line.split(" = ").collect();
            let numeric: Vec<(usize, Iv)> = segments
                .iter()
                .enumerate()
                .skip(1)
                .filter_map(|(i, s)| Eval::new(s.trim(), 4).whole().map(|v| (i, v)))
                .collect();
            for w in numeric.windows(2) {
                assert!(
                    w[0].1.overlaps(w[1].1),
                    "{}: `{}` does not equal `{}` in\n{line}\n{:?} vs {:?}",
                    name_of(&path),
                    segments[w[0].0],
                    segments[w[1].0],
                    w[0].1,
                    w[1].1
                );
                checked += 1;
            }
        }
    }
    assert!(checked > 100, "only {checked} equations checked");
}

/// Every equation a beam adds (stiffness terms, fixed-end moments, the
/// slope-deflection equations, end shears, the moment along it, its fibre
/// stress, ΣM at nodes and about the origin) is one the verifier reads:
/// its substituted numbers parse, so `substituted_equations_add_up` checks
/// them rather than passing them over.
#[test]
fn beam_equations_are_all_read_by_the_verifier() {
    let kinds = [
        "4EI/L",
        "2EI/L",
        "6EI/L²",
        "3EI/L",
        "EA/L",
        "w⊥",
        "FEM_",
        "Δ",
        "M_AB",
        "M_BA",
        "V_A",
        "V_B",
        "M(0)",
        "M(L)",
        "x₀",
        "M(x₀)",
        "σ = N/A",
        "ΣM at",
        "ΣM about",
        "E·I_eff",
    ];
    let mut seen = std::collections::HashSet::new();
    for name in ["flitch_lintel", "mezzanine_edge"] {
        let (md, _) = render(&root().join(format!("examples/{name}.tandem")));
        for line in md.lines().filter_map(|l| l.strip_prefix("- ")) {
            let Some(kind) = kinds.iter().find(|k| line.starts_with(*k)) else {
                continue;
            };
            if line.contains("is hinged") || line.contains("are hinged") {
                continue;
            }
            let numeric = line
                .split(" = ")
                .skip(1)
                .filter(|s| Eval::new(s.trim(), 4).whole().is_some())
                .count();
            assert!(numeric >= 2, "{name}: not verified: {line}");
            seen.insert(*kind);
        }
    }
    for k in kinds {
        if k != "3EI/L" {
            assert!(seen.contains(k), "no `{k}` equation in the beam examples");
        }
    }
}

/// The verifier itself catches arithmetic that does not add up.
#[test]
fn verifier_rejects_wrong_arithmetic() {
    let a = Eval::new("29000 ksi · 11.91 in² / 192.0 in", 4)
        .whole()
        .expect("parses");
    let b = Eval::new("1799 kip/in", 4).whole().expect("parses");
    let wrong = Eval::new("1810 kip/in", 4).whole().expect("parses");
    assert!(a.overlaps(b));
    assert!(!a.overlaps(wrong));
    let s = Eval::new("- (-67.66 kip) - (-87.34 kip) + (-155.0 kip)", 4)
        .whole()
        .expect("parses");
    assert!(s.overlaps(Eval::new("0 kip", 4).whole().expect("zero")));
    assert!(!s.overlaps(Eval::new("1.000 kip", 4).whole().expect("one")));
    assert!(Eval::new("N(core)", 4).whole().is_none());
}

/// Short assemblies show lengths in the small unit, long ones in the large
/// one, and a listed length unit wins (common practice: a 400 mm grip is
/// written in mm, a 16 ft column in ft).
#[test]
fn length_unit_follows_the_size_of_the_assembly() {
    let short = "material s { E = 200 GPa }\nnode a at 0 mm\nnode b at 400 mm\nfix a\n\
                 part p { material = s; area = 100 mm^2; ends = a, b }\nload b = 10 kN\n";
    let long = short.replace("400 mm", "4 m");
    let listed = format!("units kN, m\n{short}");
    let table = |text: &str| {
        let src = tandem::source::Source::new("len.tandem", text.to_string());
        let a = tandem::analyse(&src).expect("solves");
        let d = tandem::report::Display::for_model(&a.model, 4);
        tandem::report::markdown::report(&src, &a, &d)
    };
    // the unit is in the column's header, the cells are numbers
    assert!(table(short).contains("| Node | Position (mm) | Support |"));
    assert!(table(short).contains("| b | 400.0 | free |"));
    assert!(table(&long).contains("| Node | Position (m) | Support |"));
    assert!(table(&long).contains("| b | 4.000 | free |"));
    let listed = table(&listed);
    assert!(listed.contains("| Node | Position (m) | Support |"));
    assert!(listed.contains("| b | 0.4000 | free |"));
    // a listed metre keeps displacements in millimetres: 10 kN on
    // 100 mm² of 200 GPa over 400 mm stretches it 0.2 mm (Hooke's law)
    assert!(listed.contains("0.2000 mm"), "{listed}");
}

/// A `let` written as one number with a unit is shown in that unit, in the
/// inputs and in the sensitivity table alike: a load per length is not
/// turned into a stiffness unit, nor a millimetre into feet in a US calc
/// (common practice: the reviewer finds the file's own value).
#[test]
fn a_let_shows_in_the_unit_it_is_written_in() {
    let text = "let w = 0.4 kip/ft\nlet span = 12 ft\nlet h = 250 mm\nlet twice = 2 * w\n\
                material s { E = 29000 ksi; allowable = 20 ksi }\nnode a at 0 ft\nnode b at span\nfix a\n\
                part r { material = s; area = 1 in^2; ends = a, b }\n\
                load b = w * span + h * twice\ncheck \"r\" : r.stress <= 20 ksi\n";
    let src = tandem::source::Source::new("w.tandem", text.to_string());
    let mut a = tandem::analyse(&src).expect("solves");
    tandem::with_sensitivity(&src, &mut a);
    let d = tandem::report::Display::for_model(&a.model, 4);
    let md = tandem::report::markdown::report(&src, &a, &d);
    assert!(md.contains("| w | `0.4 kip/ft` | 0.4000 kip/ft |"), "{md}");
    assert!(md.contains("| h | `250 mm` | 250.0 mm |"), "{md}");
    // a derived `let` keeps the calc's unit for its kind (1 kip/ft is
    // 1/12 kip/in exactly: 0.8 kip/ft = 0.06667 kip/in)
    assert!(md.contains("0.06667 kip/in |"), "{md}");
    assert!(md.contains("| `w` | 0.4000 kip/ft |"), "{md}");
    assert!(md.contains("| `span` | 12.00 ft |"), "{md}");
}

/// A part with a buckling length that is never in compression has no
/// compression to compare with its Euler load; the table says so rather
/// than printing a zero force.
#[test]
fn buckling_row_of_a_part_in_tension_says_none() {
    let text = "material s { E = 200 GPa }\nnode a at 0 m\nnode b at 4 m\nfix a\n\
                part hanger { material = s; section = ring(d = 89 mm, t = 5 mm); ends = a, b; buckling_length = 4 m }\n\
                load b = 10 kN\n";
    let src = tandem::source::Source::new("hanger.tandem", text.to_string());
    let a = tandem::analyse(&src).expect("solves");
    let d = tandem::report::Display::for_model(&a.model, 4);
    let md = tandem::report::markdown::report(&src, &a, &d);
    assert!(md.contains("| none (never in compression) |"), "{md}");
}

/// Combinations that tie in exact arithmetic differ by round-off in the
/// solve; the first in the file governs, whatever the order of the
/// factorisation. A relative 1e-9 is the tie band (common practice).
#[test]
fn a_tie_within_round_off_keeps_the_first_combination() {
    use tandem::checks::exceeds;
    assert!(!exceeds(0.704 * (1.0 + 1e-13), 0.704));
    assert!(!exceeds(0.704, 0.704));
    assert!(exceeds(0.704 * (1.0 + 1e-6), 0.704));
    assert!(exceeds(f64::INFINITY, 1.0));
    assert!(!exceeds(1.0, f64::INFINITY));
    assert!(exceeds(1e-20, 0.0));
}

/// Numbers in reports are printed from their digits; the reference is the
/// standard library's exact decimal formatting of the rounded value (the
/// way they were printed before), over values of every everyday magnitude,
/// both signs, carries into the next decade and every precision.
#[test]
#[allow(
    clippy::cast_possible_truncation,
    clippy::cast_possible_wrap,
    clippy::cast_sign_loss
)]
fn numbers_print_as_the_standard_formatting_does() {
    fn reference(v: f64, digits: usize) -> String {
        let mag = v.abs().log10().floor() as i32;
        let sig = digits as i32;
        let scale = 10f64.powi(sig - 1 - mag);
        let rounded = (v * scale).round() / scale;
        let mag = if rounded.abs() >= 10f64.powi(mag + 1) {
            mag + 1
        } else {
            mag
        };
        let decimals = (sig - 1 - mag).max(0) as usize;
        let s = format!("{rounded:.decimals$}");
        if s.trim_start_matches('-')
            .chars()
            .all(|c| c == '0' || c == '.')
        {
            "0".into()
        } else {
            s
        }
    }
    // xorshift, so the values reproduce
    let mut state = 0x2545_F491_4F6C_DD1Du64;
    let mut next = || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    let mut values = vec![
        9.9996,
        -9.9996,
        0.99995,
        999_999_999.0,
        1e-6,
        0.000_123_45,
        123_456.0,
    ];
    for _ in 0..20_000 {
        let exp = -5.9 + 14.8 * next();
        let sign = if next() < 0.5 { -1.0 } else { 1.0 };
        values.push(sign * 10f64.powf(exp));
    }
    for v in values {
        for digits in 1..=15 {
            let (got, want) = (
                tandem::report::display::number(v, digits),
                reference(v, digits),
            );
            assert_eq!(got, want, "{v:e} to {digits} figures");
        }
    }
}

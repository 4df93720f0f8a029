//! The Markdown calculation: every input, every substituted equation, the
//! checks. Equations are plain Unicode text (σ, δ, Σ, ², ·) so they read the
//! same on a code host, in the HTML, in a terminal and in a diff:
//! `symbols = numbers with units = result`.

use std::fmt::Write as _;

use crate::checks::Origin;
use crate::history::History;
use crate::model::{Carries, Kind, Law, Model};
use crate::report::display::{number, utilization, verdict, written, Display, Scales, Shown};
use crate::report::text::combination_text;
use crate::solve::{PartState, Solution};
use crate::source::Source;
use crate::units::Dimension;

pub use crate::report::drawing::Drawing;
use crate::report::drawing::{drawable, sketch, MAX_DRAWN};

mod beams;
mod capacity;
mod combination;
mod equilibrium;
mod inputs;
mod long_term;
mod sensitivity;
mod stability;
mod title;

use capacity::capacity_section;
use combination::{combination, incidence};
use long_term::long_term_section;
use sensitivity::sensitivity_section;
use stability::buckling_section;
use title::{contents, title_block};

/// The cautions every report carries.
pub const CAUTIONS: &[&str] = &[
    "This calculation was prepared with tandem, a design aid. Its results must be checked by a qualified engineer before they are relied on; local codes and licensed practice govern.",
    "The model is linear-elastic and small-displacement; parts are pin-ended axial members or springs, beams are Euler–Bernoulli members (plane sections stay plane; shear deformation is neglected), and members that share nodes are taken as perfectly bonded there.",
    "Checks are only those written in the calc file and the material allowables it gives; they do not replace the checks the governing code requires.",
];

/// What a report carries beyond the calculation itself.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Options {
    pub figures: Figures,
    /// The calc file's place in git, for the title block.
    pub history: Option<History>,
}

/// Where a report's drawings go.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub enum Figures {
    /// Markdown on standard output: no drawings; a line says how to get them.
    #[default]
    Omitted,
    /// Files beside the report, linked from it: `STEM.sketch.svg`,
    /// `STEM.forces.COMBINATION.svg` (HTML puts them inline in place of
    /// the links).
    Beside(String),
}

/// A report and the drawings it links.
#[derive(Clone, Debug, PartialEq)]
pub struct Written {
    pub markdown: String,
    pub drawings: Vec<Drawing>,
}

struct Doc {
    out: String,
    figures: Figures,
    drawings: Vec<Drawing>,
    /// The level-2 headings, for the contents list.
    headings: Vec<String>,
}

impl Doc {
    /// A drawing, linked where it stands (when drawings are written).
    fn figure(&mut self, drawing: Drawing) {
        if let Figures::Beside(stem) = &self.figures {
            let _ = write!(
                self.out,
                "![{}]({}.{})\n\n",
                text(&drawing.caption),
                link_target(stem),
                drawing.suffix
            );
            self.drawings.push(drawing);
        }
    }

    fn h(&mut self, level: usize, text: &str) {
        if level == 2 {
            self.headings.push(text.to_string());
        }
        let _ = write!(self.out, "\n{} {}\n\n", "#".repeat(level), text);
    }
    fn p(&mut self, text: &str) {
        let _ = write!(self.out, "{text}\n\n");
    }
    fn eq(&mut self, text: &str) {
        let _ = writeln!(self.out, "- {text}");
    }
    fn end_list(&mut self) {
        self.out.push('\n');
    }
    fn table(&mut self, head: &[&str], rows: &[Vec<String>], right: &[usize]) {
        let cell = |s: &str| s.replace('|', "\\|");
        let _ = writeln!(
            self.out,
            "| {} |",
            head.iter().map(|h| cell(h)).collect::<Vec<_>>().join(" | ")
        );
        let _ = writeln!(
            self.out,
            "|{}|",
            (0..head.len())
                .map(|i| if right.contains(&i) { "---:" } else { "---" })
                .collect::<Vec<_>>()
                .join("|")
        );
        for r in rows {
            let _ = writeln!(
                self.out,
                "| {} |",
                r.iter().map(|c| cell(c)).collect::<Vec<_>>().join(" | ")
            );
        }
        self.out.push('\n');
    }
}

/// Formatting helpers bound to one display.
struct Fmt<'a> {
    d: &'a Display,
    /// The scales of the combination being written (round-off prints as 0).
    scales: std::cell::Cell<Scales>,
}

impl Fmt<'_> {
    fn n(&self, v: f64) -> String {
        number(v, self.d.digits)
    }
    fn with(&self, si: f64, u: &Shown) -> String {
        format!("{} {}", self.n(u.value(si)), u.name)
    }
    /// A value as it stands inside a sum or product: negatives in parentheses.
    fn term(&self, si: f64, u: &Shown) -> String {
        bracket_negative(self.with(si, u))
    }
    /// A value in a unit, as a number alone: for a table whose column
    /// header carries the unit.
    fn bare(&self, si: f64, u: &Shown) -> String {
        self.n(u.value(si))
    }
    fn force_bare(&self, si: f64) -> String {
        self.bare(self.scales.get().force(si), &self.d.force)
    }
    fn stress_bare(&self, si: f64) -> String {
        self.bare(self.scales.get().stress(si), &self.d.stress)
    }
    fn force(&self, si: f64) -> String {
        self.with(self.scales.get().force(si), &self.d.force)
    }
    fn force_t(&self, si: f64) -> String {
        self.term(self.scales.get().force(si), &self.d.force)
    }
    fn stress(&self, si: f64) -> String {
        self.with(self.scales.get().stress(si), &self.d.stress)
    }
    fn small(&self, si: f64) -> String {
        self.with(self.scales.get().small(si), &self.d.small)
    }
    fn small_t(&self, si: f64) -> String {
        self.term(self.scales.get().small(si), &self.d.small)
    }
    fn length(&self, si: f64) -> String {
        self.with(si, &self.d.length)
    }
    fn area(&self, si: f64) -> String {
        self.with(si, &self.d.area)
    }
    fn stiffness(&self, si: f64) -> String {
        self.with(si, &self.d.stiffness)
    }
    fn moment(&self, si: f64) -> String {
        self.with(self.scales.get().moment(si), &self.d.moment)
    }
    fn moment_t(&self, si: f64) -> String {
        self.term(self.scales.get().moment(si), &self.d.moment)
    }
    /// A second moment of area, in the small length unit to the fourth.
    fn inertia(&self, si: f64) -> String {
        let u = &self.d.small;
        format!("{} {}⁴", self.n(si / u.factor.powi(4)), u.name)
    }
    fn temp(&self, si: f64) -> String {
        self.term(si, &self.d.temperature)
    }
    fn alpha_bare(&self, si: f64) -> String {
        format!("{:.3e}", si * self.d.temperature.factor)
    }
    fn alpha(&self, si: f64) -> String {
        let t = &self.d.temperature;
        format!("{:.3e}/{}", si * t.factor, degree(&t.name))
    }
    fn plain(&self, v: f64) -> String {
        bracket_negative(self.n(v))
    }
}

/// `Force (kip)`: a column header with its unit.
fn head(label: &str, u: &Shown) -> String {
    format!("{label} ({})", u.name)
}

/// User text (a name, a label, a title field) as Markdown that shows it as
/// written: the characters Markdown would read as markup are escaped, so
/// `0.6*fy*phi` keeps its signs and raw HTML never passes into the page.
fn text(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        match c {
            '\\' | '`' | '*' | '_' | '<' | '>' | '[' | ']' | '~' | '#' | '&' => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            _ => out.push(c),
        }
    }
    out
}

/// User text as a code span, with a fence longer than any run of
/// backticks inside it.
fn code(s: &str) -> String {
    let s = s.replace(['\n', '\r'], " ");
    let mut longest = 0;
    let mut run = 0;
    for c in s.chars() {
        if c == '`' {
            run += 1;
            longest = longest.max(run);
        } else {
            run = 0;
        }
    }
    let fence = "`".repeat(longest + 1);
    let pad = if s.starts_with('`') || s.ends_with('`') {
        " "
    } else {
        ""
    };
    format!("{fence}{pad}{s}{pad}{fence}")
}

/// A negative value in parentheses, so `a - (-b)` reads unambiguously.
fn bracket_negative(s: String) -> String {
    if s.starts_with('-') {
        format!("({s})")
    } else {
        s
    }
}

fn degree(name: &str) -> String {
    match name {
        "degF" => "°F".into(),
        "degC" => "°C".into(),
        other => other.to_string(),
    }
}

/// The status-line outcome of `n` governing checks of which `fails` fail,
/// in plain English ("both checks pass", "1 of 3 checks fails").
fn checks_outcome(n: usize, fails: usize) -> String {
    match (n, fails) {
        (1, 0) => "the one check passes".to_string(),
        (2, 0) => "both checks pass".to_string(),
        (n, 0) => format!("all {n} checks pass"),
        (1, _) => "**the one check fails**".to_string(),
        (2, 2) => "**both checks fail**".to_string(),
        (n, f) if f == n => format!("**all {n} checks fail**"),
        (n, 1) => format!("**1 of {n} checks fails**"),
        (n, f) => format!("**{f} of {n} checks fail**"),
    }
}

/// Write the whole calculation for an analysed file, without drawings
/// (Markdown for standard output).
pub fn report(source: &Source, a: &crate::Analysis, display: &Display) -> String {
    report_with(source, a, display, &Options::default()).markdown
}

/// A file name as a Markdown link target: spaces and the characters a
/// link would read as its end are percent-encoded.
pub(crate) fn link_target(stem: &str) -> String {
    let mut out = String::with_capacity(stem.len());
    for c in stem.chars() {
        match c {
            ' ' => out.push_str("%20"),
            '(' => out.push_str("%28"),
            ')' => out.push_str("%29"),
            '<' => out.push_str("%3C"),
            '>' => out.push_str("%3E"),
            '%' => out.push_str("%25"),
            c => out.push(c),
        }
    }
    out
}

/// Write the whole calculation, with its drawings where `figures` says.
pub fn report_with(
    source: &Source,
    a: &crate::Analysis,
    display: &Display,
    options: &Options,
) -> Written {
    let figures = &options.figures;
    let (model, solution) = (&a.model, &a.solution);
    let f = Fmt {
        d: display,
        scales: std::cell::Cell::default(),
    };
    // Room for the whole document up front: grown by doubling, a report of
    // hundreds of MiB would be copied and its fresh pages touched again at
    // each step. About 700 bytes a part or node in each combination is an
    // upper bound for the benchmark assemblies (610 MiB for 10^6 parts and
    // 10^6 nodes, one combination). Memory reserved and never written costs
    // nothing on the usual systems; if the reservation is refused, the
    // string grows as it is written.
    let mut doc = Doc {
        out: String::new(),
        figures: if drawable(model) {
            figures.clone()
        } else {
            Figures::Omitted
        },
        drawings: Vec::new(),
        headings: Vec::new(),
    };
    let per_combination = 700 * (model.parts.len() + model.nodes.len());
    let estimate = 64 * 1024 + per_combination * (solution.combinations.len() + 1);
    let _ = doc.out.try_reserve(estimate);
    title_block(&mut doc, source, model, options.history.as_ref());
    let contents_at = doc.out.len();
    status_and_summary(&mut doc, &f, a);
    method(&mut doc, model, display);
    sketch_section(&mut doc, model, display, figures);
    inputs::section(&mut doc, &f, source, model);
    let incidence = incidence(model);
    for ci in 0..solution.combinations.len() {
        combination(&mut doc, &f, model, solution, ci, &incidence);
    }
    capacity_section(&mut doc, &f, a);
    long_term_section(&mut doc, &f, a);
    buckling_section(&mut doc, &f, a);
    design_checks(&mut doc, &f, source, a);
    sensitivity_section(&mut doc, &f, a);
    doc.out.insert_str(contents_at, &contents(&doc.headings));
    Written {
        markdown: doc.out.trim_end().to_string() + "\n",
        drawings: doc.drawings,
    }
}

/// The sketch of the assembly, or why there is none.
fn sketch_section(doc: &mut Doc, model: &Model, display: &Display, figures: &Figures) {
    doc.h(2, "Sketch of the assembly");
    if !drawable(model) {
        doc.p(&format!(
            "The assembly has {} parts and nodes, too many to draw legibly (at most {MAX_DRAWN}); this report carries no drawings.",
            model.parts.len() + model.nodes.len()
        ));
        return;
    }
    match figures {
        Figures::Omitted => doc.p("The drawings (a sketch of the assembly and, per combination, the forces and the displaced shape) are written as SVG files beside the report with `-o FILE.md`, or inline with `--html`."),
        Figures::Beside(_) => {
            doc.p(match model.kind {
                Kind::Plane => "Drawn at true geometry and scale; the key explains the symbols.",
                Kind::Axial => "Drawn as a schematic column: nodes in position order from the bottom up (not to scale), parts that span the same nodes side by side; the key explains the symbols.",
            });
            if !crate::report::drawing::names_fit(model) {
                doc.p("The parts side by side are too many to name in the drawings; the tables name them, in the order drawn from left to right where they span the same nodes.");
            }
            doc.figure(sketch(model, display));
        }
    }
}

/// The status line and the summary of every combination.
fn status_and_summary(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    let (model, solution, checks) = (&a.model, &a.solution, &a.checks);
    // Status line.
    let governing = checks.governing();
    let fails = checks.failures();
    let status = if governing.is_empty() {
        "no checks are written in this calc".to_string()
    } else {
        checks_outcome(governing.len(), fails)
    };
    let highest = checks.highest().map_or(String::new(), |o| {
        format!(
            "; highest utilization {} ({}, combination `{}`)",
            utilization(o.utilization),
            text(&o.label),
            solution.combinations[o.combination].name
        )
    });
    let long = match &a.long_term_checks {
        Some((_, c)) => format!(
            "; {} in the long-term state",
            checks_outcome(c.governing().len(), c.failures())
        ),
        None => String::new(),
    };
    doc.p(&format!("**Status:** {status}{highest}{long}."));
    if !a.left_out.is_empty() {
        doc.p(&format!(
            "**Incomplete:** {}; this calculation is not complete and does not stand as a design check.",
            crate::report::left_out(&a.left_out)
        ));
    }

    // Summary.
    doc.h(2, "Summary");
    if !governing.is_empty() {
        let rows: Vec<Vec<String>> = governing
            .iter()
            .map(|o| {
                vec![
                    text(&o.label),
                    format!("`{}`", solution.combinations[o.combination].name),
                    utilization(o.utilization),
                    verdict(o.pass, true),
                ]
            })
            .collect();
        doc.table(
            &["Check", "Governing combination", "Utilization", "Result"],
            &rows,
            &[2],
        );
    }
    let mut rows = Vec::new();
    for (i, p) in model.parts.iter().enumerate() {
        let (mut fmax, mut cf) = (0.0f64, 0usize);
        for (k, c) in solution.combinations.iter().enumerate() {
            let v = c.parts[i].force.value;
            // a tie within round-off keeps the first combination
            if crate::checks::exceeds(v.abs(), fmax.abs()) {
                fmax = v;
                cf = k;
            }
        }
        let smax = solution.combinations[cf].parts[i].stress.map(|s| s.value);
        rows.push(vec![
            text(&p.name),
            f.force_bare(fmax),
            smax.map_or("—".into(), |s| f.stress_bare(s)),
            format!("`{}`", solution.combinations[cf].name),
        ]);
    }
    doc.p("Largest force in each part over all combinations (tension positive):");
    doc.table(
        &[
            "Part",
            &head("Force", &f.d.force),
            &head("Stress", &f.d.stress),
            "Combination",
        ],
        &rows,
        &[1, 2],
    );
    let beams: Vec<usize> = (0..model.parts.len())
        .filter(|&i| model.parts[i].bend.is_some())
        .collect();
    if !beams.is_empty() {
        let rows: Vec<Vec<String>> = beams
            .iter()
            .map(|&i| {
                let (mut best, mut cb) = (None::<&crate::solve::BeamResult>, 0usize);
                for (k, c) in solution.combinations.iter().enumerate() {
                    if let Some(b) = c.beam(i) {
                        let larger = best.is_none_or(|x| {
                            crate::checks::exceeds(b.moment_max.0.abs(), x.moment_max.0.abs())
                        });
                        if larger {
                            best = Some(b);
                            cb = k;
                        }
                    }
                }
                let (m, at, defl) = best.map_or((0.0, 0.0, 0.0), |b| {
                    (b.moment_max.0, b.moment_max.1, b.deflection_max.0)
                });
                vec![
                    text(&model.parts[i].name),
                    f.bare(m, &f.d.moment),
                    f.bare(at, &f.d.length),
                    f.bare(defl, &f.d.small),
                    format!("`{}`", solution.combinations[cb].name),
                ]
            })
            .collect();
        doc.p("Largest bending moment in each beam over all combinations (positive where the fibre on the right of the direction from end A to end B is in tension), where it is, and the beam's deflection across its chord in that combination:");
        doc.table(
            &[
                "Beam",
                &head("Moment", &f.d.moment),
                &head("At, from end A", &f.d.length),
                &head("Deflection", &f.d.small),
                "Combination",
            ],
            &rows,
            &[1, 2, 3],
        );
    }
    for w in &solution.warnings {
        doc.p(&format!("**Warning:** {w}."));
    }
    for b in &a.buckling {
        for w in b.warnings(model) {
            doc.p(&format!("**Warning:** {w}."));
        }
    }
    for w in checks.beyond_yield(model, solution) {
        doc.p(&format!("**Warning:** {w}."));
    }
}

/// A table of checks: each with its combination, value, limit, utilization
/// and result.
fn check_table(doc: &mut Doc, combination: &str, rows: &[Vec<String>]) {
    doc.table(
        &[
            "Check",
            combination,
            "Value",
            "Limit",
            "Utilization",
            "Result",
        ],
        rows,
        &[2, 3, 4],
    );
}

/// The cautions, the method and the sign convention.
fn method(doc: &mut Doc, model: &Model, display: &Display) {
    doc.h(2, "Cautions");
    for c in CAUTIONS {
        doc.eq(c);
    }
    doc.end_list();

    doc.h(2, "Method and sign convention");
    doc.p(&format!(
        "Where several parts share a load, statics alone cannot split it among them; the calculation therefore joins three sets of equations. Each part obeys Hooke's law, N = k·(δ − δ₀), with k = E·A/L and δ₀ the elongation it would take free of force (misfit, temperature α·ΔT·L, free strain ε·L). Compatibility requires the parts' elongations to follow from the displacements of the nodes they share{}. Equilibrium holds at every free node. The three are solved together by the direct stiffness method for every load combination; supports, ties and rigid bodies are eliminated exactly.",
        if model.rigids.is_empty() { "" } else { " and from the small rigid-body motions of the rigid bodies" }
    ));
    if model.parts.iter().any(|p| p.bend.is_some()) {
        doc.p("Beams also bend (Euler–Bernoulli: plane sections stay plane, shear deformation neglected). A beam's end moments follow the slope-deflection equations, M_AB = 4EI/L·θ_A + 2EI/L·θ_B − 6EI/L²·Δ + FEM_AB and M_BA = 2EI/L·θ_A + 4EI/L·θ_B − 6EI/L²·Δ + FEM_BA, from the rotations θ of the nodes its ends are rigidly joined to, the movement Δ of end B relative to end A across it, and the fixed-end moments of its load along it (a hinged end carries no moment: 3EI/L on the other end). Its end shears follow from its own equilibrium, and the nodes a beam turns balance in moment as well as in force.");
    }
    doc.p(&match model.kind {
        Kind::Axial => "Sign convention: tension and elongation are positive; displacements, loads and reactions are positive along the axis (toward increasing position).".to_string(),
        Kind::Plane => "Sign convention: tension and elongation are positive; displacements, loads and reactions are positive along +x and +y; rotations are positive counter-clockwise.".to_string(),
    });
    doc.p(&format!(
        "Values are shown to {} significant figures; each equation is written in symbols, then with its numbers and units substituted, then its result.",
        display.digits
    ));
}

/// Every check's outcome, and the checks as written.
fn design_checks(doc: &mut Doc, f: &Fmt<'_>, source: &Source, a: &crate::Analysis) {
    let (model, solution, checks, display) = (&a.model, &a.solution, &a.checks, f.d);
    doc.h(2, "Design checks");
    if checks.outcomes.is_empty() {
        doc.p("The calc file writes no checks and its materials give no allowable stresses.");
    } else {
        let gov: std::collections::HashSet<usize> =
            checks.governing_indices().into_iter().collect();
        let rows: Vec<Vec<String>> = checks
            .outcomes
            .iter()
            .enumerate()
            .map(|(k, o)| {
                let is_gov = gov.contains(&k);
                vec![
                    text(&o.label),
                    if is_gov {
                        format!("`{}` (governs)", solution.combinations[o.combination].name)
                    } else {
                        format!("`{}`", solution.combinations[o.combination].name)
                    },
                    written(o, display)[0].clone(),
                    written(o, display)[1].clone(),
                    utilization(o.utilization),
                    verdict(o.pass, true),
                ]
            })
            .collect();
        check_table(doc, "Combination", &rows);
        let lines: Vec<String> = model
            .checks
            .iter()
            .map(|c| {
                let mut applies = String::new();
                if let Some((var, member)) = &c.member {
                    applies.push_str(&format!(" (`{var}` = `{member}`)"));
                }
                if c.applies != crate::model::Applies::default() {
                    applies.push_str(&format!(" (applies to {})", c.applies.describe(model)));
                }
                format!(
                    "\"{}\"{applies}: {} {} {}",
                    text(&c.label),
                    code(source.slice(c.lhs.span).trim()),
                    c.op.symbol(),
                    code(source.slice(c.rhs.span).trim())
                )
            })
            .collect();
        if !lines.is_empty() {
            doc.p("As written in the calc file (utilization is demand over capacity: the left side over the right for `<=`, the right side over the left for `>=`):");
            for l in lines {
                doc.eq(&l);
            }
            doc.end_list();
        }
        if checks
            .outcomes
            .iter()
            .any(|o| matches!(o.origin, Origin::Allowable(_)))
        {
            doc.p("Allowable-stress checks compare each part's stress in its sense (tension or compression) with its material's allowable for that sense.");
        }
        if checks
            .outcomes
            .iter()
            .any(|o| matches!(o.origin, Origin::Buckling(_)))
        {
            doc.p("Euler-load checks compare the compression in each part (or parallel group) with a `buckling_length` against its Euler load P_e times its `euler_fraction` (see Stability).");
        }
    }
}

#[cfg(test)]
mod tests {
    use super::checks_outcome;

    #[test]
    fn the_status_line_counts_checks_in_plain_english() {
        // Agreement of number in English (common practice): one check
        // passes, two checks pass.
        assert_eq!(checks_outcome(1, 0), "the one check passes");
        assert_eq!(checks_outcome(2, 0), "both checks pass");
        assert_eq!(checks_outcome(5, 0), "all 5 checks pass");
        assert_eq!(checks_outcome(1, 1), "**the one check fails**");
        assert_eq!(checks_outcome(2, 1), "**1 of 2 checks fails**");
        assert_eq!(checks_outcome(2, 2), "**both checks fail**");
        assert_eq!(checks_outcome(4, 4), "**all 4 checks fail**");
        assert_eq!(checks_outcome(4, 3), "**3 of 4 checks fail**");
    }
}

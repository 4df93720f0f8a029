//! The Markdown calculation: every input, every substituted equation, the
//! checks. Equations are plain Unicode text (σ, δ, Σ, ², ·) so they read the
//! same on a code host, in the HTML, in a terminal and in a diff:
//! `symbols = numbers with units = result`.

use std::fmt::Write as _;

use super::display::{number, utilization, Display, Scales, Shown};
use super::table::combination_text;
use crate::checks::Origin;
use crate::model::{Carries, Kind, Law, Model};
use crate::solve::{PartState, Solution};
use crate::source::Source;
use crate::units::Dimension;

/// The cautions every report carries.
pub const CAUTIONS: &[&str] = &[
    "This calculation was prepared with tandem, a design aid. Its results must be checked by a qualified engineer before they are relied on; local codes and licensed practice govern.",
    "The model is linear-elastic and small-displacement; parts are pin-ended axial members or springs, and parts that share nodes are taken as perfectly bonded.",
    "Checks are only those written in the calc file and the material allowables it gives; they do not replace the checks the governing code requires.",
];

struct Doc {
    out: String,
}

impl Doc {
    fn h(&mut self, level: usize, text: &str) {
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
    fn temp(&self, si: f64) -> String {
        self.term(si, &self.d.temperature)
    }
    fn alpha(&self, si: f64) -> String {
        let t = &self.d.temperature;
        format!("{:.3e}/{}", si * t.factor, degree(&t.name))
    }
    fn plain(&self, v: f64) -> String {
        bracket_negative(self.n(v))
    }
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

/// Write the whole calculation for an analysed file.
#[allow(clippy::too_many_lines)]
pub fn report(source: &Source, a: &crate::Analysis, display: &Display) -> String {
    let (model, solution, checks) = (&a.model, &a.solution, &a.checks);
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
    let mut doc = Doc { out: String::new() };
    let per_combination = 700 * (model.parts.len() + model.nodes.len());
    let estimate = 64 * 1024 + per_combination * (solution.combinations.len() + 1);
    let _ = doc.out.try_reserve(estimate);
    let title = model
        .title
        .get("title")
        .unwrap_or("Load-sharing calculation");
    let _ = write!(doc.out, "# {}\n\n", text(title));
    let mut rows = Vec::new();
    for key in crate::model::Title::KEYS.iter().skip(1) {
        if let Some(v) = model.title.get(key) {
            let mut k = (*key).to_string();
            if let Some(c) = k.get_mut(0..1) {
                c.make_ascii_uppercase();
            }
            rows.push(vec![k, text(v)]);
        }
    }
    rows.push(vec!["Calc file".into(), code(&source.name)]);
    doc.table(&["Item", "Value"], &rows, &[]);

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
                    if o.pass {
                        "pass".into()
                    } else {
                        "**FAIL**".into()
                    },
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
            f.force(fmax),
            smax.map_or("—".into(), |s| f.stress(s)),
            format!("`{}`", solution.combinations[cf].name),
        ]);
    }
    doc.p("Largest force in each part over all combinations (tension positive):");
    doc.table(&["Part", "Force", "Stress", "Combination"], &rows, &[1, 2]);
    for w in &solution.warnings {
        doc.p(&format!("**Warning:** {w}."));
    }
    for b in &a.buckling {
        for w in b.warnings(model) {
            doc.p(&format!("**Warning:** {w}."));
        }
    }
    for (k, pi, ratio) in &checks.yielded {
        doc.p(&format!(
            "**Warning:** in combination `{}` part `{}` is stressed to {} × its yield strength; elastic results are not valid beyond yield.",
            solution.combinations[*k].name,
            model.parts[*pi].name,
            number(*ratio, 3)
        ));
    }

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
    doc.p(&match model.kind {
        Kind::Axial => "Sign convention: tension and elongation are positive; displacements, loads and reactions are positive along the axis (toward increasing position).".to_string(),
        Kind::Plane => "Sign convention: tension and elongation are positive; displacements, loads and reactions are positive along +x and +y; rotations are positive counter-clockwise.".to_string(),
    });
    doc.p(&format!(
        "Values are shown to {} significant figures; each equation is written in symbols, then with its numbers and units substituted, then its result.",
        display.digits
    ));

    inputs(&mut doc, &f, source, model);

    let incidence = incidence(model);
    for ci in 0..solution.combinations.len() {
        combination(&mut doc, &f, model, solution, ci, &incidence);
    }

    capacity_section(&mut doc, &f, a);
    long_term_section(&mut doc, &f, a);
    buckling_section(&mut doc, &f, a);

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
                    display.quantity(o.written().0),
                    format!("{} {}", o.op.symbol(), display.quantity(o.written().1)),
                    utilization(o.utilization),
                    if o.pass {
                        "pass".into()
                    } else {
                        "**FAIL**".into()
                    },
                ]
            })
            .collect();
        doc.table(
            &[
                "Check",
                "Combination",
                "Value",
                "Limit",
                "Utilization",
                "Result",
            ],
            &rows,
            &[2, 3, 4],
        );
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
    doc.out.trim_end().to_string() + "\n"
}

fn inputs(doc: &mut Doc, f: &Fmt<'_>, source: &Source, model: &Model) {
    doc.h(2, "Inputs");
    // each let's value as shown, found by name once
    let shown = |l: &crate::model::LetValue| {
        if l.value.dim == Dimension::LENGTH {
            f.length(l.value.value)
        } else {
            f.d.quantity(l.value)
        }
    };
    let values: std::collections::HashMap<&str, String> = model
        .lets
        .iter()
        .map(|l| (l.name.as_str(), shown(l)))
        .collect();
    if !model.lets.is_empty() {
        doc.h(3, "Design quantities");
        let with_sources = model.lets.iter().any(|l| !l.sources.is_empty());
        let rows: Vec<Vec<String>> = model
            .lets
            .iter()
            .map(|l| {
                let expr = source.slice(l.expr.span).trim().replace('\n', " ");
                let value = shown(l);
                // a value derived from others: its expression with their
                // values substituted, once
                let expr = if super::substitute::uses_names(&l.expr) {
                    let with = super::substitute::substituted(&l.expr, source, &|n| {
                        values.get(n).cloned()
                    });
                    format!("{} = {}", code(&expr), code(&with))
                } else {
                    code(&expr)
                };
                let mut row = vec![text(&l.name), expr, value];
                if with_sources {
                    row.push(if l.sources.is_empty() {
                        "—".into()
                    } else {
                        l.sources.join("; ")
                    });
                }
                row
            })
            .collect();
        if with_sources {
            doc.table(&["Name", "Expression", "Value", "Source"], &rows, &[2]);
        } else {
            doc.table(&["Name", "Expression", "Value"], &rows, &[2]);
        }
    }
    doc.h(3, "Materials");
    let rows: Vec<Vec<String>> = model
        .materials
        .iter()
        .map(|m| {
            let opt =
                |p: Option<uom::si::f64::Pressure>| p.map_or("—".into(), |p| f.stress(p.value));
            let allow = match (
                m.allowable_tension.or(m.allowable),
                m.allowable_compression.or(m.allowable),
            ) {
                (None, None) => "—".to_string(),
                (t, c) if t == c => opt(t),
                (Some(t), None) => format!("{} in tension", f.stress(t.value)),
                (None, Some(c)) => format!("{} in compression", f.stress(c.value)),
                (t, c) => format!("{} in tension, {} in compression", opt(t), opt(c)),
            };
            let e = if m.e_sources.is_empty() {
                f.stress(m.e.value)
            } else {
                format!("{} ({})", f.stress(m.e.value), m.e_sources.join("; "))
            };
            vec![
                text(&m.name),
                e,
                m.alpha.map_or("—".into(), |a| f.alpha(a.value)),
                opt(m.yield_strength),
                allow,
            ]
        })
        .collect();
    doc.table(
        &["Material", "E", "α", "Yield", "Allowable"],
        &rows,
        &[1, 2, 3],
    );
    // values derived from other names, substituted once
    let mut any = false;
    for m in &model.materials {
        for (key, e) in &m.derived {
            let with = super::substitute::substituted(e, source, &|n| values.get(n).cloned());
            let value = match *key {
                "E" => f.stress(m.e.value),
                "alpha" => m.alpha.map_or("—".into(), |a| f.alpha(a.value)),
                "creep" => m.creep.map_or("—".into(), |c| f.n(c)),
                _ => [
                    ("yield", m.yield_strength),
                    ("yield_compression", m.yield_compression),
                    ("allowable", m.allowable),
                    ("allowable_tension", m.allowable_tension),
                    ("allowable_compression", m.allowable_compression),
                ]
                .iter()
                .find(|(k, _)| k == key)
                .and_then(|(_, v)| *v)
                .map_or("—".into(), |v| f.stress(v.value)),
            };
            if !any {
                doc.p("Material values derived from other quantities, as written and with their values substituted:");
                any = true;
            }
            doc.eq(&format!(
                "{key}({}): {} = {} = {value}",
                text(&m.name),
                code(source.slice(e.span).trim()),
                code(&with)
            ));
        }
    }
    if any {
        doc.end_list();
    }

    doc.h(3, "Nodes and supports");
    let rows: Vec<Vec<String>> = model
        .nodes
        .iter()
        .map(|n| {
            let at = match model.kind {
                Kind::Axial => f.length(n.x.value),
                Kind::Plane => format!("({}, {})", f.length(n.x.value), f.length(n.y.value)),
            };
            let sup = match (model.kind, n.fixed) {
                (Kind::Axial, [true, _]) | (Kind::Plane, [true, true]) => "fixed",
                (Kind::Plane, [true, false]) => "fixed in x (roller)",
                (Kind::Plane, [false, true]) => "fixed in y (roller)",
                _ => "free",
            };
            vec![text(&n.name), at, sup.to_string()]
        })
        .collect();
    doc.table(&["Node", "Position", "Support"], &rows, &[1]);
    for r in &model.rigids {
        let names: Vec<String> = r
            .nodes
            .iter()
            .map(|&n| format!("`{}`", model.nodes[n].name))
            .collect();
        doc.p(&format!(
            "Rigid body `{}`: nodes {} move as one rigid body{}.",
            r.name,
            names.join(", "),
            if model.kind == Kind::Plane {
                format!(
                    " (two translations and a small rotation θ about `{}`)",
                    model.nodes[r.nodes[0]].name
                )
            } else {
                String::new()
            }
        ));
    }
    for t in &model.ties {
        let names: Vec<String> = t
            .nodes
            .iter()
            .map(|&n| format!("`{}`", model.nodes[n].name))
            .collect();
        doc.p(&format!("Tie: nodes {} move together.", names.join(", ")));
    }

    doc.h(3, "Parts");
    let rows: Vec<Vec<String>> = model
        .parts
        .iter()
        .map(|p| {
            let ends = format!(
                "`{}` → `{}`",
                model.nodes[p.ends[0]].name, model.nodes[p.ends[1]].name
            );
            let (mat, area) = match &p.law {
                Law::Member {
                    material,
                    area,
                    section,
                    ..
                } => (
                    text(&model.materials[*material].name),
                    match section {
                        Some(s) => format!("{} ({s})", f.area(area.value)),
                        None => f.area(area.value),
                    },
                ),
                Law::Spring { .. } => ("spring".into(), "—".into()),
            };
            let mut notes = Vec::new();
            if p.carries != Carries::Both {
                notes.push(format!("{} only", p.carries.name()));
            }
            if p.slack.value > 0.0 {
                notes.push(format!("gap {}", f.small(p.slack.value)));
            }
            if p.misfit.value != 0.0 {
                notes.push(format!("misfit {}", f.small(p.misfit.value)));
            }
            vec![
                text(&p.name),
                ends,
                mat,
                area,
                f.length(p.length.value),
                f.stiffness(p.stiffness(&model.materials).value),
                if notes.is_empty() {
                    "—".into()
                } else {
                    notes.join(", ")
                },
            ]
        })
        .collect();
    doc.table(
        &["Part", "Ends", "Material", "A", "L", "k", "Notes"],
        &rows,
        &[3, 4, 5],
    );
    doc.p("Axial stiffness of each part:");
    for p in &model.parts {
        let k = p.stiffness(&model.materials).value;
        match &p.law {
            Law::Member { material, area, .. } => {
                let e = model.materials[*material].e.value;
                doc.eq(&format!(
                    "k({}) = E·A / L = {} · {} / {} = {}",
                    p.name,
                    f.stress(e),
                    f.area(area.value),
                    f.with(p.length.value, &f.d.small),
                    f.stiffness(k)
                ));
            }
            Law::Spring { .. } => doc.eq(&format!(
                "k({}) = {} (spring, as given)",
                p.name,
                f.stiffness(k)
            )),
        }
    }
    doc.end_list();

    doc.h(3, "Load cases and combinations");
    let mut rows = Vec::new();
    for c in &model.cases {
        let mut parts: Vec<String> = Vec::new();
        for l in &c.loads {
            let node = &model.nodes[l.node].name;
            parts.push(match model.kind {
                Kind::Axial => format!("load `{node}` {}", f.force(l.force[0].value)),
                Kind::Plane => format!(
                    "load `{node}` ({}, {})",
                    f.force(l.force[0].value),
                    f.force(l.force[1].value)
                ),
            });
        }
        for t in &c.temperatures {
            let on = t.part.map_or("all parts".to_string(), |i| {
                format!("`{}`", model.parts[i].name)
            });
            parts.push(format!(
                "ΔT {} on {on}",
                f.temp(t.change.value).trim_matches(['(', ')'])
            ));
        }
        for s in &c.strains {
            parts.push(format!(
                "free strain {} µε on `{}`",
                f.n(s.strain.value * 1e6),
                model.parts[s.part].name
            ));
        }
        for s in &c.settlements {
            let dir = if model.kind == Kind::Plane {
                if s.direction == 0 {
                    " x"
                } else {
                    " y"
                }
            } else {
                ""
            };
            parts.push(format!(
                "`{}`{dir} moves {}",
                model.nodes[s.node].name,
                f.small(s.movement.value)
            ));
        }
        rows.push(vec![
            format!(
                "`{}`{}",
                c.name,
                if c.sustained { " (sustained)" } else { "" }
            ),
            if parts.is_empty() {
                "no loads (misfits only)".into()
            } else {
                parts.join("; ")
            },
        ]);
    }
    doc.table(&["Case", "Actions"], &rows, &[]);
    let rows: Vec<Vec<String>> = (0..model.combinations.len())
        .map(|i| {
            vec![
                format!("`{}`", model.combinations[i].name),
                combination_text(model, i),
            ]
        })
        .collect();
    doc.table(&["Combination", "Definition"], &rows, &[]);
    doc.p("Every combination is solved directly with its factored actions (never by adding case results), so parts that go slack behave right; misfits act in every combination at full value.");
}

/// For each node, the parts meeting there: (part, sign, direction); a part
/// in tension pulls its end A toward B (+ĉ) and its end B toward A (−ĉ).
fn incidence(model: &Model) -> Vec<Vec<(usize, f64, [f64; 2])>> {
    let mut out = vec![Vec::new(); model.nodes.len()];
    for (i, p) in model.parts.iter().enumerate() {
        let dir = model.direction(i);
        out[p.ends[0]].push((i, 1.0, dir));
        out[p.ends[1]].push((i, -1.0, dir));
    }
    out
}

#[allow(clippy::too_many_lines)]
fn combination(
    doc: &mut Doc,
    f: &Fmt<'_>,
    model: &Model,
    solution: &Solution,
    ci: usize,
    incidence: &[Vec<(usize, f64, [f64; 2])>],
) {
    let r = &solution.combinations[ci];
    f.scales.set(Scales::of(r));
    combination_body(doc, f, model, r, ci, incidence);
    f.scales.set(Scales::default());
}

fn combination_body(
    doc: &mut Doc,
    f: &Fmt<'_>,
    model: &Model,
    r: &crate::solve::CombinationResult,
    ci: usize,
    incidence: &[Vec<(usize, f64, [f64; 2])>],
) {
    let combo = &model.combinations[ci];
    doc.h(
        2,
        &format!(
            "Combination {}",
            super::table::combination_heading(model, ci, true)
        ),
    );
    let nd = model.kind.dofs();
    let axis = ["x", "y"];
    // Loads on each node component.
    let mut loads = vec![[0.0f64; 2]; model.nodes.len()];
    for &(case, factor) in &combo.terms {
        for l in &model.cases[case].loads {
            for d in 0..nd {
                loads[l.node][d] += factor * l.force[d].value;
            }
        }
    }
    let mut in_body = vec![false; model.nodes.len()];
    for n in model
        .rigids
        .iter()
        .flat_map(|b| &b.nodes)
        .chain(model.ties.iter().flat_map(|t| &t.nodes))
    {
        in_body[*n] = true;
    }

    doc.h(3, "Equilibrium");
    let mut first_equation = true;
    for (n, node) in model.nodes.iter().enumerate() {
        if in_body[n] {
            continue;
        }
        for d in 0..nd {
            if node.fixed[d] {
                continue;
            }
            let terms = &incidence[n];
            let mut sym = Vec::new();
            let mut num = Vec::new();
            for (i, sign, dir) in terms {
                let c = sign * dir[d];
                if c == 0.0 {
                    continue;
                }
                let name = &model.parts[*i].name;
                let force = r.parts[*i].force.value;
                if model.kind == Kind::Axial {
                    sym.push(format!("{}N({name})", if c > 0.0 { "+ " } else { "- " }));
                    num.push(format!(
                        "{}{}",
                        if c > 0.0 { "+ " } else { "- " },
                        f.force_t(force)
                    ));
                } else {
                    sym.push(format!("+ N({name})·c{}({name})", axis[d]));
                    num.push(format!("+ {} · {}", f.force_t(force), f.plain(c)));
                }
            }
            if loads[n][d] != 0.0 {
                sym.push(format!("+ P{}", if nd == 2 { axis[d] } else { "" }));
                num.push(format!("+ {}", f.force_t(loads[n][d])));
            }
            if num.is_empty() {
                continue;
            }
            let clean = |v: Vec<String>| {
                let s = v.join(" ");
                s.strip_prefix("+ ").map_or(s.clone(), str::to_string)
            };
            let label = if nd == 2 {
                format!("ΣF{} at `{}`", axis[d], node.name)
            } else {
                format!("ΣF at `{}`", node.name)
            };
            if first_equation {
                doc.p("At each free node the part forces (N, tension positive, pulling the node toward the part's other end) and the loads (P) balance:");
                first_equation = false;
            }
            doc.eq(&format!(
                "{label}: {} = {} = {}",
                clean(sym),
                clean(num),
                f.force(0.0)
            ));
        }
    }
    if !first_equation {
        doc.end_list();
    }
    for b in &model.rigids {
        if model.kind != Kind::Plane {
            continue;
        }
        let x0 = model.nodes[b.nodes[0]].x.value;
        let y0 = model.nodes[b.nodes[0]].y.value;
        // Net force on each member from parts, loads and reactions.
        let mut fx = Vec::new();
        let mut moment_terms = Vec::new();
        let mut fsum = [Vec::new(), Vec::new()];
        for &n in &b.nodes {
            let mut net = [loads[n][0], loads[n][1]];
            for &(i, sign, dir) in &incidence[n] {
                for d in 0..2 {
                    net[d] += sign * dir[d] * r.parts[i].force.value;
                }
            }
            for d in 0..2 {
                net[d] += r.nodes[n].reaction[d].value;
            }
            fx.push((n, net));
        }
        for (n, net) in &fx {
            for d in 0..2 {
                if net[d] != 0.0 {
                    fsum[d].push(f.force_t(net[d]));
                }
            }
            let (dx, dy) = (model.nodes[*n].x.value - x0, model.nodes[*n].y.value - y0);
            if dx != 0.0 && net[1] != 0.0 {
                moment_terms.push(format!("{} · {}", f.small_t(dx), f.force_t(net[1])));
            }
            if dy != 0.0 && net[0] != 0.0 {
                moment_terms.push(format!("- {} · {}", f.small_t(dy), f.force_t(net[0])));
            }
        }
        doc.p(&format!(
            "Rigid body `{}`: the net forces on its nodes (parts, loads and reactions) balance in both directions and in moment about `{}`:",
            b.name,
            model.nodes[b.nodes[0]].name
        ));
        for d in 0..2 {
            if fsum[d].is_empty() {
                // Said rather than left out, so that the reader sees both
                // directions were looked at.
                doc.eq(&format!(
                    "ΣF{} = {}: no net force in {} on any of its nodes",
                    axis[d],
                    f.force(0.0),
                    axis[d]
                ));
            } else {
                doc.eq(&format!(
                    "ΣF{} = {} = {}",
                    axis[d],
                    fsum[d].join(" + "),
                    f.force(0.0)
                ));
            }
        }
        if !moment_terms.is_empty() {
            let joined = moment_terms.join(" + ").replace("+ - ", "- ");
            doc.eq(&format!(
                "ΣM = Σ (Δx·Fy − Δy·Fx) = {joined} = 0 {}·{}",
                f.d.force.name, f.d.small.name
            ));
        }
        doc.end_list();
    }

    doc.h(3, "Compatibility");
    // Parts that span the same two nodes share one elongation.
    let mut groups: Vec<(usize, usize, Vec<usize>)> = Vec::new();
    let mut group_of: std::collections::HashMap<(usize, usize), usize> =
        std::collections::HashMap::new();
    for (i, p) in model.parts.iter().enumerate() {
        let key = (p.ends[0].min(p.ends[1]), p.ends[0].max(p.ends[1]));
        match group_of.get(&key) {
            Some(&g) => groups[g].2.push(i),
            None => {
                group_of.insert(key, groups.len());
                groups.push((key.0, key.1, vec![i]));
            }
        }
    }
    doc.p(match model.kind {
        Kind::Axial => "Each part's elongation follows from the displacements of its end nodes, δ = (u(B) − u(A))·ĉ, with ĉ = +1 when B lies further along the axis than A and −1 when it lies back:",
        Kind::Plane => "Each part's elongation follows from the displacements of its end nodes, δ = (u(B) − u(A))·ĉ with ĉ the unit vector from A to B:",
    });
    for p in model.parts.iter().enumerate() {
        let (i, p) = p;
        let (a, b) = (p.ends[0], p.ends[1]);
        let (na, nb) = (&model.nodes[a].name, &model.nodes[b].name);
        let ua = &r.nodes[a].displacement;
        let ub = &r.nodes[b].displacement;
        match model.kind {
            // ĉ is +1 or −1 on the axis: the end further along comes first
            Kind::Axial if model.direction(i)[0] > 0.0 => doc.eq(&format!(
                "δ({}) = u({nb}) - u({na}) = {} - {} = {}",
                p.name,
                f.small_t(ub[0].value),
                f.small_t(ua[0].value),
                f.small(r.parts[i].elongation.value)
            )),
            Kind::Axial => doc.eq(&format!(
                "δ({}) = u({na}) - u({nb}) = {} - {} = {}",
                p.name,
                f.small_t(ua[0].value),
                f.small_t(ub[0].value),
                f.small(r.parts[i].elongation.value)
            )),
            Kind::Plane => {
                let (ax, ay) = (model.nodes[a].x.value, model.nodes[a].y.value);
                let (bx, by) = (model.nodes[b].x.value, model.nodes[b].y.value);
                let l = (bx - ax).hypot(by - ay);
                let (cx, cy) = ((bx - ax) / l, (by - ay) / l);
                doc.eq(&format!(
                    "δ({}) = (u({nb}) - u({na}))·cx + (v({nb}) - v({na}))·cy = ({} - {}) · {} + ({} - {}) · {} = {}",
                    p.name,
                    f.small_t(ub[0].value),
                    f.small_t(ua[0].value),
                    f.plain(cx),
                    f.small_t(ub[1].value),
                    f.small_t(ua[1].value),
                    f.plain(cy),
                    f.small(r.parts[i].elongation.value)
                ));
            }
        }
    }
    doc.end_list();
    for (_, _, g) in groups.iter().filter(|g| g.2.len() > 1) {
        let names: Vec<String> = g
            .iter()
            .map(|&i| format!("δ({})", model.parts[i].name))
            .collect();
        doc.p(&format!(
            "Parts spanning the same two nodes share one elongation: {} = {}.",
            names.join(" = "),
            f.small(r.parts[g[0]].elongation.value)
        ));
    }
    if model.kind == Kind::Plane {
        for (k, b) in model.rigids.iter().enumerate() {
            let n0 = b.nodes[0];
            let theta = r.rotations[k];
            doc.p(&format!(
                "Rigid body `{}` rotates θ = {} rad about `{}`; each of its nodes moves with it, v = v({}) + θ·Δx and u = u({}) − θ·Δy:",
                b.name,
                f.n(theta),
                model.nodes[n0].name,
                model.nodes[n0].name,
                model.nodes[n0].name
            ));
            for &n in &b.nodes[1..] {
                let dx = model.nodes[n].x.value - model.nodes[n0].x.value;
                let dy = model.nodes[n].y.value - model.nodes[n0].y.value;
                doc.eq(&format!(
                    "v({}) = {} + {} · {} = {}",
                    model.nodes[n].name,
                    f.small_t(r.nodes[n0].displacement[1].value),
                    f.plain_rad(theta),
                    f.small_t(dx),
                    f.small(r.nodes[n].displacement[1].value)
                ));
                if dy != 0.0 {
                    doc.eq(&format!(
                        "u({}) = {} - {} · {} = {}",
                        model.nodes[n].name,
                        f.small_t(r.nodes[n0].displacement[0].value),
                        f.plain_rad(theta),
                        f.small_t(dy),
                        f.small(r.nodes[n].displacement[0].value)
                    ));
                }
            }
            doc.end_list();
        }
    }

    doc.h(3, "Part forces and stresses");
    // each term's temperature change and free strain on every part, found
    // once (not searched for each part)
    let np = model.parts.len();
    let on_part: Vec<_> = combo
        .terms
        .iter()
        .map(|&(case, _)| {
            let c = &model.cases[case];
            let t = if c.temperatures.is_empty() {
                Vec::new()
            } else {
                c.temperature_by_part(np)
            };
            let s = if c.strains.is_empty() {
                Vec::new()
            } else {
                c.strain_by_part(np)
            };
            (t, s)
        })
        .collect();
    for (i, p) in model.parts.iter().enumerate() {
        let pr = &r.parts[i];
        let k = p.stiffness(&model.materials).value;
        let free = pr.free_elongation.value;
        let _ = writeln!(doc.out, "**{}**\n", p.name);
        // Free elongation from its sources.
        let mut sources = Vec::new();
        let mut num = Vec::new();
        if p.misfit.value != 0.0 {
            sources.push("misfit".to_string());
            num.push(f.small_t(p.misfit.value));
        }
        if let Some(m) = p.material() {
            let mat = &model.materials[m];
            for (&(_, factor), (temps, strains)) in combo.terms.iter().zip(&on_part) {
                let t = temps.get(i).copied().flatten();
                if let (Some(t), Some(alpha)) = (t, mat.alpha) {
                    sources.push(if (factor - 1.0).abs() > 0.0 {
                        format!("{factor}·α·ΔT·L")
                    } else {
                        "α·ΔT·L".into()
                    });
                    let fac = if (factor - 1.0).abs() > 0.0 {
                        format!("{factor} · ")
                    } else {
                        String::new()
                    };
                    num.push(format!(
                        "{fac}{} · {} · {}",
                        f.alpha(alpha.value),
                        f.temp(t.change.value),
                        f.with(p.length.value, &f.d.small)
                    ));
                }
                if let Some(s) = strains.get(i).copied().flatten() {
                    let fac = if (factor - 1.0).abs() > 0.0 {
                        format!("{factor} · ")
                    } else {
                        String::new()
                    };
                    sources.push(if fac.is_empty() {
                        "ε·L".into()
                    } else {
                        format!("{factor}·ε·L")
                    });
                    num.push(format!(
                        "{fac}{} · {}",
                        f.microstrain(s.strain.value),
                        f.with(p.length.value, &f.d.small)
                    ));
                }
            }
        }
        if !sources.is_empty() {
            doc.eq(&format!(
                "δ₀ = {} = {} = {}",
                sources.join(" + "),
                num.join(" + "),
                f.small(free)
            ));
        }
        match pr.state {
            PartState::Slack => {
                let gap = if p.slack.value > 0.0 {
                    format!("within its gap of {}", f.small(p.slack.value))
                } else {
                    format!("in the sense it cannot carry ({} only)", p.carries.name())
                };
                let _ = writeln!(
                    doc.out,
                    "- N = 0 {}: the part is slack; its free movement δ − δ₀ of {} is {gap}",
                    f.d.force.name,
                    f.small(pr.elongation.value - free)
                );
            }
            PartState::Elastic => {
                let offset = match p.carries {
                    _ if p.slack.value == 0.0 => 0.0,
                    Carries::Tension => p.slack.value,
                    Carries::Compression => -p.slack.value,
                    Carries::Both => {
                        if pr.force.value >= 0.0 {
                            p.slack.value
                        } else {
                            -p.slack.value
                        }
                    }
                };
                if offset == 0.0 {
                    doc.eq(&format!(
                        "N = k·(δ − δ₀) = {} · ({} - {}) = {}",
                        f.stiffness(k),
                        f.small_t(pr.elongation.value),
                        f.small_t(free),
                        f.force(pr.force.value)
                    ));
                } else {
                    doc.eq(&format!(
                        "N = k·(δ − δ₀ − gap) = {} · ({} - {} - {}) = {}",
                        f.stiffness(k),
                        f.small_t(pr.elongation.value),
                        f.small_t(free),
                        f.small_t(offset),
                        f.force(pr.force.value)
                    ));
                }
                if let (Some(area), Some(stress)) = (p.area(), pr.stress) {
                    doc.eq(&format!(
                        "σ = N / A = {} / {} = {}",
                        f.force_t(pr.force.value),
                        f.area(area.value),
                        f.stress(stress.value)
                    ));
                    let e = p.material().map_or(0.0, |m| model.materials[m].e.value);
                    let extra = if offset == 0.0 {
                        String::new()
                    } else {
                        format!(" + {}", f.small_t(offset))
                    };
                    doc.eq(&format!(
                        "δ = N·L / (E·A) + δ₀{} = {} · {} / ({} · {}) + {}{extra} = {}",
                        if offset == 0.0 { "" } else { " + gap" },
                        f.force_t(pr.force.value),
                        f.with(p.length.value, &f.d.small),
                        f.stress(e),
                        f.area(area.value),
                        f.small_t(free),
                        f.small(pr.elongation.value)
                    ));
                }
            }
        }
        doc.end_list();
    }

    // Closed-form share for a pure parallel group.
    for (a, b, g) in groups.iter().filter(|g| g.2.len() > 1) {
        if model.kind != Kind::Axial {
            continue;
        }
        let (fixed, free_node) = if model.nodes[*a].fixed[0] {
            (*a, *b)
        } else {
            (*b, *a)
        };
        let only = incidence[free_node].len() == g.len();
        let pure = model.nodes[fixed].fixed[0]
            && !model.nodes[free_node].fixed[0]
            && !in_body[free_node]
            && only
            && g.iter().all(|&i| {
                r.parts[i].free_elongation.value == 0.0
                    && r.parts[i].state == PartState::Elastic
                    && model.parts[i].slack.value == 0.0
            })
            && loads[free_node][0] != 0.0
            && r.nodes[fixed].displacement[0].value == 0.0;
        if !pure {
            continue;
        }
        let p_load = loads[free_node][0];
        // Sign: the load pushes the free node; parts from fixed to free elongate with it.
        let ks: Vec<f64> = g
            .iter()
            .map(|&i| model.parts[i].stiffness(&model.materials).value)
            .collect();
        let sum: f64 = ks.iter().sum();
        doc.p(&format!(
            "The parts between `{}` and `{}` act in parallel: each takes the load in proportion to its stiffness, F(i) = P·k(i) / Σk:",
            model.nodes[fixed].name, model.nodes[free_node].name
        ));
        // A large bundle states Σk once instead of in every line.
        let ksum = if ks.len() <= 8 {
            ks.iter()
                .map(|k| f.stiffness(*k))
                .collect::<Vec<_>>()
                .join(" + ")
        } else {
            doc.eq(&format!(
                "Σk = {} (the {} parts' k summed)",
                f.stiffness(sum),
                ks.len()
            ));
            f.stiffness(sum)
        };
        for (j, &i) in g.iter().enumerate() {
            // a load along the axis pulls a part whose far end lies further
            // along it, and pushes one whose far end lies back toward it
            let toward = if model.parts[i].ends[1] == free_node {
                1.0
            } else {
                -1.0
            };
            let sign = toward * model.direction(i)[0];
            let share = sign * p_load * ks[j] / sum;
            doc.eq(&format!(
                "F({}) = P·k({}) / Σk = {}{} · {} / ({ksum}) = {}",
                model.parts[i].name,
                model.parts[i].name,
                if sign < 0.0 { "-" } else { "" },
                f.force_t(p_load),
                f.stiffness(ks[j]),
                f.force(share)
            ));
        }
        doc.end_list();
    }

    doc.h(3, "Reactions");
    let mut rows = Vec::new();
    let mut sum_r = [Vec::new(), Vec::new()];
    let mut sum_p = [Vec::new(), Vec::new()];
    for (n, node) in model.nodes.iter().enumerate() {
        for d in 0..nd {
            if loads[n][d] != 0.0 {
                sum_p[d].push(f.force_t(loads[n][d]));
            }
        }
        if !node.fixed.iter().take(nd).any(|x| *x) {
            continue;
        }
        let mut row = vec![format!("`{}`", node.name)];
        for d in 0..nd {
            if node.fixed[d] {
                row.push(f.force(r.nodes[n].reaction[d].value));
                if r.nodes[n].reaction[d].value != 0.0 {
                    sum_r[d].push(f.force_t(r.nodes[n].reaction[d].value));
                }
            } else {
                row.push("—".into());
            }
        }
        rows.push(row);
    }
    if nd == 1 {
        doc.table(&["Node", "R"], &rows, &[1]);
    } else {
        doc.table(&["Node", "Rx", "Ry"], &rows, &[1, 2]);
    }
    doc.p("Overall equilibrium, reactions and loads together:");
    for d in 0..nd {
        let mut all: Vec<String> = sum_r[d].clone();
        all.extend(sum_p[d].iter().cloned());
        if all.is_empty() {
            all.push(f.force(0.0));
        }
        let label = if nd == 2 {
            format!("ΣR{} + ΣP{}", axis[d], axis[d])
        } else {
            "ΣR + ΣP".into()
        };
        doc.eq(&format!("{label} = {} = {}", all.join(" + "), f.force(0.0)));
    }
    doc.end_list();
    doc.p(&format!(
        "Largest out-of-balance force computed from the unrounded part forces, loads and reactions: {} (largest force in the combination {}).",
        if r.equilibrium_residual.value == 0.0 {
            format!("0 {}", f.d.force.name)
        } else {
            format!("{:.1e} {}", f.d.force.value(r.equilibrium_residual.value), f.d.force.name)
        },
        f.force(r.force_scale.value)
    ));
}

impl Fmt<'_> {
    /// A strain in microstrain, in parentheses when negative.
    fn microstrain(&self, v: f64) -> String {
        bracket_negative(format!("{} µε", self.n(v * 1e6)))
    }

    fn plain_rad(&self, v: f64) -> String {
        bracket_negative(format!("{} rad", self.n(v)))
    }
}

fn capacity_section(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    if a.capacity.is_empty() {
        return;
    }
    let (model, solution) = (&a.model, &a.solution);
    doc.h(2, "Capacity");
    doc.p("The loads of each combination are scaled by a load factor λ while temperature, misfits and free strains stay at their full value. Parts are elastic–perfectly plastic: once a part reaches its yield force F_y = f_y·A it keeps carrying F_y, and the load redistributes to the others until the assembly becomes a mechanism (the plastic limit). A part that carries one sense only lets go when its force reaches zero, and carries nothing after; the path is followed through that event too. The applied load at a load factor is λ times the sum of the combination's loads (in a plane model, the size of their resultant).");
    doc.p("Yield forces:");
    for p in &model.parts {
        let (Some(m), Some(area)) = (p.material(), p.area()) else {
            continue;
        };
        let mat = &model.materials[m];
        let Some(fy) = mat.yield_strength else {
            continue;
        };
        doc.eq(&format!(
            "F_y({}) = f_y · A = {} · {} = {}",
            p.name,
            f.stress(fy.value),
            f.area(area.value),
            f.force(fy.value * area.value)
        ));
        if let Some(fyc) = mat.yield_compression {
            doc.eq(&format!(
                "F_y,c({}) = f_y,c · A = {} · {} = {}",
                p.name,
                f.stress(fyc.value),
                f.area(area.value),
                f.force(fyc.value * area.value)
            ));
        }
    }
    doc.end_list();
    // One reason for every combination is said once.
    let first_note = a.capacity.first().and_then(|c| c.note.clone());
    if first_note.is_some()
        && a.capacity
            .iter()
            .all(|c| c.note == first_note && c.events.is_empty())
    {
        doc.p(&format!("Capacity {}.", first_note.unwrap_or_default()));
        return;
    }
    for c in &a.capacity {
        let name = &solution.combinations[c.combination].name;
        doc.h(3, &format!("Combination `{name}`"));
        if let Some(n) = &c.note {
            doc.p(&format!("Capacity {n}."));
            if c.events.is_empty() {
                continue;
            }
        }
        let rows: Vec<Vec<String>> = c
            .events
            .iter()
            .enumerate()
            .map(|(k, e)| {
                let sense = if e.tension { "tension" } else { "compression" };
                vec![
                    format!("{}", k + 1),
                    format!("`{}`", model.parts[e.part].name),
                    if e.released {
                        format!("lets go (carried {sense} only)")
                    } else {
                        format!("yields in {sense}")
                    },
                    f.n(e.lambda),
                ]
            })
            .collect();
        doc.table(&["Order", "Part", "Event", "Load factor λ"], &rows, &[0, 3]);
        // the applied load at a load factor: λ times the combination's loads
        let total = combination_load(model, c.combination);
        let applied = |what: &str, l: f64| {
            format!(
                "applied load at {what}: λ · ΣP = {} · {} = {}",
                f.n(l),
                f.force_t(total),
                f.force(l * total)
            )
        };
        match (c.first_yield, c.limit) {
            (None, Some(l)) => {
                doc.eq(&format!("mechanism as parts let go: λ_p = {}", f.n(l)));
                doc.eq(&applied("the limit", l));
                doc.end_list();
                doc.p("The assembly becomes a mechanism when the parts above let go, before any part yields.");
            }
            (Some(y), Some(l)) => {
                doc.eq(&format!("first yield: λ_y = {}", f.n(y)));
                doc.eq(&applied("first yield", y));
                doc.eq(&format!("plastic limit: λ_p = {}", f.n(l)));
                doc.eq(&applied("the limit", l));
                doc.eq(&format!(
                    "reserve beyond first yield: λ_p / λ_y = {} / {} = {}",
                    f.n(l),
                    f.n(y),
                    f.n(l / y)
                ));
                doc.end_list();
                let rows: Vec<Vec<String>> = model
                    .parts
                    .iter()
                    .enumerate()
                    .map(|(i, p)| {
                        vec![
                            text(&p.name),
                            f.force(c.limit_forces[i]),
                            f.force(c.residual.get(i).copied().unwrap_or(0.0)),
                        ]
                    })
                    .collect();
                doc.p("Part forces at the plastic limit, and the residual forces left after unloading elastically from it:");
                if c.events.iter().any(|e| e.released) {
                    doc.p("The unloading is taken with every part engaged: a part that let go on the way up is assumed to take load again as the assembly unloads.");
                }
                doc.table(
                    &["Part", "At the limit", "Residual after unloading"],
                    &rows,
                    &[1, 2],
                );
            }
            (Some(y), None) => {
                doc.eq(&format!("first yield: λ_y = {}", f.n(y)));
                doc.eq(&applied("first yield", y));
                doc.end_list();
                doc.p("No plastic limit forms: parts without a yield strength keep carrying the added load.");
            }
            _ => doc.p("No part reaches yield under these loads at any load factor."),
        }
    }
}

/// The sum of a combination's factored loads (in a plane model, the size
/// of their resultant), as a force: what a load factor multiplies.
fn combination_load(model: &Model, k: usize) -> f64 {
    let mut sum = [0.0f64; 2];
    for &(case, factor) in &model.combinations[k].terms {
        for l in &model.cases[case].loads {
            sum[0] += factor * l.force[0].value;
            sum[1] += factor * l.force[1].value;
        }
    }
    match model.kind {
        Kind::Axial => sum[0],
        Kind::Plane => sum[0].hypot(sum[1]),
    }
}

fn long_term_section(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    if a.long_term.is_empty() {
        return;
    }
    let (model, solution) = (&a.model, &a.solution);
    doc.h(2, "Long-term state (creep)");
    doc.p("Sustained cases act on creeping materials with the effective modulus E_eff = E / (1 + φ) (effective modulus method, EN 1992-1-1 7.4.3); the other cases act on E. The long-term state is the sum of the two; the short-term state is the one solved above.");
    for m in &model.materials {
        if let Some(phi) = m.creep.filter(|p| *p > 0.0) {
            doc.eq(&format!(
                "E_eff({}) = E / (1 + φ) = {} / (1 + {}) = {}",
                m.name,
                f.stress(m.e.value),
                f.n(phi),
                f.stress(m.e.value / (1.0 + phi))
            ));
        }
    }
    doc.end_list();
    let sustained: Vec<String> = model
        .cases
        .iter()
        .filter(|c| c.sustained)
        .map(|c| format!("`{}`", c.name))
        .collect();
    doc.p(&format!("Sustained cases: {}.", sustained.join(", ")));
    for l in &a.long_term {
        let short = &solution.combinations[l.combination];
        doc.h(3, &format!("Combination `{}`", short.name));
        let Some(r) = &l.result else {
            doc.p(&format!(
                "Long-term state {}.",
                l.note.clone().unwrap_or_default()
            ));
            continue;
        };
        let rows: Vec<Vec<String>> = model
            .parts
            .iter()
            .enumerate()
            .map(|(i, p)| {
                let s0 = short.parts[i].stress.map(|s| s.value);
                let s1 = r.parts[i].stress.map(|s| s.value);
                vec![
                    text(&p.name),
                    f.force(short.parts[i].force.value),
                    f.force(r.parts[i].force.value),
                    s0.map_or("—".into(), |s| f.stress(s)),
                    s1.map_or("—".into(), |s| f.stress(s)),
                    match (s0, s1) {
                        (Some(x), Some(y)) if x != 0.0 => {
                            let c = 100.0 * (y.abs() - x.abs()) / x.abs();
                            format!("{}{} %", if c > 0.0 { "+" } else { "" }, number(c, 3))
                        }
                        _ => "—".into(),
                    },
                ]
            })
            .collect();
        doc.table(
            &[
                "Part",
                "Force, short term",
                "Force, long term",
                "Stress, short term",
                "Stress, long term",
                "Change in size of stress",
            ],
            &rows,
            &[1, 2, 3, 4, 5],
        );
    }
    if let Some((lt, checks)) = &a.long_term_checks {
        doc.h(3, "Checks in the long-term state");
        let rows: Vec<Vec<String>> = checks
            .governing()
            .iter()
            .map(|o| {
                vec![
                    text(&o.label),
                    format!("`{}`", lt.combinations[o.combination].name),
                    f.d.quantity(o.written().0),
                    format!("{} {}", o.op.symbol(), f.d.quantity(o.written().1)),
                    utilization(o.utilization),
                    if o.pass {
                        "pass".into()
                    } else {
                        "**FAIL**".into()
                    },
                ]
            })
            .collect();
        doc.table(
            &[
                "Check",
                "Governing combination",
                "Value",
                "Limit",
                "Utilization",
                "Result",
            ],
            &rows,
            &[2, 3, 4],
        );
    }
}

fn buckling_section(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    if a.buckling.is_empty() {
        return;
    }
    let (model, solution) = (&a.model, &a.solution);
    doc.h(2, "Stability (Euler buckling)");
    doc.p("For parts with a `buckling_length` (the effective length K·L) the Euler load P_e = π²·E·I / (K·L)² and the slenderness K·L / r with r = √(I / A) are compared with the largest compression over all combinations. Parts spanning the same two nodes buckle together: their group takes Σ E·I.");
    let rows: Vec<Vec<String>> = a
        .buckling
        .iter()
        .map(|b| {
            let names: Vec<String> = b
                .parts
                .iter()
                .map(|&i| format!("`{}`", model.parts[i].name))
                .collect();
            vec![
                names.join(" + "),
                f.with(b.kl, &f.d.small),
                b.r.map_or("—".into(), |r| f.small(r)),
                b.slenderness().map_or("—".into(), |s| f.n(s)),
                f.force(b.euler),
                if b.compression > 0.0 {
                    format!(
                        "{} (`{}`)",
                        f.force(b.compression),
                        solution.combinations[b.combination].name
                    )
                } else {
                    "none (never in compression)".into()
                },
                f.n(b.compression / b.euler),
            ]
        })
        .collect();
    doc.table(
        &[
            "Part",
            "K·L",
            "r",
            "K·L / r",
            "P_e",
            "Largest compression",
            "C / P_e",
        ],
        &rows,
        &[1, 2, 3, 4, 5, 6],
    );
    for b in &a.buckling {
        let names: Vec<&str> = b
            .parts
            .iter()
            .map(|&i| model.parts[i].name.as_str())
            .collect();
        let ei_text = b
            .parts
            .iter()
            .map(|&i| {
                let p = &model.parts[i];
                let e = p.material().map_or(0.0, |m| model.materials[m].e.value);
                format!(
                    "{} · {}",
                    f.stress(e),
                    f.d.quantity(crate::units::Quantity::new(
                        p.inertia().unwrap_or(0.0),
                        Dimension::SECOND_MOMENT
                    ))
                )
            })
            .collect::<Vec<_>>()
            .join(" + ");
        let kl = f.with(b.kl, &f.d.small);
        // Σ only where a group of parts buckles together.
        let ei = if b.parts.len() > 1 { "Σ E·I" } else { "E·I" };
        doc.eq(&format!(
            "P_e({}) = π² · {ei} / (K·L)² = π² · ({ei_text}) / ({kl} · {kl}) = {}",
            names.join(" + "),
            f.force(b.euler)
        ));
    }
    doc.end_list();
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

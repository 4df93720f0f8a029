//! What a revision changed: inputs by name, parts and nodes added or
//! removed, results per combination, and the checks (`tandem diff`).

mod render;

pub use render::{json, markdown};

use serde_json::{json, Value};

use crate::model::{Kind, Law, Model};
use crate::report::display::{number, Display};
use crate::report::text::combination_text;
use crate::solve::Solution;
use crate::source::Source;
use crate::units::{Dimension, Quantity};
use crate::Analysis;

/// One input that differs. `None` on a side where it does not exist.
#[derive(Clone, Debug, PartialEq)]
pub struct InputChange {
    pub what: String,
    pub old: Option<String>,
    pub new: Option<String>,
}

/// One result that changed by more than the threshold.
#[derive(Clone, Debug, PartialEq)]
pub struct ResultChange {
    pub combination: String,
    pub what: String,
    pub old: Quantity,
    pub new: Quantity,
    /// Change of magnitude in percent; `None` when the old value was zero or
    /// the sign reversed.
    pub percent: Option<f64>,
    /// The value changed sign.
    pub reversed: bool,
}

/// One check whose utilization or status changed.
#[derive(Clone, Debug, PartialEq)]
pub struct CheckChange {
    pub label: String,
    pub combination: String,
    pub old: Option<(Option<f64>, bool)>,
    pub new: Option<(Option<f64>, bool)>,
}

impl CheckChange {
    /// Passed before, fails now.
    pub fn newly_fails(&self) -> bool {
        matches!((self.old, self.new), (Some((_, true)), Some((_, false))))
    }
    fn flipped(&self) -> bool {
        matches!((self.old, self.new), (Some((_, a)), Some((_, b))) if a != b)
    }
}

/// Everything that differs between two revisions.
#[derive(Clone, Debug, PartialEq)]
pub struct Diff {
    pub old_name: String,
    pub new_name: String,
    pub inputs: Vec<InputChange>,
    pub added: Vec<String>,
    pub removed: Vec<String>,
    pub results: Vec<ResultChange>,
    pub checks: Vec<CheckChange>,
    /// Highest utilization before and after, with its check and combination.
    pub governing: [Option<(f64, String, String)>; 2],
    pub min_change: f64,
}

impl Diff {
    /// Checks that passed before and fail now.
    pub fn newly_failing(&self) -> usize {
        self.checks.iter().filter(|c| c.newly_fails()).count()
    }
}

/// Every input of a model as (name, text), in file order.
fn facts(model: &Model, source: &Source, d: &Display) -> Vec<(String, String)> {
    let mut v = Vec::new();
    for (k, val) in &model.title.fields {
        v.push((format!("calc {k}"), format!("\"{val}\"")));
    }
    for l in &model.lets {
        v.push((
            format!("let `{}`", l.name),
            format!(
                "{} (= {})",
                source.slice(l.expr.span).trim(),
                d.quantity(l.value)
            ),
        ));
    }
    let p = |x: f64| d.quantity(Quantity::new(x, Dimension::PRESSURE));
    for m in &model.materials {
        let name = format!("material `{}`", m.name);
        v.push((format!("{name} E"), p(m.e.value)));
        if let Some(a) = m.alpha {
            v.push((
                format!("{name} alpha"),
                d.quantity(Quantity::new(a.value, Dimension::PER_TEMPERATURE)),
            ));
        }
        for (key, val) in [
            ("yield", m.yield_strength),
            ("yield_compression", m.yield_compression),
            ("allowable", m.allowable),
            ("allowable_tension", m.allowable_tension),
            ("allowable_compression", m.allowable_compression),
        ] {
            if let Some(x) = val {
                v.push((format!("{name} {key}"), p(x.value)));
            }
        }
        if let Some(c) = m.creep {
            v.push((format!("{name} creep"), number(c, d.digits)));
        }
    }
    let len = |x: f64| d.quantity(Quantity::new(x, Dimension::LENGTH));
    for n in &model.nodes {
        let name = format!("node `{}`", n.name);
        v.push((
            format!("{name} position"),
            match model.kind {
                Kind::Axial => len(n.x.value),
                Kind::Plane => format!("({}, {})", len(n.x.value), len(n.y.value)),
            },
        ));
        let sup = match (model.kind, n.fixed) {
            (Kind::Axial, [true, _]) | (Kind::Plane, [true, true]) => "fixed",
            (Kind::Plane, [true, false]) => "fixed in x",
            (Kind::Plane, [false, true]) => "fixed in y",
            _ => "free",
        };
        v.push((format!("{name} support"), sup.into()));
    }
    for part in &model.parts {
        let kind = if part.bend.is_some() { "beam" } else { "part" };
        let name = format!("{kind} `{}`", part.name);
        v.push((
            format!("{name} ends"),
            format!(
                "{}, {}",
                model.nodes[part.ends[0]].name, model.nodes[part.ends[1]].name
            ),
        ));
        match &part.law {
            Law::Member { material, area, .. } => {
                v.push((
                    format!("{name} material"),
                    model.materials[*material].name.clone(),
                ));
                v.push((
                    format!("{name} area"),
                    d.quantity(Quantity::new(area.value, Dimension::AREA)),
                ));
            }
            Law::Spring { stiffness } => {
                v.push((
                    format!("{name} stiffness"),
                    d.quantity(Quantity::new(stiffness.value, Dimension::STIFFNESS)),
                ));
            }
        }
        if let Some(b) = &part.bend {
            v.push((
                format!("{name} inertia"),
                d.quantity(Quantity::new(b.inertia, Dimension::SECOND_MOMENT)),
            ));
            v.push((format!("{name} depth"), len(2.0 * b.fibre)));
            let ends = ["A", "B"];
            let hinged: Vec<&str> = (0..2).filter(|&k| b.hinge[k]).map(|k| ends[k]).collect();
            v.push((
                format!("{name} hinge"),
                if hinged.is_empty() {
                    "none".into()
                } else {
                    hinged.join(", ")
                },
            ));
        }
        if part.misfit.value != 0.0 {
            v.push((format!("{name} misfit"), len(part.misfit.value)));
        }
        if part.slack.value != 0.0 {
            v.push((format!("{name} slack"), len(part.slack.value)));
        }
        v.push((format!("{name} carries"), part.carries.name().into()));
    }
    for r in &model.rigids {
        let nodes: Vec<&str> = r
            .nodes
            .iter()
            .map(|&n| model.nodes[n].name.as_str())
            .collect();
        v.push((format!("rigid `{}`", r.name), nodes.join(", ")));
    }
    for c in &model.cases {
        let acts = crate::report::text::case_actions(model, c, d);
        v.push((
            format!("case `{}`", c.name),
            if acts.is_empty() {
                "no loads".into()
            } else {
                acts.join("; ")
            },
        ));
    }
    for i in 0..model.combinations.len() {
        if !model.combinations[i].declared {
            continue; // a lone case, already listed
        }
        v.push((
            format!("combination `{}`", model.combinations[i].name),
            combination_text(model, i),
        ));
    }
    for c in &model.checks {
        v.push((
            format!("check \"{}\"", c.label),
            format!(
                "{} {} {}",
                source.slice(c.lhs.span).trim(),
                c.op.symbol(),
                source.slice(c.rhs.span).trim()
            ),
        ));
    }
    v
}

/// Whether the fact `k`, found on one side only, belongs to a declaration
/// the other side lacks as a whole; that declaration is then listed in
/// `whole` (once), not each of its facts.
fn whole_declaration(
    k: &str,
    other: &std::collections::HashSet<String>,
    seen: &mut std::collections::HashSet<String>,
    whole: &mut Vec<String>,
) -> bool {
    let Some(e) = entity(k) else {
        return false;
    };
    if other.contains(&e) {
        return false;
    }
    if seen.insert(e.clone()) {
        whole.push(e);
    }
    true
}

/// A case's actions as facts: loads, temperatures, free strains, movements.
fn results(model: &Model, solution: &Solution) -> Vec<(String, String, Quantity)> {
    let mut v = Vec::new();
    for r in &solution.combinations {
        for (i, (p, pr)) in model.parts.iter().zip(&r.parts).enumerate() {
            let kind = if p.bend.is_some() { "beam" } else { "part" };
            v.push((
                r.name.clone(),
                format!("{kind} `{}` force", p.name),
                Quantity::new(pr.force.value, Dimension::FORCE),
            ));
            if let Some(s) = pr.stress {
                v.push((
                    r.name.clone(),
                    format!("{kind} `{}` stress", p.name),
                    Quantity::new(s.value, Dimension::PRESSURE),
                ));
            }
            if let Some(b) = r.beam(i) {
                for (what, q) in [
                    ("moment", Quantity::new(b.moment_max.0, Dimension::MOMENT)),
                    ("shear", Quantity::new(b.shear_max, Dimension::FORCE)),
                    (
                        "deflection",
                        Quantity::new(b.deflection_max.0, Dimension::LENGTH),
                    ),
                ] {
                    v.push((r.name.clone(), format!("beam `{}` {what}", p.name), q));
                }
            }
        }
        let turns = model.rotating_nodes();
        for (i, (n, nr)) in model.nodes.iter().zip(&r.nodes).enumerate() {
            match model.kind {
                Kind::Axial => v.push((
                    r.name.clone(),
                    format!("node `{}` displacement", n.name),
                    Quantity::new(nr.displacement[0].value, Dimension::LENGTH),
                )),
                Kind::Plane => {
                    for (k, axis) in ["dx", "dy"].iter().enumerate() {
                        v.push((
                            r.name.clone(),
                            format!("node `{}` {axis}", n.name),
                            Quantity::new(nr.displacement[k].value, Dimension::LENGTH),
                        ));
                    }
                }
            }
            if turns[i] {
                v.push((
                    r.name.clone(),
                    format!("node `{}` rotation (rad)", n.name),
                    Quantity::number(nr.rotation),
                ));
            }
        }
    }
    v
}

fn check_table(a: &Analysis) -> Vec<(String, String, Option<f64>, bool)> {
    a.checks
        .outcomes
        .iter()
        .map(|o| {
            (
                o.label.to_string(),
                a.solution.combinations[o.combination].name.clone(),
                o.utilization,
                o.pass,
            )
        })
        .collect()
}

fn governing(a: &Analysis) -> Option<(f64, String, String)> {
    a.checks.highest().map(|o| {
        (
            o.utilization.unwrap_or(f64::INFINITY),
            o.label.to_string(),
            a.solution.combinations[o.combination].name.clone(),
        )
    })
}

fn entity(what: &str) -> Option<String> {
    // "part `x` area" -> "part `x`"
    let mut it = what.splitn(3, ' ');
    let kind = it.next()?;
    let name = it.next()?;
    matches!(kind, "part" | "beam" | "node").then(|| format!("{kind} {name}"))
}

/// Compare two analysed revisions.
#[allow(clippy::too_many_arguments)]
pub fn diff(
    old_src: &Source,
    old: &Analysis,
    new_src: &Source,
    new: &Analysis,
    display: &Display,
    min_change_percent: f64,
) -> Diff {
    let (inputs, added, removed) = input_changes(old_src, old, new_src, new, display);
    let changes = result_changes(old, new, min_change_percent);
    let checks = check_changes(old, new, min_change_percent);
    Diff {
        old_name: old_src.name.clone(),
        new_name: new_src.name.clone(),
        inputs,
        added,
        removed,
        results: changes,
        checks,
        governing: [governing(old), governing(new)],
        min_change: min_change_percent,
    }
}

/// The inputs that changed, as named facts: (changed and renamed,
/// declarations added, declarations removed).
fn input_changes(
    old_src: &Source,
    old: &Analysis,
    new_src: &Source,
    new: &Analysis,
    display: &Display,
) -> (Vec<InputChange>, Vec<String>, Vec<String>) {
    let fo = facts(&old.model, old_src, display);
    let fnew = facts(&new.model, new_src, display);
    let old_map: std::collections::HashMap<&str, &str> =
        fo.iter().map(|(k, v)| (k.as_str(), v.as_str())).collect();
    let new_map: std::collections::HashMap<&str, &str> =
        fnew.iter().map(|(k, v)| (k.as_str(), v.as_str())).collect();
    let old_entities: std::collections::HashSet<String> =
        fo.iter().filter_map(|(k, _)| entity(k)).collect();
    let new_entities: std::collections::HashSet<String> =
        fnew.iter().filter_map(|(k, _)| entity(k)).collect();
    let mut inputs = Vec::new();
    let mut added = Vec::new();
    let mut removed = Vec::new();
    let mut seen: std::collections::HashSet<String> = std::collections::HashSet::new();
    for (k, v) in &fo {
        match new_map.get(k.as_str()) {
            Some(v2) if *v2 != v.as_str() => inputs.push(InputChange {
                what: k.clone(),
                old: Some(v.clone()),
                new: Some((*v2).to_string()),
            }),
            Some(_) => {}
            None => {
                if !whole_declaration(k, &new_entities, &mut seen, &mut removed) {
                    inputs.push(InputChange {
                        what: k.clone(),
                        old: Some(v.clone()),
                        new: None,
                    });
                }
            }
        }
    }
    for (k, v) in &fnew {
        if old_map.contains_key(k.as_str()) {
            continue;
        }
        if !whole_declaration(k, &old_entities, &mut seen, &mut added) {
            inputs.push(InputChange {
                what: k.clone(),
                old: None,
                new: Some(v.clone()),
            });
        }
    }

    // A removed and an added declaration of one kind with the same content
    // is a rename.
    let mut renamed: Vec<InputChange> = Vec::new();
    let mut used = vec![false; inputs.len()];
    // Added inputs by (kind, content), to pair with removed ones.
    let mut added_by: std::collections::HashMap<(String, String), Vec<usize>> =
        std::collections::HashMap::new();
    for (j, c) in inputs.iter().enumerate().rev() {
        if let (None, Some(v)) = (&c.old, &c.new) {
            let kind = c.what.split(' ').next().unwrap_or("").to_string();
            added_by.entry((kind, v.clone())).or_default().push(j);
        }
    }
    for i in 0..inputs.len() {
        let (Some(v), None) = (&inputs[i].old, &inputs[i].new) else {
            continue;
        };
        let kind = inputs[i].what.split(' ').next().unwrap_or("").to_string();
        if let Some(j) = added_by.get_mut(&(kind, v.clone())).and_then(Vec::pop) {
            used[i] = true;
            used[j] = true;
            let new_name = inputs[j]
                .what
                .split_once(' ')
                .map_or("", |x| x.1)
                .to_string();
            renamed.push(InputChange {
                what: format!("{} renamed to {new_name}", inputs[i].what),
                old: inputs[i].old.clone(),
                new: inputs[j].new.clone(),
            });
        }
    }
    let mut inputs: Vec<InputChange> = inputs
        .into_iter()
        .zip(used)
        .filter(|(_, u)| !u)
        .map(|(c, _)| c)
        .collect();
    inputs.extend(renamed);
    (inputs, added, removed)
}

/// The results that changed by more than `min_change_percent`.
fn result_changes(old: &Analysis, new: &Analysis, min_change_percent: f64) -> Vec<ResultChange> {
    let ro = results(&old.model, &old.solution);
    let rn = results(&new.model, &new.solution);
    let ro_map: std::collections::HashMap<(&str, &str), Quantity> = ro
        .iter()
        .map(|(c, w, q)| ((c.as_str(), w.as_str()), *q))
        .collect();
    // Largest value of each kind per combination, for the round-off floor.
    let mut largest: std::collections::HashMap<(&str, Dimension), f64> =
        std::collections::HashMap::new();
    for (c, _, x) in &rn {
        let e = largest.entry((c.as_str(), x.dim)).or_insert(0.0);
        *e = e.max(x.value.abs());
    }
    let mut changes = Vec::new();
    for (c, what, q) in &rn {
        let Some(o) = ro_map.get(&(c.as_str(), what.as_str())) else {
            continue;
        };
        let scale = o.value.abs();
        let delta = q.value - o.value;
        let reversed = o.value * q.value < 0.0;
        let percent = (scale > 0.0 && !reversed).then(|| 100.0 * (q.value.abs() - scale) / scale);
        // Changes at round-off level of the largest value of the kind are noise.
        let floor = largest.get(&(c.as_str(), q.dim)).copied().unwrap_or(0.0) * 1e-9;
        let significant = match percent {
            Some(p) => p.abs() > min_change_percent && delta.abs() > floor,
            None => delta.abs() > floor,
        };
        if significant {
            changes.push(ResultChange {
                combination: c.clone(),
                what: what.clone(),
                old: *o,
                new: *q,
                percent,
                reversed,
            });
        }
    }
    changes
}

/// The checks whose result or utilization changed (or that are in one
/// revision only): pass → fail first, then other flips.
fn check_changes(old: &Analysis, new: &Analysis, min_change_percent: f64) -> Vec<CheckChange> {
    let co = check_table(old);
    let cn = check_table(new);
    let co_map: std::collections::HashMap<(&str, &str), (Option<f64>, bool)> = co
        .iter()
        .map(|(l, c, u, p)| ((l.as_str(), c.as_str()), (*u, *p)))
        .collect();
    let cn_keys: std::collections::HashSet<(&str, &str)> = cn
        .iter()
        .map(|(l, c, _, _)| (l.as_str(), c.as_str()))
        .collect();
    let mut checks = Vec::new();
    for (label, combo, u, pass) in &cn {
        let before = co_map.get(&(label.as_str(), combo.as_str())).copied();
        let changed = match before {
            None => true,
            Some((ou, op)) => {
                op != *pass
                    || match (ou, u) {
                        (Some(a), Some(b)) => {
                            (b - a).abs() > min_change_percent / 100.0 * a.abs().max(1e-12)
                        }
                        (a, b) => a.is_some() != b.is_some(),
                    }
            }
        };
        if changed {
            checks.push(CheckChange {
                label: label.clone(),
                combination: combo.clone(),
                old: before,
                new: Some((*u, *pass)),
            });
        }
    }
    for (label, combo, u, pass) in &co {
        if !cn_keys.contains(&(label.as_str(), combo.as_str())) {
            checks.push(CheckChange {
                label: label.clone(),
                combination: combo.clone(),
                old: Some((*u, *pass)),
                new: None,
            });
        }
    }
    // pass -> fail first, then other flips, then the rest
    checks.sort_by_key(|c| (!c.newly_fails(), !c.flipped()));
    checks
}

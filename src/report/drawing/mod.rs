//! The drawings of a report, written as SVG by tandem itself: a sketch of
//! the assembly (parts, nodes, supports, rigid bodies, ties, each case's
//! loads) and, per combination, the parts' forces with the displaced shape.
//! Plane models are drawn at true geometry and one scale; axial models as a
//! schematic column. The symbols are tandem's own and every drawing carries
//! a key that explains the ones it uses. The bytes depend on the model and
//! the display only.

mod beams;
pub mod chart;
mod key;
mod layout;
mod path;
mod svg;

pub use path::capacity_plot;

use key::{key, key_height, Entry};
use layout::{Layout, MARGIN};
pub use svg::escape;
use svg::{Stroke, Svg, P};

use crate::model::{Carries, Kind, Law, Model};
use crate::report::display::{number, Display};
use crate::solve::{CombinationResult, PartState};

/// Beyond this many parts and nodes a drawing is no longer legible, and a
/// report leaves the drawings out (and says so).
pub const MAX_DRAWN: usize = 400;

/// Whether a model is small enough to draw.
#[must_use]
pub fn drawable(model: &Model) -> bool {
    model.parts.len() + model.nodes.len() <= MAX_DRAWN
}

/// Whether the drawings name each part beside it (not in an axial
/// schematic of many side-by-side parts).
#[must_use]
pub fn names_fit(model: &Model) -> bool {
    Layout::of(model).labels_fit()
}

/// A drawing to write beside a Markdown report or inline in HTML.
#[derive(Clone, Debug, PartialEq)]
pub struct Drawing {
    /// The file name's part after the report's stem: `sketch.svg`,
    /// `forces.COMBINATION.svg`.
    pub suffix: String,
    /// What it shows, for the link's text.
    pub caption: String,
    pub svg: String,
}

/// The first number of the 1-2-5 series not below `v` (v > 0).
pub(crate) fn nice(v: f64) -> f64 {
    let p = 10f64.powf(v.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * p)
        .find(|&x| x >= v * (1.0 - 1e-12))
        .unwrap_or(10.0 * p)
}

/// Supports, rigid bodies and ties: drawn in both kinds of drawing.
fn fixtures(s: &mut Svg, model: &Model, l: &Layout, entries: &mut Vec<Entry>) {
    for b in &model.rigids {
        s.open("rigid", &b.name);
        let pts: Vec<P> = b.nodes.iter().map(|&n| l.node[n]).collect();
        s.band(&pts);
        s.close();
    }
    if !model.rigids.is_empty() {
        entries.push(Entry::Rigid);
    }
    for (k, t) in model.ties.iter().enumerate() {
        s.open("tie", &format!("tie {}", k + 1));
        for w in t.nodes.windows(2) {
            let (a, b) = (l.node[w[0]].add(8.0, 0.0), l.node[w[1]].add(8.0, 0.0));
            s.line(a, b, Stroke::Tie);
        }
        for &n in &t.nodes {
            s.circle(
                l.node[n],
                7.0,
                "fill=\"none\" stroke=\"#000\" stroke-width=\"1\" stroke-dasharray=\"2 2\"",
            );
        }
        s.close();
    }
    if !model.ties.is_empty() {
        entries.push(Entry::Tie);
    }
    let (mut fixed, mut roller, mut clamped) = (false, false, false);
    let turns = model.rotating_nodes();
    for (i, n) in model.nodes.iter().enumerate() {
        if !n.fixed.iter().any(|&f| f) {
            continue;
        }
        if model.kind == Kind::Plane && n.fixed == [true, true] && n.fixed_rotation && turns[i] {
            s.open("support", &n.name);
            beams::clamp(s, l.node[i]);
            s.close();
            clamped = true;
            continue;
        }
        s.open("support", &n.name);
        match model.kind {
            Kind::Axial => {
                let left = l.node_line[i].0;
                let at = left.add(-12.0, 0.0);
                s.line(at, left, Stroke::Thin);
                let below = l.rank[i] * 2 < model.nodes.len();
                s.support(at, (0.0, if below { -1.0 } else { 1.0 }), true);
                fixed = true;
            }
            Kind::Plane => {
                let at = l.node[i];
                match n.fixed {
                    [true, true] => {
                        s.support(at, (0.0, -1.0), true);
                        fixed = true;
                    }
                    [true, false] => {
                        s.support(at, (1.0, 0.0), false);
                        roller = true;
                    }
                    _ => {
                        s.support(at, (0.0, -1.0), false);
                        roller = true;
                    }
                }
            }
        }
        s.close();
    }
    if fixed {
        entries.push(Entry::Fixed);
    }
    if roller {
        entries.push(Entry::Roller);
    }
    if clamped {
        entries.push(Entry::Clamped);
    }
}

/// Nodes with their names.
fn nodes(s: &mut Svg, model: &Model, l: &Layout) {
    for (i, n) in model.nodes.iter().enumerate() {
        s.open("node", &n.name);
        let (a, b) = l.node_line[i];
        if a != b {
            s.line(a, b, Stroke::Thin);
        }
        s.circle(b, 3.0, "fill=\"#000\"");
        let label = match model.kind {
            Kind::Axial => b.add(6.0, 14.0),
            Kind::Plane => b.add(6.0, -7.0),
        };
        s.text(label, "start", &n.name, true);
        s.close();
    }
}

/// The unit vector of a part on the drawing, and the side its label goes.
fn part_axes(a: P, b: P) -> ((f64, f64), (f64, f64)) {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let len = dx.hypot(dy).max(1e-9);
    let u = (dx / len, dy / len);
    // the normal that points up (or right for a horizontal-normal part)
    let mut n = (-u.1, u.0);
    if n.1 > 1e-9 || (n.1.abs() <= 1e-9 && n.0 < 0.0) {
        n = (-n.0, -n.1);
    }
    (u, n)
}

/// A label beside a part's middle, on the side of its normal `n`.
fn part_label(s: &mut Svg, mid: P, n: (f64, f64), lines: &[String]) {
    let anchor = if n.0 > 0.3 {
        "start"
    } else if n.0 < -0.3 {
        "end"
    } else {
        "middle"
    };
    let base = mid.add(n.0 * 9.0, n.1 * 9.0);
    let count = lines.len() as f64;
    // above the part the lines grow upward, beside it they centre
    let first = if n.1 < -0.3 {
        -12.0 * (count - 1.0)
    } else {
        4.0 - 6.0 * (count - 1.0)
    };
    for (k, line) in lines.iter().enumerate() {
        s.text(base.add(0.0, first + 12.0 * k as f64), anchor, line, k == 0);
    }
}

/// An arrow whose head touches `at`, pointing along the screen direction
/// `dir`, labelled at its tail; `k` is the number of labels already at that
/// tail, and this one is written beyond them.
fn arrow_at(s: &mut Svg, at: P, dir: (f64, f64), k: usize, label: &str) {
    let len = dir.0.hypot(dir.1);
    let shift = 12.0 * k as f64;
    if len == 0.0 {
        s.circle(at, 6.0, "fill=\"none\" stroke=\"#000\" stroke-width=\"1\"");
        s.text(at.add(9.0, -9.0 - shift), "start", label, false);
        return;
    }
    let u = (dir.0 / len, dir.1 / len);
    let head = at.add(-u.0 * 5.0, -u.1 * 5.0);
    let tail = head.add(-u.0 * 40.0, -u.1 * 40.0);
    s.arrow(tail, head);
    // beside a vertical arrow's tail, else beyond its tail
    let (anchor, text_at) = if u.0.abs() <= 0.3 {
        let y = if u.1 > 0.0 { 4.0 } else { -4.0 };
        ("start", tail.add(6.0, y + shift * u.1.signum()))
    } else if u.0 > 0.0 {
        ("end", tail.add(-4.0, 4.0 + shift))
    } else {
        ("start", tail.add(4.0, 4.0 + shift))
    };
    s.text(text_at, anchor, label, false);
}

/// A force vector as the label shows it.
fn force_words(d: &Display, f: [f64; 2], kind: Kind) -> String {
    let n = |v: f64| number(d.force.value(v), d.digits);
    match kind {
        Kind::Axial => format!("{} {}", n(f[0].abs()), d.force.name),
        Kind::Plane if f[0] == 0.0 || f[1] == 0.0 => {
            format!("{} {}", n(f[0].hypot(f[1])), d.force.name)
        }
        Kind::Plane => format!("({}, {}) {}", n(f[0]), n(f[1]), d.force.name),
    }
}

fn kind_entries(model: &Model) -> Vec<Entry> {
    let mut out = Vec::new();
    let has = |f: &dyn Fn(&crate::model::Part) -> bool| model.parts.iter().any(f);
    if has(&|p| p.carries == Carries::Tension) {
        out.push(Entry::TensionOnly);
    }
    if has(&|p| p.carries == Carries::Compression) {
        out.push(Entry::CompressionOnly);
    }
    if has(&|p| p.slack.value > 0.0) {
        out.push(Entry::Gap);
    }
    out
}

/// The marks of a part's law and sense.
fn part_marks(s: &mut Svg, p: &crate::model::Part, a: P, b: P) {
    let (u, _) = part_axes(a, b);
    let mid = a.mid(b);
    match p.carries {
        Carries::Tension => s.mark(mid.add(u.0 * 14.0, u.1 * 14.0), "t"),
        Carries::Compression => s.mark(mid.add(u.0 * 14.0, u.1 * 14.0), "c"),
        Carries::Both => {}
    }
    if p.slack.value > 0.0 {
        s.gap(mid.add(-u.0 * 14.0, -u.1 * 14.0), u);
    }
}

/// The sketch of the assembly: every part, node, support, rigid body and
/// tie, and each case's loads.
#[must_use]
pub fn sketch(model: &Model, d: &Display) -> Drawing {
    let l = Layout::of(model);
    let mut entries = vec![Entry::Node];
    if model.parts.iter().any(|p| p.bend.is_none()) {
        entries.push(Entry::Member);
    }
    entries.extend(beams::entries(model));
    if model
        .parts
        .iter()
        .any(|p| matches!(p.law, Law::Spring { .. }))
    {
        entries.push(Entry::Spring);
    }
    entries.extend(kind_entries(model));
    let mut body = Svg::fragment();
    fixtures(&mut body, model, &l, &mut entries);
    for (i, p) in model.parts.iter().enumerate() {
        let (a, b) = l.part[i];
        body.open(if p.bend.is_some() { "beam" } else { "part" }, &p.name);
        match p.law {
            Law::Spring { .. } => body.spring(a, b),
            Law::Member { .. } if p.bend.is_some() => beams::beam_line(&mut body, a, b),
            Law::Member { .. } => body.line(a, b, Stroke::Part),
        }
        part_marks(&mut body, p, a, b);
        beams::hinges(&mut body, p, a, b);
        let (_, n) = part_axes(a, b);
        if l.labels_fit() {
            part_label(&mut body, a.mid(b), n, &[p.name.to_string()]);
        }
        body.close();
    }
    nodes(&mut body, model, &l);
    // loads at one node in one direction share an arrow's place; their
    // labels stack
    let mut seen: std::collections::BTreeMap<(usize, i64, i64), usize> =
        std::collections::BTreeMap::new();
    for c in &model.cases {
        for load in &c.loads {
            body.open("load", &c.name);
            let f = [load.force[0].value, load.force[1].value];
            let dir = l.screen(f);
            let len = dir.0.hypot(dir.1).max(f64::MIN_POSITIVE);
            // the direction to a thousandth, as a key
            #[allow(clippy::cast_possible_truncation)]
            let key = (
                load.node,
                (dir.0 / len * 1000.0).round() as i64,
                (dir.1 / len * 1000.0).round() as i64,
            );
            let k = seen.entry(key).or_insert(0);
            let at = match model.kind {
                Kind::Axial => l.node[load.node].add(60.0, 0.0),
                Kind::Plane => l.node[load.node],
            };
            let label = format!("{}: {}", c.name, force_words(d, f, model.kind));
            arrow_at(&mut body, at, dir, *k, &label);
            *k += 1;
            body.close();
        }
    }
    if model.cases.iter().any(|c| !c.loads.is_empty()) {
        entries.push(Entry::Load);
    }
    beams::sketch_loads(&mut body, model, &l, d, &mut entries);
    if model.kind == Kind::Plane {
        entries.push(geometry_bar(&l, d));
    }
    let caption = "Sketch of the assembly".to_string();
    Drawing {
        suffix: "sketch.svg".into(),
        svg: assemble(&l, body, &entries, &caption),
        caption,
    }
}

/// The scale bar of a plane drawing's geometry.
fn geometry_bar(l: &Layout, d: &Display) -> Entry {
    let extent = (l.width - 2.0 * MARGIN).max(1.0) / l.scale;
    let unit = d.length.factor;
    let length = nice(extent / 4.0 / unit);
    Entry::Bar(
        length * unit * l.scale,
        format!(
            "scale of the geometry: {} {}",
            number(length, 1),
            d.length.name
        ),
    )
}

/// The whole SVG: header, the drawing's body, the key.
/// The drawing is widened (and its body shifted) where labels reach past
/// its edges.
fn assemble(l: &Layout, body: Svg, entries: &[Entry], caption: &str) -> String {
    let height = l.height + key_height(entries);
    let (lo, hi) = body.text_extent();
    let shift = if lo < 8.0 { 8.0 - lo } else { 0.0 };
    let width = l.width.max(hi + shift + 8.0) + shift;
    let mut s = Svg::new(width, height, caption);
    if shift > 0.0 {
        s.raw(&format!("<g transform=\"translate({shift:.1} 0)\">\n"));
    }
    s.raw(&body.into_body());
    if shift > 0.0 {
        s.raw("</g>\n");
    }
    key(&mut s, entries, l.height, width);
    s.finish()
}

/// The drawing of one combination: each part's force beside it, tension
/// and compression told apart by line style, the displaced shape dashed at
/// a stated scale, and the reactions.
#[must_use]
pub fn forces(model: &Model, r: &CombinationResult, ci: usize, d: &Display) -> Drawing {
    let l = Layout::of(model);
    let mut entries = vec![Entry::Node];
    let mut body = Svg::fragment();
    fixtures(&mut body, model, &l, &mut entries);
    // the displaced shape first, under the parts
    // a beam's deflection from its chord counts too
    let umax = r
        .nodes
        .iter()
        .map(|n| n.displacement[0].value.hypot(n.displacement[1].value))
        .chain(r.beams.iter().map(|b| b.deflection_max.0.abs()))
        .fold(0.0f64, f64::max);
    // displacements below a femtometre are round-off: no displaced shape
    if umax > 1e-15 {
        let (k, entry) = displacement_scale(&l, d, umax);
        body.open("displaced", "displaced shape");
        let u = |n: usize| {
            [
                r.nodes[n].displacement[0].value,
                r.nodes[n].displacement[1].value,
            ]
        };
        match model.kind {
            Kind::Axial => {
                for i in 0..model.nodes.len() {
                    let (a, b) = l.node_line[i];
                    body.line(l.moved(a, u(i), k), l.moved(b, u(i), k), Stroke::Displaced);
                }
            }
            Kind::Plane => {
                for (i, p) in model.parts.iter().enumerate() {
                    if p.bend.is_some() {
                        continue;
                    }
                    let (a, b) = l.part[i];
                    body.line(
                        l.moved(a, u(p.ends[0]), k),
                        l.moved(b, u(p.ends[1]), k),
                        Stroke::Displaced,
                    );
                }
                beams::displaced(&mut body, model, &l, r, k);
                for b in &model.rigids {
                    let pts: Vec<P> = b
                        .nodes
                        .iter()
                        .map(|&n| l.moved(l.node[n], u(n), k))
                        .collect();
                    body.polyline(
                        &pts,
                        "fill=\"none\" stroke=\"#555\" stroke-width=\"1.2\" stroke-dasharray=\"6 3\"",
                    );
                }
            }
        }
        body.close();
        entries.extend(entry);
    }
    let diagram = beams::moment_diagrams(&mut body, model, &l, r, d);
    let tiny = 1e-9 * r.force_scale.value.max(f64::MIN_POSITIVE);
    let (mut tension, mut compression, mut idle) = (false, false, false);
    for (i, p) in model.parts.iter().enumerate() {
        let (a, b) = l.part[i];
        let n = r.parts[i].force.value;
        let stroke = if p.bend.is_some() {
            // a beam is drawn as a beam; its axial force is written
            Stroke::Beam
        } else if r.parts[i].state == PartState::Slack || n.abs() <= tiny {
            idle = true;
            Stroke::Idle
        } else if n > 0.0 {
            tension = true;
            Stroke::Tension
        } else {
            compression = true;
            Stroke::Compression
        };
        body.open(if p.bend.is_some() { "beam" } else { "part" }, &p.name);
        body.line(a, b, stroke);
        part_marks(&mut body, p, a, b);
        beams::hinges(&mut body, p, a, b);
        let shown = d.force.value(if n.abs() <= tiny { 0.0 } else { n });
        let value = if shown > 0.0 {
            format!("+{} {}", number(shown, d.digits), d.force.name)
        } else {
            format!(
                "{} {}",
                number(shown, d.digits).replace('-', "−"),
                d.force.name
            )
        };
        // a beam's axial force is named, beside its moment diagram
        let value = if p.bend.is_some() {
            format!("N {value}")
        } else {
            value
        };
        let (_, nrm) = part_axes(a, b);
        if l.labels_fit() {
            part_label(&mut body, a.mid(b), nrm, &[p.name.to_string(), value]);
        } else {
            // the force stays with the part, for a reader of the SVG
            body.raw(&format!("<desc>{}</desc>\n", escape(&value)));
        }
        body.close();
    }
    nodes(&mut body, model, &l);
    let mut reactions = false;
    for (i, n) in model.nodes.iter().enumerate() {
        let f = [r.nodes[i].reaction[0].value, r.nodes[i].reaction[1].value];
        if !n.fixed.iter().any(|&x| x) || f[0].hypot(f[1]) <= tiny {
            continue;
        }
        reactions = true;
        body.open("reaction", &n.name);
        // beyond the support symbol, on its ground side
        let (at, ground) = match model.kind {
            Kind::Axial => {
                let below = l.rank[i] * 2 < model.nodes.len();
                let g = if below { (0.0, 1.0) } else { (0.0, -1.0) };
                (l.node_line[i].0.add(-12.0, 0.0), g)
            }
            Kind::Plane if n.fixed == [true, false] => (l.node[i], (-1.0, 0.0)),
            Kind::Plane => (l.node[i], (0.0, 1.0)),
        };
        let base = at.add(ground.0 * 24.0, ground.1 * 24.0);
        let dir = l.screen(f);
        let len = dir.0.hypot(dir.1);
        let u = (dir.0 / len, dir.1 / len);
        let (tail, head) = if u.0 * ground.0 + u.1 * ground.1 < 0.0 {
            (base.add(-u.0 * 40.0, -u.1 * 40.0), base)
        } else {
            (base, base.add(u.0 * 40.0, u.1 * 40.0))
        };
        body.arrow(tail, head);
        let far = if u.0 * ground.0 + u.1 * ground.1 < 0.0 {
            tail
        } else {
            head
        };
        let label_at = far.add(
            ground.0 * 12.0 + 4.0 * ground.1.abs(),
            ground.1 * 12.0 + 4.0,
        );
        let anchor = if ground.0 < 0.0 { "end" } else { "start" };
        body.text(
            label_at,
            anchor,
            &format!("R {}", force_words(d, f, model.kind)),
            false,
        );
        body.close();
    }
    let mut first = Vec::new();
    if tension {
        first.push(Entry::Tension);
    }
    if compression {
        first.push(Entry::Compression);
    }
    if idle {
        first.push(Entry::Idle);
    }
    entries.splice(1..1, first);
    entries.extend(beams::entries(model));
    entries.extend(diagram);
    entries.extend(kind_entries(model));
    if reactions {
        entries.push(Entry::Reaction);
    }
    let name = &model.combinations[ci].name;
    let caption = format!("Forces and displaced shape, combination {name}");
    Drawing {
        suffix: format!("forces.{name}.svg"),
        svg: assemble(&l, body, &entries, &caption),
        caption,
    }
}

/// Drawing units per metre of displacement, and the key's entries saying so.
fn displacement_scale(l: &Layout, d: &Display, umax: f64) -> (f64, Vec<Entry>) {
    match l.kind {
        Kind::Plane => {
            // the largest displacement drawn about 40 units long
            let raw = 40.0 / (umax * l.scale);
            let m = if raw >= 1.0 {
                let p = 10f64.powf(raw.log10().floor());
                [5.0, 2.0, 1.0]
                    .into_iter()
                    .map(|x| x * p)
                    .find(|&x| x <= raw)
                    .unwrap_or(p)
            } else {
                raw
            };
            (
                m * l.scale,
                vec![Entry::Displaced(format!(
                    "displaced shape, displacements drawn {} times their size",
                    number(m, if m >= 1.0 { 1 } else { 3 })
                ))],
            )
        }
        Kind::Axial => {
            let unit = d.small.factor;
            let round = nice(umax / unit);
            let k = 32.0 / (round * unit);
            (
                k,
                vec![
                    Entry::Displaced("displaced node levels".into()),
                    Entry::Bar(
                        32.0,
                        format!(
                            "scale of the displacements: {} {}",
                            number(round, 1),
                            d.small.name
                        ),
                    ),
                ],
            )
        }
    }
}

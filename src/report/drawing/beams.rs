//! Beams in the drawings: drawn heavier than parts, hinged ends as open
//! circles, supports that hold a rotation as clamps; in the sketch the
//! loads along beams and the moments at nodes; in a combination's drawing
//! the bending moment along each beam, on the side of its fibre in
//! tension, and its deflected shape.

use super::key::Entry;
use super::layout::Layout;
use super::svg::{escape, Stroke, Svg, P};
use crate::model::{Model, Part};
use crate::report::display::{number, Display};
use crate::solve::{BeamResult, CombinationResult};

/// Points along a beam where its moment and deflection are drawn.
const STEPS: u32 = 24;

/// How far out the largest moment of a combination is drawn.
const DIAGRAM: f64 = 30.0;

/// The unit vector from `a` to `b` on the drawing.
fn unit(a: P, b: P) -> (f64, f64) {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let len = dx.hypot(dy).max(1e-9);
    (dx / len, dy / len)
}

/// A beam's line: heavier than a part's.
pub(super) fn beam_line(s: &mut Svg, a: P, b: P) {
    s.line(a, b, Stroke::Beam);
}

/// A beam's hinged ends: an open circle just inside each.
pub(super) fn hinges(s: &mut Svg, p: &Part, a: P, b: P) {
    let Some(bend) = &p.bend else {
        return;
    };
    let u = unit(a, b);
    for (k, at, sign) in [(0, a, 1.0), (1, b, -1.0)] {
        if bend.hinge[k] {
            s.circle(
                at.add(sign * u.0 * 9.0, sign * u.1 * 9.0),
                3.5,
                "fill=\"#fff\" stroke=\"#000\" stroke-width=\"1.2\"",
            );
        }
    }
}

/// The key's entries for a model's beams.
pub(super) fn entries(model: &Model) -> Vec<Entry> {
    let mut out = Vec::new();
    if model.parts.iter().any(|p| p.bend.is_some()) {
        out.push(Entry::Beam);
    }
    if model
        .parts
        .iter()
        .any(|p| p.bend.as_ref().is_some_and(|b| b.hinge.contains(&true)))
    {
        out.push(Entry::Hinge);
    }
    out
}

/// Each case's loads along beams, as a row of arrows onto the beam with
/// their tails joined, labelled with the case and the load per length; and
/// each case's moments at nodes, as a turning arrow.
pub(super) fn sketch_loads(
    s: &mut Svg,
    model: &Model,
    l: &Layout,
    d: &Display,
    entries: &mut Vec<Entry>,
) {
    let unit_w = d.per_length();
    let mut rows = vec![0usize; model.parts.len()];
    let mut turns = vec![0usize; model.nodes.len()];
    for c in &model.cases {
        for w in &c.distributed {
            let (a, b) = l.part[w.part];
            let dir = l.screen(w.w);
            let len = dir.0.hypot(dir.1);
            if len == 0.0 {
                continue;
            }
            let u = (dir.0 / len, dir.1 / len);
            // each case's load a band of short arrows, stacked outward
            let near = 3.0 + 28.0 * rows[w.part] as f64;
            rows[w.part] += 1;
            s.open("line-load", &c.name);
            // an arrow about every 28 units, 3 to 40 of them
            let span = ((a.x - b.x).hypot(a.y - b.y) / 28.0)
                .ceil()
                .clamp(3.0, 40.0);
            #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
            let n = span as u32;
            let mut tails = Vec::new();
            for k in 0..=n {
                let t = f64::from(k) / f64::from(n);
                let head = P::new(a.x + (b.x - a.x) * t, a.y + (b.y - a.y) * t)
                    .add(-u.0 * near, -u.1 * near);
                let tail = head.add(-u.0 * 14.0, -u.1 * 14.0);
                s.arrow(tail, head);
                tails.push(tail);
            }
            s.polyline(&tails, "fill=\"none\" stroke=\"#000\" stroke-width=\"1\"");
            let mid = tails[tails.len() / 2];
            let words = format!(
                "{}: {} {}",
                c.name,
                number(unit_w.value(w.w[0].hypot(w.w[1])), d.digits),
                unit_w.name
            );
            s.text(
                mid.add(-u.0 * 4.0, -u.1 * 4.0 + 3.0 * u.1.signum().min(0.0)),
                "middle",
                &words,
                false,
            );
            s.close();
        }
        for m in &c.moments {
            s.open("moment", &c.name);
            let at = l.node[m.node];
            let r = 16.0 + 7.0 * turns[m.node] as f64;
            turns[m.node] += 1;
            turning_arrow(s, at, r, m.moment >= 0.0);
            let words = format!(
                "{}: {} {}",
                c.name,
                number(d.moment.value(m.moment.abs()), d.digits),
                d.moment.name
            );
            s.text(at.add(r + 4.0, -r * 0.7), "start", &words, false);
            s.close();
        }
    }
    if model.cases.iter().any(|c| !c.distributed.is_empty()) {
        entries.push(Entry::LineLoad);
    }
    if model.cases.iter().any(|c| !c.moments.is_empty()) {
        entries.push(Entry::Moment);
    }
}

/// A turning arrow of radius `r` round `at`: three quarters of a circle,
/// counter-clockwise on the page when `ccw`, its head at the end.
pub(super) fn turning_arrow(s: &mut Svg, at: P, r: f64, ccw: bool) {
    // angles on the page, y up: from −60° round to 210°
    let point = |deg: f64| {
        let t = deg.to_radians();
        at.add(r * t.cos(), -r * t.sin())
    };
    let (from, to) = if ccw { (-60.0, 210.0) } else { (210.0, -60.0) };
    let (p0, p1) = (point(from), point(to));
    s.raw(&format!(
        "<path d=\"M {:.1} {:.1} A {r:.1} {r:.1} 0 1 {} {:.1} {:.1}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1.4\"/>\n",
        p0.x,
        p0.y,
        i32::from(!ccw),
        p1.x,
        p1.y
    ));
    // the head, along the tangent of the turn at its end
    let t = f64::to_radians(to);
    let sense = if ccw { 1.0 } else { -1.0 };
    let tangent = (-t.sin() * sense, -t.cos() * sense);
    let back = p1.add(-tangent.0 * 8.0, -tangent.1 * 8.0);
    let side = (-tangent.1 * 3.5, tangent.0 * 3.5);
    s.polyline(
        &[p1, back.add(side.0, side.1), back.add(-side.0, -side.1), p1],
        "fill=\"#000\" stroke=\"#000\" stroke-width=\"0.8\"",
    );
}

/// A clamp: the support of a node held against rotation as well, a heavy
/// bar on hatched ground under the node.
pub(super) fn clamp(s: &mut Svg, at: P) {
    s.raw(&format!(
        "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"24\" height=\"5\" fill=\"#000\"/>\n",
        at.x - 12.0,
        at.y + 2.0
    ));
    for k in 0..5 {
        let x = at.x - 10.0 + 5.0 * f64::from(k);
        s.line(
            P::new(x, at.y + 7.0),
            P::new(x - 4.0, at.y + 12.0),
            Stroke::Thin,
        );
    }
}

/// The point at `x` from end A of a beam drawn from `a` to `b`, moved
/// `off` drawing units along the screen direction `n`.
fn along(a: P, b: P, t: f64, n: (f64, f64), off: f64) -> P {
    P::new(
        a.x + (b.x - a.x) * t + n.0 * off,
        a.y + (b.y - a.y) * t + n.1 * off,
    )
}

/// The screen direction of a beam's local y (a quarter turn
/// counter-clockwise from end A to end B).
fn across(model: &Model, l: &Layout, part: usize) -> (f64, f64) {
    let dir = model.direction(part);
    let v = l.screen([-dir[1], dir[0]]);
    let len = v.0.hypot(v.1).max(1e-300);
    (v.0 / len, v.1 / len)
}

/// Each beam's deflected shape: the chord between its displaced ends and
/// its deflection from it, at `k` drawing units per metre.
pub(super) fn displaced(s: &mut Svg, model: &Model, l: &Layout, r: &CombinationResult, k: f64) {
    for b in &r.beams {
        let p = &model.parts[b.part];
        let u = |n: usize| {
            [
                r.nodes[n].displacement[0].value,
                r.nodes[n].displacement[1].value,
            ]
        };
        let (a0, b0) = l.part[b.part];
        let (a1, b1) = (l.moved(a0, u(p.ends[0]), k), l.moved(b0, u(p.ends[1]), k));
        let n = across(model, l, b.part);
        let pts: Vec<P> = (0..=STEPS)
            .map(|j| {
                let t = f64::from(j) / f64::from(STEPS);
                along(a1, b1, t, n, b.deflection_at(t * b.length) * k)
            })
            .collect();
        s.polyline(
            &pts,
            "fill=\"none\" stroke=\"#555\" stroke-width=\"1.2\" stroke-dasharray=\"6 3\"",
        );
    }
}

/// The bending moment along each beam, drawn on the side of the fibre in
/// tension at one scale for the combination, its largest value written at
/// its peak. Returns the key's entry, or none when no beam bends.
pub(super) fn moment_diagrams(
    s: &mut Svg,
    model: &Model,
    l: &Layout,
    r: &CombinationResult,
    d: &Display,
) -> Option<Entry> {
    let largest = r
        .beams
        .iter()
        .map(|b| b.moment_max.0.abs())
        .fold(0.0f64, f64::max);
    if largest <= 1e-9 * r.force_scale.value.max(f64::MIN_POSITIVE) {
        return None;
    }
    let scale = DIAGRAM / largest;
    for b in &r.beams {
        let (a, e) = l.part[b.part];
        // positive moments put the fibre on the −y side in tension
        let n = across(model, l, b.part);
        let tension = (-n.0, -n.1);
        let mut pts = vec![a];
        for j in 0..=STEPS {
            let t = f64::from(j) / f64::from(STEPS);
            pts.push(along(a, e, t, tension, b.moment_at(t * b.length) * scale));
        }
        // the largest and the stationary point are drawn exactly
        pts.push(e);
        s.open("moment-diagram", &model.parts[b.part].name);
        s.polyline(
            &pts,
            "fill=\"#e8e8e8\" stroke=\"#000\" stroke-width=\"0.8\"",
        );
        let (m, x) = b.moment_max;
        if m.abs() > 1e-9 * largest {
            let peak = along(a, e, x / b.length, tension, m * scale);
            let side = if m >= 0.0 { tension } else { n };
            let at = peak.add(side.0 * 4.0, side.1 * 4.0 + 4.0);
            let words = format!(
                "M {} {}",
                number(d.moment.value(m), d.digits).replace('-', "−"),
                d.moment.name
            );
            s.text(at, "middle", &words, false);
        }
        s.raw(&format!("<desc>{}</desc>\n", escape(&beam_words(b, d))));
        s.close();
    }
    Some(Entry::MomentDiagram(format!(
        "bending moment along a beam, on the side in tension ({} {} drawn {DIAGRAM:.0} units out)",
        number(d.moment.value(largest), d.digits),
        d.moment.name
    )))
}

/// A beam's end moments and largest moment, for a reader of the SVG.
fn beam_words(b: &BeamResult, d: &Display) -> String {
    let m = |v: f64| number(d.moment.value(v), d.digits);
    let [ma, mb] = b.end_moments_along();
    format!(
        "M at A {}, at B {}, largest {} {}",
        m(ma),
        m(mb),
        m(b.moment_max.0),
        d.moment.name
    )
}

//! The key under a drawing: a swatch and a few words for each symbol the
//! drawing uses, in tandem's own symbols.

use super::svg::{Stroke, Svg, P};

/// What a drawing's key can explain.
#[derive(Clone, Debug, PartialEq)]
pub(super) enum Entry {
    Node,
    Member,
    Spring,
    Fixed,
    Roller,
    Rigid,
    Tie,
    TensionOnly,
    CompressionOnly,
    Gap,
    Load,
    Tension,
    Compression,
    Idle,
    Displaced(String),
    Reaction,
    /// A scale bar of the given drawing length and label.
    Bar(f64, String),
    Beam,
    Hinge,
    /// A support that holds the node's rotation too.
    Clamped,
    LineLoad,
    Moment,
    MomentDiagram(String),
}

impl Entry {
    fn words(&self) -> String {
        match self {
            Entry::Node => "node, with its name".into(),
            Entry::Member => "part (pin-ended member), with its name".into(),
            Entry::Spring => "spring".into(),
            Entry::Fixed => "support, fixed in every direction drawn".into(),
            Entry::Roller => "roller: fixed across its ground lines, free along them".into(),
            Entry::Rigid => "rigid body".into(),
            Entry::Tie => "tie: nodes that move together".into(),
            Entry::TensionOnly => "carries tension only".into(),
            Entry::CompressionOnly => "carries compression only".into(),
            Entry::Gap => "gap: takes up its slack before it carries force".into(),
            Entry::Load => "load of a case, with its value".into(),
            Entry::Tension => "tension (force shown +)".into(),
            Entry::Compression => "compression (force shown −)".into(),
            Entry::Idle => "no force (slack, let go, or zero)".into(),
            Entry::Displaced(s) | Entry::Bar(_, s) | Entry::MomentDiagram(s) => s.clone(),
            Entry::Beam => "beam (bends as well as stretching), with its name".into(),
            Entry::Hinge => "hinge: the beam's end carries no moment".into(),
            Entry::Clamped => "support, holding the node's rotation too (clamped)".into(),
            Entry::LineLoad => "load along a beam, per unit length".into(),
            Entry::Moment => "moment at a node, with its value".into(),
            Entry::Reaction => "support reaction, with its value".into(),
        }
    }

    fn symbol(&self, s: &mut Svg, at: P) {
        let (a, b) = (at.add(0.0, 0.0), at.add(36.0, 0.0));
        match self {
            Entry::Node => s.circle(at.add(18.0, 0.0), 3.0, "fill=\"#000\""),
            Entry::Member | Entry::Tension => s.line(a, b, Stroke::Tension),
            Entry::Spring => s.spring(a, b),
            Entry::Fixed => s.support(at.add(18.0, -4.0), (0.0, -1.0), true),
            Entry::Roller => s.support(at.add(18.0, -4.0), (0.0, -1.0), false),
            Entry::Rigid => s.band(&[a.add(4.0, 0.0), b.add(-4.0, 0.0)]),
            Entry::Tie => s.line(a, b, Stroke::Tie),
            Entry::TensionOnly => {
                s.line(a, b, Stroke::Part);
                s.mark(at.add(18.0, 0.0), "t");
            }
            Entry::CompressionOnly => {
                s.line(a, b, Stroke::Part);
                s.mark(at.add(18.0, 0.0), "c");
            }
            Entry::Gap => {
                s.line(a, b, Stroke::Part);
                s.gap(at.add(18.0, 0.0), (1.0, 0.0));
            }
            Entry::Load | Entry::Reaction => s.arrow(a, b),
            Entry::Compression => s.line(a, b, Stroke::Compression),
            Entry::Idle => s.line(a, b, Stroke::Idle),
            Entry::Displaced(_) => s.line(a, b, Stroke::Displaced),
            Entry::Beam => s.line(a, b, Stroke::Beam),
            Entry::Hinge => {
                s.line(a, b, Stroke::Beam);
                s.circle(
                    at.add(18.0, 0.0),
                    3.5,
                    "fill=\"#fff\" stroke=\"#000\" stroke-width=\"1.2\"",
                );
            }
            Entry::Clamped => super::beams::clamp(s, at.add(18.0, -6.0)),
            Entry::LineLoad => {
                for k in 0..4 {
                    let x = 4.0 + 9.0 * f64::from(k);
                    s.arrow(at.add(x, -9.0), at.add(x, 4.0));
                }
                s.line(at.add(4.0, -9.0), at.add(31.0, -9.0), Stroke::Thin);
            }
            Entry::Moment => super::beams::turning_arrow(s, at.add(18.0, 0.0), 7.0, true),
            Entry::MomentDiagram(_) => s.polyline(
                &[a, at.add(6.0, 6.0), at.add(30.0, 6.0), b, a],
                "fill=\"#e8e8e8\" stroke=\"#000\" stroke-width=\"0.8\"",
            ),
            Entry::Bar(len, _) => {
                let end = at.add(*len, 0.0);
                s.line(at, end, Stroke::Tension);
                s.line(at.add(0.0, -4.0), at.add(0.0, 4.0), Stroke::Thin);
                s.line(end.add(0.0, -4.0), end.add(0.0, 4.0), Stroke::Thin);
            }
        }
    }

    fn width(&self) -> f64 {
        match self {
            Entry::Bar(len, _) => len.max(36.0),
            _ => 36.0,
        }
    }
}

const KEY_ROW: f64 = 20.0;

/// The height the key adds below the drawing.
pub(super) fn key_height(entries: &[Entry]) -> f64 {
    30.0 + KEY_ROW * entries.len() as f64 + 10.0
}

pub(super) fn key(s: &mut Svg, entries: &[Entry], top: f64, width: f64) {
    s.open("key", "key");
    s.line(P::new(20.0, top), P::new(width - 20.0, top), Stroke::Thin);
    s.text(P::new(24.0, top + 18.0), "start", "Key", true);
    for (k, e) in entries.iter().enumerate() {
        let y = top + 36.0 + KEY_ROW * k as f64;
        e.symbol(s, P::new(30.0, y));
        s.text(
            P::new(30.0 + e.width() + 12.0, y + 4.0),
            "start",
            &e.words(),
            false,
        );
    }
    s.close();
}

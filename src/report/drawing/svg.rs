//! A small SVG writer: the primitives and the symbols of tandem's drawings,
//! written with fixed number formatting so that the bytes are the same on
//! every run.

use std::fmt::Write as _;

/// A point on the drawing, in SVG units (y down).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct P {
    pub x: f64,
    pub y: f64,
}

impl P {
    pub fn new(x: f64, y: f64) -> Self {
        Self { x, y }
    }
    pub fn add(self, dx: f64, dy: f64) -> Self {
        Self::new(self.x + dx, self.y + dy)
    }
    pub fn mid(self, o: P) -> Self {
        Self::new(f64::midpoint(self.x, o.x), f64::midpoint(self.y, o.y))
    }
}

/// A coordinate as written: one decimal, never `-0.0`; a value that is not
/// finite (a degenerate scale) is drawn at 0 rather than writing an
/// invalid drawing.
fn c(v: f64) -> String {
    if !v.is_finite() {
        return "0.0".into();
    }
    let s = format!("{v:.1}");
    if s == "-0.0" {
        "0.0".into()
    } else {
        s
    }
}

/// Text as XML character data or an attribute value.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c if c.is_control() => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// Line styles. Tension and compression differ by shape, not colour alone,
/// so that a drawing printed in black and white still tells them apart.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Stroke {
    /// A part in the sketch.
    Part,
    /// A part in tension: one thin solid line.
    Tension,
    /// A part in compression: a heavy outlined double line.
    Compression,
    /// A part carrying no force (slack, let go, or zero): dotted.
    Idle,
    /// The displaced shape: dashed grey.
    Displaced,
    /// A tie between nodes: dash-dot.
    Tie,
    /// Thin construction lines (node lines of axial models, symbols).
    Thin,
    /// A beam: heavier than a part.
    Beam,
}

pub struct Svg {
    out: String,
    /// The horizontal extent of the text written, estimated from its
    /// length, so that the drawing can be widened to keep every label.
    text_x: (f64, f64),
}

/// The width of a character at the drawings' font size, on average.
const CHAR_WIDTH: f64 = 6.6;

impl Svg {
    pub fn new(width: f64, height: f64, title: &str) -> Self {
        let mut out = String::new();
        let _ = write!(
            out,
            "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\" font-family=\"DejaVu Sans, Arial, sans-serif\" font-size=\"11\">\n<title>{t}</title>\n<rect class=\"paper\" x=\"0\" y=\"0\" width=\"{w}\" height=\"{h}\" fill=\"#fff\"/>\n",
            w = c(width),
            h = c(height),
            t = escape(title)
        );
        Self {
            out,
            text_x: (f64::INFINITY, f64::NEG_INFINITY),
        }
    }

    /// The leftmost and rightmost x reached by text, as estimated.
    pub fn text_extent(&self) -> (f64, f64) {
        self.text_x
    }

    /// A part of a drawing, to be placed in one with [`Svg::raw`].
    pub fn fragment() -> Self {
        Self {
            out: String::new(),
            text_x: (f64::INFINITY, f64::NEG_INFINITY),
        }
    }

    pub fn into_body(self) -> String {
        self.out
    }

    pub fn finish(mut self) -> String {
        self.out.push_str("</svg>\n");
        self.out
    }

    /// Open a group for one drawn item; `name` goes in `data-name`.
    pub fn open(&mut self, class: &str, name: &str) {
        let _ = writeln!(
            self.out,
            "<g class=\"{class}\" data-name=\"{}\">",
            escape(name)
        );
    }

    pub fn close(&mut self) {
        self.out.push_str("</g>\n");
    }

    pub fn line(&mut self, a: P, b: P, stroke: Stroke) {
        let attrs = match stroke {
            Stroke::Part | Stroke::Tension => "stroke=\"#000\" stroke-width=\"1.6\"",
            Stroke::Compression => {
                // a heavy black band with a white core: a double line
                let _ = writeln!(
                    self.out,
                    "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#000\" stroke-width=\"5\"/>",
                    c(a.x),
                    c(a.y),
                    c(b.x),
                    c(b.y)
                );
                "stroke=\"#fff\" stroke-width=\"2\""
            }
            Stroke::Idle => "stroke=\"#000\" stroke-width=\"1\" stroke-dasharray=\"1 3\"",
            Stroke::Displaced => "stroke=\"#555\" stroke-width=\"1.2\" stroke-dasharray=\"6 3\"",
            Stroke::Tie => "stroke=\"#000\" stroke-width=\"1\" stroke-dasharray=\"7 2 1 2\"",
            Stroke::Thin => "stroke=\"#000\" stroke-width=\"0.8\"",
            Stroke::Beam => "stroke=\"#000\" stroke-width=\"3.4\" stroke-linecap=\"round\"",
        };
        let _ = writeln!(
            self.out,
            "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" {attrs}/>",
            c(a.x),
            c(a.y),
            c(b.x),
            c(b.y)
        );
    }

    /// A spring: a zigzag between two points.
    pub fn spring(&mut self, a: P, b: P) {
        let (dx, dy) = (b.x - a.x, b.y - a.y);
        let len = dx.hypot(dy).max(1e-9);
        let (ux, uy) = (dx / len, dy / len);
        let (nx, ny) = (-uy, ux);
        let lead = (len * 0.2).min(12.0);
        let mut pts = vec![a, a.add(ux * lead, uy * lead)];
        let zig = 8;
        let body = len - 2.0 * lead;
        for k in 1..zig {
            let t = lead + body * f64::from(k) / f64::from(zig);
            let side = if k % 2 == 1 { 5.0 } else { -5.0 };
            pts.push(a.add(ux * t + nx * side, uy * t + ny * side));
        }
        pts.push(b.add(-ux * lead, -uy * lead));
        pts.push(b);
        self.polyline(&pts, "stroke=\"#000\" stroke-width=\"1.4\" fill=\"none\"");
    }

    pub fn polyline(&mut self, pts: &[P], attrs: &str) {
        let list: Vec<String> = pts
            .iter()
            .map(|p| format!("{},{}", c(p.x), c(p.y)))
            .collect();
        let _ = writeln!(
            self.out,
            "<polyline points=\"{}\" {attrs}/>",
            list.join(" ")
        );
    }

    pub fn circle(&mut self, at: P, r: f64, attrs: &str) {
        let _ = writeln!(
            self.out,
            "<circle cx=\"{}\" cy=\"{}\" r=\"{}\" {attrs}/>",
            c(at.x),
            c(at.y),
            c(r)
        );
    }

    /// Text; `anchor` is `start`, `middle` or `end`.
    pub fn text(&mut self, at: P, anchor: &str, s: &str, bold: bool) {
        let weight = if bold { " font-weight=\"bold\"" } else { "" };
        let w = crate::words::width(s) as f64 * CHAR_WIDTH;
        let (lo, hi) = match anchor {
            "end" => (at.x - w, at.x),
            "middle" => (at.x - w / 2.0, at.x + w / 2.0),
            _ => (at.x, at.x + w),
        };
        self.text_x = (self.text_x.0.min(lo), self.text_x.1.max(hi));
        let _ = writeln!(
            self.out,
            "<text x=\"{}\" y=\"{}\" text-anchor=\"{anchor}\"{weight}>{}</text>",
            c(at.x),
            c(at.y),
            escape(s)
        );
    }

    /// An arrow from `tail` to `head`, its head filled.
    pub fn arrow(&mut self, tail: P, head: P) {
        self.line(tail, head, Stroke::Tension);
        let (dx, dy) = (head.x - tail.x, head.y - tail.y);
        let len = dx.hypot(dy).max(1e-9);
        let (ux, uy) = (dx / len, dy / len);
        let back = head.add(-ux * 9.0, -uy * 9.0);
        let (nx, ny) = (-uy * 3.5, ux * 3.5);
        self.polyline(
            &[head, back.add(nx, ny), back.add(-nx, -ny), head],
            "fill=\"#000\" stroke=\"#000\" stroke-width=\"0.8\"",
        );
    }

    /// A support at `at` resisting movement along the unit vector `along`
    /// (pointing from the ground toward the node). `both` draws the full
    /// support (a filled wedge on hatched ground); otherwise a roller: an
    /// open wedge on a double ground line, free to slide along it.
    pub fn support(&mut self, at: P, along: (f64, f64), both: bool) {
        let (ux, uy) = along;
        let (nx, ny) = (-uy, ux);
        let base = at.add(-ux * 12.0, -uy * 12.0);
        let l = base.add(nx * 8.0, ny * 8.0);
        let r = base.add(-nx * 8.0, -ny * 8.0);
        let fill = if both { "#000" } else { "#fff" };
        self.polyline(
            &[at, l, r, at],
            &format!("fill=\"{fill}\" stroke=\"#000\" stroke-width=\"1\""),
        );
        let g = base.add(-ux * 2.0, -uy * 2.0);
        let (gl, gr) = (g.add(nx * 12.0, ny * 12.0), g.add(-nx * 12.0, -ny * 12.0));
        self.line(gl, gr, Stroke::Thin);
        if both {
            for k in 0..5 {
                let t = -10.0 + 5.0 * f64::from(k);
                let s = g.add(nx * t, ny * t);
                let e = s.add(-ux * 5.0 - nx * 4.0, -uy * 5.0 - ny * 4.0);
                self.line(s, e, Stroke::Thin);
            }
        } else {
            let g2 = g.add(-ux * 4.0, -uy * 4.0);
            self.line(
                g2.add(nx * 12.0, ny * 12.0),
                g2.add(-nx * 12.0, -ny * 12.0),
                Stroke::Thin,
            );
        }
    }

    /// A small boxed letter at `at`: the mark of a one-sense part.
    pub fn mark(&mut self, at: P, letter: &str) {
        let _ = writeln!(
            self.out,
            "<rect x=\"{}\" y=\"{}\" width=\"10\" height=\"11\" fill=\"#fff\" stroke=\"#000\" stroke-width=\"0.8\"/>",
            c(at.x - 5.0),
            c(at.y - 6.0)
        );
        let _ = writeln!(
            self.out,
            "<text x=\"{}\" y=\"{}\" text-anchor=\"middle\" font-size=\"9\">{letter}</text>",
            c(at.x),
            c(at.y + 3.0)
        );
    }

    /// The mark of a gap: two short bars across the part at `at`.
    pub fn gap(&mut self, at: P, along: (f64, f64)) {
        let (ux, uy) = along;
        let (nx, ny) = (-uy, ux);
        for s in [-3.0, 3.0] {
            let m = at.add(ux * s, uy * s);
            self.line(
                m.add(nx * 6.0, ny * 6.0),
                m.add(-nx * 6.0, -ny * 6.0),
                Stroke::Thin,
            );
        }
    }

    /// A rigid body: a grey band with a black outline through its nodes.
    pub fn band(&mut self, pts: &[P]) {
        self.polyline(
            pts,
            "fill=\"none\" stroke=\"#000\" stroke-width=\"10\" stroke-linejoin=\"round\" stroke-linecap=\"round\"",
        );
        self.polyline(
            pts,
            "fill=\"none\" stroke=\"#ccc\" stroke-width=\"8\" stroke-linejoin=\"round\" stroke-linecap=\"round\"",
        );
    }

    /// Raw SVG (for the key's own drawing).
    pub fn raw(&mut self, s: &str) {
        self.out.push_str(s);
    }
}

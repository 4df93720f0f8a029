//! Line charts (the capacity path, the sweep plot) in tandem's own SVG:
//! axes with round ticks and their units, a legend outside the data with a
//! swatch for each entry, and series told apart by dash pattern and marker
//! shape as well as by grey level, so that a chart printed in black and
//! white still reads.

use super::svg::{Stroke, Svg, P};

/// One line of a chart.
#[derive(Clone, Debug, PartialEq)]
pub struct Series {
    pub label: String,
    pub points: Vec<(f64, f64)>,
    /// Points above the top of the chart (or undefined), drawn at the top
    /// edge and marked ▲.
    pub off: Vec<usize>,
}

/// The letter of the `i`-th of several marks: A to Z, then A2, B2, ...
fn letter(i: usize) -> String {
    let l = char::from(b'A' + u8::try_from(i % 26).unwrap_or(0));
    if i < 26 {
        l.to_string()
    } else {
        format!("{l}{}", i / 26 + 1)
    }
}

/// A marked point with a label (an event on a path, a value sought).
#[derive(Clone, Debug, PartialEq)]
pub struct Mark {
    pub at: (f64, f64),
    pub label: String,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Chart {
    pub title: String,
    /// Axis titles, units included: `t (in)`.
    pub x_label: String,
    pub y_label: String,
    pub series: Vec<Series>,
    /// Horizontal reference lines: (value, legend text).
    pub levels: Vec<(f64, String)>,
    pub marks: Vec<Mark>,
    /// The legend text of the marks.
    pub marks_label: String,
    /// The chart's y range starts at zero and reaches at least this.
    pub y_min_top: f64,
}

/// The styles of the series, in order: colour (grey levels that stay apart
/// in print), dash pattern, marker shape.
const STYLES: &[(&str, &str, Shape)] = &[
    ("#000", "", Shape::Circle),
    ("#555", "7 3", Shape::Square),
    ("#000", "2 2", Shape::Diamond),
    ("#888", "", Shape::Triangle),
    ("#333", "9 3 2 3", Shape::Cross),
];

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Shape {
    Circle,
    Square,
    Diamond,
    Triangle,
    Cross,
}

fn marker(s: &mut Svg, at: P, shape: Shape, colour: &str) {
    let fill = format!("fill=\"#fff\" stroke=\"{colour}\" stroke-width=\"1.3\"");
    match shape {
        Shape::Circle => s.circle(at, 3.2, &fill),
        Shape::Square => s.polyline(
            &[
                at.add(-3.0, -3.0),
                at.add(3.0, -3.0),
                at.add(3.0, 3.0),
                at.add(-3.0, 3.0),
                at.add(-3.0, -3.0),
            ],
            &fill,
        ),
        Shape::Diamond => s.polyline(
            &[
                at.add(0.0, -4.0),
                at.add(4.0, 0.0),
                at.add(0.0, 4.0),
                at.add(-4.0, 0.0),
                at.add(0.0, -4.0),
            ],
            &fill,
        ),
        Shape::Triangle => s.polyline(
            &[
                at.add(0.0, -4.0),
                at.add(4.0, 3.0),
                at.add(-4.0, 3.0),
                at.add(0.0, -4.0),
            ],
            &fill,
        ),
        Shape::Cross => {
            let st = format!("stroke=\"{colour}\" stroke-width=\"1.3\" fill=\"none\"");
            s.polyline(&[at.add(-3.5, -3.5), at.add(3.5, 3.5)], &st);
            s.polyline(&[at.add(-3.5, 3.5), at.add(3.5, -3.5)], &st);
        }
    }
}

/// A tick's value with as many decimals as its step needs: `0.002`, `0.5`,
/// `10`.
fn tick_label(v: f64, step: f64) -> String {
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let decimals = (-step.log10().floor()).max(0.0) as usize;
    let s = format!("{:.*}", decimals.min(12), v);
    if s.starts_with('-') && s.trim_start_matches(['-', '0', '.']).is_empty() {
        s[1..].to_string()
    } else {
        s
    }
}

/// Round tick values covering `lo..hi`, about five of them, and their step.
fn ticks(lo: f64, hi: f64) -> (Vec<f64>, f64) {
    let span = (hi - lo).abs().max(f64::MIN_POSITIVE);
    let raw = span / 5.0;
    let p = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * p)
        .find(|&s| s >= raw)
        .unwrap_or(10.0 * p);
    let first = (lo / step).ceil();
    let mut out = Vec::new();
    let mut k = first;
    while k * step <= hi + step * 1e-9 && out.len() < 50 {
        out.push(k * step + 0.0);
        k += 1.0;
    }
    (out, step)
}

/// Draws a legend entry's swatch at a point.
type Swatch = Box<dyn Fn(&mut Svg, P)>;

const LEFT: f64 = 78.0;
const TOP: f64 = 44.0;
const PLOT_W: f64 = 620.0;
const PLOT_H: f64 = 300.0;
const WIDTH: f64 = 740.0;

/// The chart as SVG.
#[must_use]
pub fn render(c: &Chart) -> String {
    let xs = c.series.iter().flat_map(|s| s.points.iter().map(|p| p.0));
    let (mut x0, mut x1) = xs.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| {
        (a.min(x), b.max(x))
    });
    if !x0.is_finite() {
        (x0, x1) = (0.0, 1.0);
    }
    if x1 <= x0 {
        x1 = x0 + x0.abs().max(1.0) * 1e-3;
    }
    let ys = c
        .series
        .iter()
        .flat_map(|s| s.points.iter().map(|p| p.1))
        .chain(c.marks.iter().map(|m| m.at.1))
        .filter(|y| y.is_finite());
    let y_top = ys.fold(c.y_min_top, f64::max) * 1.05;
    let y_bottom = c
        .series
        .iter()
        .flat_map(|s| s.points.iter().map(|p| p.1))
        .filter(|y| y.is_finite())
        .fold(0.0f64, f64::min);
    let px = |x: f64| LEFT + (x - x0) / (x1 - x0) * PLOT_W;
    let py = |y: f64| TOP + (y_top - y.min(y_top)) / (y_top - y_bottom) * PLOT_H;

    // several marks at one level would write over each other: each gets a
    // letter on the chart and its words in the legend
    let lettered = c.marks.len() > 1;
    let entries = c.levels.len()
        + c.series.len()
        + usize::from(!c.marks.is_empty())
        + if lettered { c.marks.len() } else { 0 }
        + usize::from(c.series.iter().any(|s| !s.off.is_empty()));
    let legend_top = TOP + PLOT_H + 56.0;
    let height = legend_top + 18.0 * entries as f64 + 16.0;
    let mut s = Svg::new(WIDTH, height, &c.title);
    s.text(P::new(WIDTH / 2.0, 22.0), "middle", &c.title, true);
    // grid, ticks and their values
    let (yt, ystep) = ticks(y_bottom, y_top);
    for t in yt {
        let y = py(t);
        s.polyline(
            &[P::new(LEFT, y), P::new(LEFT + PLOT_W, y)],
            "stroke=\"#ddd\" stroke-width=\"0.8\" fill=\"none\"",
        );
        s.text(
            P::new(LEFT - 6.0, y + 4.0),
            "end",
            &tick_label(t, ystep),
            false,
        );
    }
    let (xt, xstep) = ticks(x0, x1);
    for t in xt {
        let x = px(t);
        s.polyline(
            &[P::new(x, TOP), P::new(x, TOP + PLOT_H)],
            "stroke=\"#ddd\" stroke-width=\"0.8\" fill=\"none\"",
        );
        s.text(
            P::new(x, TOP + PLOT_H + 16.0),
            "middle",
            &tick_label(t, xstep),
            false,
        );
    }
    let frame = [
        P::new(LEFT, TOP),
        P::new(LEFT + PLOT_W, TOP),
        P::new(LEFT + PLOT_W, TOP + PLOT_H),
        P::new(LEFT, TOP + PLOT_H),
        P::new(LEFT, TOP),
    ];
    s.polyline(&frame, "stroke=\"#000\" stroke-width=\"1\" fill=\"none\"");
    s.text(
        P::new(LEFT + PLOT_W / 2.0, TOP + PLOT_H + 36.0),
        "middle",
        &c.x_label,
        false,
    );
    s.raw(&format!(
        "<text x=\"16\" y=\"{:.1}\" text-anchor=\"middle\" transform=\"rotate(-90 16 {:.1})\">{}</text>\n",
        TOP + PLOT_H / 2.0,
        TOP + PLOT_H / 2.0,
        super::svg::escape(&c.y_label)
    ));
    let mut legend: Vec<(Swatch, String)> = Vec::new();
    for (value, label) in &c.levels {
        let y = py(*value);
        s.polyline(
            &[P::new(LEFT, y), P::new(LEFT + PLOT_W, y)],
            "stroke=\"#000\" stroke-width=\"1.6\" stroke-dasharray=\"12 4\" fill=\"none\"",
        );
        legend.push((
            Box::new(|s: &mut Svg, at: P| {
                s.polyline(
                    &[at, at.add(30.0, 0.0)],
                    "stroke=\"#000\" stroke-width=\"1.6\" stroke-dasharray=\"12 4\" fill=\"none\"",
                );
            }),
            label.clone(),
        ));
    }
    let mut any_off = false;
    for (k, series) in c.series.iter().enumerate() {
        let (colour, dash, shape) = STYLES[k % STYLES.len()];
        let dash_attr = if dash.is_empty() {
            String::new()
        } else {
            format!(" stroke-dasharray=\"{dash}\"")
        };
        let attrs = format!("stroke=\"{colour}\" stroke-width=\"1.8\" fill=\"none\"{dash_attr}");
        s.open("series", &series.label);
        let pts: Vec<P> = series
            .points
            .iter()
            .map(|&(x, y)| P::new(px(x), py(y)))
            .collect();
        s.polyline(&pts, &attrs);
        // markers at a readable spacing
        let every = (pts.len() / 12).max(1);
        for (i, p) in pts.iter().enumerate() {
            if series.off.contains(&i) {
                any_off = true;
                s.text(p.add(0.0, 4.0), "middle", "▲", false);
            } else if i % every == 0 || i + 1 == pts.len() {
                marker(&mut s, *p, shape, colour);
            }
        }
        s.close();
        let attrs2 = attrs.clone();
        legend.push((
            Box::new(move |s: &mut Svg, at: P| {
                s.polyline(&[at, at.add(30.0, 0.0)], &attrs2);
                marker(s, at.add(15.0, 0.0), shape, colour);
            }),
            series.label.clone(),
        ));
    }
    for (i, m) in c.marks.iter().enumerate() {
        let at = P::new(px(m.at.0), py(m.at.1));
        s.open("mark", &m.label);
        s.circle(
            at,
            5.0,
            "fill=\"none\" stroke=\"#000\" stroke-width=\"1.4\"",
        );
        s.line(at.add(-7.0, 0.0), at.add(7.0, 0.0), Stroke::Thin);
        s.line(at.add(0.0, -7.0), at.add(0.0, 7.0), Stroke::Thin);
        let right = at.x < LEFT + PLOT_W * 0.7;
        let text = if lettered { letter(i) } else { m.label.clone() };
        s.text(
            at.add(if right { 9.0 } else { -9.0 }, -8.0),
            if right { "start" } else { "end" },
            &text,
            false,
        );
        s.close();
    }
    if !c.marks.is_empty() {
        legend.push((
            Box::new(|s: &mut Svg, at: P| {
                let m = at.add(15.0, 0.0);
                s.circle(m, 5.0, "fill=\"none\" stroke=\"#000\" stroke-width=\"1.4\"");
                s.line(m.add(-7.0, 0.0), m.add(7.0, 0.0), Stroke::Thin);
                s.line(m.add(0.0, -7.0), m.add(0.0, 7.0), Stroke::Thin);
            }),
            c.marks_label.clone(),
        ));
    }
    if lettered {
        for (i, m) in c.marks.iter().enumerate() {
            let l = letter(i);
            legend.push((
                Box::new(move |s: &mut Svg, at: P| {
                    s.text(at.add(15.0, 4.0), "middle", &l, false);
                }),
                m.label.clone(),
            ));
        }
    }
    if any_off {
        legend.push((
            Box::new(|s: &mut Svg, at: P| {
                s.text(at.add(15.0, 4.0), "middle", "▲", false);
            }),
            "off the scale: above the top edge, or undefined".into(),
        ));
    }
    s.open("legend", "legend");
    for (k, (swatch, label)) in legend.iter().enumerate() {
        let y = legend_top + 18.0 * k as f64;
        swatch(&mut s, P::new(LEFT, y));
        s.text(P::new(LEFT + 40.0, y + 4.0), "start", label, false);
    }
    s.close();
    s.finish()
}

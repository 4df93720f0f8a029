//! Where a sweep's steps go as they are made: kept ([`Collect`]), JSON
//! written line by line ([`JsonSink`]), an aligned text table whose rows
//! wait in a temporary file beyond a few thousand ([`TextSink`]), or a
//! chart that keeps a bounded envelope of each curve ([`PlotSink`]).

use std::io::{BufRead, Seek as _, Write};

use serde_json::{json, Value};

use super::{Head, Seek, Step, Sweep};
use crate::report::{number, utilization, Display};

/// What takes a sweep's steps as they are made.
pub trait Sink {
    /// Before the first step.
    ///
    /// # Errors
    /// The writer's.
    fn begin(&mut self, head: &Head) -> std::io::Result<()>;
    /// Each step, in order.
    ///
    /// # Errors
    /// The writer's.
    fn step(&mut self, step: &Step) -> std::io::Result<()>;
    /// After the last step, with the seek's answer when one was asked for.
    ///
    /// # Errors
    /// The writer's.
    fn end(&mut self, seek: Option<&Seek>) -> std::io::Result<()>;
}

/// Several sinks fed the same steps (the plot and the table).
pub struct Tee<'s>(pub Vec<&'s mut dyn Sink>);

impl Sink for Tee<'_> {
    fn begin(&mut self, head: &Head) -> std::io::Result<()> {
        self.0.iter_mut().try_for_each(|s| s.begin(head))
    }
    fn step(&mut self, step: &Step) -> std::io::Result<()> {
        self.0.iter_mut().try_for_each(|s| s.step(step))
    }
    fn end(&mut self, seek: Option<&Seek>) -> std::io::Result<()> {
        self.0.iter_mut().try_for_each(|s| s.end(seek))
    }
}

/// Keeps every step: a [`Sweep`].
#[derive(Default)]
pub struct Collect {
    head: Option<Head>,
    steps: Vec<Step>,
}

impl Collect {
    /// The sweep kept.
    #[must_use]
    pub fn into_sweep(self) -> Sweep {
        Sweep {
            head: self.head.unwrap_or(Head {
                axes: Vec::new(),
                labels: Vec::new(),
                shown: Vec::new(),
                shown_dims: Vec::new(),
            }),
            steps: self.steps,
        }
    }
}

impl Sink for Collect {
    fn begin(&mut self, head: &Head) -> std::io::Result<()> {
        self.head = Some(head.clone());
        Ok(())
    }
    fn step(&mut self, step: &Step) -> std::io::Result<()> {
        self.steps.push(step.clone());
        Ok(())
    }
    fn end(&mut self, _: Option<&Seek>) -> std::io::Result<()> {
        Ok(())
    }
}

/// Feed a kept sweep to a sink, as a run would.
fn replay(sweep: &Sweep, seek: Option<&Seek>, sink: &mut dyn Sink) -> std::io::Result<()> {
    sink.begin(&sweep.head)?;
    for s in &sweep.steps {
        sink.step(s)?;
    }
    sink.end(seek)
}

/// A number as JSON writes it (`null` where it is not finite).
fn number_json(w: &mut impl Write, x: Option<f64>) -> std::io::Result<()> {
    match x {
        Some(x) if x.is_finite() => serde_json::to_writer(w, &x).map_err(std::io::Error::from),
        _ => w.write_all(b"null"),
    }
}

fn seek_json(s: &Seek) -> Value {
    match s {
        Seek::Found {
            value,
            crossings,
            second,
            monotonic,
            tolerance,
            evaluations,
        } => {
            let mut v = json!({"found": true, "value_si": value.value, "crossings_si": crossings.iter().map(|c| c.value).collect::<Vec<_>>(), "monotonic": monotonic, "tolerance_si": tolerance, "evaluations": evaluations});
            if !second.is_empty() {
                v["second_si"] = json!(second.iter().map(|c| c.value).collect::<Vec<_>>());
            }
            v
        }
        Seek::NoRoot { lowest, highest } => {
            json!({"found": false, "lowest_utilization": lowest, "highest_utilization": highest})
        }
    }
}

/// The sweep as JSON (SI values), one step a line as it is made.
pub struct JsonSink<W: Write> {
    out: W,
    /// Each check's `{"label":…,"utilization":` and each shown result's
    /// `{"result":…,"value_si":`, escaped once.
    checks: Vec<String>,
    shown: Vec<String>,
    first: bool,
}

impl<W: Write> JsonSink<W> {
    pub fn new(out: W) -> Self {
        Self {
            out,
            checks: Vec::new(),
            shown: Vec::new(),
            first: true,
        }
    }

    /// The writer, flushed.
    ///
    /// # Errors
    /// The writer's.
    pub fn into_inner(mut self) -> std::io::Result<W> {
        self.out.flush()?;
        Ok(self.out)
    }
}

impl<W: Write> Sink for JsonSink<W> {
    fn begin(&mut self, head: &Head) -> std::io::Result<()> {
        self.checks = head
            .labels
            .iter()
            .map(|l| format!("{{\"label\":{},\"utilization\":", json!(l)))
            .collect();
        self.shown = head
            .shown
            .iter()
            .map(|s| {
                format!(
                    "{{\"result\":{},\"value_si\":",
                    json!(format!("{}.{}", s.object, s.field))
                )
            })
            .collect();
        writeln!(self.out, "{{")?;
        writeln!(self.out, "  \"parameter\": {},", json!(head.axes[0].name))?;
        if let Some(a) = head.axes.get(1) {
            writeln!(self.out, "  \"second_parameter\": {},", json!(a.name))?;
        }
        write!(self.out, "  \"steps\": [")
    }

    /// One step on its line, as serde would write
    /// `{value_si, second_value_si?, governing_utilization, checks, shown}`.
    fn step(&mut self, s: &Step) -> std::io::Result<()> {
        let w = &mut self.out;
        w.write_all(if self.first { b"\n    " } else { b",\n    " })?;
        self.first = false;
        w.write_all(b"{\"value_si\":")?;
        number_json(w, Some(s.value.value))?;
        if let Some(second) = s.second {
            w.write_all(b",\"second_value_si\":")?;
            number_json(w, Some(second.value))?;
        }
        w.write_all(b",\"governing_utilization\":")?;
        number_json(w, s.governing)?;
        w.write_all(b",\"checks\":[")?;
        for (k, (c, u)) in self.checks.iter().zip(&s.checks).enumerate() {
            if k > 0 {
                w.write_all(b",")?;
            }
            w.write_all(c.as_bytes())?;
            number_json(w, *u)?;
            w.write_all(b"}")?;
        }
        w.write_all(b"],\"shown\":[")?;
        for (k, (r, q)) in self.shown.iter().zip(&s.shown).enumerate() {
            if k > 0 {
                w.write_all(b",")?;
            }
            w.write_all(r.as_bytes())?;
            number_json(w, Some(q.value))?;
            w.write_all(b"}")?;
        }
        w.write_all(b"]}")
    }

    fn end(&mut self, seek: Option<&Seek>) -> std::io::Result<()> {
        writeln!(self.out, "\n  ],")?;
        writeln!(
            self.out,
            "  \"seek\": {}",
            seek.map_or(Value::Null, seek_json)
        )?;
        writeln!(self.out, "}}")?;
        self.out.flush()
    }
}

/// A kept sweep as JSON: [`JsonSink`]'s document.
///
/// # Errors
/// The writer's.
pub fn write_json(w: &mut impl Write, sweep: &Sweep, seek: Option<&Seek>) -> std::io::Result<()> {
    let mut sink = JsonSink::new(w);
    replay(sweep, seek, &mut sink)?;
    sink.into_inner().map(|_| ())
}

/// A kept sweep as a JSON value.
#[must_use]
pub fn json(sweep: &Sweep, seek: Option<&Seek>) -> Value {
    let mut bytes = Vec::new();
    if write_json(&mut bytes, sweep, seek).is_err() {
        return Value::Null;
    }
    serde_json::from_slice(&bytes).unwrap_or(Value::Null)
}

/// Rows kept in memory before they wait in a temporary file.
const IN_MEMORY: usize = 4096;

/// The sweep as an aligned text table with the seek's answer. The column
/// widths are known only at the end, so the rows wait: in memory up to
/// [`IN_MEMORY`], then in an anonymous temporary file (removed when
/// closed), one tab-separated line each.
pub struct TextSink<'d, W: Write> {
    out: W,
    d: &'d Display,
    head: Option<Head>,
    width: Vec<usize>,
    rows: Vec<Vec<String>>,
    spill: Option<std::io::BufWriter<std::fs::File>>,
}

impl<'d, W: Write> TextSink<'d, W> {
    pub fn new(out: W, d: &'d Display) -> Self {
        Self {
            out,
            d,
            head: None,
            width: Vec::new(),
            rows: Vec::new(),
            spill: None,
        }
    }

    /// The writer, flushed.
    ///
    /// # Errors
    /// The writer's.
    pub fn into_inner(mut self) -> std::io::Result<W> {
        self.out.flush()?;
        Ok(self.out)
    }

    fn value(&self, k: usize, q: &crate::units::Quantity) -> String {
        let Some(h) = &self.head else {
            return String::new();
        };
        match h.axes[k].shown_unit(self.d) {
            Some(u) => number(u.value(q.value), self.d.digits),
            None => number(q.value, self.d.digits),
        }
    }
}

impl<W: Write> Sink for TextSink<'_, W> {
    fn begin(&mut self, head: &Head) -> std::io::Result<()> {
        let mut row: Vec<String> = head
            .axes
            .iter()
            .map(|a| match a.shown_unit(self.d) {
                Some(u) => format!("{} ({})", a.name, u.name),
                None => a.name.clone(),
            })
            .collect();
        row.push("governing".into());
        row.extend(head.labels.iter().cloned());
        for (s, dim) in head.shown.iter().zip(&head.shown_dims) {
            row.push(match self.d.unit_for(*dim) {
                Some(u) => format!("{}.{} ({})", s.object, s.field, u.name),
                None => format!("{}.{}", s.object, s.field),
            });
        }
        self.head = Some(head.clone());
        crate::report::text::widen(&mut self.width, &row);
        self.rows.push(row);
        Ok(())
    }

    fn step(&mut self, s: &Step) -> std::io::Result<()> {
        let mut r = vec![self.value(0, &s.value)];
        if let Some(second) = &s.second {
            r.push(self.value(1, second));
        }
        r.push(utilization(s.governing));
        r.extend(s.checks.iter().map(|u| utilization(*u)));
        r.extend(s.shown.iter().map(|q| match self.d.unit_for(q.dim) {
            Some(u) => number(u.value(q.value), self.d.digits),
            None => number(q.value, self.d.digits),
        }));
        crate::report::text::widen(&mut self.width, &r);
        if self.spill.is_none() && self.rows.len() >= IN_MEMORY {
            let mut f = std::io::BufWriter::new(tempfile::tempfile()?);
            for row in self.rows.drain(1..) {
                writeln!(f, "{}", row.join("\t"))?;
            }
            self.spill = Some(f);
        }
        match &mut self.spill {
            Some(f) => writeln!(f, "{}", r.join("\t")),
            None => {
                self.rows.push(r);
                Ok(())
            }
        }
    }

    fn end(&mut self, seek: Option<&Seek>) -> std::io::Result<()> {
        let mut line = String::new();
        for row in &self.rows {
            line.clear();
            crate::report::text::aligned_row(&mut line, row, &self.width, &[], "");
            self.out.write_all(line.as_bytes())?;
        }
        if let Some(f) = self.spill.take() {
            let mut f = f
                .into_inner()
                .map_err(std::io::IntoInnerError::into_error)?;
            f.rewind()?;
            for text in std::io::BufReader::new(f).lines() {
                let text = text?;
                let cells: Vec<&str> = text.split('\t').collect();
                line.clear();
                crate::report::text::aligned_row(&mut line, &cells, &self.width, &[], "");
                self.out.write_all(line.as_bytes())?;
            }
        }
        if let (Some(h), Some(s)) = (&self.head, seek) {
            self.out.write_all(seek_text(h, s, self.d).as_bytes())?;
        }
        self.out.flush()
    }
}

/// The seek's answer in words, after the table.
fn seek_text(head: &Head, seek: &Seek, d: &Display) -> String {
    let axis = &head.axes[0];
    let unit = axis.shown_unit(d);
    let shown = |k: usize, v: f64| {
        let u = head.axes[k].shown_unit(d);
        match &u {
            Some(u) => format!("{} {}", number(u.value(v), d.digits), u.name),
            None => number(v, d.digits),
        }
    };
    match seek {
        Seek::Found {
            crossings,
            second,
            monotonic,
            tolerance,
            evaluations,
            ..
        } => {
            let tol = unit.as_ref().map_or(*tolerance, |u| u.value(*tolerance));
            let within = match &unit {
                Some(u) => format!("{tol:.1e} {}", u.name),
                None => format!("{tol:.1e}"),
            };
            let mut out = if second.is_empty() {
                let at: Vec<String> = crossings.iter().map(|c| shown(0, c.value)).collect();
                format!(
                    "\nseek: the governing utilization reaches 1.0 at {} = {} (to within {within}; {evaluations} extra solves)\n",
                    axis.name,
                    at.join(", "),
                )
            } else {
                let mut t = format!(
                    "\nseek: the governing utilization reaches 1.0 at these points ({} to within {within}; {evaluations} extra solves):\n",
                    axis.name
                );
                let b = &head.axes[1].name;
                for (c, s) in crossings.iter().zip(second) {
                    t.push_str(&format!(
                        "  {} = {}, {b} = {}\n",
                        axis.name,
                        shown(0, c.value),
                        shown(1, s.value)
                    ));
                }
                t
            };
            if crossings.len() > 1 && second.is_empty() {
                out.push_str(&format!(
                    "seek: it crosses 1.0 {} times in the range; each crossing is listed\n",
                    crossings.len()
                ));
            }
            if !monotonic {
                out.push_str("seek: the utilization is not monotonic over the range: a value between the steps may pass 1.0 unseen; use more steps to be sure\n");
            }
            out
        }
        Seek::NoRoot { lowest, highest } => format!(
            "\nseek: no value in the range brings the governing utilization to 1.0 (it runs from {} to {}); widen the range\n",
            utilization(Some(*lowest)),
            utilization(Some(*highest))
        ),
    }
}

/// A kept sweep as an aligned text table, with the seek's answer.
#[must_use]
pub fn text(sweep: &Sweep, seek: Option<&Seek>, d: &Display) -> String {
    let mut sink = TextSink::new(Vec::new(), d);
    if replay(sweep, seek, &mut sink).is_err() {
        return String::new();
    }
    sink.into_inner()
        .map(|b| String::from_utf8_lossy(&b).into_owned())
        .unwrap_or_default()
}

/// Points kept per curve: the chart is a few hundred pixels wide.
const ENVELOPE: usize = 1000;

/// A curve thinned as it comes: runs of `per` consecutive points keep
/// their first, lowest, highest and last, so that the drawn line has the
/// same envelope (every peak, every stretch off the scale).
struct Curve {
    label: String,
    per: usize,
    run: Vec<(f64, f64)>,
    points: Vec<(f64, f64)>,
}

impl Curve {
    fn new(label: String, count: usize) -> Self {
        Self {
            label,
            per: count.div_ceil(ENVELOPE).max(1),
            run: Vec::new(),
            points: Vec::new(),
        }
    }

    /// A point; an undefined utilization is `∞` (drawn off the scale).
    fn add(&mut self, x: f64, y: Option<f64>) {
        let y = y.filter(|y| !y.is_nan()).unwrap_or(f64::INFINITY);
        self.run.push((x, y));
        if self.run.len() >= self.per {
            self.flush();
        }
    }

    fn flush(&mut self) {
        if self.run.len() <= 4 {
            self.points.append(&mut self.run);
            return;
        }
        let last = self.run.len() - 1;
        let lo = (0..=last)
            .min_by(|&a, &b| self.run[a].1.total_cmp(&self.run[b].1))
            .unwrap_or(0);
        let hi = (0..=last)
            .max_by(|&a, &b| self.run[a].1.total_cmp(&self.run[b].1))
            .unwrap_or(0);
        let mut keep = vec![0, lo, hi, last];
        keep.sort_unstable();
        keep.dedup();
        self.points.extend(keep.into_iter().map(|k| self.run[k]));
        self.run.clear();
    }
}

/// The sweep as an SVG chart, from a bounded envelope of each curve: each
/// check's utilization against the parameter, or on a grid the governing
/// utilization against the first parameter, one curve per value of the
/// second. Axis titles carry units; the limit 1.0 and the values found by
/// the seek are marked, and the legend stands outside the data. A
/// utilization off the scale or undefined (capacity not positive) is
/// drawn at the top edge and marked ▲, never left out.
pub struct PlotSink<'d> {
    d: &'d Display,
    head: Option<Head>,
    curves: Vec<Curve>,
    svg: String,
}

impl<'d> PlotSink<'d> {
    #[must_use]
    pub fn new(d: &'d Display) -> Self {
        Self {
            d,
            head: None,
            curves: Vec::new(),
            svg: String::new(),
        }
    }

    /// The SVG drawn at the end.
    #[must_use]
    pub fn svg(self) -> String {
        self.svg
    }

    fn x(&self, k: usize, v: f64) -> f64 {
        self.head
            .as_ref()
            .and_then(|h| h.axes[k].shown_unit(self.d))
            .map_or(v, |u| u.value(v))
    }
}

impl Sink for PlotSink<'_> {
    fn begin(&mut self, head: &Head) -> std::io::Result<()> {
        let n = head.axes[0].steps;
        self.head = Some(head.clone());
        self.curves = match head.axes.get(1) {
            None => head
                .labels
                .iter()
                .map(|l| Curve::new(l.clone(), n))
                .collect(),
            Some(b) => (0..b.steps)
                .map(|j| {
                    let v = b.value(j).value;
                    let label = match b.shown_unit(self.d) {
                        Some(u) => format!("{} = {} {}", b.name, number(u.value(v), 4), u.name),
                        None => format!("{} = {}", b.name, number(v, 4)),
                    };
                    Curve::new(label, n)
                })
                .collect(),
        };
        Ok(())
    }

    fn step(&mut self, s: &Step) -> std::io::Result<()> {
        let x = self.x(0, s.value.value);
        match (&self.head, s.second) {
            (Some(h), Some(second)) => {
                let b = &h.axes[1];
                let span = b.to.value - b.from.value;
                let j = if b.steps <= 1 || span == 0.0 {
                    0
                } else {
                    // the step's row, from its value (exact on the grid)
                    let t = (second.value - b.from.value) / span * (b.steps - 1) as f64;
                    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
                    let j = t.round().max(0.0) as usize;
                    j.min(b.steps - 1)
                };
                if let Some(c) = self.curves.get_mut(j) {
                    c.add(x, s.governing);
                }
            }
            _ => {
                for (c, u) in self.curves.iter_mut().zip(&s.checks) {
                    c.add(x, *u);
                }
            }
        }
        Ok(())
    }

    fn end(&mut self, seek: Option<&Seek>) -> std::io::Result<()> {
        use crate::report::drawing::chart::{render, Chart, Mark, Series};
        for c in &mut self.curves {
            c.flush();
        }
        let Some(head) = &self.head else {
            return Ok(());
        };
        let ymax = self
            .curves
            .iter()
            .flat_map(|c| c.points.iter().map(|p| p.1))
            .filter(|u| u.is_finite())
            .fold(1.2f64, f64::max)
            * 1.05;
        let series = self
            .curves
            .iter()
            .map(|c| {
                let mut off = Vec::new();
                let points = c
                    .points
                    .iter()
                    .enumerate()
                    .map(|(i, &(x, y))| {
                        if y < ymax {
                            (x, y)
                        } else {
                            off.push(i);
                            (x, ymax)
                        }
                    })
                    .collect();
                Series {
                    label: c.label.clone(),
                    points,
                    off,
                }
            })
            .collect();
        let a = &head.axes[0];
        let unit = a.shown_unit(self.d);
        let with_unit = |k: usize, v: f64| {
            let u = head.axes[k].shown_unit(self.d);
            format!(
                "{} = {}{}",
                head.axes[k].name,
                number(self.x(k, v), 4),
                u.map_or(String::new(), |u| format!(" {}", u.name))
            )
        };
        let marks = match seek {
            Some(Seek::Found {
                crossings, second, ..
            }) => crossings
                .iter()
                .enumerate()
                .map(|(i, q)| Mark {
                    at: (self.x(0, q.value), 1.0),
                    label: match second.get(i) {
                        Some(s) => format!("{}, {}", with_unit(0, q.value), with_unit(1, s.value)),
                        None => with_unit(0, q.value),
                    },
                })
                .collect(),
            _ => Vec::new(),
        };
        self.svg = render(&Chart {
            title: match head.axes.get(1) {
                None => "Utilization against the parameter".into(),
                Some(b) => format!(
                    "Governing utilization against {}, one curve per {}",
                    a.name, b.name
                ),
            },
            x_label: match &unit {
                Some(u) => format!("{} ({})", a.name, u.name),
                None => a.name.clone(),
            },
            y_label: match head.axes.get(1) {
                None => "utilization (demand / capacity)".into(),
                Some(_) => "governing utilization (demand / capacity)".into(),
            },
            series,
            levels: vec![(1.0, "limit: utilization 1.0".into())],
            marks,
            marks_label: "where the governing utilization reaches 1.0 (--seek)".into(),
            y_min_top: ymax / 1.05,
        });
        Ok(())
    }
}

/// A kept sweep as an SVG chart ([`PlotSink`]).
#[must_use]
pub fn plot(sweep: &Sweep, seek: Option<&Seek>, d: &Display) -> String {
    let mut sink = PlotSink::new(d);
    if replay(sweep, seek, &mut sink).is_err() {
        return String::new();
    }
    sink.svg()
}

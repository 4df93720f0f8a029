//! Parameter sweeps and goal seek (`tandem sweep`), over one `let` or a grid
//! of two.
//!
//! The file is parsed and built once ([`Evaluator`]); each step writes the
//! parameter's value over the model and solves again only when something
//! the solver reads depends on it, on the kept unknowns and factorisation
//! pattern. Steps are handed to a [`Sink`] as they are made and never
//! kept: the JSON and the text table stream, the plot keeps a bounded
//! envelope of each curve, and the seek brackets 1.0 between neighbours as
//! they come.

mod out;
mod seek;

pub use out::{json, plot, text, write_json, Collect, JsonSink, PlotSink, Sink, Tee, TextSink};
pub use seek::Seek;

pub use super::study::Shown;
use super::study::{shown_results, Evaluator, Utilizations};
use crate::report::display;
use crate::source::Source;
use crate::syntax::ast;
use crate::units::{Dimension, Quantity};
use crate::Error;

/// One swept parameter: a `let`, its range (ends included) and how many
/// evenly spaced values.
#[derive(Clone, Debug, PartialEq)]
pub struct Axis {
    pub name: String,
    pub from: Quantity,
    pub to: Quantity,
    pub steps: usize,
    /// The unit the range was written in (`deg`), for showing the
    /// parameter; `None`: the display's unit for its dimension.
    pub unit: Option<display::Shown>,
}

impl Axis {
    /// The `i`-th of the evenly spaced values.
    #[must_use]
    pub fn value(&self, i: usize) -> Quantity {
        let t = if self.steps <= 1 {
            0.0
        } else {
            i as f64 / (self.steps - 1) as f64
        };
        Quantity::new(
            self.from.value + (self.to.value - self.from.value) * t,
            self.from.dim,
        )
    }

    /// The unit the parameter is shown in: the range's own, else the
    /// display's for its dimension.
    #[must_use]
    pub fn shown_unit(&self, d: &crate::report::Display) -> Option<display::Shown> {
        self.unit
            .clone()
            .or_else(|| d.unit_for(self.from.dim).cloned())
    }
}

/// One step of a sweep.
#[derive(Clone, Debug, PartialEq)]
pub struct Step {
    pub value: Quantity,
    /// The second parameter's value on a grid.
    pub second: Option<Quantity>,
    /// Highest utilization over every check and combination (`None`: no checks).
    pub governing: Option<f64>,
    /// Each check's highest utilization, in check order.
    pub checks: Vec<Option<f64>>,
    /// Each shown result: the value of largest magnitude over the combinations.
    pub shown: Vec<Quantity>,
}

/// What every output of a sweep starts from: the parameters, the checks'
/// labels and the results shown (with the dimension of each).
#[derive(Clone, Debug, PartialEq)]
pub struct Head {
    /// The swept parameter, and on a grid the second (the outer loop).
    pub axes: Vec<Axis>,
    pub labels: Vec<String>,
    pub shown: Vec<Shown>,
    pub shown_dims: Vec<Dimension>,
}

impl Head {
    /// Steps in all.
    #[must_use]
    pub fn steps(&self) -> usize {
        self.axes.iter().map(|a| a.steps).product()
    }
}

/// A finished sweep kept whole ([`Collect`]): for small sweeps and tests.
#[derive(Clone, Debug, PartialEq)]
pub struct Sweep {
    pub head: Head,
    pub steps: Vec<Step>,
}

/// A prepared sweep: the parsed file, the parameters and the results shown.
pub struct Sweeper<'a> {
    file: ast::File,
    names: Vec<String>,
    dims: Vec<Dimension>,
    shown: Vec<Shown>,
    source: &'a Source,
}

fn errors<E: Into<Error>>(es: Vec<E>) -> Vec<Error> {
    es.into_iter().map(Into::into).collect()
}

/// Steps solved together on the cores before they are handed on in order
/// (enough that a core finishing its last run early waits little).
const BATCH: usize = 4096;

/// Cores a sweep uses at most.
const MAX_THREADS: usize = 64;

/// A failed step: the parameters' values and the errors.
pub type Failed = (Vec<Quantity>, Vec<Error>);

impl<'a> Sweeper<'a> {
    /// Parse the file once and check the parameter and the shown results.
    ///
    /// # Errors
    /// The file's errors, or a message about the parameter.
    pub fn new(
        source: &'a Source,
        name: &str,
        shown: &[String],
    ) -> Result<Self, Result<Vec<Error>, String>> {
        Self::grid(source, &[name], shown)
    }

    /// [`Sweeper::new`] over one or two parameters (a grid).
    ///
    /// # Errors
    /// As [`Sweeper::new`].
    pub fn grid(
        source: &'a Source,
        names: &[&str],
        shown: &[String],
    ) -> Result<Self, Result<Vec<Error>, String>> {
        let file = crate::syntax::parse(&source.text).map_err(|e| Ok(errors(e)))?;
        let model = crate::model::build(&file, crate::model::Limits::default())
            .map_err(|e| Ok(errors(e)))?;
        let mut dims = Vec::new();
        for name in names {
            let Some(l) = model.lets.iter().find(|l| l.name == *name) else {
                let lets: Vec<&str> = model.lets.iter().map(|l| l.name.as_str()).collect();
                return Err(Err(format!(
                    "`{name}` is not a `let` of {}; the parameters are {}",
                    source.name,
                    if lets.is_empty() {
                        "none".to_string()
                    } else {
                        lets.join(", ")
                    }
                )));
            };
            dims.push(l.value.dim);
        }
        if names.len() == 2 && names[0] == names[1] {
            return Err(Err(format!(
                "`{}` is varied twice; a grid needs two different `let`s",
                names[0]
            )));
        }
        let list = shown_results(&model, shown, &source.name).map_err(Err)?;
        Ok(Self {
            file,
            names: names.iter().map(ToString::to_string).collect(),
            dims,
            shown: list,
            source,
        })
    }

    /// The first parameter's dimension.
    pub fn dimension(&self) -> Dimension {
        self.dims[0]
    }

    /// Each parameter's dimension.
    pub fn dimensions(&self) -> &[Dimension] {
        &self.dims
    }

    fn evaluator(&self) -> Result<Evaluator<'_>, Vec<Error>> {
        let names: Vec<&str> = self.names.iter().map(String::as_str).collect();
        Evaluator::new(&self.file, &names, &self.shown).map_err(|e| match e {
            Ok(es) => es,
            Err(msg) => vec![Error::Message(msg)],
        })
    }

    /// Run the sweep over `axes` (one per parameter, in the order named),
    /// handing each step to `sink` as it is made, the first parameter
    /// varying fastest; with `seek` (a tolerance as a fraction of the first
    /// parameter's range) find along it where the governing utilization
    /// reaches 1.0. `progress(done)` is called every so often. A sink
    /// whose reader has gone (a closed pipe) ends the sweep with `Ok(None)`.
    ///
    /// # Errors
    /// The first step that cannot be solved, with its values; a sink's
    /// error as an error in words.
    pub fn run(
        &self,
        axes: &[Axis],
        seek: Option<f64>,
        sink: &mut dyn Sink,
        progress: &dyn Fn(usize),
    ) -> Result<Option<Seek>, Failed> {
        // one evaluator per core, each updating its own copy of the model,
        // and one for the seek's bisections
        let threads = rayon::current_num_threads().clamp(1, MAX_THREADS);
        let mut evs = Vec::with_capacity(threads);
        for _ in 0..threads {
            evs.push(self.evaluator().map_err(|e| (Vec::new(), e))?);
        }
        // the grid's steps in order, the first parameter fastest
        let first = &axes[0];
        let total: usize = axes.iter().map(|a| a.steps).product();
        let point = |n: usize| {
            let second = axes.get(1).map(|a| a.value(n / first.steps));
            (first.value(n % first.steps), second)
        };
        // the checks' labels, from the first step (whose error is the
        // sweep's first)
        let labels = match evs.first_mut() {
            Some(ev) if total > 0 => {
                let (value, second) = point(0);
                let values: Vec<Quantity> = std::iter::once(value).chain(second).collect();
                match ev.at(&values) {
                    Ok(_) => ev.labels(),
                    Err(e) => return Err((values, e)),
                }
            }
            _ => Vec::new(),
        };
        let mut feed = Feed {
            head: None,
            labels,
            axes,
            shown: &self.shown,
            seeker: match seek {
                Some(tol) => Some((
                    seek::Seeker::new(&axes[0], tol),
                    self.evaluator().map_err(|e| (Vec::new(), e))?,
                )),
                None => None,
            },
            sink,
            done: 0,
            progress,
        };
        let compute = |evs: &mut Vec<Evaluator<'_>>, from: usize| -> Batch {
            let n = BATCH.min(total - from);
            crate::parallel::each_with(evs, n, |ev, k| {
                let (value, second) = point(from + k);
                let values: Vec<Quantity> = std::iter::once(value).chain(second).collect();
                (value, second, ev.at(&values))
            })
        };
        // while the cores solve the next batch, this thread hands the last
        // one on (the sink may hold the output's lock, which stays here)
        let mut ready = compute(&mut evs, 0);
        let mut from = ready.len();
        loop {
            let next = from < total;
            let mut computed = None;
            let fed = rayon::in_place_scope(|scope| {
                if next {
                    scope.spawn(|_| computed = Some(compute(&mut evs, from)));
                }
                feed.batch(std::mem::take(&mut ready))
            });
            match fed? {
                Flow::Go => {}
                Flow::Closed => return Ok(None),
            }
            match computed {
                Some(b) => {
                    from += b.len();
                    ready = b;
                }
                None => break,
            }
        }
        (feed.progress)(feed.done);
        let found = feed.seeker.map(|(s, _)| s.finish());
        match feed.sink.end(found.as_ref()) {
            Ok(()) => Ok(found),
            Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(None),
            Err(e) => Err(io_failed(&e)),
        }
    }

    /// Sweep `steps` evenly spaced values from `from` to `to` of the one
    /// parameter and keep every step.
    ///
    /// # Errors
    /// The first step that cannot be solved, with its value.
    pub fn sweep(
        &self,
        from: Quantity,
        to: Quantity,
        steps: usize,
    ) -> Result<Sweep, (Quantity, Vec<Error>)> {
        let axis = Axis {
            name: self.names[0].clone(),
            from,
            to,
            steps,
            unit: None,
        };
        let mut c = Collect::default();
        self.run(&[axis], None, &mut c, &|_| {})
            .map_err(|(v, e)| (v.first().copied().unwrap_or(from), e))?;
        Ok(c.into_sweep())
    }

    /// Find where the governing utilization reaches 1.0 inside a kept
    /// sweep's range (see [`Seek`]), as [`Sweeper::run`] does while it runs.
    ///
    /// # Errors
    /// A value inside a bracket that cannot be solved.
    pub fn seek(&self, sweep: &Sweep, tolerance: f64) -> Result<Seek, (Quantity, Vec<Error>)> {
        let mut ev = self.evaluator().map_err(|e| (Quantity::number(0.0), e))?;
        let mut s = seek::Seeker::new(&sweep.head.axes[0], tolerance);
        for (k, step) in sweep.steps.iter().enumerate() {
            if k % sweep.head.axes[0].steps.max(1) == 0 {
                s.new_row();
            }
            let second = step.second;
            s.feed(step, &mut |x| {
                let values: Vec<Quantity> = std::iter::once(x).chain(second).collect();
                ev.at(&values)
                    .map(|e| e.utilizations.governing)
                    .map_err(|e| (values.clone(), e))
            })
            .map_err(|(v, e)| (v.first().copied().unwrap_or(step.value), e))?;
        }
        Ok(s.finish())
    }

    /// The source this sweep reads.
    pub fn source(&self) -> &Source {
        self.source
    }
}

/// Solved steps waiting to be handed on: each one's values and evaluation.
type Batch<'f> = Vec<(
    Quantity,
    Option<Quantity>,
    Result<super::study::Evaluation, Vec<Error>>,
)>;

/// Whether the sweep goes on after a batch.
enum Flow {
    Go,
    /// The reader of the output has gone (a closed pipe).
    Closed,
}

fn io_failed(e: &std::io::Error) -> Failed {
    (Vec::new(), vec![Error::Message(e.to_string())])
}

/// What hands solved steps on, in order: the head before the first, the
/// seek between neighbours, the sink, the progress.
struct Feed<'a, 'f> {
    head: Option<Head>,
    /// The checks' labels, for the head.
    labels: Vec<String>,
    axes: &'a [Axis],
    shown: &'a [Shown],
    seeker: Option<(seek::Seeker, Evaluator<'f>)>,
    sink: &'a mut dyn Sink,
    done: usize,
    progress: &'a dyn Fn(usize),
}

impl Feed<'_, '_> {
    fn batch(&mut self, batch: Batch<'_>) -> Result<Flow, Failed> {
        let put = |r: std::io::Result<()>| match r {
            Ok(()) => Ok(Flow::Go),
            Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(Flow::Closed),
            Err(e) => Err(io_failed(&e)),
        };
        let steps = self.axes[0].steps;
        for (value, second, e) in batch {
            let values = || std::iter::once(value).chain(second).collect::<Vec<_>>();
            let e = e.map_err(|e| (values(), e))?;
            if self.head.is_none() {
                let h = Head {
                    axes: self.axes.to_vec(),
                    labels: std::mem::take(&mut self.labels),
                    shown: self.shown.to_vec(),
                    shown_dims: e.shown.iter().map(|q| q.dim).collect(),
                };
                if let Flow::Closed = put(self.sink.begin(&h))? {
                    return Ok(Flow::Closed);
                }
                self.head = Some(h);
            }
            let step = step_of(value, second, e.utilizations, e.shown);
            if let Some((s, ev)) = self.seeker.as_mut() {
                if self.done % steps == 0 {
                    s.new_row();
                }
                s.feed(&step, &mut |x| {
                    let values: Vec<Quantity> = std::iter::once(x).chain(second).collect();
                    ev.at(&values)
                        .map(|e| e.utilizations.governing)
                        .map_err(|e| (values.clone(), e))
                })?;
            }
            if let Flow::Closed = put(self.sink.step(&step))? {
                return Ok(Flow::Closed);
            }
            self.done += 1;
            if self.done % 1024 == 0 {
                (self.progress)(self.done);
            }
        }
        Ok(Flow::Go)
    }
}

fn step_of(
    value: Quantity,
    second: Option<Quantity>,
    u: Utilizations,
    shown: Vec<Quantity>,
) -> Step {
    Step {
        value,
        second,
        governing: u.governing,
        checks: u.checks,
        shown,
    }
}

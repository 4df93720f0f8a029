//! tandem reads a calc file describing an assembly of parts that share a load
//! and turns it into a checked, solved and reported calculation. The pipeline
//! runs in stages, each with one input and one output type: [`syntax`] parses
//! the text into an owned syntax tree; [`model`] resolves names, evaluates
//! expressions with units and checks every dimension, giving a typed
//! [`model::Model`]; `solve` assembles and factorises the stiffness system
//! for every load combination; `report` writes the results. Errors from
//! every stage are `miette` diagnostics that point at the offending span
//! ([`diagnostic`]).

// pest's derive without `std` names `::alloc` (see Cargo.toml).
extern crate alloc;

pub mod checks;
pub mod diagnostic;
pub mod history;
pub mod lsp;
pub mod model;
pub mod output;
pub mod parallel;
pub mod report;
pub mod review;
pub mod solve;
pub mod source;
pub mod syntax;
pub mod units;
pub mod warning;
pub mod words;

/// A hash map with a fixed seed, for the small maps made once per
/// evaluation, which a sweep makes hundreds of thousands of times (drawing
/// a random seed costs more than filling such a map). Its keys are the
/// calc's own indices, not text chosen to collide.
pub(crate) type FixedMap<K, V> = std::collections::HashMap<K, V, foldhash::fast::FixedState>;
/// The set of [`FixedMap`].
pub(crate) type FixedSet<K> = std::collections::HashSet<K, foldhash::fast::FixedState>;

use std::path::Path;

pub use diagnostic::Error;
use model::Model;
use source::Source;

/// The largest calc file tandem reads: 128 MiB, room for a generated
/// assembly of a million parts (about 86 MiB) with memory to spare (such a
/// file takes about 1.3 GiB to check; see docs/performance.md).
pub const MAX_FILE_BYTES: u64 = 128 * 1024 * 1024;

/// Read a calc file, refusing files over [`MAX_FILE_BYTES`] and non-UTF-8 text.
///
/// # Errors
/// An I/O error, or a message for an oversized or non-text file.
pub fn read_source(path: &Path) -> Result<Source, String> {
    read_source_limited(path, MAX_FILE_BYTES)
}

/// [`read_source`] with a given size limit in bytes.
///
/// # Errors
/// As [`read_source`].
pub fn read_source_limited(path: &Path, max_bytes: u64) -> Result<Source, String> {
    let meta =
        std::fs::metadata(path).map_err(|e| format!("cannot read {}: {e}", path.display()))?;
    if !meta.is_file() {
        return Err(format!("{} is not a file", path.display()));
    }
    if meta.len() > max_bytes {
        return Err(format!(
            "{} is {} bytes; tandem reads calc files of at most {} bytes ({} MiB)",
            path.display(),
            meta.len(),
            max_bytes,
            max_bytes / (1024 * 1024)
        ));
    }
    let bytes = std::fs::read(path).map_err(|e| format!("cannot read {}: {e}", path.display()))?;
    let name = path.display().to_string();
    text_of(&name, bytes).map(|text| Source::new(name, text))
}

/// The name diagnostics give a calc read from standard input.
pub const STDIN_NAME: &str = "<stdin>";

/// Read a calc from standard input (named [`STDIN_NAME`]), refusing more
/// than [`MAX_FILE_BYTES`] and non-UTF-8 text.
///
/// # Errors
/// An I/O error, or a message for an oversized or non-text input.
pub fn read_stdin() -> Result<Source, String> {
    use std::io::Read as _;
    let mut bytes = Vec::new();
    std::io::stdin()
        .lock()
        .take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(|e| format!("cannot read standard input: {e}"))?;
    if bytes.len() as u64 > MAX_FILE_BYTES {
        return Err(format!(
            "standard input holds more than {MAX_FILE_BYTES} bytes; tandem reads calcs of at most {} MiB",
            MAX_FILE_BYTES / (1024 * 1024)
        ));
    }
    text_of(STDIN_NAME, bytes).map(|text| Source::new(STDIN_NAME, text))
}

/// The calc files a command is given: each file as it is, `-` (standard
/// input) as it is, and each folder walked for `*.tandem` files in name
/// order, hidden folders and files skipped.
///
/// # Errors
/// A folder that cannot be read.
pub fn calc_files(given: &[std::path::PathBuf]) -> Result<Vec<std::path::PathBuf>, String> {
    fn walk(dir: &Path, out: &mut Vec<std::path::PathBuf>) -> Result<(), String> {
        let mut entries: Vec<std::path::PathBuf> = std::fs::read_dir(dir)
            .map_err(|e| format!("cannot read the folder {}: {e}", dir.display()))?
            .flatten()
            .map(|e| e.path())
            .filter(|p| {
                !p.file_name()
                    .is_some_and(|n| n.to_string_lossy().starts_with('.'))
            })
            .collect();
        entries.sort();
        for p in entries {
            // a link to a folder is not followed (no cycles)
            let is_dir = std::fs::symlink_metadata(&p).is_ok_and(|m| m.is_dir());
            if is_dir {
                walk(&p, out)?;
            } else if p.extension().is_some_and(|x| x == "tandem") {
                out.push(p);
            }
        }
        Ok(())
    }
    let mut out = Vec::new();
    for p in given {
        if p.as_os_str() != "-" && p.is_dir() {
            let before = out.len();
            walk(p, &mut out)?;
            if out.len() == before {
                return Err(format!("{} holds no `.tandem` file", p.display()));
            }
        } else {
            out.push(p.clone());
        }
    }
    Ok(out)
}

/// The text of a calc file's bytes: UTF-8, a leading byte-order mark
/// dropped, no NUL byte.
///
/// # Errors
/// A message naming the file, the line and the column of the first byte
/// that is not UTF-8 text, or of a NUL byte.
pub fn text_of(name: &str, mut bytes: Vec<u8>) -> Result<String, String> {
    if bytes.starts_with(&[0xEF, 0xBB, 0xBF]) {
        bytes.drain(..3);
    }
    let at = |bytes: &[u8], i: usize| {
        let before = &bytes[..i];
        let line = before.iter().filter(|&&b| b == b'\n').count() + 1;
        let start = before
            .iter()
            .rposition(|&b| b == b'\n')
            .map_or(0, |p| p + 1);
        let column = String::from_utf8_lossy(&before[start..]).chars().count() + 1;
        format!("line {line}, column {column}")
    };
    let text = String::from_utf8(bytes).map_err(|e| {
        let i = e.utf8_error().valid_up_to();
        format!(
            "{name} is not UTF-8 text: byte {i} ({}) is not; save the file as UTF-8",
            at(e.as_bytes(), i)
        )
    })?;
    if let Some(i) = text.bytes().position(|b| b == 0) {
        return Err(format!(
            "{name} holds a NUL byte at {}; a calc file is plain text",
            at(text.as_bytes(), i)
        ));
    }
    Ok(text)
}

/// Parse and check a calc file: the typed model, or every error found.
///
/// # Errors
/// Syntax errors, or all model errors in the file.
pub fn check(source: &Source) -> Result<Model, Vec<Error>> {
    let file = syntax::parse(&source.text)
        .map_err(|es| es.into_iter().map(Error::from).collect::<Vec<_>>())?;
    let model = model::build(&file, model::Limits::default());
    release(file);
    model.map_err(|es| es.into_iter().map(Error::from).collect())
}

/// Drop a syntax tree; a large one on a thread of its own, as freeing
/// millions of small allocations takes a while.
pub fn release(file: syntax::ast::File) {
    if file.decls.len() > 100_000 {
        std::thread::spawn(move || drop(file));
    }
}

/// A checked, solved and verified calc.
pub struct Analysis {
    pub model: Model,
    pub solution: solve::Solution,
    pub checks: checks::Checks,
    /// Capacity paths (when a material has `yield`).
    pub capacity: Vec<solve::capacity::Capacity>,
    /// Long-term states (when a material creeps and a case is sustained).
    pub long_term: Vec<solve::longterm::LongTerm>,
    /// Euler loads of parts with a `buckling_length`.
    pub buckling: Vec<checks::Buckling>,
    /// The checks evaluated on the long-term states, with those states as a
    /// solution of their own (combinations in the order of `long_term`).
    pub long_term_checks: Option<(solve::Solution, checks::Checks)>,
    /// Combinations that could not be solved or checked and are left out
    /// of this analysis (see [`analyse_partial`]); empty from [`analyse`].
    pub left_out: Vec<String>,
    /// What the result depends on, when asked for ([`with_sensitivity`]).
    pub sensitivity: Option<review::sensitivity::Sensitivity>,
}

/// Add to an analysis what its result depends on: the elasticity of its
/// utilizations to each `let` (several re-solves per `let`; a complete
/// analysis only, a partial one is left as it is).
pub fn with_sensitivity(source: &Source, a: &mut Analysis) {
    if !a.left_out.is_empty() {
        return;
    }
    if let Ok(file) = syntax::parse(&source.text) {
        a.sensitivity = Some(review::sensitivity::sensitivity(&file, a));
    }
}

impl Analysis {
    /// Checks that fail, short term and long term.
    pub fn failures(&self) -> usize {
        self.checks.failures()
            + self
                .long_term_checks
                .as_ref()
                .map_or(0, |(_, c)| c.failures())
    }
}

/// Check, solve and evaluate the checks of a calc file.
///
/// # Errors
/// Every error of the first stage that fails.
pub fn analyse(source: &Source) -> Result<Analysis, Vec<Error>> {
    match analyse_partial(source) {
        (Some(a), errors) if errors.is_empty() => Ok(a),
        (_, errors) => Err(errors),
    }
}

/// Check, solve and evaluate what can be: when some load combinations
/// cannot be solved or checked (a mechanism once parts go slack, a check
/// that cannot be evaluated there), the others are still analysed. Returns
/// the analysis of the combinations that stand (with
/// [`Analysis::left_out`] naming the others), if any, and every error,
/// each naming its combination. Any error makes the calc fail (exit 2);
/// the partial analysis is there to be shown beside the errors.
pub fn analyse_partial(source: &Source) -> (Option<Analysis>, Vec<Error>) {
    let model = match check(source) {
        Ok(m) => m,
        Err(e) => return (None, e),
    };
    // The whole model first: in the usual case it stands, at no extra cost.
    let (model, first) = match analyse_model(model) {
        Ok(a) => return (Some(a), Vec::new()),
        Err(failed) => *failed,
    };
    if model.combinations.len() < 2 {
        return (None, first);
    }
    // Each combination alone, to find which fail and why.
    let mut errors: Vec<Error> = Vec::new();
    let mut keep = Vec::new();
    let mut left_out = Vec::new();
    for c in &model.combinations {
        let single = Model {
            combinations: vec![c.clone()],
            ..model.clone()
        };
        match analyse_model(single) {
            Ok(_) => keep.push(c.clone()),
            Err(failed) => {
                let (_, es) = *failed;
                left_out.push(c.name.clone());
                for e in es {
                    let e = e.in_combination(&c.name);
                    if !errors.contains(&e) {
                        errors.push(e);
                    }
                }
            }
        }
    }
    if keep.is_empty() || errors.is_empty() {
        // every combination fails (or the failure is of the whole): as is
        return (None, if errors.is_empty() { first } else { errors });
    }
    let reduced = Model {
        combinations: keep,
        ..model
    };
    match analyse_model(reduced) {
        Ok(mut a) => {
            a.left_out = left_out;
            (Some(a), errors)
        }
        Err(_) => (None, errors),
    }
}

/// [`analyse`] of a checked model; on failure the model comes back with
/// the errors.
fn analyse_model(model: Model) -> Result<Analysis, Box<(Model, Vec<Error>)>> {
    let parts = (|| {
        let solution = solve::solve(&model).map_err(|e| vec![Error::from(e)])?;
        let capacity = solve::capacity::capacity(&model).map_err(|e| vec![Error::from(e)])?;
        let refs = checks::Refs::new(&model, &[]);
        let checks = checks::evaluate_state(&model, &solution, &refs, None, &capacity)
            .map_err(|e| vec![Error::from(e)])?;
        let buckling = checks::buckling(&model, &solution);
        let (long_term, long_term_checks) = long_term_checks(&model, &solution, &refs, &capacity)?;
        Ok((
            solution,
            checks,
            capacity,
            buckling,
            long_term,
            long_term_checks,
        ))
    })();
    match parts {
        Ok((solution, checks, capacity, buckling, long_term, long_term_checks)) => Ok(Analysis {
            model,
            solution,
            checks,
            capacity,
            long_term,
            buckling,
            long_term_checks,
            left_out: Vec::new(),
            sensitivity: None,
        }),
        Err(e) => Err(Box::new((model, e))),
    }
}

/// The long-term states of a model (creep under sustained cases) and every
/// check evaluated in them, with those states as a solution of their own
/// (`None` when the model has no long-term state). `refs` must come from
/// `checks::Refs::new` on this model.
///
/// # Errors
/// A long-term state that cannot be solved, or a check that cannot be
/// evaluated in it.
pub fn long_term_checks(
    model: &Model,
    solution: &solve::Solution,
    refs: &checks::Refs<'_>,
    capacity: &[solve::capacity::Capacity],
) -> Result<LongTermChecks, Vec<Error>> {
    let long_term = solve::longterm::long_term(model).map_err(|e| vec![Error::from(e)])?;
    let states: Vec<solve::CombinationResult> =
        long_term.iter().filter_map(|l| l.result.clone()).collect();
    if states.is_empty() {
        return Ok((long_term, None));
    }
    let lt = solve::Solution {
        unknowns: solution.unknowns,
        combinations: states,
        warnings: Vec::new(),
    };
    let long_of: Vec<usize> = long_term
        .iter()
        .filter(|l| l.result.is_some())
        .map(|l| l.combination)
        .collect();
    let c = checks::evaluate_state(model, &lt, refs, Some(&long_of), capacity)
        .map_err(|e| vec![Error::from(e)])?;
    Ok((long_term, Some((lt, c))))
}

/// The long-term states and the checks evaluated in them.
pub type LongTermChecks = (
    Vec<solve::longterm::LongTerm>,
    Option<(solve::Solution, checks::Checks)>,
);

/// Parse a display-unit choice as the `--units` flag takes it: `us`, `si`,
/// or a comma-separated list such as `kip,in,ksi`.
///
/// # Errors
/// A message naming what is not a unit.
pub fn parse_units(text: &str) -> Result<model::UnitChoice, String> {
    match text.trim() {
        "us" => return Ok(model::UnitChoice::Us),
        "si" => return Ok(model::UnitChoice::Si),
        _ => {}
    }
    let file = syntax::parse(&format!("units {text}")).map_err(|_| {
        format!("`{text}` is not `us`, `si` or a list of units such as `kip,in,ksi`")
    })?;
    let Some(syntax::ast::Decl::Units(syntax::ast::Units::List(list))) = file.decls.first() else {
        return Err(format!("`{text}` is not a list of units"));
    };
    let mut out: Vec<(String, units::Quantity)> = Vec::new();
    for (u, name) in list.iter().zip(text.split(',')) {
        let q = model::eval::unit_value(u).map_err(|e| e.to_string())?;
        if let Some((other, _)) = out.iter().find(|(_, o)| o.dim == q.dim) {
            return Err(model::ModelError::SameKindUnits {
                first: other.clone(),
                second: name.trim().to_string(),
                kind: q.dim.describe(),
                span: u.span,
            }
            .to_string());
        }
        out.push((name.trim().to_string(), q));
    }
    Ok(model::UnitChoice::List(out))
}

/// Evaluate a stand-alone quantity such as `0.25 in` or `5 ksi` (no names
/// but constants), for command-line arguments.
///
/// # Errors
/// A message saying what is wrong with the text.
pub fn quantity(text: &str) -> Result<units::Quantity, String> {
    struct NoNames;
    impl model::eval::Scope for NoNames {
        fn name(&self, id: &syntax::ast::Ident) -> Result<units::Quantity, model::ModelError> {
            model::eval::constant(&id.name)
                .map(units::Quantity::number)
                .ok_or_else(|| model::ModelError::UnknownName {
                    kind: "name",
                    name: id.name.to_string(),
                    span: id.span,
                    help: None,
                })
        }
        fn field(
            &self,
            object: &syntax::ast::Ident,
            field: &syntax::ast::Ident,
        ) -> Result<units::Quantity, model::ModelError> {
            Err(model::ModelError::ResultOutsideCheck {
                name: format!("{}.{}", object.name, field.name),
                span: object.span,
            })
        }
    }
    let file = syntax::parse(&format!("let value = {text}"))
        .map_err(|_| format!("`{text}` is not a value with a unit, such as `0.25 in`"))?;
    let Some(syntax::ast::Decl::Let(l)) = file.decls.first() else {
        return Err(format!("`{text}` is not a value"));
    };
    if file.decls.len() != 1 {
        return Err(format!("`{text}` is not a single value"));
    }
    model::eval::eval(&l.value, &NoNames).map_err(|e| format!("`{text}`: {e}"))
}

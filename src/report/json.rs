//! Machine output of `tandem solve --json`: SI base units, keys carry the unit.
//!
//! The document is a tree of plain structs serialized as they are written
//! (not a `serde_json::Value` built first): a million parts are a million
//! small records, not a million maps of owned keys.

// the keys carry their units: `force_N`, `stress_Pa`
#![allow(non_snake_case)]

use schemars::JsonSchema;
use serde::Serialize;
use serde_json::Value;

use crate::checks::Origin;
use crate::model::{Kind, Model};
use crate::solve::CombinationResult;

/// The version of the JSON layout: raised when a key is renamed or removed
/// or its meaning changes (adding keys keeps it).
pub const SCHEMA_VERSION: u32 = 1;

/// The JSON Schema of [`Document`], generated from the structs
/// (docs/solve.schema.json is this, written out).
#[must_use]
pub fn schema() -> String {
    let schema = schemars::schema_for!(Document<'static>);
    serde_json::to_string_pretty(&schema).unwrap_or_default() + "\n"
}

/// The JSON document for a solved file, serialized as it is written.
#[derive(Serialize, JsonSchema)]
pub struct Document<'a> {
    /// The version of this document's layout ([`SCHEMA_VERSION`]); the
    /// schema is docs/solve.schema.json.
    schema_version: u32,
    file: &'a str,
    model: ModelSummary,
    combinations: Vec<Combination<'a>>,
    checks: Vec<CheckOutcome<'a>>,
    yielded: Vec<Yielded<'a>>,
    capacity: Vec<Capacity<'a>>,
    long_term: Vec<LongTerm<'a>>,
    #[serde(skip_serializing_if = "Option::is_none")]
    long_term_checks: Option<Vec<LongTermCheck<'a>>>,
    buckling: Vec<Buckling<'a>>,
    warnings: Vec<crate::warning::Json>,
    /// Combinations that could not be solved or checked (then the calc
    /// has errors and exits 2).
    #[serde(default, skip_serializing_if = "<[String]>::is_empty")]
    left_out: &'a [String],
    /// What the result depends on (`solve --json` computes it): each
    /// `let` that reaches the solve or a check, most influential first.
    #[serde(skip_serializing_if = "Option::is_none")]
    sensitivity: Option<SensitivityJson<'a>>,
}

#[derive(Serialize, JsonSchema)]
struct SensitivityJson<'a> {
    /// Why it was not computed, when it was not.
    #[serde(skip_serializing_if = "Option::is_none")]
    note: Option<&'a str>,
    inputs: Vec<InfluenceJson<'a>>,
}

/// One input's influence: the elasticity (dU/U)/(dx/x) of the governing
/// utilization and of each check's at the design point; for an input whose
/// value is zero, dU/dx per SI unit instead.
#[derive(Serialize, JsonSchema)]
struct InfluenceJson<'a> {
    name: &'a str,
    value_si: f64,
    /// The SI unit of `value_si` and of the step of an absolute derivative.
    unit: String,
    /// `exact`, `central_difference` or `absolute_derivative`; absent when
    /// it could not be evaluated (`failed`).
    #[serde(skip_serializing_if = "Option::is_none")]
    method: Option<&'static str>,
    /// The step: in ln x, or in SI for an absolute derivative.
    #[serde(skip_serializing_if = "Option::is_none")]
    step: Option<f64>,
    /// How it was computed, in words.
    #[serde(skip_serializing_if = "Option::is_none")]
    how: Option<String>,
    governing: Option<f64>,
    checks: Vec<CheckInfluence<'a>>,
    #[serde(skip_serializing_if = "Option::is_none")]
    failed: Option<&'a str>,
}

#[derive(Serialize, JsonSchema)]
struct CheckInfluence<'a> {
    label: &'a str,
    influence: Option<f64>,
}

fn sensitivity_json(s: &crate::review::sensitivity::Sensitivity) -> SensitivityJson<'_> {
    use crate::review::sensitivity::Method;
    SensitivityJson {
        note: s.note.as_deref(),
        inputs: s
            .inputs
            .iter()
            .map(|i| InfluenceJson {
                name: &i.name,
                value_si: i.value.value,
                unit: i.value.dim.si_symbol(),
                method: i.method.map(Method::key),
                step: i.method.map(|m| match m {
                    Method::Exact { step }
                    | Method::Central { step }
                    | Method::Absolute { step, .. } => step,
                }),
                how: i.method.map(Method::words),
                governing: i.governing,
                checks: s
                    .labels
                    .iter()
                    .zip(&i.checks)
                    .map(|(label, e)| CheckInfluence {
                        label,
                        influence: *e,
                    })
                    .collect(),
                failed: i.failed.as_deref(),
            })
            .collect(),
    }
}

#[derive(Serialize, JsonSchema)]
struct ModelSummary {
    kind: &'static str,
    nodes: usize,
    parts: usize,
    unknowns: usize,
}

#[derive(Serialize, JsonSchema)]
struct Combination<'a> {
    name: &'a str,
    parts: Parts<'a>,
    nodes: Nodes<'a>,
    #[serde(skip_serializing_if = "Option::is_none")]
    rigid_bodies: Option<Vec<Rotation<'a>>>,
    #[serde(rename = "equilibrium_residual_N")]
    equilibrium_residual: f64,
}

/// Every part's results in one combination, written one record at a time.
struct Parts<'a>(&'a Model, &'a CombinationResult);

#[derive(Serialize, JsonSchema)]
struct PartRecord<'a> {
    name: &'a str,
    /// `part` (pin-ended: force along it only) or `beam` (it bends too).
    kind: &'static str,
    /// Axial force, tension positive.
    force_N: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    stress_Pa: Option<f64>,
    /// Total: elongation over length (free elongation and gap included).
    strain: f64,
    /// From force alone: σ/E (members only; a beam's from its axial force, N/(E·A)).
    #[serde(skip_serializing_if = "Option::is_none")]
    strain_from_force: Option<f64>,
    elongation_m: f64,
    state: &'static str,
    #[serde(flatten, skip_serializing_if = "Option::is_none")]
    bending: Option<BeamRecord>,
}

/// A beam's bending. Moments are those along the beam (as its moment
/// diagram and the checks' `.moment_a`, `.moment_b` read them): positive
/// where the fibre on the right of the direction from end A to end B is in
/// tension, sagging for a beam drawn left to right.
#[derive(Serialize, JsonSchema)]
struct BeamRecord {
    moment_a_Nm: f64,
    moment_b_Nm: f64,
    /// The moment of largest magnitude along the beam.
    moment_max_Nm: f64,
    /// Where it is, from end A.
    moment_max_at_m: f64,
    /// The shear along the beam at each end, V = dM/dx (the end force
    /// across the beam at A, and minus it at B; across is a quarter turn
    /// counter-clockwise from the direction A to B).
    shear_a_N: f64,
    shear_b_N: f64,
    /// The shear of largest magnitude along the beam.
    shear_max_N: f64,
    /// The largest deflection across the chord between the displaced ends.
    deflection_max_m: f64,
    /// Where it is, from end A.
    deflection_max_at_m: f64,
}

impl BeamRecord {
    fn of(b: &crate::solve::BeamResult) -> Self {
        BeamRecord {
            moment_a_Nm: b.end_moments_along()[0],
            moment_b_Nm: b.end_moments_along()[1],
            moment_max_Nm: b.moment_max.0,
            moment_max_at_m: b.moment_max.1,
            shear_a_N: b.end_shears_along()[0],
            shear_b_N: b.end_shears_along()[1],
            shear_max_N: b.shear_max,
            deflection_max_m: b.deflection_max.0,
            deflection_max_at_m: b.deflection_max.1,
        }
    }
}

impl Serialize for Parts<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(
            self.0
                .parts
                .iter()
                .zip(&self.1.parts)
                .enumerate()
                .map(|(i, (p, pr))| PartRecord {
                    name: &p.name,
                    kind: if p.bend.is_some() { "beam" } else { "part" },
                    force_N: pr.force.value,
                    stress_Pa: pr.stress.map(|s| s.value),
                    strain: pr.strain,
                    strain_from_force: super::text::force_strain(self.0, p, pr),
                    elongation_m: pr.elongation.value,
                    state: pr.state.name(),
                    bending: self.1.beam(i).map(BeamRecord::of),
                }),
        )
    }
}

impl JsonSchema for Parts<'_> {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Parts".into()
    }
    fn json_schema(g: &mut schemars::SchemaGenerator) -> schemars::Schema {
        <Vec<PartRecord<'static>>>::json_schema(g)
    }
}

/// Every node's results in one combination, written one record at a time.
struct Nodes<'a>(&'a Model, &'a CombinationResult);

/// Axial models give one displacement and reaction per node, plane models
/// an `[x, y]` pair.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used: the records are written directly
#[serde(untagged)]
enum NodeRecord<'a> {
    Axial(AxialNode<'a>),
    Plane(PlaneNode<'a>),
}

impl JsonSchema for Nodes<'_> {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Nodes".into()
    }
    fn json_schema(g: &mut schemars::SchemaGenerator) -> schemars::Schema {
        <Vec<NodeRecord<'static>>>::json_schema(g)
    }
}

#[derive(Serialize, JsonSchema)]
struct AxialNode<'a> {
    name: &'a str,
    displacement_m: f64,
    reaction_N: f64,
}

#[derive(Serialize, JsonSchema)]
struct PlaneNode<'a> {
    name: &'a str,
    displacement_m: [f64; 2],
    reaction_N: [f64; 2],
    /// Counter-clockwise, where a beam end is rigidly joined.
    #[serde(skip_serializing_if = "Option::is_none")]
    rotation_rad: Option<f64>,
    /// Counter-clockwise, where that rotation is held.
    #[serde(skip_serializing_if = "Option::is_none")]
    reaction_moment_Nm: Option<f64>,
}

impl Serialize for Nodes<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeSeq;
        let (model, r) = (self.0, self.1);
        let mut seq = s.serialize_seq(Some(model.nodes.len()))?;
        let turns = model.rotating_nodes();
        for ((n, nr), turns) in model.nodes.iter().zip(&r.nodes).zip(turns) {
            if model.kind == Kind::Plane {
                seq.serialize_element(&PlaneNode {
                    name: &n.name,
                    displacement_m: [nr.displacement[0].value, nr.displacement[1].value],
                    reaction_N: [nr.reaction[0].value, nr.reaction[1].value],
                    rotation_rad: turns.then_some(nr.rotation),
                    reaction_moment_Nm: (turns && n.fixed_rotation).then_some(nr.reaction_moment),
                })?;
            } else {
                seq.serialize_element(&AxialNode {
                    name: &n.name,
                    displacement_m: nr.displacement[0].value,
                    reaction_N: nr.reaction[0].value,
                })?;
            }
        }
        seq.end()
    }
}

#[derive(Serialize, JsonSchema)]
struct Rotation<'a> {
    name: &'a str,
    rotation_rad: f64,
}

#[derive(Serialize, JsonSchema)]
struct Under<'a> {
    /// Combination names; absent: every combination.
    #[serde(skip_serializing_if = "Option::is_none")]
    combinations: Option<Vec<&'a str>>,
    /// `short_term` or `long_term`; absent: both.
    #[serde(skip_serializing_if = "Option::is_none")]
    state: Option<&'static str>,
}

fn under<'a>(model: &'a Model, origin: &Origin) -> Option<Under<'a>> {
    let Origin::Line(i) = origin else {
        return None;
    };
    let a = &model.checks[*i].applies;
    if *a == crate::model::Applies::default() {
        return None;
    }
    Some(Under {
        combinations: a.combinations.as_ref().map(|c| {
            c.iter()
                .map(|&k| model.combinations[k].name.as_str())
                .collect()
        }),
        state: a.state.map(|s| match s {
            crate::model::State::Short => "short_term",
            crate::model::State::Long => "long_term",
        }),
    })
}

#[derive(Serialize, JsonSchema)]
struct CheckOutcome<'a> {
    label: &'a str,
    kind: &'static str,
    /// Where a check line applies, when its `under` narrows it.
    #[serde(skip_serializing_if = "Option::is_none")]
    under: Option<Under<'a>>,
    combination: &'a str,
    #[serde(flatten)]
    verdict: Verdict,
    governing: bool,
}

/// A check's numbers and result, in every list of checks.
#[derive(Serialize, JsonSchema)]
struct Verdict {
    demand: f64,
    capacity: f64,
    /// The SI unit of demand and capacity (`Pa`, `N`, `m`; `1` for a ratio).
    unit: String,
    #[serde(skip_serializing_if = "Option::is_none")]
    utilization: Option<f64>,
    pass: bool,
}

impl From<&crate::checks::Outcome> for Verdict {
    fn from(o: &crate::checks::Outcome) -> Self {
        Verdict {
            demand: o.demand.value,
            capacity: o.capacity.value,
            unit: o.demand.dim.si_symbol(),
            utilization: o.utilization,
            pass: o.pass,
        }
    }
}

#[derive(Serialize, JsonSchema)]
struct Yielded<'a> {
    combination: &'a str,
    part: &'a str,
    stress_over_yield: f64,
}

#[derive(Serialize, JsonSchema)]
struct Capacity<'a> {
    combination: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    first_yield_factor: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    plastic_limit_factor: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    ratio: Option<f64>,
    sequence: Vec<YieldEvent<'a>>,
    #[serde(rename = "limit_forces_N")]
    limit_forces: Vec<PartForce<'a>>,
    #[serde(rename = "residual_forces_N")]
    residual_forces: Vec<PartForce<'a>>,
    note: &'a Option<String>,
}

#[derive(Serialize, JsonSchema)]
struct YieldEvent<'a> {
    part: &'a str,
    /// `yield` or `release` (a one-sense part letting go).
    event: &'static str,
    load_factor: f64,
    sense: &'static str,
}

#[derive(Serialize, JsonSchema)]
struct PartForce<'a> {
    part: &'a str,
    force_N: f64,
}

#[derive(Serialize, JsonSchema)]
struct LongTerm<'a> {
    combination: &'a str,
    note: &'a Option<String>,
    parts: Option<Vec<LongTermPart<'a>>>,
}

#[derive(Serialize, JsonSchema)]
struct LongTermPart<'a> {
    name: &'a str,
    short_term_force_N: f64,
    long_term_force_N: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    short_term_stress_Pa: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    long_term_stress_Pa: Option<f64>,
    /// A beam's long-term bending (as the combinations' `parts` give it).
    #[serde(skip_serializing_if = "Option::is_none")]
    long_term_bending: Option<BeamRecord>,
}

#[derive(Serialize, JsonSchema)]
struct LongTermCheck<'a> {
    label: &'a str,
    combination: &'a str,
    #[serde(flatten)]
    verdict: Verdict,
}

#[derive(Serialize, JsonSchema)]
struct Buckling<'a> {
    parts: Vec<&'a str>,
    effective_length_m: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    radius_of_gyration_m: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    slenderness: Option<f64>,
    euler_load_N: f64,
    max_compression_N: f64,
    combination: &'a str,
    warnings: Vec<crate::warning::Json>,
}

/// The JSON document for a solved file.
#[must_use]
pub fn document<'a>(file: &'a str, a: &'a crate::Analysis) -> Document<'a> {
    let (model, solution, checks) = (&a.model, &a.solution, &a.checks);
    let plane = model.kind == Kind::Plane;
    let combos = &solution.combinations;
    let combinations = combos
        .iter()
        .map(|r| Combination {
            name: &r.name,
            parts: Parts(model, r),
            nodes: Nodes(model, r),
            rigid_bodies: (plane && !model.rigids.is_empty()).then(|| {
                model
                    .rigids
                    .iter()
                    .zip(&r.rotations)
                    .map(|(b, t)| Rotation {
                        name: &b.name,
                        rotation_rad: *t,
                    })
                    .collect()
            }),
            equilibrium_residual: r.equilibrium_residual.value,
        })
        .collect();
    let mut governing = vec![false; checks.outcomes.len()];
    for k in checks.governing_indices() {
        governing[k] = true;
    }
    let check_values = checks
        .outcomes
        .iter()
        .zip(&governing)
        .map(|(o, &is_gov)| CheckOutcome {
            label: &o.label,
            under: under(model, &o.origin),
            kind: match o.origin {
                Origin::Line(_) => "check",
                Origin::Allowable(_) => "allowable",
                Origin::Buckling(_) => "buckling",
            },
            combination: &combos[o.combination].name,
            verdict: o.into(),
            governing: is_gov,
        })
        .collect();
    let yielded = checks
        .yielded
        .iter()
        .map(|(k, p, ratio)| Yielded {
            combination: &combos[*k].name,
            part: &model.parts[*p].name,
            stress_over_yield: *ratio,
        })
        .collect();
    let capacity = capacity(a);
    let long_term = long_term(a);
    let long_term_checks = a.long_term_checks.as_ref().map(|(lt, c)| {
        c.outcomes
            .iter()
            .map(|o| LongTermCheck {
                label: &o.label,
                combination: &lt.combinations[o.combination].name,
                verdict: o.into(),
            })
            .collect()
    });
    let buckling = a
        .buckling
        .iter()
        .map(|b| Buckling {
            parts: b
                .parts
                .iter()
                .map(|&i| model.parts[i].name.as_str())
                .collect(),
            effective_length_m: b.kl,
            radius_of_gyration_m: b.r,
            slenderness: b.slenderness(),
            euler_load_N: b.euler,
            max_compression_N: b.compression,
            combination: &combos[b.combination].name,
            warnings: b.warnings(model).into_iter().map(Into::into).collect(),
        })
        .collect();
    Document {
        schema_version: SCHEMA_VERSION,
        file,
        model: ModelSummary {
            kind: model.kind.name(),
            nodes: model.nodes.len(),
            parts: model.parts.len(),
            unknowns: solution.unknowns,
        },
        combinations,
        checks: check_values,
        yielded,
        capacity,
        long_term,
        long_term_checks,
        buckling,
        warnings: solution
            .warnings
            .iter()
            .cloned()
            .chain(checks.beyond_yield(model, solution))
            .map(Into::into)
            .collect(),
        left_out: &a.left_out,
        sensitivity: a.sensitivity.as_ref().map(sensitivity_json),
    }
}

/// The same document as a JSON value (for comparing two documents).
#[must_use]
pub fn solution_json(file: &str, a: &crate::Analysis) -> Value {
    serde_json::to_value(document(file, a)).unwrap_or(Value::Null)
}

/// Each combination's capacity path: events, and the forces at the limit.
fn capacity<'a>(a: &'a crate::Analysis) -> Vec<Capacity<'a>> {
    let (model, combos) = (&a.model, &a.solution.combinations);
    let forces = |list: &'a [f64]| -> Vec<PartForce<'a>> {
        model
            .parts
            .iter()
            .zip(list)
            .map(|(p, f)| PartForce {
                part: &p.name,
                force_N: *f,
            })
            .collect()
    };
    a.capacity
        .iter()
        .map(|c| Capacity {
            combination: &combos[c.combination].name,
            first_yield_factor: c.first_yield,
            plastic_limit_factor: c.limit,
            ratio: c.first_yield.zip(c.limit).map(|(y, l)| l / y),
            sequence: c
                .events
                .iter()
                .map(|e| YieldEvent {
                    part: &model.parts[e.part].name,
                    event: if e.released { "release" } else { "yield" },
                    load_factor: e.lambda,
                    sense: if e.tension { "tension" } else { "compression" },
                })
                .collect(),
            limit_forces: forces(&c.limit_forces),
            residual_forces: forces(&c.residual),
            note: &c.note,
        })
        .collect()
}

/// Each combination's long-term state, part by part beside the short term.
fn long_term(a: &crate::Analysis) -> Vec<LongTerm<'_>> {
    let (model, combos) = (&a.model, &a.solution.combinations);
    a.long_term
        .iter()
        .map(|l| {
            let short = &combos[l.combination];
            LongTerm {
                combination: &short.name,
                note: &l.note,
                parts: l.result.as_ref().map(|r| {
                    model
                        .parts
                        .iter()
                        .enumerate()
                        .map(|(i, p)| LongTermPart {
                            name: &p.name,
                            short_term_force_N: short.parts[i].force.value,
                            long_term_force_N: r.parts[i].force.value,
                            short_term_stress_Pa: short.parts[i].stress.map(|s| s.value),
                            long_term_stress_Pa: r.parts[i].stress.map(|s| s.value),
                            long_term_bending: r.beam(i).map(BeamRecord::of),
                        })
                        .collect()
                }),
            }
        })
        .collect()
}

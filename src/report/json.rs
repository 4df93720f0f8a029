//! Machine output of `tandem solve --json`: SI base units, keys carry the unit.

use serde_json::{json, Map, Value};

use crate::checks::Origin;
use crate::model::Kind;

/// The JSON document for a solved file.
pub fn solution_json(file: &str, a: &crate::Analysis) -> Value {
    let (model, solution, checks) = (&a.model, &a.solution, &a.checks);
    let plane = model.kind == Kind::Plane;
    let combos: Vec<Value> = solution
        .combinations
        .iter()
        .map(|r| {
            let parts: Vec<Value> = model
                .parts
                .iter()
                .zip(&r.parts)
                .map(|(p, pr)| {
                    json!({
                        "name": p.name,
                        "force_N": pr.force.value,
                        "stress_Pa": pr.stress.map(|s| s.value),
                        "strain": pr.strain,
                        "elongation_m": pr.elongation.value,
                        "state": pr.state.name(),
                    })
                })
                .collect();
            let nodes: Vec<Value> = model
                .nodes
                .iter()
                .zip(&r.nodes)
                .map(|(n, nr)| {
                    if plane {
                        json!({
                            "name": n.name,
                            "displacement_m": [nr.displacement[0].value, nr.displacement[1].value],
                            "reaction_N": [nr.reaction[0].value, nr.reaction[1].value],
                        })
                    } else {
                        json!({
                            "name": n.name,
                            "displacement_m": nr.displacement[0].value,
                            "reaction_N": nr.reaction[0].value,
                        })
                    }
                })
                .collect();
            let mut m = Map::new();
            m.insert("name".into(), json!(r.name));
            m.insert("parts".into(), Value::Array(parts));
            m.insert("nodes".into(), Value::Array(nodes));
            if plane && !model.rigids.is_empty() {
                let rot: Vec<Value> = model
                    .rigids
                    .iter()
                    .zip(&r.rotations)
                    .map(|(b, t)| json!({"name": b.name, "rotation_rad": t}))
                    .collect();
                m.insert("rigid_bodies".into(), Value::Array(rot));
            }
            m.insert(
                "equilibrium_residual_N".into(),
                json!(r.equilibrium_residual.value),
            );
            Value::Object(m)
        })
        .collect();
    let governing: std::collections::HashSet<usize> =
        checks.governing_indices().into_iter().collect();
    let check_values: Vec<Value> = checks
        .outcomes
        .iter()
        .enumerate()
        .map(|(k, o)| {
            let is_gov = governing.contains(&k);
            json!({
                "label": o.label,
                "kind": match o.origin { Origin::Line(_) => "check", Origin::Allowable(_) => "allowable" },
                "combination": solution.combinations[o.combination].name,
                "demand": o.demand.value,
                "capacity": o.capacity.value,
                "utilization": o.utilization,
                "pass": o.pass,
                "governing": is_gov,
            })
        })
        .collect();
    let yielded: Vec<Value> = checks
        .yielded
        .iter()
        .map(|(k, p, ratio)| {
            json!({
                "combination": solution.combinations[*k].name,
                "part": model.parts[*p].name,
                "stress_over_yield": ratio,
            })
        })
        .collect();
    let capacity: Vec<Value> = a
        .capacity
        .iter()
        .map(|c| {
            json!({
                "combination": solution.combinations[c.combination].name,
                "first_yield_factor": c.first_yield,
                "plastic_limit_factor": c.limit,
                "ratio": c.first_yield.zip(c.limit).map(|(y, l)| l / y),
                "sequence": c.events.iter().map(|e| json!({
                    "part": model.parts[e.part].name,
                    "load_factor": e.lambda,
                    "sense": if e.tension { "tension" } else { "compression" },
                })).collect::<Vec<_>>(),
                "limit_forces_N": model.parts.iter().zip(&c.limit_forces).map(|(p, f)| json!({"part": p.name, "force_N": f})).collect::<Vec<_>>(),
                "residual_forces_N": model.parts.iter().zip(&c.residual).map(|(p, f)| json!({"part": p.name, "force_N": f})).collect::<Vec<_>>(),
                "note": c.note,
            })
        })
        .collect();
    let long_term: Vec<Value> = a
        .long_term
        .iter()
        .map(|l| {
            let short = &solution.combinations[l.combination];
            json!({
                "combination": short.name,
                "note": l.note,
                "parts": l.result.as_ref().map(|r| model.parts.iter().enumerate().map(|(i, p)| json!({
                    "name": p.name,
                    "short_term_force_N": short.parts[i].force.value,
                    "long_term_force_N": r.parts[i].force.value,
                    "short_term_stress_Pa": short.parts[i].stress.map(|s| s.value),
                    "long_term_stress_Pa": r.parts[i].stress.map(|s| s.value),
                })).collect::<Vec<_>>()),
            })
        })
        .collect();
    let buckling: Vec<Value> = a
        .buckling
        .iter()
        .map(|b| {
            json!({
                "parts": b.parts.iter().map(|&i| model.parts[i].name.clone()).collect::<Vec<_>>(),
                "effective_length_m": b.kl,
                "radius_of_gyration_m": b.r,
                "slenderness": b.slenderness(),
                "euler_load_N": b.euler,
                "max_compression_N": b.compression,
                "combination": solution.combinations[b.combination].name,
                "warnings": b.warnings(model),
            })
        })
        .collect();
    json!({
        "file": file,
        "model": {
            "kind": model.kind.name(),
            "nodes": model.nodes.len(),
            "parts": model.parts.len(),
            "unknowns": solution.unknowns,
        },
        "combinations": combos,
        "checks": check_values,
        "yielded": yielded,
        "capacity": capacity,
        "long_term": long_term,
        "long_term_checks": a.long_term_checks.as_ref().map(|(lt, c)| c.outcomes.iter().map(|o| json!({
            "label": o.label,
            "combination": lt.combinations[o.combination].name,
            "demand": o.demand.value,
            "capacity": o.capacity.value,
            "utilization": o.utilization,
            "pass": o.pass,
        })).collect::<Vec<_>>()),
        "buckling": buckling,
        "warnings": solution.warnings,
    })
}

//! Machine output of `tandem solve --json`: SI base units, keys carry the unit.

use serde_json::{json, Map, Value};

use crate::checks::{Checks, Origin};
use crate::model::{Kind, Model};
use crate::solve::Solution;

/// The JSON document for a solved file.
pub fn solution_json(file: &str, model: &Model, solution: &Solution, checks: &Checks) -> Value {
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
    let governing = checks.governing();
    let check_values: Vec<Value> = checks
        .outcomes
        .iter()
        .map(|o| {
            let is_gov = governing.iter().any(|g| std::ptr::eq(*g, o));
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
        "warnings": solution.warnings,
    })
}

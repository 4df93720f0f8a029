//! The capacity path drawn as a chart: the load factor λ against the
//! displacement of the node the loads move most, each event marked.

use super::{chart, Drawing};
use crate::model::Model;
use crate::report::display::{number, Display};

/// The capacity path as a chart: λ against the displacement of the node
/// the loads move most, each event marked; `None` when no path was traced.
#[must_use]
pub fn capacity_plot(
    model: &Model,
    c: &crate::solve::capacity::Capacity,
    d: &Display,
) -> Option<Drawing> {
    let node = c.path_node?;
    if c.path.len() < 2 {
        return None;
    }
    let u = &d.small;
    let points: Vec<(f64, f64)> = c.path.iter().map(|&(l, x)| (u.value(x), l)).collect();
    let marks = c
        .events
        .iter()
        .filter_map(|e| {
            let at = points
                .iter()
                .rev()
                .copied()
                .find(|p| (p.1 - e.lambda).abs() <= 1e-9 * e.lambda.abs().max(1.0))?;
            let sense = if e.tension { "tension" } else { "compression" };
            let what = if e.released {
                format!("{} lets go", model.parts[e.part].name)
            } else {
                format!("{} yields in {sense}", model.parts[e.part].name)
            };
            Some(chart::Mark {
                at,
                label: format!("{what}, λ = {}", number(e.lambda, d.digits)),
            })
        })
        .collect();
    let mut levels = Vec::new();
    if let Some(l) = c.limit {
        levels.push((l, format!("plastic limit, λ_p = {}", number(l, d.digits))));
    }
    let name = &model.combinations[c.combination].name;
    let node_name = &model.nodes[node].name;
    let caption = format!("Capacity path, combination {name}");
    let svg = chart::render(&chart::Chart {
        title: caption.clone(),
        x_label: format!(
            "displacement of node {node_name} along its elastic movement ({})",
            u.name
        ),
        y_label: "load factor λ".into(),
        series: vec![chart::Series {
            label: format!("λ against the displacement of {node_name}"),
            points,
            off: Vec::new(),
        }],
        levels,
        marks,
        marks_label: "an event: a part yields or lets go".into(),
        y_min_top: 1.0,
    });
    Some(Drawing {
        suffix: format!("capacity.{name}.svg"),
        caption,
        svg,
    })
}

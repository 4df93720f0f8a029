//! A singular system worded: which node can move, in which direction.

#![allow(clippy::wildcard_imports)] // the solver's shared imports and helpers

use super::*;

/// The largest component of a free motion, in words.
pub(super) fn describe_unknown(
    model: &Model,
    map: &DofMap,
    index: usize,
) -> (String, &'static str, crate::source::Span, String) {
    let axis = |d: usize| match (model.kind, d) {
        (Kind::Axial, _) => String::new(),
        (Kind::Plane, 0) => " in x".into(),
        (Kind::Plane, _) => " in y".into(),
    };
    let fix_dir = |d: usize| match (model.kind, d) {
        (Kind::Axial, _) => String::new(),
        (Kind::Plane, 0) => " x".into(),
        (Kind::Plane, _) => " y".into(),
    };
    match &map.unknowns[index] {
        Unknown::Node(i, d) => {
            let n = &model.nodes[*i];
            (
                format!("node `{}`{}", n.name, axis(*d)),
                "move",
                n.span,
                format!(
                    "add a support (`fix {}{}`) or a part that holds node `{}`{}",
                    n.name,
                    fix_dir(*d),
                    n.name,
                    axis(*d)
                ),
            )
        }
        Unknown::Rotation(i) => {
            let n = &model.nodes[*i];
            (
                format!("node `{}`", n.name),
                "rotate",
                n.span,
                format!(
                    "hold it (`fix {} rotation`), or join another member that resists rotation at node `{}`",
                    n.name, n.name
                ),
            )
        }
        Unknown::Tie(i, d) => {
            let n = &model.nodes[*i];
            (
                format!("the nodes tied to `{}`{}", n.name, axis(*d)),
                "move",
                n.span,
                format!(
                    "add a support or a part that holds the tied nodes{}",
                    axis(*d)
                ),
            )
        }
        Unknown::Rigid(r, c) => {
            let body = &model.rigids[*r];
            let (what, moves) = match c {
                0 => (" in x", "move"),
                1 => (" in y", "move"),
                _ => ("", "rotate"),
            };
            (
                format!("rigid body `{}`{what}", body.name),
                moves,
                body.span,
                format!(
                    "support rigid body `{}` at another point, or add a part that holds it",
                    body.name
                ),
            )
        }
    }
}

pub(super) fn singular(model: &Model, map: &DofMap, index: usize, slack: &[usize]) -> SolveError {
    let (what, moves, span, help) = describe_unknown(model, map, index);
    let when = if slack.is_empty() {
        String::new()
    } else {
        let names: Vec<String> = slack
            .iter()
            .take(4)
            .map(|&i| format!("`{}`", model.parts[i].name))
            .collect();
        let more = if slack.len() > 4 { ", ..." } else { "" };
        let verb = if slack.len() == 1 { "goes" } else { "go" };
        format!(" once {}{more} {verb} slack", names.join(", "))
    };
    SolveError::Mechanism {
        what,
        moves,
        when,
        span,
        help: Some(help),
    }
}

/// The unknown that moves most in a free motion (rotations weighed by the
/// size of their body).
pub(super) fn dominant(model: &Model, map: &DofMap, mode: &[f64]) -> usize {
    let mut best = (0.0, 0usize);
    for (i, v) in mode.iter().enumerate() {
        let w = match &map.unknowns[i] {
            Unknown::Rigid(r, 2) => {
                let nodes = &model.rigids[*r].nodes;
                let x0 = model.nodes[nodes[0]].x.value;
                let y0 = model.nodes[nodes[0]].y.value;
                nodes
                    .iter()
                    .map(|&n| (model.nodes[n].x.value - x0).hypot(model.nodes[n].y.value - y0))
                    .fold(0.0, f64::max)
            }
            _ => 1.0,
        };
        let a = v.abs() * w;
        if a > best.0 {
            best = (a, i);
        }
    }
    best.1
}

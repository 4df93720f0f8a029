//! A revision diff written out: Markdown for a reviewer, JSON for tools.

#![allow(clippy::wildcard_imports)] // the comparison's types and imports

use super::*;

/// The checks that flipped (`flipped`) or the others, under a heading, as a
/// before-and-after table; nothing when there are none.
pub(super) fn check_changes_table(out: &mut String, heading: &str, diff: &Diff, flipped: bool) {
    let rows: Vec<&CheckChange> = diff
        .checks
        .iter()
        .filter(|c| c.flipped() == flipped)
        .collect();
    if rows.is_empty() {
        return;
    }
    out.push_str(&format!(
        "## {heading}\n\n| Check | Combination | Before | After |\n|---|---|---:|---:|\n"
    ));
    for c in rows {
        out.push_str(&format!(
            "| {} | `{}` | {} | {} |\n",
            c.label,
            c.combination,
            status(c.old),
            status(c.new)
        ));
    }
    out.push('\n');
}

pub(super) fn status(s: Option<(Option<f64>, bool)>) -> String {
    match s {
        None => "—".into(),
        Some((u, true)) => format!("{} pass", crate::report::utilization(u)),
        Some((u, false)) => format!("{} **FAIL**", crate::report::utilization(u)),
    }
}

/// The diff as Markdown.
pub fn markdown(diff: &Diff, display: &Display) -> String {
    let mut out = format!(
        "# Changes from `{}` to `{}`\n\n",
        diff.old_name, diff.new_name
    );
    let gov = |g: &Option<(f64, String, String)>| match g {
        Some((u, l, c)) => format!("{} ({l}, `{c}`)", crate::report::utilization(Some(*u))),
        None => "no checks".into(),
    };
    out.push_str(&format!(
        "**Governing utilization:** {} → {}\n\n",
        gov(&diff.governing[0]),
        gov(&diff.governing[1])
    ));
    let fails = diff.newly_failing();
    if fails > 0 {
        out.push_str(&format!(
            "**{fails} check{} that passed now fail{}.**\n\n",
            if fails == 1 { "" } else { "s" },
            if fails == 1 { "s" } else { "" }
        ));
    }
    check_changes_table(&mut out, "Checks that changed status", diff, true);
    out.push_str("## Inputs changed\n\n");
    if diff.inputs.is_empty() {
        out.push_str("No input changed.\n\n");
    } else {
        out.push_str("| Input | Before | After |\n|---|---|---|\n");
        for c in &diff.inputs {
            let cell =
                |s: &Option<String>| s.clone().unwrap_or_else(|| "—".into()).replace('|', "\\|");
            out.push_str(&format!(
                "| {} | {} | {} |\n",
                c.what,
                cell(&c.old),
                cell(&c.new)
            ));
        }
        out.push('\n');
    }
    if !diff.added.is_empty() || !diff.removed.is_empty() {
        out.push_str("## Parts and nodes added or removed\n\n");
        for a in &diff.added {
            out.push_str(&format!("- {a} added\n"));
        }
        for r in &diff.removed {
            out.push_str(&format!("- {r} removed\n"));
        }
        out.push('\n');
    }
    out.push_str(&format!(
        "## Results changed by more than {} %\n\n",
        number(diff.min_change, 3)
    ));
    if diff.results.is_empty() {
        out.push_str("No result changed by more than the threshold.\n\n");
    } else {
        let mut combos: Vec<&str> = Vec::new();
        for r in &diff.results {
            if !combos.contains(&r.combination.as_str()) {
                combos.push(&r.combination);
            }
        }
        for c in combos {
            out.push_str(&format!("### Combination `{c}`\n\n| Result | Before | After | Change in size |\n|---|---:|---:|---:|\n"));
            for r in diff.results.iter().filter(|r| r.combination == c) {
                out.push_str(&format!(
                    "| {} | {} | {} | {} |\n",
                    r.what,
                    display.quantity(r.old),
                    display.quantity(r.new),
                    match r.percent {
                        Some(p) => format!("{}{} %", if p > 0.0 { "+" } else { "" }, number(p, 3)),
                        None if r.reversed => "reverses".into(),
                        None => "was zero".into(),
                    }
                ));
            }
            out.push('\n');
        }
    }
    check_changes_table(&mut out, "Utilization changed", diff, false);
    out.trim_end().to_string() + "\n"
}

/// The diff as JSON (SI values).
pub fn json(diff: &Diff) -> Value {
    // a utilization that does not exist (capacity not positive) is left out
    let util = |u: Option<f64>, mut v: Value| {
        if let Some(u) = u.filter(|u| u.is_finite()) {
            v["utilization"] = json!(u);
        }
        v
    };
    let side = |s: Option<(Option<f64>, bool)>| s.map(|(u, p)| util(u, json!({"pass": p})));
    json!({
        "old": diff.old_name,
        "new": diff.new_name,
        "governing_utilization": diff.governing.iter().map(|g| g.as_ref().map(|(u, l, c)| util(Some(*u), json!({"check": l, "combination": c})))).collect::<Vec<_>>(),
        "newly_failing": diff.newly_failing(),
        "inputs": diff.inputs.iter().map(|c| json!({"input": c.what, "old": c.old, "new": c.new})).collect::<Vec<_>>(),
        "added": diff.added,
        "removed": diff.removed,
        "results": diff.results.iter().map(|r| json!({"combination": r.combination, "result": r.what, "old_si": r.old.value, "new_si": r.new.value, "change_percent": r.percent, "reversed": r.reversed})).collect::<Vec<_>>(),
        "checks": diff.checks.iter().map(|c| json!({"label": c.label, "combination": c.combination, "old": side(c.old), "new": side(c.new)})).collect::<Vec<_>>(),
    })
}

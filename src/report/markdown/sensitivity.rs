//! "What the result depends on": each input's influence on the governing
//! utilization and on each check's, most influential first, with how it
//! was computed.

#![allow(clippy::wildcard_imports)] // the report's shared imports and helpers

use super::*;
use crate::review::sensitivity::Method;

/// At most this many inputs get a column in the table of checks.
const COLUMNS: usize = 6;

/// An influence as the tables show it: an elasticity to 3 decimals, or a
/// derivative per display unit for an input whose value is zero.
fn influence(
    f: &Fmt<'_>,
    e: Option<f64>,
    method: Option<Method>,
    value: crate::units::Quantity,
) -> String {
    match (e, method) {
        (None, _) => "—".into(),
        (Some(e), Some(Method::Absolute { .. })) => match f.d.unit_for(value.dim) {
            Some(u) => format!("{} per {}", number(e * u.factor, f.d.digits), u.name),
            None => format!("{} per {}", number(e, f.d.digits), value.dim.si_symbol()),
        },
        (Some(e), _) => format!("{}{:.3}", if e > 0.0 { "+" } else { "" }, e + 0.0),
    }
}

pub(super) fn sensitivity_section(doc: &mut Doc, f: &Fmt<'_>, a: &crate::Analysis) {
    let Some(s) = &a.sensitivity else {
        return;
    };
    doc.h(2, "What the result depends on");
    if let Some(note) = &s.note {
        doc.p(&format!("Sensitivity {note}."));
        return;
    }
    if s.inputs.is_empty() {
        doc.p("No `let` reaches the solve or a check.");
        return;
    }
    doc.p("Each design quantity (`let`) that reaches the solve or a check, most influential first, with the elasticity of the governing utilization, (dU/U)/(dx/x) at the values of this calculation: +1.000 means the utilization rises 1 % for 1 % more of the input, −1.000 that it falls 1 %. For an input whose value is zero, dU/dx per unit instead. Each is computed by re-solving with the one input moved above and below its value, the others held.");
    let rows: Vec<Vec<String>> = s
        .inputs
        .iter()
        .map(|i| {
            vec![
                format!("`{}`", i.name),
                // as the inputs section shows the `let`
                a.model
                    .lets
                    .iter()
                    .find(|l| l.name == i.name)
                    .map_or_else(|| f.d.quantity(i.value), |l| super::inputs::shown(f, l)),
                influence(f, i.governing, i.method, i.value),
                match (&i.failed, i.method) {
                    (Some(why), _) => format!("not evaluated: {}", text(why)),
                    (None, Some(m)) => m.words(),
                    (None, None) => "—".into(),
                },
            ]
        })
        .collect();
    doc.table(
        &["Input", "Value", "Governing utilization", "How computed"],
        &rows,
        &[2],
    );
    if s.labels.is_empty() {
        return;
    }
    let shown: Vec<&crate::review::sensitivity::Input> = s.inputs.iter().take(COLUMNS).collect();
    doc.p(&format!(
        "Influence on each check's utilization{}:",
        if s.inputs.len() > COLUMNS {
            format!(" (the {COLUMNS} most influential inputs; `solve --json` gives every one)")
        } else {
            String::new()
        }
    ));
    let mut head = vec!["Check".to_string()];
    head.extend(shown.iter().map(|i| format!("`{}`", i.name)));
    let rows: Vec<Vec<String>> = s
        .labels
        .iter()
        .enumerate()
        .map(|(k, label)| {
            let mut row = vec![text(label)];
            row.extend(
                shown
                    .iter()
                    .map(|i| influence(f, i.checks.get(k).copied().flatten(), i.method, i.value)),
            );
            row
        })
        .collect();
    let head: Vec<&str> = head.iter().map(String::as_str).collect();
    let right: Vec<usize> = (1..=shown.len()).collect();
    doc.table(&head, &rows, &right);
}

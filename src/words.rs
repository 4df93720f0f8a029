//! Wording helpers every stage uses, and which depend on nothing else:
//! "did you mean" for a misspelled name, and numbers to significant figures.

/// A "did you mean `x`?" hint for a misspelled name, when one is close.
pub fn did_you_mean<'a>(
    name: &str,
    candidates: impl IntoIterator<Item = &'a str>,
) -> Option<String> {
    let mut best: Option<(f64, &str)> = None;
    let slack = (name.len() / 3).max(2);
    for c in candidates {
        // Names much longer or shorter are neither typos nor close.
        if c.len().abs_diff(name.len()) > slack {
            continue;
        }
        let score = strsim::jaro_winkler(name, c);
        // An edit or two is a typo only in a name long enough to carry it.
        let close = name.len() >= 3
            && strsim::damerau_levenshtein(name, c) <= (name.len().max(c.len()) / 3).max(1);
        if ((score > 0.85 && name.len() >= 2) || close) && best.is_none_or(|(s, _)| score > s) {
            best = Some((score, c));
        }
    }
    best.map(|(_, c)| format!("did you mean `{c}`?"))
}

/// Format with `digits` significant figures, in plain decimal notation for
/// everyday magnitudes and scientific notation outside them.
pub fn number(v: f64, digits: usize) -> String {
    if !v.is_finite() {
        return if v.is_nan() {
            "—".into()
        } else {
            "∞".into()
        };
    }
    if v == 0.0 {
        return "0".into();
    }
    let digits = digits.clamp(1, 15);
    let mag = v.abs().log10().floor();
    if !(-6.0..9.0).contains(&mag) {
        let s = format!("{:.*e}", digits - 1, v);
        return s;
    }
    // `mag` is within -6..9 here, so the conversion is exact
    #[allow(clippy::cast_possible_truncation)]
    let mag = mag as i32;
    let sig = i32::try_from(digits).unwrap_or(4);
    // v ≈ n · 10^-p with n a whole number of `sig` digits (at most 15, so
    // exact in an i64), printed from its digits: exact-precision float
    // formatting is slow for the millions of numbers of a large report.
    let p = sig - 1 - mag;
    #[allow(clippy::cast_possible_truncation)]
    let mut n = (v * 10f64.powi(p)).round() as i64;
    let mut p = p;
    // rounding may carry into the next decade (9.9996 -> 10.00): one
    // decimal fewer
    if n.unsigned_abs() >= 10u64.pow(sig.unsigned_abs()) && p > 0 {
        n /= 10;
        p -= 1;
    }
    if n == 0 {
        return "0".into();
    }
    let mut s = String::with_capacity(24);
    if n < 0 {
        s.push('-');
    }
    let body = n.unsigned_abs().to_string();
    if p <= 0 {
        s.push_str(&body);
        for _ in 0..(-p) {
            s.push('0');
        }
    } else {
        let p = p.unsigned_abs() as usize;
        if body.len() > p {
            s.push_str(&body[..body.len() - p]);
            s.push('.');
            s.push_str(&body[body.len() - p..]);
        } else {
            s.push_str("0.");
            for _ in 0..p - body.len() {
                s.push('0');
            }
            s.push_str(&body);
        }
    }
    s
}

/// At most this many diagnostics are drawn; the count of the rest follows.
pub const MAX_SHOWN: usize = 50;

/// The columns a text takes in a terminal or a monospaced table: a CJK
/// character two, a combining mark none (Unicode's East Asian Width).
#[must_use]
pub fn width(s: &str) -> usize {
    unicode_width::UnicodeWidthStr::width(s)
}

//! Numbers for people: the one place that turns a value into the text a
//! page, the report, the CLI table or a CSV shows. Imports nothing from the
//! crate, so every layer may call it.

/// What a page, the report or a signed figure shows for a missing value.
pub const MISSING: &str = "–";

fn digits(x: f64, decimals: usize) -> String {
    format!("{x:.decimals$}")
}

/// `v` with `decimals` places; "–" when missing or not finite; a value
/// that rounds to zero never shows a minus sign ("0.00", not "-0.00").
pub fn fixed(v: Option<f64>, decimals: usize) -> String {
    Fixed(v, decimals).to_string()
}

/// [`fixed`] written where it is displayed, with no `String` of its own (a
/// page writes thousands of them).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fixed(pub Option<f64>, pub usize);

impl std::fmt::Display for Fixed {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let (Some(x), decimals) = (self.0, self.1) else { return f.write_str(MISSING) };
        if !x.is_finite() {
            return f.write_str(MISSING);
        }
        let mut b = Stack::default();
        if std::fmt::Write::write_fmt(&mut b, format_args!("{x:.decimals$}")).is_err() {
            // Longer than the stack buffer: through a `String`.
            let s = digits(x, decimals);
            return f.write_str(if s.starts_with('-') && s.trim_start_matches(['-', '0', '.']).is_empty() { &s[1..] } else { &s });
        }
        let s = b.as_str();
        f.write_str(if s.starts_with('-') && s.trim_start_matches(['-', '0', '.']).is_empty() { &s[1..] } else { s })
    }
}

/// [`signed`] with no unit, written where it is displayed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Signed(pub Option<f64>, pub usize);

impl std::fmt::Display for Signed {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self.0 {
            Some(x) if x.is_finite() => write!(f, "{x:+.*}", self.1),
            _ => f.write_str(MISSING),
        }
    }
}

/// A few dozen bytes of text on the stack (`Fixed` looks at its digits
/// before writing them).
struct Stack {
    buf: [u8; 64],
    len: usize,
}

impl Default for Stack {
    fn default() -> Stack {
        Stack { buf: [0; 64], len: 0 }
    }
}

impl Stack {
    fn as_str(&self) -> &str {
        std::str::from_utf8(&self.buf[..self.len]).unwrap_or_default()
    }
}

impl std::fmt::Write for Stack {
    fn write_str(&mut self, s: &str) -> std::fmt::Result {
        let end = self.len + s.len();
        if end > self.buf.len() {
            return Err(std::fmt::Error);
        }
        self.buf[self.len..end].copy_from_slice(s.as_bytes());
        self.len = end;
        Ok(())
    }
}

/// `v` with `decimals` places and its sign as computed (a tiny negative
/// value reads "-0.00"); `missing` when missing or not finite. The report
/// and the CLI table use it.
pub fn as_computed(v: Option<f64>, decimals: usize, missing: &str) -> String {
    match v {
        Some(x) if x.is_finite() => digits(x, decimals),
        _ => missing.to_string(),
    }
}

/// The report's form: [`as_computed`] with "–" for missing.
pub fn fmt_metric(v: Option<f64>, decimals: usize) -> String {
    as_computed(v, decimals, MISSING)
}

/// The CSV form: `decimals` places, sign as computed, empty when missing
/// or not finite.
pub fn plain(v: Option<f64>, decimals: usize) -> String {
    as_computed(v, decimals, "")
}

/// A whole number with thousands separators: 1204 → "1,204" (load
/// reports, the report's counts, the calibration page).
pub fn thousands(n: usize) -> String {
    let s = n.to_string();
    let mut out = String::new();
    for (i, ch) in s.chars().enumerate() {
        if i > 0 && (s.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(ch);
    }
    out
}

/// A whole number (a count, a percentile): [`fixed`] with no decimals.
pub fn count(v: Option<f64>) -> String {
    fixed(v, 0)
}

/// A value already in percent units with a "%" after it ("41.7%"); "–"
/// alone when missing.
pub fn percent(v: Option<f64>, decimals: usize) -> String {
    match v {
        Some(x) if x.is_finite() => format!("{}%", fixed(Some(x), decimals)),
        _ => MISSING.to_string(),
    }
}

/// A change, always with its sign ("+0.37", "-1.20") and `unit` after it
/// ("%", " pts of WP"); "–" alone when missing or not finite.
pub fn signed(v: Option<f64>, decimals: usize, unit: &str) -> String {
    match v {
        Some(x) if x.is_finite() => format!("{}{unit}", Signed(v, decimals)),
        _ => MISSING.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// `Fixed` and `Signed` write what `fixed` and `signed` give by way of
    /// `format!`, for values around rounding edges, tiny negatives, huge
    /// values (past the stack buffer) and the missing ones.
    #[test]
    fn the_displayed_forms_write_the_same_text() {
        let xs = [0.0, -0.0, 0.125, -0.125, 0.0049, -0.0049, -0.0051, 2.5, -2.5, 1e-12, -1e-12, 83.81769857834946, -3.7, 1e300, -1e300, f64::NAN, f64::INFINITY];
        for d in 0..5 {
            for &x in &xs {
                let old = if !x.is_finite() {
                    MISSING.to_string()
                } else {
                    let s = format!("{x:.d$}");
                    if s.starts_with('-') && s.trim_start_matches(['-', '0', '.']).is_empty() { s[1..].to_string() } else { s }
                };
                assert_eq!(Fixed(Some(x), d).to_string(), old, "{x} {d}");
                let old_signed = if x.is_finite() { format!("{x:+.d$}") } else { MISSING.to_string() };
                assert_eq!(Signed(Some(x), d).to_string(), old_signed, "{x} {d}");
            }
            assert_eq!(Fixed(None, d).to_string(), MISSING);
            assert_eq!(Signed(None, d).to_string(), MISSING);
        }
        assert_eq!(fixed(Some(-0.0001), 2), "0.00");
        assert_eq!(signed(Some(0.3712), 2, "%"), "+0.37%");
    }

    #[test]
    fn thousands_are_grouped() {
        assert_eq!(thousands(3204), "3,204");
        assert_eq!(thousands(999), "999");
        assert_eq!(thousands(0), "0");
        assert_eq!(thousands(1_234_567), "1,234,567");
    }

    #[test]
    fn fixed_rounds_and_never_shows_negative_zero() {
        assert_eq!(fixed(Some(0.125), 2), "0.12"); // 0.125 is exact in binary: ties go to even
        assert_eq!(fixed(Some(0.375), 2), "0.38");
        assert_eq!(fixed(Some(2.0 / 3.0), 3), "0.667");
        assert_eq!(fixed(Some(-1.005), 1), "-1.0");
        assert_eq!(fixed(Some(-0.004), 2), "0.00");
        assert_eq!(fixed(Some(-0.0), 1), "0.0");
        assert_eq!(fixed(Some(-0.4), 0), "0");
        assert_eq!(fixed(Some(-0.006), 2), "-0.01");
        assert_eq!(fixed(Some(-12.5), 0), "-12");
        assert_eq!(fixed(Some(1234.5678), 1), "1234.6");
    }

    #[test]
    fn missing_and_non_finite_read_as_a_dash_or_empty() {
        for v in [None, Some(f64::NAN), Some(f64::INFINITY), Some(f64::NEG_INFINITY)] {
            assert_eq!(fixed(v, 2), "–");
            assert_eq!(fmt_metric(v, 2), "–");
            assert_eq!(plain(v, 2), "");
            assert_eq!(as_computed(v, 3, "-"), "-");
            assert_eq!(count(v), "–");
            assert_eq!(percent(v, 1), "–");
            assert_eq!(signed(v, 2, "%"), "–");
        }
    }

    #[test]
    fn the_report_csv_and_cli_forms_keep_the_sign_as_computed() {
        assert_eq!(fmt_metric(Some(-0.1234), 3), "-0.123");
        assert_eq!(fmt_metric(Some(-0.0001), 2), "-0.00");
        assert_eq!(plain(Some(-0.0001), 2), "-0.00");
        assert_eq!(plain(Some(0.23456), 4), "0.2346");
        assert_eq!(plain(Some(17.0), 0), "17");
        assert_eq!(as_computed(Some(0.4567), 3, "-"), "0.457");
    }

    #[test]
    fn counts_percents_and_signed_changes() {
        assert_eq!(count(Some(42.0)), "42");
        assert_eq!(count(Some(87.5)), "88");
        assert_eq!(count(Some(86.5)), "86"); // ties to even
        assert_eq!(percent(Some(41.666), 1), "41.7%");
        assert_eq!(percent(Some(-0.01), 1), "0.0%");
        assert_eq!(signed(Some(0.37), 2, ""), "+0.37");
        assert_eq!(signed(Some(-1.2), 2, ""), "-1.20");
        assert_eq!(signed(Some(0.0), 2, ""), "+0.00");
        assert_eq!(signed(Some(0.0123 * 100.0), 1, "%"), "+1.2%");
        assert_eq!(signed(Some(-0.045 * 100.0), 1, " pts of WP"), "-4.5 pts of WP");
    }
}

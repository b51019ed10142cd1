//! One parameter's value, read and written back: ranges (`A..B`), lists,
//! clock times (m:ss or seconds), yard lines in coaching notation (-35 own
//! half, +20 opponent's half), percentages and names. Each `show_*` writes
//! what its `parse_*` reads, so links round-trip exactly.

use super::{Range, SituationError};

pub(crate) fn err(param: &str, value: &str, reason: impl Into<String>) -> SituationError {
    SituationError { param: param.to_string(), value: value.to_string(), reason: reason.into() }
}

/// A number as short as it can be written and read back identically.
pub fn num(v: f64) -> String {
    if v.fract() == 0.0 && v.abs() < 1e15 {
        format!("{}", v as i64)
    } else {
        format!("{v}")
    }
}

/// How the ends of one kind of range are read and written.
pub struct Scale {
    pub read: fn(&str) -> Result<f64, String>,
    pub show: fn(f64) -> String,
    pub min: f64,
    pub max: f64,
    /// A span of the field: the two ends may come in either order.
    pub either_order: bool,
}

pub fn read_number(s: &str) -> Result<f64, String> {
    match s.trim().parse::<f64>() {
        Ok(v) if v.is_finite() && v.abs() < 1e9 => Ok(v),
        _ => Err(format!("'{}' is not a number", s.trim())),
    }
}

/// Plain numbers within [min, max].
pub const fn plain(min: f64, max: f64) -> Scale {
    Scale { read: read_number, show: num, min, max, either_order: false }
}

/// `m:ss` or whole seconds.
pub fn read_clock(s: &str) -> Result<f64, String> {
    let t = s.trim();
    let digits = |x: &str| !x.is_empty() && x.len() <= 5 && x.bytes().all(|b| b.is_ascii_digit());
    let bad = || format!("'{t}' is not a clock time; write m:ss (2:00) or seconds (120)");
    match t.split_once(':') {
        Some((m, sec)) => {
            if !digits(m) || sec.len() != 2 || !digits(sec) {
                return Err(bad());
            }
            let (m, sec): (u32, u32) = (m.parse().map_err(|_| bad())?, sec.parse().map_err(|_| bad())?);
            if sec >= 60 {
                return Err(format!("'{t}': seconds go up to 59"));
            }
            Ok((m * 60 + sec) as f64)
        }
        None if digits(t) => t.parse::<u32>().map(|x| x as f64).map_err(|_| bad()),
        None => Err(bad()),
    }
}

pub fn show_clock(secs: f64) -> String {
    let s = secs.max(0.0) as i64;
    format!("{}:{:02}", s / 60, s % 60)
}

/// Seconds left, up to `max`, written as m:ss.
pub const fn clock(max: f64) -> Scale {
    Scale { read: read_clock, show: show_clock, min: 0.0, max, either_order: false }
}

/// A yard line: `-35` (own half), `+20` (opponent's half), `50`, or a plain
/// 1-99 counted from the offense's own goal line. Stored as 1-99.
pub fn read_yard_line(s: &str) -> Result<f64, String> {
    let t = s.trim();
    let bad = || format!("'{t}' is not a yard line; write -35 (own half), +20 (opponent's half), 50, or 1-99 from own goal");
    let (side, digits) = match t.strip_prefix('-') {
        Some(r) => (-1, r),
        None => match t.strip_prefix('+') {
            Some(r) => (1, r),
            None => (0, t),
        },
    };
    if digits.is_empty() || digits.len() > 3 || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return Err(bad());
    }
    let n: i32 = digits.parse().map_err(|_| bad())?;
    let b = match side {
        -1 if (1..=50).contains(&n) => n,
        1 if (1..=50).contains(&n) => 100 - n,
        0 if (1..=99).contains(&n) => n,
        _ => return Err(format!("'{t}' is off the field; a half runs 1-50 (-1..-50 own, +50..+1 opponent's), a plain yard line 1-99")),
    };
    Ok(b as f64)
}

/// Own 35 → "-35", opponent's 20 → "+20", midfield → "50".
pub fn show_yard_line(b: f64) -> String {
    let b = b as i64;
    match b {
        50 => "50".to_string(),
        b if b < 50 => format!("-{b}"),
        b => format!("+{}", 100 - b),
    }
}

pub const YARD_LINE: Scale = Scale { read: read_yard_line, show: show_yard_line, min: 1.0, max: 99.0, either_order: true };

/// `A..B`, `A..`, `..B` or a single `A`, read with `scale`.
pub fn parse_range(param: &str, v: &str, scale: &Scale) -> Result<Range, SituationError> {
    let t = v.trim();
    if t.is_empty() {
        return Err(err(param, v, "empty; expected a range like 3..10"));
    }
    let read = |s: &str| (scale.read)(s).map_err(|reason| err(param, v, reason));
    let mut r = match t.find("..") {
        Some(pos) => {
            let (a, b) = (&t[..pos], &t[pos + 2..]);
            let lo = if a.trim().is_empty() { None } else { Some(read(a)?) };
            let hi = if b.trim().is_empty() { None } else { Some(read(b)?) };
            Range { lo, hi }
        }
        None => {
            let x = read(t)?;
            Range { lo: Some(x), hi: Some(x) }
        }
    };
    if let (Some(lo), Some(hi)) = (r.lo, r.hi) {
        if lo > hi {
            if !scale.either_order {
                return Err(err(param, v, "lower bound above upper"));
            }
            r = Range { lo: Some(hi), hi: Some(lo) };
        }
    }
    for b in [r.lo, r.hi].into_iter().flatten() {
        if b < scale.min || b > scale.max {
            return Err(err(param, v, format!("{} is outside {}..{}", (scale.show)(b), (scale.show)(scale.min), (scale.show)(scale.max))));
        }
    }
    Ok(r)
}

pub fn show_range(r: &Range, show: fn(f64) -> String) -> String {
    let f = |v: Option<f64>| v.map(show).unwrap_or_default();
    if r.lo.is_some() && r.lo == r.hi {
        f(r.lo)
    } else {
        format!("{}..{}", f(r.lo), f(r.hi))
    }
}

/// Percent kept to six decimals, so it reads back to the same number.
fn pct6(x: f64) -> f64 {
    (x * 1e6).round() / 1e6
}

/// A probability: percent with a `%` (`20..80%`, `20%..80%`) or a share
/// 0-1 without one (`0.2..0.8`). Stored as a share 0-1.
pub fn parse_probability(param: &str, v: &str) -> Result<Range, SituationError> {
    let percent = v.contains('%');
    let stripped: String = v.chars().filter(|c| *c != '%').collect();
    let scale = if percent { plain(0.0, 100.0) } else { plain(0.0, 1.0) };
    let r = parse_range(param, &stripped, &scale).map_err(|e| {
        if !percent && e.reason.contains("outside") {
            err(param, v, format!("{}; write a share 0-1 (0.2..0.8) or percent with % (20..80%)", e.reason))
        } else {
            err(param, v, e.reason)
        }
    })?;
    let to_share = |x: f64| if percent { pct6(x) / 100.0 } else { pct6(x * 100.0) / 100.0 };
    Ok(Range { lo: r.lo.map(to_share), hi: r.hi.map(to_share) })
}

/// A probability range in percent, e.g. `20..80%`.
pub fn show_probability(r: &Range) -> String {
    format!("{}%", show_range(r, |x| num(pct6(x * 100.0))))
}

/// A comma list of items read by `item`; `A..B` spans are allowed when
/// `span` can expand them. Sorted, without repeats; never empty.
pub fn parse_list<T: Ord + Copy>(
    param: &str,
    v: &str,
    item: impl Fn(&str) -> Result<T, String>,
    span: Option<&dyn Fn(T, T) -> Result<Vec<T>, String>>,
) -> Result<Vec<T>, SituationError> {
    let mut out = Vec::new();
    for part in v.split(',') {
        let p = part.trim();
        if p.is_empty() {
            continue;
        }
        match (p.split_once(".."), span) {
            (Some((a, b)), Some(expand)) => {
                let (a, b) = (item(a.trim()).map_err(|r| err(param, v, r))?, item(b.trim()).map_err(|r| err(param, v, r))?);
                if a > b {
                    return Err(err(param, v, "lower bound above upper"));
                }
                out.extend(expand(a, b).map_err(|r| err(param, v, r))?);
            }
            _ => out.push(item(p).map_err(|r| err(param, v, r))?),
        }
    }
    if out.is_empty() {
        return Err(err(param, v, "empty list"));
    }
    out.sort_unstable();
    out.dedup();
    Ok(out)
}

/// Whole numbers within [min, max], as a list (`3,4`, `2021..2023`).
pub fn parse_int_list(param: &str, v: &str, min: i32, max: i32) -> Result<Vec<i32>, SituationError> {
    let item = |p: &str| -> Result<i32, String> {
        let x: i32 = p.trim().parse().map_err(|_| format!("'{}' is not a whole number", p.trim()))?;
        if x < min || x > max {
            return Err(format!("{x} is outside {min}-{max}"));
        }
        Ok(x)
    };
    let span = |a: i32, b: i32| -> Result<Vec<i32>, String> { Ok((a..=b).collect()) };
    parse_list(param, v, item, Some(&span))
}

pub fn show_list<T>(v: &[T], show: impl Fn(&T) -> String) -> String {
    v.iter().map(show).collect::<Vec<_>>().join(",")
}

/// A name of 1-200 characters, trimmed.
pub fn parse_name(param: &str, v: &str) -> Result<String, SituationError> {
    let t = v.trim();
    if t.is_empty() || t.chars().count() > 200 {
        return Err(err(param, v, "expected a name of 1-200 characters"));
    }
    Ok(t.to_string())
}

/// Edit distance (insertions, deletions, substitutions) for "did you mean".
pub fn edit_distance(a: &str, b: &str) -> usize {
    let (a, b): (Vec<char>, Vec<char>) = (a.chars().collect(), b.chars().collect());
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.iter().enumerate() {
        let mut cur = vec![i + 1; b.len() + 1];
        for (j, cb) in b.iter().enumerate() {
            cur[j + 1] = (prev[j] + usize::from(ca != cb)).min(prev[j + 1] + 1).min(cur[j] + 1);
        }
        prev = cur;
    }
    prev[b.len()]
}

/// The candidate closest to `word` (ignoring case), if any is close enough
/// to be a likely slip: within a third of the longer word, at least 2 edits.
pub fn nearest<'a>(word: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    let w = word.to_lowercase();
    let mut best: Option<(usize, &str)> = None;
    for c in candidates {
        let lc = c.to_lowercase();
        let d = if lc.starts_with(&w) && w.len() >= 3 { 1 } else { edit_distance(&w, &lc) };
        if best.is_none_or(|(bd, _)| d < bd) {
            best = Some((d, c));
        }
    }
    let (d, c) = best?;
    let allowed = (w.chars().count().max(c.chars().count()) / 3).max(2);
    (d <= allowed).then_some(c)
}

//! Reading one of their cells in our notation: clocks (`12:34`, seconds,
//! `12:34 remaining`), periods (`1`-`4`, `Q4`, their overtime words), yard
//! lines (`OPP 35`/`own 20`, signed `-35`/`+20`, 1-99 from either goal line),
//! yes/no words and play-kind codes. Each reader says what it expected.

use super::Kind;

/// How their clock is written (seconds left in the period).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ClockForm {
    /// `12:34`
    MinSec,
    /// `754`
    Seconds,
    /// `12:34 remaining`
    Remaining,
}

impl ClockForm {
    pub const KEYS: &'static str = "\"m:ss\", \"seconds\" or \"m:ss remaining\"";
    pub fn parse(s: &str) -> Option<ClockForm> {
        match s.trim() {
            "m:ss" => Some(ClockForm::MinSec),
            "seconds" => Some(ClockForm::Seconds),
            "m:ss remaining" => Some(ClockForm::Remaining),
            _ => None,
        }
    }
    pub fn key(self) -> &'static str {
        match self {
            ClockForm::MinSec => "m:ss",
            ClockForm::Seconds => "seconds",
            ClockForm::Remaining => "m:ss remaining",
        }
    }
    /// Seconds left in the period, 0-900.
    pub fn read(self, v: &str) -> Result<i32, String> {
        let t = v.trim();
        let secs = match self {
            ClockForm::MinSec => min_sec(t),
            ClockForm::Seconds => t.parse::<i32>().ok(),
            ClockForm::Remaining => {
                let lower = t.to_ascii_lowercase();
                lower.strip_suffix("remaining").and_then(|c| min_sec(c.trim()))
            }
        };
        match secs {
            Some(s) if (0..=900).contains(&s) => Ok(s),
            _ => Err(format!(
                "is not a clock; expected {} (0:00 to 15:00 left in the period)",
                match self {
                    ClockForm::MinSec => "m:ss such as 12:34",
                    ClockForm::Seconds => "whole seconds 0-900",
                    ClockForm::Remaining => "\"m:ss remaining\" such as 12:34 remaining",
                }
            )),
        }
    }
}

fn min_sec(t: &str) -> Option<i32> {
    let (m, s) = t.split_once(':')?;
    let digits = |x: &str| !x.is_empty() && x.len() <= 2 && x.bytes().all(|b| b.is_ascii_digit());
    if !digits(m) || s.len() != 2 || !digits(s) {
        return None;
    }
    let (m, s): (i32, i32) = (m.parse().ok()?, s.parse().ok()?);
    (s < 60).then_some(m * 60 + s)
}

/// How their yard line is written; ours is 1-99 from the offense's own goal.
#[derive(Debug, Clone, PartialEq)]
pub enum YardForm {
    /// `OPP 35`, `own 20`, `50` (the two words are theirs).
    Sides { own: String, opp: String },
    /// `-35` own half, `+20` opponent's half, `50`; unsigned 1-99 from own goal.
    Signed,
    /// 1-99 from the offense's own goal line (ours).
    FromOwn,
    /// 1-99 from the opponent's goal line.
    FromOpp,
}

impl YardForm {
    pub const KEYS: &'static str = "\"sides\" (with own and opp words), \"signed\", \"from_own\" or \"from_opp\"";
    pub fn parse(s: &str, own: &str, opp: &str) -> Option<YardForm> {
        match s.trim() {
            "sides" => Some(YardForm::Sides { own: own.trim().to_string(), opp: opp.trim().to_string() }),
            "signed" => Some(YardForm::Signed),
            "from_own" => Some(YardForm::FromOwn),
            "from_opp" => Some(YardForm::FromOpp),
            _ => None,
        }
    }
    pub fn key(&self) -> &'static str {
        match self {
            YardForm::Sides { .. } => "sides",
            YardForm::Signed => "signed",
            YardForm::FromOwn => "from_own",
            YardForm::FromOpp => "from_opp",
        }
    }
    fn expected(&self) -> String {
        match self {
            YardForm::Sides { own, opp } => format!("{opp} 1-49, {own} 1-49 or 50"),
            YardForm::Signed => "-1..-49 (own half), +49..+1 (opponent's half) or 50".into(),
            YardForm::FromOwn => "1-99 from the offense's own goal line".into(),
            YardForm::FromOpp => "1-99 from the opponent's goal line".into(),
        }
    }
    /// Yards from the offense's own goal line, 1-99.
    pub fn read(&self, v: &str) -> Result<i32, String> {
        let t = v.trim();
        let num = |x: &str| -> Option<i32> {
            let x = x.trim();
            (!x.is_empty() && x.len() <= 3 && x.bytes().all(|b| b.is_ascii_digit())).then(|| x.parse().ok()).flatten()
        };
        let b = match self {
            YardForm::Sides { own, opp } => {
                let lower = t.to_lowercase();
                let side = |word: &str| lower.strip_prefix(&word.to_lowercase()).and_then(num);
                match (side(opp), side(own), num(t)) {
                    (Some(n), _, _) if (1..=50).contains(&n) => Some(100 - n),
                    (_, Some(n), _) if (1..=50).contains(&n) => Some(n),
                    (_, _, Some(50)) => Some(50),
                    _ => None,
                }
            }
            YardForm::Signed => match (t.strip_prefix('-'), t.strip_prefix('+')) {
                (Some(r), _) => num(r).filter(|n| (1..=50).contains(n)),
                (_, Some(r)) => num(r).filter(|n| (1..=50).contains(n)).map(|n| 100 - n),
                _ => num(t).filter(|n| (1..=99).contains(n)),
            },
            YardForm::FromOwn => num(t).filter(|n| (1..=99).contains(n)),
            YardForm::FromOpp => num(t).filter(|n| (1..=99).contains(n)).map(|n| 100 - n),
        };
        b.ok_or_else(|| format!("is not a yard line; expected {}", self.expected()))
    }
}

/// A period: `1`-`9`, `Q1`-`Q4`, or one of their overtime words (the first
/// is period 5, the next 6, ...).
pub fn read_period(v: &str, overtime: &[String]) -> Result<i32, String> {
    let t = v.trim();
    let digits = t.strip_prefix(['Q', 'q']).unwrap_or(t);
    if let Ok(n) = digits.parse::<i32>() {
        if (1..=9).contains(&n) {
            return Ok(n);
        }
    }
    if let Some(k) = overtime.iter().position(|o| o.eq_ignore_ascii_case(t)) {
        return Ok(5 + k as i32);
    }
    let ot = if overtime.is_empty() { String::new() } else { format!(" or {}", overtime.join(", ")) };
    Err(format!("is not a period; expected 1-4, Q1-Q4{ot}"))
}

/// A yes/no word of theirs.
pub fn read_bool(v: &str, yes: &[String], no: &[String]) -> Result<bool, String> {
    let t = v.trim();
    if yes.iter().any(|w| w.eq_ignore_ascii_case(t)) {
        Ok(true)
    } else if no.iter().any(|w| w.eq_ignore_ascii_case(t)) {
        Ok(false)
    } else {
        Err(format!("is not a yes/no value; expected one of {} (yes) or {} (no)", yes.join(", "), no.join(", ")))
    }
}

/// A play-kind code of theirs.
pub fn read_kind(v: &str, kinds: &[(String, Kind)]) -> Result<Kind, String> {
    let t = v.trim();
    match kinds.iter().find(|(c, _)| c.eq_ignore_ascii_case(t)) {
        Some((_, k)) => Ok(*k),
        None => {
            let mut codes: Vec<&str> = kinds.iter().map(|(c, _)| c.as_str()).collect();
            let more = codes.len().saturating_sub(12);
            codes.truncate(12);
            let tail = if more > 0 { format!(" and {more} more") } else { String::new() };
            Err(format!("is not a play kind the mapping lists; expected one of {}{tail}", codes.join(", ")))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn yard_lines_in_every_form() {
        let sides = YardForm::Sides { own: "OWN".into(), opp: "OPP".into() };
        assert_eq!(sides.read("OPP 35"), Ok(65));
        assert_eq!(sides.read("own 20"), Ok(20));
        assert_eq!(sides.read("OPP 1"), Ok(99));
        assert_eq!(sides.read("50"), Ok(50));
        assert_eq!(sides.read("OWN 50"), Ok(50));
        assert!(sides.read("OPP 0").is_err());
        assert!(sides.read("OPP 51").is_err());
        assert!(sides.read("35").is_err());
        assert_eq!(YardForm::Signed.read("-35"), Ok(35));
        assert_eq!(YardForm::Signed.read("+20"), Ok(80));
        assert_eq!(YardForm::Signed.read("50"), Ok(50));
        assert!(YardForm::Signed.read("-51").is_err());
        assert_eq!(YardForm::FromOpp.read("20"), Ok(80));
        assert_eq!(YardForm::FromOwn.read("20"), Ok(20));
        assert!(YardForm::FromOwn.read("100").is_err());
    }

    #[test]
    fn clocks_periods_and_words() {
        assert_eq!(ClockForm::MinSec.read("12:34"), Ok(754));
        assert_eq!(ClockForm::Remaining.read("12:34 remaining"), Ok(754));
        assert_eq!(ClockForm::Remaining.read("0:05 Remaining"), Ok(5));
        assert!(ClockForm::MinSec.read("16:00").is_err());
        assert!(ClockForm::MinSec.read("2:5").is_err());
        assert_eq!(ClockForm::Seconds.read("754"), Ok(754));
        assert!(ClockForm::Seconds.read("12:34").is_err());
        let ot = vec!["OT".to_string(), "2OT".to_string()];
        assert_eq!(read_period("Q4", &ot), Ok(4));
        assert_eq!(read_period("3", &ot), Ok(3));
        assert_eq!(read_period("ot", &ot), Ok(5));
        assert_eq!(read_period("2OT", &ot), Ok(6));
        assert!(read_period("Q", &ot).is_err());
        let (y, n) = (vec!["Y".to_string()], vec!["N".to_string()]);
        assert_eq!(read_bool("y", &y, &n), Ok(true));
        assert_eq!(read_bool("N", &y, &n), Ok(false));
        assert!(read_bool("maybe", &y, &n).is_err());
    }
}

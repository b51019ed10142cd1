//! The report in a coach's words: the situation ("4th quarter, 7:30 or
//! less, or overtime; within 8 points" rather than the query's "quarters
//! 4,ot; ..7:30 left in regulation; margin -8..8") and the one-line verdict.
//! Reads the `Situation` value; the seasons and the passer are said
//! elsewhere on the page, so they are left out here.

use crate::plays::Plays;
use crate::splits::{Cell, SnapValues};
use crate::layout::format_clock;
use crate::numfmt::fmt_metric;
use crate::situation::{Range, Site, Situation, OT};

fn ordinal(n: i64) -> String {
    let suffix = match (n % 10, n % 100) {
        (1, 11) | (2, 12) | (3, 13) => "th",
        (1, _) => "st",
        (2, _) => "nd",
        (3, _) => "rd",
        _ => "th",
    };
    format!("{n}{suffix}")
}

/// "a", "a or b", "a, b or c".
fn either(items: &[String]) -> String {
    match items {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} or {last}", init.join(", ")),
    }
}

fn whole(x: f64) -> i64 {
    x.round() as i64
}

/// A clock window: "7:30 or less", "at least 2:00", "2:00 to 7:30".
fn clock(r: &Range) -> Option<String> {
    let t = |x: f64| format_clock(whole(x).max(0) as i32);
    match (r.lo, r.hi) {
        (None, Some(hi)) => Some(format!("{} or less", t(hi))),
        (Some(lo), None) => Some(format!("{} or more", t(lo))),
        (Some(lo), Some(hi)) => Some(format!("{} to {}", t(lo), t(hi))),
        (None, None) => None,
    }
}

/// The quarters and clock: "4th quarter, 7:30 or less, or overtime".
fn when(s: &Situation) -> Option<String> {
    let periods = s.periods.clone().unwrap_or_default();
    let ot = periods.contains(&OT);
    let quarters: Vec<String> = periods.iter().filter(|p| **p != OT).map(|p| ordinal(i64::from(*p))).collect();
    let quarter_words = match quarters.len() {
        0 => None,
        1 => Some(format!("{} quarter", quarters[0])),
        _ => Some(format!("{} quarters", either(&quarters))),
    };
    let game = s.game_secs.as_ref().and_then(clock).map(|c| if quarter_words.is_some() { c } else { format!("{c} left in regulation") });
    let half = s.half_secs.as_ref().and_then(clock).map(|c| format!("{c} left in the half"));
    let mut parts: Vec<String> = Vec::new();
    parts.extend(quarter_words);
    parts.extend(half);
    parts.extend(game);
    if parts.is_empty() {
        return ot.then(|| "overtime".to_string());
    }
    if ot {
        // Overtime snaps pass the regulation clock; say so as the coach would.
        parts.push("or overtime".to_string());
    }
    Some(parts.join(", "))
}

/// The score: "within 8 points", "tied or behind by up to 8", "ahead".
fn margin(r: &Range) -> Option<String> {
    let (lo, hi) = (r.lo.map(whole), r.hi.map(whole));
    Some(match (lo, hi) {
        (None, None) => return None,
        (Some(a), Some(b)) if a == -b && b > 0 => format!("within {b} points"),
        (Some(0), Some(0)) => "tied".to_string(),
        (Some(a), Some(0)) if a < 0 => format!("tied or behind by up to {}", -a),
        (Some(0), Some(b)) if b > 0 => format!("tied or ahead by up to {b}"),
        (Some(a), Some(b)) if a > 0 => format!("ahead by {a} to {b}"),
        (Some(a), Some(b)) if b < 0 => format!("behind by {} to {}", -b, -a),
        (Some(1), None) => "ahead".to_string(),
        (Some(a), None) if a > 0 => format!("ahead by {a} or more"),
        (Some(a), None) => format!("ahead, tied or behind by up to {}", -a),
        (None, Some(-1)) => "behind".to_string(),
        (None, Some(b)) if b < 0 => format!("behind by {} or more", -b),
        (None, Some(b)) => format!("behind, tied or ahead by up to {b}"),
        (Some(a), Some(b)) => format!("score margin {a} to {b}"),
    })
}

/// A yard line from the offense's side: "own 10", "midfield", "opponent's 20".
fn spot(y: i64) -> String {
    match y {
        50 => "midfield".to_string(),
        y if y < 50 => format!("own {y}"),
        y => format!("opponent's {}", 100 - y),
    }
}

fn ball_on(r: &Range) -> Option<String> {
    let (lo, hi) = (r.lo.map(whole).unwrap_or(1), r.hi.map(whole).unwrap_or(99));
    Some(match (lo, hi) {
        (1, 99) => return None,
        (lo, 99) if lo > 50 => format!("at or inside the opponent's {}", 100 - lo),
        (1, hi) if hi < 50 => format!("backed up at or inside the own {hi}"),
        (lo, hi) => format!("ball between the {} and the {}", spot(lo), spot(hi)),
    })
}

fn count_range(r: &Range, one: &str, many: &str) -> Option<String> {
    let (lo, hi) = (r.lo.map(whole), r.hi.map(whole));
    let noun = |n: i64| if n == 1 { one } else { many };
    Some(match (lo, hi) {
        (None, None) => return None,
        (Some(0), Some(0)) => format!("no {many}"),
        (Some(a), Some(b)) if a == b => format!("{a} {}", noun(a)),
        (Some(a), Some(b)) => format!("{a} to {b} {many}"),
        (Some(a), None) => format!("{a} or more {many}"),
        (None, Some(b)) => format!("{b} or fewer {many}"),
    })
}

fn percent(r: &Range) -> Option<String> {
    let p = |x: f64| format!("{:.0}%", x * 100.0);
    match (r.lo, r.hi) {
        (None, None) => None,
        (Some(a), Some(b)) => Some(format!("win chance {} to {}", p(a), p(b))),
        (Some(a), None) => Some(format!("win chance {} or more", p(a))),
        (None, Some(b)) => Some(format!("win chance {} or less", p(b))),
    }
}

/// The situation's filters in a coach's words, joined with "; ". The
/// seasons and the passer are left to the rest of the page; "every snap"
/// when nothing narrows it.
pub fn situation_words(s: &Situation) -> String {
    let mut parts: Vec<String> = Vec::new();
    parts.extend(when(s));
    parts.extend(s.margin.as_ref().and_then(margin));
    if let Some(d) = &s.downs {
        let ds: Vec<String> = d.iter().map(|x| ordinal(i64::from(*x))).collect();
        parts.push(format!("{} down", either(&ds)));
    }
    parts.extend(s.to_go.as_ref().and_then(|r| count_range(r, "yard to go", "yards to go")));
    parts.extend(s.ball_on.as_ref().and_then(ball_on));
    parts.extend(s.wp.as_ref().and_then(percent));
    parts.extend(s.off_timeouts.as_ref().and_then(|r| count_range(r, "timeout left", "timeouts left")));
    parts.extend(s.def_timeouts.as_ref().and_then(|r| count_range(r, "defense timeout left", "defense timeouts left")));
    if let Some(w) = &s.weeks {
        parts.extend(match (w.lo.map(whole), w.hi.map(whole)) {
            (Some(a), Some(b)) if a == b => Some(format!("week {a}")),
            (Some(a), Some(b)) => Some(format!("weeks {a} to {b}")),
            (Some(a), None) => Some(format!("week {a} on")),
            (None, Some(b)) => Some(format!("weeks up to {b}")),
            (None, None) => None,
        });
    }
    match s.site {
        Some(Site::Home) => parts.push("at home".into()),
        Some(Site::Away) => parts.push("on the road".into()),
        None => {}
    }
    if let Some(t) = &s.offense {
        parts.push(format!("{t} on offense"));
    }
    if let Some(t) = &s.opponent {
        parts.push(format!("against {t}"));
    }
    if let Some(rs) = &s.results {
        let words: Vec<String> = rs.iter().map(|r| r.key().replace('-', " ")).collect();
        parts.push(format!("ending in {}", either(&words)));
    }
    if parts.is_empty() {
        "every snap".to_string()
    } else {
        parts.join("; ")
    }
}

/// The plain verdict from EPA per dropback (its cell, shown at `decimals`
/// places), in one line: the estimate's 90% range above the league, below
/// it, or taking it in.
pub fn verdict(passer: &str, epa: Option<&Cell>, decimals: usize) -> String {
    let Some(c) = epa else {
        return "Verdict: none, EPA per dropback is missing.".to_string();
    };
    let (Some(est), Some(lo), Some(hi), Some(lg)) = (c.estimate, c.lo, c.hi, c.league) else {
        return format!("Verdict: none, too few snaps for an estimate of {passer}'s EPA per dropback.");
    };
    let f = |x: f64| fmt_metric(Some(x), decimals);
    let word = if lo > lg {
        "better than"
    } else if hi < lg {
        "worse than"
    } else {
        "no clear difference from"
    };
    let is = if word.starts_with("no") { "shows" } else { "is" };
    format!("Verdict: {passer} {is} {word} the league here (EPA per dropback {}, 90% range {} to {}; league {}).", f(est), f(lo), f(hi), f(lg))
}

/// Whether the league's throws carry decision values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ThrowValues {
    /// The file has no air yards: throws cannot be valued by depth.
    NoAirYards,
    /// Air yards, but no throw values were computed for the file.
    NotComputed,
    Valued,
}

impl ThrowValues {
    pub fn of(p: &Plays, v: &SnapValues) -> ThrowValues {
        if !p.air_yards.iter().any(Option::is_some) {
            ThrowValues::NoAirYards
        } else if !v.choice.iter().any(|c| c.is_finite()) {
            ThrowValues::NotComputed
        } else {
            ThrowValues::Valued
        }
    }
}

/// The line under the decision values: what they are, or plainly why there
/// are none (`throws`: his throws with a value in the situation).
pub fn decisions_note(values: ThrowValues, throws: u64) -> String {
    match values {
        ThrowValues::NoAirYards => "Decisions: this file has no air yards, so his throws cannot be valued by depth (no depth-choice or execution numbers).".into(),
        ThrowValues::NotComputed => "Decisions: no throw values were computed for this file (no depth-choice or execution numbers).".into(),
        ThrowValues::Valued if throws == 0 => "Decisions: no throws with air yards in this situation.".into(),
        ThrowValues::Valued => format!(
            "WPA per throw, over {throws} throws with air yards. Depth choice: his depth against the league's usual depths in the same spot; execution: the throw's result against the league's at his depth. Sacks and scrambles are outside both."
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::situation::Preset;

    fn q(query: &str) -> Situation {
        let pairs = crate::situation::decode_pairs(query);
        Situation::from_query(&pairs).expect("query")
    }

    #[test]
    fn presets_in_a_coachs_words() {
        assert_eq!(situation_words(&Preset::EndOfGame.situation(8)), "4th quarter, 7:30 or less, or overtime; within 8 points");
        assert_eq!(situation_words(&Preset::TwoMinuteDrill.situation(8)), "2nd or 4th quarters, 2:00 or less left in the half; tied or behind by up to 8");
        assert_eq!(situation_words(&Preset::FourMinuteLead.situation(8)), "4th quarter, 4:00 or less; ahead");
        assert_eq!(situation_words(&Preset::EndOfGameLateDowns.situation(7)), "4th quarter, 7:30 or less, or overtime; within 7 points; 3rd or 4th down");
        assert_eq!(
            situation_words(&Preset::EndOfGameRedZone.situation(8)),
            "4th quarter, 7:30 or less, or overtime; within 8 points; at or inside the opponent's 20"
        );
        assert_eq!(
            situation_words(&Preset::EndOfGameBackedUp.situation(8)),
            "4th quarter, 7:30 or less, or overtime; within 8 points; backed up at or inside the own 10"
        );
        assert_eq!(situation_words(&Preset::EverySnap.situation(8)), "every snap");
    }

    #[test]
    fn filters_in_a_coachs_words() {
        assert_eq!(situation_words(&q("quarter=ot")), "overtime");
        assert_eq!(situation_words(&q("game-left=..2:00")), "2:00 or less left in regulation");
        assert_eq!(situation_words(&q("margin=-8..-1&to-go=..1&timeouts=0")), "behind by 1 to 8; 1 or fewer yards to go; no timeouts left");
        assert_eq!(situation_words(&q("ball-on=-35..+40&win-prob=20..80%")), "ball between the own 35 and the opponent's 40; win chance 20% to 80%");
        assert_eq!(situation_words(&q("result=interception,sack&site=away&opponent=QRM")), "on the road; against QRM; ending in interception or sack");
        assert_eq!(situation_words(&q("down=3&to-go=5..&week=10..")), "3rd down; 5 or more yards to go; week 10 on");
        // seasons and the passer are said elsewhere on the page
        assert_eq!(situation_words(&q("season=2025&passer=Someone")), "every snap");
    }
}

//! Lift in words: whether a passer plays differently here than he does
//! elsewhere, by one stated rule shared by the profile page and the report.

use super::metrics::{is_style, MetricDef};
use super::table::Cell;
use crate::stats::INTERVAL_LEVEL;
use statrs::distribution::{ContinuousCDF, Normal};

/// The rule, as the pages print it.
pub const LIFT_RULE: &str = "Lift is his value here minus his normal (his other snaps in the same seasons), \
with his own part shrunk toward 0 (so it leans toward the league's lift, shown beside it). Better or worse (than his normal), fairly sure: the 90% interval of the lift \
lies wholly on one side of 0. Leaning better or worse: a 4-in-5 chance or more that the lift is on that side. \
About his normal: anything less. For style numbers (scrambles, throws past the sticks): more or less often.";

/// The chance that the true lift is above 0, from the lift and its 90%
/// interval (normal, as the model reports it).
pub fn lift_above_zero(c: &Cell) -> Option<f64> {
    let (l, lo, hi) = (c.lift?, c.lift_lo?, c.lift_hi?);
    let z = Normal::new(0.0, 1.0).ok()?.inverse_cdf(0.5 + INTERVAL_LEVEL / 2.0);
    let sd = (hi - lo) / (2.0 * z);
    if sd.is_nan() || sd <= 0.0 {
        return None;
    }
    Some(1.0 - Normal::new(l, sd).ok()?.cdf(0.0))
}

/// The words for a cell's lift under `LIFT_RULE` ("better, fairly sure",
/// "leaning worse", "about his normal", ...: each against his normal);
/// `None` without a lift.
pub fn lift_words(m: &MetricDef, c: &Cell) -> Option<&'static str> {
    let up = lift_above_zero(c)?;
    let (lo, hi) = (c.lift_lo?, c.lift_hi?);
    let style = is_style(m.key);
    // "Good" side: up for higher-is-better metrics.
    let good = if m.higher_is_better { up } else { 1.0 - up };
    let words = if style {
        let higher = up;
        if lo > 0.0 {
            "more often, fairly sure"
        } else if hi < 0.0 {
            "less often, fairly sure"
        } else if higher >= 0.8 {
            "leaning more often"
        } else if higher <= 0.2 {
            "leaning less often"
        } else {
            "about his normal"
        }
    } else if (m.higher_is_better && lo > 0.0) || (!m.higher_is_better && hi < 0.0) {
        "better, fairly sure"
    } else if (m.higher_is_better && hi < 0.0) || (!m.higher_is_better && lo > 0.0) {
        "worse, fairly sure"
    } else if good >= 0.8 {
        "leaning better"
    } else if good <= 0.2 {
        "leaning worse"
    } else {
        "about his normal"
    };
    Some(words)
}

/// What a season-to-season correlation means for a coach, from its 90%
/// interval: whether last season's number says much about next season's.
pub fn stability_words(lo: f64, hi: f64) -> &'static str {
    if hi < 0.2 {
        "mostly noise: last season's number says little about next season's"
    } else if lo >= 0.5 {
        "a lasting trait: last season's number carries over"
    } else if lo >= 0.2 {
        "partly carries over: lean on it, with care"
    } else {
        "unclear: too few seasons of passers to say whether it carries over"
    }
}

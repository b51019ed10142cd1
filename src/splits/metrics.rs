//! The passer metrics: what each one counts, over which snaps, and how a
//! single snap contributes to it. The split engine sums these contributions.

use crate::playfile::Kind;
use crate::plays::Plays;
use serde::Serialize;

/// Which snaps a metric is taken over.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Unit {
    Dropback,
    Attempt,
    PassOrSack,
    /// Attempts with a completion probability (air yards present).
    AttemptWithCp,
    /// 3rd and 4th down attempts with air yards.
    LateDownAttempt,
    /// Dropbacks while trailing in the final 2:00 of a half that the clock
    /// ran through, with a next snap by the same offense in the same period
    /// and no timeout between (`hurry_up_gap`).
    HurryUp,
    /// Attempts with air yards the throw-value model priced.
    ThrowValued,
}

impl Unit {
    pub fn label(self) -> &'static str {
        match self {
            Unit::Dropback => "dropbacks",
            Unit::Attempt => "attempts",
            Unit::PassOrSack => "attempts + sacks",
            Unit::AttemptWithCp => "attempts with air yards",
            Unit::LateDownAttempt => "3rd/4th-down attempts",
            Unit::HurryUp => "hurry-up snaps (clock running)",
            Unit::ThrowValued => "attempts with air yards",
        }
    }
}

/// How a metric is summarised and shrunk.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Stat {
    /// A total; no interval.
    Count,
    /// A share of 0/1 outcomes: beta-binomial shrinkage.
    Rate,
    /// A per-snap mean: normal-normal shrinkage.
    Mean,
}

/// Which metric (for fast dispatch in the per-snap loop).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Id {
    Dropbacks,
    Attempts,
    Completions,
    CompPct,
    Yards,
    Ypa,
    Td,
    Int,
    IntRate,
    Sacks,
    SackRate,
    Scrambles,
    ScrambleRate,
    Rating,
    Anya,
    Epa,
    Success,
    WpaTotal,
    Wpa,
    Cpoe,
    Turnover,
    Sticks,
    Pace,
    Choice,
    Execution,
    SticksOver,
}

#[derive(Debug, Clone, Copy, Serialize)]
pub struct MetricDef {
    #[serde(skip)]
    pub id: Id,
    pub key: &'static str,
    pub label: &'static str,
    /// Column heading.
    pub short: &'static str,
    pub unit: Unit,
    pub stat: Stat,
    pub higher_is_better: bool,
    /// Display multiplier (100 for percentages).
    pub scale: f64,
    pub decimals: usize,
    /// Shown on the projector (fewer columns).
    pub projector: bool,
    /// A decision-quality metric (the profile's decision panel).
    pub decision: bool,
}

#[allow(clippy::too_many_arguments)]
const fn m(
    id: Id,
    key: &'static str,
    label: &'static str,
    short: &'static str,
    unit: Unit,
    stat: Stat,
    higher_is_better: bool,
    scale: f64,
    decimals: usize,
    projector: bool,
    decision: bool,
) -> MetricDef {
    MetricDef { id, key, label, short, unit, stat, higher_is_better, scale, decimals, projector, decision }
}

use Stat::*;
use Unit::*;

/// Every metric, in table order.
/// Metrics that belong together, for tables too wide to show every column
/// (the explorer's column groups): key, label, metric keys in table order.
/// The first group is the default; "all" shows every metric.
pub const METRIC_GROUPS: &[(&str, &str, &[&str])] = &[
    ("key", "Key numbers", &["dropbacks", "rating", "epa", "success", "wpa", "cpoe", "anya", "int_rate", "sack_rate"]),
    ("passing", "Passing", &["dropbacks", "attempts", "completions", "comp_pct", "yards", "ypa", "td", "int", "int_rate", "anya", "rating"]),
    ("pressure", "Pressure and style", &["dropbacks", "sacks", "sack_rate", "scrambles", "scramble_rate", "turnover", "sticks", "pace"]),
    ("value", "Value", &["dropbacks", "epa", "success", "wpa_total", "wpa", "cpoe", "choice", "execution"]),
    ("all", "All columns", &[]),
];

/// The group named `key`, if there is one.
pub fn metric_group(key: &str) -> Option<&'static (&'static str, &'static str, &'static [&'static str])> {
    METRIC_GROUPS.iter().find(|g| g.0 == key)
}

pub const METRICS: &[MetricDef] = &[
    m(Id::Dropbacks, "dropbacks", "Dropbacks", "Dropbacks", Dropback, Count, true, 1.0, 0, true, false),
    m(Id::Attempts, "attempts", "Throws (pass attempts)", "Throws", Attempt, Count, true, 1.0, 0, false, false),
    m(Id::Completions, "completions", "Caught (completions)", "Caught", Attempt, Count, true, 1.0, 0, false, false),
    m(Id::CompPct, "comp_pct", "Caught % (completion %)", "Caught %", Attempt, Rate, true, 100.0, 1, false, false),
    m(Id::Yards, "yards", "Passing yards", "Pass yards", Attempt, Count, true, 1.0, 0, false, false),
    m(Id::Ypa, "ypa", "Yards per throw", "Yards/throw", Attempt, Mean, true, 1.0, 2, false, false),
    m(Id::Td, "td", "Touchdown passes", "TD", Attempt, Count, true, 1.0, 0, false, false),
    m(Id::Int, "int", "Interceptions", "INT", Attempt, Count, false, 1.0, 0, false, true),
    m(Id::IntRate, "int_rate", "Interceptions per throw (%)", "INT %", Attempt, Rate, false, 100.0, 1, false, true),
    m(Id::Sacks, "sacks", "Times sacked", "Sacked", Dropback, Count, false, 1.0, 0, false, true),
    m(Id::SackRate, "sack_rate", "Sacked per dropback (%)", "Sacked %", Dropback, Rate, false, 100.0, 1, false, true),
    m(Id::Scrambles, "scrambles", "Scrambles", "Scrambles", Dropback, Count, true, 1.0, 0, false, true),
    m(Id::ScrambleRate, "scramble_rate", "Scrambles per dropback (%)", "Scramble %", Dropback, Rate, true, 100.0, 1, false, true),
    m(Id::Rating, "rating", "Passer rating", "Passer rating", Attempt, Mean, true, 1.0, 1, true, false),
    m(Id::Anya, "anya", "Adj. net yards per attempt", "ANY/A", PassOrSack, Mean, true, 1.0, 2, false, false),
    m(Id::Epa, "epa", "EPA per dropback", "EPA/dropback", Dropback, Mean, true, 1.0, 3, true, false),
    m(Id::Success, "success", "Success rate (% EPA > 0)", "Success %", Dropback, Rate, true, 100.0, 1, true, false),
    m(Id::WpaTotal, "wpa_total", "WPA total", "WPA", Dropback, Count, true, 1.0, 3, true, false),
    m(Id::Wpa, "wpa", "WPA per dropback", "WPA/dropback", Dropback, Mean, true, 1.0, 4, false, false),
    m(Id::Cpoe, "cpoe", "Completion % over expected", "CPOE", AttemptWithCp, Mean, true, 1.0, 1, true, false),
    m(Id::Turnover, "turnover", "Giveaways per dropback (%): interceptions and lost fumbles", "Giveaway %", Dropback, Rate, false, 100.0, 1, false, true),
    m(Id::Sticks, "sticks", "Thrown past the sticks on 3rd/4th down (%)", "Past sticks %", LateDownAttempt, Rate, true, 100.0, 1, false, true),
    m(Id::SticksOver, "sticks_over", "Past the sticks on 3rd/4th down over the league's depths in the same spots (% points)", "Sticks vs league", LateDownAttempt, Mean, true, 100.0, 1, false, true),
    m(Id::Pace, "pace", "Hurry-up pace: seconds to the next snap when trailing late in a half, after plays the clock ran through", "Hurry-up secs", HurryUp, Mean, false, 1.0, 1, false, true),
    m(Id::Choice, "choice", "Depth choice: WPA per throw of the depth he picked over the depths the league picks in the same spot", "Depth choice", ThrowValued, Mean, true, 1.0, 4, false, true),
    m(Id::Execution, "execution", "Execution: WPA per throw over what the league gets at the depth he picked", "Execution", ThrowValued, Mean, true, 1.0, 4, false, true),
];

/// Style metrics: how often he does a thing, with no better direction (a
/// scramble or a throw past the sticks can be right or wrong). Their
/// percentile runs 100 = most often, their lift reads "more/less often", and
/// `higher_is_better` only orders their columns.
pub const STYLE: &[&str] = &["scrambles", "scramble_rate", "sticks", "sticks_over"];

/// Is the metric `key` a style metric (no better direction)?
pub fn is_style(key: &str) -> bool {
    STYLE.contains(&key)
}

/// Is a higher value better for a row of `group`? For a defense (numbers
/// allowed) every direction flips: less EPA, success and completions
/// allowed, more sacks and interceptions. Style metrics keep their order.
pub fn higher_is_better(m: &MetricDef, group: crate::situation::Group) -> bool {
    if group == crate::situation::Group::Defense && !is_style(m.key) {
        !m.higher_is_better
    } else {
        m.higher_is_better
    }
}

/// A defense's words for the metrics whose passer words do not fit numbers
/// allowed ("Times sacked" becomes "Sacks made"): key, label, short. Any
/// metric not listed keeps its passer words.
pub const DEFENSE_WORDS: &[(&str, &str, &str)] = &[
    ("dropbacks", "Dropbacks faced", "Dropbacks"),
    ("attempts", "Throws faced (pass attempts)", "Throws"),
    ("completions", "Catches allowed (completions)", "Caught"),
    ("comp_pct", "Completion % allowed", "Caught %"),
    ("yards", "Passing yards allowed", "Pass yards"),
    ("ypa", "Yards per throw allowed", "Yards/throw"),
    ("td", "Touchdown passes allowed", "TD"),
    ("int", "Interceptions made", "INT"),
    ("int_rate", "Interceptions made per throw (%)", "INT %"),
    ("sacks", "Sacks made", "Sacks"),
    ("sack_rate", "Sacks per dropback (%)", "Sack %"),
    ("scrambles", "Scrambles allowed", "Scrambles"),
    ("scramble_rate", "Scrambles allowed per dropback (%)", "Scramble %"),
    ("rating", "Passer rating allowed", "Rating allowed"),
    ("anya", "Adj. net yards per attempt allowed", "ANY/A"),
    ("epa", "EPA per dropback allowed", "EPA/dropback"),
    ("success", "Success rate allowed (% EPA > 0)", "Success %"),
    ("wpa_total", "WPA allowed, total", "WPA"),
    ("wpa", "WPA per dropback allowed", "WPA/dropback"),
    ("cpoe", "Completion % over expected allowed", "CPOE"),
    ("turnover", "Takeaways per dropback (%): interceptions and fumbles recovered", "Takeaway %"),
    ("sticks", "Thrown past the sticks against it on 3rd/4th down (%)", "Past sticks %"),
    ("pace", "Hurry-up pace faced: seconds to the next snap when the offense trails late in a half", "Hurry-up secs"),
    ("choice", "Depth choice of passers facing it: WPA per throw over the league's depths", "Depth choice"),
    ("execution", "Execution against it: WPA per throw over what the league gets at the depth picked", "Execution"),
];

/// The metric's label and short heading for rows of `group`: a defense's
/// words (`DEFENSE_WORDS`) for a defense, else the metric's own.
pub fn headings(m: &MetricDef, group: crate::situation::Group) -> (&'static str, &'static str) {
    match group {
        crate::situation::Group::Defense => DEFENSE_WORDS.iter().find(|w| w.0 == m.key).map(|w| (w.1, w.2)).unwrap_or((m.label, m.short)),
        _ => (m.label, m.short),
    }
}

/// The metric the opponent adjustment is made on (one, on purpose: the
/// page explains one number; `splits::opponent`). Its per (passer-season,
/// defense) sums are summed in each situation's pass (`Memo::opp_keys`).
pub const ADJUSTED_METRIC: &str = "epa";

pub fn metric_index(key: &str) -> Option<usize> {
    METRICS.iter().position(|m| m.key == key)
}

/// Per-snap values the models add (defined with the scored league).
pub use crate::league::SnapValues;

/// Touchdown pass: a completion on which the offense scored six.
pub fn is_td_pass(p: &Plays, i: usize) -> bool {
    p.kind[i] == Kind::Pass && p.complete[i] && p.points[i] == 6
}

pub fn pass_yards(p: &Plays, i: usize) -> f64 {
    if p.kind[i] == Kind::Pass && p.complete[i] {
        p.gain[i] as f64
    } else {
        0.0
    }
}

/// Hurry-up pace: seconds of game clock from dropback `i` to the same
/// offense's next snap in the same period, when trailing in the final 2:00
/// of a half (or overtime), over dropbacks the clock ran through: a catch
/// (not a touchdown), a sack or a scramble, with no timeout taken by either
/// side before the next snap. Incompletions and interceptions stop the clock,
/// so they are left out rather than counted as instant snaps. The file does
/// not say when a catch or a run ended out of bounds; those stay in and read
/// faster than they were.
pub fn hurry_up_gap(p: &Plays, i: usize) -> Option<f64> {
    if p.margin[i] >= 0 || p.secs_half[i] > 120 || !matches!(p.period[i], 2 | 4 | 5..) {
        return None;
    }
    let ran = match p.kind[i] {
        Kind::Pass => p.complete[i] && !p.intercepted[i],
        Kind::Sack | Kind::Scramble => true,
        _ => false,
    };
    if !ran || p.points[i] != 0 || p.fumble_lost[i] {
        return None;
    }
    let j = i + 1;
    if j >= p.len() || p.game[j] != p.game[i] || p.period[j] != p.period[i] || p.offense[j] != p.offense[i] {
        return None;
    }
    if p.off_timeouts[j] != p.off_timeouts[i] || p.def_timeouts[j] != p.def_timeouts[i] {
        return None;
    }
    Some((p.clock[i] - p.clock[j]).max(0) as f64)
}

/// Does snap `i` (a dropback) count toward a metric taken over `unit`?
pub fn in_unit(p: &Plays, v: &SnapValues, unit: Unit, i: usize) -> bool {
    let k = p.kind[i];
    match unit {
        Dropback => k.is_dropback(),
        Attempt => k == Kind::Pass,
        PassOrSack => matches!(k, Kind::Pass | Kind::Sack),
        AttemptWithCp => k == Kind::Pass && v.cp.get(i).is_some_and(|c| c.is_finite()),
        LateDownAttempt => k == Kind::Pass && p.down[i] >= 3 && p.air_yards[i].is_some(),
        HurryUp => k.is_dropback() && hurry_up_gap(p, i).is_some(),
        ThrowValued => k == Kind::Pass && v.choice.get(i).is_some_and(|c| c.is_finite()),
    }
}

/// The contribution of dropback `i` to metric `m` (already known to be in
/// the metric's unit). Rates give 0/1; counts give what they add.
pub fn value(p: &Plays, v: &SnapValues, m: &MetricDef, i: usize) -> f64 {
    let b = |x: bool| if x { 1.0 } else { 0.0 };
    let k = p.kind[i];
    match m.id {
        Id::Dropbacks | Id::Attempts => 1.0,
        Id::Completions | Id::CompPct => b(p.complete[i]),
        Id::Yards | Id::Ypa => pass_yards(p, i),
        Id::Td => b(is_td_pass(p, i)),
        Id::Int | Id::IntRate => b(p.intercepted[i]),
        Id::Sacks | Id::SackRate => b(k == Kind::Sack),
        Id::Scrambles | Id::ScrambleRate => b(k == Kind::Scramble),
        // The rating is a per-attempt mean once its caps are left off:
        // 100/6 · [5(c − .3) + .25(y − 3) + 20·td + 2.375 − 25·int].
        Id::Rating => {
            100.0 / 6.0
                * (5.0 * (b(p.complete[i]) - 0.3) + 0.25 * (pass_yards(p, i) - 3.0) + 20.0 * b(is_td_pass(p, i)) + 2.375
                    - 25.0 * b(p.intercepted[i]))
        }
        Id::Anya => {
            if k == Kind::Sack {
                p.gain[i] as f64
            } else {
                pass_yards(p, i) + 20.0 * b(is_td_pass(p, i)) - 45.0 * b(p.intercepted[i])
            }
        }
        Id::Epa => v.epa.get(i).copied().unwrap_or(0.0),
        Id::Success => b(v.epa.get(i).is_some_and(|e| *e > 0.0)),
        Id::WpaTotal | Id::Wpa => v.wpa.get(i).copied().unwrap_or(0.0),
        Id::Cpoe => 100.0 * (b(p.complete[i]) - v.cp.get(i).copied().unwrap_or(0.0)),
        Id::Turnover => b(p.intercepted[i] || p.fumble_lost[i]),
        Id::Sticks => b(p.air_yards[i].is_some_and(|a| a >= p.to_go[i])),
        Id::Pace => hurry_up_gap(p, i).unwrap_or(0.0),
        Id::SticksOver => {
            let past = b(p.air_yards[i].is_some_and(|a| a >= p.to_go[i]));
            past - v.league_sticks.get(i).copied().filter(|x| x.is_finite()).unwrap_or(past)
        }
        Id::Choice => v.choice.get(i).copied().unwrap_or(0.0),
        Id::Execution => v.execution.get(i).copied().unwrap_or(0.0),
    }
}

/// Every metric's contribution of dropback `i` at once: `out[j]` is set and
/// bit `j` of the returned mask is on when the snap counts toward metric `j`.
pub fn contributions(p: &Plays, v: &SnapValues, i: usize, out: &mut [f64]) -> u64 {
    let mut mask = 0u64;
    let units = [
        in_unit(p, v, Unit::Dropback, i),
        in_unit(p, v, Unit::Attempt, i),
        in_unit(p, v, Unit::PassOrSack, i),
        in_unit(p, v, Unit::AttemptWithCp, i),
        in_unit(p, v, Unit::LateDownAttempt, i),
        in_unit(p, v, Unit::HurryUp, i),
        in_unit(p, v, Unit::ThrowValued, i),
    ];
    for (j, m) in METRICS.iter().enumerate() {
        let inside = units[m.unit as usize];
        if inside {
            out[j] = value(p, v, m, i);
            mask |= 1 << j;
        }
    }
    mask
}

/// The state cell of a snap for direct standardization:
/// down (1-4) × distance bucket (1-2, 3-6, 7-10, 11+) × field zone
/// (own 1-20, own 21-50, opp 49-21, opp 20-1). 64 cells.
pub const CELLS: usize = 64;
pub fn cell(p: &Plays, i: usize) -> usize {
    let down = (p.down[i].clamp(1, 4) - 1) as usize;
    let dist = match p.to_go[i] {
        ..=2 => 0,
        3..=6 => 1,
        7..=10 => 2,
        _ => 3,
    };
    let zone = match p.ball_on[i] {
        ..=20 => 0,
        21..=50 => 1,
        51..=79 => 2,
        _ => 3,
    };
    down * 16 + dist * 4 + zone
}

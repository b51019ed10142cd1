//! A split table's cell (one number with everything said about it) and
//! row (a passer's or a team's cells).

use serde::Serialize;

/// One number in the table, with everything said about it. Every interval
/// is a 90% interval; values are in display units (percentages ×100).
#[derive(Debug, Clone, Serialize, Default)]
pub struct Cell {
    pub key: &'static str,
    /// The passer's raw value.
    pub value: Option<f64>,
    /// Snaps it is taken over.
    pub n: f64,
    /// League value in the same situation and seasons.
    pub league: Option<f64>,
    pub diff: Option<f64>,
    /// What the league does on his mix of downs, distances and field zones:
    /// each cell's league value without his own snaps (thin cells smoothed),
    /// weighted by his count of snaps there.
    pub adjusted_league: Option<f64>,
    pub adjusted_diff: Option<f64>,
    /// 90% interval of `adjusted_diff` (his sampling noise and the baseline's).
    pub adjusted_diff_lo: Option<f64>,
    pub adjusted_diff_hi: Option<f64>,
    /// Estimate from the two-level model: centred on his own level elsewhere
    /// plus the situation's effect, with its 90% interval.
    pub estimate: Option<f64>,
    pub lo: Option<f64>,
    pub hi: Option<f64>,
    /// The share of the spread in such raw numbers that is real difference
    /// between passers rather than sampling noise.
    pub signal: Option<f64>,
    /// His level on his other snaps in the same seasons (estimated).
    pub normal: Option<f64>,
    /// Lift: his value here minus his own level on his other snaps, with its
    /// 90% interval; the passer × situation part is shrunk toward 0.
    pub lift: Option<f64>,
    pub lift_lo: Option<f64>,
    pub lift_hi: Option<f64>,
    /// The share of the spread in raw differences (here minus elsewhere) that
    /// is real lift rather than noise: often small.
    pub lift_signal: Option<f64>,
    /// Among qualified passers, 100 = best (on the estimate); for style
    /// metrics (no better direction) 100 = most.
    pub percentile: Option<f64>,
    /// The posterior probability that his true value is better than the
    /// league value (for style metrics: higher than it).
    pub p_better: Option<f64>,
}

/// One row: a passer, or a team when the table is grouped by offense or
/// defense (then `passer` and `team` both hold the team's code).
#[derive(Debug, Clone, Serialize)]
pub struct PasserRow {
    pub passer: String,
    pub team: String,
    pub qualified: bool,
    pub dropbacks: u32,
    pub cells: Vec<Cell>,
    /// EPA per dropback with the defenses he faced taken out: his raw value
    /// minus the snap-weighted effect of the defense-seasons he threw
    /// against here (a crossed passer + defense model, `splits::opponent`),
    /// with its 90% interval.
    pub epa_opp_adj: Option<f64>,
    pub epa_opp_adj_lo: Option<f64>,
    pub epa_opp_adj_hi: Option<f64>,
    /// The average effect of the defenses he faced (EPA per dropback;
    /// negative: tougher than the league's average defense here).
    pub epa_opp_faced: Option<f64>,
}

impl PasserRow {
    pub fn cell(&self, key: &str) -> Option<&Cell> {
        self.cells.iter().find(|c| c.key == key)
    }
}

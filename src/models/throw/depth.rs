//! Yards needed, depth chosen and the depth the league chooses there: a
//! passer's 3rd- and 4th-down throws grouped by distance, with the mean
//! yards to go, his mean air yards and the mean of the league's expected
//! depth in the same states (`ThrowModel::league_depth`).

use super::{applies, State, ThrowModel};
use crate::plays::Plays;

/// Distance groups (yards to go, inclusive): the split engine's distance
/// buckets of its state cells.
pub const TO_GO_BANDS: [(&str, i32, i32); 4] = [("1-2", 1, 2), ("3-6", 3, 6), ("7-10", 7, 10), ("11+", 11, i32::MAX)];

/// One distance group of late-down throws.
#[derive(Debug, Clone, PartialEq)]
pub struct DepthLine {
    /// "1-2", "3-6", "7-10", "11+".
    pub label: &'static str,
    /// Throws with air yards in the group.
    pub throws: usize,
    /// Means over those throws; NaN when there are none.
    pub to_go: f64,
    pub his_air: f64,
    pub league_air: f64,
}

/// The 3rd- and 4th-down passes with air yards among `snaps`, one line per
/// distance group (every group, empty ones with NaN means).
pub fn depth_by_distance(model: &ThrowModel, p: &Plays, snaps: &[usize]) -> Vec<DepthLine> {
    let mut sums = [[0.0f64; 4]; TO_GO_BANDS.len()];
    for &i in snaps {
        if i >= p.len() || !applies(p, i) || p.down[i] < 3 {
            continue;
        }
        let Some(air) = p.air_yards[i] else { continue };
        let to_go = p.to_go[i].max(1);
        let Some(g) = TO_GO_BANDS.iter().position(|&(_, lo, hi)| (lo..=hi).contains(&to_go)) else { continue };
        let s = &mut sums[g];
        s[0] += 1.0;
        s[1] += to_go as f64;
        s[2] += air as f64;
        s[3] += model.league_depth(&State::of_snap(p, i));
    }
    TO_GO_BANDS
        .iter()
        .zip(sums)
        .map(|(&(label, _, _), s)| {
            let mean = |x: f64| if s[0] > 0.0 { x / s[0] } else { f64::NAN };
            DepthLine { label, throws: s[0] as usize, to_go: mean(s[1]), his_air: mean(s[2]), league_air: mean(s[3]) }
        })
        .collect()
}

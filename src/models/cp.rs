//! Completion probability: a logistic model of a pass being caught, from air
//! yards (piecewise-linear), down, distance, field position and the clock;
//! fit and scored on passes that carry air yards.

use super::error::{ModelError, Result};
use super::logit::{self, FitOptions, FnDesign, Labels};
use crate::playfile::Kind;
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

const AIR_KNOTS: [f64; 5] = [0.0, 5.0, 10.0, 20.0, 30.0];

pub const FEATURES: [&str; 15] = [
    "intercept",
    "air_yards",
    "air_yards_0",
    "air_yards_5",
    "air_yards_10",
    "air_yards_20",
    "air_yards_30",
    "down2",
    "down3",
    "down4",
    "log_to_go",
    "ball_on",
    "goal_to_go",
    "air_past_goal_line",
    "near_end_half",
];

/// True for snaps the completion model describes: passes with air yards.
pub fn applies(plays: &Plays, i: usize) -> bool {
    plays.kind[i] == Kind::Pass && plays.air_yards[i].is_some()
}

pub fn features(air: i32, down: i32, to_go: i32, ball_on: i32, secs_half: i32, out: &mut [f64]) {
    let (down, to_go) = if down == 0 { (1, 10) } else { (down, to_go) };
    let a = (air as f64).clamp(-15.0, 70.0);
    out[0] = 1.0;
    out[1] = a / 10.0;
    for (k, knot) in AIR_KNOTS.iter().enumerate() {
        out[2 + k] = (a - knot).max(0.0) / 10.0;
    }
    out[7] = (down == 2) as i32 as f64;
    out[8] = (down == 3) as i32 as f64;
    out[9] = (down == 4) as i32 as f64;
    out[10] = (to_go.max(1) as f64).ln();
    out[11] = ball_on as f64 / 100.0;
    out[12] = (ball_on + to_go >= 100) as i32 as f64;
    out[13] = (a - (100 - ball_on) as f64).max(0.0) / 10.0;
    out[14] = (120.0 - secs_half as f64).max(0.0) / 120.0;
}

fn snap_features(plays: &Plays, i: usize, out: &mut [f64]) {
    features(
        plays.air_yards[i].unwrap_or(0),
        plays.down[i],
        plays.to_go[i],
        plays.ball_on[i],
        plays.secs_half[i],
        out,
    )
}

#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct CpModel {
    pub features: Vec<String>,
    pub fit: logit::Fit,
}

/// Fit on the passes with air yards among `rows`; `None` when there are none
/// (a file without the optional `air_yards` column).
pub fn fit(
    plays: &Plays,
    rows: &[u32],
    opts: &FitOptions,
    init: Option<&CpModel>,
) -> Result<Option<CpModel>> {
    let train: Vec<u32> = rows
        .iter()
        .copied()
        .filter(|&i| applies(plays, i as usize))
        .collect();
    if train.is_empty() {
        return Ok(None);
    }
    let y: Vec<f64> = train
        .iter()
        .map(|&i| plays.complete[i as usize] as i32 as f64)
        .collect();
    let design = FnDesign {
        rows: &train,
        p: FEATURES.len(),
        f: |i: usize, out: &mut [f64]| snap_features(plays, i, out),
    };
    let fit = logit::fit_from(
        &design,
        Labels::Binary(&y),
        None,
        opts,
        init.map(|m| &m.fit),
    )
    .map_err(|source| ModelError::Fit { model: "completion model", rows: train.len(), what: "passes with air yards", source })?;
    Ok(Some(CpModel {
        features: FEATURES.iter().map(|s| s.to_string()).collect(),
        fit,
    }))
}

impl CpModel {
    /// Completion probability of every snap; NaN where the model does not apply.
    /// (On rayon's threads: each value is worked out alone, the same bits.)
    pub fn score_all(&self, plays: &Plays) -> Vec<f64> {
        use rayon::prelude::*;
        (0..plays.len())
            .into_par_iter()
            .with_min_len(super::ep::SCORE_CHUNK)
            .map(|i| {
                if applies(plays, i) {
                    // Every feature is written.
                    let mut x = [0.0; FEATURES.len()];
                    snap_features(plays, i, &mut x);
                    self.fit.prob(&x)
                } else {
                    f64::NAN
                }
            })
            .collect()
    }
}

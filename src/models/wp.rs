//! Win probability: a logistic model of the offense winning (ties count ½)
//! built on Stern's (1991) margin-over-root-time term, EP, timeouts, home
//! field and the pregame line; a margin-and-time baseline; WPA per snap.

use super::logit::{self, FitOptions, FnDesign, Labels};
use crate::playfile::Kind;
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Seconds of regulation.
const GAME_SECS: f64 = 3600.0;
/// Added to the fraction of the game left under the square root, so the
/// Stern term stays finite at 0:00 (0.01 of a game = 36 seconds).
const ROOT_TIME_OFFSET: f64 = 0.01;
/// Scale of a margin in points (Stern's standard deviation of a game's margin).
const MARGIN_SCALE: f64 = 13.86;
/// Clamp for probabilities fed to logarithms.
pub const P_EPS: f64 = 1e-6;

/// Which columns a win-probability model uses.
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq, Eq)]
#[serde(rename_all = "snake_case")]
pub enum WpKind {
    /// Everything: margin, time, EP, timeouts, home, overtime, line.
    Full,
    /// Margin and time only, for comparison.
    Baseline,
}

pub const FULL_FEATURES: [&str; 19] = [
    "intercept",
    "margin",
    "ep",
    "stern_margin",
    "stern_margin_ep_line",
    "line_time",
    "has_line",
    "time_left",
    "off_home",
    "overtime",
    "off_timeouts",
    "def_timeouts",
    "off_timeouts_late",
    "def_timeouts_late",
    "margin_late",
    "kickoff",
    "kickoff_time_left",
    "try",
    "stern_margin_ep_line_time",
];

pub const BASELINE_FEATURES: [&str; 4] = ["intercept", "margin", "stern_margin", "time_left"];

impl WpKind {
    pub fn features(self) -> &'static [&'static str] {
        match self {
            WpKind::Full => &FULL_FEATURES,
            WpKind::Baseline => &BASELINE_FEATURES,
        }
    }
}

/// The inputs of one situation, from the offense's side.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Situation {
    pub margin: f64,
    /// Seconds left in regulation (in overtime: in the period).
    pub secs_game: f64,
    pub overtime: bool,
    pub ep: f64,
    pub off_timeouts: f64,
    pub def_timeouts: f64,
    pub off_home: bool,
    /// Pregame expected margin of the offense, if the file has a line.
    pub line: Option<f64>,
    /// A kickoff (the file's offense is the kicking team).
    pub kickoff: bool,
    /// An extra-point or two-point try.
    pub is_try: bool,
}

impl Situation {
    pub fn of_snap(plays: &Plays, ep: &[f64], i: usize) -> Situation {
        let g = &plays.games[plays.game[i] as usize];
        Situation {
            margin: plays.margin[i] as f64,
            secs_game: plays.secs_game[i].max(0) as f64,
            overtime: plays.is_overtime(i),
            ep: ep[i],
            off_timeouts: plays.off_timeouts[i] as f64,
            def_timeouts: plays.def_timeouts[i] as f64,
            off_home: plays.off_home[i],
            line: g.home_line.map(|l| if plays.off_home[i] { l } else { -l }),
            kickoff: plays.kind[i] == Kind::Kickoff,
            is_try: plays.kind[i].is_try(),
        }
    }
}

/// Fill the features of `kind` for `s` into `out`.
pub fn features(kind: WpKind, s: &Situation, out: &mut [f64]) {
    let frac = (s.secs_game / GAME_SECS).clamp(0.0, 1.0);
    let root = (frac + ROOT_TIME_OFFSET).sqrt();
    let m = s.margin / MARGIN_SCALE;
    match kind {
        WpKind::Baseline => {
            out[0] = 1.0;
            out[1] = m;
            out[2] = m / root;
            out[3] = frac;
        }
        WpKind::Full => {
            let line = s.line.unwrap_or(0.0);
            let late = if s.overtime {
                0.0
            } else {
                (1.0 - s.secs_game / 300.0).max(0.0)
            };
            out[0] = 1.0;
            out[1] = m;
            out[2] = s.ep / 7.0;
            out[3] = m / root;
            out[4] = (s.margin + s.ep + line * frac) / MARGIN_SCALE / root;
            out[5] = line * frac / MARGIN_SCALE;
            out[6] = s.line.is_some() as i32 as f64;
            out[7] = frac;
            out[8] = s.off_home as i32 as f64;
            out[9] = s.overtime as i32 as f64;
            out[10] = s.off_timeouts / 3.0;
            out[11] = s.def_timeouts / 3.0;
            out[12] = s.off_timeouts / 3.0 * late;
            out[13] = s.def_timeouts / 3.0 * late;
            out[14] = m * late;
            out[15] = s.kickoff as i32 as f64;
            out[16] = s.kickoff as i32 as f64 * frac;
            out[17] = s.is_try as i32 as f64;
            // Lets the weight of the Stern term change with time left: early
            // in the game a margin or a line says less than late.
            out[18] = out[4] * frac;
        }
    }
}

/// A fitted win-probability model.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct WpModel {
    pub kind: WpKind,
    pub features: Vec<String>,
    pub fit: logit::Fit,
}

/// Fit on `rows` (indices into `plays`) with `ep` the EP before every snap.
pub fn fit(
    plays: &Plays,
    ep: &[f64],
    rows: &[u32],
    kind: WpKind,
    opts: &FitOptions,
    init: Option<&WpModel>,
) -> anyhow::Result<WpModel> {
    let names = kind.features();
    let y: Vec<f64> = rows
        .iter()
        .map(|&i| plays.offense_result(i as usize))
        .collect();
    let design = FnDesign {
        rows,
        p: names.len(),
        f: |i: usize, out: &mut [f64]| features(kind, &Situation::of_snap(plays, ep, i), out),
    };
    let fit = logit::fit_from(
        &design,
        Labels::Binary(&y),
        None,
        opts,
        init.map(|m| &m.fit),
    )
    .map_err(|e| {
        anyhow::anyhow!(
            "win-probability model ({kind:?}) on {} snaps: {e}",
            rows.len()
        )
    })?;
    Ok(WpModel {
        kind,
        features: names.iter().map(|s| s.to_string()).collect(),
        fit,
    })
}

impl WpModel {
    pub fn situation(&self, s: &Situation) -> f64 {
        let mut x = [0.0; FULL_FEATURES.len()];
        let p = self.features.len();
        features(self.kind, s, &mut x[..p]);
        self.fit.prob(&x[..p])
    }

    /// WP before every snap, from its offense's side.
    pub fn score_all(&self, plays: &Plays, ep: &[f64]) -> Vec<f64> {
        (0..plays.len())
            .map(|i| self.situation(&Situation::of_snap(plays, ep, i)))
            .collect()
    }
}

/// WPA per snap from the WP before every snap: WP after (the next snap's WP
/// in the same game, taken from this offense's side) minus WP before. After
/// a game's last snap, WP is the result: 1, 0 or ½.
pub fn wpa(plays: &Plays, wp: &[f64]) -> Vec<f64> {
    let n = plays.len();
    (0..n)
        .map(|i| {
            let after = if i + 1 < n && plays.game[i + 1] == plays.game[i] {
                if plays.offense[i + 1] == plays.offense[i] {
                    wp[i + 1]
                } else {
                    1.0 - wp[i + 1]
                }
            } else {
                plays.offense_result(i)
            };
            after - wp[i]
        })
        .collect()
}

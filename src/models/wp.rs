//! Win probability: a logistic model of the offense winning (ties count ½)
//! built on Stern's (1991) margin-over-root-time term, EP, home field and
//! the pregame line, with late-game terms (key margins against time left,
//! possession with time left, the line in the 4th period), overtime as its own
//! regime (each season's rule set, `crate::overtime`, solved with the
//! drive model's possessions: `drive::overtime`), clock-kill states set to 1 from the clock rules,
//! and the 4th period's drive-level Markov model (`drive`, which alone
//! sees the timeouts) as three inputs; the final seconds of regulation
//! from the kicking game and the clock (`super::finish`: a kick now as a
//! floor, the last snap's and a try's values);
//! a margin-and-time baseline; WPA per snap.

pub mod drive;

use super::clock::{ClockRules, KillState};
use crate::overtime::Rules;
use drive::overtime::{max_answer, Phase};
use drive::{DriveModel, DriveParams};
use super::finish::{Finish, Late};
use super::error::{ModelError, Result};
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

/// Seconds of the late-game window the key-margin terms work in (the final
/// 10:00 of regulation) and of the final stretch (3:00).
const LATE_SECS: f64 = 600.0;
const FINAL_SECS: f64 = 180.0;
/// Key margins: a field goal, one score, two scores.
pub const KEY_MARGINS: [f64; 3] = [3.0, 8.0, 16.0];
/// Seconds over the burnable time over which `kill_near` fades to 0.
const KILL_FADE: f64 = 120.0;
/// Seconds over which the drive model's logit comes in from the start of
/// the 4th period, and over which the line's own term comes in before it
/// (the final 5:00 of the 3rd): no seam in WP at the period break.
const DRIVE_IN_SECS: f64 = 180.0;
const LINE_IN_SECS: f64 = 300.0;

pub const FULL_FEATURES: [&str; 29] = [
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
    "margin_late",
    "kickoff",
    "kickoff_time_left",
    "try",
    "stern_margin_ep_line_time",
    "late_margin3",
    "late_margin8",
    "late_margin16",
    "final_margin3",
    "final_margin8",
    "final_margin16",
    "late_ep",
    "final_ep",
    "kill_near",
    "drive_logit_15",
    "drive_logit_10",
    "drive_logit_3",
    "ot_drive_logit",
    "line_final_period",
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
    /// Period (5 and up: overtime).
    pub period: i32,
    /// 0 on kickoffs and tries.
    pub down: i32,
    /// Yards to go (0 without a down).
    pub to_go: i32,
    pub ball_on: i32,
    /// Overtime, first possession: the defense has not had the ball yet in
    /// this period.
    pub ot_first: bool,
    /// Overtime: both teams have had a possession before this one.
    pub ot_both: bool,
    /// The overtime rules of the snap's season (`Plays::overtime`).
    pub ot_rules: Rules,
}

/// (first possession, both had the ball) in the overtime period of snap
/// `i`, from the snaps of that period before it; (false, false) in
/// regulation.
fn ot_possessions(plays: &Plays, i: usize) -> (bool, bool) {
    if !plays.is_overtime(i) {
        return (false, false);
    }
    let (mut def_had, mut off_before) = (false, false);
    let mut j = i;
    while j > 0 && plays.game[j - 1] == plays.game[i] && plays.period[j - 1] == plays.period[i] {
        j -= 1;
        if plays.down[j] > 0 {
            if plays.offense[j] == plays.defense[i] {
                def_had = true;
            } else if plays.drive[j] != plays.drive[i] {
                off_before = true;
            }
        }
    }
    (!def_had, def_had && off_before)
}

impl Situation {
    pub fn of_snap(plays: &Plays, ep: &[f64], i: usize) -> Situation {
        let g = &plays.games[plays.game[i] as usize];
        let (ot_first, ot_both) = ot_possessions(plays, i);
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
            period: plays.period[i],
            down: plays.down[i],
            to_go: plays.to_go[i],
            ball_on: plays.ball_on[i],
            ot_first,
            ot_both,
            ot_rules: plays.overtime.rules_for(plays.season[i]),
        }
    }

    /// The clock-kill facts of this situation.
    pub fn kill_state(&self) -> KillState {
        KillState {
            period: self.period,
            clock: self.secs_game.round() as i32,
            down: self.down,
            margin: self.margin.round() as i32,
            ball_on: self.ball_on,
            def_timeouts: self.def_timeouts.round() as i32,
        }
    }
}

/// Clamp of the drive model's logit (P within about 0.0025 of 0 or 1).
const DRIVE_LOGIT_MAX: f64 = 6.0;
/// The yard line a kickoff or a try hands the ball over at, for the drive
/// model (the touchback line).
const RECEIVE_AT: f64 = 25.0;

/// The drive model's logit of the offense winning, in the 4th period (0
/// elsewhere, and without a drive model). A kickoff or a try is valued from
/// the receiving side, after the try's expected points (its EP).
pub fn drive_logit(s: &Situation, drive: Option<&DriveModel>) -> f64 {
    let Some(d) = drive else { return 0.0 };
    if s.overtime || s.secs_game > f64::from(drive::SPAN_SECS) {
        return 0.0;
    }
    let t = d.table();
    let (off_to, def_to) = (s.off_timeouts.round() as i32, s.def_timeouts.round() as i32);
    let p = if s.kickoff {
        1.0 - t.value(-s.margin, s.secs_game, RECEIVE_AT, def_to, off_to)
    } else if s.is_try {
        1.0 - t.value(-(s.margin + s.ep), s.secs_game, RECEIVE_AT, def_to, off_to)
    } else {
        // The rest of this drive from its down and distance, one
        // possession on (`drive::snap`), in the final 10:00; the value at
        // a possession's start before, and where no snap was seen like it.
        // (The start's value only where it has a say.)
        let start = || t.value(s.margin, s.secs_game, f64::from(s.ball_on), off_to, def_to);
        let w = drive::snap::weight(s.secs_game);
        match (w > 0.0).then(|| d.params.snaps.value(t, &snap_of(s))).flatten() {
            Some(rest) if w >= 1.0 => rest,
            Some(rest) => w * rest + (1.0 - w) * start(),
            None => start(),
        }
    };
    let p = p.clamp(P_EPS, 1.0 - P_EPS);
    (p / (1.0 - p)).ln().clamp(-DRIVE_LOGIT_MAX, DRIVE_LOGIT_MAX)
}

/// `s` as the rest-of-drive model reads it.
fn snap_of(s: &Situation) -> drive::snap::Snap {
    drive::snap::Snap {
        margin: s.margin,
        secs: s.secs_game,
        ball_on: s.ball_on,
        down: s.down,
        to_go: s.to_go,
        off_to: s.off_timeouts.round() as i32,
        def_to: s.def_timeouts.round() as i32,
    }
}

/// The overtime model's logit of the offense winning (0 in regulation, and
/// without a drive model), under the season's rules (`Situation::ot_rules`).
/// The phase comes from the margin and who has had the ball; a kickoff is
/// valued from the receiving side.
pub fn overtime_logit(s: &Situation, drive: Option<&DriveModel>) -> f64 {
    let Some(d) = drive else { return 0.0 };
    if !s.overtime {
        return 0.0;
    }
    let t = d.overtime_for(&s.ot_rules);
    let most = max_answer(s.ot_rules.rule);
    let phase = |margin: f64, first: bool| {
        let m = margin.round() as i32;
        if m == 0 {
            Some(if first { Phase::First } else { Phase::Sudden })
        } else if m < 0 && -m <= most {
            Some(Phase::Answer(-m))
        } else {
            None
        }
    };
    // Who would be in which phase: the kicking side kicks to the receiver,
    // who is on its first possession when the margin is level and nobody
    // has had the ball (the receiver has not: `ot_first`).
    let p = if s.kickoff || s.is_try {
        let m = if s.is_try { s.margin + s.ep } else { s.margin };
        match phase(-m, s.ot_first) {
            Some(ph) => 1.0 - t.value(ph, s.secs_game, RECEIVE_AT),
            None => (m > 0.0) as i32 as f64,
        }
    } else {
        match phase(s.margin, s.ot_first) {
            // The rest of this drive from its down and distance, as in
            // regulation (`drive_logit`).
            Some(ph) => d
                .params
                .snaps
                .overtime_value(&t, ph, s.secs_game, &snap_of(s))
                .unwrap_or_else(|| t.value(ph, s.secs_game, f64::from(s.ball_on))),
            None => (s.margin > 0.0) as i32 as f64,
        }
    };
    let p = p.clamp(P_EPS, 1.0 - P_EPS);
    (p / (1.0 - p)).ln().clamp(-DRIVE_LOGIT_MAX, DRIVE_LOGIT_MAX)
}

/// Fill the features of `kind` for `s` into `out`; `rules` place the
/// situation against the clock-kill line (`kill_near`); `drive` gives the
/// 4th period's drive-model terms.
pub fn features(kind: WpKind, s: &Situation, rules: &ClockRules, drive: Option<&DriveModel>, out: &mut [f64]) {
    let dl = match kind {
        WpKind::Full => drive_logit(s, drive),
        WpKind::Baseline => 0.0,
    };
    features_given(kind, s, rules, drive, dl, out)
}

/// `features` with the drive logit (`drive_logit` of `s` and `drive`)
/// worked out already: the fit reads every row once per pass.
fn features_given(kind: WpKind, s: &Situation, rules: &ClockRules, drive: Option<&DriveModel>, dl: f64, out: &mut [f64]) {
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
            // Timeouts enter through the drive model alone, which counts
            // possessions by them. Fitted on outcomes, terms of their own
            // (each side's, against the final 5:00, by who leads in the
            // final 10:00) took the wrong sign: level with 60 s left at the
            // own 20, the defense's 0 to 3 timeouts took the offense's WP
            // from 0.44 to 0.56. Without them, held out by season, the
            // distance to the oracle went from 0.00659 / 0.00614 / 0.00605
            // to 0.00601 / 0.00615 / 0.00577 (seeds 7 / 101 / 202).
            out[10] = m * late;
            out[11] = s.kickoff as i32 as f64;
            out[12] = s.kickoff as i32 as f64 * frac;
            out[13] = s.is_try as i32 as f64;
            // Lets the weight of the Stern term change with time left: early
            // in the game a margin or a line says less than late.
            out[14] = out[4] * frac;
            // The late game: each key margin (a clamp at ±k, so monotone in
            // the margin) against the final 10:00 and the final 3:00.
            let reg = !s.overtime as i32 as f64;
            let late10 = reg * (1.0 - s.secs_game / LATE_SECS).max(0.0);
            let late3 = reg * (1.0 - s.secs_game / FINAL_SECS).max(0.0);
            for (k, key) in KEY_MARGINS.iter().enumerate() {
                let c = s.margin.clamp(-key, *key) / key;
                out[15 + k] = c * late10;
                out[18 + k] = c * late3;
            }
            // Possession: the ball's worth as time runs out, and how near
            // the offense is to kneeling the game out.
            out[21] = s.ep / 7.0 * late10;
            out[22] = s.ep / 7.0 * late3;
            out[23] = match rules.excess(&s.kill_state()) {
                Some(e) => (1.0 - e.max(0.0) / KILL_FADE).max(0.0),
                None => 0.0,
            };
            // The drive model over the whole 4th period, with more say as
            // the final 10:00 and 3:00 run out (ramps, as the key margins:
            // held out by season, on seeds 101 / 202, ramps took the gain
            // over the baseline from 11.3% / 8.9% with window flags to
            // 11.6% / 9.1%, the distance to the oracle 0.0070 to 0.0068).
            // It comes in over the period's first 3:00: switched on at the
            // break, it moved WP there by up to 0.01; coming in, the late &
            // close figures moved by at most 0.00002 in distance.
            let span = f64::from(drive::SPAN_SECS);
            out[24] = dl * ((span - s.secs_game) / DRIVE_IN_SECS).clamp(0.0, 1.0);
            out[25] = dl * late10;
            out[26] = dl * late3;
            // Overtime as its own regime: its rules (`drive::overtime`)
            // played with the drive model's possessions, beside the
            // overtime flag. In place of six terms (margin, EP, first
            // possession and its EP, both had the ball, time left), held out
            // by season it took the gain over the baseline from 10.8% /
            // 11.6% / 9.1% to 11.2% / 11.8% / 9.2% (seeds 7 / 101 / 202),
            // the distance to the oracle 0.00718 / 0.00674 / 0.00672 to
            // 0.00716 / 0.00662 / 0.00675; added beside the six, it did
            // nothing (0.00727 / 0.00674 / 0.00674).
            out[27] = overtime_logit(s, drive);
            // The line where the drive model speaks (4th period of
            // regulation, coming in over the final 5:00 of the 3rd): that
            // model counts every club's possessions alike, and the Stern
            // term's line fades with the clock, so a favourite's edge went
            // missing late. Held out by season, it took the mean squared
            // distance to the oracle from 0.00637 / 0.00643 / 0.00683 to
            // 0.00614 / 0.00605 / 0.00659 (seeds 101 / 202 / 7) and the
            // gain over the baseline from 12.0% / 9.4% / 11.2% to 12.6% /
            // 9.8% / 11.2%. As a step at the period break (0.00613 /
            // 0.00603 / 0.00659) WP jumped there by up to 0.03 for a
            // 10-point favourite; coming in over the whole 3rd period, as
            // a ramp over the final 10:00 or in overtime it did no better.
            let line_in = reg * ((span + LINE_IN_SECS - s.secs_game) / LINE_IN_SECS).clamp(0.0, 1.0);
            out[28] = line / MARGIN_SCALE * line_in;
        }
    }
}

/// A fitted win-probability model.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct WpModel {
    pub kind: WpKind,
    pub features: Vec<String>,
    pub fit: logit::Fit,
    /// The clock as the file implies it; the full model's clock-kill
    /// states have WP 1 (the baseline ignores them).
    #[serde(default)]
    pub clock: ClockRules,
    /// The 4th period's drive model (full model only; its table is solved
    /// from the kept shares on first use, after a cache load too).
    #[serde(default)]
    pub drive: Option<DriveModel>,
    /// The final seconds' rules (full model only): a kick now as a floor,
    /// the last snap's and a try's values (`super::finish`).
    #[serde(default)]
    pub finish: Option<Finish>,
}

/// Fit on `rows` (indices into `plays`) with `ep` the EP before every snap.
pub fn fit(
    plays: &Plays,
    ep: &[f64],
    rows: &[u32],
    kind: WpKind,
    opts: &FitOptions,
    init: Option<&WpModel>,
) -> Result<WpModel> {
    let (drive, finish) = match kind {
        WpKind::Full => (drive_model(plays, rows), Finish::estimate(plays, rows)),
        WpKind::Baseline => (None, None),
    };
    fit_with(plays, ep, rows, kind, opts, init, drive, finish)
}

/// The full model's drive model from `rows`, its table solved on the
/// calling thread: it reads no EP, so it can be built beside the EP fit.
/// `None` when a zone has no drive to learn from.
pub fn drive_model(plays: &Plays, rows: &[u32]) -> Option<DriveModel> {
    let t = std::time::Instant::now();
    let m = DriveParams::estimate(plays, rows).map(DriveModel::solved_serially);
    tracing::debug!("drive model estimated and solved in {:.0} ms", t.elapsed().as_secs_f64() * 1000.0);
    m
}

/// `fit` with the drive model and the final seconds' chances given
/// (`drive_model` and `Finish::estimate` of the same rows, the EP model's
/// own; the baseline keeps neither).
#[allow(clippy::too_many_arguments)]
pub fn fit_with(
    plays: &Plays,
    ep: &[f64],
    rows: &[u32],
    kind: WpKind,
    opts: &FitOptions,
    init: Option<&WpModel>,
    drive: Option<DriveModel>,
    finish: Option<Finish>,
) -> Result<WpModel> {
    let names = kind.features();
    let y: Vec<f64> = rows
        .iter()
        .map(|&i| plays.offense_result(i as usize))
        .collect();
    let rules = ClockRules::from_plays(plays, rows);
    let drive = drive.filter(|_| kind == WpKind::Full);
    let dm = drive.as_ref();
    if let Some(d) = dm {
        d.table();
    }
    // Each row's drive logit once, not once per pass of the fit (late in
    // the 4th it sums the outcomes of two cells: `drive::snap`).
    let mut dl = vec![0.0; plays.len()];
    if dm.is_some() {
        use rayon::prelude::*;
        let worked: Vec<(u32, f64)> = rows
            .par_iter()
            .with_min_len(super::ep::SCORE_CHUNK)
            .filter(|&&i| plays.period[i as usize] == 4)
            .map(|&i| (i, drive_logit(&Situation::of_snap(plays, ep, i as usize), dm)))
            .collect();
        for (i, v) in worked {
            dl[i as usize] = v;
        }
    }
    let design = FnDesign {
        rows,
        p: names.len(),
        f: |i: usize, out: &mut [f64]| {
            features_given(kind, &Situation::of_snap(plays, ep, i), &rules, dm, dl[i], out)
        },
    };
    // The late game is shaped by interactions and the drive and overtime
    // models, not weights: on the demo league, weighing the final 10:00 and
    // overtime 3x moved the held-out late-and-close Brier gain over the
    // baseline from 10.5% to 10.4%. Again with the drive model's timeouts
    // (seeds 7 / 101 / 202, gain and distance to the oracle): unweighted
    // 10.8% / 11.6% / 9.1%, 0.00719 / 0.00675 / 0.00673; the final 10:00
    // and overtime 3x 10.6% / 11.6% / 9.1%, 0.00726 / 0.00676 / 0.00658;
    // the final 7:30 and overtime 2x 10.7% / 11.6% / 9.1%, 0.00724 /
    // 0.00676 / 0.00664. Closer on one league, further on the others.
    let fit = logit::fit_from(
        &design,
        Labels::Binary(&y),
        None,
        opts,
        init.map(|m| &m.fit),
    )
    .map_err(|source| ModelError::Fit {
        model: match kind {
            WpKind::Full => "win-probability model",
            WpKind::Baseline => "margin-and-time win-probability model",
        },
        rows: rows.len(),
        what: "snaps",
        source,
    })?;
    let finish = finish.filter(|_| kind == WpKind::Full);
    Ok(WpModel {
        kind,
        features: names.iter().map(|s| s.to_string()).collect(),
        fit,
        clock: rules,
        drive,
        finish,
    })
}

impl WpModel {
    /// The offense's WP: 1 in a clock-kill state (full model), else the
    /// fit, in the 4th period's final seconds with the rules of
    /// `super::finish`.
    pub fn situation(&self, s: &Situation) -> f64 {
        if self.kind == WpKind::Full && self.clock.kneel_out(&s.kill_state()) {
            return 1.0;
        }
        let mut x = [0.0; FULL_FEATURES.len()];
        let p = self.features.len();
        features(self.kind, s, &self.clock, self.drive.as_ref(), &mut x[..p]);
        let wp = self.fit.prob(&x[..p]);
        match (&self.finish, &self.drive) {
            (Some(f), Some(d)) if s.period == 4 && !s.overtime && (s.down > 0 || s.is_try) && s.secs_game <= f64::from(drive::SPAN_SECS) => {
                let late = Late { margin: s.margin, secs: s.secs_game, ball_on: s.ball_on, is_try: s.is_try };
                let (off_to, def_to) = (s.off_timeouts.round() as i32, s.def_timeouts.round() as i32);
                let t = d.table();
                let other = |m: f64, secs: f64, at: f64| t.value(m, secs, at, def_to, off_to);
                let v = f.apply(&late, RECEIVE_AT, other, wp);
                // The final snaps at the goal line: the value for a side
                // behind or level, a floor for one ahead (it may play so
                // too), so WP still rises with the margin.
                let w = f.snaps_weight(s.secs_game, s.ball_on);
                if w == 0.0 || s.is_try || s.down <= 0 {
                    return v;
                }
                let snaps = f.final_snaps(&late, s.down, off_to, RECEIVE_AT, &other);
                if s.margin <= 0.0 {
                    w * snaps + (1.0 - w) * v
                } else {
                    v + w * (snaps - v).max(0.0)
                }
            }
            _ => wp,
        }
    }

    /// WP before every snap, from its offense's side.
    /// (On rayon's threads: each value is worked out alone, the same bits.)
    pub fn score_all(&self, plays: &Plays, ep: &[f64]) -> Vec<f64> {
        use rayon::prelude::*;
        (0..plays.len())
            .into_par_iter()
            .with_min_len(super::ep::SCORE_CHUNK)
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

//! Expected points: a multinomial logistic model of the next score in the
//! half (Yurko, Ventura & Horowitz 2019), EP = sum of class probability times
//! class points; kickoff, free-kick and try values; EPA per snap, with
//! touchdowns, tries and safeties credited in full. In a half's final
//! seconds EP is the points of the last play (`super::finish`).

use super::error::{ModelError, Result};
use super::finish::Finish;
use super::logit::{self, FitOptions, FnDesign, Labels};
use crate::playfile::Kind;
use crate::plays::{NextScore, Plays};
use serde::{Deserialize, Serialize};

/// Knots (yards from own goal) of the piecewise-linear field-position basis.
const BALL_KNOTS: [f64; 9] = [10.0, 20.0, 30.0, 40.0, 50.0, 60.0, 70.0, 80.0, 90.0];

/// Names of the model's columns, in order.
pub const FEATURES: [&str; 28] = [
    "intercept",
    "ball_on",
    "ball_on_10",
    "ball_on_20",
    "ball_on_30",
    "ball_on_40",
    "ball_on_50",
    "ball_on_60",
    "ball_on_70",
    "ball_on_80",
    "ball_on_90",
    "down2",
    "down3",
    "down4",
    "log_to_go",
    "down2_log_to_go",
    "down3_log_to_go",
    "down4_log_to_go",
    "goal_to_go",
    "secs_half",
    "near_end_half",
    "ball_on_near_end",
    "down3_ball_on",
    "down4_ball_on",
    "lead_final4",
    "lead_final4_margin",
    "behind_final2",
    "tied_final2",
];

/// The score and period a snap is played in, which EP uses where they
/// change how a half ends: the four-minute offense (ahead in the final
/// 4:00 of the 4th period runs the clock) and the final 2:00 of the 4th
/// when behind or tied.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ScoreClock {
    /// The offense's margin.
    pub margin: i32,
    pub period: i32,
}

impl ScoreClock {
    /// Tied in the 1st period: no late-game term applies.
    pub const NEUTRAL: ScoreClock = ScoreClock { margin: 0, period: 1 };

    /// Snap `i` from its offense's side.
    pub fn of_snap(plays: &Plays, i: usize) -> ScoreClock {
        ScoreClock { margin: plays.margin[i], period: plays.period[i] }
    }

    /// The same moment from the other team's side.
    pub fn flipped(self) -> ScoreClock {
        ScoreClock { margin: -self.margin, ..self }
    }
}

/// Seconds of the four-minute offense and of the final drive window.
const FOUR_MINUTE_SECS: f64 = 240.0;
const TWO_MINUTE_SECS: f64 = 120.0;

/// The next-score class index used as the reference (no further score).
pub const REFERENCE: usize = NextScore::NoScore as usize;

/// League try values used when a file holds no tries of a kind.
const DEFAULT_XP: f64 = 0.94;
const DEFAULT_TWO: f64 = 0.95;

/// A fitted expected-points model.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct EpModel {
    pub fit: logit::Fit,
    pub features: Vec<String>,
    /// Value of a touchdown: 6 + `try_mean`.
    pub td_value: f64,
    /// Mean points of all tries in the file.
    pub try_mean: f64,
    /// Mean points of extra-point and two-point tries (for reference; a
    /// try snap's EP is `try_mean`, the value its touchdown was credited).
    pub xp_mean: f64,
    pub two_mean: f64,
    /// Mean next-score value over kickoffs from the side of the team the file
    /// lists as offense on the kickoff (the kicking team).
    pub kickoff_ep: f64,
    /// A kickoff snap's EP is `kickoff_a + kickoff_b * EP(the receiving
    /// team's 1st and 10 at its own KICKOFF_REF_SPOT with the same time left
    /// in the half and its margin)`, fit by least
    /// squares over kickoffs on what each was worth to the kicking team (its
    /// points, else minus the receiving team's EP on the next snap): so
    /// kickoff EPA averages zero and kickoff EP fades as the half runs out.
    pub kickoff_a: f64,
    pub kickoff_b: f64,
    /// Added to `kickoff` for a free kick after a safety (kicked from
    /// deeper): the mean of what free kicks were worth to the kicking team
    /// minus the kickoff fit, over the free kicks among the rows (0 when
    /// there were none).
    #[serde(default)]
    pub free_kick_shift: f64,
    /// The final seconds of a half (`super::finish`): there a snap's EP is
    /// the points of the last play a staff runs. The fit alone put 1st &
    /// 10 at the opponent's 5 with 1 s left in the half at 4.6.
    #[serde(default)]
    pub finish: Option<Finish>,
}

/// A safety: a snap other than a try that scored two points for either side.
pub fn is_safety(plays: &Plays, i: usize) -> bool {
    plays.points[i].abs() == 2 && !plays.kind[i].is_try()
}

/// A free kick: a kickoff right after a safety in the same game.
pub fn is_free_kick(plays: &Plays, i: usize) -> bool {
    plays.kind[i] == Kind::Kickoff && i > 0 && plays.game[i - 1] == plays.game[i] && is_safety(plays, i - 1)
}

/// What a kickoff was worth to the kicking team, as EPA will credit it:
/// its points plus the EP of the next snap in the half from the kicking
/// team's side (a try after a return touchdown counts `try_mean`; 0 when
/// the half ends or another kickoff follows).
fn kickoff_target(model: &EpModel, plays: &Plays, i: usize) -> f64 {
    let points = plays.points[i] as f64;
    let j = i + 1;
    if j >= plays.len()
        || plays.game[j] != plays.game[i]
        || plays.half(j) != plays.half(i)
        || plays.kind[j] == Kind::Kickoff
    {
        return points;
    }
    let ep = if plays.kind[j].is_try() {
        model.try_mean
    } else {
        model.snap(plays, j)
    };
    points
        + if plays.offense[j] == plays.offense[i] {
            ep
        } else {
            -ep
        }
}

/// Fewest snaps a thread scores at a time (`score_all` and the like).
pub(crate) const SCORE_CHUNK: usize = 4096;

/// Field position (own yard line) of the reference snap for kickoff EP.
pub const KICKOFF_REF_SPOT: i32 = 25;

/// Features of one snap (down 0 is scored as 1st and 10).
pub fn features(down: i32, to_go: i32, ball_on: i32, secs_half: i32, sc: ScoreClock, out: &mut [f64]) {
    let (down, to_go) = if down == 0 { (1, 10) } else { (down, to_go) };
    let ball = ball_on.clamp(1, 99) as f64;
    let b = ball / 100.0;
    let lt = (to_go.max(1) as f64).ln();
    let d2 = (down == 2) as i32 as f64;
    let d3 = (down == 3) as i32 as f64;
    let d4 = (down == 4) as i32 as f64;
    let ne = (120.0 - secs_half as f64).max(0.0) / 120.0;
    out[0] = 1.0;
    out[1] = b;
    for (k, knot) in BALL_KNOTS.iter().enumerate() {
        out[2 + k] = (ball - knot).max(0.0) / 100.0;
    }
    out[11] = d2;
    out[12] = d3;
    out[13] = d4;
    out[14] = lt;
    out[15] = d2 * lt;
    out[16] = d3 * lt;
    out[17] = d4 * lt;
    out[18] = (ball_on + to_go >= 100) as i32 as f64;
    out[19] = secs_half.max(0) as f64 / 1800.0;
    out[20] = ne;
    out[21] = b * ne;
    out[22] = d3 * b;
    out[23] = d4 * b;
    // The 4th period: ahead late, the offense runs the clock (the more it
    // leads, the less it needs to score); behind or tied, it must score.
    let q4 = (sc.period == 4) as i32 as f64;
    let four = q4 * (1.0 - secs_half as f64 / FOUR_MINUTE_SECS).max(0.0);
    let two = q4 * (1.0 - secs_half as f64 / TWO_MINUTE_SECS).max(0.0);
    let ahead = (sc.margin > 0) as i32 as f64;
    out[24] = four * ahead;
    out[25] = four * sc.margin.clamp(0, 16) as f64 / 8.0;
    out[26] = two * (sc.margin < 0) as i32 as f64;
    out[27] = two * (sc.margin == 0) as i32 as f64;
}

/// Fit on the snaps with a down among `rows` (indices into `plays`); the
/// constants come from the kickoffs and tries among `rows`.
pub fn fit(
    plays: &Plays,
    rows: &[u32],
    opts: &FitOptions,
    init: Option<&EpModel>,
) -> Result<EpModel> {
    let sub = |kind: Kind| -> Option<f64> {
        let (mut s, mut n) = (0.0, 0usize);
        for &i in rows {
            let i = i as usize;
            if plays.kind[i] == kind {
                s += plays.points[i] as f64;
                n += 1;
            }
        }
        (n > 0).then(|| s / n as f64)
    };
    let xp = sub(Kind::ExtraPoint);
    let two = sub(Kind::TwoPoint);
    let (mut ts, mut tn) = (0.0, 0usize);
    for &i in rows {
        let i = i as usize;
        if plays.kind[i].is_try() {
            ts += plays.points[i] as f64;
            tn += 1;
        }
    }
    let try_mean = if tn > 0 { ts / tn as f64 } else { DEFAULT_XP };
    let td_value = 6.0 + try_mean;

    // The fit leaves out the snaps the last play's value stands for (see
    // `situation_in`): held out by season, the final 2:00 of a half's mean
    // EP went from 1.32 to 1.35 (1.44 followed, band 1.38-1.49).
    let finish = Finish::estimate(plays, rows);
    let last_from = finish.as_ref().map_or(0.0, |f| f.last_from_secs());
    let train: Vec<u32> = rows
        .iter()
        .copied()
        .filter(|&i| plays.down[i as usize] > 0 && f64::from(plays.secs_half[i as usize]) >= last_from)
        .collect();
    let y: Vec<u8> = train
        .iter()
        .map(|&i| plays.next_score[i as usize].index() as u8)
        .collect();
    let design = FnDesign {
        rows: &train,
        p: FEATURES.len(),
        f: |i: usize, out: &mut [f64]| {
            features(
                plays.down[i],
                plays.to_go[i],
                plays.ball_on[i],
                plays.secs_half[i],
                ScoreClock::of_snap(plays, i),
                out,
            )
        },
    };
    let labels = Labels::Classes {
        y: &y,
        classes: NextScore::ALL.len(),
        reference: REFERENCE,
    };
    let fit = logit::fit_from(&design, labels, None, opts, init.map(|m| &m.fit)).map_err(|source| {
        ModelError::Fit { model: "expected-points model", rows: train.len(), what: "snaps with a down", source }
    })?;
    let mut model = EpModel {
        fit,
        features: FEATURES.iter().map(|s| s.to_string()).collect(),
        td_value,
        try_mean,
        xp_mean: xp.unwrap_or(DEFAULT_XP),
        two_mean: two.unwrap_or(DEFAULT_TWO),
        kickoff_ep: 0.0,
        kickoff_a: 0.0,
        kickoff_b: 0.0,
        free_kick_shift: 0.0,
        finish,
    };
    // Kickoffs: least squares of the next-score value on the reference EP.
    let (mut xs, mut ys) = (Vec::new(), Vec::new());
    for &i in rows {
        let i = i as usize;
        if plays.kind[i] == Kind::Kickoff {
            xs.push(model.kickoff_reference(plays.secs_half[i], ScoreClock::of_snap(plays, i)));
            ys.push(kickoff_target(&model, plays, i));
        }
    }
    if !ys.is_empty() {
        let n = ys.len() as f64;
        let (mx, my) = (xs.iter().sum::<f64>() / n, ys.iter().sum::<f64>() / n);
        let sxx: f64 = xs.iter().map(|x| (x - mx) * (x - mx)).sum();
        let sxy: f64 = xs.iter().zip(&ys).map(|(x, y)| (x - mx) * (y - my)).sum();
        let b = if sxx > 1e-9 * n { sxy / sxx } else { 0.0 };
        model.kickoff_ep = rows
            .iter()
            .filter(|&&i| plays.kind[i as usize] == Kind::Kickoff)
            .map(|&i| plays.next_score[i as usize].points(td_value))
            .sum::<f64>()
            / n;
        model.kickoff_b = b;
        model.kickoff_a = my - b * mx;
        let (mut fs, mut fnn) = (0.0, 0usize);
        for &i in rows {
            let i = i as usize;
            if is_free_kick(plays, i) {
                fs += kickoff_target(&model, plays, i) - model.kickoff(plays.secs_half[i], ScoreClock::of_snap(plays, i));
                fnn += 1;
            }
        }
        if fnn > 0 {
            model.free_kick_shift = fs / fnn as f64;
        }
    }
    Ok(model)
}

impl EpModel {
    /// Probabilities of the next score in the half (by `NextScore::index`)
    /// in a down-and-distance situation, from the offense's side.
    pub fn next_probs(&self, down: i32, to_go: i32, ball_on: i32, secs_half: i32, sc: ScoreClock) -> [f64; 7] {
        let mut x = [0.0; FEATURES.len()];
        let mut q = [0.0; 7];
        features(down, to_go, ball_on, secs_half, sc, &mut x);
        self.fit.probs(&x, &mut q);
        q
    }

    /// EP of a down-and-distance situation from the offense's side; in a
    /// half's final seconds, the points of its last play (`finish`).
    pub fn situation_in(&self, down: i32, to_go: i32, ball_on: i32, secs_half: i32, sc: ScoreClock) -> f64 {
        let q = self.next_probs(down, to_go, ball_on, secs_half, sc);
        let ep = NextScore::ALL
            .iter()
            .map(|c| q[c.index()] * c.points(self.td_value))
            .sum();
        match &self.finish {
            Some(f) if down > 0 => {
                let secs = f64::from(secs_half);
                // The final snaps at the goal line.
                let near = f.points_weight(sc.period, sc.margin, secs, ball_on);
                let ep = if near > 0.0 {
                    near * f.final_points(ball_on, secs, down, self.td_value) + (1.0 - near) * ep
                } else {
                    ep
                };
                let w = f.last_weight(secs);
                if w > 0.0 {
                    w * f.last_points(sc.period, sc.margin, ball_on, self.td_value) + (1.0 - w) * ep
                } else {
                    ep
                }
            }
            _ => ep,
        }
    }

    /// `situation_in` tied in the 1st period (no late-game term).
    pub fn situation(&self, down: i32, to_go: i32, ball_on: i32, secs_half: i32) -> f64 {
        self.situation_in(down, to_go, ball_on, secs_half, ScoreClock::NEUTRAL)
    }

    /// The EP a kickoff's value is fit on: the receiving team's 1st and 10
    /// at its own KICKOFF_REF_SPOT with the same time left (`sc` is the
    /// kicking team's).
    fn kickoff_reference(&self, secs_half: i32, sc: ScoreClock) -> f64 {
        self.situation_in(1, 10, KICKOFF_REF_SPOT, secs_half, sc.flipped())
    }

    /// EP of a kickoff with `secs_half` left, from the kicking team's side
    /// (`sc` is the kicking team's score and period).
    pub fn kickoff(&self, secs_half: i32, sc: ScoreClock) -> f64 {
        self.kickoff_a + self.kickoff_b * self.kickoff_reference(secs_half, sc)
    }

    /// EP of a free kick after a safety, from the kicking team's side.
    pub fn free_kick(&self, secs_half: i32, sc: ScoreClock) -> f64 {
        self.kickoff(secs_half, sc) + self.free_kick_shift
    }

    /// EP before snap `i`, from its offense's side. A try's EP is the mean
    /// try, the value its touchdown was credited with (see `epa`).
    pub fn snap(&self, plays: &Plays, i: usize) -> f64 {
        self.snap_as(plays, i, ScoreClock::of_snap(plays, i))
    }

    fn snap_as(&self, plays: &Plays, i: usize, sc: ScoreClock) -> f64 {
        match plays.kind[i] {
            Kind::Kickoff if is_free_kick(plays, i) => self.free_kick(plays.secs_half[i], sc),
            Kind::Kickoff => self.kickoff(plays.secs_half[i], sc),
            Kind::ExtraPoint | Kind::TwoPoint => self.try_mean,
            _ => self.situation_in(plays.down[i], plays.to_go[i], plays.ball_on[i], plays.secs_half[i], sc),
        }
    }

    /// EP before every snap.
    /// (On rayon's threads: each value is worked out alone, the same bits.)
    pub fn score_all(&self, plays: &Plays) -> Vec<f64> {
        use rayon::prelude::*;
        (0..plays.len()).into_par_iter().with_min_len(SCORE_CHUNK).map(|i| self.snap(plays, i)).collect()
    }

    /// EP before every snap as if the score were level early in the game
    /// (no four-minute or final-2:00 term): the value of the ball that win
    /// probability takes. WP has its own margin-and-time terms; fed the
    /// score-aware EP, its WP fell as the lead grew in the four-minute
    /// offense and its held-out late-and-close Brier gain went from 10.5% to
    /// 10.1% on the demo league.
    /// `(score_all, score_all_blind)` in one go: the score and period
    /// change a snap's EP only in the 4th period's final 4:00 (before that
    /// every late-game feature is +0 either way) and where the final snaps
    /// at the goal line count (`Finish::points_weight`), so
    /// elsewhere the blind value is the snap's EP, the same bits.
    pub fn score_all_and_blind(&self, plays: &Plays) -> (Vec<f64>, Vec<f64>) {
        use rayon::prelude::*;
        let blind = self.score_all_blind(plays);
        let told = |i: usize| {
            let secs = f64::from(plays.secs_half[i]);
            let near = |f: &Finish| f.points_weight(plays.period[i], plays.margin[i], secs, plays.ball_on[i]) > 0.0;
            (plays.period[i] == 4 && secs < FOUR_MINUTE_SECS) || (plays.down[i] > 0 && self.finish.as_ref().is_some_and(near))
        };
        let ep = (0..plays.len())
            .into_par_iter()
            .with_min_len(SCORE_CHUNK)
            .map(|i| if told(i) { self.snap(plays, i) } else { blind[i] })
            .collect();
        (ep, blind)
    }

    pub fn score_all_blind(&self, plays: &Plays) -> Vec<f64> {
        use rayon::prelude::*;
        (0..plays.len()).into_par_iter().with_min_len(SCORE_CHUNK).map(|i| self.snap_as(plays, i, ScoreClock::NEUTRAL)).collect()
    }
}

/// EP after snap `i` from its offense's side, as EPA credits it: the next
/// snap's EP in the same game and half (negated when the offense changes),
/// so a touchdown gains the try that follows (`try_mean`; nothing when no
/// try follows, as after an overtime touchdown), a defensive touchdown loses
/// it, and a safety carries the free kick that follows. Zero at the end of a
/// half or game, after a try, and before a kickoff that follows a score
/// other than a safety: the kicking team's kickoff value is not credited to
/// its score (the *kickoff term* of `drive_identity`).
pub fn ep_after(plays: &Plays, ep: &[f64], i: usize) -> f64 {
    let j = i + 1;
    if j >= plays.len()
        || plays.game[j] != plays.game[i]
        || plays.half(j) != plays.half(i)
        || plays.kind[i].is_try()
        || (plays.kind[j] == Kind::Kickoff && !is_safety(plays, i))
    {
        return 0.0;
    }
    if plays.offense[j] == plays.offense[i] {
        ep[j]
    } else {
        -ep[j]
    }
}

/// EPA per snap from the EP before every snap: points scored on the snap
/// (offense's side) plus `ep_after` minus EP before. So a touchdown earns
/// 6 + the expected try − EP before, the try its points − the expected try,
/// a pick-six −6 − the expected try − EP before, and a safety −2 + the free
/// kick's value to the conceding (kicking) team − EP before.
pub fn epa(plays: &Plays, ep: &[f64]) -> Vec<f64> {
    (0..plays.len())
        .map(|i| plays.points[i] as f64 + ep_after(plays, ep, i) - ep[i])
        .collect()
}

/// The terms of a drive (snaps `start..end` with one offense, from
/// `Plays::drive`) that make its EPA add up:
/// `Σ EPA = points + handoff − kickoff − EP at start`, where `points` are
/// the drive's points from its offense's side (its own tries included),
/// `handoff` is `ep_after` of its last snap (what it leaves the next
/// offense, negated; 0 at a half's end) and `kickoff` the EP of each
/// kickoff inside the drive that follows a score other than a safety (a
/// kickoff after a safety, the free kick, is credited to the safety).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DriveTerms {
    pub points: f64,
    pub handoff: f64,
    pub kickoff: f64,
    pub ep_start: f64,
}

impl DriveTerms {
    pub fn of(plays: &Plays, ep: &[f64], start: usize, end: usize) -> DriveTerms {
        let points = (start..end).map(|i| plays.points[i] as f64).sum();
        let kickoff = (start + 1..end)
            .filter(|&k| plays.kind[k] == Kind::Kickoff && !is_safety(plays, k - 1))
            .map(|k| ep[k])
            .sum();
        DriveTerms {
            points,
            handoff: ep_after(plays, ep, end - 1),
            kickoff,
            ep_start: ep[start],
        }
    }

    /// What the drive's EPA should add up to.
    pub fn total(&self) -> f64 {
        self.points + self.handoff - self.kickoff - self.ep_start
    }
}

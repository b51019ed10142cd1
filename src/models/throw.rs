//! Throw value: what a pass attempt at each depth is worth in its state.
//! Fitted from the league: the mix of depths the league throws to in a state,
//! the chance of a catch and of an interception at each depth, the gain on a
//! catch and the clock each outcome costs; the WP model then prices the state
//! each outcome leaves (`after.rs`), so every (state, depth band) has an
//! expected WPA. Per attempt: choice value (his depth against the league's
//! mix) and execution value (what happened against his depth's expectation).

mod after;
mod cached;
mod depth;
#[cfg(test)]
mod tests;

pub use cached::{fit_cached, scores_cached, Restored, ScoresCache};
pub use depth::{depth_by_distance, DepthLine, TO_GO_BANDS};

use super::logit::{self, FitOptions, FitStats, FnDesign, Labels};
use super::Models;
use crate::playfile::Kind;
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Depth bands of a throw (air yards): behind the line, 1-9, 10-19, 20+.
pub const BANDS: usize = 4;
/// Band names in a coach's words.
pub const BAND_LABELS: [&str; BANDS] = ["behind the line", "short (1-9)", "intermediate (10-19)", "deep (20+)"];

/// The band of a throw with `air` air yards.
pub fn band_of(air: i32) -> usize {
    match air {
        ..=0 => 0,
        1..=9 => 1,
        10..=19 => 2,
        _ => 3,
    }
}

/// True for the snaps the model describes: passes with air yards.
pub fn applies(plays: &Plays, i: usize) -> bool {
    plays.kind[i] == Kind::Pass && plays.air_yards[i].is_some()
}

/// The state of a snap the throw model reads (offense's side).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct State {
    pub down: i32,
    pub to_go: i32,
    pub ball_on: i32,
    pub period: i32,
    pub secs_half: i32,
    pub secs_game: i32,
    pub margin: i32,
    pub off_timeouts: i32,
}

impl State {
    pub fn of_snap(p: &Plays, i: usize) -> State {
        State {
            down: p.down[i].clamp(1, 4),
            to_go: p.to_go[i].max(1),
            ball_on: p.ball_on[i],
            period: p.period[i],
            secs_half: p.secs_half[i],
            secs_game: p.secs_game[i],
            margin: p.margin[i],
            off_timeouts: p.off_timeouts[i],
        }
    }
}

/// State features shared by the depth-mix and the outcome models.
pub const STATE_FEATURES: [&str; 16] = [
    "intercept",
    "down2",
    "down3",
    "down4",
    "log_to_go",
    "to_go_10",
    "ball_on",
    "red_zone",
    "goal_to_go",
    "near_end_half",
    "trail_late",
    "trail_last_minute",
    "lead_late",
    "down_two_scores",
    "up_two_scores",
    "off_timeouts",
];
const NS: usize = STATE_FEATURES.len();
/// Outcome features: the state, then per band above the first: a dummy and
/// its interactions with the red zone and with a two-score deficit (soft
/// coverage underneath).
const NO: usize = NS + 3 * (BANDS - 1);

fn state_features(s: &State, out: &mut [f64]) {
    let b = |x: bool| x as i32 as f64;
    let late = s.period >= 4;
    out[0] = 1.0;
    out[1] = b(s.down == 2);
    out[2] = b(s.down == 3);
    out[3] = b(s.down == 4);
    out[4] = (s.to_go as f64).ln();
    out[5] = s.to_go.min(20) as f64 / 10.0;
    out[6] = s.ball_on as f64 / 100.0;
    out[7] = (s.ball_on - 80).max(0) as f64 / 20.0;
    out[8] = b(s.ball_on + s.to_go >= 100);
    out[9] = (120 - s.secs_half).max(0) as f64 / 120.0;
    out[10] = b(late && s.margin < 0) * (1.0 - s.secs_game as f64 / 300.0).max(0.0);
    out[11] = b(late && s.margin < 0) * (1.0 - s.secs_game as f64 / 60.0).max(0.0);
    out[12] = b(late && s.margin > 0) * (1.0 - s.secs_game as f64 / 720.0).max(0.0);
    out[13] = b(s.period >= 3 && s.margin <= -9);
    out[14] = b(s.period >= 3 && s.margin >= 9);
    out[15] = s.off_timeouts as f64 / 3.0;
}

fn outcome_features(s: &State, band: usize, out: &mut [f64]) {
    state_features(s, &mut out[..NS]);
    for k in 1..BANDS {
        let on = (band == k) as i32 as f64;
        out[NS + 3 * (k - 1)] = on;
        out[NS + 3 * (k - 1) + 1] = on * out[7];
        out[NS + 3 * (k - 1) + 2] = on * out[13];
    }
}

/// A catch's gain is summarised by this many points of equal weight: the
/// means of equal-count slices of the league's catches in the band, shortest
/// to longest (so their mean is the band's mean gain, tail included).
pub const GAIN_POINTS: usize = 5;

/// Clock regimes: ordinary, hurrying (trailing or tied late in a half),
/// running it down (ahead late).
pub const REGIMES: usize = 3;

/// The clock regime of a state.
pub fn regime(s: &State) -> usize {
    let hurry = (s.secs_half <= 120 && s.margin <= 0) || (s.period >= 4 && s.margin < 0 && s.secs_game <= 300);
    let milk = s.period == 4 && s.margin > 0 && s.secs_game <= 300;
    if hurry {
        1
    } else if milk {
        2
    } else {
        0
    }
}

/// Outcome classes of an attempt.
pub const INCOMPLETE: usize = 0;
pub const COMPLETE: usize = 1;
pub const INTERCEPTED: usize = 2;

/// The fitted throw-value model.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct ThrowModel {
    /// P(band | state): multinomial logistic, reference band 1 (short).
    pub mix: logit::Fit,
    /// P(incomplete, complete, intercepted | state, band).
    pub outcome: logit::Fit,
    /// Gain on a catch, `GAIN_POINTS` slice means per band (catches at or behind
    /// midfield, so the goal line rarely cuts them).
    pub gains: [[f64; GAIN_POINTS]; BANDS],
    /// Median seconds from the snap to the next snap, per regime, outcome
    /// and band.
    pub runoff: [[[f64; BANDS]; 3]; REGIMES],
    /// Mean yards an intercepting team starts beyond the mirror of the line
    /// of scrimmage (air yards and return), per band.
    pub int_spot: [f64; BANDS],
    /// Share of interceptions returned for a touchdown, per band.
    pub pick_six: [f64; BANDS],
    /// Share of catches fumbled away, per band.
    pub catch_fumble: [f64; BANDS],
    /// Per distance 0..=`MAX_TO_GO`: each band's share of throws at or
    /// past it.
    pub air_past: Vec<[f64; BANDS]>,
    /// Mean air yards of the league's throws in each band.
    pub air_mean: [f64; BANDS],
    pub mix_stats: FitStats,
    pub outcome_stats: FitStats,
}

fn median(v: &mut [f64]) -> Option<f64> {
    if v.is_empty() {
        return None;
    }
    v.sort_by(f64::total_cmp);
    Some(quantile_sorted(v, 0.5))
}

fn quantile_sorted(v: &[f64], q: f64) -> f64 {
    let pos = q * (v.len() - 1) as f64;
    let lo = pos.floor() as usize;
    let hi = pos.ceil() as usize;
    v[lo] + (v[hi] - v[lo]) * (pos - lo as f64)
}

fn outcome_of(p: &Plays, i: usize) -> usize {
    if p.intercepted[i] {
        INTERCEPTED
    } else if p.complete[i] {
        COMPLETE
    } else {
        INCOMPLETE
    }
}

/// Fit on the passes with air yards among `rows`; `None` when there are none.
pub fn fit(p: &Plays, rows: &[u32], opts: &FitOptions) -> Result<Option<ThrowModel>, super::ModelError> {
    let train: Vec<u32> = rows.iter().copied().filter(|&i| applies(p, i as usize)).collect();
    if train.is_empty() {
        return Ok(None);
    }
    let band = |i: usize| band_of(p.air_yards[i].unwrap_or(0));
    let bands: Vec<u8> = train.iter().map(|&i| band(i as usize) as u8).collect();
    let outcomes: Vec<u8> = train.iter().map(|&i| outcome_of(p, i as usize) as u8).collect();
    // The two fits and the tables below read only the snaps: side by side.
    let ((mix, outcome), tables) = rayon::join(
        || {
            rayon::join(
                || {
                    let design = FnDesign { rows: &train, p: NS, f: |i: usize, out: &mut [f64]| state_features(&State::of_snap(p, i), out) };
                    logit::fit(&design, Labels::Classes { y: &bands, classes: BANDS, reference: 1 }, None, opts)
                        .map_err(|source| super::ModelError::Fit { model: "throw depth mix", rows: train.len(), what: "passes", source })
                },
                || {
                    let design = FnDesign { rows: &train, p: NO, f: |i: usize, out: &mut [f64]| outcome_features(&State::of_snap(p, i), band(i), out) };
                    logit::fit(&design, Labels::Classes { y: &outcomes, classes: 3, reference: INCOMPLETE }, None, opts)
                        .map_err(|source| super::ModelError::Fit { model: "throw outcomes", rows: train.len(), what: "passes", source })
                },
            )
        },
        || count_tables(p, &train),
    );
    let (mix, outcome) = (mix?, outcome?);
    Ok(Some(ThrowModel {
        mix_stats: mix.stats.clone(),
        outcome_stats: outcome.stats.clone(),
        mix,
        outcome,
        gains: tables.gains,
        runoff: tables.runoff,
        int_spot: tables.int_spot,
        pick_six: tables.pick_six,
        catch_fumble: tables.catch_fumble,
        air_past: air_past(p, &train),
        air_mean: air_mean(p, &train),
    }))
}

/// The model's tables counted from the league's throws (`ThrowModel`'s
/// fields of the same names).
struct Tables {
    gains: [[f64; GAIN_POINTS]; BANDS],
    runoff: [[[f64; BANDS]; 3]; REGIMES],
    int_spot: [f64; BANDS],
    pick_six: [f64; BANDS],
    catch_fumble: [f64; BANDS],
}

fn count_tables(p: &Plays, train: &[u32]) -> Tables {
    let band = |i: usize| band_of(p.air_yards[i].unwrap_or(0));
    // Gains on catches, clock used, where interceptions leave the ball.
    let mut gains: Vec<Vec<f64>> = vec![Vec::new(); BANDS];
    let mut gaps: Vec<Vec<f64>> = vec![Vec::new(); REGIMES * 3 * BANDS];
    let mut gaps_any: Vec<Vec<f64>> = vec![Vec::new(); 3];
    let (mut spot, mut spot_n, mut six, mut ints) = ([0.0; BANDS], [0.0; BANDS], [0.0; BANDS], [0.0; BANDS]);
    let (mut catches, mut fumbles) = ([0.0; BANDS], [0.0; BANDS]);
    for &r in train {
        let i = r as usize;
        let b = band(i);
        let o = outcome_of(p, i);
        if o == COMPLETE && p.ball_on[i] <= 50 && !p.fumble_lost[i] {
            gains[b].push(p.gain[i] as f64);
        }
        if o == COMPLETE {
            catches[b] += 1.0;
            fumbles[b] += p.fumble_lost[i] as i32 as f64;
        }
        let j = i + 1;
        let next_same_period = j < p.len() && p.game[j] == p.game[i] && p.period[j] == p.period[i];
        if next_same_period && p.points[i] == 0 && !p.fumble_lost[i] {
            let g = (p.clock[i] - p.clock[j]).max(0) as f64;
            gaps[(regime(&State::of_snap(p, i)) * 3 + o) * BANDS + b].push(g);
            gaps_any[o].push(g);
        }
        if o == INTERCEPTED {
            ints[b] += 1.0;
            if p.points[i] == -6 {
                six[b] += 1.0;
            } else if j < p.len() && p.game[j] == p.game[i] && p.offense[j] != p.offense[i] && p.down[j] > 0 {
                spot[b] += (p.ball_on[j] - (100 - p.ball_on[i])) as f64;
                spot_n[b] += 1.0;
            }
        }
    }
    let any: Vec<f64> = gaps_any.iter_mut().map(|v| median(v).unwrap_or(6.0)).collect();
    let mut runoff = [[[0.0; BANDS]; 3]; REGIMES];
    for (rg, per_outcome) in runoff.iter_mut().enumerate() {
        for (o, per_band) in per_outcome.iter_mut().enumerate() {
            for (b, cell) in per_band.iter_mut().enumerate() {
                let v = &mut gaps[(rg * 3 + o) * BANDS + b];
                *cell = if v.len() >= 20 { median(v).unwrap_or(any[o]) } else { any[o] };
            }
        }
    }
    let all_gains: Vec<f64> = {
        let mut a: Vec<f64> = gains.iter().flatten().copied().collect();
        a.sort_by(f64::total_cmp);
        a
    };
    let mut gq = [[0.0; GAIN_POINTS]; BANDS];
    for (b, g) in gains.iter_mut().enumerate() {
        g.sort_by(f64::total_cmp);
        let src: &[f64] = if g.len() >= 20 { g } else { &all_gains };
        for (k, point) in gq[b].iter_mut().enumerate() {
            let slice = &src[k * src.len() / GAIN_POINTS..(k + 1) * src.len() / GAIN_POINTS];
            *point = if slice.is_empty() { 0.0 } else { slice.iter().sum::<f64>() / slice.len() as f64 };
        }
    }
    let all_spot = spot.iter().sum::<f64>() / spot_n.iter().sum::<f64>().max(1.0);
    let all_six = six.iter().sum::<f64>() / ints.iter().sum::<f64>().max(1.0);
    let int_spot = std::array::from_fn(|b| if spot_n[b] >= 10.0 { spot[b] / spot_n[b] } else { all_spot });
    let pick_six = std::array::from_fn(|b| if ints[b] >= 10.0 { six[b] / ints[b] } else { all_six });
    let all_fumble = fumbles.iter().sum::<f64>() / catches.iter().sum::<f64>().max(1.0);
    let catch_fumble = std::array::from_fn(|b| if catches[b] >= 50.0 { fumbles[b] / catches[b] } else { all_fumble });
    Tables { gains: gq, runoff, int_spot, pick_six, catch_fumble }
}

impl ThrowModel {
    /// The league's mix of depth bands in a state.
    pub fn band_mix(&self, s: &State) -> [f64; BANDS] {
        let mut x = [0.0; NS];
        state_features(s, &mut x);
        let mut q = [0.0; BANDS];
        self.mix.probs(&x, &mut q);
        q
    }

    /// The depth the league throws to in a state: the mix of bands, each at
    /// the league's mean air yards in the band.
    pub fn league_depth(&self, s: &State) -> f64 {
        self.band_mix(s).iter().zip(&self.air_mean).map(|(w, a)| w * a).sum()
    }

    /// P(incomplete), P(complete), P(intercepted) of a throw in `band`.
    pub fn outcome_probs(&self, s: &State, band: usize) -> [f64; 3] {
        let mut x = [0.0; NO];
        outcome_features(s, band, &mut x);
        let mut q = [0.0; 3];
        self.outcome.probs(&x, &mut q);
        q
    }
}

/// Per-snap throw values, each `plays.len()` long; NaN where the model does
/// not apply (not a pass with air yards, or no model).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ThrowScores {
    /// Expected WPA of a throw at the depth he chose.
    pub chosen: Vec<f64>,
    /// Expected WPA of the league's mix of depths in the same state.
    pub league: Vec<f64>,
    /// Choice value: `chosen − league`.
    pub choice: Vec<f64>,
    /// Execution value: actual WPA − `chosen`.
    pub execution: Vec<f64>,
    /// The league's share of throws at or past the line to gain in the
    /// state (the depth mix, and how deep the league throws within each
    /// band); NaN where the model does not apply.
    pub league_sticks: Vec<f64>,
}

/// Score every pass with air yards: expected WPA at each band from the
/// state's outcomes priced by the WP model, then choice and execution.
pub fn score_all(model: &ThrowModel, models: &Models, p: &Plays, ep: &[f64], wp: &[f64], wpa: &[f64]) -> ThrowScores {
    use rayon::prelude::*;
    let n = p.len();
    let rows: Vec<(f64, f64, f64)> = (0..n)
        .into_par_iter()
        .with_min_len(4096)
        .map(|i| {
            if !applies(p, i) {
                return (f64::NAN, f64::NAN, f64::NAN);
            }
            let s = State::of_snap(p, i);
            let ev = after::expected_wpa(model, models, p, ep, wp[i], i);
            let mix = model.band_mix(&s);
            let league: f64 = mix.iter().zip(&ev).map(|(w, e)| w * e).sum();
            let chosen = ev[band_of(p.air_yards[i].unwrap_or(0))];
            (chosen, league, model.sticks_share(&mix, s.to_go))
        })
        .collect();
    let mut out = ThrowScores {
        chosen: Vec::with_capacity(n),
        league: Vec::with_capacity(n),
        choice: Vec::with_capacity(n),
        execution: Vec::with_capacity(n),
        league_sticks: Vec::with_capacity(n),
    };
    for (i, (c, l, st)) in rows.into_iter().enumerate() {
        out.chosen.push(c);
        out.league.push(l);
        out.choice.push(c - l);
        out.execution.push(wpa[i] - c);
        out.league_sticks.push(st);
    }
    out
}

/// Longest distance the past-the-sticks shares are kept for (longer: this one).
pub const MAX_TO_GO: usize = 40;

impl ThrowModel {
    /// Share of each band's throws that reach `to_go` air yards.
    pub fn past_share(&self, to_go: i32) -> [f64; BANDS] {
        self.air_past[(to_go.max(0) as usize).min(MAX_TO_GO)]
    }

    /// The league's share of throws at or past `to_go` air yards in a state
    /// whose depth mix is `mix`.
    pub fn sticks_share(&self, mix: &[f64; BANDS], to_go: i32) -> f64 {
        mix.iter().zip(self.past_share(to_go)).map(|(w, q)| w * q).sum()
    }
}

/// Mean air yards per band (0 for a band with no throws).
fn air_mean(p: &Plays, rows: &[u32]) -> [f64; BANDS] {
    let (mut sum, mut n) = ([0.0; BANDS], [0.0; BANDS]);
    for &r in rows {
        let Some(a) = p.air_yards[r as usize] else { continue };
        sum[band_of(a)] += a as f64;
        n[band_of(a)] += 1.0;
    }
    std::array::from_fn(|b| if n[b] > 0.0 { sum[b] / n[b] } else { 0.0 })
}

/// Per distance 0..=MAX_TO_GO, each band's share of throws with air yards at
/// or past it (the league's own depths within each band).
fn air_past(p: &Plays, rows: &[u32]) -> Vec<[f64; BANDS]> {
    let mut n = [0.0; BANDS];
    let mut at = vec![[0.0; BANDS]; MAX_TO_GO + 2];
    for &r in rows {
        let Some(a) = p.air_yards[r as usize] else { continue };
        let b = band_of(a);
        n[b] += 1.0;
        // Throws behind the line count at 0 (a distance is never 0).
        at[(a.max(0) as usize).min(MAX_TO_GO + 1)][b] += 1.0;
    }
    let mut out = vec![[0.0; BANDS]; MAX_TO_GO + 1];
    let mut tail = at[MAX_TO_GO + 1];
    for d in (0..=MAX_TO_GO).rev() {
        for b in 0..BANDS {
            tail[b] += at[d][b];
            out[d][b] = if n[b] > 0.0 { tail[b] / n[b] } else { 0.0 };
        }
    }
    out
}

#[cfg(test)]
impl ThrowModel {
    /// A model set by hand for view tests: the league's depth mix is even
    /// on 1st-3rd down and 1:1:1:3 (deep) on 4th; outcomes are even; each
    /// band's mean air yards is `air_mean`.
    pub(crate) fn hand_made(air_mean: [f64; BANDS]) -> ThrowModel {
        let stats = FitStats { rows: 0, features: NS, iterations: 0, warm_iterations: 0, converged: true, grad_norm: 0.0, log_lik: 0.0, seconds: 0.0 };
        let mut mix_coef = vec![vec![0.0; NS]; BANDS - 1];
        // Free classes 0, 2, 3 (1 is the reference); feature 3 is 4th down.
        mix_coef[2][3] = 3f64.ln();
        ThrowModel {
            mix: logit::Fit { classes: BANDS, reference: 1, free: vec![0, 2, 3], coef: mix_coef, stats: stats.clone() },
            outcome: logit::Fit { classes: 3, reference: INCOMPLETE, free: vec![COMPLETE, INTERCEPTED], coef: vec![vec![0.0; NO]; 2], stats: stats.clone() },
            gains: [[0.0; GAIN_POINTS]; BANDS],
            runoff: [[[0.0; BANDS]; 3]; REGIMES],
            int_spot: [0.0; BANDS],
            pick_six: [0.0; BANDS],
            catch_fumble: [0.0; BANDS],
            air_past: vec![[0.0; BANDS]; MAX_TO_GO + 1],
            air_mean,
            mix_stats: stats.clone(),
            outcome_stats: stats,
        }
    }
}

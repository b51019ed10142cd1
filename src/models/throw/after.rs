//! The states a throw leaves, priced by the WP model: an incompletion (next
//! down, or the ball over on downs), a catch at each gain point (first
//! down, next down, touchdown, or fumbled away), an interception (returned to the league's
//! usual spot, or for a touchdown); the clock each costs; the period's end.

use super::{regime, State, ThrowModel, BANDS, COMPLETE, GAIN_POINTS, INCOMPLETE, INTERCEPTED};
use crate::models::wp::Situation;
use crate::models::Models;
use crate::plays::Plays;

/// Where the ball is after an outcome.
pub(super) enum Next {
    /// The offense keeps it: down, to go, spot.
    Keep(i32, i32, i32),
    /// The other side has it, first and ten at this spot (its own side).
    Over(i32),
    /// The offense scored a touchdown.
    Touchdown,
    /// The defense returned an interception for a touchdown.
    PickSix,
}

/// The offense's WP after an outcome that took `secs` seconds.
pub(super) fn wp_after(models: &Models, s0: &Situation, st: &State, secs: f64, next: Next) -> f64 {
    let secs = secs.round() as i32;
    let secs_half = st.secs_half - secs;
    let end_of_game = secs_half <= 0 && (st.period == 4 || st.period >= 5);
    let margin = |m: f64| if m > 0.0 { 1.0 } else if m < 0.0 { 0.0 } else { 0.5 };
    let m = s0.margin;
    let ot = s0.overtime;
    // A touchdown as regulation ends leaves the try to decide: the WP
    // model values it (`models::finish`: the better try, ties ½) where it has
    // the final seconds' rules; without them, the mean try decides (a
    // touchdown behind by 7 then counted as a loss).
    let try_decides = models.wp.finish.is_some();
    match next {
        Next::Touchdown => {
            if ot {
                return 1.0;
            }
            if end_of_game && !try_decides {
                return margin(m + 6.0 + models.ep.try_mean);
            }
        }
        Next::PickSix => {
            if ot {
                return 0.0;
            }
            if end_of_game && !try_decides {
                return margin(m - 6.0 - models.ep.try_mean);
            }
        }
        _ if end_of_game => return margin(m),
        _ => {}
    }
    let secs_half = secs_half.max(0);
    let secs_game = (s0.secs_game - secs as f64).max(0.0);
    let ep = &models.ep;
    let wp = &models.wp;
    let flip = |spot: i32, margin: f64, ep_new: f64, down: i32, is_try: bool| Situation {
        margin,
        secs_game,
        ep: ep_new,
        off_timeouts: s0.def_timeouts,
        def_timeouts: s0.off_timeouts,
        off_home: !s0.off_home,
        line: s0.line.map(|l| -l),
        is_try,
        kickoff: false,
        down,
        to_go: if down > 0 { 10.min(100 - spot) } else { 0 },
        ball_on: spot,
        ot_first: false,
        ot_both: ot && !s0.ot_first,
        ..*s0
    };
    match next {
        Next::Keep(down, to_go, spot) => {
            let ep_new = if secs_half == 0 { 0.0 } else { ep.situation(down, to_go, spot, secs_half) };
            wp.situation(&Situation { secs_game, ep: ep_new, down, to_go, ball_on: spot, kickoff: false, is_try: false, ..*s0 })
        }
        Next::Over(spot) => {
            let ep_new = if secs_half == 0 { 0.0 } else { ep.situation(1, 10.min(100 - spot), spot, secs_half) };
            1.0 - wp.situation(&flip(spot, -m, ep_new, 1, false))
        }
        Next::Touchdown => wp.situation(&Situation {
            secs_game,
            margin: m + 6.0,
            ep: ep.try_mean,
            down: 0,
            to_go: 0,
            ball_on: 85,
            kickoff: false,
            is_try: true,
            ..*s0
        }),
        Next::PickSix => 1.0 - wp.situation(&flip(85, -m + 6.0, ep.try_mean, 0, true)),
    }
}

/// Where a gain of `g` yards leaves the offense.
fn after_gain(st: &State, g: i32) -> Next {
    let spot = st.ball_on + g.max(1 - st.ball_on);
    if spot >= 100 {
        Next::Touchdown
    } else if g >= st.to_go {
        Next::Keep(1, 10.min(100 - spot), spot)
    } else if st.down >= 4 {
        Next::Over(100 - spot)
    } else {
        Next::Keep(st.down + 1, st.to_go - g, spot)
    }
}

/// `f(secs[b])` for each band, worked out once per distinct value of `secs`.
fn per_band(secs: &[f64; BANDS], f: impl Fn(f64) -> f64) -> [f64; BANDS] {
    let mut out = [0.0; BANDS];
    for b in 0..BANDS {
        out[b] = match (0..b).find(|&k| secs[k] == secs[b]) {
            Some(k) => out[k],
            None => f(secs[b]),
        };
    }
    out
}

/// Expected WP after a throw in each band, from the offense's side.
pub(super) fn expected_wp(model: &ThrowModel, models: &Models, s0: &Situation, st: &State) -> [f64; BANDS] {
    let rg = regime(st);
    // An incompletion and a pick-six leave the same state whatever the
    // band; only the clock they take may differ by band (it seldom does):
    // priced once per distinct runoff, the same values.
    let incs = per_band(&model.runoff[rg][INCOMPLETE], |secs| wp_after(models, s0, st, secs, after_gain(st, 0)));
    let picks = per_band(&model.runoff[rg][INTERCEPTED], |secs| wp_after(models, s0, st, secs, Next::PickSix));
    std::array::from_fn(|b| {
        let q = model.outcome_probs(st, b);
        let run = |o: usize| model.runoff[rg][o][b];
        let inc = incs[b];
        let nq = GAIN_POINTS as f64;
        // A catch fumbled away leaves the ball where a middle catch ends.
        let kept: f64 = model.gains[b]
            .iter()
            .map(|&g| wp_after(models, s0, st, run(COMPLETE), after_gain(st, g.round() as i32)))
            .sum::<f64>()
            / nq;
        let pf = model.catch_fumble[b];
        let mid = st.ball_on + model.gains[b][GAIN_POINTS / 2].round() as i32;
        let comp = if pf > 0.0 && mid < 100 {
            (1.0 - pf) * kept + pf * wp_after(models, s0, st, run(COMPLETE), Next::Over(100 - mid.max(1)))
        } else {
            kept
        };
        let mirror = (100 - st.ball_on) as f64 + model.int_spot[b];
        let spot = if mirror < 1.0 { 20 } else { (mirror.round() as i32).min(99) };
        let ps = model.pick_six[b];
        let int = (1.0 - ps) * wp_after(models, s0, st, run(INTERCEPTED), Next::Over(spot)) + ps * picks[b];
        q[INCOMPLETE] * inc + q[COMPLETE] * comp + q[INTERCEPTED] * int
    })
}

/// Expected WPA of a throw in each band at snap `i` (WP before: `wp_before`).
pub(super) fn expected_wpa(model: &ThrowModel, models: &Models, p: &Plays, ep: &[f64], wp_before: f64, i: usize) -> [f64; BANDS] {
    let s0 = Situation::of_snap(p, ep, i);
    let st = State::of_snap(p, i);
    expected_wp(model, models, &s0, &st).map(|w| w - wp_before)
}

/// The straightforward pricing `expected_wp` must equal: every outcome of
/// every band priced on its own.
#[cfg(test)]
pub(super) fn expected_wp_reference(model: &ThrowModel, models: &Models, s0: &Situation, st: &State) -> [f64; BANDS] {
    let rg = regime(st);
    std::array::from_fn(|b| {
        let q = model.outcome_probs(st, b);
        let run = |o: usize| model.runoff[rg][o][b];
        let inc = wp_after(models, s0, st, run(INCOMPLETE), after_gain(st, 0));
        let kept: f64 = model.gains[b]
            .iter()
            .map(|&g| wp_after(models, s0, st, run(COMPLETE), after_gain(st, g.round() as i32)))
            .sum::<f64>()
            / GAIN_POINTS as f64;
        let pf = model.catch_fumble[b];
        let mid = st.ball_on + model.gains[b][GAIN_POINTS / 2].round() as i32;
        let comp = if pf > 0.0 && mid < 100 {
            (1.0 - pf) * kept + pf * wp_after(models, s0, st, run(COMPLETE), Next::Over(100 - mid.max(1)))
        } else {
            kept
        };
        let mirror = (100 - st.ball_on) as f64 + model.int_spot[b];
        let spot = if mirror < 1.0 { 20 } else { (mirror.round() as i32).min(99) };
        let ps = model.pick_six[b];
        let int = (1.0 - ps) * wp_after(models, s0, st, run(INTERCEPTED), Next::Over(spot))
            + ps * wp_after(models, s0, st, run(INTERCEPTED), Next::PickSix);
        q[INCOMPLETE] * inc + q[COMPLETE] * comp + q[INTERCEPTED] * int
    })
}

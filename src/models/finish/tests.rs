//! Hand-worked values of the final seconds' rules.

use super::*;

/// Every kick good 9 times in 10 (logit ln 9), every shot 1 in 5 (logit
/// ln ¼), extra points 0.94, two-point tries 0.48, a 4 s snap, a 5 s kick;
/// at the goal line half the misses incomplete, none intercepted, 16 s to
/// the next snap when the clock runs, 8 s with a timeout; EP's final snaps
/// without a timeout.
fn flat() -> Finish {
    Finish {
        kick: [9f64.ln(), 0.0, 0.0],
        shot: [0.25f64.ln(), 0.0],
        one_snap_secs: 4.0,
        kick_secs: 5.0,
        extra_point: 0.94,
        two_point: 0.48,
        incomplete: 0.5,
        intercepted: 0.0,
        run_secs: 16.0,
        stop_secs: 8.0,
        ep_timeouts: 0,
    }
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() < 1e-12
}

#[test]
fn the_last_snap_takes_the_better_of_a_kick_and_a_shot() {
    let f = flat();
    // Level: kick 0.9 × 1 + 0.1 × ½ = 0.95; shot 0.2 × 1 + 0.8 × ½ = 0.6.
    assert!(close(f.last_snap(0, 80), 0.95));
    // Behind by 2: kick 0.9; shot 0.2.
    assert!(close(f.last_snap(-2, 80), 0.9));
    // Behind by 3: a make only levels, 0.9 × ½ = 0.45; shot 0.2.
    assert!(close(f.last_snap(-3, 80), 0.45));
    // Behind by 4: no kick helps; the shot 0.2 wins outright.
    assert!(close(f.last_snap(-4, 80), 0.2));
    // Behind by 6: a touchdown levels; the extra point 0.94 × 1 + 0.06 × ½
    // = 0.97 beats two, 0.48 + 0.52 × ½ = 0.74; 0.2 × 0.97 = 0.194.
    assert!(close(f.last_snap(-6, 80), 0.194));
    // Behind by 7: one point only levels (0.94 × ½ = 0.47), two win (0.48);
    // 0.2 × 0.48 = 0.096.
    assert!(close(f.last_snap(-7, 80), 0.096));
    // Behind by 8: two points level, 0.2 × 0.48 × ½ = 0.048.
    assert!(close(f.last_snap(-8, 80), 0.048));
    // Behind by 9: nothing left.
    assert!(close(f.last_snap(-9, 80), 0.0));
    // Behind by 3 with a shot worth 0.6 and the kick 0.45: the shot.
    let g = Finish { shot: [1.5f64.ln(), 0.0], ..flat() };
    assert!(close(g.last_snap(-3, 99), 0.6));
    // Ahead, the game is won.
    assert!(close(f.last_snap(1, 20), 1.0));
    // A kick likely 1 in 10, a shot 1 in 5: behind by 2, the shot, 0.2.
    let h = Finish { kick: [(1.0f64 / 9.0).ln(), 0.0, 0.0], ..flat() };
    assert!(close(h.last_snap(-2, 50), 0.2));
}

#[test]
fn the_better_try_with_no_time_left() {
    let f = flat();
    let never = |_: f64, _: f64, _: f64| -> f64 { unreachable!("no time after the try") };
    let at = |margin: f64| Late { margin, secs: 0.0, ball_on: 98, is_try: true };
    // Behind by 2 before the try: one point loses; two (0.48) level, 0.24.
    assert!(close(f.try_now(&at(-2.0), 25.0, never), 0.24));
    // Behind by 1: one point levels, 0.94 × ½ = 0.47; two win, 0.48.
    assert!(close(f.try_now(&at(-1.0), 25.0, never), 0.48));
    // Level: one point wins, 0.94 + 0.06 × ½ = 0.97 over two's 0.74.
    assert!(close(f.try_now(&at(0.0), 25.0, never), 0.97));
    // With 30 s left the other side receives: it wins 0.3 when behind by
    // 1, 0.1 behind by 2, 0.6 level; one point 0.94 × 0.7 + 0.06 × 0.4 =
    // 0.682, two 0.48 × 0.9 + 0.52 × 0.4 = 0.64.
    let other = |m: f64, secs: f64, at: f64| {
        assert_eq!((secs, at), (30.0, 25.0));
        match m as i32 {
            -1 => 0.3,
            -2 => 0.1,
            0 => 0.6,
            _ => panic!("unexpected margin {m}"),
        }
    };
    assert!(close(f.try_now(&Late { margin: 0.0, secs: 30.0, ball_on: 98, is_try: true }, 25.0, other), 0.682));
    // In the final seconds a try's value replaces the fit's (0.03 here).
    assert!(close(f.apply(&at(-2.0), 25.0, never, 0.03), 0.24));
}

#[test]
fn the_floor_comes_in_before_the_final_two_minutes() {
    let f = flat();
    let never = |_: f64, _: f64, _: f64| -> f64 { unreachable!("no floor at 2:30") };
    assert!(close(f.apply(&Late { margin: -1.0, secs: 150.0, ball_on: 80, is_try: false }, 25.0, never, 0.3), 0.3));
    // At 2:15, half of what the kick adds: it is 0.9 × (1 - 0.2) + 0.1 ×
    // (1 - 1) = 0.72 against the fit's 0.3, so 0.3 + ½ × 0.42 = 0.51.
    let other = |m: f64, _: f64, _: f64| if m < 0.0 { 0.2 } else { 1.0 };
    assert!(close(f.apply(&Late { margin: -1.0, secs: 135.0, ball_on: 80, is_try: false }, 25.0, other, 0.3), 0.51));
}

#[test]
fn chances_follow_their_curves() {
    let f = Finish { kick: [4.0, -0.1, -0.05], shot: [1.0, -0.05], ..flat() };
    // From 30 yards: logit 4 - 0.3 - 0.45 = 3.25.
    assert!(close(f.kick_prob(30.0), 1.0 / (1.0 + (-3.25f64).exp())));
    // From 16 yards: logit 1 - 0.8 = 0.2.
    assert!(close(f.shot_prob(16.0), 1.0 / (1.0 + (-0.2f64).exp())));
}

#[test]
fn a_kick_with_no_time_after_it_ends_the_game() {
    let f = flat();
    let never = |_: f64, _: f64, _: f64| -> f64 { unreachable!("no time after the kick") };
    let late = |margin: f64, secs: f64| Late { margin, secs, ball_on: 80, is_try: false };
    // 5 s kick, 3 s left: nothing after it; behind by 1, 0.9.
    assert!(close(f.kick_now(&late(-1.0, 3.0), 25.0, never), 0.9));
    // Behind by 4 a kick cannot help; ahead, the game is won either way.
    assert!(close(f.kick_now(&late(-4.0, 3.0), 25.0, never), 0.0));
    assert!(close(f.kick_now(&late(1.0, 3.0), 25.0, never), 1.0));
}

#[test]
fn the_last_snap_comes_in_over_five_seconds() {
    let f = flat();
    let never = |_: f64, _: f64, _: f64| -> f64 { unreachable!("no time after the kick") };
    let late = |secs: f64| Late { margin: -2.0, secs, ball_on: 80, is_try: false };
    // At 4 s and below, the last snap's 0.9 whatever the fit said.
    assert!(close(f.apply(&late(4.0), 25.0, never, 0.3), 0.9));
    assert!(close(f.apply(&late(1.0), 25.0, never, 0.99), 0.9));
    // Ahead on the last snap: won, whatever the fit said.
    assert!(close(f.apply(&Late { margin: 1.0, ..late(1.0) }, 25.0, never, 0.7), 1.0));
    // Halfway in, at 6.5 s: a kick leaves 1.5 s; the other side wins 0.2
    // behind, always ahead, so a kick now is 0.9 × 0.8 = 0.72 over the
    // fit's 0.3; half of that and half of the last snap's 0.9 is 0.81.
    let other = |m: f64, _: f64, _: f64| if m < 0.0 { 0.2 } else { 1.0 };
    assert!(close(f.apply(&late(6.5), 25.0, other, 0.3), 0.81));
}

#[test]
fn a_kick_with_time_after_it_hands_the_other_side_the_ball() {
    let f = flat();
    // 20 s left, behind by 1 at the opponent's 20 (ball on 80): a make
    // leaves the other side 15 s, behind by 2, from the 25; a miss, 15 s,
    // ahead by 1, from its own 27 (the spot of the kick).
    let other = |m: f64, secs: f64, at: f64| {
        assert_eq!(secs, 15.0);
        match (m, at) {
            (m, at) if m == -2.0 && at == 25.0 => 0.1,
            (m, at) if m == 1.0 && at == 27.0 => 0.97,
            _ => panic!("unexpected possession {m} {at}"),
        }
    };
    // 0.9 × (1 - 0.1) + 0.1 × (1 - 0.97) = 0.81 + 0.003.
    assert!(close(f.kick_now(&Late { margin: -1.0, secs: 20.0, ball_on: 80, is_try: false }, 25.0, other), 0.813));
    // The fit's 0.6 is below the kick's 0.813: the floor holds; its 0.85 stands.
    assert!(close(f.apply(&Late { margin: -1.0, secs: 20.0, ball_on: 80, is_try: false }, 25.0, other, 0.6), 0.813));
    assert!(close(f.apply(&Late { margin: -1.0, secs: 20.0, ball_on: 80, is_try: false }, 25.0, other, 0.85), 0.85));
}

/// The models' test league kicks field goals good with probability
/// σ(6 − 0.11 × (yards to the goal line + 17)) and tries extra points good
/// 94 times in 100, two-point tries 48 (`models::testkit`): the estimate
/// finds them within sampling error (a known truth, no source).
#[test]
fn estimated_from_a_league_with_known_kicking() {
    let plays = crate::models::testkit::league(3000, 2, 11);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let f = Finish::estimate(&plays, &rows).expect("enough field goal tries");
    let kicks = (0..plays.len()).filter(|&i| plays.kind[i] == Kind::FieldGoal).count();
    let truth = |y: f64| 1.0 / (1.0 + (-(6.0 - 0.11 * (y + 17.0))).exp());
    for y in [20.0, 30.0, 37.0] {
        let (got, want) = (f.kick_prob(y), truth(y));
        eprintln!("{kicks} tries; from {y} yards good {got:.3}, truth {want:.3}");
        assert!((got - want).abs() < 0.03, "from {y} yards: {got:.3} against {want:.3}");
    }
    let tries = |k: Kind| (0..plays.len()).filter(|&i| plays.kind[i] == k).count() as f64;
    let (n1, n2) = (tries(Kind::ExtraPoint), tries(Kind::TwoPoint));
    // Within three standard errors of the binomial share.
    assert!((f.extra_point - 0.94).abs() < 3.0 * (0.94f64 * 0.06 / n1).sqrt(), "extra points {:.3} of {n1}", f.extra_point);
    assert!((f.two_point - 0.48).abs() < 3.0 * (0.48f64 * 0.52 / n2).sqrt(), "two-point tries {:.3} of {n2}", f.two_point);
    assert!(f.one_snap_secs > 0.0 && f.kick_secs > 0.0);
}

#[test]
fn last_points_are_the_play_a_staff_runs() {
    let f = flat();
    // A touchdown with its try worth 6.94: a shot 0.2 × 6.94 = 1.388, a
    // kick 0.9 × 3 = 2.7.
    let td = 6.94;
    // End of the 1st half (or EP's neutral 1st period): the more points.
    assert!(close(f.last_points(2, -10, 80, td), 2.7));
    assert!(close(f.last_points(1, 0, 80, td), 2.7));
    let far = Finish { kick: [(1.0f64 / 9.0).ln(), 0.0, 0.0], ..flat() };
    // A kick 0.1 × 3 = 0.3 against the shot's 1.388.
    assert!(close(far.last_points(2, 0, 40, td), 1.388));
    // End of regulation: a leader kneels; behind by 2 the kick wins the
    // game (WP 0.9 against 0.2), so 2.7; behind by 4 or by 20, a shot.
    assert!(close(f.last_points(4, 1, 80, td), 0.0));
    assert!(close(f.last_points(4, -2, 80, td), 2.7));
    assert!(close(f.last_points(4, -4, 80, td), 1.388));
    assert!(close(f.last_points(4, -20, 80, td), 1.388));
    // Behind by 3 with a shot worth more to WP (0.6 against 0.45): the shot.
    let g = Finish { shot: [1.5f64.ln(), 0.0], ..flat() };
    assert!(close(g.last_points(4, -3, 99, td), 0.6 * td));
}

/// Worked by hand: the final snaps at the goal line. Behind by 3 at the 3,
/// a shot scoring half the time, the other side's possessions worth what
/// the score says (nothing changes after the ball turns over).
/// - 4th down, 1 s left: a kick levels (0.9 × ½ = 0.45); a shot wins half
///   the time (0.5): 0.5.
/// - 3rd down, 5 s, no timeout: a shot, 0.5 + 0.5 × (½ incomplete × the
///   4th down above + ½ clock running out × 0) = 0.625 (a kick: 0.45).
/// - 2nd down, 9 s: 0.5 + 0.5 × (½ × 0.625 + ½ × 0) = 0.65625.
/// - The same with one timeout: a play that keeps the clock running takes
///   it and 8 s, leaving a 3rd down with 1 s (0.5): 0.5 + 0.5 × (½ × 0.625
///   + ½ × 0.5) = 0.78125, and a timeout is never worth less.
/// - 4th down with 9 s: a miss hands the ball over: 0.5, below the 2nd
///   down's.
#[test]
fn the_final_snaps_by_hand() {
    let f = Finish { shot: [0.0, 0.0], ..flat() };
    let other = |m: f64, _: f64, _: f64| if m > 0.0 { 1.0 } else if m == 0.0 { 0.5 } else { 0.0 };
    let at = |secs: f64| Late { margin: -3.0, secs, ball_on: 97, is_try: false };
    assert!(close(f.final_snaps(&at(1.0), 4, 0, 25.0, &other), 0.5));
    assert!(close(f.final_snaps(&at(5.0), 3, 0, 25.0, &other), 0.625));
    assert!(close(f.final_snaps(&at(9.0), 2, 0, 25.0, &other), 0.65625));
    assert!(close(f.final_snaps(&at(9.0), 2, 1, 25.0, &other), 0.78125));
    assert!(close(f.final_snaps(&at(9.0), 4, 0, 25.0, &other), 0.5));
    // Level at the 3 with 9 s on 2nd down: the kick wins 0.9 + 0.1 × ½.
    let level = Late { margin: 0.0, ..at(9.0) };
    assert!(close(f.final_snaps(&level, 2, 0, 25.0, &other), 0.95));
    // It comes in from 0:40 and the opponent's 25: all of it from 0:30 and
    // the 15, half at 0:35 on the 15 or at 0:30 on the 20.
    assert!(close(f.snaps_weight(30.0, 85), 1.0));
    assert!(close(f.snaps_weight(35.0, 90), 0.5));
    assert!(close(f.snaps_weight(30.0, 80), 0.5));
    assert!(close(f.snaps_weight(41.0, 99), 0.0));
    assert!(close(f.snaps_weight(10.0, 75), 0.0));
}

/// Worked by hand: the points of the final snaps at the goal line (EP's).
/// A shot scores half the time (a touchdown worth 7), a kick 0.9 × 3 =
/// 2.7, every other rule as in `the_final_snaps_by_hand`:
/// - 4th down, 1 s: the shot, 3.5.
/// - 3rd down, 5 s: 3.5 + 0.5 × (½ × 3.5 + ½ × 0) = 4.375.
/// - 2nd down, 9 s: 3.5 + 0.5 × (½ × 4.375 + ½ × 0) = 4.59375.
/// - The same holding a timeout: 3.5 + 0.5 × (½ × 4.375 + ½ × 3.5) =
///   5.46875 (a play short of the line leaves a 3rd down with 1 s: 3.5).
/// - A shot scoring 1 in 10: the kick, 2.7, on 4th down with 1 s.
#[test]
fn the_final_points_by_hand() {
    let f = Finish { shot: [0.0, 0.0], ..flat() };
    assert!(close(f.final_points(97, 1.0, 4, 7.0), 3.5));
    assert!(close(f.final_points(97, 5.0, 3, 7.0), 4.375));
    assert!(close(f.final_points(97, 9.0, 2, 7.0), 4.59375));
    let held = Finish { ep_timeouts: 1, ..f.clone() };
    assert!(close(held.final_points(97, 9.0, 2, 7.0), 5.46875));
    let unlikely = Finish { shot: [(1.0f64 / 9.0).ln(), 0.0], ..flat() };
    assert!(close(unlikely.final_points(97, 1.0, 4, 7.0), 2.7));
}

//! Unit tests of the throw-value model on the models' synthetic league.

use super::*;
use crate::models::{fit, testkit};

#[test]
fn bands_split_air_yards() {
    assert_eq!([-3, 0, 1, 9, 10, 19, 20, 45].map(band_of), [0, 0, 1, 1, 2, 2, 3, 3]);
}

#[test]
fn values_add_up_and_probabilities_are_probabilities() {
    let plays = testkit::league(300, 2, 5);
    let models = fit(&plays).expect("fit");
    let s = models.score(&plays);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let m = super::fit(&plays, &rows, &Default::default()).expect("fit").expect("air yards");
    let t = score_all(&m, &models, &plays, &s.ep, &s.wp, &s.wpa);
    let mut n = 0;
    for i in 0..plays.len() {
        assert_eq!(t.choice[i].is_finite(), applies(&plays, i), "snap {i}");
        if !applies(&plays, i) {
            continue;
        }
        n += 1;
        assert!(((t.choice[i] + t.execution[i]) - (s.wpa[i] - t.league[i])).abs() < 1e-12);
        let st = State::of_snap(&plays, i);
        let mix = m.band_mix(&st);
        assert!((mix.iter().sum::<f64>() - 1.0).abs() < 1e-9);
        for b in 0..BANDS {
            let q = m.outcome_probs(&st, b);
            assert!((q.iter().sum::<f64>() - 1.0).abs() < 1e-9 && q.iter().all(|x| (0.0..=1.0).contains(x)));
        }
        // An expected WPA keeps WP after inside [0, 1].
        assert!(t.chosen[i] + s.wp[i] >= -1e-9 && t.chosen[i] + s.wp[i] <= 1.0 + 1e-9);
        assert!((0.0..=1.0).contains(&t.league_sticks[i]));
    }
    assert!(n > 1000, "{n} passes with air yards");
    // Gains on a catch rise with depth; the clock table is filled.
    for b in 1..BANDS {
        assert!(m.gains[b][2] > m.gains[b - 1][2], "{:?}", m.gains);
    }
    // Past-the-sticks shares: all at 0 (a distance is never 0), none behind
    // the line reaches 1, every deep throw reaches 20; shares fall with distance.
    assert!(m.past_share(0).iter().all(|&x| (x - 1.0).abs() < 1e-12));
    assert_eq!(m.past_share(1)[0], 0.0);
    assert!((m.past_share(20)[3] - 1.0).abs() < 1e-12);
    for d in 1..=MAX_TO_GO as i32 {
        let (a, b) = (m.past_share(d - 1), m.past_share(d));
        assert!((0..BANDS).all(|k| b[k] <= a[k]));
    }
    let mix = [0.25; BANDS];
    let hand: f64 = m.past_share(7).iter().map(|q| 0.25 * q).sum();
    assert!((m.sticks_share(&mix, 7) - hand).abs() < 1e-12);
    assert!(m.runoff.iter().flatten().flatten().all(|x| x.is_finite() && *x >= 0.0));
}

#[test]
fn regimes_read_the_clock_and_score() {
    let base = State { down: 1, to_go: 10, ball_on: 40, period: 4, secs_half: 200, secs_game: 200, margin: -3, off_timeouts: 2 };
    assert_eq!(regime(&base), 1);
    assert_eq!(regime(&State { margin: 3, ..base }), 2);
    assert_eq!(regime(&State { period: 1, secs_half: 1500, secs_game: 3300, ..base }), 0);
}

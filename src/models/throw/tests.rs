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

#[test]
fn league_depth_is_the_mix_at_each_bands_mean_depth() {
    // Worked by hand: even mix on 3rd down, 1:1:1:3 on 4th.
    let m = ThrowModel::hand_made([-2.0, 6.0, 14.0, 30.0]);
    let third = State { down: 3, to_go: 5, ball_on: 40, period: 2, secs_half: 900, secs_game: 2700, margin: 0, off_timeouts: 3 };
    assert!((m.league_depth(&third) - 12.0).abs() < 1e-12);
    assert!((m.league_depth(&State { down: 4, ..third }) - 18.0).abs() < 1e-12);
    // Fitted: each band's mean lies inside the band, and the league's depth
    // in a state lies between the shallowest and the deepest band.
    let plays = testkit::league(300, 2, 5);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let f = super::fit(&plays, &rows, &Default::default()).expect("fit").expect("air yards");
    let a = f.air_mean;
    assert!(a[0] <= 0.0 && (1.0..=9.0).contains(&a[1]) && (10.0..=19.0).contains(&a[2]) && a[3] >= 20.0, "{a:?}");
    for i in (0..plays.len()).filter(|&i| applies(&plays, i)).take(500) {
        let d = f.league_depth(&State::of_snap(&plays, i));
        assert!(d > a[0] && d < a[3], "{d}");
    }
}

#[test]
fn cached_throw_model_scores_bit_for_bit() {
    let plays = testkit::league(300, 2, 5);
    let models = fit(&plays).expect("fit");
    let s = models.score(&plays);
    let dir = std::env::temp_dir().join(format!("lategame-throw-cache-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    let fresh = fit_cached(&plays, "fp-throw", Some(&dir), false).expect("fit");
    assert!(!fresh.from_cache);
    let back = fit_cached(&plays, "fp-throw", Some(&dir), false).expect("restore");
    assert!(back.from_cache, "the second opening reads the cache");
    let (a, b) = (fresh.model.expect("air yards"), back.model.expect("air yards"));
    // Every number of the model, bit for bit (and enough of them to matter).
    let bits = |m: &ThrowModel| crate::models::testkit::json_bits(m);
    assert!(bits(&a).len() > 200, "only {} numbers", bits(&a).len());
    assert_eq!(bits(&a), bits(&b));
    assert_eq!(a, b);
    // The throw values scored with either, bit for bit.
    let (ta, tb) = (score_all(&a, &models, &plays, &s.ep, &s.wp, &s.wpa), score_all(&b, &models, &plays, &s.ep, &s.wp, &s.wpa));
    let same = |x: &[f64], y: &[f64]| x.len() == y.len() && x.iter().zip(y).all(|(p, q)| p.to_bits() == q.to_bits());
    assert!(same(&ta.chosen, &tb.chosen) && same(&ta.league, &tb.league) && same(&ta.choice, &tb.choice));
    assert!(same(&ta.execution, &tb.execution) && same(&ta.league_sticks, &tb.league_sticks));
    assert!(ta.choice.iter().filter(|c| c.is_finite()).count() > 1000);
    // A refit ignores the entry; another file misses it; a corrupt entry is a miss.
    assert!(!fit_cached(&plays, "fp-throw", Some(&dir), true).expect("refit").from_cache);
    assert!(!fit_cached(&plays, "another-file", Some(&dir), false).expect("other").from_cache);
    std::fs::write(dir.join(crate::models::cache::part_file_name("throw", "fp-throw")), "{not json").expect("write");
    assert!(!fit_cached(&plays, "fp-throw", Some(&dir), false).expect("corrupt").from_cache);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn cached_throw_values_read_back_bit_for_bit() {
    let plays = testkit::league(300, 2, 6);
    let models = fit(&plays).expect("fit");
    let s = models.score(&plays);
    let dir = std::env::temp_dir().join(format!("lategame-throw-values-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    let model = fit_cached(&plays, "fp-values", None, true).expect("fit").model.expect("air yards");
    let fresh = score_all(&model, &models, &plays, &s.ep, &s.wp, &s.wpa);
    let at = |fp: &'static str, read: bool| ScoresCache { dir: Some(&dir), fingerprint: fp, read };
    let values = |c: &ScoresCache, m: &ThrowModel| scores_cached(m, &models, &plays, &s.ep, &s.wp, &s.wpa, c);
    let bits = |t: &ThrowScores| [&t.chosen, &t.league, &t.choice, &t.execution, &t.league_sticks].map(|v| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>());
    assert!(fresh.choice.iter().filter(|c| c.is_finite()).count() > 1000);
    // First time: scored and stored; then read back, bit for bit (NaN on
    // every snap that is not a pass with air yards included).
    let (first, hit) = values(&at("fp-values", true), &model);
    assert!(!hit);
    assert_eq!(bits(&first), bits(&fresh));
    let (back, hit) = values(&at("fp-values", true), &model);
    assert!(hit, "the second opening reads the kept values");
    assert_eq!(bits(&back), bits(&fresh));
    // A refit does not read them; another file misses them; so do other
    // coefficients (scored again, the same numbers as scoring with them).
    assert!(!values(&at("fp-values", false), &model).1);
    assert!(!values(&at("another-file", true), &model).1);
    let mut other = model.clone();
    other.pick_six[3] += 0.01;
    let (changed, hit) = values(&at("fp-values", true), &other);
    assert!(!hit);
    assert_eq!(bits(&changed), bits(&score_all(&other, &models, &plays, &s.ep, &s.wp, &s.wpa)));
    // Damaged, cut short or empty: scored again, never a panic.
    let (_, hit) = values(&at("fp-values", true), &model);
    assert!(!hit, "the file now holds the other coefficients' values");
    // (Columns are written behind: wait for them before touching the file.)
    crate::models::cache::finish_writes();
    let path = dir.join(crate::models::cache::columns_file_name(cached::SCORES_PART, "fp-values"));
    let bytes = std::fs::read(&path).expect("kept");
    for cut in [0, 7, 60, bytes.len() / 2, bytes.len() - 1] {
        crate::models::cache::finish_writes();
        std::fs::write(&path, &bytes[..cut]).expect("write");
        let (again, hit) = values(&at("fp-values", true), &model);
        assert!(!hit, "cut at {cut}");
        assert_eq!(bits(&again), bits(&fresh));
    }
    let _ = std::fs::remove_dir_all(&dir);
}

/// The demo league with its models fitted and every snap scored, once for
/// the tests that read it.
fn demo() -> &'static (crate::plays::Plays, crate::models::Models, crate::models::Scores) {
    static DEMO: std::sync::OnceLock<(crate::plays::Plays, crate::models::Models, crate::models::Scores)> = std::sync::OnceLock::new();
    DEMO.get_or_init(|| {
        let path = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("demo-data/league.parquet");
        let plays = crate::playfile::load(&path, &Default::default()).expect("demo league").plays;
        let models = fit(&plays).expect("fit");
        let s = models.score(&plays);
        (plays, models, s)
    })
}

/// Every pass of the demo league priced by `score_all` as by the
/// straightforward reference (each outcome of each band priced on its own),
/// bit for bit; and runoffs that differ by band (the reference's case the
/// shortcut must not take) still agree.
#[test]
fn pricing_equals_the_straightforward_reference_on_the_demo_league() {
    let (plays, models, s) = demo();
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let mut m = super::fit(&plays, &rows, &Default::default()).expect("fit").expect("air yards");
    for pass in 0..2 {
        if pass == 1 {
            // Every band its own clock.
            for (b, r) in m.runoff.iter_mut().flatten().flat_map(|o| o.iter_mut().enumerate()) {
                *r += b as f64;
            }
        }
        let t = score_all(&m, &models, &plays, &s.ep, &s.wp, &s.wpa);
        let mut n = 0;
        for i in (0..plays.len()).filter(|&i| applies(&plays, i)) {
            let s0 = crate::models::wp::Situation::of_snap(&plays, &s.ep, i);
            let st = State::of_snap(&plays, i);
            let ev = after::expected_wp_reference(&m, &models, &s0, &st).map(|w| w - s.wp[i]);
            let mix = m.band_mix(&st);
            let league: f64 = mix.iter().zip(&ev).map(|(w, e)| w * e).sum();
            let chosen = ev[band_of(plays.air_yards[i].unwrap_or(0))];
            assert_eq!((t.chosen[i].to_bits(), t.league[i].to_bits()), (chosen.to_bits(), league.to_bits()), "snap {i}");
            n += 1;
        }
        assert!(n > 10_000, "{n} passes");
    }
}

/// A catch short of the line to gain leaves the next down with the yards
/// still to go, and the state is priced with them: 2nd & 10 late in the
/// 4th, a 4-yard catch is 3rd & 6 four yards on (the rest of a drive reads
/// the distance from 2nd down on, so 3rd & 10 would be worth less).
#[test]
fn a_short_catch_is_priced_with_the_yards_still_to_go() {
    let (plays, models, s) = demo();
    let i = (0..plays.len())
        .find(|&i| {
            plays.period[i] == 4
                && (60..=500).contains(&plays.secs_game[i])
                && plays.down[i] == 2
                && plays.to_go[i] == 10
                && (30..=60).contains(&plays.ball_on[i])
                && plays.margin[i] < 0
        })
        .expect("a late 2nd & 10");
    let s0 = crate::models::wp::Situation::of_snap(&plays, &s.ep, i);
    let st = State::of_snap(&plays, i);
    let spot = plays.ball_on[i] + 4;
    let got = after::wp_after(&models, &s0, &st, 5.0, after::Next::Keep(3, 6, spot));
    let at = |to_go: i32| {
        let ep = models.ep.situation(3, to_go, spot, st.secs_half - 5);
        models.wp.situation(&crate::models::wp::Situation {
            secs_game: s0.secs_game - 5.0,
            ep,
            down: 3,
            to_go,
            ball_on: spot,
            kickoff: false,
            is_try: false,
            ..s0
        })
    };
    assert_eq!(got.to_bits(), at(6).to_bits(), "{got} vs {}", at(6));
    assert!(at(6) > at(10), "3rd & 6 {} vs 3rd & 10 {}", at(6), at(10));
}

/// A touchdown as regulation ends leaves the try to decide (hand-worked
/// from the model's own try shares): behind by 7, one point levels (½
/// after) and two win, so WP after is the better of ½ × the extra point's
/// share and the two-point share; behind by 6, one point wins and a miss
/// levels. Before, the mean try decided: behind by 7 the touchdown counted
/// as a loss (0), behind by 6 as a win (1).
#[test]
fn a_touchdown_as_time_runs_out_leaves_the_try() {
    let (plays, models, s) = demo();
    let f = models.wp.finish.as_ref().expect("the demo league has the final seconds' rules");
    let i = (0..plays.len())
        .find(|&i| plays.period[i] == 4 && plays.dropback[i] && plays.secs_game[i] <= 10 && plays.down[i] > 0)
        .expect("a dropback in the final seconds");
    let st = State { secs_half: 3, secs_game: 3, ..State::of_snap(&plays, i) };
    for (margin, want) in [(-7.0, (0.5 * f.extra_point).max(f.two_point)), (-6.0, f.extra_point + 0.5 * (1.0 - f.extra_point))] {
        let s0 = crate::models::wp::Situation { margin, secs_game: 3.0, ..crate::models::wp::Situation::of_snap(&plays, &s.ep, i) };
        let got = after::wp_after(models, &s0, &st, 5.0, after::Next::Touchdown);
        assert!((got - want).abs() < 1e-12, "behind by {}: WP after {got}, the better try {want}", -margin);
    }
}

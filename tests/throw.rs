//! The throw-value model on the demo league and on a simulated league where
//! some passers throw short when trailing late: choice values average zero
//! over the league, catch and interception rates by depth hold on a held-out
//! season, and the habit shows in the choice value, not in the execution value.

mod common;

use lategame::league::{League, LeagueConfig};
use lategame::models::throw::{self, band_of, State, BANDS, COMPLETE, INTERCEPTED};
use lategame::situation::Preset;
use lategame::sim::{simulate_throw_short, SimConfig, ThrowShort};
use lategame::splits::split_table;

#[test]
fn choice_averages_zero_and_the_parts_add_up() {
    let lg = common::demo_league();
    let t = &lg.throw;
    let s = &lg.scored.scores;
    let (mut n, mut sum) = (0.0, 0.0);
    for i in 0..lg.plays().len() {
        if !throw::applies(lg.plays(), i) {
            assert!(t.choice[i].is_nan() && t.execution[i].is_nan());
            continue;
        }
        n += 1.0;
        sum += t.choice[i];
        // choice + execution = actual WPA − the league-choice expectation.
        let lhs = t.choice[i] + t.execution[i];
        let rhs = s.wpa[i] - t.league[i];
        assert!((lhs - rhs).abs() < 1e-12, "snap {i}: {lhs} vs {rhs}");
    }
    let mean = sum / n;
    eprintln!("{n} attempts with air yards; mean choice value {mean:+.6} WPA");
    assert!(n > 50_000.0);
    assert!(mean.abs() < 0.002, "mean choice value {mean}");
    // The split engine's league row agrees.
    let every = split_table(lg.plays(), &lg.values(), &Preset::EverySnap.situation(8), 20);
    let j = lategame::splits::metric_index("choice").expect("choice metric");
    let league = every.league[j].expect("league choice");
    assert!((league - mean).abs() < 1e-9, "{league} vs {mean}");
}

#[test]
fn catch_and_interception_rates_by_depth_hold_on_a_held_out_season() {
    let lg = common::demo_league();
    let p = lg.plays();
    let last = *p.seasons().last().expect("seasons");
    let train: Vec<u32> = (0..p.len() as u32).filter(|&i| p.season[i as usize] != last).collect();
    let model = throw::fit(p, &train, &Default::default()).expect("fit").expect("air yards");
    let (mut pred, mut obs, mut n) = ([[0.0; 2]; BANDS], [[0.0; 2]; BANDS], [0.0; BANDS]);
    for i in (0..p.len()).filter(|&i| p.season[i] == last && throw::applies(p, i)) {
        let b = band_of(p.air_yards[i].unwrap_or(0));
        let q = model.outcome_probs(&State::of_snap(p, i), b);
        pred[b][0] += q[COMPLETE];
        pred[b][1] += q[INTERCEPTED];
        obs[b][0] += p.complete[i] as i32 as f64;
        obs[b][1] += p.intercepted[i] as i32 as f64;
        n[b] += 1.0;
    }
    for b in 0..BANDS {
        assert!(n[b] > 300.0, "band {b}: {} throws", n[b]);
        for (k, what) in ["catch", "interception"].iter().enumerate() {
            let (pr, ob) = (pred[b][k] / n[b], obs[b][k] / n[b]);
            eprintln!("{} ({} throws) {what}: predicted {pr:.4}, observed {ob:.4}", throw::BAND_LABELS[b], n[b]);
            assert!((pr - ob).abs() < 0.02, "{} {what}: predicted {pr:.4}, observed {ob:.4}", throw::BAND_LABELS[b]);
        }
    }
}

#[test]
fn a_passer_who_throws_short_when_trailing_late_loses_on_choice_not_execution() {
    let short = ThrowShort { every: 2, tilt: -1.5 };
    let out = simulate_throw_short(&SimConfig { seasons: 6, seed: 31, first_season: 2030 }, short);
    let dir = std::env::temp_dir().join(format!("lategame-throw-short-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let path = dir.join("league.parquet");
    lategame::playfile::write_rows(&out.rows, &path).expect("write");
    let lg = League::open_with(&LeagueConfig { cache_dir: None, ..LeagueConfig::new(&path) }).expect("open");
    let _ = std::fs::remove_dir_all(&dir);
    let table = split_table(lg.plays(), &lg.values(), &Preset::EndOfGame.situation(8), 20);
    let habit: std::collections::HashMap<&str, f64> =
        out.truth.iter().map(|t| (t.passer.as_str(), t.late_trailing_depth_shift)).collect();
    assert!(habit.values().any(|&s| s < 0.0) && habit.values().any(|&s| s == 0.0));
    // The passer with the habit and the most end-of-game throws.
    let attempts = |r: &lategame::splits::PasserRow| r.cell("choice").map_or(0.0, |c| c.n);
    let him = table
        .qualified()
        .filter(|r| habit.get(r.passer.as_str()).is_some_and(|&s| s < 0.0))
        .max_by(|a, b| attempts(a).total_cmp(&attempts(b)))
        .expect("a qualified passer with the habit");
    let (c, e) = (him.cell("choice").expect("choice"), him.cell("execution").expect("execution"));
    eprintln!(
        "{}: {} throws; choice {:?} est {:?} [{:?}, {:?}]; execution {:?} est {:?} [{:?}, {:?}]",
        him.passer, c.n, c.value, c.estimate, c.lo, c.hi, e.value, e.estimate, e.lo, e.hi
    );
    assert!(c.estimate.expect("estimate") < 0.0);
    assert!(c.hi.expect("interval") < 0.0, "choice interval reaches zero: {:?}", c.hi);
    assert!(e.hi.expect("interval") >= 0.0, "execution interval below zero: {:?}", e.hi);
    // Over every qualified passer: the habit separates the choice values
    // and leaves execution alone.
    let mean = |habit_on: bool, key: &str| {
        let v: Vec<f64> = table
            .qualified()
            .filter(|r| habit.get(r.passer.as_str()).is_some_and(|&s| (s < 0.0) == habit_on))
            .filter_map(|r| r.cell(key).and_then(|c| c.value))
            .collect();
        v.iter().sum::<f64>() / v.len() as f64
    };
    let (cw, cn, ew, en) = (mean(true, "choice"), mean(false, "choice"), mean(true, "execution"), mean(false, "execution"));
    eprintln!("choice: habit {cw:+.5}, none {cn:+.5}; execution: habit {ew:+.5}, none {en:+.5}");
    assert!(cw < cn);
    assert!((ew - en).abs() < (cn - cw), "execution gap {} vs choice gap {}", ew - en, cn - cw);
}

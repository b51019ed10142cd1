//! Lift against the simulator's truth: on a league drawn with true late-game
//! shifts, the shrunk lift beats the raw difference and its 90% intervals
//! hold the truth; the demo-sized league without shifts keeps every interval
//! open; a tiny hand-worked league checks every number by hand.

mod common;

use common::rows;

use lategame::plays::Plays;
use lategame::situation::Preset;
use lategame::sim::{simulate_with_shifts, LateShifts, SimConfig, TruthRow};
use lategame::splits::{self, metric_index, SnapValues};

fn plays(rows: &[lategame::playfile::PlayRow]) -> Plays {
    rows::plays("sim", rows)
}

/// Rate metrics only need the plays; the model columns are zeros here.
fn zeros(n: usize) -> (Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
    (vec![0.0; n], vec![0.5; n], vec![0.0; n], vec![f64::NAN; n])
}

fn rmse(pairs: &[(f64, f64)]) -> f64 {
    (pairs.iter().map(|(a, b)| (a - b).powi(2)).sum::<f64>() / pairs.len() as f64).sqrt()
}

type Pick = fn(&TruthRow) -> Option<(f64, f64)>;

/// On leagues with true shifts (logit SD 0.5 in sack, interception and
/// completion chances late and close), for every passer with an estimate:
/// lift RMSE against the true lift (late-and-close rate minus his rate on
/// his other dropbacks) vs the raw difference's, and 90% coverage.
#[test]
fn lift_recovers_true_late_game_shifts() {
    let shifts = LateShifts { sack_sd: 0.5, interception_sd: 0.5, complete_sd: 0.5 };
    let metrics: [(&str, Pick); 3] = [
        ("sack_rate", |r| Some((r.end_of_game_sack?, r.other_sack?))),
        ("int_rate", |r| Some((r.end_of_game_interception?, r.other_interception?))),
        ("comp_pct", |r| Some((r.end_of_game_complete?, r.other_complete?))),
    ];
    // Per metric: (lift, truth) pairs, (raw difference, truth) pairs, hits.
    type Tally = (Vec<(f64, f64)>, Vec<(f64, f64)>, usize);
    let mut pooled: Vec<Tally> = vec![(Vec::new(), Vec::new(), 0); 3];
    for seed in [21, 22] {
        let out = simulate_with_shifts(&SimConfig { seasons: 6, seed, first_season: 2020 }, &shifts);
        let p = plays(&out.rows);
        let (epa, wp, wpa, cp) = zeros(p.len());
        let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
        let t = splits::split_table(&p, &v, &Preset::EndOfGame.situation(8), 20);
        let every = splits::split_table(&p, &v, &Preset::EverySnap.situation(8), 1);
        for ((key, pick), acc) in metrics.iter().zip(pooled.iter_mut()) {
            let j = metric_index(key).unwrap();
            for row in t.qualified() {
                let Some(tr) = out.truth.iter().find(|x| x.passer == row.passer) else { continue };
                let Some((late, other)) = pick(tr) else { continue };
                let truth = 100.0 * (late - other);
                let c = &row.cells[j];
                let (Some(l), Some(lo), Some(hi)) = (c.lift, c.lift_lo, c.lift_hi) else { continue };
                // The raw difference: his late rate minus his rate on his other snaps.
                let all = &every.row(&row.passer).unwrap().cells[j];
                let (n_all, n_late) = (all.n, c.n);
                let elsewhere = (all.value.unwrap() * n_all - c.value.unwrap() * n_late) / (n_all - n_late);
                acc.0.push((l, truth));
                acc.1.push((c.value.unwrap() - elsewhere, truth));
                acc.2 += usize::from(lo <= truth && truth <= hi);
            }
        }
    }
    for ((key, _), (lift, raw, hits)) in metrics.iter().zip(&pooled) {
        let (rl, rr) = (rmse(lift), rmse(raw));
        let cover = *hits as f64 / lift.len() as f64;
        println!("{key}: {} passers, lift RMSE {rl:.2} vs raw {rr:.2} ({:.0}% lower), 90% coverage {:.1}%", lift.len(), 100.0 * (1.0 - rl / rr), 100.0 * cover);
        assert!(lift.len() >= 60, "{key}: only {} passers", lift.len());
        assert!(rl <= 0.8 * rr, "{key}: lift RMSE {rl:.3} vs raw {rr:.3}");
        assert!((0.85..=0.95).contains(&cover), "{key}: coverage {cover:.3}");
    }
}

/// One pass attempt: `late` puts it at 5:00 of the 4th quarter (end of game,
/// tied), else at 13:20 of the 1st; 1st and 10 at the own 30 either way.
fn attempt(seq: i32, passer: &str, late: bool, complete: bool) -> lategame::playfile::PlayRow {
    let row = lategame::playfile::PlayRow {
        complete: Some(complete),
        gain: Some(if complete { 5 } else { 0 }),
        ..rows::throw("2020w01g01", seq, "HOM", "AWY", passer)
    };
    if late {
        rows::late(row)
    } else {
        row
    }
}

/// Four passers, a dozen throws each: six early, six late and close, all
/// on 1st and 10 at the own 30 (one state cell). Completions (early, late):
/// A 3 and 5, B 4 and 2, C 3 and 3, D 5 and 4.
fn tiny_league() -> Plays {
    let who = [("Ansel Quarry", 3, 5), ("Bram Tollet", 4, 2), ("Cael Ostwin", 3, 3), ("Dorn Hevel", 5, 4)];
    let mut rows = Vec::new();
    for late in [false, true] {
        for (name, early_c, late_c) in who {
            let c = if late { late_c } else { early_c };
            for k in 0..6 {
                rows.push(attempt(rows.len() as i32 + 1, name, late, k < c));
            }
        }
    }
    plays(&rows)
}

#[test]
fn hand_worked_tiny_league() {
    use lategame::stats::multilevel::{fit_variance, normal_interval, Model, Obs, PasserData};
    let p = tiny_league();
    let (epa, wp, wpa, cp) = zeros(p.len());
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let t = splits::split_table(&p, &v, &Preset::EndOfGame.situation(8), 1);
    let j = metric_index("comp_pct").unwrap();
    let cell = |name: &str| t.row(name).unwrap().cells[j].clone();
    let close = |a: f64, b: f64, tol: f64| (a - b).abs() <= tol;

    // Raw late rates and the league's: 5/6, 2/6, 3/6, 4/6; 14/24.
    let (a, b, c, d) = (cell("Ansel Quarry"), cell("Bram Tollet"), cell("Cael Ostwin"), cell("Dorn Hevel"));
    for (x, want) in [(&a, 500.0 / 6.0), (&b, 200.0 / 6.0), (&c, 50.0), (&d, 400.0 / 6.0)] {
        assert!(close(x.value.unwrap(), want, 1e-9) && x.n == 6.0);
    }
    assert!(close(a.league.unwrap(), 1400.0 / 24.0, 1e-9));

    // State-mix baseline without his own snaps: one cell, so the league's
    // other 18 late throws (smoothing toward the same value changes nothing).
    // A: 9/18, B: 12/18, C: 11/18, D: 10/18.
    for (x, want) in [(&a, 50.0), (&b, 1200.0 / 18.0), (&c, 1100.0 / 18.0), (&d, 1000.0 / 18.0)] {
        assert!(close(x.adjusted_league.unwrap(), want, 1e-9), "{:?} vs {want}", x.adjusted_league);
    }
    // Its interval for A: var = p(1−p)/6 + p(1−p)·6²/(18 + 10)/6² with p = 14/24,
    // = 0.243056/6 + 0.243056/28 = 0.049190; 1.6449 × √ = 0.36483 → ±36.48 points.
    let half = 1.6448536 * (0.2430556f64 / 6.0 + 0.2430556 / 28.0).sqrt() * 100.0;
    assert!(close(a.adjusted_diff.unwrap(), 100.0 / 3.0, 1e-9));
    assert!(close(a.adjusted_diff_lo.unwrap(), 100.0 / 3.0 - half, 1e-3) && close(a.adjusted_diff_hi.unwrap(), 100.0 / 3.0 + half, 1e-3));

    // The model's inputs by hand: other snaps y' = 3/6, 4/6, 3/6, 5/6 with
    // v' = p'(1−p')/6, p' = (15 + ½)/(24 + 1) = 0.62; late y = 5/6, ... with
    // v = p(1−p)/6, p = (14 + ½)/25 = 0.58. Every passer has 12 dropbacks, so
    // the volume line has no slope to fit (intercept only).
    let (vo, vh) = (0.62 * 0.38 / 6.0, 0.58 * 0.42 / 6.0);
    let other = [3.0 / 6.0, 4.0 / 6.0, 3.0 / 6.0, 5.0 / 6.0];
    let late = [5.0 / 6.0, 2.0 / 6.0, 3.0 / 6.0, 4.0 / 6.0];
    let level: Vec<(Obs, f64)> = other.iter().map(|&y| (Obs { y, v: vo }, 0.0)).collect();
    let diffs: Vec<(Obs, f64)> = other.iter().zip(&late).map(|(&o, &h)| (Obs { y: h - o, v: vo + vh }, 0.0)).collect();
    let model = Model::new(&fit_variance(&level, false).unwrap(), Some(&fit_variance(&diffs, false).unwrap()));
    let mut ests = Vec::new();
    for (k, x) in [&a, &b, &c, &d].into_iter().enumerate() {
        let post = model.passer(&PasserData { other: Some(Obs { y: other[k], v: vo }), here: Some(Obs { y: late[k], v: vh }), x: 0.0 }).unwrap();
        let (l, lv) = post.lift.unwrap();
        let (lo, hi) = normal_interval(l, lv, 0.9).unwrap();
        assert!(close(x.lift.unwrap(), 100.0 * l, 1e-9) && close(x.lift_lo.unwrap(), 100.0 * lo, 1e-9) && close(x.lift_hi.unwrap(), 100.0 * hi, 1e-9));
        assert!(close(x.estimate.unwrap(), 100.0 * post.value.0, 1e-9) && close(x.normal.unwrap(), 100.0 * post.level.0, 1e-9));
        // Estimate = his normal + his lift, exactly (each grid point adds up).
        assert!(close(x.estimate.unwrap(), x.normal.unwrap() + x.lift.unwrap(), 1e-9));
        // The lift lies between the league's raw lift (14/24 − 15/24) and his
        // raw difference: shrunk toward the league's, never past it.
        let (league_lift, raw): (f64, f64) = (100.0 * (14.0 - 15.0) / 24.0, 100.0 * (late[k] - other[k]));
        assert!(x.lift.unwrap() >= league_lift.min(raw) - 1.0 && x.lift.unwrap() <= league_lift.max(raw) + 1.0, "{k}: {:?} vs {league_lift}, {raw}", x.lift);
        assert!(x.lift_hi.unwrap() > x.lift_lo.unwrap());
        ests.push(x.estimate.unwrap());
    }
    // Percentiles of the estimates among the four (higher is better): the
    // share below plus half the share equal, ×100.
    for (k, x) in [&a, &b, &c, &d].into_iter().enumerate() {
        let below = ests.iter().filter(|&&e| e < ests[k]).count() as f64;
        let equal = ests.iter().filter(|&&e| e == ests[k]).count() as f64;
        assert!(close(x.percentile.unwrap(), (below + 0.5 * equal) / 4.0 * 100.0, 1e-9));
    }
    // A's raw late rate is the best and his raw difference the largest; his
    // estimate ranks above B's, whose late rate and difference are the worst.
    assert!(a.estimate.unwrap() > b.estimate.unwrap() && a.lift.unwrap() > b.lift.unwrap());
    assert!(close(a.percentile.unwrap(), 87.5, 1e-9) || close(a.percentile.unwrap(), 62.5, 1e-9));
    assert!(close(b.percentile.unwrap(), 12.5, 1e-9));
    // The chance of beating the league, from the estimate's normal posterior:
    // above ½ exactly when the estimate is above the league's 58.3%.
    for x in [&a, &b, &c, &d] {
        assert_eq!(x.p_better.unwrap() > 0.5, x.estimate.unwrap() > x.league.unwrap());
    }
}

/// No interval of zero width anywhere in the splits JSON of the demo league:
/// every preset, with every passer ranked (min=1), and a few narrow windows.
#[test]
fn no_interval_in_the_splits_json_has_zero_width() {
    let base = common::demo_server();
    let mut queries: Vec<String> = Preset::ALL.iter().map(|p| format!("preset={}&min=1", p.key())).collect();
    queries.extend(["preset=end-of-game&down=4&min=1", "preset=two-minute-drill&season=2021&min=1", "preset=end-of-game-red-zone&season=2024..2025"].map(String::from));
    let mut checked = 0usize;
    for q in &queries {
        let r = common::get(&format!("{base}/api/splits?{q}"));
        assert_eq!(r.status, 200, "{q}");
        let j = r.json();
        for row in j["rows"].as_array().unwrap() {
            for c in row["cells"].as_array().unwrap() {
                if c["estimate"].is_number() {
                    assert!(c["lo"].is_number() && c["hi"].is_number(), "{q}: {} {}: estimate without interval", row["passer"], c["key"]);
                }
                for (lo, hi) in [("lo", "hi"), ("lift_lo", "lift_hi"), ("adjusted_diff_lo", "adjusted_diff_hi")] {
                    if let (Some(a), Some(b)) = (c[lo].as_f64(), c[hi].as_f64()) {
                        assert!(b > a, "{q}: {} {}: {lo} {a} and {hi} {b}", row["passer"], c["key"]);
                        checked += 1;
                    }
                }
            }
        }
    }
    println!("{checked} intervals checked");
    assert!(checked > 10_000, "only {checked} intervals");
}

/// Lift through the front doors: JSON sorted by lift, the CSV's lift
/// columns, the explorer's sort option, the profile's words and rule, the
/// report's lift column, and a clear error for an unknown `by`.
#[test]
fn lift_reaches_json_csv_pages_and_report() {
    let base = common::demo_server();
    let j = common::get(&format!("{base}/api/splits?preset=end-of-game&sort=epa&by=lift&dir=desc")).json();
    let lifts: Vec<f64> = j["rows"].as_array().unwrap().iter().filter_map(|r| r["cells"].as_array().unwrap().iter().find(|c| c["key"] == "epa")?["lift"].as_f64()).collect();
    assert!(lifts.len() >= 20 && lifts.windows(2).all(|w| w[0] >= w[1]), "not sorted by lift: {:?}", &lifts[..lifts.len().min(5)]);
    assert!(j["league_lift"].as_array().unwrap().iter().any(|x| x.is_number()));

    let csv = common::get(&format!("{base}/api/splits.csv?preset=end-of-game")).body;
    let head: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    for col in ["epa_lift", "epa_lift_lo90", "epa_lift_hi90", "sack_rate_lift", "rating_lift", "comp_pct_p_better"] {
        assert!(head.contains(&col), "CSV lacks {col}");
    }
    assert!(!head.iter().any(|h| h.ends_with("_z")));

    let page = common::get(&format!("{base}/explore?preset=end-of-game&sort=epa&by=lift")).body;
    assert!(page.contains(r#"<option value="lift" selected>"#) && page.contains("lift: his value here minus his normal"));
    let bad = common::get(&format!("{base}/explore?by=lifted"));
    assert_eq!(bad.status, 400);
    assert!(bad.body.contains("lift"), "the error names the valid choices");

    let prof = common::get(&format!("{base}/passer?passer={}", common::enc("Wendell Jastennox"))).body;
    assert!(prof.contains("Is he different when it matters?") && prof.contains("fairly sure: the 90% interval of the lift"));
    assert!(["about his normal", "leaning better", "leaning worse", "better, fairly sure", "worse, fairly sure"].iter().any(|w| prof.contains(w)));

    let report = common::get(&format!("{base}/report?preset=end-of-game&passer={}", common::enc("Wendell Jastennox"))).body;
    assert!(report.contains("Against his normal"), "the report says where he is off his normal");
}

//! The split engine on the simulated league: shrunk end-of-game rates
//! beat raw rates against the simulator's truth, filters never leak snaps
//! outside their window, and the engine's totals agree with a plain count.

use lategame::plays::{Plays, Source};
use lategame::situation::{Preset, Situation};
use lategame::sim::{simulate, SimConfig};
use lategame::splits::{self, metric_index, SnapValues};

fn league() -> (Plays, Vec<lategame::sim::TruthRow>) {
    let out = simulate(&SimConfig { seasons: 6, seed: 7, first_season: 2020 });
    let sources = (0..out.rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    (Plays::from_rows(vec!["sim".into()], &out.rows, sources), out.truth)
}

/// Rate metrics only need the plays; the model columns are zeros here.
fn zeros(n: usize) -> (Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
    (vec![0.0; n], vec![0.5; n], vec![0.0; n], vec![f64::NAN; n])
}

fn rmse(pairs: &[(f64, f64)]) -> f64 {
    (pairs.iter().map(|(a, b)| (a - b).powi(2)).sum::<f64>() / pairs.len() as f64).sqrt()
}

#[test]
fn shrunk_late_and_close_rates_beat_raw_rates_against_the_truth() {
    let (p, truth) = league();
    let (epa, wp, wpa, cp) = zeros(p.len());
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let min = 10;
    let t = splits::split_table(&p, &v, &Preset::EndOfGame.situation(8), min);
    for (key, pick) in [
        ("comp_pct", (|r: &lategame::sim::TruthRow| r.end_of_game_complete) as fn(&lategame::sim::TruthRow) -> Option<f64>),
        ("int_rate", |r| r.end_of_game_interception),
        ("sack_rate", |r| r.end_of_game_sack),
    ] {
        let j = metric_index(key).unwrap();
        let (mut raw, mut shrunk) = (Vec::new(), Vec::new());
        for row in t.qualified() {
            let Some(tr) = truth.iter().find(|x| x.passer == row.passer) else { continue };
            let Some(truth_rate) = pick(tr) else { continue };
            let c = &row.cells[j];
            raw.push((c.value.unwrap() / 100.0, truth_rate));
            shrunk.push((c.estimate.unwrap() / 100.0, truth_rate));
        }
        assert!(raw.len() >= 20, "{key}: only {} passers", raw.len());
        let (r, s) = (rmse(&raw), rmse(&shrunk));
        println!("{key}: {} passers, raw RMSE {r:.4}, shrunk RMSE {s:.4} ({:.0}% lower)", raw.len(), 100.0 * (1.0 - s / r));
        assert!(s <= 0.75 * r, "{key}: shrunk {s:.4} vs raw {r:.4}");
    }
}

#[test]
fn filters_never_return_a_snap_outside_their_window() {
    let (p, _) = league();
    let (epa, wp, wpa, cp) = zeros(p.len());
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let lc = Preset::EndOfGame.situation(7);
    for s in splits::play_list(&p, &v, &lc, None, None) {
        let i = s.index;
        assert!(p.margin[i].abs() <= 7);
        assert!((p.period[i] == 4 && p.clock[i] <= 450) || p.period[i] >= 5);
    }
    let q: Vec<(String, String)> = [("preset", "two-minute-drill"), ("down", "3,4"), ("ball-on", "50..+21"), ("season", "2021")].iter().map(|(a, b)| (a.to_string(), b.to_string())).collect();
    let s = Situation::from_query(&q).unwrap();
    let list = splits::play_list(&p, &v, &s, None, None);
    assert!(!list.is_empty());
    for snap in list {
        let i = snap.index;
        assert!(p.secs_half[i] <= 120 && matches!(p.period[i], 2 | 4));
        assert!((-8..=0).contains(&p.margin[i]));
        assert!(p.down[i] >= 3 && (50..=79).contains(&p.ball_on[i]) && p.season[i] == 2021);
    }
}

#[test]
fn totals_agree_with_a_plain_count() {
    let (p, _) = league();
    let (epa, wp, wpa, cp) = zeros(p.len());
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let t = splits::split_table(&p, &v, &Preset::EverySnap.situation(8), 1);
    let db = metric_index("dropbacks").unwrap();
    let att = metric_index("attempts").unwrap();
    let total: f64 = t.rows.iter().map(|r| r.cells[db].value.unwrap()).sum();
    assert_eq!(total as usize, p.dropback.iter().filter(|d| **d).count());
    assert_eq!(t.league[db], Some(total));
    let passes = (0..p.len()).filter(|&i| p.kind[i] == lategame::playfile::Kind::Pass).count();
    assert_eq!(t.league[att], Some(passes as f64));
    // a passer filter keeps the league baseline of everyone
    let name = t.rows[0].passer.clone();
    let one = splits::split_table(&p, &v, &Situation { passer: Some(name.clone()), ..Preset::EverySnap.situation(8) }, 1);
    assert_eq!(one.rows.len(), 1);
    assert_eq!(one.league, t.league);
    assert_eq!(one.rows[0].cells[db].value, t.rows[0].cells[db].value);
}

#[test]
fn the_bundled_demo_league_regenerates_exactly() {
    // lategame simulate --seasons 6 --seed 7 gives the bundled file byte for byte.
    use sha2::{Digest, Sha256};
    let out = simulate(&SimConfig { seasons: 6, seed: 7, first_season: 2020 });
    let dir = std::env::temp_dir().join(format!("lategame-regen-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("league.parquet");
    lategame::playfile::write_rows(&out.rows, &path).unwrap();
    let bundled = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data/league.parquet");
    let h = |p: &std::path::Path| format!("{:x}", Sha256::digest(std::fs::read(p).unwrap()));
    assert_eq!(h(&path), h(&bundled), "regenerate with: lategame simulate --seasons 6 --seed 7 --out demo-data/league.parquet");
    let _ = std::fs::remove_dir_all(&dir);
}

//! Opponent-adjusted EPA per dropback: a hand-made league where two passers
//! of the same skill met only strong or only weak defenses, and a simulated
//! league with wide defensive spread where the adjustment moves passers'
//! rates toward their true rates against a neutral defense.

mod common;

use common::rows;

use lategame::playfile::PlayRow;
use lategame::plays::{Plays, Source};
use lategame::situation::{Preset, Situation};
use lategame::sim::{simulate_with, DefenseSpread, LateShifts, SimConfig};
use lategame::splits::{self, metric_index, SnapValues, SplitIndex};

fn plays(rows: &[PlayRow]) -> Plays {
    rows::plays("fixture", rows)
}

/// A 1st-and-10 throw in the 1st quarter by `passer` of `offense` against `defense`.
fn throw(game: &str, seq: i32, offense: &str, defense: &str, passer: &str) -> PlayRow {
    PlayRow { clock: 900 - seq, ..rows::throw(game, seq, offense, defense, passer) }
}

/// Four defenses: STA and STB strong (EPA −0.4 a dropback against them),
/// WKA and WKB weak (+0.4). Four passers of the same skill (0): Avel Drumm
/// met only the strong two (40 throws each), Brisk Tanno only the weak two
/// (40 each), Coll Vesk and Dary Min every defense (20 each). Each (passer,
/// defense) game's EPA is the defense's value ± 1 alternately, so its mean
/// is exactly the defense's value.
fn fixture() -> (Plays, Vec<f64>) {
    let defenses = [("STA", -0.4), ("STB", -0.4), ("WKA", 0.4), ("WKB", 0.4)];
    let slate: [(&str, &str, &[usize], i32); 4] = [
        ("Avel Drumm", "OFA", &[0, 1], 40),
        ("Brisk Tanno", "OFB", &[2, 3], 40),
        ("Coll Vesk", "OFC", &[0, 1, 2, 3], 20),
        ("Dary Min", "OFD", &[0, 1, 2, 3], 20),
    ];
    let (mut rows, mut epa) = (Vec::new(), Vec::new());
    let mut g = 0;
    for (passer, team, faced, n) in slate {
        for &d in faced {
            g += 1;
            let key = format!("2020w01g{g:02}");
            for k in 0..n {
                rows.push(throw(&key, k + 1, team, defenses[d].0, passer));
                epa.push(defenses[d].1 + if k % 2 == 0 { 1.0 } else { -1.0 });
            }
        }
    }
    (plays(&rows), epa)
}

#[test]
fn a_passer_who_met_strong_defenses_is_not_marked_down() {
    let (p, epa) = fixture();
    let n = p.len();
    let (wp, wpa, cp) = (vec![0.5; n], vec![0.0; n], vec![0.6; n]);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let s = Preset::EverySnap.situation(8);
    let t = splits::split_table(&p, &v, &s, 1);
    let row = |name: &str| t.row(name).unwrap_or_else(|| panic!("{name} in the table"));
    let j = metric_index("epa").unwrap();
    let (a, b) = (row("Avel Drumm"), row("Brisk Tanno"));
    let (raw_a, raw_b) = (a.cells[j].value.unwrap(), b.cells[j].value.unwrap());
    assert!((raw_a + 0.4).abs() < 1e-12 && (raw_b - 0.4).abs() < 1e-12, "raw {raw_a} {raw_b}");
    let (adj_a, adj_b) = (a.epa_opp_adj.unwrap(), b.epa_opp_adj.unwrap());
    // Direction: the strong defenses' effect is taken out of A (he moves up),
    // the weak ones' out of B (down), and they end closer together.
    assert!(adj_a > raw_a && adj_b < raw_b, "adjusted {adj_a} {adj_b}");
    assert!((adj_b - adj_a).abs() < (raw_b - raw_a).abs());
    // Magnitude, by hand: every cell mean is exactly its defense's value, so
    // the passers do not differ (σa ≈ 0) and each defense's effect is its
    // mean shrunk by k = n_d / (n_d + σe²/σb²), n_d = 80 throws; the gap of
    // 0.8 shrinks to 0.8 (1 − k).
    let fit = splits::opponent_fit(&SplitIndex::build(&p, &v), &p, &v, &s).expect("a fit");
    let k = 80.0 / (80.0 + fit.sd_snap.powi(2) / fit.sd_defense.powi(2));
    let want = 0.8 * (1.0 - k);
    eprintln!("σ passer {:.4}, defense {:.4}, snap {:.4}; k {k:.4}; gap raw 0.800, adjusted {:.4} (by hand {want:.4})", fit.sd_passer, fit.sd_defense, fit.sd_snap, adj_b - adj_a);
    assert!(((adj_b - adj_a) - want).abs() < 0.01, "gap {} vs {want}", adj_b - adj_a);
    assert!(adj_b - adj_a < 0.1, "the adjusted gap is small: {}", adj_b - adj_a);
    // The faced effects: A's defenses tougher than average, B's easier.
    assert!(a.epa_opp_faced.unwrap() < -0.3 && b.epa_opp_faced.unwrap() > 0.3);
    // Passers who met every defense barely move.
    for name in ["Coll Vesk", "Dary Min"] {
        let r = row(name);
        assert!((r.epa_opp_adj.unwrap() - r.cells[j].value.unwrap()).abs() < 0.02, "{name}");
    }
    // The interval is around the value and not zero-width.
    for r in [a, b] {
        let (lo, hi) = (r.epa_opp_adj_lo.unwrap(), r.epa_opp_adj_hi.unwrap());
        assert!(lo < r.epa_opp_adj.unwrap() && r.epa_opp_adj.unwrap() < hi, "{lo} {hi}");
    }
    // In JSON under its own names.
    let js = serde_json::to_value(&t).unwrap();
    let first = &js["rows"][0];
    assert!(first["epa_opp_adj"].is_number() && first["epa_opp_adj_lo"].is_number() && first["epa_opp_adj_hi"].is_number(), "{first}");
}

fn rmse(pairs: &[(f64, f64)]) -> f64 {
    (pairs.iter().map(|(a, b)| (a - b).powi(2)).sum::<f64>() / pairs.len() as f64).sqrt()
}

/// A league with pass rush and pass defense spread 4× wider than the demo
/// league's: every passer's sack rate and completion rate over every snap,
/// raw and with the defenses taken out (the same crossed model the EPA
/// column uses), against his true rate against a neutral defense.
#[test]
fn the_adjustment_moves_rates_toward_the_truth_on_a_simulated_league() {
    let cfg = SimConfig { seasons: 3, seed: 21, first_season: 2020 };
    let out = simulate_with(&cfg, &LateShifts::default(), DefenseSpread { scale: 4.0 }, &|_, _| {});
    let sources = (0..out.rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    let p = Plays::from_rows(vec!["sim".into()], &out.rows, sources);
    let n = p.len();
    let (epa, wp, wpa, cp) = (vec![0.0; n], vec![0.5; n], vec![0.0; n], vec![f64::NAN; n]);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let ix = SplitIndex::build(&p, &v);
    let s = Situation::default();
    type Truth = fn(&lategame::sim::TruthRow) -> f64;
    let cases: [(&str, Truth); 2] = [("sack_rate", |t| t.neutral_sack), ("comp_pct", |t| t.neutral_complete)];
    for (key, truth_of) in cases {
        let j = metric_index(key).unwrap();
        let fit = splits::opponent_fit_metric(&ix, &p, &v, &s, j).expect("a fit");
        let (mut raw, mut adj) = (Vec::new(), Vec::new());
        for t in &out.truth {
            let Some(who) = p.passer_index(&t.passer) else { continue };
            let Some(a) = fit.passers.get(&who) else { continue };
            if t.dropbacks < 100 {
                continue;
            }
            raw.push((a.raw, truth_of(t)));
            adj.push((a.value, truth_of(t)));
        }
        let (r0, r1) = (rmse(&raw), rmse(&adj));
        eprintln!(
            "{key}: {} passers, σ defense {:.4} σ passer {:.4}; RMSE raw {r0:.5}, adjusted {r1:.5} ({:.0}% lower)",
            raw.len(),
            fit.sd_defense,
            fit.sd_passer,
            100.0 * (1.0 - r1 / r0)
        );
        assert!(raw.len() >= 40, "{key}: {} passers", raw.len());
        assert!(r1 < 0.9 * r0, "{key}: adjusted RMSE {r1} not 10% below raw {r0}");
    }
}

/// Through the front doors on the demo league: the JSON's fields with an
/// interval of positive width, the CSV's columns, the explorer's column
/// (value metrics) and the profile's lines with their explanation.
#[test]
fn the_adjusted_epa_reaches_json_csv_and_pages() {
    let base = common::demo_server();
    let j = common::get(&format!("{base}/api/splits?preset=end-of-game&min=1")).json();
    let rows = j["rows"].as_array().unwrap();
    let mut with = 0;
    for r in rows {
        if let (Some(a), Some(lo), Some(hi)) = (r["epa_opp_adj"].as_f64(), r["epa_opp_adj_lo"].as_f64(), r["epa_opp_adj_hi"].as_f64()) {
            assert!(lo < a && a < hi, "{}: {lo} {a} {hi}", r["passer"]);
            with += 1;
        }
    }
    assert_eq!(with, rows.len(), "every passer with a dropback here has the adjusted value");

    let csv = common::get(&format!("{base}/api/splits.csv?preset=end-of-game")).body;
    let mut lines = csv.lines();
    let head: Vec<&str> = lines.next().unwrap().split(',').collect();
    for col in ["epa_opp_adj", "epa_opp_adj_lo90", "epa_opp_adj_hi90", "epa_opp_faced"] {
        assert!(head.contains(&col), "CSV lacks {col}");
    }
    let at = head.iter().position(|h| *h == "epa_opp_adj").unwrap();
    let league: Vec<&str> = lines.next().unwrap().split(',').collect();
    assert_eq!(league[at], "", "the league row has no adjusted value");
    let first: Vec<&str> = lines.next().unwrap().split(',').collect();
    assert!(first[at].parse::<f64>().is_ok(), "{}", first[at]);

    let page = common::get(&format!("{base}/explore?preset=end-of-game&cols=value")).body;
    assert!(page.contains("EPA/db vs avg D") && page.contains("Against an average defense"));
    let key = common::get(&format!("{base}/explore?preset=end-of-game")).body;
    assert!(!key.contains("EPA/db vs avg D"), "the key numbers keep to a laptop's width");
    let prof = common::get(&format!("{base}/passer?passer={}", common::enc("Wendell Jastennox"))).body;
    assert!(prof.contains("EPA per dropback against an average defense") && prof.contains("against an average defense "), "profile lines");
    assert!(prof.contains("than average") || prof.contains("about average"), "the defenses he faced, in words");
}

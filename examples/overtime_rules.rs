//! Does telling the WP model which seasons played which overtime rules
//! help? Simulates a league whose seasons alternate in blocks of three
//! between first-score-wins (15:00) and the default touchdown-or-answer
//! (10:00), then holds out each of the last six seasons in turn (as the
//! calibration page does) twice: with the right overtime config and with
//! the default one. Prints the overtime stratum's and the late-and-close
//! stratum's Brier gain over the margin-and-time baseline with their
//! game-clustered 90% bands.
//!
//! Then, from the same held-out fits made again for each config, the
//! paired difference on the overtime snaps (right minus default, in points
//! of the baseline's Brier score), split by the seasons' rules, with a
//! bootstrap over games.
//!
//! `cargo run --release --example overtime_rules -- [--seed 7] [--seasons 12]
//! [--rules first-score-wins|both-possess] [--period 15:00]`

use anyhow::{bail, Context};
use lategame::models::strata::WpStratum;
use lategame::models::calib::held_out_predictions;
use lategame::models::{calibrate_with, CalibOptions};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use std::collections::HashMap;
use lategame::overtime::{OvertimeConfig, Rule, Rules, SeasonRules};
use lategame::plays::{Plays, Source};
use lategame::sim::{simulate_with_overtime, DefenseSpread, LateShifts, SimConfig};
use std::time::Instant;

fn main() -> anyhow::Result<()> {
    let (mut seed, mut seasons, mut rule, mut period_secs) = (7u64, 12u32, Rule::FirstScoreWins, 900);
    let mut it = std::env::args().skip(1);
    while let Some(flag) = it.next() {
        let value = it.next().with_context(|| format!("{flag} needs a value"))?;
        match flag.as_str() {
            "--seed" => seed = value.parse()?,
            "--seasons" => seasons = value.parse()?,
            "--rules" => rule = Rule::from_name(&value).with_context(|| format!("--rules {value}: not a rule set"))?,
            "--period" => {
                let (m, sec) = value.split_once(':').context("--period m:ss")?;
                period_secs = m.parse::<i32>()? * 60 + sec.parse::<i32>()?;
            }
            other => bail!("unknown argument {other}"),
        }
    }
    let first = 2000;
    let old = Rules { rule, period_secs, ties: true };
    let sets = (0..seasons as i32)
        .step_by(6)
        .map(|s| SeasonRules { from: first + s, to: first + s + 2, rules: old })
        .collect();
    let right = OvertimeConfig { sets };
    let t = Instant::now();
    let out = simulate_with_overtime(&SimConfig { seasons, seed, first_season: first }, &LateShifts::default(), DefenseSpread::default(), &right, &|_, _| {});
    let sources = (0..out.rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    let mut plays = Plays::from_rows(vec!["sim".into()], &out.rows, sources);
    let ot_games = |pick: &dyn Fn(i32) -> bool| plays.games.iter().enumerate().filter(|(g, gm)| pick(gm.season) && (0..plays.len()).any(|i| plays.game[i] as usize == *g && plays.period[i] >= 5)).count();
    let ot_snaps = (0..plays.len()).filter(|&i| plays.period[i] >= 5).count();
    println!(
        "seed {seed}, {seasons} seasons simulated in {:.0} s: {} snaps, {ot_snaps} in overtime; overtime games {} under {}, {} under the default",
        t.elapsed().as_secs_f64(),
        plays.len(),
        ot_games(&|s| right.rules_for(s) == old),
        old.label(),
        ot_games(&|s| right.rules_for(s) != old)
    );
    for (name, cfg) in [("right config", right.clone()), ("default config", OvertimeConfig::default())] {
        plays.overtime = cfg;
        let t = Instant::now();
        let c = calibrate_with(&plays, &CalibOptions::default())?;
        println!("{name}: held out {} ({:.0} s)", c.holdout, t.elapsed().as_secs_f64());
        for s in c.strata.iter().filter(|s| matches!(s.stratum, WpStratum::Overtime | WpStratum::LateClose)) {
            println!(
                "  {:?}: {} snaps, {} games; Brier WP {:.4} [{:.4}, {:.4}], baseline {:.4}; gain {:.1}% [{:.1}%, {:.1}%]",
                s.stratum,
                s.wp.n,
                s.games,
                s.wp_brier.value,
                s.wp_brier.lo,
                s.wp_brier.hi,
                s.baseline_brier.value,
                100.0 * s.brier_gain.value,
                100.0 * s.brier_gain.lo,
                100.0 * s.brier_gain.hi
            );
        }
    }
    // Paired: the same held-out snaps under each config.
    let mut by_config = Vec::new();
    for cfg in [right.clone(), OvertimeConfig::default()] {
        plays.overtime = cfg;
        let (_, preds) = held_out_predictions(&plays, &CalibOptions::default())?;
        let m: HashMap<u32, (f64, f64, f64, u32)> = preds.iter().filter(|p| plays.period[p.snap as usize] >= 5).map(|p| (p.snap, (p.wp, p.base, p.actual, p.game))).collect();
        by_config.push(m);
    }
    for (name, pick) in [("all overtime snaps", None), ("seasons under the config's rules", Some(true)), ("seasons under the default", Some(false))] {
        // Per game: squared errors of the right config, the default one, the baseline.
        let mut games: HashMap<u32, [f64; 3]> = HashMap::new();
        let mut n = 0;
        for (&snap, &(w1, base, y, g)) in &by_config[0] {
            let season = plays.season[snap as usize];
            if pick.is_some_and(|p| (right.rules_for(season) == old) != p) {
                continue;
            }
            let Some(&(w0, ..)) = by_config[1].get(&snap) else { continue };
            let e = games.entry(g).or_default();
            e[0] += (w1 - y).powi(2);
            e[1] += (w0 - y).powi(2);
            e[2] += (base - y).powi(2);
            n += 1;
        }
        let sums: Vec<[f64; 3]> = games.into_values().collect();
        let stat = |idx: &mut dyn Iterator<Item = usize>| {
            let mut t = [0.0; 3];
            for i in idx {
                for k in 0..3 {
                    t[k] += sums[i][k];
                }
            }
            ((t[1] - t[0]) / t[2], 1.0 - t[0] / t[2], 1.0 - t[1] / t[2])
        };
        let (d, g1, g0) = stat(&mut (0..sums.len()));
        let mut rng = ChaCha8Rng::seed_from_u64(0x07_2024);
        let mut draws: Vec<f64> = (0..400).map(|_| stat(&mut (0..sums.len()).map(|_| rng.random_range(0..sums.len()))).0).collect();
        draws.sort_by(f64::total_cmp);
        println!(
            "  {name}: {n} snaps, {} games; gain over the baseline {:.1}% (right) vs {:.1}% (default); difference {:+.2} points [{:+.2}, {:+.2}]",
            sums.len(),
            100.0 * g1,
            100.0 * g0,
            100.0 * d,
            100.0 * draws[20],
            100.0 * draws[379]
        );
    }
    Ok(())
}

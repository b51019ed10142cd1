//! How good can late-and-close win probability get on the simulated league?
//! Simulates a league with an oracle (`sim::oracle`: from each late-and-close
//! snap the engine's own state, team strengths and game-day form included,
//! is played on to the end many times), fits the models with each season
//! held out in turn as the calibration does, and prints the Brier score of
//! the oracle, of the fitted WP and of the margin-and-time baseline in the
//! late & close stratum (final 450 s of the 4th or overtime, within 8).
//!
//! `cargo run --release --example wp_ceiling -- [--seed 101] [--seasons 5]
//! [--rollouts 300] [--csv FILE]`
//!
//! `--csv` writes one row per stratum snap (state, held-out WP, baseline,
//! oracle, result) for a closer look; `--all-csv` every held-out snap of the
//! second half and overtime (WP, baseline, result); `--rollouts 0` skips
//! the oracle (the held-out fits only); `--oracle-from FILE` reads the
//! oracle back from an earlier run's `--csv` of the same seed and seasons
//! instead of playing on again (the rows' `oracle` column, offense's side);
//! `--fresh-form` draws the day's form again in each rollout, an oracle
//! that knows the clubs' strengths but not how they play today.

use anyhow::{bail, Context};
use lategame::models::calib::held_out_predictions;
use lategame::models::strata::WpStratum;
use lategame::models::CalibOptions;
use lategame::plays::{Plays, Source};
use lategame::sim::oracle::{simulate_with_oracle, OracleOptions};
use lategame::sim::SimConfig;
use std::collections::HashMap;
use std::io::Write;
use std::time::Instant;

struct Args {
    seed: u64,
    seasons: u32,
    rollouts: usize,
    csv: Option<String>,
    all_csv: Option<String>,
    oracle_from: Option<String>,
    fresh_form: bool,
}

fn args() -> anyhow::Result<Args> {
    let mut a = Args { seed: 101, seasons: 5, rollouts: 300, csv: None, all_csv: None, oracle_from: None, fresh_form: false };
    let mut it = std::env::args().skip(1);
    while let Some(flag) = it.next() {
        let mut value = || it.next().with_context(|| format!("{flag} needs a value"));
        match flag.as_str() {
            "--seed" => a.seed = value()?.parse()?,
            "--seasons" => a.seasons = value()?.parse()?,
            "--rollouts" => a.rollouts = value()?.parse()?,
            "--csv" => a.csv = Some(value()?),
            "--all-csv" => a.all_csv = Some(value()?),
            "--oracle-from" => a.oracle_from = Some(value()?),
            "--fresh-form" => a.fresh_form = true,
            other => bail!("unknown argument {other}"),
        }
    }
    if a.seasons < 3 {
        bail!("--seasons must be at least 3 (each season is held out in turn)");
    }
    Ok(a)
}

/// Late and close as `WpStratum::LateClose` draws it (the margin's sign
/// does not matter, so the home margin will do).
fn late_close(period: i32, clock: i32, margin: i32) -> bool {
    (period >= 5 || (period == 4 && clock <= 450)) && margin.abs() <= 8
}

/// One stratum snap: the three forecasts and the result, offense's side.
struct Row {
    snap: usize,
    game: u32,
    wp: f64,
    base: f64,
    oracle: f64,
    actual: f64,
}

fn brier(rows: &[&Row], f: &dyn Fn(&Row) -> f64) -> f64 {
    rows.iter().map(|r| (f(r) - r.actual).powi(2)).sum::<f64>() / rows.len().max(1) as f64
}

/// 90% band of `1 - Σ sq / Σ (base - actual)²` resampling whole games;
/// `sq` is a row's squared error (less any noise term).
fn gain_band(rows: &[Row], sq: &dyn Fn(&Row) -> f64) -> (f64, f64) {
    let mut by_game: HashMap<u32, [f64; 2]> = HashMap::new();
    for r in rows {
        let e = by_game.entry(r.game).or_default();
        e[0] += sq(r);
        e[1] += (r.base - r.actual).powi(2);
    }
    let mut games: Vec<(u32, [f64; 2])> = by_game.into_iter().collect();
    games.sort_by_key(|g| g.0);
    let mut x: u64 = 0x9E37_79B9_7F4A_7C15;
    let mut next = || {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        (x % games.len() as u64) as usize
    };
    let mut draws: Vec<f64> = (0..400)
        .map(|_| {
            let (mut a, mut b) = (0.0, 0.0);
            for _ in 0..games.len() {
                let g = games[next()].1;
                a += g[0];
                b += g[1];
            }
            1.0 - a / b
        })
        .collect();
    draws.sort_by(f64::total_cmp);
    (draws[20], draws[379])
}

/// The oracle column of an earlier `--csv` (offense's side, kept as is).
fn read_oracle(path: &str) -> anyhow::Result<Vec<lategame::sim::oracle::OracleSnap>> {
    let text = std::fs::read_to_string(path).with_context(|| format!("reading {path}"))?;
    let mut lines = text.lines();
    let head: Vec<&str> = lines.next().context("empty oracle file")?.split(',').collect();
    let col = |n: &str| head.iter().position(|h| *h == n).with_context(|| format!("no {n} column"));
    let (g, s, o) = (col("game")?, col("seq")?, col("oracle")?);
    lines
        .map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            Ok(lategame::sim::oracle::OracleSnap { game: f[g].to_string(), seq: f[s].parse()?, home_win: f[o].parse()? })
        })
        .collect()
}

/// The largest gap between mean forecast and observed share over five
/// equal-count bins of the forecast.
fn worst_bin(rows: &[&Row]) -> f64 {
    let mut v: Vec<(f64, f64)> = rows.iter().map(|r| (r.wp, r.actual)).collect();
    v.sort_by(|a, b| a.0.total_cmp(&b.0));
    (0..5)
        .map(|k| {
            let b = &v[k * v.len() / 5..(k + 1) * v.len() / 5];
            let n = b.len().max(1) as f64;
            (b.iter().map(|x| x.0).sum::<f64>() / n - b.iter().map(|x| x.1).sum::<f64>() / n).abs()
        })
        .fold(0.0, f64::max)
}

fn main() -> anyhow::Result<()> {
    let a = args()?;
    let cfg = SimConfig { seasons: a.seasons, seed: a.seed, first_season: 2020 };
    let t = Instant::now();
    let none = |_: i32, _: i32, _: i32| false;
    let replay = a.rollouts == 0 || a.oracle_from.is_some();
    let opts = OracleOptions { rollouts: a.rollouts, pick: if replay { &none } else { &late_close }, fresh_form: a.fresh_form };
    let (out, mut oracle) = simulate_with_oracle(&cfg, &opts);
    if let Some(path) = &a.oracle_from {
        oracle = read_oracle(path)?;
    }
    println!(
        "seed {}, {} seasons: {} snaps, {} late-and-close snaps played on {} times each ({:.0} s)",
        a.seed,
        a.seasons,
        out.rows.len(),
        oracle.len(),
        a.rollouts,
        t.elapsed().as_secs_f64()
    );
    let sources = (0..out.rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    let plays = Plays::from_rows(vec!["sim".into()], &out.rows, sources);
    let at: HashMap<(&str, i32), usize> = oracle.iter().enumerate().map(|(k, o)| ((o.game.as_str(), o.seq), k)).collect();
    let t = Instant::now();
    let (_, preds) = held_out_predictions(&plays, &CalibOptions::default())?;
    println!("held-out fits ({} seasons in turn): {:.0} s", plays.seasons().len(), t.elapsed().as_secs_f64());
    let mut rows = Vec::new();
    for p in &preds {
        let i = p.snap as usize;
        if !WpStratum::LateClose.contains(&plays, i) {
            continue;
        }
        let key = plays.games[plays.game[i] as usize].key.as_str();
        let Some(&k) = at.get(&(key, plays.seq[i])) else {
            if a.rollouts == 0 {
                continue;
            }
            bail!("no oracle value at {key} snap {}", plays.seq[i])
        };
        let side = |home: f64| if plays.off_home[i] || a.oracle_from.is_some() { home } else { 1.0 - home };
        rows.push(Row {
            snap: i,
            game: p.game,
            wp: p.wp,
            base: p.base,
            oracle: side(oracle[k].home_win),
            actual: p.actual,
        });
    }
    if let Some(path) = &a.all_csv {
        // Every held-out snap of the second half and overtime: WP, baseline, result.
        let mut f = std::io::BufWriter::new(std::fs::File::create(path)?);
        writeln!(f, "game,seq,wp,base,actual")?;
        for p in preds.iter().filter(|p| plays.period[p.snap as usize] >= 3) {
            let i = p.snap as usize;
            writeln!(f, "{},{},{},{},{}", plays.games[plays.game[i] as usize].key, plays.seq[i], p.wp, p.base, p.actual)?;
        }
    }
    if a.rollouts == 0 && a.oracle_from.is_none() {
        return Ok(());
    }
    let all: Vec<&Row> = rows.iter().collect();
    let n = a.rollouts.max(2) as f64;
    // A share of n rollouts has variance p(1-p)/n around the oracle's own
    // probability, which adds to its Brier score; p̂(1-p̂)/(n-1) estimates it.
    let noise = |f: &dyn Fn(&Row) -> f64| all.iter().map(|r| f(r) * (1.0 - f(r))).sum::<f64>() / all.len().max(1) as f64 / (n - 1.0);
    let b_base = brier(&all, &|r| r.base);
    let b_wp = brier(&all, &|r| r.wp);
    let b_or = brier(&all, &|r| r.oracle) - noise(&|r| r.oracle);
    let games = rows.iter().map(|r| r.game).collect::<std::collections::HashSet<_>>().len();
    println!("late & close: {} snaps in {games} games", rows.len());
    let dist = all.iter().map(|r| (r.wp - r.oracle).powi(2)).sum::<f64>() / all.len().max(1) as f64;
    println!("  worst of five WP bins {:.3}; mean squared distance to the oracle {dist:.5}", worst_bin(&all));
    println!("  baseline (margin and time) Brier {b_base:.4}");
    let (lo, hi) = gain_band(&rows, &|r| (r.wp - r.actual).powi(2));
    println!("  fitted WP, held out        Brier {b_wp:.4}  gain over baseline {:.1}% [{:.1}%, {:.1}%]", 100.0 * (1.0 - b_wp / b_base), 100.0 * lo, 100.0 * hi);
    let (lo, hi) = gain_band(&rows, &|r| (r.oracle - r.actual).powi(2) - r.oracle * (1.0 - r.oracle) / (n - 1.0));
    println!(
        "  oracle ({} rollouts)       Brier {b_or:.4}  gain over baseline {:.1}% [{:.1}%, {:.1}%] (rollout noise {:.4} taken off)",
        a.rollouts,
        100.0 * (1.0 - b_or / b_base),
        100.0 * lo,
        100.0 * hi,
        noise(&|r| r.oracle)
    );
    // Where the model is furthest from the oracle: the mean squared gap,
    // which is what the model's Brier exceeds the oracle's by (in expectation).
    println!("mean squared gap to the oracle by state (WP, baseline), snaps:");
    let groups: Vec<(&str, Box<dyn Fn(usize) -> String>)> = vec![
        ("margin", Box::new(|i| format!("{:+}", plays.margin[i]))),
        ("time", Box::new(|i| if plays.period[i] >= 5 { "OT".into() } else { format!("{}:00-", plays.clock[i] / 60) })),
        ("down", Box::new(|i| format!("{}", plays.down[i]))),
        ("field", Box::new(|i| format!("{}-", plays.ball_on[i] / 20 * 20))),
        ("def timeouts", Box::new(|i| format!("{}", plays.def_timeouts[i]))),
    ];
    for (name, key) in &groups {
        let mut m: std::collections::BTreeMap<String, [f64; 3]> = Default::default();
        for r in &rows {
            let e = m.entry(key(r.snap)).or_default();
            e[0] += (r.wp - r.oracle).powi(2);
            e[1] += (r.base - r.oracle).powi(2);
            e[2] += 1.0;
        }
        let cells: Vec<String> = m.iter().map(|(k, v)| format!("{k}: {:.4}/{:.4} ({})", v[0] / v[2], v[1] / v[2], v[2])).collect();
        println!("  {name}: {}", cells.join("; "));
    }
    if let Some(path) = &a.csv {
        let mut f = std::io::BufWriter::new(std::fs::File::create(path)?);
        writeln!(f, "season,game,seq,period,clock,secs_game,margin,down,to_go,ball_on,off_timeouts,def_timeouts,off_home,kind,line,wp,base,oracle,actual")?;
        for r in &rows {
            let i = r.snap;
            let g = &plays.games[plays.game[i] as usize];
            let line = g.home_line.map(|l| if plays.off_home[i] { l } else { -l }).unwrap_or(f64::NAN);
            writeln!(
                f,
                "{},{},{},{},{},{},{},{},{},{},{},{},{},{:?},{},{},{},{},{}",
                plays.season[i], g.key, plays.seq[i], plays.period[i], plays.clock[i], plays.secs_game[i], plays.margin[i],
                plays.down[i], plays.to_go[i], plays.ball_on[i], plays.off_timeouts[i], plays.def_timeouts[i],
                plays.off_home[i] as i32, plays.kind[i], line, r.wp, r.base, r.oracle, r.actual
            )?;
        }
    }
    Ok(())
}

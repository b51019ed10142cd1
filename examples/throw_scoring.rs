//! Times pricing every pass (`models::throw::score_all`) on a league whose
//! models are fitted or read from a cache folder:
//! `cargo run --release --example throw_scoring FILE CACHE_DIR [OUT]`. With
//! OUT, the five value columns are written there as raw f64 bytes, to
//! compare two builds bit for bit.

use lategame::league::{League, LeagueConfig};
use std::io::Write;
use std::time::Instant;

#[path = "support/proc_stat.rs"]
mod proc_stat;
use proc_stat::cpu_seconds;


fn main() -> anyhow::Result<()> {
    let path = std::env::args().nth(1).unwrap_or_else(|| "demo-data/league.parquet".into());
    let dir = std::env::args().nth(2).unwrap_or_else(|| "/tmp/lategame-throw-scoring".into());
    let out = std::env::args().nth(3);
    let reps: usize = std::env::var("REPS").ok().and_then(|s| s.parse().ok()).unwrap_or(3);
    let league = League::open_with(&LeagueConfig { cache_dir: Some(dir.into()), ..LeagueConfig::new(&path) })?;
    // The held-out calibration runs in the background on a first start:
    // let it finish (and be cached) before timing.
    let _ = league.scored.calibration.wait();
    let Some(model) = league.throw_model.as_ref() else { anyhow::bail!("no throw-value model") };
    let s = &league.scored.scores;
    let mut last = None;
    for _ in 0..reps {
        let (t, c) = (Instant::now(), cpu_seconds());
        let v = lategame::models::throw::score_all(model, &league.scored.models, league.plays(), &s.ep, &s.wp, &s.wpa);
        println!("score_all wall {:.3} s   cpu {:.2} s", t.elapsed().as_secs_f64(), cpu_seconds() - c);
        last = Some(v);
    }
    if let (Some(o), Some(v)) = (out, last) {
        let mut f = std::io::BufWriter::new(std::fs::File::create(o)?);
        for col in [&v.chosen, &v.league, &v.choice, &v.execution, &v.league_sticks] {
            for x in col.iter() {
                f.write_all(&x.to_le_bytes())?;
            }
        }
        f.flush()?;
    }
    Ok(())
}

//! Time the split engine's parts on a league file (for profiling with
//! `perf record`): `cargo run --release --example engine_timing FILE`.
//! Models come from the cache folder (`LATEGAME_CACHE_DIR`).

use lategame::league::{League, LeagueConfig};
use lategame::situation::Preset;
use lategame::splits;
use std::time::Instant;

fn main() -> anyhow::Result<()> {
    let path = std::env::args().nth(1).unwrap_or_else(|| "demo-data/league.parquet".into());
    let league = League::open_with(&LeagueConfig::new(&path))?;
    let (p, v) = (league.plays(), league.values());
    let t = Instant::now();
    let ix = splits::SplitIndex::build(p, &v);
    println!("index build {:.1} ms ({} rows)", t.elapsed().as_secs_f64() * 1000.0, ix.len());
    let s = Preset::EndOfGame.situation(8);
    let runs: usize = std::env::var("RUNS").ok().and_then(|x| x.parse().ok()).unwrap_or(40);
    let t = Instant::now();
    for _ in 0..runs {
        ix.forget();
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None));
    }
    println!("table, pass each time {:.2} ms", t.elapsed().as_secs_f64() * 1000.0 / runs as f64);
    let t = Instant::now();
    for _ in 0..runs {
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None));
    }
    println!("table, memoised pass {:.2} ms", t.elapsed().as_secs_f64() * 1000.0 / runs as f64);
    Ok(())
}

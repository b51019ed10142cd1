//! Time and memory of opening a league and of the split engine's parts on
//! a league file (also for profiling with `perf record`):
//! `cargo run --release --example engine_timing FILE`. Models come from the
//! cache folder (`LATEGAME_CACHE_DIR`).

use lategame::league::{League, LeagueConfig};
use lategame::situation::Preset;
use lategame::splits;
use std::time::Instant;

fn main() -> anyhow::Result<()> {
    let path = std::env::args().nth(1).unwrap_or_else(|| "demo-data/league.parquet".into());
    let cfg = LeagueConfig::new(&path);
    let t = Instant::now();
    let loaded = lategame::playfile::load(&cfg.path, &cfg.load)?;
    println!("load {:.2} s; {}", t.elapsed().as_secs_f64(), memory());
    let t = Instant::now();
    let scored = lategame::models::fit_and_score_in(loaded.plays, &loaded.fingerprint, false, cfg.cache_dir.as_deref())?;
    println!("models from the cache + score {:.2} s; {}", t.elapsed().as_secs_f64(), memory());
    let t = Instant::now();
    let (throw_model, throw) = lategame::league::throw_values(&scored)?;
    println!("throw values {:.2} s; {}", t.elapsed().as_secs_f64(), memory());
    let league = League { source: cfg.path.clone(), report: loaded.report, scored, throw_model, throw };
    let (p, v) = (league.plays(), league.values());
    let t = Instant::now();
    let ix = splits::SplitIndex::build(p, &v);
    println!("index build {:.1} ms ({} rows); {}", t.elapsed().as_secs_f64() * 1000.0, ix.len(), memory());
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
    println!("table, memoised pass {:.2} ms; {}", t.elapsed().as_secs_f64() * 1000.0 / runs as f64, memory());
    Ok(())
}

/// "RSS now … MiB, peak … MiB" from /proc/self/status.
fn memory() -> String {
    let s = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    let get = |k: &str| s.lines().find(|l| l.starts_with(k)).and_then(|l| l.split_whitespace().nth(1)).and_then(|v| v.parse::<f64>().ok()).map_or(f64::NAN, |kb| kb / 1024.0);
    format!("RSS now {:.0} MiB, peak {:.0} MiB", get("VmRSS:"), get("VmHWM:"))
}

//! The benchmark's first start, step by step, to see what the steps before
//! it cost it: `cargo run --release --example first_start_steps MODE FILE`.
//! MODE `sim` simulates 25 seasons (seed 7) in this process, writes them to
//! FILE, loads and drops them, then times the first start; `file` only
//! times the first start of FILE (as `serve` makes it, in a fresh process).
//! Prints wall and CPU seconds, minor page faults and peak RSS;
//! `RUST_LOG=lategame=debug` logs each step (Newton iterations included),
//! `NO_CALIBRATION=1` ends without waiting for the background calibration.

use lategame::league::{League, LeagueConfig};
use lategame::playfile::{self, LoadOptions};
use std::time::Instant;

#[path = "support/proc_stat.rs"]
mod proc_stat;

/// (CPU seconds, minor faults) of this process so far.
fn cpu_faults() -> (f64, f64) {
    (proc_stat::cpu_seconds(), proc_stat::minor_faults())
}

fn status(key: &str) -> String {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| s.lines().find(|l| l.starts_with(key)).map(|l| l.split_whitespace().skip(1).collect::<Vec<_>>().join(" ")))
        .unwrap_or_default()
}

fn main() -> anyhow::Result<()> {
    if std::env::var_os("RUST_LOG").is_some() {
        tracing_subscriber::fmt().with_env_filter(tracing_subscriber::EnvFilter::from_default_env()).init();
    }
    let mode = std::env::args().nth(1).unwrap_or_else(|| "file".into());
    let path = std::path::PathBuf::from(std::env::args().nth(2).unwrap_or_else(|| "/tmp/league.parquet".into()));
    let seasons: u32 = std::env::var("SEASONS").ok().and_then(|s| s.parse().ok()).unwrap_or(25);
    if mode == "sim" {
        let t = Instant::now();
        let out = lategame::sim::simulate(&lategame::sim::SimConfig { seasons, seed: 7, first_season: 2000 });
        println!("simulate {:.2} s, {} snaps, RSS {}", t.elapsed().as_secs_f64(), out.rows.len(), status("VmRSS:"));
        playfile::write_rows(&out.rows, &path)?;
        drop(out);
        if std::env::var_os("CLEAR_REFS").is_some() {
            let _ = std::fs::write("/proc/self/clear_refs", "5");
        }
        let loaded = playfile::load(&path, &LoadOptions::default())?;
        drop(loaded);
        println!("after sim, write, load, drop: RSS {}", status("VmRSS:"));
    }
    let dir = std::env::temp_dir().join(format!("lategame-steps-{}", std::process::id()));
    let cfg = LeagueConfig { cache_dir: Some(dir.clone()), refit: true, ..LeagueConfig::new(&path) };
    let (c0, f0) = cpu_faults();
    let t = Instant::now();
    let league = League::open_with(&cfg)?;
    let wall = t.elapsed().as_secs_f64();
    let (c1, f1) = cpu_faults();
    println!(
        "first start ({mode}): wall {wall:.2} s, cpu {:.2} s, minor faults {:.0}, RSS {}, peak {}",
        c1 - c0,
        f1 - f0,
        status("VmRSS:"),
        status("VmHWM:")
    );
    // NO_CALIBRATION: stop with the first start (the background
    // calibration is cancelled when the league is dropped).
    if std::env::var_os("NO_CALIBRATION").is_none() {
        let _ = league.scored.calibration.wait();
    }
    drop(league);
    // The cache's columns are written behind the start: let them land
    // before the folder goes.
    lategame::models::cache::finish_writes();
    let _ = std::fs::remove_dir_all(&dir);
    Ok(())
}

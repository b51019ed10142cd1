//! First and warm start of a league, stage by stage, wall and CPU time:
//! `cargo run --release --example cold_start FILE`. The first start uses an
//! empty cache folder (load, fit EP/WP/CP and the throw-value model, score,
//! calibrate in the background); the warm start opens the same file again
//! with that folder filled. `RUST_LOG=info` shows the stages inside
//! `League::open_with`; `KEEP=DIR` keeps the cache files written.

use lategame::league::{League, LeagueConfig};
use std::time::Instant;

#[path = "support/proc_stat.rs"]
mod proc_stat;
use proc_stat::cpu_seconds;


struct Clock {
    wall: Instant,
    cpu: f64,
}

impl Clock {
    fn start() -> Clock {
        Clock { wall: Instant::now(), cpu: cpu_seconds() }
    }
    fn lap(&mut self, what: &str) {
        let (w, c) = (self.wall.elapsed().as_secs_f64(), cpu_seconds() - self.cpu);
        println!("{what:<34} wall {w:6.2} s   cpu {c:6.2} s");
        *self = Clock::start();
    }
}

fn main() -> anyhow::Result<()> {
    if std::env::var_os("RUST_LOG").is_some() {
        tracing_subscriber::fmt().with_env_filter(tracing_subscriber::EnvFilter::from_default_env()).init();
    }
    let path = std::env::args().nth(1).unwrap_or_else(|| "demo-data/league.parquet".into());
    let dir = std::env::temp_dir().join(format!("lategame-cold-start-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir)?;
    let cfg = LeagueConfig { cache_dir: Some(dir.clone()), ..LeagueConfig::new(&path) };
    let total = Clock::start();
    let mut c = Clock::start();
    let league = League::open_with(&cfg)?;
    println!("{} snaps", league.plays().len());
    c.lap("first start: open (load, fit, score)");
    league.scored.calibration.wait().map_err(anyhow::Error::msg)?;
    c.lap("first start: calibration");
    let mut all = total;
    all.lap("first start: all");
    drop(league);
    let mut c = Clock::start();
    let league = League::open_with(&cfg)?;
    assert!(league.scored.from_cache && league.scored.scores_from_cache);
    c.lap("warm start: open");
    drop(league);
    lategame::models::cache::finish_writes();
    // KEEP=DIR: keep the cache files (coefficients, scores) there, to
    // compare two builds byte for byte.
    if let Some(keep) = std::env::var_os("KEEP") {
        std::fs::create_dir_all(&keep)?;
        for e in std::fs::read_dir(&dir)? {
            let e = e?;
            std::fs::copy(e.path(), std::path::Path::new(&keep).join(e.file_name()))?;
        }
    }
    let _ = std::fs::remove_dir_all(&dir);
    Ok(())
}

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
    // Mean time of `runs` calls of `f`, in ms.
    let time = |f: &mut dyn FnMut(usize)| {
        f(0);
        let t = Instant::now();
        for k in 0..runs {
            f(k + 1);
        }
        t.elapsed().as_secs_f64() * 1000.0 / runs as f64
    };
    let fresh = time(&mut |_| {
        ix.forget();
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None));
    });
    println!("table, nothing memoised {fresh:.2} ms");
    let every = Preset::EverySnap.situation(8);
    let pass = time(&mut |_| {
        ix.forget();
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &every, 20, None));
    });
    println!("every-snap table, nothing memoised {pass:.2} ms");
    let repeated = time(&mut |_| {
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None));
    });
    println!("table, repeated (pass, fits and stability memoised) {repeated:.2} ms; {}", memory());
    let min = time(&mut |k| {
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20 + k as u32 % 30, None));
    });
    println!("table, another minimum (pass and fits memoised) {min:.2} ms");
    let seasons = p.seasons();
    let season = time(&mut |k| {
        let one = lategame::situation::Situation { seasons: Some(vec![seasons[k % seasons.len()]]), ..s.clone() };
        ix.forget();
        let _ = splits::split_table_in(&ix, p, &v, &Preset::EndOfGame.situation(8), 20, None);
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &one, 20, None));
    }) - repeated;
    println!("table, another season list (pass memoised, fits new) about {season:.2} ms");
    let window = time(&mut |k| {
        let new = lategame::situation::Situation { margin: Some(lategame::situation::Range { lo: Some(-30.0 - k as f64), hi: Some(8.0) }), ..s.clone() };
        std::hint::black_box(splits::split_table_in(&ix, p, &v, &new, 20, None));
    });
    println!("table, a new margin window (new pass and fits; every snap memoised) {window:.2} ms");
    let base = lategame::situation::Situation::default();
    let busiest = splits::split_table_in(&ix, p, &v, &every, 20, None).rows.first().map(|r| r.passer.clone()).unwrap_or_default();
    let prof = time(&mut |_| {
        ix.forget();
        std::hint::black_box(splits::profile_in(&ix, p, &v, &busiest, &base, &s, 20));
    });
    println!("profile, every preset, nothing memoised {prof:.2} ms");
    let prof_m = time(&mut |_| {
        std::hint::black_box(splits::profile_in(&ix, p, &v, &busiest, &base, &s, 20));
    });
    println!("profile, memoised {prof_m:.2} ms; {}", memory());
    Ok(())
}

/// "RSS now … MiB, peak … MiB" from /proc/self/status.
fn memory() -> String {
    let s = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    let get = |k: &str| s.lines().find(|l| l.starts_with(k)).and_then(|l| l.split_whitespace().nth(1)).and_then(|v| v.parse::<f64>().ok()).map_or(f64::NAN, |kb| kb / 1024.0);
    format!("RSS now {:.0} MiB, peak {:.0} MiB", get("VmRSS:"), get("VmHWM:"))
}

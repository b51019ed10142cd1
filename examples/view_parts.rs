//! Where the time of a view never asked before goes, stage by stage:
//! `cargo run --release --example view_parts -- FILE [RUNS]`. Opens the
//! league once (models from the cache folder, `LATEGAME_CACHE_DIR`), then
//! for a new end-of-game margin window each call: the table's stages one
//! by one (`splits::stage_times`), the whole table, the explorer page
//! through `web::App` (as `benches/pipeline.rs` renders it); and the
//! passer profile with nothing memoised, each preset's row alone.

use lategame::league::{League, LeagueConfig};
use lategame::situation::{Preset, Range, Situation};
use lategame::splits;
use std::collections::BTreeMap;
use std::time::Instant;

#[path = "support/proc_stat.rs"]
mod proc_stat;

fn ms(t: Instant) -> f64 {
    t.elapsed().as_secs_f64() * 1000.0
}

fn p50(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.total_cmp(b));
    v[v.len() / 2]
}

fn main() -> anyhow::Result<()> {
    let mut args = std::env::args().skip(1);
    let path = args.next().unwrap_or_else(|| "demo-data/league.parquet".into());
    let runs: usize = args.next().and_then(|x| x.parse().ok()).unwrap_or(15);
    // `page`: the explorer page alone (for `perf record`).
    let page_only = args.next().as_deref() == Some("page");
    let cfg = LeagueConfig::new(&path);
    let t = Instant::now();
    let league = League::open_with(&cfg)?;
    println!("open {:.0} ms   load {}", ms(t), load());
    // The held-out calibration runs on a thread of its own after the open:
    // waited for, so it takes no core from what is timed here.
    let t = Instant::now();
    let calibrated = league.scored.calibration.wait().is_ok();
    println!("calibration waited for {:.0} ms (ready: {calibrated})", ms(t));
    let (p, v) = (league.plays(), league.values());
    // Built twice: the first build also pays for what the league makes
    // lazily (its values).
    let ix = splits::SplitIndex::build(p, &v);
    let t = Instant::now();
    drop(splits::SplitIndex::build(p, &v));
    println!("index build {:.0} ms   every-snap pass kept {:.1} MiB   load {}", ms(t), ix.every_bytes() as f64 / 1048576.0, load());
    let s = Preset::EndOfGame.situation(8);
    // Warm: the every-snap pass and the opponent model on every snap.
    let _ = splits::split_table_in(&ix, p, &v, &s, 20, None);

    if !page_only {
        engine_parts(&ix, p, &v, &s, runs);
    }
    drop(ix);

    // The explorer page through the app, a new window each call.
    let app = lategame::web::App::new(league, lategame::web::AppConfig::new(cfg));
    let rt = tokio::runtime::Builder::new_multi_thread().worker_threads(2).enable_all().build()?;
    let (state, router) = (app.state, app.router);
    let render = |uri: String| -> anyhow::Result<usize> {
        rt.block_on(async {
            use tower::ServiceExt;
            let req = axum::http::Request::builder().uri(uri).body(axum::body::Body::empty())?;
            let resp = router.clone().oneshot(req).await?;
            Ok(axum::body::to_bytes(resp.into_body(), usize::MAX).await?.len())
        })
    };
    state.warm();
    let _ = render("/explore?preset=end-of-game".into())?;
    let mut bytes = 0;
    let page: Vec<(f64, f64, f64)> = (0..if page_only { 150 } else { runs }).map(|k| timed(|| bytes = render(format!("/explore?preset=end-of-game&margin=-{}..8", 31 + k)).unwrap_or(0))).collect();
    println!("explorer page, new situation             {}   ({bytes} bytes)   load {}", show(&page), load());
    // The same situations again, another address (`min=20` written out):
    // the table is kept, the page is made again.
    let again: Vec<(f64, f64, f64)> = (0..page.len()).map(|k| timed(|| bytes = render(format!("/explore?preset=end-of-game&margin=-{}..8&min=20", 31 + k)).unwrap_or(0))).collect();
    println!("  the page alone, its table kept         {}   load {}", show(&again), load());
    let window = |k: usize| Situation { margin: Some(Range { lo: Some(-(30.0 + k as f64)), hi: Some(8.0) }), ..s.clone() };
    let loaded = state.loaded();
    let (lg, ix) = (&loaded.league, &loaded.index);
    let engine: Vec<(f64, f64, f64)> = (0..runs).map(|k| timed(|| drop(std::hint::black_box(splits::split_table_in(ix, lg.plays(), &lg.values(), &window(400 + k), 20, None))))).collect();
    println!("  its table alone, same index            {}   load {}", show(&engine), load());
    Ok(())
}


/// The table's stages and the profile's, on `ix` (see the file's head).
fn engine_parts(ix: &splits::SplitIndex, p: &lategame::plays::Plays, v: &splits::SnapValues, s: &Situation, runs: usize) {
    let window = |k: usize| Situation { margin: Some(Range { lo: Some(-(30.0 + k as f64)), hi: Some(8.0) }), ..s.clone() };
    let s = s.clone();
    let mut stages: BTreeMap<usize, (String, Vec<f64>)> = BTreeMap::new();
    for k in 0..runs {
        for (i, (name, t)) in splits::stage_times(ix, p, &v, &window(100 + k), 20).into_iter().enumerate() {
            stages.entry(i).or_insert((name, Vec::new())).1.push(t);
        }
    }
    println!("stages of a new situation's table, one thread, p50 of {runs} (load {}):", load());
    let mut fits = 0.0;
    for (name, t) in stages.into_values() {
        let m = p50(t);
        if name.starts_with("fit ") {
            fits += m;
        }
        println!("  {name:<36} {m:>8.2} ms");
    }
    println!("  {:<36} {fits:>8.2} ms", "(all fits)");
    let table: Vec<(f64, f64, f64)> = (0..runs).map(|k| timed(|| drop(std::hint::black_box(splits::split_table_in(ix, p, &v, &window(200 + k), 20, None))))).collect();
    println!("whole table, new situation (rayon)       {}   load {}", show(&table), load());

    // The passer profile, nothing memoised.
    let base = Situation::default();
    let every = Preset::EverySnap.situation(8);
    let busiest = splits::split_table_in(ix, p, &v, &every, 20, None).rows.first().map(|r| r.passer.clone()).unwrap_or_default();
    let prof: Vec<(f64, f64, f64)> = (0..runs.min(10))
        .map(|_| {
            ix.forget();
            timed(|| drop(std::hint::black_box(splits::profile_in(ix, p, &v, &busiest, &base, &s, 20))))
        })
        .collect();
    println!("profile, nothing memoised                {}   load {}", show(&prof), load());
    println!("  passes it leaves in the memo: {:.1} MiB (every-snap passes kept apart: {:.1} MiB)", ix.memo_bytes() as f64 / 1048576.0, ix.every_bytes() as f64 / 1048576.0);
    // Each preset's row alone after `forget`, the every-snap one first (as
    // the profile does it).
    let mut per: BTreeMap<usize, Vec<f64>> = BTreeMap::new();
    for _ in 0..runs.min(10) {
        ix.forget();
        for (i, preset) in Preset::ALL.into_iter().enumerate() {
            let t = Instant::now();
            std::hint::black_box(splits::split_row_in(ix, p, &v, &preset.situation(8), 20, &busiest));
            per.entry(i).or_default().push(ms(t));
        }
    }
    for (i, t) in per {
        println!("  row of {:<24} (serial)   p50 {:>8.2} ms", Preset::ALL[i].key(), p50(t));
    }
    ix.forget();
    let parts = splits::stage_times(ix, p, &v, &every, 20);
    println!("  every-snap stages after forget: {}", parts.iter().filter(|x| x.1 > 0.5).map(|(n, t)| format!("{n} {t:.1}")).collect::<Vec<_>>().join(", "));
}

/// CPU time of every thread of this process so far, in ms (from
/// `/proc/self/task/*/schedstat`): less moved by other processes' load
/// than the wall clock.
fn cpu_ms() -> f64 {
    let Ok(dir) = std::fs::read_dir("/proc/self/task") else { return f64::NAN };
    dir.filter_map(|e| e.ok())
        .filter_map(|e| std::fs::read_to_string(e.path().join("schedstat")).ok())
        .filter_map(|s| s.split_whitespace().next().and_then(|x| x.parse::<f64>().ok()))
        .sum::<f64>()
        / 1e6
}


/// Wall and CPU ms of `f`, and the page faults it took.
fn timed(f: impl FnOnce()) -> (f64, f64, f64) {
    let (t, c, pf) = (Instant::now(), cpu_ms(), proc_stat::minor_faults());
    f();
    (ms(t), cpu_ms() - c, proc_stat::minor_faults() - pf)
}

/// "p50 wall, cpu, faults" of timed runs.
fn show(v: &[(f64, f64, f64)]) -> String {
    format!("p50 {:>8.2} ms   cpu {:>8.2} ms   faults {:>6.0}", p50(v.iter().map(|x| x.0).collect()), p50(v.iter().map(|x| x.1).collect()), p50(v.iter().map(|x| x.2).collect()))
}

/// The one-minute load average.
fn load() -> String {
    std::fs::read_to_string("/proc/loadavg").ok().and_then(|s| s.split_whitespace().next().map(String::from)).unwrap_or_default()
}

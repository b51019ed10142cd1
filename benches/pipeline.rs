//! The benchmark run: on the 25-season simulated league, time every stage in
//! one go and print the figures the README quotes. `cargo bench --bench
//! pipeline` (set LATEGAME_BENCH_SEASONS to try another size).
//!
//! simulate → write Parquet → load + validate → fit + score (cold) → warm
//! start from the cache → one split (p50/p99) → the same split in pandas →
//! a plain single pass (the floor) → explorer page render → PDF report.

use lategame::league::{League, LeagueConfig};
use lategame::playfile::{self, LoadOptions};
use lategame::situation::Preset;
use lategame::splits;
use std::time::Instant;

fn pct(v: &mut [f64], p: f64) -> f64 {
    v.sort_by(|a, b| a.partial_cmp(b).unwrap_or(std::cmp::Ordering::Equal));
    let k = ((v.len() as f64 - 1.0) * p).round() as usize;
    v[k.min(v.len() - 1)]
}

fn time_n(n: usize, mut f: impl FnMut()) -> (f64, f64) {
    f(); // warm-up
    let mut t = Vec::with_capacity(n);
    for _ in 0..n {
        let s = Instant::now();
        f();
        t.push(s.elapsed().as_secs_f64() * 1000.0);
    }
    (pct(&mut t.clone(), 0.5), pct(&mut t, 0.99))
}

fn rss_mib() -> f64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| s.lines().find(|l| l.starts_with("VmHWM:")).and_then(|l| l.split_whitespace().nth(1)).and_then(|v| v.parse::<f64>().ok()))
        .map(|kb| kb / 1024.0)
        .unwrap_or(f64::NAN)
}

fn main() -> anyhow::Result<()> {
    let seasons: u32 = std::env::var("LATEGAME_BENCH_SEASONS").ok().and_then(|s| s.parse().ok()).unwrap_or(25);
    let dir = std::env::temp_dir().join(format!("lategame-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir)?;
    let league_cfg = LeagueConfig { cache_dir: Some(dir.join("cache")), ..LeagueConfig::new(dir.join("league.parquet")) };
    println!("lategame benchmark: {seasons} simulated seasons on {} cores", std::thread::available_parallelism().map(|n| n.get()).unwrap_or(1));

    let t = Instant::now();
    let out = lategame::sim::simulate(&lategame::sim::SimConfig { seasons, seed: 7, first_season: 2000 });
    println!("simulate                 {:>9.2} s   ({} snaps)", t.elapsed().as_secs_f64(), out.rows.len());
    let path = dir.join("league.parquet");
    let t = Instant::now();
    playfile::write_rows(&out.rows, &path)?;
    println!("write parquet            {:>9.2} s", t.elapsed().as_secs_f64());
    drop(out);

    let t = Instant::now();
    let loaded = playfile::load(&path, &LoadOptions::default())?;
    println!("load + validate          {:>9.2} s", t.elapsed().as_secs_f64());
    let fp = loaded.fingerprint.clone();
    let t = Instant::now();
    let scored = lategame::models::fit_and_score_in(loaded.plays, &fp, true, league_cfg.cache_dir.as_deref())?;
    println!("fit EP+WP+CP, calibrate, score (cold) {:>6.2} s", t.elapsed().as_secs_f64());
    drop(scored);
    let t = Instant::now();
    let league = League::open_with(&league_cfg)?;
    println!("warm start (load + cached models + score) {:>5.2} s   (from cache: {})", t.elapsed().as_secs_f64(), league.scored.from_cache);

    let s = Preset::LateClose.situation(8);
    let (p50, p99) = time_n(40, || {
        let t = splits::split_table(league.plays(), &league.values(), &s, 20);
        std::hint::black_box(t);
    });
    println!("split table, late & close  p50 {p50:>7.2} ms   p99 {p99:>7.2} ms");

    // The floor: one plain pass over the columns the filter and a few sums need.
    let p = league.plays();
    let v = league.values();
    let (floor50, _) = time_n(40, || {
        let mut sums = vec![(0u32, 0u32, 0.0f64); p.passers.len()];
        for i in 0..p.len() {
            let late = (p.period[i] == 4 && p.clock[i] <= 450) || p.period[i] >= 5;
            if p.dropback[i] && late && p.margin[i].abs() <= 8 {
                let e = &mut sums[p.passer[i] as usize];
                e.0 += 1;
                e.1 += p.complete[i] as u32;
                e.2 += v.epa[i];
            }
        }
        std::hint::black_box(sums);
    });
    println!("plain single pass (floor)  p50 {floor50:>7.2} ms   split / floor = {:.1}×", p50 / floor50);

    // The same filter + group-by in pandas, on the scored file.
    let scored_path = dir.join("scored.parquet");
    let mut df = lategame::models::scored_frame(&league.scored)?;
    playfile::write_frame(&mut df, &scored_path)?;
    drop(df);
    let script = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("benches/pandas_split.py");
    match std::process::Command::new("python3").arg(&script).arg(&scored_path).output() {
        Ok(o) if o.status.success() => {
            let text = String::from_utf8_lossy(&o.stdout);
            let ms: Option<f64> = text.lines().find_map(|l| l.strip_prefix("p50_ms ").and_then(|v| v.trim().parse().ok()));
            match ms {
                Some(ms) => println!("pandas filter + group-by   p50 {ms:>7.2} ms   pandas / lategame = {:.1}×", ms / p50),
                None => println!("pandas: unexpected output {text}"),
            }
        }
        Ok(o) => println!("pandas: failed: {}", String::from_utf8_lossy(&o.stderr).lines().last().unwrap_or("")),
        Err(e) => println!("pandas: python3 not runnable: {e}"),
    }

    let app = lategame::web::App::new(league, lategame::web::AppConfig::new(league_cfg));
    let rt = tokio::runtime::Builder::new_current_thread().enable_all().build()?;
    let (state, router) = (app.state, app.router);
    let render = |uri: String| {
        rt.block_on(async {
            use tower::ServiceExt;
            let req = axum::http::Request::builder().uri(uri).body(axum::body::Body::empty()).unwrap();
            let resp = router.clone().oneshot(req).await.unwrap();
            let body = axum::body::to_bytes(resp.into_body(), usize::MAX).await.unwrap();
            std::hint::black_box(body);
        })
    };
    // Each minimum is a new view, so every request computes its split table.
    let mut k = 0;
    let (u50, u99) = time_n(20, || {
        k += 1;
        render(format!("/explore?preset=late-close&min={}", 20 + k));
    });
    println!("explorer page render, new view     p50 {u50:>7.2} ms   p99 {u99:>7.2} ms");
    let (e50, e99) = time_n(30, || render("/explore?preset=late-close".to_string()));
    println!("explorer page render, cached view  p50 {e50:>7.2} ms   p99 {e99:>7.2} ms");

    let league = state.league();
    // The report covers the latest season: take its busiest late-and-close passer.
    let last = league.plays().seasons().last().copied();
    let latest = lategame::situation::Situation { seasons: last.map(|x| vec![x]), ..s.clone() };
    let passer = splits::split_table(league.plays(), &league.values(), &latest, 20).rows.first().map(|r| r.passer.clone()).unwrap_or_default();
    let (r50, r99) = time_n(10, || {
        let pdf = lategame::report::pdf(&league, &s, &passer, lategame::report::Paper::Letter).unwrap();
        std::hint::black_box(pdf);
    });
    println!("PDF report                 p50 {r50:>7.2} ms   p99 {r99:>7.2} ms");
    println!("peak RSS                   {:>9.0} MiB", rss_mib());
    let _ = std::fs::remove_dir_all(&dir);
    Ok(())
}

//! The situation report's timing on a large league: opening (fit or cache)
//! once, then the report data, the PDF and the HTML, p50/p99 over repeated
//! runs. `cargo bench --bench report` (LATEGAME_REPORT_FILE names the play
//! file; default /tmp/league25.parquet, simulated there when missing).

use lategame::league::League;
use lategame::playfile::{self, LoadOptions};
use lategame::report::{self, Paper, ReportData};
use lategame::situation::Preset;
use lategame::splits;
use std::path::PathBuf;
use std::time::Instant;

fn pct(v: &mut [f64], p: f64) -> f64 {
    v.sort_by(|a, b| a.partial_cmp(b).unwrap_or(std::cmp::Ordering::Equal));
    let k = ((v.len() as f64 - 1.0) * p).round() as usize;
    v[k.min(v.len() - 1)]
}

fn time_n(n: usize, mut f: impl FnMut()) -> (f64, f64) {
    f();
    let mut t = Vec::with_capacity(n);
    for _ in 0..n {
        let s = Instant::now();
        f();
        t.push(s.elapsed().as_secs_f64() * 1000.0);
    }
    (pct(&mut t.clone(), 0.5), pct(&mut t, 0.99))
}

fn main() -> anyhow::Result<()> {
    let path = std::env::var("LATEGAME_REPORT_FILE").map(PathBuf::from).unwrap_or_else(|_| PathBuf::from("/tmp/league25.parquet"));
    if !path.exists() {
        let t = Instant::now();
        let out = lategame::sim::simulate(&lategame::sim::SimConfig { seasons: 25, seed: 7, first_season: 2000 });
        playfile::write_rows(&out.rows, &path)?;
        println!("simulated 25 seasons into {} in {:.1} s", path.display(), t.elapsed().as_secs_f64());
    }
    let t = Instant::now();
    let league = League::open(&path, &LoadOptions::default(), false)?;
    println!(
        "open {} ({} snaps, {} seasons; models {}) {:>8.2} s",
        path.display(),
        league.plays().len(),
        league.plays().seasons().len(),
        if league.scored.from_cache { "from cache" } else { "fitted" },
        t.elapsed().as_secs_f64()
    );
    let base = Preset::EndOfGame.situation(8);
    let s = report::report_situation(league.plays(), &base);
    let t = splits::split_table(league.plays(), &league.values(), &s, splits::DEFAULT_MIN_DROPBACKS);
    let passer = t.rows.first().map(|r| r.passer.clone()).unwrap_or_default();
    println!("passer {passer}, {} end-of-game dropbacks in {:?}", t.rows.first().map(|r| r.dropbacks).unwrap_or(0), t.seasons);

    let runs = 20;
    let (b50, b99) = time_n(runs, || {
        std::hint::black_box(ReportData::build(&league, &base, &passer, splits::DEFAULT_MIN_DROPBACKS).ok());
    });
    let data = ReportData::build(&league, &base, &passer, splits::DEFAULT_MIN_DROPBACKS)?;
    let (r50, r99) = time_n(runs, || {
        std::hint::black_box(report::render_pdf(&data, Paper::Letter).ok());
    });
    let (h50, h99) = time_n(runs, || {
        std::hint::black_box(report::html(&data, Paper::Letter));
    });
    let (p50, p99) = time_n(runs, || {
        std::hint::black_box(report::pdf(&league, &base, &passer, Paper::Letter).ok());
    });
    let size = report::pdf(&league, &base, &passer, Paper::Letter)?.len();
    println!("report data (split + snaps)  p50 {b50:>7.2} ms   p99 {b99:>7.2} ms");
    println!("PDF render                   p50 {r50:>7.2} ms   p99 {r99:>7.2} ms");
    println!("HTML render                  p50 {h50:>7.2} ms   p99 {h99:>7.2} ms");
    println!("PDF, end to end              p50 {p50:>7.2} ms   p99 {p99:>7.2} ms   ({} KiB)", size / 1024);
    // All seasons at once: the heaviest report.
    let all = base.with_seasons(Some(league.plays().seasons()));
    let (a50, a99) = time_n(runs, || {
        std::hint::black_box(report::pdf(&league, &all, &passer, Paper::Letter).ok());
    });
    println!("PDF, every season            p50 {a50:>7.2} ms   p99 {a99:>7.2} ms");
    Ok(())
}

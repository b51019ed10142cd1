//! The split table, the passer profile and the explorer's table in a loop,
//! for `perf record -g` and before/after timings:
//! `cargo run --release --example table_profile -- FILE [WHAT] [RUNS]`,
//! WHAT one of `table` (repeated query), `new` (a new margin window each
//! call), `fresh` (nothing memoised), `profile` (nothing memoised),
//! `profile-memo` (another passer, passes kept), `profile-new` (30
//! passers never asked before, each once: the first and the later ones),
//! or `all` (each in turn, default). Models come from the cache folder (`LATEGAME_CACHE_DIR`).

use lategame::league::{League, LeagueConfig};
use lategame::situation::{Preset, Range, Situation};
use lategame::splits;
use std::time::Instant;

fn main() -> anyhow::Result<()> {
    let mut args = std::env::args().skip(1);
    let path = args.next().unwrap_or_else(|| "demo-data/league.parquet".into());
    let what = args.next().unwrap_or_else(|| "all".into());
    let runs: usize = args.next().and_then(|x| x.parse().ok()).unwrap_or(40);
    let league = League::open_with(&LeagueConfig::new(&path))?;
    let (p, v) = (league.plays(), league.values());
    let t = Instant::now();
    let ix = splits::SplitIndex::build(p, &v);
    println!("index {} rows, {:.0} ms", ix.len(), t.elapsed().as_secs_f64() * 1000.0);
    let s = Preset::EndOfGame.situation(8);
    let base = Situation::default();
    let busy: Vec<String> = splits::split_table_in(&ix, p, &v, &Preset::EverySnap.situation(8), 20, None).rows.iter().take(8).map(|r| r.passer.clone()).collect();
    // p50 and p90 of `runs` calls of `f` (after one call to warm up), in ms.
    let time = |f: &mut dyn FnMut(usize)| {
        f(0);
        let mut t: Vec<f64> = (1..=runs)
            .map(|k| {
                let t = Instant::now();
                f(k);
                t.elapsed().as_secs_f64() * 1000.0
            })
            .collect();
        t.sort_by(|a, b| a.total_cmp(b));
        (t[t.len() / 2], t[(t.len() * 9 / 10).min(t.len() - 1)])
    };
    let all = what == "all";
    let report = |name: &str, (p50, p90): (f64, f64)| println!("{name:<40} p50 {p50:>8.2} ms   p90 {p90:>8.2} ms   load {}", load());
    if all || what == "table" {
        report("table, repeated", time(&mut |_| drop(std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None)))));
    }
    if all || what == "new" {
        report(
            "table, new margin window",
            time(&mut |k| {
                let new = Situation { margin: Some(Range { lo: Some(-30.0 - (k % 1000) as f64), hi: Some(8.0) }), ..s.clone() };
                drop(std::hint::black_box(splits::split_table_in(&ix, p, &v, &new, 20, None)));
            }),
        );
    }
    if all || what == "fresh" {
        report(
            "table, fresh",
            time(&mut |_| {
                ix.forget();
                drop(std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None)));
            }),
        );
    }
    if all || what == "profile" {
        report(
            "profile, nothing memoised",
            time(&mut |k| {
                ix.forget();
                drop(std::hint::black_box(splits::profile_in(&ix, p, &v, &busy[k % busy.len()], &base, &s, 20)));
            }),
        );
    }
    if all || what == "profile-memo" {
        report(
            "profile, passes memoised",
            time(&mut |k| drop(std::hint::black_box(splits::profile_in(&ix, p, &v, &busy[k % busy.len()], &base, &s, 20)))),
        );
    }
    if all || what == "profile-new" {
        // 30 passers spread over the every-snap table (busy ones and
        // seldom-seen ones), each asked once, in a new index.
        let every = splits::split_table_in(&ix, p, &v, &Preset::EverySnap.situation(8), 20, None);
        let step = (every.rows.len() / 30).max(1);
        let names: Vec<String> = every.rows.iter().step_by(step).take(30).map(|r| r.passer.clone()).collect();
        let ix = splits::SplitIndex::build(p, &v);
        let mut ms: Vec<f64> = names
            .iter()
            .map(|name| {
                let t = Instant::now();
                drop(std::hint::black_box(splits::profile_in(&ix, p, &v, name, &base, &s, 20)));
                t.elapsed().as_secs_f64() * 1000.0
            })
            .collect();
        println!("profile, first passer (passes made)        {:>8.2} ms   load {}", ms[0], load());
        println!("profile, second passer                     {:>8.2} ms", ms[1]);
        let mut later = ms.split_off(2);
        later.sort_by(|a, b| a.total_cmp(b));
        let q = |f: f64| later[((later.len() as f64 * f) as usize).min(later.len() - 1)];
        println!("profile, passers 3-{} (each new)            p50 {:>8.2} ms   p90 {:>8.2} ms   max {:>8.2} ms   load {}", names.len(), q(0.5), q(0.9), q(1.0), load());
    }
    Ok(())
}

/// The one-minute load average.
fn load() -> String {
    std::fs::read_to_string("/proc/loadavg").ok().and_then(|s| s.split_whitespace().next().map(String::from)).unwrap_or_default()
}

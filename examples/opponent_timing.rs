//! What the opponent adjustment costs: per preset, the every-snap fit with
//! the situation's adjustment (nothing kept), the adjustment alone, and the
//! split table with its passes forgotten and memoised, on
//! a league file (default: a 25-season simulated league written to the
//! temp folder on the first run):
//! `cargo run --release --example opponent_timing [FILE]`.

use lategame::league::{League, LeagueConfig};
use lategame::situation::Preset;
use lategame::splits;
use std::time::Instant;

fn main() -> anyhow::Result<()> {
    let path = match std::env::args().nth(1) {
        Some(p) => std::path::PathBuf::from(p),
        None => {
            let p = std::env::temp_dir().join("lategame-opponent-timing/league25.parquet");
            if !p.exists() {
                std::fs::create_dir_all(p.parent().expect("a folder"))?;
                let out = lategame::sim::simulate(&lategame::sim::SimConfig { seasons: 25, seed: 7, first_season: 2000 });
                lategame::playfile::write_rows(&out.rows, &p)?;
            }
            p
        }
    };
    let league = League::open_with(&LeagueConfig::new(&path))?;
    let (p, v) = (league.plays(), league.values());
    let ix = splits::SplitIndex::build(p, &v);
    println!("{} dropbacks in the index, {} seasons", ix.len(), p.seasons().len());
    let runs = 5;
    let epa = splits::metric_index("epa").expect("epa");
    for preset in Preset::ALL {
        let s = preset.situation(8);
        // The every-snap fit and the situation's adjustment, nothing kept.
        let t = Instant::now();
        let mut fit = None;
        for _ in 0..runs {
            fit = splits::opponent_fit_metric(&ix, p, &v, &s, epa);
        }
        let whole = t.elapsed().as_secs_f64() * 1000.0 / runs as f64;
        // The situation's adjustment alone (the every-snap fit kept by the index).
        let t = Instant::now();
        for _ in 0..runs {
            ix.forget();
            std::hint::black_box(splits::opponent_fit(&ix, p, &v, &s));
        }
        let alone = t.elapsed().as_secs_f64() * 1000.0 / runs as f64;
        let t = Instant::now();
        for _ in 0..runs {
            ix.forget();
            std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None));
        }
        let cold = t.elapsed().as_secs_f64() * 1000.0 / runs as f64;
        let t = Instant::now();
        for _ in 0..runs {
            std::hint::black_box(splits::split_table_in(&ix, p, &v, &s, 20, None));
        }
        let warm = t.elapsed().as_secs_f64() * 1000.0 / runs as f64;
        let sds = fit.map(|f| format!("σ passer {:.3}, defense {:.3}, snap {:.3}", f.sd_passer, f.sd_defense, f.sd_snap)).unwrap_or_else(|| "no fit".into());
        println!(
            "{:<24} every-snap fit + adjustment {whole:>7.2} ms · adjustment alone {alone:>6.2} ms · table, passes forgotten {cold:>7.2} ms · memoised {warm:>6.2} ms · {sds}",
            preset.key()
        );
    }
    Ok(())
}

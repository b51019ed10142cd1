//! Where a split's time goes on a league file: the full table, and the
//! accumulation pass alone (no shrinkage). usage: split_timing FILE
use lategame::league::League;
use lategame::situation::Preset;
use std::time::Instant;

fn main() -> anyhow::Result<()> {
    let path = std::env::args().nth(1).unwrap_or_else(|| "demo-data/league.parquet".into());
    let league = League::open(std::path::Path::new(&path), &Default::default(), false)?;
    for preset in [Preset::LateClose, Preset::AllSnaps] {
        let s = preset.situation(8);
        let mut best = f64::MAX;
        for _ in 0..10 {
            let t = Instant::now();
            let table = lategame::splits::split_table(league.plays(), &league.values(), &s, 20);
            std::hint::black_box(&table);
            best = best.min(t.elapsed().as_secs_f64() * 1000.0);
        }
        println!("{:?}: best of 10 = {best:.2} ms", preset);
    }
    Ok(())
}

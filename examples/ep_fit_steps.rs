//! The expected-points fit alone on a league, wall and CPU seconds and
//! Newton iterations: `cargo run --release --example ep_fit_steps FILE`.
//! `TOL=1e-9` sets the stopping rule (per unit of row weight);
//! `RUST_LOG=lategame=debug` logs every Newton step; `COMPARE=1` fits
//! again to a rule a thousand times tighter and prints the largest change
//! of any class probability of any snap.

use lategame::models::{ep, logit::FitOptions};
use lategame::playfile::{self, LoadOptions};
use std::time::Instant;

#[path = "support/proc_stat.rs"]
mod proc_stat;

fn main() -> anyhow::Result<()> {
    if std::env::var_os("RUST_LOG").is_some() {
        tracing_subscriber::fmt().with_env_filter(tracing_subscriber::EnvFilter::from_default_env()).init();
    }
    let path = std::env::args().nth(1).unwrap_or_else(|| "/tmp/league.parquet".into());
    let loaded = playfile::load(std::path::Path::new(&path), &LoadOptions::default())?;
    let plays = loaded.plays;
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let mut opts = FitOptions::default();
    if let Some(t) = std::env::var("TOL").ok().and_then(|s| s.parse().ok()) {
        opts.tol = t;
    }
    let (c0, t) = (proc_stat::cpu_seconds(), Instant::now());
    let m = ep::fit(&plays, &rows, &opts, None)?;
    let s = &m.fit.stats;
    println!(
        "EP fit: wall {:.2} s, cpu {:.2} s, {} warm + {} full iterations, converged {}, |grad| {:.2e}, log-lik {:.4}",
        t.elapsed().as_secs_f64(),
        proc_stat::cpu_seconds() - c0,
        s.warm_iterations,
        s.iterations,
        s.converged,
        s.grad_norm,
        s.log_lik
    );
    if std::env::var_os("COMPARE").is_some() {
        let tight = ep::fit(&plays, &rows, &FitOptions { tol: opts.tol * 1e-3, ..opts }, None)?;
        let mut x = vec![0.0; ep::FEATURES.len()];
        let (mut a, mut b, mut worst) = ([0.0; 7], [0.0; 7], 0.0f64);
        for i in 0..plays.len() {
            if plays.down[i] == 0 {
                continue;
            }
            ep::features(plays.down[i], plays.to_go[i], plays.ball_on[i], plays.secs_half[i], ep::ScoreClock::of_snap(&plays, i), &mut x);
            m.fit.probs(&x, &mut a);
            tight.fit.probs(&x, &mut b);
            worst = a.iter().zip(&b).map(|(p, q)| (p - q).abs()).fold(worst, f64::max);
        }
        let dc = m.fit.coef.iter().flatten().zip(tight.fit.coef.iter().flatten()).map(|(p, q)| (p - q).abs()).fold(0.0, f64::max);
        println!("against tol {:e} ({} full iterations): largest |dp| {worst:.2e}, largest |d coef| {dc:.2e}", opts.tol * 1e-3, tight.fit.stats.iterations);
    }
    Ok(())
}

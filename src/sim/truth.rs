//! The truth file: each passer's true rates, the mean of the very probabilities
//! the engine drew his dropbacks with. Reference situation "late and close":
//! 4th quarter with 7:30 or less on the clock, or overtime, offense margin within ±8 at the snap.

use super::shift::LateShift;
use anyhow::{Context, Result};
use serde::Serialize;
use std::io::Write;
use std::path::Path;

/// One passer's true rates. `complete` and `interception` are per pass
/// attempt (P(complete | pass), P(interception | pass)); `sack` and
/// `scramble` are per dropback. Late-and-close rates are `None` for a passer
/// with no such dropback.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TruthRow {
    pub passer: String,
    /// Club of his last dropback.
    pub last_team: String,
    /// Seasons with at least one dropback.
    pub seasons: u32,
    pub late_close_dropbacks: u32,
    pub late_close_complete: Option<f64>,
    pub late_close_interception: Option<f64>,
    pub late_close_sack: Option<f64>,
    pub late_close_scramble: Option<f64>,
    pub dropbacks: u32,
    pub complete: f64,
    pub interception: f64,
    pub sack: f64,
    pub scramble: f64,
    /// True rates on his other dropbacks (not late and close); `None`
    /// when every dropback of his was late and close. His true lift is the
    /// late-and-close rate minus this.
    pub other_complete: Option<f64>,
    pub other_interception: Option<f64>,
    pub other_sack: Option<f64>,
    /// His simulated late-and-close shifts on the logit scale (0 unless the
    /// league was drawn with `LateShifts`).
    pub late_shift_complete: f64,
    pub late_shift_interception: f64,
    pub late_shift_sack: f64,
}

/// The engine's probabilities at one dropback.
#[derive(Debug, Clone, Copy)]
pub(crate) struct DropbackTruth {
    pub complete: f64,
    pub interception: f64,
    pub sack: f64,
    pub scramble: f64,
}

impl DropbackTruth {
    fn array(self) -> [f64; 4] {
        [self.complete, self.interception, self.sack, self.scramble]
    }
}

/// True when a snap is in the reference situation.
pub(crate) fn late_and_close(period: i32, clock: i32, margin: i32) -> bool {
    (period >= 5 || (period == 4 && clock <= 450)) && margin.abs() <= 8
}

#[derive(Debug, Clone, Default)]
struct Tally {
    n: u32,
    sum: [f64; 4],
    lc_n: u32,
    lc_sum: [f64; 4],
    last_team: usize,
    last_season: Option<i32>,
    seasons: u32,
}

/// Running sums per passer id.
#[derive(Debug, Default)]
pub(crate) struct TruthBook {
    tally: Vec<Tally>,
}

impl TruthBook {
    pub(crate) fn record(&mut self, passer: usize, team: usize, season: i32, late_close: bool, p: DropbackTruth) {
        if self.tally.len() <= passer {
            self.tally.resize(passer + 1, Tally::default());
        }
        let t = &mut self.tally[passer];
        let p = p.array();
        t.n += 1;
        for (s, v) in t.sum.iter_mut().zip(p) {
            *s += v;
        }
        if late_close {
            t.lc_n += 1;
            for (s, v) in t.lc_sum.iter_mut().zip(p) {
                *s += v;
            }
        }
        t.last_team = team;
        if t.last_season != Some(season) {
            t.last_season = Some(season);
            t.seasons += 1;
        }
    }

    /// One row per passer with at least one dropback, in order of passer id.
    pub(crate) fn rows(
        &self,
        name: impl Fn(usize) -> String,
        team_code: impl Fn(usize) -> String,
        shift: impl Fn(usize) -> LateShift,
    ) -> Vec<TruthRow> {
        self.tally
            .iter()
            .enumerate()
            .filter(|(_, t)| t.n > 0)
            .map(|(pid, t)| {
                let n = t.n as f64;
                let lc = |k: usize| (t.lc_n > 0).then(|| t.lc_sum[k] / t.lc_n as f64);
                let other = |k: usize| (t.n > t.lc_n).then(|| (t.sum[k] - t.lc_sum[k]) / (t.n - t.lc_n) as f64);
                let sh = shift(pid);
                TruthRow {
                    passer: name(pid),
                    last_team: team_code(t.last_team),
                    seasons: t.seasons,
                    late_close_dropbacks: t.lc_n,
                    late_close_complete: lc(0),
                    late_close_interception: lc(1),
                    late_close_sack: lc(2),
                    late_close_scramble: lc(3),
                    dropbacks: t.n,
                    complete: t.sum[0] / n,
                    interception: t.sum[1] / n,
                    sack: t.sum[2] / n,
                    scramble: t.sum[3] / n,
                    other_complete: other(0),
                    other_interception: other(1),
                    other_sack: other(2),
                    late_shift_complete: sh.complete,
                    late_shift_interception: sh.interception,
                    late_shift_sack: sh.sack,
                }
            })
            .collect()
    }
}

/// Write the truth rows as CSV with a header line; empty cells for missing
/// late-and-close rates.
pub fn write_truth(truth: &[TruthRow], path: &Path) -> Result<()> {
    if let Some(dir) = path.parent() {
        if !dir.as_os_str().is_empty() {
            std::fs::create_dir_all(dir).with_context(|| format!("creating {}", dir.display()))?;
        }
    }
    let file = std::fs::File::create(path).with_context(|| format!("creating {}", path.display()))?;
    let mut w = std::io::BufWriter::new(file);
    let opt = |v: Option<f64>| v.map(|v| format!("{v:.6}")).unwrap_or_default();
    let mut body = String::from(
        "passer,last_team,seasons,late_close_dropbacks,late_close_complete,late_close_interception,\
         late_close_sack,late_close_scramble,dropbacks,complete,interception,sack,scramble,\
         other_complete,other_interception,other_sack,late_shift_complete,late_shift_interception,late_shift_sack\n",
    );
    for r in truth {
        body.push_str(&format!(
            "{},{},{},{},{},{},{},{},{},{:.6},{:.6},{:.6},{:.6},{},{},{},{:.6},{:.6},{:.6}\n",
            r.passer,
            r.last_team,
            r.seasons,
            r.late_close_dropbacks,
            opt(r.late_close_complete),
            opt(r.late_close_interception),
            opt(r.late_close_sack),
            opt(r.late_close_scramble),
            r.dropbacks,
            r.complete,
            r.interception,
            r.sack,
            r.scramble,
            opt(r.other_complete),
            opt(r.other_interception),
            opt(r.other_sack),
            r.late_shift_complete,
            r.late_shift_interception,
            r.late_shift_sack
        ));
    }
    w.write_all(body.as_bytes()).with_context(|| format!("writing {}", path.display()))?;
    w.flush().with_context(|| format!("writing {}", path.display()))?;
    Ok(())
}

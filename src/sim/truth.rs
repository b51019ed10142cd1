//! The truth file: each passer's true rates, the mean of the very probabilities
//! the engine drew his dropbacks with. Reference situation "end of game" (the
//! `end-of-game` preset's window): 4th quarter with 7:30 or less on the clock,
//! or overtime, offense margin within ±8 at the snap.

use super::shift::LateShift;
use serde::Serialize;
use std::io::Write;
use std::path::{Path, PathBuf};

/// The truth file could not be written.
#[derive(Debug, thiserror::Error)]
pub enum TruthError {
    #[error("could not write the truth file {}: {source}", path.display())]
    Write { path: PathBuf, source: std::io::Error },
}

/// One passer's true rates. `complete` and `interception` are per pass
/// attempt (P(complete | pass), P(interception | pass)); `sack` and
/// `scramble` are per dropback. End-of-game rates are `None` for a passer
/// with no such dropback.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TruthRow {
    pub passer: String,
    /// Club of his last dropback.
    pub last_team: String,
    /// Seasons with at least one dropback.
    pub seasons: u32,
    pub end_of_game_dropbacks: u32,
    pub end_of_game_complete: Option<f64>,
    pub end_of_game_interception: Option<f64>,
    pub end_of_game_sack: Option<f64>,
    pub end_of_game_scramble: Option<f64>,
    pub dropbacks: u32,
    pub complete: f64,
    pub interception: f64,
    pub sack: f64,
    pub scramble: f64,
    /// Shift of his depth tilt when trailing late (`ThrowShort`; 0: none).
    pub late_trailing_depth_shift: f64,
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
    /// His true rates over all his dropbacks against a defense with no
    /// pass-defense or pass-rush edge: his own level, the opponents taken
    /// out (what an opponent adjustment aims at).
    pub neutral_complete: f64,
    pub neutral_interception: f64,
    pub neutral_sack: f64,
}

/// The engine's probabilities at one dropback.
#[derive(Debug, Clone, Copy)]
pub(crate) struct DropbackTruth {
    pub complete: f64,
    pub interception: f64,
    pub sack: f64,
    pub scramble: f64,
    /// Completion, interception and sack chances against a defense with no
    /// pass-defense or pass-rush edge (the same dropback otherwise).
    pub neutral: [f64; 3],
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
    neutral_sum: [f64; 3],
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
        for (s, v) in t.neutral_sum.iter_mut().zip(p.neutral) {
            *s += v;
        }
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
        depth_shift: impl Fn(usize) -> f64,
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
                    end_of_game_dropbacks: t.lc_n,
                    end_of_game_complete: lc(0),
                    end_of_game_interception: lc(1),
                    end_of_game_sack: lc(2),
                    end_of_game_scramble: lc(3),
                    dropbacks: t.n,
                    complete: t.sum[0] / n,
                    interception: t.sum[1] / n,
                    sack: t.sum[2] / n,
                    scramble: t.sum[3] / n,
                    late_trailing_depth_shift: depth_shift(pid),
                    other_complete: other(0),
                    other_interception: other(1),
                    other_sack: other(2),
                    late_shift_complete: sh.complete,
                    late_shift_interception: sh.interception,
                    late_shift_sack: sh.sack,
                    neutral_complete: t.neutral_sum[0] / n,
                    neutral_interception: t.neutral_sum[1] / n,
                    neutral_sack: t.neutral_sum[2] / n,
                }
            })
            .collect()
    }
}

/// Write the truth rows as CSV with a header line; empty cells for missing
/// end-of-game rates.
pub fn write_truth(truth: &[TruthRow], path: &Path) -> Result<(), TruthError> {
    let failed = |at: &Path| {
        let at = at.to_path_buf();
        move |source| TruthError::Write { path: at, source }
    };
    if let Some(dir) = path.parent() {
        if !dir.as_os_str().is_empty() {
            std::fs::create_dir_all(dir).map_err(failed(dir))?;
        }
    }
    let file = std::fs::File::create(path).map_err(failed(path))?;
    let mut w = std::io::BufWriter::new(file);
    let opt = |v: Option<f64>| v.map(|v| format!("{v:.6}")).unwrap_or_default();
    let mut body = String::from(
        "passer,last_team,seasons,end_of_game_dropbacks,end_of_game_complete,end_of_game_interception,\
         end_of_game_sack,end_of_game_scramble,dropbacks,complete,interception,sack,scramble,late_trailing_depth_shift,\
         other_complete,other_interception,other_sack,late_shift_complete,late_shift_interception,late_shift_sack,\
         neutral_complete,neutral_interception,neutral_sack\n",
    );
    for r in truth {
        body.push_str(&format!(
            "{},{},{},{},{},{},{},{},{},{:.6},{:.6},{:.6},{:.6},{},{},{},{},{:.6},{:.6},{:.6},{:.6},{:.6},{:.6}\n",
            r.passer,
            r.last_team,
            r.seasons,
            r.end_of_game_dropbacks,
            opt(r.end_of_game_complete),
            opt(r.end_of_game_interception),
            opt(r.end_of_game_sack),
            opt(r.end_of_game_scramble),
            r.dropbacks,
            r.complete,
            r.interception,
            r.sack,
            r.scramble,
            r.late_trailing_depth_shift,
            opt(r.other_complete),
            opt(r.other_interception),
            opt(r.other_sack),
            r.late_shift_complete,
            r.late_shift_interception,
            r.late_shift_sack,
            r.neutral_complete,
            r.neutral_interception,
            r.neutral_sack
        ));
    }
    w.write_all(body.as_bytes()).map_err(failed(path))?;
    w.flush().map_err(failed(path))?;
    Ok(())
}

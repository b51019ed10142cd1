//! Calibration and trust: refit with seasons (or, in a one-season file, the
//! last games) held out and score them: WP Brier score and log loss against
//! the margin-and-time baseline and a constant ½, reliability tables, EP by
//! bin, and the strata of `strata`.

use super::strata::{ep_groups, stratum_score, wp_window, EpGroup, Pred, StratumBin, StratumScore, WpStratum};
pub use super::score::{prob_score, ProbScore};
use super::{fit_rows_from, Models};
use super::error::{ModelError, Result};
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// One bin of a reliability table: snaps whose prediction fell in `lo..hi`.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct ReliabilityBin {
    pub bin: usize,
    pub lo: f64,
    pub hi: f64,
    pub n: usize,
    pub mean_predicted: f64,
    /// Share of those snaps whose offense won (ties ½).
    pub observed: f64,
}

/// One EP bin: snaps with a down whose EP fell in the bin, and the points of
/// the next score in the half that actually followed (offense's side).
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct EpBin {
    pub bin: usize,
    /// Lower edge; `None` for the open bottom bin.
    pub lo: Option<f64>,
    /// Upper edge; `None` for the open top bin.
    pub hi: Option<f64>,
    pub n: usize,
    pub mean_predicted: f64,
    pub mean_actual: f64,
}

/// Scores of one held-out season in a leave-one-season-out run.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct SeasonScore {
    pub season: i32,
    pub wp: ProbScore,
    pub baseline: ProbScore,
}

/// How snaps were held out.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Plan {
    /// Each season in turn, fit on the others (the default with >= 3 seasons).
    LeaveOneSeasonOut,
    /// The most recent season, fit on the others (the default with 2).
    LastSeason,
    /// One season: its last fifth of games, fit on the earlier games.
    LastGames,
}

#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct Calibration {
    pub plan: Plan,
    /// What was held out, in words.
    pub holdout: String,
    /// The held-out season under `Plan::LastSeason`.
    pub holdout_season: Option<i32>,
    /// Snaps the (last) fit was trained on and snaps predicted out of sample.
    pub train_snaps: usize,
    pub test_snaps: usize,
    pub test_games: usize,
    pub wp: ProbScore,
    pub baseline: ProbScore,
    pub constant: ProbScore,
    pub reliability: Vec<ReliabilityBin>,
    pub baseline_reliability: Vec<ReliabilityBin>,
    pub ep_bins: Vec<EpBin>,
    /// Completion model on held-out passes with air yards, if any.
    pub cp: Option<ProbScore>,
    /// Scores of each held-out season (leave-one-season-out; else empty).
    pub by_season: Vec<SeasonScore>,
    /// Late and close, the final 2:00 of a half, overtime.
    pub strata: Vec<StratumScore>,
    pub ep_by_down: Vec<EpGroup>,
    pub ep_by_zone: Vec<EpGroup>,
    /// The final 2:00 of a half, the four-minute offense, the rest.
    pub ep_by_clock: Vec<EpGroup>,
    /// Late and close snaps the model gave 25-35%, and how often those
    /// teams won: the page's opening sentence.
    pub headline: StratumBin,
}

/// Most seasons held out in turn: the latest ones. Each is one refit of
/// every model, so a long file would otherwise spend minutes on them.
pub const MAX_HELDOUT_SEASONS: usize = 6;

/// Told after each held-out fit: (fits done, fits in all); returns false
/// to stop the calibration (it then ends in `CalibError::Cancelled`).
pub type Progress<'a> = &'a dyn Fn(usize, usize) -> bool;

/// Options for `calibrate_with`.
#[derive(Debug, Clone, Copy, Default)]
pub struct CalibOptions {
    /// `None`: leave one season out with >= 3 seasons (the latest
    /// `MAX_HELDOUT_SEASONS` of them), the last season with 2, the last
    /// fifth of games with 1.
    pub plan: Option<Plan>,
}

pub fn reliability(pred: &[f64], actual: &[f64]) -> Vec<ReliabilityBin> {
    let mut n = [0usize; 10];
    let mut sp = [0.0; 10];
    let mut sy = [0.0; 10];
    for (&p, &y) in pred.iter().zip(actual) {
        let b = ((p * 10.0) as usize).min(9);
        n[b] += 1;
        sp[b] += p;
        sy[b] += y;
    }
    (0..10)
        .map(|b| {
            let d = n[b].max(1) as f64;
            ReliabilityBin {
                bin: b,
                lo: b as f64 / 10.0,
                hi: (b + 1) as f64 / 10.0,
                n: n[b],
                mean_predicted: sp[b] / d,
                observed: sy[b] / d,
            }
        })
        .collect()
}

/// Edges of the EP bins: below -2, then one point wide, then 6 and up.
const EP_EDGES: [f64; 9] = [-2.0, -1.0, 0.0, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0];

pub fn ep_bins(pred: &[f64], actual: &[f64]) -> Vec<EpBin> {
    let k = EP_EDGES.len() + 1;
    let mut n = vec![0usize; k];
    let mut sp = vec![0.0; k];
    let mut sy = vec![0.0; k];
    for (&p, &y) in pred.iter().zip(actual) {
        let b = EP_EDGES.iter().take_while(|&&e| p >= e).count();
        n[b] += 1;
        sp[b] += p;
        sy[b] += y;
    }
    (0..k)
        .map(|b| {
            let d = n[b].max(1) as f64;
            EpBin {
                bin: b,
                lo: (b > 0).then(|| EP_EDGES[b - 1]),
                hi: (b < k - 1).then(|| EP_EDGES[b]),
                n: n[b],
                mean_predicted: sp[b] / d,
                mean_actual: sy[b] / d,
            }
        })
        .collect()
}

/// One fit's train and test rows, and the season it held out (if one).
struct Fold {
    train: Vec<u32>,
    test: Vec<u32>,
    season: Option<i32>,
}

/// The folds of a plan and the words for what they hold out.
fn folds(plays: &Plays, plan: Option<Plan>) -> Result<(Plan, Vec<Fold>, String)> {
    let seasons = plays.seasons();
    let Some(&last) = seasons.last() else {
        return Err(ModelError::EmptyLeague);
    };
    let plan = match plan {
        Some(Plan::LeaveOneSeasonOut | Plan::LastSeason) if seasons.len() < 2 => Plan::LastGames,
        Some(p) => p,
        None if seasons.len() >= 3 => Plan::LeaveOneSeasonOut,
        None if seasons.len() == 2 => Plan::LastSeason,
        None => Plan::LastGames,
    };
    let season_fold = |s: i32| {
        let (test, train): (Vec<u32>, Vec<u32>) =
            (0..plays.len() as u32).partition(|&i| plays.season[i as usize] == s);
        Fold { train, test, season: Some(s) }
    };
    Ok(match plan {
        Plan::LeaveOneSeasonOut => {
            let held = &seasons[seasons.len().saturating_sub(MAX_HELDOUT_SEASONS)..];
            let words = if held.len() == seasons.len() {
                format!(
                    "each of the {} seasons in turn ({}-{}), predicted by models fit on the other {}",
                    seasons.len(),
                    seasons[0],
                    last,
                    seasons.len() - 1
                )
            } else {
                format!(
                    "each of the last {} of the {} seasons in turn ({}-{}), predicted by models fit on the other {}; seasons {}-{} are only trained on",
                    held.len(),
                    seasons.len(),
                    held[0],
                    last,
                    seasons.len() - 1,
                    seasons[0],
                    seasons[seasons.len() - held.len() - 1]
                )
            };
            (plan, held.iter().map(|&s| season_fold(s)).collect(), words)
        }
        Plan::LastSeason => (
            plan,
            vec![season_fold(last)],
            format!("season {last}, predicted by models fit on the {} earlier seasons", seasons.len() - 1),
        ),
        Plan::LastGames => {
            let ng = plays.games.len();
            let cut = ng - (ng / 5).max(1);
            if cut == 0 {
                return Err(ModelError::TooFewGames(ng));
            }
            let at = plays.games[cut].start as u32;
            (
                plan,
                vec![Fold {
                    train: (0..at).collect(),
                    test: (at..plays.len() as u32).collect(),
                    season: None,
                }],
                format!(
                    "the last {} of the {ng} games of season {last} (in file order), predicted by models fit on its first {cut} games; the file has one season, so no season can be held out",
                    ng - cut
                ),
            )
        }
    })
}

/// Out-of-sample predictions of one fold.
fn predict(plays: &Plays, fold: &Fold, init: Option<&Models>, out: &mut Vec<Pred>, cp: &mut (Vec<f64>, Vec<f64>)) -> Result<()> {
    let models: Models = fit_rows_from(plays, &fold.train, init)?;
    let ep = models.ep.score_all(plays);
    let blind = models.ep.score_all_blind(plays);
    for &i in &fold.test {
        let i = i as usize;
        let s = super::wp::Situation::of_snap(plays, &blind, i);
        let has_down = plays.down[i] > 0;
        out.push(Pred {
            snap: i as u32,
            game: plays.game[i],
            wp: models.wp.situation(&s),
            base: models.baseline.situation(&s),
            actual: plays.offense_result(i),
            ep: if has_down { ep[i] } else { f64::NAN },
            ep_actual: if has_down { plays.next_score[i].points(models.ep.td_value) } else { f64::NAN },
        });
    }
    if let Some(m) = &models.cp {
        let all = m.score_all(plays);
        for &i in &fold.test {
            let i = i as usize;
            if all[i].is_finite() {
                cp.0.push(all[i]);
                cp.1.push(plays.complete[i] as i32 as f64);
            }
        }
    }
    Ok(())
}

/// The held-out predictions the calibration scores, one per snap held out
/// (in fold order), and the plan that made them.
pub fn held_out_predictions(plays: &Plays, opts: &CalibOptions) -> Result<(Plan, Vec<Pred>)> {
    let (plan, folds, _) = folds(plays, opts.plan)?;
    let mut preds = Vec::new();
    let mut cp = (Vec::new(), Vec::new());
    for f in &folds {
        predict(plays, f, None, &mut preds, &mut cp)?;
    }
    Ok((plan, preds))
}

/// Hold out snaps as the plan says, fit on the rest, score the held-out snaps.
pub fn calibrate_with(plays: &Plays, opts: &CalibOptions) -> Result<Calibration> {
    calibrate_from(plays, opts, None)
}

/// `calibrate_with`, the refits started from `init` (models fit on all
/// snaps): the same held-out fits in fewer Newton iterations.
pub fn calibrate_from(
    plays: &Plays,
    opts: &CalibOptions,
    init: Option<&Models>,
) -> Result<Calibration> {
    calibrate_watched(plays, opts, init, &|_, _| true)
}

/// `calibrate_from`, telling `progress` after each held-out fit.
pub fn calibrate_watched(
    plays: &Plays,
    opts: &CalibOptions,
    init: Option<&Models>,
    progress: Progress,
) -> Result<Calibration> {
    let (plan, folds, holdout) = folds(plays, opts.plan)?;
    let mut preds = Vec::new();
    let mut cp = (Vec::new(), Vec::new());
    let mut by_season = Vec::new();
    if !progress(0, folds.len()) {
        return Err(ModelError::Cancelled);
    }
    for (k, f) in folds.iter().enumerate() {
        let from = preds.len();
        predict(plays, f, init, &mut preds, &mut cp)?;
        if !progress(k + 1, folds.len()) {
            return Err(ModelError::Cancelled);
        }
        if let (Plan::LeaveOneSeasonOut, Some(season)) = (plan, f.season) {
            let p = &preds[from..];
            let actual: Vec<f64> = p.iter().map(|x| x.actual).collect();
            by_season.push(SeasonScore {
                season,
                wp: prob_score(&p.iter().map(|x| x.wp).collect::<Vec<_>>(), &actual),
                baseline: prob_score(&p.iter().map(|x| x.base).collect::<Vec<_>>(), &actual),
            });
        }
    }
    let wp: Vec<f64> = preds.iter().map(|x| x.wp).collect();
    let base: Vec<f64> = preds.iter().map(|x| x.base).collect();
    let actual: Vec<f64> = preds.iter().map(|x| x.actual).collect();
    let (ep_pred, ep_actual): (Vec<f64>, Vec<f64>) =
        preds.iter().filter(|x| x.ep.is_finite()).map(|x| (x.ep, x.ep_actual)).unzip();
    let mut games: Vec<u32> = preds.iter().map(|x| x.game).collect();
    games.dedup();
    let (ep_by_down, ep_by_zone, ep_by_clock) = ep_groups(plays, &preds);
    let last = folds.last().map_or(0, |f| f.train.len());
    Ok(Calibration {
        plan,
        holdout,
        holdout_season: (plan == Plan::LastSeason).then(|| folds[0].season).flatten(),
        train_snaps: last,
        test_snaps: preds.len(),
        test_games: games.len(),
        constant: prob_score(&vec![0.5; actual.len()], &actual),
        reliability: reliability(&wp, &actual),
        baseline_reliability: reliability(&base, &actual),
        ep_bins: ep_bins(&ep_pred, &ep_actual),
        wp: prob_score(&wp, &actual),
        baseline: prob_score(&base, &actual),
        cp: (!cp.0.is_empty()).then(|| prob_score(&cp.0, &cp.1)),
        by_season,
        strata: WpStratum::ALL.iter().map(|&s| stratum_score(s, plays, &preds)).collect(),
        ep_by_down,
        ep_by_zone,
        ep_by_clock,
        headline: wp_window(WpStratum::LateClose, plays, &preds, 0.25, 0.35),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scores_of_known_predictions() {
        let s = prob_score(&[0.5, 0.5], &[1.0, 0.0]);
        assert!((s.brier - 0.25).abs() < 1e-12);
        assert!((s.log_loss - std::f64::consts::LN_2).abs() < 1e-12);
        let s = prob_score(&[1.0], &[1.0]);
        assert_eq!(s.brier, 0.0);
        assert!(s.log_loss < 1e-5);
    }

    #[test]
    fn bins_cover_every_prediction() {
        let r = reliability(&[0.0, 0.05, 0.95, 1.0, 0.5], &[0.0, 0.0, 1.0, 1.0, 0.5]);
        assert_eq!(r.iter().map(|b| b.n).sum::<usize>(), 5);
        assert_eq!(r[9].n, 2);
        let e = ep_bins(&[-5.0, -2.0, 0.5, 6.0, 9.0], &[0.0; 5]);
        assert_eq!(e.len(), 10);
        assert_eq!(e[0].n, 1);
        assert_eq!(e[1].n, 1);
        assert_eq!(e[3].n, 1);
        assert_eq!(e[9].n, 2);
    }
}

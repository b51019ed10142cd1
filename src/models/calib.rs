//! Calibration and trust: refit on all but the held-out (most recent) season,
//! then score that season: WP Brier score and log loss against the
//! margin-and-time baseline and a constant ½, reliability tables, EP by bin.

use super::wp::P_EPS;
use super::{fit_rows_from, Models};
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Brier score and log loss of one set of win probabilities.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct ProbScore {
    pub n: usize,
    pub brier: f64,
    pub log_loss: f64,
}

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

#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct Calibration {
    /// What was held out, in words.
    pub holdout: String,
    pub holdout_season: Option<i32>,
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
    /// Leave-one-season-out scores; empty unless asked for.
    pub by_season: Vec<SeasonScore>,
    /// Reliability of the full model over every leave-one-season-out
    /// prediction pooled; empty unless asked for.
    pub pooled_reliability: Vec<ReliabilityBin>,
}

/// Options for `calibrate_with`.
#[derive(Debug, Clone, Copy, Default)]
pub struct CalibOptions {
    /// Also refit once per season with that season held out.
    pub leave_one_season_out: bool,
}

pub fn prob_score(pred: &[f64], actual: &[f64]) -> ProbScore {
    let n = pred.len();
    let (mut b, mut l) = (0.0, 0.0);
    for (&p, &y) in pred.iter().zip(actual) {
        b += (p - y) * (p - y);
        let pc = p.clamp(P_EPS, 1.0 - P_EPS);
        l -= y * pc.ln() + (1.0 - y) * (1.0 - pc).ln();
    }
    let d = n.max(1) as f64;
    ProbScore {
        n,
        brier: b / d,
        log_loss: l / d,
    }
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

/// Split snaps into (train, test) rows: the most recent season held out, or
/// with a single season its last fifth of games.
fn split(plays: &Plays) -> anyhow::Result<(Vec<u32>, Vec<u32>, String, Option<i32>, usize)> {
    let seasons = plays.seasons();
    let Some(&last) = seasons.last() else {
        anyhow::bail!("calibration needs at least one game; the league is empty");
    };
    if seasons.len() >= 2 {
        let (mut train, mut test) = (Vec::new(), Vec::new());
        for i in 0..plays.len() {
            if plays.season[i] == last {
                test.push(i as u32);
            } else {
                train.push(i as u32);
            }
        }
        let games = plays.games.iter().filter(|g| g.season == last).count();
        Ok((
            train,
            test,
            format!(
                "season {last} (fit on the {} earlier seasons)",
                seasons.len() - 1
            ),
            Some(last),
            games,
        ))
    } else {
        let ng = plays.games.len();
        let cut = ng - (ng / 5).max(1);
        if cut == 0 {
            anyhow::bail!("calibration needs at least two games; the league has {ng}");
        }
        let at = plays.games[cut].start;
        let train = (0..at as u32).collect();
        let test = (at as u32..plays.len() as u32).collect();
        Ok((
            train,
            test,
            format!("the last {} of {ng} games of season {last}", ng - cut),
            None,
            ng - cut,
        ))
    }
}

struct HeldOut {
    wp: ProbScore,
    baseline: ProbScore,
    wp_pred: Vec<f64>,
    base_pred: Vec<f64>,
    actual: Vec<f64>,
    ep_pred: Vec<f64>,
    ep_actual: Vec<f64>,
    cp: Option<ProbScore>,
}

fn held_out(
    plays: &Plays,
    train: &[u32],
    test: &[u32],
    init: Option<&Models>,
) -> anyhow::Result<HeldOut> {
    let models: Models = fit_rows_from(plays, train, init)?;
    let ep = models.ep.score_all(plays);
    let (mut wp_pred, mut base_pred, mut actual) = (Vec::new(), Vec::new(), Vec::new());
    let (mut ep_pred, mut ep_actual) = (Vec::new(), Vec::new());
    let (mut cp_pred, mut cp_actual) = (Vec::new(), Vec::new());
    for &i in test {
        let i = i as usize;
        let s = super::wp::Situation::of_snap(plays, &ep, i);
        wp_pred.push(models.wp.situation(&s));
        base_pred.push(models.baseline.situation(&s));
        actual.push(plays.offense_result(i));
        if plays.down[i] > 0 {
            ep_pred.push(ep[i]);
            ep_actual.push(plays.next_score[i].points(models.ep.td_value));
        }
    }
    if let Some(cp) = &models.cp {
        let all = cp.score_all(plays);
        for &i in test {
            let i = i as usize;
            if all[i].is_finite() {
                cp_pred.push(all[i]);
                cp_actual.push(plays.complete[i] as i32 as f64);
            }
        }
    }
    Ok(HeldOut {
        wp: prob_score(&wp_pred, &actual),
        baseline: prob_score(&base_pred, &actual),
        wp_pred,
        base_pred,
        actual,
        ep_pred,
        ep_actual,
        cp: (!cp_pred.is_empty()).then(|| prob_score(&cp_pred, &cp_actual)),
    })
}

/// Hold out the most recent season, fit on the rest, score the held-out snaps.
pub fn calibrate_with(plays: &Plays, opts: &CalibOptions) -> anyhow::Result<Calibration> {
    calibrate_from(plays, opts, None)
}

/// `calibrate_with`, the refits started from `init` (models fit on all
/// snaps): the same held-out fits in fewer Newton iterations.
pub fn calibrate_from(
    plays: &Plays,
    opts: &CalibOptions,
    init: Option<&Models>,
) -> anyhow::Result<Calibration> {
    let (train, test, holdout, holdout_season, test_games) = split(plays)?;
    let h = held_out(plays, &train, &test, init)?;
    let half = vec![0.5; h.actual.len()];
    let mut by_season = Vec::new();
    let (mut pooled_pred, mut pooled_actual) = (Vec::new(), Vec::new());
    if opts.leave_one_season_out {
        let seasons = plays.seasons();
        if seasons.len() >= 2 {
            for s in seasons {
                let (tr, te): (Vec<u32>, Vec<u32>) =
                    (0..plays.len() as u32).partition(|&i| plays.season[i as usize] != s);
                let r = held_out(plays, &tr, &te, init)?;
                pooled_pred.extend_from_slice(&r.wp_pred);
                pooled_actual.extend_from_slice(&r.actual);
                by_season.push(SeasonScore {
                    season: s,
                    wp: r.wp,
                    baseline: r.baseline,
                });
            }
        }
    }
    let pooled_reliability = if pooled_pred.is_empty() {
        Vec::new()
    } else {
        reliability(&pooled_pred, &pooled_actual)
    };
    Ok(Calibration {
        holdout,
        holdout_season,
        train_snaps: train.len(),
        test_snaps: test.len(),
        test_games,
        constant: prob_score(&half, &h.actual),
        reliability: reliability(&h.wp_pred, &h.actual),
        baseline_reliability: reliability(&h.base_pred, &h.actual),
        ep_bins: ep_bins(&h.ep_pred, &h.ep_actual),
        wp: h.wp,
        baseline: h.baseline,
        cp: h.cp,
        by_season,
        pooled_reliability,
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

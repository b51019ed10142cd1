//! The moments that matter, scored on held-out predictions: win-probability
//! strata (late and close, the final 2:00 of a half, overtime) and EP by
//! down, field zone and clock situation, each with game-clustered bootstrap
//! 90% bands (whole games are resampled: snaps of one game are not
//! independent).

use super::score::{prob_score, ProbScore};
use crate::plays::Plays;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::{Deserialize, Serialize};

/// Bootstrap resamples of games.
pub const BOOTSTRAP_DRAWS: usize = 400;
/// Seed of the bootstrap (fixed: the page shows the same bands every time).
const BOOTSTRAP_SEED: u64 = 0x5EA5_0B00_7C1A_1B00;
/// Equal-count reliability bins within a stratum.
pub const STRATUM_BINS: usize = 5;
/// "Late": the final 7:30 of the 4th period (seconds).
pub const LATE_SECS: i32 = 450;
/// "Close": within one score (points).
pub const CLOSE_MARGIN: i32 = 8;

/// A win-probability stratum.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum WpStratum {
    /// Final 7:30 of the 4th period or overtime, offense within 8.
    LateClose,
    /// Final 2:00 of the 2nd or 4th period.
    FinalTwo,
    Overtime,
}

impl WpStratum {
    pub const ALL: [WpStratum; 3] = [WpStratum::LateClose, WpStratum::FinalTwo, WpStratum::Overtime];

    pub fn label(self) -> &'static str {
        match self {
            WpStratum::LateClose => "Final 7:30 of the 4th period or overtime, within one score (8 points)",
            WpStratum::FinalTwo => "Final 2:00 of either half",
            WpStratum::Overtime => "Overtime",
        }
    }

    pub fn contains(self, plays: &Plays, i: usize) -> bool {
        let (p, c) = (plays.period[i], plays.clock[i]);
        match self {
            WpStratum::LateClose => (p >= 5 || (p == 4 && c <= LATE_SECS)) && plays.margin[i].abs() <= CLOSE_MARGIN,
            WpStratum::FinalTwo => (p == 2 || p == 4) && c <= 120,
            WpStratum::Overtime => p >= 5,
        }
    }
}

/// A number with its game-clustered bootstrap 90% band.
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq)]
pub struct Banded {
    pub value: f64,
    pub lo: f64,
    pub hi: f64,
}

/// One equal-count bin of a stratum's reliability table.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct StratumBin {
    pub lo: f64,
    pub hi: f64,
    pub n: usize,
    pub mean_predicted: f64,
    /// Observed win share (ties ½) with its band.
    pub observed: Banded,
}

/// How the model and the margin-and-time baseline did in one stratum.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct StratumScore {
    pub stratum: WpStratum,
    pub label: String,
    pub games: usize,
    pub wp: ProbScore,
    pub baseline: ProbScore,
    pub wp_brier: Banded,
    pub baseline_brier: Banded,
    /// `1 - wp Brier / baseline Brier`: the share of the baseline's Brier
    /// score the model removes.
    pub brier_gain: Banded,
    pub bins: Vec<StratumBin>,
    pub baseline_bins: Vec<StratumBin>,
}

/// One row of the EP reliability tables: snaps with a down in a group, the
/// mean EP before them and the mean points of the next score in the half.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct EpGroup {
    pub label: String,
    pub n: usize,
    pub mean_predicted: f64,
    pub mean_actual: Banded,
}

/// One held-out prediction.
#[derive(Debug, Clone, Copy)]
pub struct Pred {
    pub snap: u32,
    pub game: u32,
    pub wp: f64,
    pub base: f64,
    pub actual: f64,
    /// EP before the snap (NaN on snaps without a down) and what followed.
    pub ep: f64,
    pub ep_actual: f64,
}

/// Game-clustered bootstrap: `stat` over per-game sums of `k` quantities.
/// `sums[g]` are game g's sums; each draw resamples games with replacement.
/// No games: 0 with no width (the counts beside it say there was nothing).
fn bootstrap(sums: &[Vec<f64>], stat: &dyn Fn(&[f64]) -> f64) -> Banded {
    if sums.is_empty() {
        return Banded { value: 0.0, lo: 0.0, hi: 0.0 };
    }
    let k = sums.first().map_or(0, Vec::len);
    let total = |pick: &mut dyn FnMut() -> usize| {
        let mut t = vec![0.0; k];
        for _ in 0..sums.len() {
            for (a, b) in t.iter_mut().zip(&sums[pick()]) {
                *a += b;
            }
        }
        t
    };
    let mut all = vec![0.0; k];
    for s in sums {
        for (a, b) in all.iter_mut().zip(s) {
            *a += b;
        }
    }
    let value = stat(&all);
    let mut rng = ChaCha8Rng::seed_from_u64(BOOTSTRAP_SEED);
    let mut draws: Vec<f64> = (0..BOOTSTRAP_DRAWS)
        .map(|_| stat(&total(&mut || rng.random_range(0..sums.len()))))
        .filter(|v| v.is_finite())
        .collect();
    draws.sort_by(f64::total_cmp);
    if draws.is_empty() {
        return Banded { value, lo: value, hi: value };
    }
    let at = |q: f64| draws[((draws.len() - 1) as f64 * q).round() as usize];
    Banded { value, lo: at(0.05), hi: at(0.95) }
}

/// Per-game sums of `f(pred)` over `preds` (grouped by game, in the order
/// games first appear).
fn by_game(preds: &[&Pred], k: usize, f: &dyn Fn(&Pred, &mut [f64])) -> Vec<Vec<f64>> {
    let mut index = std::collections::HashMap::new();
    let mut sums: Vec<Vec<f64>> = Vec::new();
    let mut row = vec![0.0; k];
    for p in preds {
        let g = *index.entry(p.game).or_insert_with(|| {
            sums.push(vec![0.0; k]);
            sums.len() - 1
        });
        row.iter_mut().for_each(|v| *v = 0.0);
        f(p, &mut row);
        for (a, b) in sums[g].iter_mut().zip(&row) {
            *a += b;
        }
    }
    sums
}

/// Edges of `bins` equal-count bins of `values` (first 0, last 1).
fn quantile_edges(values: &[f64], bins: usize) -> Vec<f64> {
    let mut v: Vec<f64> = values.to_vec();
    v.sort_by(f64::total_cmp);
    let mut edges = vec![0.0];
    for b in 1..bins {
        edges.push(v.get(v.len() * b / bins).copied().unwrap_or(1.0));
    }
    edges.push(1.0);
    edges
}

fn bin_of(edges: &[f64], p: f64) -> usize {
    let k = edges.len() - 1;
    edges[1..k].iter().take_while(|&&e| p >= e).count()
}

/// Equal-count reliability bins of `pick(pred)` with bootstrap bands on the
/// observed share.
fn banded_bins(preds: &[&Pred], pick: fn(&Pred) -> f64) -> Vec<StratumBin> {
    let values: Vec<f64> = preds.iter().map(|p| pick(p)).collect();
    let edges = quantile_edges(&values, STRATUM_BINS);
    (0..STRATUM_BINS)
        .map(|b| {
            let inside: Vec<&Pred> = preds.iter().copied().filter(|p| bin_of(&edges, pick(p)) == b).collect();
            let n = inside.len();
            let mean_predicted = inside.iter().map(|p| pick(p)).sum::<f64>() / n.max(1) as f64;
            let sums = by_game(&inside, 2, &|p, r| {
                r[0] = 1.0;
                r[1] = p.actual;
            });
            StratumBin {
                lo: edges[b],
                hi: edges[b + 1],
                n,
                mean_predicted,
                observed: bootstrap(&sums, &|t| t[1] / t[0]),
            }
        })
        .collect()
}

/// The held-out snaps of `stratum` whose WP fell in `lo..hi`, with the
/// observed win share and its band (for a sentence a staff can read).
pub fn wp_window(stratum: WpStratum, plays: &Plays, preds: &[Pred], lo: f64, hi: f64) -> StratumBin {
    let inside: Vec<&Pred> = preds
        .iter()
        .filter(|p| stratum.contains(plays, p.snap as usize) && (lo..hi).contains(&p.wp))
        .collect();
    let sums = by_game(&inside, 2, &|p, r| {
        r[0] = 1.0;
        r[1] = p.actual;
    });
    StratumBin {
        lo,
        hi,
        n: inside.len(),
        mean_predicted: inside.iter().map(|p| p.wp).sum::<f64>() / inside.len().max(1) as f64,
        observed: bootstrap(&sums, &|t| t[1] / t[0]),
    }
}

/// Score one stratum of held-out predictions.
pub fn stratum_score(stratum: WpStratum, plays: &Plays, preds: &[Pred]) -> StratumScore {
    let inside: Vec<&Pred> = preds.iter().filter(|p| stratum.contains(plays, p.snap as usize)).collect();
    let wp: Vec<f64> = inside.iter().map(|p| p.wp).collect();
    let base: Vec<f64> = inside.iter().map(|p| p.base).collect();
    let actual: Vec<f64> = inside.iter().map(|p| p.actual).collect();
    let sums = by_game(&inside, 3, &|p, r| {
        r[0] = 1.0;
        r[1] = (p.wp - p.actual).powi(2);
        r[2] = (p.base - p.actual).powi(2);
    });
    StratumScore {
        stratum,
        label: stratum.label().to_string(),
        games: sums.len(),
        wp: prob_score(&wp, &actual),
        baseline: prob_score(&base, &actual),
        wp_brier: bootstrap(&sums, &|t| t[1] / t[0]),
        baseline_brier: bootstrap(&sums, &|t| t[2] / t[0]),
        brier_gain: bootstrap(&sums, &|t| 1.0 - t[1] / t[2]),
        bins: banded_bins(&inside, |p| p.wp),
        baseline_bins: banded_bins(&inside, |p| p.base),
    }
}

/// Field zones of the EP table (own yard line ranges), as the split
/// engine's state-mix baseline draws them.
const ZONES: [(&str, i32, i32); 4] = [
    ("Own 1-20", 1, 20),
    ("Own 21-50", 21, 50),
    ("Opp 49-21", 51, 79),
    ("Opp 20-1", 80, 99),
];

fn ep_group(label: String, preds: &[&Pred]) -> EpGroup {
    let sums = by_game(preds, 2, &|p, r| {
        r[0] = 1.0;
        r[1] = p.ep_actual;
    });
    EpGroup {
        label,
        n: preds.len(),
        mean_predicted: preds.iter().map(|p| p.ep).sum::<f64>() / preds.len().max(1) as f64,
        mean_actual: bootstrap(&sums, &|t| t[1] / t[0]),
    }
}

/// EP reliability: (by down, by field zone, by clock situation). The clock
/// rows ask whether time and score should enter EP: the final 2:00 of a
/// half, and the four-minute offense (leading in the final 4:00 of the 4th
/// period), against the rest of the snaps with a down.
pub fn ep_groups(plays: &Plays, preds: &[Pred]) -> (Vec<EpGroup>, Vec<EpGroup>, Vec<EpGroup>) {
    let with_down: Vec<&Pred> = preds.iter().filter(|p| p.ep.is_finite()).collect();
    let pick = |f: &dyn Fn(usize) -> bool| -> Vec<&Pred> {
        with_down.iter().copied().filter(|p| f(p.snap as usize)).collect()
    };
    let downs = (1..=4)
        .map(|d| ep_group(format!("Down {d}"), &pick(&|i| plays.down[i] == d)))
        .collect();
    let zones = ZONES
        .iter()
        .map(|&(name, lo, hi)| ep_group(name.to_string(), &pick(&|i| (lo..=hi).contains(&plays.ball_on[i]))))
        .collect();
    let two = |i: usize| (plays.period[i] == 2 || plays.period[i] == 4) && plays.clock[i] <= 120;
    let four = |i: usize| plays.period[i] == 4 && plays.clock[i] <= 240 && plays.margin[i] > 0;
    let clock = vec![
        ep_group("Final 2:00 of a half".into(), &pick(&two)),
        ep_group("Leading, final 4:00 of the 4th".into(), &pick(&four)),
        ep_group("Everything else".into(), &pick(&|i| !two(i) && !four(i))),
    ];
    (downs, zones, clock)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bootstrap_of_a_constant_has_no_width_and_bands_hold_the_value() {
        let sums = vec![vec![2.0, 1.0]; 30];
        let b = bootstrap(&sums, &|t| t[1] / t[0]);
        assert_eq!((b.value, b.lo, b.hi), (0.5, 0.5, 0.5));
        let sums: Vec<Vec<f64>> = (0..200).map(|g| vec![1.0, (g % 2) as f64]).collect();
        let b = bootstrap(&sums, &|t| t[1] / t[0]);
        assert_eq!(b.value, 0.5);
        // Binomial share of 200 games: SE 0.035, 90% band about ±0.058.
        assert!(b.lo < 0.5 && b.hi > 0.5 && b.hi - b.lo > 0.08 && b.hi - b.lo < 0.16, "{b:?}");
    }

    #[test]
    fn equal_count_edges() {
        let v: Vec<f64> = (0..100).map(|i| i as f64 / 100.0).collect();
        let e = quantile_edges(&v, 5);
        assert_eq!(e, vec![0.0, 0.2, 0.4, 0.6, 0.8, 1.0]);
        assert_eq!(bin_of(&e, 0.0), 0);
        assert_eq!(bin_of(&e, 0.2), 1);
        assert_eq!(bin_of(&e, 0.99), 4);
        assert_eq!(bin_of(&e, 1.0), 4);
    }
}

//! The split table's stages one after another, each timed (for
//! `examples/view_parts.rs`): the every-snap pass behind his normal, the
//! situation's pass and its sums, each metric's two-level fit, the
//! posteriors, the state-mix baselines, the percentile ranks, the
//! stability and the opponent adjustment. The same functions the table
//! calls, on one thread, without the table's memo of fits, ranks and
//! stability (the passes are memoised as the table memoises them).

use super::estimates::ranks_of;
use super::index::SplitIndex;
use super::lift::{fit, normals, posteriors, RATING_PARTS};
use super::metrics::{metric_index, SnapValues, Stat, METRICS};
use super::normal::every_snap;
use super::scan::{accumulate, memo, rating_from, seasons_of, CellSums};
use super::shrink::{adjusted, stability};
use crate::plays::Plays;
use crate::situation::Situation;
use std::time::Instant;

/// Milliseconds taken by each stage of the table of `s` (names in order);
/// fits per metric are named "fit KEY".
pub fn stage_times(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32) -> Vec<(String, f64)> {
    let mut out = Vec::new();
    let mut t = Instant::now();
    let mut lap = |name: &str, out: &mut Vec<(String, f64)>| {
        out.push((name.to_string(), t.elapsed().as_secs_f64() * 1000.0));
        t = Instant::now();
    };
    let normal = every_snap(ix, p, v, s);
    lap("every-snap pass (his normal)", &mut out);
    let m = memo(ix, p, v, &s.without_row_pick());
    lap("situation's pass", &mut out);
    let sums = accumulate(ix, p, v, s);
    lap("sums from the pass", &mut out);
    let nm = METRICS.len();
    let rating_j = metric_index("rating");
    let parts: Vec<usize> = RATING_PARTS.iter().filter_map(|k| metric_index(k)).collect();
    let jobs: Vec<usize> = (0..nm).filter(|&j| (METRICS[j].stat != Stat::Count && Some(j) != rating_j) || parts.contains(&j)).collect();
    let mut fits = vec![None; nm];
    for &j in &jobs {
        fits[j] = fit(&sums, &normal, j);
        lap(&format!("fit {}", METRICS[j].key), &mut out);
    }
    let db = metric_index("dropbacks").unwrap_or(0);
    let qualified: Vec<bool> = sums.passers.values().map(|ps| ps.accs[db].n as u32 >= min_dropbacks.max(1)).collect();
    let ns = normals(&sums, &normal);
    let mut derived = vec![None; nm];
    for &j in &jobs {
        let post = posteriors(fits[j].as_ref(), &sums, &ns, j, &qualified);
        derived[j] = Some(post.iter().map(|x| x.as_ref().map(super::lift::Derived::from)).collect::<Vec<_>>());
    }
    lap("posteriors (qualified rows)", &mut out);
    let ranks = ranks_of(&derived, &qualified);
    std::hint::black_box(&ranks);
    lap("percentile ranks", &mut out);
    let mut scratch = CellSums::default();
    let mut baselines = vec![None; nm];
    let snap_var: Vec<f64> = (0..nm).map(|j| sums.league[j].mean().map(|p| p * (1.0 - p)).unwrap_or(1.0)).collect();
    let league_rating = rating_from(&sums.league);
    for ps in sums.passers.values() {
        if sums.cells_of(ix, s.group, ps, &mut scratch) {
            adjusted(&ix.layout, &sums, &ps.accs, &scratch, &snap_var, league_rating, &mut baselines);
            std::hint::black_box(&baselines);
        }
    }
    lap("state-mix baselines (every row)", &mut out);
    let by_season = seasons_of(ix, &m, &s.without_row_pick());
    let stab: Vec<_> = (0..nm).filter(|&j| METRICS[j].stat != Stat::Count).map(|j| stability(&by_season, j, min_dropbacks).r).collect();
    std::hint::black_box(&stab);
    lap("stability", &mut out);
    let opp = super::opponent::opponent_fit(ix, p, v, s);
    std::hint::black_box(&opp);
    lap("opponent adjustment", &mut out);
    out
}

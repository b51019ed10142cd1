//! "His normal": the every-snap sums for the seasons of a situation, so a
//! situation's other snaps are the every-snap sums minus its own. The pass
//! is memoised by the split index (the every-snap situation is one entry
//! of its memo, whatever the seasons, and its totals per season list are
//! kept beside it), so this costs a season filter once and a look-up after.

use super::index::SplitIndex;
use super::metrics::SnapValues;
use super::scan::{memo, totals, Sums};
use crate::plays::Plays;
use crate::situation::Situation;
use std::sync::Arc;

/// The every-snap sums over the seasons of `s` (all rows, no filter), per
/// row of the same grouping (passer, offense or defense):
/// per passer and league totals only, kept beside the every-snap pass per
/// season list.
pub(super) fn every_snap(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Arc<Sums> {
    let every = Situation { seasons: s.seasons.clone(), group: s.group, ..Situation::default() };
    let m = memo(ix, p, v, &every);
    m.derived(&format!("totals {:?}", s.seasons), || totals(ix, &m, &every))
}

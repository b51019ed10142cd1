//! "His normal": the every-snap sums for the seasons of a situation, so a
//! situation's other snaps are the every-snap sums minus its own. The pass
//! is memoised by the split index (the every-snap situation is one entry
//! of its memo, whatever the seasons), so this costs a season filter.

use super::index::SplitIndex;
use super::metrics::SnapValues;
use super::scan::{accumulate, Sums};
use crate::plays::Plays;
use crate::situation::Situation;

/// The every-snap sums over the seasons of `s` (all rows, no filter), per
/// row of the same grouping (passer, offense or defense).
pub(super) fn every_snap(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    let every = Situation { seasons: s.seasons.clone(), group: s.group, ..Situation::default() };
    accumulate(ix, p, v, &every)
}

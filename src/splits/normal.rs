//! "His normal": the every-snap sums for the seasons of a situation, so a
//! situation's other snaps are the every-snap sums minus its own. The pass
//! is memoised by the split index (the every-snap situation is one entry
//! of its memo, whatever the seasons), so this costs a season filter.

use super::index::SplitIndex;
use super::metrics::SnapValues;
use super::scan::{accumulate, Sums};
use crate::plays::Plays;
use crate::situation::Situation;

/// The every-snap sums over the seasons of `s` (all passers, no filter).
pub(super) fn every_snap(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    let every = Situation { seasons: s.seasons.clone(), ..Situation::default() };
    accumulate(ix, p, v, &every)
}

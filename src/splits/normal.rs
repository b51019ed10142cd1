//! "His normal": the every-snap sums for the seasons of a situation, so a
//! situation's other snaps are the every-snap sums minus its own. The
//! every-snap pass depends on no situation: the passers' is made with the
//! index (`SplitIndex::build`), the teams' when first asked, and both are
//! kept for the index's life (`SplitIndex::every`), with their totals per
//! season list beside them, so this costs a season filter once and a
//! look-up after.

use super::index::SplitIndex;
use super::memo::TOTALS;
use super::metrics::SnapValues;
use super::scan::{memo, totals, Sums};
use crate::plays::Plays;
use crate::situation::Situation;
use std::sync::Arc;

impl SplitIndex {
    /// Index the league `p` with its model values `v` (once per load): its
    /// columns (`SplitIndex::columns`), then the every-snap pass of the
    /// passer rows, every table's "his normal", and its totals over every
    /// season.
    pub fn build(p: &Plays, v: &SnapValues) -> SplitIndex {
        let ix = SplitIndex::columns(p, v);
        if !ix.is_empty() {
            drop(every_snap(&ix, p, v, &Situation::default()));
        }
        ix
    }
}

/// The every-snap sums over the seasons of `s` (all rows, no filter), per
/// row of the same grouping (passer, offense or defense):
/// per passer and league totals only, kept beside the every-snap pass per
/// season list.
pub(super) fn every_snap(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Arc<Sums> {
    let every = Situation { seasons: s.seasons.clone(), group: s.group, ..Situation::default() };
    let m = memo(ix, p, v, &every);
    m.derived(&format!("{TOTALS}{:?}", s.seasons), || totals(ix, &m, &every))
}

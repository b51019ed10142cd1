//! What the split index keeps of each situation's pass: the pass's sums
//! (`Memo`), what the estimates derive from them (`Memo::derived`), and the
//! bounded map of passes by situation (`MemoMap`).

use std::any::Any;
use std::collections::HashMap;
use std::sync::{Arc, Mutex};

/// A situation's pass over the index, its season filter aside: base sums
/// (see `Layout`) per unit-season (passer-, offense- or defense-season by
/// the grouping; "ps" below), per season × state cell and per
/// passer-season × state cell, and each passer-season's last snap.
pub(crate) struct Memo {
    pub(super) width: usize,
    /// `Layout::cell_width`: the width of `ps_cell_sums`' rows.
    pub(super) cell_width: usize,
    /// n_ps × width.
    pub(super) ps: Vec<f64>,
    /// n_seasons × CELLS × width.
    pub(super) season_cells: Vec<f64>,
    /// Nonzero (passer-season × CELLS + cell) keys, ascending, and their
    /// cell sums (`cell_width` each, `Layout::to_cell`): unit counts for
    /// the state-mix weights, sums for leaving a passer's own snaps out of
    /// the league's cell values.
    pub(super) ps_cell_keys: Vec<u32>,
    pub(super) ps_cell_sums: Vec<f64>,
    /// Per passer-season: (last snap + 1, its offense); 0 when none.
    pub(super) last: Vec<(u32, u16)>,
    /// Passer rows only (else empty): the nonzero (passer-season × teams +
    /// defense) keys, ascending, and the count, sum and sum of squares of
    /// `ADJUSTED_METRIC` over the pass's rows in each (`splits::opponent`).
    pub(super) opp_keys: Vec<u32>,
    pub(super) opp_sums: Vec<(f64, f64, f64)>,
    /// What the estimates derive from this pass and one more thing (a
    /// season list, a minimum), under keys their modules choose.
    pub(super) derived: Mutex<HashMap<String, Arc<dyn Any + Send + Sync>>>,
}

/// How many derived results one pass keeps before it starts over.
const DERIVED_SIZE: usize = 16;

impl Memo {
    /// The result under `key`, made by `make` when it is not kept yet (two
    /// callers at once may both make it; they make the same thing).
    pub(super) fn derived<T: Any + Send + Sync>(&self, key: &str, make: impl FnOnce() -> T) -> Arc<T> {
        if let Some(x) = self.derived.lock().ok().and_then(|d| d.get(key).cloned()).and_then(|a| a.downcast::<T>().ok()) {
            return x;
        }
        let x = Arc::new(make());
        if let Ok(mut d) = self.derived.lock() {
            if d.len() >= DERIVED_SIZE {
                d.clear();
            }
            d.insert(key.to_string(), x.clone());
        }
        x
    }
}

/// The start of the keys of the every-snap totals per season list
/// (`normal::every_snap`), which `SplitIndex::forget` keeps.
pub(super) const TOTALS: &str = "totals ";

impl Memo {
    /// Drop what was derived from this pass but the results whose key
    /// `keep` accepts.
    pub(super) fn forget_derived(&self, keep: impl Fn(&str) -> bool) {
        if let Ok(mut d) = self.derived.lock() {
            d.retain(|k, _| keep(k));
        }
    }

    /// Bytes its pass results hold (what it derives later is not counted).
    pub(super) fn bytes(&self) -> usize {
        use std::mem::size_of;
        size_of::<Memo>()
            + size_of::<f64>() * (self.ps.capacity() + self.season_cells.capacity() + self.ps_cell_sums.capacity())
            + size_of::<u32>() * self.ps_cell_keys.capacity()
            + size_of::<(u32, u16)>() * self.last.capacity()
            + size_of::<u32>() * self.opp_keys.capacity()
            + size_of::<(f64, f64, f64)>() * self.opp_sums.capacity()
    }
}

/// How many situations' passes the index keeps: past it, the pass used
/// least recently is let go.
pub(super) const MEMO_SIZE: usize = 16;

/// How many bytes of passes the index keeps: past it, the passes used
/// least recently are let go. (On 25 seasons a late-game window's pass
/// holds 1-13 MB, and a passer's profile reads the six late-game presets'
/// passes; the every-snap passes are kept outside the memo by the index,
/// 11.8 MiB for the passers', so the bound is 12 MiB below the 96 MiB it
/// was when the memo held them.)
pub(super) const MEMO_BYTES: usize = 84 << 20;

/// The index's memo of passes by key, bounded by `MEMO_SIZE` and by
/// `MEMO_BYTES` (the passes used least recently go first; the one just
/// added always stays; each pass weighs `Memo::bytes`).
pub(crate) type MemoMap = crate::bounded::Bounded<Arc<Memo>>;

/// An empty memo with the index's bounds.
pub(super) fn memo_map() -> MemoMap {
    MemoMap::new(MEMO_SIZE, MEMO_BYTES)
}

#[cfg(test)]
mod memo_tests {
    use super::*;

    /// A pass holding about `mb` MiB.
    fn pass_of(mb: usize) -> Arc<Memo> {
        Arc::new(Memo {
            width: 1,
            cell_width: 1,
            ps: vec![0.0; mb << 17],
            season_cells: Vec::new(),
            ps_cell_keys: Vec::new(),
            ps_cell_sums: Vec::new(),
            last: Vec::new(),
            opp_keys: Vec::new(),
            opp_sums: Vec::new(),
            derived: Default::default(),
        })
    }

    #[test]
    fn the_memo_lets_the_least_recently_used_passes_go_past_its_bytes() {
        let mut m = memo_map();
        // Three fit (a MiB left for each pass's own few bytes).
        let each = MEMO_BYTES / (3 << 20) - 1;
        for k in ["a", "b", "c"] {
            let p = pass_of(each);
            m.insert(k.to_string(), p.clone(), p.bytes());
        }
        assert_eq!(m.len(), 3);
        assert!(m.bytes() <= MEMO_BYTES);
        let _ = m.get("a");
        let p = pass_of(each);
        m.insert("d".to_string(), p.clone(), p.bytes());
        // "b" was used least recently; "a" was just read.
        assert!(m.get("b").is_none());
        assert!(m.get("a").is_some() && m.get("c").is_some() && m.get("d").is_some());
        assert!(m.bytes() <= MEMO_BYTES, "{} > {MEMO_BYTES}", m.bytes());
        assert_eq!(m.bytes(), ["a", "c", "d"].iter().map(|k| m.get(k).map_or(0, |p| p.bytes())).sum::<usize>());
        // A pass bigger than the whole budget stays alone; replacing a key
        // counts its bytes once.
        let p = pass_of(2 * MEMO_BYTES >> 20);
        m.insert("huge".to_string(), p.clone(), p.bytes());
        assert_eq!(m.len(), 1);
        let p = pass_of(1);
        m.insert("huge".to_string(), p.clone(), p.bytes());
        assert_eq!(m.bytes(), m.get("huge").map_or(0, |p| p.bytes()));
        m.clear();
        assert_eq!((m.len(), m.bytes()), (0, 0));
        // Past MEMO_SIZE passes the least recently used goes: pass 0 is
        // read along the way (as every table reads the every-snap pass), so
        // pass 1 goes first.
        for k in 0..=MEMO_SIZE {
            m.insert(k.to_string(), pass_of(0), 0);
            let _ = m.get("0");
        }
        assert_eq!(m.len(), MEMO_SIZE);
        assert!(m.get("0").is_some() && m.get("1").is_none() && m.get(&MEMO_SIZE.to_string()).is_some());
    }
}

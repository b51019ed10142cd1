//! The server's cache of split tables already computed, by view: bounded by
//! count and by an estimate of the bytes the tables hold; past either, the
//! tables used least recently go first.

use crate::splits::{Cell, PasserRow, SplitTable};
use std::mem::size_of;
use std::sync::Arc;

/// How many split tables the cache keeps at most.
pub const TABLES_AT_MOST: usize = 32;

/// How many bytes of split tables the cache keeps at most (a table of every
/// passer over 25 seasons holds several MB: a cell per metric per row).
pub const TABLE_BYTES: usize = 48 << 20;

/// About how many bytes a table holds (its rows and their cells; the
/// few vectors of the league row are left out).
pub fn table_bytes(t: &SplitTable) -> usize {
    let row = |r: &PasserRow| size_of::<PasserRow>() + r.passer.capacity() + r.team.capacity() + r.cells.capacity() * size_of::<Cell>();
    size_of::<SplitTable>() + t.situation.capacity() + t.rows.iter().map(row).sum::<usize>()
}

/// Split tables by key, least recently used first out, each weighing
/// `table_bytes`.
pub type TableCache = crate::bounded::Bounded<Arc<SplitTable>>;

/// An empty cache with the server's bounds.
pub fn table_cache() -> TableCache {
    TableCache::new(TABLES_AT_MOST, TABLE_BYTES)
}

/// Keep `t` under `key` in `c`, weighed by `table_bytes`.
pub fn keep(c: &mut TableCache, key: String, t: Arc<SplitTable>) {
    let size = table_bytes(&t);
    c.insert(key, t, size);
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::league::League;

    #[test]
    fn the_cache_keeps_its_bounds_and_the_tables_used_last() {
        let cache = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target/test-cache");
        let cfg = crate::league::LeagueConfig { cache_dir: Some(cache), ..crate::league::LeagueConfig::new(crate::league::demo_path()) };
        let league = League::open_with(&cfg).expect("demo league");
        let table = Arc::new(crate::splits::split_table(league.plays(), &league.values(), &crate::situation::Preset::EverySnap.situation(8), 20));
        let size = table_bytes(&table);
        let cells: usize = table.rows.iter().map(|r| r.cells.len()).sum();
        assert!(size >= cells * size_of::<Cell>() && cells > 100, "{size} bytes for {cells} cells");
        let mut c = table_cache();
        let fit = (TABLE_BYTES / size).min(TABLES_AT_MOST);
        assert!(fit >= 2, "a table of {size} bytes leaves the cache no room");
        for k in 0..fit {
            keep(&mut c, format!("t{k}"), table.clone());
        }
        assert_eq!(c.len(), fit);
        assert!(c.get("t0").is_some());
        keep(&mut c, "new".into(), table.clone());
        assert_eq!(c.len(), fit, "one went to make room");
        assert!(c.get("t1").is_none(), "the table used least recently went");
        assert!(c.get("t0").is_some() && c.get("new").is_some());
        assert!(c.bytes() <= TABLE_BYTES && c.bytes() == c.len() * size);
        c.clear();
        assert_eq!((c.len(), c.bytes()), (0, 0));
    }
}

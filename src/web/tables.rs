//! The server's cache of split tables already computed, by view: bounded by
//! count and by an estimate of the bytes the tables hold; past either, the
//! tables used least recently go first.

use crate::splits::{Cell, PasserRow, SplitTable};
use std::collections::HashMap;
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

/// Split tables by key, least recently used first out.
#[derive(Default)]
pub struct TableCache {
    map: HashMap<String, (Arc<SplitTable>, usize, u64)>,
    bytes: usize,
    tick: u64,
}

impl TableCache {
    /// The table under `key`, marked as just used.
    pub fn get(&mut self, key: &str) -> Option<Arc<SplitTable>> {
        self.tick += 1;
        let e = self.map.get_mut(key)?;
        e.2 = self.tick;
        Some(e.0.clone())
    }

    /// Keep `t` under `key`, then let the tables used least recently go
    /// until at most `TABLES_AT_MOST` and `TABLE_BYTES` are kept (the one
    /// just added always stays).
    pub fn insert(&mut self, key: String, t: Arc<SplitTable>) {
        self.tick += 1;
        let size = table_bytes(&t);
        if let Some((_, old, _)) = self.map.insert(key.clone(), (t, size, self.tick)) {
            self.bytes -= old;
        }
        self.bytes += size;
        while (self.bytes > TABLE_BYTES || self.map.len() > TABLES_AT_MOST) && self.map.len() > 1 {
            let Some(oldest) = self.map.iter().filter(|(k, _)| **k != key).min_by_key(|(_, e)| e.2).map(|(k, _)| k.clone()) else { break };
            if let Some((_, gone, _)) = self.map.remove(&oldest) {
                self.bytes -= gone;
            }
        }
    }

    pub fn clear(&mut self) {
        self.map.clear();
        self.bytes = 0;
    }

    pub fn len(&self) -> usize {
        self.map.len()
    }

    /// Bytes of the tables kept (as `table_bytes` counts them).
    pub fn bytes(&self) -> usize {
        self.bytes
    }
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
        let mut c = TableCache::default();
        let fit = (TABLE_BYTES / size).min(TABLES_AT_MOST);
        assert!(fit >= 2, "a table of {size} bytes leaves the cache no room");
        for k in 0..fit {
            c.insert(format!("t{k}"), table.clone());
        }
        assert_eq!(c.len(), fit);
        assert!(c.get("t0").is_some());
        c.insert("new".into(), table.clone());
        assert_eq!(c.len(), fit, "one went to make room");
        assert!(c.get("t1").is_none(), "the table used least recently went");
        assert!(c.get("t0").is_some() && c.get("new").is_some());
        assert!(c.bytes() <= TABLE_BYTES && c.bytes() == c.len() * size);
        c.clear();
        assert_eq!((c.len(), c.bytes()), (0, 0));
    }
}

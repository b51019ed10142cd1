//! A map by string key bounded by count and by bytes: past either bound the
//! entries used least recently go first (the one just added always stays).
//! The split index's memo of passes, the server's split tables and its
//! finished answers each keep one. Imports nothing from the crate.

use std::collections::HashMap;

/// Entries by key with their size in bytes and when they were last used.
pub struct Bounded<V> {
    map: HashMap<String, (V, usize, u64)>,
    bytes: usize,
    tick: u64,
    most: usize,
    budget: usize,
}

impl<V: Clone> Bounded<V> {
    /// At most `most` entries and `budget` bytes.
    pub fn new(most: usize, budget: usize) -> Bounded<V> {
        Bounded { map: HashMap::new(), bytes: 0, tick: 0, most, budget }
    }

    /// The entry under `key`, marked as just used.
    pub fn get(&mut self, key: &str) -> Option<V> {
        self.tick += 1;
        let e = self.map.get_mut(key)?;
        e.2 = self.tick;
        Some(e.0.clone())
    }

    /// Keep `v` (about `size` bytes) under `key`, then let the entries used
    /// least recently go until both bounds hold.
    pub fn insert(&mut self, key: String, v: V, size: usize) {
        self.tick += 1;
        self.bytes += size;
        if let Some((_, old, _)) = self.map.insert(key.clone(), (v, size, self.tick)) {
            self.bytes -= old;
        }
        while (self.bytes > self.budget || self.map.len() > self.most) && self.map.len() > 1 {
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

    pub fn is_empty(&self) -> bool {
        self.map.is_empty()
    }

    /// Bytes of the entries kept, as their sizes were given.
    pub fn bytes(&self) -> usize {
        self.bytes
    }
}

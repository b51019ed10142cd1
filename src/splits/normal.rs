//! "His normal": the every-snap sums for a set of seasons, computed once per
//! loaded league and season set and kept (a small cache of pure results), so
//! a situation's other snaps are the every-snap sums minus its own.

use super::metrics::SnapValues;
use super::scan::{accumulate, Sums};
use crate::plays::Plays;
use crate::situation::Situation;
use std::sync::{Arc, Mutex, OnceLock};

/// Entries kept (season sets in use at once: all, one season, a few ranges).
const KEEP: usize = 8;

/// What identifies a league's every-snap sums: where its columns live, their
/// length, a fingerprint of a sample of rows (a reloaded file at the same
/// address with other contents gets another key), and the seasons.
#[derive(Debug, Clone, PartialEq, Eq)]
struct Key {
    plays: usize,
    epa: usize,
    wp: usize,
    len: usize,
    stamp: u64,
    seasons: Option<Vec<i32>>,
}

fn stamp(p: &Plays, v: &SnapValues) -> u64 {
    // Every 61st row's passer, gain, season and EPA bits: cheap next to a pass.
    let mut h = 0xcbf2_9ce4_8422_2325u64;
    let mut mix = |x: u64| h = (h ^ x).wrapping_mul(0x100_0000_01b3);
    for i in (0..p.len()).step_by(61) {
        mix(p.passer[i] as u64);
        mix(p.gain[i] as u64);
        mix(p.season[i] as u64);
        mix(v.epa.get(i).map(|e| e.to_bits()).unwrap_or(0));
        mix(v.wpa.get(i).map(|e| e.to_bits()).unwrap_or(0));
    }
    h
}

type Memo = Mutex<Vec<(Key, Arc<Sums>)>>;

fn memo() -> &'static Memo {
    static MEMO: OnceLock<Memo> = OnceLock::new();
    MEMO.get_or_init(|| Mutex::new(Vec::new()))
}

/// The every-snap sums over the seasons of `s` (all passers, no filter).
pub(super) fn every_snap(p: &Plays, v: &SnapValues, s: &Situation) -> Arc<Sums> {
    let key = Key {
        plays: p as *const Plays as usize,
        epa: v.epa.as_ptr() as usize,
        wp: v.wp.as_ptr() as usize,
        len: p.len(),
        stamp: stamp(p, v),
        seasons: s.seasons.clone(),
    };
    if let Ok(m) = memo().lock() {
        if let Some((_, sums)) = m.iter().find(|(k, _)| *k == key) {
            return sums.clone();
        }
    }
    let every = Situation { seasons: s.seasons.clone(), ..Situation::default() };
    let sums = Arc::new(accumulate(p, v, &every));
    if let Ok(mut m) = memo().lock() {
        if !m.iter().any(|(k, _)| *k == key) {
            if m.len() >= KEEP {
                m.remove(0);
            }
            m.push((key, sums.clone()));
        }
    }
    sums
}

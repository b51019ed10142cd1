//! Which rows of the split index a situation keeps (`Plan`), and the key
//! its pass is kept under (`memo_key`).

use super::index::{SplitIndex, CHUNK};
use super::metrics::SnapValues;
use crate::plays::Plays;
use crate::situation::{Group, Range, Situation, OT};

/// The rows a situation (its season and passer filters aside) keeps: row
/// ranges from the clock windows, the filters the index holds checked on
/// its columns, and `Situation::matches` on what is left over.
pub(super) struct Plan {
    pub(super) ranges: Vec<std::ops::Range<usize>>,
    margin: Option<Range>,
    downs: Option<Vec<i32>>,
    to_go: Option<Range>,
    ball_on: Option<Range>,
    game_secs: Vec<Option<Range>>,
    /// The filters the index does not hold; None when there are none.
    rest: Option<Situation>,
}

/// `s` without the filters the index holds (and without seasons and
/// passer, which the pass leaves to its caller).
fn leftover(s: &Situation) -> Situation {
    Situation {
        preset: None,
        one_score: 8,
        periods: None,
        half_secs: None,
        game_secs: None,
        margin: None,
        downs: None,
        to_go: None,
        ball_on: None,
        seasons: None,
        passer: passer_filter(s),
        group: Group::Passer,
        ..s.clone()
    }
}

/// The passer filter as a filter on snaps: none when the rows are passers
/// (it picks the row shown, left to the caller); kept when they are teams
/// (a defense's numbers against one passer).
fn passer_filter(s: &Situation) -> Option<String> {
    if s.group == Group::Passer {
        None
    } else {
        s.passer.clone()
    }
}

/// The key of a situation's pass: everything but seasons and (when the
/// rows are passers) the passer; the grouping is part of it (its sums are
/// per unit of the grouping).
pub(super) fn memo_key(s: &Situation) -> String {
    format!("{:?}", Situation { preset: None, one_score: 8, seasons: None, passer: passer_filter(s), ..s.clone() })
}

impl Plan {
    pub(super) fn new(ix: &SplitIndex, s: &Situation) -> Plan {
        let rest = leftover(s);
        let rest = (rest != Situation::default()).then_some(rest);
        let mut ranges = Vec::new();
        let mut game_secs = Vec::new();
        for (b, (g, rows)) in ix.blocks.iter().enumerate() {
            if s.periods.as_ref().is_some_and(|ps| !ps.contains(g)) {
                continue;
            }
            // Seconds left in the half: a range of rows.
            let mut lo = s.half_secs.and_then(|r| r.lo).map_or(f64::NEG_INFINITY, |x| x);
            let mut hi = s.half_secs.and_then(|r| r.hi).map_or(f64::INFINITY, |x| x);
            let mut check_game = None;
            if *g < OT {
                if let Some(r) = s.game_secs {
                    match ix.game_offset[b] {
                        Some(off) => {
                            lo = lo.max(r.lo.map_or(f64::NEG_INFINITY, |x| x - off as f64));
                            hi = hi.min(r.hi.map_or(f64::INFINITY, |x| x - off as f64));
                        }
                        None => check_game = Some(r),
                    }
                }
            }
            let secs = &ix.secs_half[rows.clone()];
            let a = rows.start + secs.partition_point(|&x| (x as f64) < lo);
            let z = rows.start + secs.partition_point(|&x| (x as f64) <= hi);
            if a < z {
                ranges.push(a..z);
                game_secs.push(check_game);
            }
        }
        Plan { ranges, margin: s.margin, downs: s.downs.clone(), to_go: s.to_go, ball_on: s.ball_on, game_secs, rest }
    }

    /// Does row `r` of range number `k` belong?
    #[inline]
    pub(super) fn keeps(&self, ix: &SplitIndex, p: &Plays, v: &SnapValues, k: usize, r: usize) -> bool {
        let within = |range: &Option<Range>, x: i32| range.as_ref().is_none_or(|q| q.contains(x as f64));
        within(&self.game_secs[k], ix.secs_game[r])
            && within(&self.margin, ix.margin[r])
            && self.downs.as_ref().is_none_or(|d| d.contains(&ix.down[r]))
            && (self.to_go.is_none() || (ix.down[r] != 0 && within(&self.to_go, ix.to_go[r])))
            && within(&self.ball_on, ix.ball_on[r])
            && self.rest.as_ref().is_none_or(|s| s.matches(p, v.wp, ix.snap[r] as usize))
    }

    /// The ranges cut into pieces of at most `CHUNK` rows, in row order.
    pub(super) fn pieces(&self) -> Vec<Vec<(usize, std::ops::Range<usize>)>> {
        let mut out = vec![Vec::new()];
        let mut room = CHUNK;
        for (k, r) in self.ranges.iter().enumerate() {
            let mut a = r.start;
            while a < r.end {
                if room == 0 {
                    out.push(Vec::new());
                    room = CHUNK;
                }
                let z = (a + room).min(r.end);
                if let Some(last) = out.last_mut() {
                    last.push((k, a..z));
                }
                room -= z - a;
                a = z;
            }
        }
        out
    }
}

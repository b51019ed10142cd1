//! The slow, obviously correct twin of the split engine: sums row by row
//! with `Situation::matches`, no index, no memo; and a property test that
//! asks both for the same random situations × groupings (passer, offense,
//! defense; fixed seed) on a simulated league: counts must agree exactly,
//! sums within 1e-9 (relative).

use super::index::SplitIndex;
use super::metrics::{cell, contributions, SnapValues, CELLS, METRICS};
use super::scan::{accumulate_seasons, Acc, Accs, CellSums, PasserSums, Sums};
use crate::plays::{Plays, Source, NO_PASSER};
use crate::situation::{Group, Preset, Range, Site, Situation, OT, RESULTS};
use std::collections::BTreeMap;

fn new_accs() -> Accs {
    vec![Acc::default(); METRICS.len()]
}

/// A passer's count of snaps and sum of values per state cell, per metric
/// (CELLS × metrics each).
type DenseCells = BTreeMap<u32, (Vec<f64>, Vec<f64>)>;

/// Every snap in order: the obvious pass. A row is the snap's passer, its
/// offense or its defense, by the grouping; the filter naming a row
/// (passer, offense or opponent by the grouping) does not pick snaps.
fn reference(p: &Plays, v: &SnapValues, s: &Situation) -> (Sums, DenseCells) {
    let nm = METRICS.len();
    let unseasoned = s.with_seasons(None).without_row_pick();
    let mut out = Sums::empty();
    let mut cells = DenseCells::new();
    let mut vals = vec![0.0; nm];
    for i in 0..p.len() {
        if !p.dropback[i] || p.passer[i] == NO_PASSER || !unseasoned.matches(p, v.wp, i) {
            continue;
        }
        let season = p.season[i];
        let (who, team) = match s.group {
            Group::Passer => (p.passer[i], p.offense[i]),
            Group::Offense => (p.offense[i] as u32, p.offense[i]),
            Group::Defense => (p.defense[i] as u32, p.defense[i]),
        };
        let mask = contributions(p, v, i, &mut vals);
        for j in 0..nm {
            if mask & (1 << j) != 0 {
                out.by_season.entry((who, season)).or_insert_with(new_accs)[j].add(vals[j]);
                out.league_by_season.entry(season).or_insert_with(new_accs)[j].add(vals[j]);
            }
        }
        // Touch the entries even when no metric counts the snap.
        out.by_season.entry((who, season)).or_insert_with(new_accs);
        out.league_by_season.entry(season).or_insert_with(new_accs);
        if s.seasons.as_ref().is_some_and(|ss| !ss.contains(&season)) {
            continue;
        }
        let c = cell(p, i);
        let ps = out.passers.entry(who).or_insert_with(|| PasserSums { accs: new_accs(), cell_span: 0..0, team: 0 });
        let (pc, cs) = cells.entry(who).or_insert_with(|| (vec![0.0; CELLS * nm], vec![0.0; CELLS * nm]));
        ps.team = team;
        for j in 0..nm {
            if mask & (1 << j) != 0 {
                ps.accs[j].add(vals[j]);
                out.league[j].add(vals[j]);
                out.league_cells[c * nm + j].add(vals[j]);
                pc[c * nm + j] += 1.0;
                cs[c * nm + j] += vals[j];
            }
        }
    }
    (out, cells)
}

/// The fast sums' cells per passer, read back as the reference keeps them.
fn dense_cells(ix: &SplitIndex, group: Group, fast: &Sums) -> DenseCells {
    let nm = METRICS.len();
    let mut scratch = CellSums::default();
    fast.passers
        .iter()
        .map(|(&who, ps)| {
            let (mut pc, mut cs) = (vec![0.0; CELLS * nm], vec![0.0; CELLS * nm]);
            assert!(fast.cells_of(ix, group, ps, &mut scratch), "the table's sums carry cells");
            for c in (0..CELLS).filter(|c| scratch.mask >> c & 1 == 1) {
                for j in 0..nm {
                    let (n, sum) = ix.layout.cell_acc(&scratch.base[c * scratch.width..][..scratch.width], j);
                    pc[c * nm + j] = n;
                    cs[c * nm + j] = sum;
                }
            }
            (who, (pc, cs))
        })
        .collect()
}

fn close(a: f64, b: f64) -> bool {
    (a.is_nan() && b.is_nan()) || (a - b).abs() <= 1e-9 * a.abs().max(b.abs()).max(1.0)
}

fn same_accs(what: &str, a: &[Acc], b: &[Acc]) -> Result<(), String> {
    for (j, (x, y)) in a.iter().zip(b).enumerate() {
        if x.n != y.n || !close(x.sum, y.sum) || !close(x.sumsq, y.sumsq) {
            return Err(format!("{what}, {}: fast {x:?}, reference {y:?}", METRICS[j].key));
        }
    }
    Ok(())
}

fn same(ix: &SplitIndex, group: Group, fast: &Sums, slow: &(Sums, DenseCells)) -> Result<(), String> {
    let (slow, slow_cells) = slow;
    if fast.passers.keys().ne(slow.passers.keys()) {
        return Err(format!("passers differ: fast {}, reference {}", fast.passers.len(), slow.passers.len()));
    }
    let fast_cells = dense_cells(ix, group, fast);
    for ((who, f), s) in fast.passers.iter().zip(slow.passers.values()) {
        same_accs(&format!("passer {who}"), &f.accs, &s.accs)?;
        let ((fc, fs), (sc, ss)) = (&fast_cells[who], &slow_cells[who]);
        if fc != sc {
            return Err(format!("passer {who}: cell counts differ"));
        }
        for (k, (a, b)) in fs.iter().zip(ss).enumerate() {
            if (a - b).abs() > 1e-9 * b.abs().max(1.0) {
                return Err(format!("passer {who}: cell sum {k} is {a}, reference {b}"));
            }
        }
        if f.team != s.team {
            return Err(format!("passer {who}: team {} vs {}", f.team, s.team));
        }
    }
    same_accs("league", &fast.league, &slow.league)?;
    same_accs("league cells", &fast.league_cells, &slow.league_cells)?;
    let mut fk: Vec<_> = fast.by_season.keys().collect();
    let mut sk: Vec<_> = slow.by_season.keys().collect();
    fk.sort();
    sk.sort();
    if fk != sk {
        return Err(format!("passer-seasons differ: fast {}, reference {}", fk.len(), sk.len()));
    }
    for (k, f) in &fast.by_season {
        same_accs(&format!("passer-season {k:?}"), f, &slow.by_season[k])?;
    }
    if fast.league_by_season.keys().ne(slow.league_by_season.keys()) {
        return Err("league seasons differ".into());
    }
    for (k, f) in &fast.league_by_season {
        same_accs(&format!("league season {k}"), f, &slow.league_by_season[k])?;
    }
    Ok(())
}

/// splitmix64: a fixed-seed stream for the random situations.
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    fn below(&mut self, n: u64) -> u64 {
        self.next() % n.max(1)
    }
    fn chance(&mut self, k: u64) -> bool {
        self.below(k) == 0
    }
    fn unit(&mut self) -> f64 {
        (self.next() >> 11) as f64 / (1u64 << 53) as f64
    }
    fn range(&mut self, lo: i32, hi: i32) -> Range {
        let a = lo + self.below((hi - lo + 1) as u64) as i32;
        let b = lo + self.below((hi - lo + 1) as u64) as i32;
        let (a, b) = (a.min(b), a.max(b));
        match self.below(3) {
            0 => Range::new(Some(a as f64), None),
            1 => Range::new(None, Some(b as f64)),
            _ => Range::new(Some(a as f64), Some(b as f64)),
        }
    }
    fn subset(&mut self, from: &[i32]) -> Vec<i32> {
        let v: Vec<i32> = from.iter().copied().filter(|_| self.chance(2)).collect();
        if v.is_empty() {
            vec![from[self.below(from.len() as u64) as usize]]
        } else {
            v
        }
    }
}

fn random_situation(r: &mut Rng, p: &Plays) -> Situation {
    let preset = Preset::ALL[r.below(Preset::ALL.len() as u64) as usize];
    let mut s = preset.situation(if r.chance(2) { 7 } else { 8 });
    let seasons = p.seasons();
    if r.chance(2) {
        s.seasons = Some(r.subset(&seasons));
    }
    if r.chance(4) {
        s.periods = Some(r.subset(&[1, 2, 3, 4, OT]));
    }
    if r.chance(4) {
        s.half_secs = Some(r.range(0, 1800));
    }
    if r.chance(4) {
        s.game_secs = Some(r.range(0, 3600));
    }
    if r.chance(4) {
        s.margin = Some(r.range(-21, 21));
    }
    if r.chance(4) {
        s.downs = Some(r.subset(&[1, 2, 3, 4]));
    }
    if r.chance(5) {
        s.to_go = Some(r.range(1, 20));
    }
    if r.chance(5) {
        s.ball_on = Some(r.range(1, 99));
    }
    if r.chance(6) {
        let (a, b) = (r.unit(), r.unit());
        s.wp = Some(Range::new(Some(a.min(b)), Some(a.max(b))));
    }
    if r.chance(6) {
        s.off_timeouts = Some(r.range(0, 3));
    }
    if r.chance(8) {
        s.def_timeouts = Some(r.range(0, 3));
    }
    if r.chance(6) {
        s.weeks = Some(r.range(1, 18));
    }
    if r.chance(8) {
        s.site = Some(if r.chance(2) { Site::Home } else { Site::Away });
    }
    if r.chance(8) {
        s.offense = Some(p.teams[r.below(p.teams.len() as u64) as usize].to_ascii_lowercase());
    }
    if r.chance(8) {
        s.opponent = Some(p.teams[r.below(p.teams.len() as u64) as usize].clone());
    }
    if r.chance(6) {
        s.passer = Some(p.passers[r.below(p.passers.len() as u64) as usize].clone());
    }
    if r.chance(8) {
        s.results = Some(vec![RESULTS[r.below(RESULTS.len() as u64) as usize].0]);
    }
    s.group = Group::ALL[r.below(3) as usize];
    s
}

/// Four simulated seasons with seeded model values (some completion
/// probabilities missing, as on snaps without air yards).
fn league() -> (Plays, Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>, ThrowCols) {
    let out = crate::sim::simulate(&crate::sim::SimConfig { seasons: 4, seed: 11, first_season: 2030 });
    let sources = (0..out.rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    let p = Plays::from_rows(vec!["sim".into()], &out.rows, sources);
    let mut r = Rng(5);
    let n = p.len();
    let epa = (0..n).map(|_| r.unit() * 8.0 - 4.0).collect();
    let wp = (0..n).map(|_| r.unit()).collect();
    let wpa = (0..n).map(|_| r.unit() * 0.4 - 0.2).collect();
    let cp = (0..n).map(|_| if r.chance(10) { f64::NAN } else { r.unit() }).collect();
    // Throw values on most passes (NaN elsewhere, as the model leaves them).
    let throw = (0..n).map(|_| if r.chance(4) { [f64::NAN; 3] } else { [r.unit() * 0.1 - 0.05, r.unit() * 0.2 - 0.1, r.unit()] }).collect();
    (p, epa, wp, wpa, cp, throw)
}

/// The per-snap values of the test league, the throw values split out.
fn values<'a>(epa: &'a [f64], wp: &'a [f64], wpa: &'a [f64], cp: &'a [f64], throw: &'a ThrowCols) -> SnapValues<'a> {
    SnapValues { epa, wp, wpa, cp, choice: &throw.0, execution: &throw.1, league_sticks: &throw.2 }
}

/// Choice, execution and the league's past-the-sticks share per snap.
struct ThrowCols(Vec<f64>, Vec<f64>, Vec<f64>);

impl FromIterator<[f64; 3]> for ThrowCols {
    fn from_iter<I: IntoIterator<Item = [f64; 3]>>(it: I) -> ThrowCols {
        let mut out = ThrowCols(Vec::new(), Vec::new(), Vec::new());
        for [a, b, c] in it {
            out.0.push(a);
            out.1.push(b);
            out.2.push(c);
        }
        out
    }
}

#[test]
fn the_index_agrees_with_the_row_by_row_pass_on_random_situations() {
    let (p, epa, wp, wpa, cp, throw) = league();
    let v = values(&epa, &wp, &wpa, &cp, &throw);
    let ix = SplitIndex::build(&p, &v);
    assert!(ix.fits(&p) && !ix.is_empty());
    let mut r = Rng(2031);
    let mut nonempty = 0;
    let mut groups = [0usize; 3];
    for case in 0..300 {
        let s = random_situation(&mut r, &p);
        let slow = reference(&p, &v, &s);
        // Every other case from a fresh memo, the rest from whatever the
        // earlier cases left (the memo must not change the answer).
        if case % 2 == 0 {
            ix.forget();
        }
        let fast = accumulate_seasons(&ix, &p, &v, &s);
        if let Err(e) = same(&ix, s.group, &fast, &slow) {
            panic!("case {case}: {s:?}\n{e}");
        }
        nonempty += usize::from(!slow.0.passers.is_empty());
        groups[s.group as usize] += usize::from(!slow.0.passers.is_empty());
    }
    // The random situations must not all be empty (a test that cannot fail),
    // and every grouping must have been asked.
    assert!(nonempty > 150, "only {nonempty} of 300 situations kept a snap");
    assert!(groups.iter().all(|&n| n > 50), "groupings asked: {groups:?}");
}

#[test]
fn every_preset_and_season_agrees_with_the_row_by_row_pass() {
    let (p, epa, wp, wpa, cp, throw) = league();
    let v = values(&epa, &wp, &wpa, &cp, &throw);
    let ix = SplitIndex::build(&p, &v);
    for preset in Preset::ALL {
        for one_score in [7, 8] {
            for seasons in std::iter::once(None).chain(p.seasons().into_iter().map(|y| Some(vec![y]))) {
                for group in Group::ALL {
                    let s = Situation { seasons: seasons.clone(), group, ..preset.situation(one_score) };
                    if let Err(e) = same(&ix, group, &accumulate_seasons(&ix, &p, &v, &s), &reference(&p, &v, &s)) {
                        panic!("{s:?}\n{e}");
                    }
                }
            }
        }
    }
}

#[test]
fn the_epa_distribution_agrees_with_the_row_by_row_count() {
    let (p, epa, wp, wpa, cp, throw) = league();
    let v = values(&epa, &wp, &wpa, &cp, &throw);
    let ix = SplitIndex::build(&p, &v);
    let mut r = Rng(77);
    for _ in 0..40 {
        let s = random_situation(&mut r, &p);
        let who = p.passers[r.below(p.passers.len() as u64) as usize].clone();
        let fast = super::profile::epa_distribution_in(&ix, &p, &v, &s, &who);
        let (mut mine, mut all) = (0usize, 0usize);
        for i in 0..p.len() {
            if p.dropback[i] && p.passer[i] != NO_PASSER && s.matches(&p, v.wp, i) {
                all += 1;
                mine += usize::from(p.passer_name(i) == Some(who.as_str()));
            }
        }
        assert_eq!((fast.passer_n, fast.league_n), (mine, all), "{s:?}");
    }
}

/// The opponent model's cells from a situation's pass (`memo_cells`) are
/// those of its own pass over the rows (`cells`), bit for bit, on random
/// situations of passer rows, with and without a memo.
#[test]
fn the_passes_opponent_sums_are_the_opponent_models_own() {
    let (p, epa, wp, wpa, cp, throw) = league();
    let v = values(&epa, &wp, &wpa, &cp, &throw);
    let ix = SplitIndex::build(&p, &v);
    let j = super::metrics::metric_index(super::metrics::ADJUSTED_METRIC).expect("the adjusted metric");
    let mut r = Rng(4417);
    let mut nonempty = 0;
    for case in 0..120 {
        let s = Situation { group: Group::Passer, ..random_situation(&mut r, &p) };
        if case % 2 == 0 {
            ix.forget();
        }
        let own = super::opponent::cells(&ix, &p, &v, &s, j);
        assert_eq!(super::opponent::memo_cells(&ix, &p, &v, &s), own, "case {case}: {s:?}");
        nonempty += usize::from(!own.is_empty());
    }
    // Every snap, every season list.
    for seasons in std::iter::once(None).chain(p.seasons().into_iter().map(|y| Some(vec![y]))) {
        let s = Situation { seasons, ..Situation::default() };
        assert_eq!(super::opponent::memo_cells(&ix, &p, &v, &s), super::opponent::cells(&ix, &p, &v, &s, j), "{s:?}");
    }
    assert!(nonempty > 60, "only {nonempty} of 120 situations had a cell");
}

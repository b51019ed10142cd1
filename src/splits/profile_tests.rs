//! One passer's row alone (`split_row_in`) against his row of the whole
//! table, and the profile and EPA distribution built from such parts.

use super::cell::{Cell, PasserRow};
use super::index::SplitIndex;
use super::profile::{epa_distribution_in, profile_in};
use super::table::{split_row_in, split_table_in, SplitTable};
use crate::league::{demo_path, League, LeagueConfig};
use crate::situation::{Preset, Situation};

fn demo() -> League {
    let cache = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target/test-cache");
    League::open_with(&LeagueConfig { cache_dir: Some(cache), ..LeagueConfig::new(demo_path()) }).expect("demo league")
}

fn close(a: Option<f64>, b: Option<f64>) -> bool {
    match (a, b) {
        (Some(x), Some(y)) => x == y || (x - y).abs() <= 1e-12 * x.abs().max(1.0),
        (None, None) => true,
        _ => false,
    }
}

fn same_cell(a: &Cell, b: &Cell) -> Result<(), String> {
    let pairs = [
        ("value", a.value, b.value),
        ("n", Some(a.n), Some(b.n)),
        ("league", a.league, b.league),
        ("diff", a.diff, b.diff),
        ("adjusted_league", a.adjusted_league, b.adjusted_league),
        ("adjusted_diff", a.adjusted_diff, b.adjusted_diff),
        ("adjusted_diff_lo", a.adjusted_diff_lo, b.adjusted_diff_lo),
        ("adjusted_diff_hi", a.adjusted_diff_hi, b.adjusted_diff_hi),
        ("estimate", a.estimate, b.estimate),
        ("lo", a.lo, b.lo),
        ("hi", a.hi, b.hi),
        ("signal", a.signal, b.signal),
        ("normal", a.normal, b.normal),
        ("lift", a.lift, b.lift),
        ("lift_lo", a.lift_lo, b.lift_lo),
        ("lift_hi", a.lift_hi, b.lift_hi),
        ("lift_signal", a.lift_signal, b.lift_signal),
        ("percentile", a.percentile, b.percentile),
        ("p_better", a.p_better, b.p_better),
    ];
    match pairs.iter().find(|(_, x, y)| !close(*x, *y)) {
        Some((what, x, y)) => Err(format!("{} {what}: {x:?} alone, {y:?} in the table", a.key)),
        None => Ok(()),
    }
}

fn same_row(a: &PasserRow, b: &PasserRow) -> Result<(), String> {
    if (&a.passer, &a.team, a.qualified, a.dropbacks) != (&b.passer, &b.team, b.qualified, b.dropbacks) || a.cells.len() != b.cells.len() {
        return Err(format!("{} {} {} {} alone, {} {} {} {} in the table", a.passer, a.team, a.qualified, a.dropbacks, b.passer, b.team, b.qualified, b.dropbacks));
    }
    for (k, x, y) in [("opp adj", a.epa_opp_adj, b.epa_opp_adj), ("opp lo", a.epa_opp_adj_lo, b.epa_opp_adj_lo), ("opp hi", a.epa_opp_adj_hi, b.epa_opp_adj_hi), ("faced", a.epa_opp_faced, b.epa_opp_faced)] {
        if !close(x, y) {
            return Err(format!("{k}: {x:?} alone, {y:?} in the table"));
        }
    }
    a.cells.iter().zip(&b.cells).try_for_each(|(x, y)| same_cell(x, y))
}

#[test]
fn one_passers_row_alone_is_his_row_of_the_whole_table() {
    let league = demo();
    let (p, v) = (league.plays(), league.values());
    let probe = SplitIndex::build(p, &v);
    let every = split_table_in(&probe, p, &v, &Preset::EverySnap.situation(8), 20, None);
    let q: Vec<&PasserRow> = every.qualified().collect();
    let short = every.rows.iter().find(|r| !r.qualified).expect("a passer short of 20 dropbacks");
    // A passer with no dropback at all in the end-of-game window.
    let late = split_table_in(&probe, p, &v, &Preset::EndOfGame.situation(8), 20, None);
    let absent = p.passers.iter().find(|n| late.row(n).is_none()).expect("a passer never in the end-of-game window");
    let mut names: Vec<String> = vec![q[0].passer.clone(), q[q.len() / 2].passer.clone(), q[q.len() - 1].passer.clone(), short.passer.clone(), absent.clone()];
    names.dedup();
    let latest = p.seasons().last().copied();
    // Rows first on a fresh index (the ranks made from the qualified
    // passers' estimates alone), then the whole tables.
    let ix = SplitIndex::build(p, &v);
    let (mut compared, mut ranked, mut missing) = (0, 0, 0);
    for seasons in [None, latest.map(|y| vec![y])] {
        for preset in Preset::ALL {
            let s = Situation { seasons: seasons.clone(), ..preset.situation(8) };
            let alone: Vec<_> = names.iter().map(|n| split_row_in(&ix, p, &v, &s, 20, n)).collect();
            for (n, a) in names.iter().zip(&alone) {
                let t: SplitTable = split_table_in(&ix, p, &v, &s, 20, Some(n));
                assert_eq!(a.league_dropbacks, t.league_dropbacks);
                assert_eq!(a.qualified, t.qualified().count(), "{s:?}");
                assert!(a.league.iter().zip(&t.league).all(|(x, y)| close(*x, *y)) && a.league_lift.iter().zip(&t.league_lift).all(|(x, y)| close(*x, *y)));
                assert!(a.metrics.iter().zip(&t.metrics).all(|(x, y)| x.key == y.key && close(x.stability, y.stability)));
                match (&a.row, t.row(n)) {
                    (Some(x), Some(y)) => {
                        if let Err(e) = same_row(x, y) {
                            panic!("{n} in {s:?}: {e}");
                        }
                        compared += 1;
                        ranked += usize::from(x.cells.iter().any(|c| c.percentile.is_some()));
                    }
                    (None, None) => missing += 1,
                    (x, y) => panic!("{n} in {s:?}: row alone {}, in the table {}", x.is_some(), y.is_some()),
                }
            }
            // Asked again (the ranks now kept): the same row.
            let again = split_row_in(&ix, p, &v, &s, 20, &names[1]);
            if let (Some(x), Some(y)) = (&again.row, &alone[1].row) {
                same_row(x, y).unwrap_or_else(|e| panic!("asked again: {e}"));
            }
        }
    }
    assert!(compared >= 25 && ranked >= 25 && missing >= 2, "{compared} rows compared, {ranked} ranked, {missing} missing");
    // The short passer has estimates (he is our passer) but no rank of his
    // own among the qualified, and his percentile still places him.
    let s = Preset::EverySnap.situation(8);
    let r = split_row_in(&ix, p, &v, &s, 20, &short.passer).row.expect("his row");
    assert!(!r.qualified && r.cells.iter().any(|c| c.estimate.is_some() && c.percentile.is_some()));
    // The profile is made of these rows.
    let prof = profile_in(&ix, p, &v, &names[0], &Situation::default(), &Preset::EndOfGame.situation(8), 20).expect("profile");
    for line in &prof.presets {
        let preset = Preset::parse(line.preset).expect("a preset key");
        let t = split_table_in(&ix, p, &v, &preset.situation(8), 20, Some(&names[0]));
        same_row(line.row.as_ref().expect("his row"), t.row(&names[0]).expect("in the table")).unwrap_or_else(|e| panic!("{}: {e}", line.preset));
        assert_eq!(line.qualified_passers, t.qualified().count());
    }
    // Its headings are the first preset's, stability and all; a row made
    // without stability is the same row, on a fresh index (nothing kept).
    let first = split_table_in(&ix, p, &v, &Preset::ALL[0].situation(8), 20, Some(&names[0]));
    assert!(first.metrics.iter().any(|m| m.stability.is_some()));
    assert!(prof.metrics.iter().zip(&first.metrics).all(|(x, y)| x.key == y.key && close(x.stability, y.stability) && close(x.stability_lo, y.stability_lo)));
    let fresh = SplitIndex::build(p, &v);
    let s = Preset::TwoMinuteDrill.situation(8);
    let lean = super::table::row_in(&fresh, p, &v, &s, 20, &names[0], false);
    assert!(lean.metrics.iter().all(|m| m.stability.is_none() && m.stability_pairs == 0));
    let full = split_row_in(&ix, p, &v, &s, 20, &names[0]);
    assert!(full.metrics.iter().any(|m| m.stability.is_some()));
    same_row(lean.row.as_ref().expect("his row"), full.row.as_ref().expect("his row")).unwrap_or_else(|e| panic!("without stability: {e}"));
}

#[test]
fn the_epa_distribution_kept_per_situation_is_a_plain_count() {
    let league = demo();
    let (p, v) = (league.plays(), league.values());
    let ix = SplitIndex::build(p, &v);
    let s = Preset::EndOfGame.situation(8);
    let table = split_table_in(&ix, p, &v, &s, 20, None);
    let (a, b) = (&table.rows[0].passer, &table.rows[1].passer);
    let first = epa_distribution_in(&ix, p, &v, &s, a);
    let second = epa_distribution_in(&ix, p, &v, &s, b);
    assert_eq!(first.league, second.league);
    // By hand: every dropback with a passer in the window, binned.
    let bin = |e: f64| (((e + 4.0) / 0.5).floor().max(0.0) as usize).min(15);
    let (mut all, mut mine) = (vec![0usize; 16], vec![0usize; 16]);
    for i in 0..p.len() {
        if p.dropback[i] && p.passer[i] != crate::plays::NO_PASSER && s.matches(p, v.wp, i) {
            all[bin(v.epa[i])] += 1;
            if p.passer_name(i) == Some(b.as_str()) {
                mine[bin(v.epa[i])] += 1;
            }
        }
    }
    let (na, nm) = (all.iter().sum::<usize>(), mine.iter().sum::<usize>());
    assert_eq!((second.league_n, second.passer_n), (na, nm));
    assert!(nm > 0 && nm < na);
    for k in 0..16 {
        assert!((second.league[k] - all[k] as f64 / na as f64).abs() < 1e-15);
        assert!((second.passer[k] - mine[k] as f64 / nm as f64).abs() < 1e-15);
    }
    assert_eq!(second.passer_n as u32, table.rows[1].dropbacks);
}

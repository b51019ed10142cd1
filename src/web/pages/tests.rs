//! The pages' view-model builders, called without HTTP on a small seeded
//! league (`models::testkit`) with made-up per-snap values.

use super::*;
use crate::models::testkit;
use crate::plays::Plays;
use crate::splits::SnapValues;

struct Fixture {
    plays: Plays,
    epa: Vec<f64>,
    wp: Vec<f64>,
    wpa: Vec<f64>,
    cp: Vec<f64>,
}

impl Fixture {
    fn new() -> Fixture {
        let plays = testkit::league(240, 2, 11);
        let n = plays.len();
        // Values that vary by snap, so the tables have spread.
        let epa: Vec<f64> = (0..n).map(|i| ((i * 37) % 23) as f64 / 10.0 - 1.1).collect();
        let wp: Vec<f64> = (0..n).map(|i| ((i * 13) % 97) as f64 / 100.0 + 0.005).collect();
        let wpa: Vec<f64> = (0..n).map(|i| ((i * 7) % 11) as f64 / 100.0 - 0.05).collect();
        let cp: Vec<f64> = vec![0.62; n];
        Fixture { plays, epa, wp, wpa, cp }
    }
    fn values(&self) -> SnapValues<'_> {
        SnapValues { epa: &self.epa, wp: &self.wp, wpa: &self.wpa, cp: &self.cp, choice: &[], execution: &[], league_sticks: &[] }
    }
}

fn chrome_for(params: &Params, our_team: Option<&str>, our_passer: Option<&str>) -> Chrome {
    Chrome {
        title: "test".into(),
        projector: params.projector,
        toggle_href: String::new(),
        toggle_label: "Projector view",
        our_team: our_team.map(str::to_string),
        our_passer: our_passer.map(str::to_string),
        menu: menu("", Some(params), our_passer),
    }
}

fn params(q: &str) -> Params {
    Params::parse(Some(q)).expect("query")
}

#[test]
fn explorer_rows_link_counts_to_exactly_their_snaps_and_keep_the_view() {
    let f = Fixture::new();
    let pr = params("preset=every-snap&min=5&view=projector&season=2001");
    let table = splits::split_table(&f.plays, &f.values(), &pr.situation, pr.min_dropbacks);
    let page = explore_view(chrome_for(&pr, None, None), &pr, &table, Vec::new());
    assert!(!page.rows.is_empty());
    assert_eq!(page.league_dropbacks, crate::numfmt::thousands(table.league_dropbacks as usize));
    // The projector's short set of columns; the league row has one cell per column.
    assert_eq!(page.league.len(), page.columns.len() - 2);
    let row = &page.rows[0];
    assert!(row.profile_href.contains("season=2001") && row.profile_href.contains("view=projector"), "{}", row.profile_href);
    for (c, col) in row.cells.iter().zip(&page.columns[2..]) {
        assert!(c.href.contains("view=projector") && c.href.contains("season=2001"), "{}", c.href);
        if col.key == "int" {
            assert!(c.href.contains("result=interception"), "{}", c.href);
        }
    }
    // The league row's count columns are per passer: none shows a league total.
    for (v, col) in page.league.iter().zip(&page.columns[2..]) {
        if METRICS[metric_index(col.key).unwrap()].stat == Stat::Count {
            assert_eq!(v, "–", "{}", col.key);
        }
    }
    // The menu's report opens on this situation and seasons, in the view.
    let report = page.chrome.menu.iter().find(|m| m.0 == "Report").map(|m| m.1.clone()).unwrap_or_default();
    assert!(report.contains("preset=every-snap") && report.contains("season=2001") && report.contains("view=projector"), "{report}");
}

#[test]
fn explorer_marks_our_passer_and_sorts_as_asked() {
    let f = Fixture::new();
    let pr = params("preset=every-snap&min=5&sort=epa&dir=asc&by=raw");
    let table = splits::split_table(&f.plays, &f.values(), &pr.situation, pr.min_dropbacks);
    let ours = table.rows[0].passer.clone();
    let page = explore_view(chrome_for(&pr, None, Some(&ours)), &pr, &table, Vec::new());
    assert!(page.rows.iter().any(|r| r.ours && r.passer == ours));
    assert_eq!(page.sort_note, "sorted by EPA per dropback (raw value, low to high)");
    let epa = page.columns.iter().find(|c| c.key == "epa").expect("EPA column");
    assert_eq!(epa.aria_sort, "ascending");
}

#[test]
fn play_list_says_what_it_shows() {
    let f = Fixture::new();
    let table = splits::split_table(&f.plays, &f.values(), &params("preset=every-snap").situation, 5);
    let who = table.rows[0].passer.clone();
    let q = to_query_string(&number_query(&params("preset=every-snap").situation, &who, "int"));
    let pr = params(q.trim_start_matches('?'));
    let snaps = splits::play_list(&f.plays, &f.values(), &pr.situation, pr.situation.passer.as_deref(), None);
    let counted = vec![true; snaps.len()];
    let n = counted.iter().filter(|c| **c).count();
    let list = crate::web::service::PlayPage { total: snaps.len(), counted_total: Some(n), offset: 0, snaps, counted: Some(counted), next_after: None };
    let page = plays_view(chrome_for(&pr, None, None), &pr, &list, PLAY_PAGE_LIMIT, Vec::new());
    assert_eq!(page.count, table.rows[0].cells[metric_index("int").unwrap()].value.unwrap_or(0.0) as usize);
    assert!(page.note.contains("exactly the one"), "{}", page.note);
    assert!(!page.marking);
    assert!(!page.back_href.contains("result=") && !page.back_href.contains("passer="), "{}", page.back_href);
}

#[test]
fn game_chart_is_drawn_from_our_side() {
    let f = Fixture::new();
    let g = &f.plays.games[0];
    let away = f.plays.teams[g.away as usize].clone();
    let pr = params(&format!("game={}", g.key));
    let page = game_view(chrome_for(&pr, Some(&away), None), &pr, &f.plays, &f.values(), 0, Some(&away.to_lowercase()));
    assert_eq!(page.side, away);
    assert!(page.chart.contains(&format!("{away} win probability through the game (our team)")), "{}", &page.chart[..300.min(page.chart.len())]);
    // The swings are signed from our side: each is the offense's WPA, turned when we defend.
    let v = f.values();
    for s in &page.swings {
        let i = (g.start..g.end).find(|&i| f.plays.seq[i] == s.seq).expect("the snap");
        let ours = f.plays.teams[f.plays.offense[i] as usize] == away;
        assert_eq!(s.wpa, crate::numfmt::fixed(Some(if ours { v.wpa[i] } else { -v.wpa[i] }), 3));
    }
    let neutral = game_view(chrome_for(&pr, None, None), &pr, &f.plays, &f.values(), 0, None);
    assert_eq!(neutral.side, f.plays.teams[g.home as usize]);
}

#[test]
fn home_lists_teams_and_passers_by_name() {
    let f = Fixture::new();
    let pr = params("");
    let report = crate::playfile::LoadReport::default();
    let facts = HomeFacts { file: "f.csv".into(), fingerprint: "abc".into(), calibration_line: String::new(), fit_lines: Vec::new(), reload_note: None };
    let page = home_view(chrome_for(&pr, None, None), &f.plays, &report, facts);
    let mut sorted = page.passers.clone();
    sorted.sort();
    assert_eq!(page.passers, sorted);
    assert!(!page.passers.is_empty());
    assert_eq!(page.snaps, f.plays.len());
}

#[test]
fn profile_charts_have_titles_and_rows_link_with_the_view() {
    let f = Fixture::new();
    let table = splits::split_table(&f.plays, &f.values(), &params("preset=every-snap").situation, 5);
    let who = table.rows[0].passer.clone();
    let pr = params(&format!("passer={who}&view=projector"));
    let trend = crate::web::service::trend_situation(&pr);
    let base = Situation { passer: None, ..pr.situation.clone() };
    let prof = splits::profile(&f.plays, &f.values(), &who, &base, &trend, 5).expect("a profile");
    let dist = splits::epa_distribution(&f.plays, &f.values(), &Situation { passer: None, ..trend.clone() }, &who);
    let depth = depth_view(None, &who, "every snap", 588.0);
    let page = profile_view(chrome_for(&pr, None, None), &pr, &who, &prof, &dist, &f.plays, None, depth);
    assert!(page.trend_title.starts_with("EPA per dropback by season") && page.epa_title.contains(&format!("n = {}", dist.passer_n)));
    assert_eq!(page.charts.len(), PROFILE_KEYS.len());
    assert!(page.rows.iter().all(|r| r.href.contains("view=projector") && r.href.contains("passer=")));
    assert!(page.report_href.contains("view=projector"));
    assert_eq!(page.seasons_note, "All seasons (2000–2001)");
}

/// Snap `k` of `game` (key, season) between `sides` (home, away), `offense`
/// with the ball: 1st and 10 at its own 30 in the 1st period, no score, full
/// timeouts, an incomplete throw's fields; callers change what they need.
fn snap_row(k: usize, game: (&str, i32), sides: (&str, &str), offense: &str, passer: Option<&str>, kind: crate::playfile::Kind) -> crate::playfile::PlayRow {
    crate::playfile::PlayRow {
        game: game.0.into(),
        season: game.1,
        week: 1,
        home: sides.0.into(),
        away: sides.1.into(),
        seq: k as i32 + 1,
        period: 1,
        clock: 800 - 20 * k as i32,
        offense: offense.into(),
        defense: if offense == sides.0 { sides.1 } else { sides.0 }.into(),
        off_score: 0,
        def_score: 0,
        off_timeouts: 3,
        def_timeouts: 3,
        down: Some(1),
        to_go: Some(10),
        ball_on: 30,
        kind,
        passer: passer.map(str::to_string),
        complete: Some(false),
        intercepted: Some(false),
        air_yards: None,
        gain: Some(0),
        fumble_lost: Some(false),
        touchback: None,
        points: 0,
        home_line: None,
    }
}

/// A game of late-down snaps small enough to count by hand.
fn late_down_game() -> Plays {
    use crate::playfile::{Kind, PlayRow};
    // (offense is the home side, down, to go, kind, air yards)
    let snaps: [(bool, i32, i32, Kind, Option<i32>); 10] = [
        (true, 3, 2, Kind::Pass, Some(3)),
        (true, 4, 1, Kind::Pass, Some(-1)),
        (true, 3, 5, Kind::Pass, Some(8)),
        (true, 3, 6, Kind::Pass, Some(4)),
        (true, 3, 9, Kind::Pass, Some(12)),
        (true, 2, 8, Kind::Pass, Some(20)),
        (true, 3, 14, Kind::Sack, None),
        (true, 3, 12, Kind::Pass, None),
        (true, 4, 15, Kind::Pass, Some(25)),
        (false, 3, 4, Kind::Pass, Some(30)),
    ];
    let rows: Vec<PlayRow> = snaps
        .iter()
        .enumerate()
        .map(|(k, &(home, down, to_go, kind, air))| {
            let (offense, passer) = if home { ("NTH", "Tobin Vale") } else { ("STH", "Ira Quell") };
            PlayRow {
                period: 4,
                clock: 600 - 30 * k as i32,
                off_score: 10,
                def_score: 7,
                off_timeouts: 2,
                def_timeouts: 2,
                down: Some(down),
                to_go: Some(to_go),
                ball_on: 40,
                air_yards: air,
                gain: Some(if kind == Kind::Sack { -6 } else { 0 }),
                ..snap_row(k, ("2001-01-STH-NTH", 2001), ("NTH", "STH"), offense, Some(passer), kind)
            }
        })
        .collect();
    let sources = (0..rows.len()).map(|i| crate::plays::Source { file: 0, row: i as u32 + 1 }).collect();
    Plays::from_rows(vec!["late.csv".into()], &rows, sources)
}

#[test]
fn late_down_depths_match_a_hand_count() {
    let p = late_down_game();
    let n = p.len();
    let (zero, half) = (vec![0.0; n], vec![0.5; n]);
    let v = SnapValues { epa: &zero, wp: &half, wpa: &zero, cp: &zero, choice: &[], execution: &[], league_sticks: &[] };
    // The league's depth by hand: 12 yards on 3rd down (an even mix of
    // -2, 6, 14 and 30), 18 on 4th (1:1:1:3).
    let model = crate::models::throw::ThrowModel::hand_made([-2.0, 6.0, 14.0, 30.0]);
    let situation = Preset::EverySnap.situation(8);
    let lines = depth_lines(Some(&model), &p, &v, "Tobin Vale", &situation).expect("a model");
    let view = depth_view(Some(&lines), "Tobin Vale", "every snap", 588.0);
    // Counted by hand from `late_down_game`: the 2nd-down throw, the sack,
    // the throw without air yards and the other passer's throw are out.
    let want = [
        ("1-2 to go", "2", "1.5", "1.0", "15.0"),
        ("3-6 to go", "2", "5.5", "6.0", "12.0"),
        ("7-10 to go", "1", "9.0", "12.0", "12.0"),
        ("11+ to go", "1", "15.0", "25.0", "18.0"),
    ];
    assert_eq!(view.rows.len(), want.len());
    for (r, w) in view.rows.iter().zip(want) {
        assert_eq!((r.label.as_str(), r.throws.as_str(), r.to_go.as_str(), r.his.as_str(), r.league.as_str()), w);
    }
    assert!(view.note.is_empty() && view.chart.contains("1-2 to go (2)"), "{}", view.note);
    assert!(view.chart.contains("11+ to go (1): yards needed 15.0, his depth 25.0, league&#39;s depth 18.0"), "{}", view.chart);
    // The other passer: one 3rd-and-4 throw of 30 yards.
    let other = depth_view(depth_lines(Some(&model), &p, &v, "Ira Quell", &situation).as_deref(), "Ira Quell", "every snap", 588.0);
    assert_eq!(other.rows.iter().map(|r| r.throws.as_str()).collect::<Vec<_>>(), ["0", "1", "0", "0"]);
    assert_eq!((other.rows[0].his.as_str(), other.rows[1].his.as_str()), ("–", "30.0"));
    // No late-down throws here, and no air yards in the file: said plainly.
    let early = Situation { downs: Some(vec![1]), ..situation.clone() };
    let none = depth_view(depth_lines(Some(&model), &p, &v, "Tobin Vale", &early).as_deref(), "Tobin Vale", "1st down", 588.0);
    assert!(none.chart.is_empty() && none.note.starts_with("No 3rd- or 4th-down throws"), "{}", none.note);
    let no_air = depth_view(depth_lines(None, &p, &v, "Tobin Vale", &situation).as_deref(), "Tobin Vale", "every snap", 588.0);
    assert!(no_air.rows.is_empty() && no_air.note.contains("no air yards"));
}

#[test]
fn explorer_by_defense_names_teams_links_their_snaps_and_says_better_flips() {
    let f = Fixture::new();
    let pr = params("preset=every-snap&min=5&group=defense");
    let table = splits::split_table(&f.plays, &f.values(), &pr.situation, pr.min_dropbacks);
    let page = explore_view(chrome_for(&pr, None, None), &pr, &table, Vec::new());
    assert!(!page.rows.is_empty());
    // No team column beside a team: the league row has one cell per metric column.
    assert_eq!(page.columns[0].short, "Defense");
    assert_eq!(page.league.len(), page.columns.len() - 1);
    assert!(page.group_note.contains("Better flips"), "{}", page.group_note);
    // Headings in a defense's words: sacks made, not "sacked".
    let heads: Vec<&str> = page.columns.iter().map(|c| c.short).collect();
    assert!(heads.contains(&"Sack %") && heads.contains(&"Rating allowed") && !heads.iter().any(|h| h.contains("Sacked")), "{heads:?}");
    let by_passer = explore_view(chrome_for(&pr, None, None), &params("preset=every-snap&min=5"), &splits::split_table(&f.plays, &f.values(), &params("preset=every-snap&min=5").situation, 5), Vec::new());
    assert!(by_passer.columns.iter().any(|c| c.short == "Sacked %"), "a passer is sacked");
    for r in &page.rows {
        assert!(f.plays.teams.contains(&r.passer), "{}", r.passer);
        assert!(r.profile_href.starts_with("/defense?") && r.profile_href.contains(&format!("opponent={}", r.passer)), "{}", r.profile_href);
        for c in &r.cells {
            assert!(c.href.contains(&format!("opponent={}", r.passer)) && !c.href.contains("group="), "{}", c.href);
        }
    }
}

#[test]
fn explorer_lowers_the_minimum_against_one_opponent() {
    let team = Fixture::new().plays.teams[0].clone();
    assert_eq!(params(&format!("preset=end-of-game&opponent={team}")).min_dropbacks, splits::DEFAULT_MIN_VS_ONE_DEFENSE);
    assert_eq!(params(&format!("preset=end-of-game&opponent={team}&min=20")).min_dropbacks, 20);
    assert_eq!(params(&format!("preset=end-of-game&team={team}")).min_dropbacks, splits::DEFAULT_MIN_DROPBACKS);
    assert_eq!(params(&format!("preset=end-of-game&group=defense&opponent={team}")).min_dropbacks, splits::DEFAULT_MIN_DROPBACKS);
}

#[test]
fn defense_view_lines_link_to_the_defense_snaps() {
    let f = Fixture::new();
    let team = f.plays.teams[1].clone();
    let pr = params(&format!("preset=every-snap&min=5&opponent={team}&group=defense"));
    let all = pr.situation.without_row_pick();
    let table = splits::split_table_for(&f.plays, &f.values(), &all, pr.min_dropbacks, Some(&team));
    let page = defense_view(chrome_for(&pr, None, None), &pr, &table, &f.plays.teams);
    assert_eq!(page.team, team);
    assert_eq!(page.lines.len(), DEFENSE_LINES.len());
    let epa = &page.lines[0];
    assert_eq!(epa.label, "EPA per dropback allowed");
    assert_eq!(epa.better, "lower is better");
    assert_eq!(page.lines.iter().find(|l| l.label.starts_with("Sacks")).map(|l| l.better), Some("higher is better"));
    for l in &page.lines {
        assert!(l.href.starts_with("/plays?") && l.href.contains(&format!("opponent={team}")) && l.href.contains("metric="), "{}", l.href);
    }
    assert!(page.headline.starts_with(&format!("{team} allowed")), "{}", page.headline);
    assert_eq!(page.teams.iter().filter(|t| t.active).count(), 1);
    assert_eq!(page.ranked, table.qualified().count());
}

/// Four games counted by hand for the passer picker: Oren Lask throws for
/// NTH in 2000 and for STH in 2002 (his latest team), Pell Dunmar once in
/// 2002; runs (no passer) and a spike (not a dropback) count for no one.
fn picker_league() -> Plays {
    use crate::playfile::{Kind, PlayRow};
    // (game, season, offense, passer, kind)
    let snaps: [(&str, i32, &str, Option<&str>, Kind); 7] = [
        ("2000-01-STH-NTH", 2000, "NTH", Some("Oren Lask"), Kind::Pass),
        ("2000-01-STH-NTH", 2000, "NTH", Some("Oren Lask"), Kind::Sack),
        ("2000-01-STH-NTH", 2000, "STH", None, Kind::Run),
        ("2002-03-NTH-STH", 2002, "STH", Some("Oren Lask"), Kind::Scramble),
        ("2002-03-NTH-STH", 2002, "STH", Some("Oren Lask"), Kind::Spike),
        ("2002-03-NTH-STH", 2002, "NTH", Some("Pell Dunmar"), Kind::Pass),
        ("2002-03-NTH-STH", 2002, "NTH", None, Kind::Run),
    ];
    let rows: Vec<PlayRow> = snaps
        .iter()
        .enumerate()
        .map(|(k, &(game, season, offense, passer, kind))| {
            let sides = if season == 2000 { ("NTH", "STH") } else { ("STH", "NTH") };
            snap_row(k, (game, season), sides, offense, passer, kind)
        })
        .collect();
    let sources = (0..rows.len()).map(|i| crate::plays::Source { file: 0, row: i as u32 + 1 }).collect();
    Plays::from_rows(vec!["pick.csv".into()], &rows, sources)
}

#[test]
fn passer_picker_lists_dropbacks_latest_team_and_keeps_the_query() {
    let p = picker_league();
    let keep = vec![("season".to_string(), "2002".to_string()), ("passer".to_string(), "stale".to_string()), ("view".to_string(), "projector".to_string())];
    let rows = super::pick::pick_rows(&p, "/meeting", &keep);
    let got: Vec<(&str, &str, &str, usize)> = rows.iter().map(|r| (r.name.as_str(), r.team.as_str(), r.seasons.as_str(), r.dropbacks)).collect();
    // By hand: Oren Lask's pass, sack and scramble (the spike is no
    // dropback), latest for STH; Pell Dunmar's one pass.
    assert_eq!(got, vec![("Oren Lask", "STH", "2000–2002", 3), ("Pell Dunmar", "NTH", "2002", 1)]);
    // The rest of the query is kept, the stale passer replaced.
    assert_eq!(rows[1].href, "/meeting?season=2002&view=projector&passer=Pell+Dunmar");
}

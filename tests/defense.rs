//! Grouping by team: on a three-team fixture written out by hand, the
//! defense (and offense) grouping's counts and rates agree with a hand
//! count, better flips for a defense, the row filter picks a row and not
//! the league, and the snaps behind a defense's number are its snaps; over
//! HTTP, `group=defense` on the splits JSON, CSV, explorer and defense view,
//! and a bad `group=` refused with the nearest value.

mod common;

use common::rows;

use lategame::playfile::{Kind, PlayRow};
use lategame::plays::Plays;
use lategame::situation::{Group, Preset, Situation};
use lategame::splits::{self, metric_index, SnapValues, SplitTable};

/// One dropback. `code`: C complete (8 yards), I incomplete, X intercepted,
/// S sacked (−6). `late`: 5:00 of the 4th, tied (end of game); else 13:20
/// of the 1st. 1st and 10 at the own 30 either way.
fn snap(game: &str, home: &str, away: &str, seq: i32, off: &str, def: &str, late: bool, code: char) -> PlayRow {
    let pass = code != 'S';
    let row = PlayRow {
        home: home.into(),
        away: away.into(),
        kind: if pass { Kind::Pass } else { Kind::Sack },
        complete: Some(code == 'C'),
        intercepted: Some(code == 'X'),
        air_yards: if pass { Some(6) } else { None },
        gain: Some(match code {
            'C' => 8,
            'S' => -6,
            _ => 0,
        }),
        ..rows::throw(game, seq, off, def, &format!("Passer of {off}"))
    };
    if late {
        rows::late(row)
    } else {
        row
    }
}

/// EPA by hand, the same for every snap of a kind: C +0.5, I −0.4,
/// X −2.0, S −1.5.
fn epa_of(code: char) -> f64 {
    match code {
        'C' => 0.5,
        'I' => -0.4,
        'X' => -2.0,
        _ => -1.5,
    }
}

/// Three teams, one game each pair; in each game each offense has two
/// early dropbacks (C, I) and six late ones:
///
/// | game | offense → defense | late codes |
/// |---|---|---|
/// | g1 | AAA → BBB | C C I S X C |
/// | g1 | BBB → AAA | I I S S C C |
/// | g2 | CCC → AAA | C X I C I S |
/// | g2 | AAA → CCC | C C C I C C |
/// | g3 | BBB → CCC | C I C C S C |
/// | g3 | CCC → BBB | X I S I C I |
fn fixture() -> (Plays, Vec<f64>) {
    let blocks = [
        ("g1", "AAA", "BBB", "AAA", "BBB", "CCISXC"),
        ("g1", "AAA", "BBB", "BBB", "AAA", "IISSCC"),
        ("g2", "CCC", "AAA", "CCC", "AAA", "CXICIS"),
        ("g2", "CCC", "AAA", "AAA", "CCC", "CCCICC"),
        ("g3", "BBB", "CCC", "BBB", "CCC", "CICCSC"),
        ("g3", "BBB", "CCC", "CCC", "BBB", "XISICI"),
    ];
    let mut rows = Vec::new();
    let mut epa = Vec::new();
    // Early snaps of a game first, then its late ones, so each game's
    // clock runs down in order.
    for game in ["g1", "g2", "g3"] {
        let mine: Vec<_> = blocks.iter().filter(|b| b.0 == game).collect();
        let mut seq = 0;
        for late in [false, true] {
            for (g, home, away, off, def, codes) in &mine {
                let codes = if late { codes.to_string() } else { "CI".to_string() };
                for code in codes.chars() {
                    seq += 1;
                    rows.push(snap(g, home, away, seq, off, def, late, code));
                    epa.push(epa_of(code));
                }
            }
        }
    }
    (rows::plays("fixture", &rows), epa)
}

fn table(p: &Plays, epa: &[f64], s: &Situation) -> SplitTable {
    let n = p.len();
    let (wp, wpa, cp) = (vec![0.5; n], vec![0.0; n], vec![f64::NAN; n]);
    let v = SnapValues { epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    splits::split_table(p, &v, s, 1)
}

fn late(group: Group) -> Situation {
    Situation { group, ..Preset::EndOfGame.situation(8) }
}

fn value(t: &SplitTable, row: &str, key: &str) -> f64 {
    let r = t.row(row).unwrap_or_else(|| panic!("no row {row}"));
    r.cells[metric_index(key).unwrap()].value.unwrap_or(f64::NAN)
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() < 1e-9
}

#[test]
fn the_defense_grouping_agrees_with_a_hand_count() {
    let (p, epa) = fixture();
    let t = table(&p, &epa, &late(Group::Defense));
    assert_eq!(t.group, Group::Defense);
    let mut names: Vec<&str> = t.rows.iter().map(|r| r.passer.as_str()).collect();
    names.sort();
    assert_eq!(names, ["AAA", "BBB", "CCC"]);
    // By hand, late snaps only (the early C, I are outside end of game):
    // AAA faced blocks IISSCC and CXICIS: 12 dropbacks, 9 throws, 4 caught,
    //   3 sacks, 1 interception; EPA −2.8 − 3.3 = −6.1.
    // BBB faced CCISXC and XISICI: 12, 10 throws, 4 caught, 2 sacks, 2
    //   interceptions; EPA −2.4 − 4.2 = −6.6.
    // CCC faced CCCICC and CICCSC: 12, 11 throws, 9 caught, 1 sack, 0
    //   interceptions; EPA 2.1 + 0.1 = 2.2.
    let hand = [
        // team, dropbacks, throws, caught, sacks, interceptions, EPA total
        ("AAA", 12.0, 9.0, 4.0, 3.0, 1.0, -6.1),
        ("BBB", 12.0, 10.0, 4.0, 2.0, 2.0, -6.6),
        ("CCC", 12.0, 11.0, 9.0, 1.0, 0.0, 2.2),
    ];
    for (team, db, att, comp, sacks, ints, epa_sum) in hand {
        assert_eq!(value(&t, team, "dropbacks"), db, "{team}");
        assert_eq!(value(&t, team, "attempts"), att, "{team}");
        assert_eq!(value(&t, team, "completions"), comp, "{team}");
        assert_eq!(value(&t, team, "sacks"), sacks, "{team}");
        assert_eq!(value(&t, team, "int"), ints, "{team}");
        assert!(close(value(&t, team, "sack_rate"), 100.0 * sacks / db), "{team} sack %");
        assert!(close(value(&t, team, "int_rate"), 100.0 * ints / att), "{team} INT %");
        assert!(close(value(&t, team, "comp_pct"), 100.0 * comp / att), "{team} caught %");
        assert!(close(value(&t, team, "epa"), epa_sum / db), "{team} EPA");
        // Success: EPA > 0 only on completions here.
        assert!(close(value(&t, team, "success"), 100.0 * comp / db), "{team} success");
        assert_eq!(t.row(team).map(|r| r.team.as_str()), Some(team));
    }
    // Worked out: AAA 25.0 sack %, 11.11 INT %, 44.44 caught %, −0.5083 EPA.
    assert!(close(value(&t, "AAA", "sack_rate"), 25.0) && (value(&t, "AAA", "epa") + 0.508_333_333).abs() < 1e-6);
    // The league: 36 dropbacks, 30 throws, 17 caught, 6 sacks, 3
    // interceptions, EPA −10.5.
    let lg = |k: &str| t.league[metric_index(k).unwrap()].unwrap();
    assert_eq!((lg("dropbacks"), lg("attempts"), lg("completions"), lg("sacks"), lg("int")), (36.0, 30.0, 17.0, 6.0, 3.0));
    assert!(close(lg("sack_rate"), 100.0 * 6.0 / 36.0) && close(lg("int_rate"), 10.0) && close(lg("comp_pct"), 100.0 * 17.0 / 30.0));
    assert!(close(lg("epa"), -10.5 / 36.0));

    // Better flips for a defense: less EPA allowed, more sacks.
    let info = |k: &str| t.metrics.iter().find(|m| m.key == k).unwrap();
    assert!(!info("epa").higher_is_better && info("sack_rate").higher_is_better && info("int_rate").higher_is_better && !info("comp_pct").higher_is_better);
    let pct = |team: &str, k: &str| t.row(team).unwrap().cells[metric_index(k).unwrap()].percentile.unwrap_or(f64::NAN);
    // EPA allowed: BBB −0.55 < AAA −0.51 < CCC +0.18; every team faced 12
    // late and 4 early dropbacks, so the estimates keep that order.
    assert!(pct("BBB", "epa") > pct("AAA", "epa") && pct("AAA", "epa") > pct("CCC", "epa"), "{} {} {}", pct("BBB", "epa"), pct("AAA", "epa"), pct("CCC", "epa"));
    // Sacks per dropback: AAA 25% > BBB 16.7% > CCC 8.3%: more is better.
    assert!(pct("AAA", "sack_rate") > pct("BBB", "sack_rate") && pct("BBB", "sack_rate") > pct("CCC", "sack_rate"));
    let cell = |team: &str, k: &str| t.row(team).unwrap().cells[metric_index(k).unwrap()].clone();
    assert!(cell("CCC", "epa").p_better.unwrap() < 0.5 && cell("BBB", "epa").p_better.unwrap() > 0.5);
    // Each defense has other snaps (its early ones): a lift with an interval.
    for team in ["AAA", "BBB", "CCC"] {
        let c = cell(team, "comp_pct");
        assert!(c.lift.is_some() && c.lift_lo < c.lift_hi, "{team}: {c:?}");
    }

    // `opponent=` picks the row, not the league it is measured against.
    let one = table(&p, &epa, &Situation { opponent: Some("aaa".into()), ..late(Group::Defense) });
    assert_eq!(one.rows.len(), 1);
    assert_eq!(one.league_dropbacks, 36);
    assert_eq!(value(&one, "AAA", "sacks"), 3.0);
    assert!(close(value(&one, "AAA", "epa"), value(&t, "AAA", "epa")));
    assert_eq!(one.rows[0].cells[metric_index("epa").unwrap()].percentile, t.row("AAA").unwrap().cells[metric_index("epa").unwrap()].percentile);

    // The snaps behind AAA's numbers: the 12 late dropbacks it faced, 3 of them sacks.
    let n = p.len();
    let (wp, wpa, cp) = (vec![0.5; n], vec![0.0; n], vec![f64::NAN; n]);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let s = Situation { opponent: Some("AAA".into()), ..Preset::EndOfGame.situation(8) };
    let list = splits::play_indices(&p, &v, &s, None, None);
    assert_eq!(list.len(), 12);
    assert!(list.iter().all(|&i| p.teams[p.defense[i] as usize] == "AAA"));
    assert_eq!(list.iter().filter(|&&i| p.kind[i] == Kind::Sack).count(), 3);
}

#[test]
fn the_offense_grouping_agrees_with_a_hand_count() {
    let (p, epa) = fixture();
    let t = table(&p, &epa, &late(Group::Offense));
    // AAA threw in CCISXC and CCCICC: 12 dropbacks, 11 throws, 8 caught, 1
    // sack, 1 interception, EPA −2.4 + 2.1 = −0.3. BBB (IISSCC, CICCSC): 9
    // throws, 6 caught, 3 sacks, 0 interceptions, EPA −2.7. CCC (CXICIS,
    // XISICI): 10 throws, 3 caught, 2 sacks, 2 interceptions, EPA −7.5.
    for (team, att, comp, sacks, ints, epa_sum) in [("AAA", 11.0, 8.0, 1.0, 1.0, -0.3), ("BBB", 9.0, 6.0, 3.0, 0.0, -2.7), ("CCC", 10.0, 3.0, 2.0, 2.0, -7.5)] {
        assert_eq!(value(&t, team, "dropbacks"), 12.0);
        assert_eq!((value(&t, team, "attempts"), value(&t, team, "completions"), value(&t, team, "sacks"), value(&t, team, "int")), (att, comp, sacks, ints), "{team}");
        assert!(close(value(&t, team, "epa"), epa_sum / 12.0), "{team}");
    }
    // For an offense the directions are the passer's.
    let info = |k: &str| t.metrics.iter().find(|m| m.key == k).unwrap();
    assert!(info("epa").higher_is_better && !info("sack_rate").higher_is_better);
    // One passer per team here, so the passer rows hold the same sums.
    let by_passer = table(&p, &epa, &late(Group::Passer));
    assert_eq!(value(&by_passer, "Passer of CCC", "int"), 2.0);
    assert!(close(value(&by_passer, "Passer of AAA", "epa"), value(&t, "AAA", "epa")));
}

#[test]
fn group_defense_over_http() {
    let base = common::demo_server();
    // JSON: rows are defenses, the direction flipped.
    let r = common::get(&format!("{base}/api/splits?preset=end-of-game&group=defense"));
    assert_eq!(r.status, 200, "{}", r.body);
    let j = r.json();
    assert_eq!(j["group"], "defense");
    let teams: Vec<String> = j["rows"].as_array().unwrap().iter().map(|r| r["passer"].as_str().unwrap().to_string()).collect();
    assert!(teams.len() >= 8, "{teams:?}");
    assert!(teams.iter().all(|t| t.len() <= 4 && t.chars().all(|c| c.is_ascii_uppercase())), "{teams:?}");
    let epa = j["metrics"].as_array().unwrap().iter().find(|m| m["key"] == "epa").unwrap();
    assert_eq!(epa["higher_is_better"], false);
    // The league is every defense's dropbacks: the same as by passer.
    let by_passer = common::get(&format!("{base}/api/splits?preset=end-of-game")).json();
    assert_eq!(j["league_dropbacks"], by_passer["league_dropbacks"]);
    // `opponent=` picks one defense; its numbers are the same as in the full table.
    let one_team = &teams[0];
    let one = common::get(&format!("{base}/api/splits?preset=end-of-game&group=defense&opponent={}", one_team.to_lowercase())).json();
    assert_eq!(one["rows"].as_array().unwrap().len(), 1);
    assert_eq!(one["rows"][0]["dropbacks"], j["rows"][0]["dropbacks"]);
    assert_eq!(one["league_dropbacks"], j["league_dropbacks"]);
    // CSV: the first column is the defense.
    let csv = common::get(&format!("{base}/api/splits.csv?preset=end-of-game&group=defense"));
    assert_eq!(csv.status, 200);
    assert!(csv.body.starts_with("defense,team,qualified,"), "{}", &csv.body[..80]);
    // The explorer and the defense view draw.
    let page = common::get(&format!("{base}/explore?preset=end-of-game&group=defense"));
    assert_eq!(page.status, 200);
    assert!(page.body.contains("Better flips for a defense"), "explorer without the direction note");
    let view = common::get(&format!("{base}/defense?opponent={one_team}"));
    assert_eq!(view.status, 200, "{}", view.body);
    assert!(view.body.contains(&format!("How {one_team} defends")) && view.body.contains("EPA per dropback allowed"));
    assert!(view.body.contains("opponent=") && view.body.contains("/plays?"), "numbers link to their snaps");
    // A bad grouping: 400 naming the parameter and the nearest value.
    let bad = common::get(&format!("{base}/api/splits?preset=end-of-game&group=defence"));
    assert_eq!(bad.status, 400);
    let e = bad.json();
    assert_eq!(e["param"], "group");
    assert_eq!(e["value"], "defence");
    assert!(e["reason"].as_str().unwrap().contains("did you mean 'defense'?"), "{e}");
    let page = common::get(&format!("{base}/explore?group=teams"));
    assert_eq!(page.status, 400);
    assert!(page.body.contains("group=teams"), "the page names the parameter");
}

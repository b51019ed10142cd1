//! Another layout through a mapping: the demo league rewritten in an
//! invented layout (docs/mapping-example.toml) loads to the same snaps and
//! the same split tables as the native file; malformed foreign files each
//! get an error naming their column and value; the drafted mapping guesses
//! what it can; extra columns arrive as tags.

mod common;

use lategame::league::{demo_path, League, LeagueConfig};
use lategame::playfile::{self, load, load_mapped, LoadOptions, Mapping};
use lategame::plays::Plays;
use lategame::situation::{Preset, Situation};
use std::path::{Path, PathBuf};

const MAPPING: &str = include_str!("../docs/mapping-example.toml");

const HEADER: &str = "MatchRef,Campaign,Round,HostClub,GuestClub,SnapNo,Frame,TimeLeft,HasBall,HostPts,GuestPts,BallTO,StopTO,Dn,Dist,Spot,PlayCode,Thrower,Caught,Picked,AirYds,NetYds,FumLost,TB,Pts,HostLine,Pressure,Shell,Note";

fn scratch(name: &str) -> PathBuf {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target").join("test-mapping");
    std::fs::create_dir_all(&dir).expect("scratch folder");
    dir.join(name)
}

fn native() -> Plays {
    load(&demo_path(), &LoadOptions::default()).expect("the demo league loads").plays
}

fn mapping() -> Mapping {
    Mapping::parse("mapping-example.toml", MAPPING).expect("the example mapping is valid")
}

fn yn(v: Option<bool>, t: &str, f: &str) -> String {
    match v {
        Some(true) => t.into(),
        Some(false) => f.into(),
        None => String::new(),
    }
}

/// Snap `i` of the league as a row of the invented layout, with three
/// charting columns (the tags): pressure yes/no on dropbacks, a coverage
/// shell, a free-text note with more than 50 values.
fn foreign_row(p: &Plays, i: usize) -> String {
    let r = p.row(i);
    let home_has_ball = r.offense == r.home;
    let (hp, gp) = if home_has_ball { (r.off_score, r.def_score) } else { (r.def_score, r.off_score) };
    let frame = match r.period {
        n @ 1..=4 => format!("Q{n}"),
        5 => "OT".into(),
        n => format!("{}OT", n - 4),
    };
    let spot = match r.ball_on {
        50 => "50".to_string(),
        b if b < 50 => format!("OWN {b}"),
        b => format!("OPP {}", 100 - b),
    };
    let code = match r.kind.as_str() {
        "pass" if r.complete == Some(true) => "PC",
        "pass" if r.intercepted == Some(true) => "PX",
        "pass" => "PI",
        "sack" => "SK",
        "scramble" => "QBR",
        "run" => "RN",
        "punt" => "PT",
        "field_goal" => "FGA",
        "kickoff" => "KO",
        "extra_point" => "XK",
        "two_point" => "TPC",
        "kneel" => "KN",
        "spike" => "SPK",
        _ => "FLAG",
    };
    let opt = |v: Option<i32>| v.map(|x| x.to_string()).unwrap_or_default();
    let pressure = if r.kind.is_dropback() { if (r.seq * 7) % 3 == 0 { "yes" } else { "no" } } else { "" };
    let shell = ["C1", "C2", "C3", "C4"][(r.seq % 4) as usize];
    format!(
        "{},{},{},{},{},{},{},{} remaining,{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},\"note {}, seq\"",
        r.game,
        r.season,
        r.week,
        r.home,
        r.away,
        r.seq,
        frame,
        playfile::format_clock(r.clock),
        if home_has_ball { "H" } else { "G" },
        hp,
        gp,
        r.off_timeouts,
        r.def_timeouts,
        opt(r.down),
        opt(r.to_go),
        spot,
        code,
        r.passer.clone().unwrap_or_default(),
        yn(r.complete, "Y", "N"),
        yn(r.intercepted, "1", "0"),
        opt(r.air_yards),
        opt(r.gain),
        yn(r.fumble_lost, "TRUE", "FALSE"),
        yn(r.touchback, "Y", "N"),
        r.points,
        r.home_line.map(|x| x.to_string()).unwrap_or_default(),
        pressure,
        shell,
        r.seq % 97,
    )
}

fn foreign_text(p: &Plays, range: std::ops::Range<usize>) -> String {
    let mut s = format!("{HEADER}\n");
    for i in range {
        s.push_str(&foreign_row(p, i));
        s.push('\n');
    }
    s
}

/// The whole demo league in the invented layout (written once per run).
/// Several tests ask for it at once: each writes its own temp file and
/// renames it into place, so no test reads a file another is writing.
fn foreign_demo(p: &Plays) -> PathBuf {
    let path = scratch("harbor-league.csv");
    let text = foreign_text(p, 0..p.len());
    if std::fs::read_to_string(&path).ok().as_deref() != Some(text.as_str()) {
        let tmp = scratch(&format!("harbor-league.csv.{}-{:?}", std::process::id(), std::thread::current().id()).replace(['(', ')'], ""));
        std::fs::write(&tmp, text).expect("write the foreign file");
        std::fs::rename(&tmp, &path).expect("move the foreign file into place");
    }
    path
}

/// Everything but where the snaps came from and the tags.
fn comparable(p: &Plays) -> Plays {
    Plays { files: Vec::new(), source: Vec::new(), tags: Default::default(), ..p.clone() }
}

#[test]
fn the_demo_league_in_another_layout_loads_to_the_same_snaps() {
    let p = native();
    assert!(p.period.iter().all(|&x| x <= 6), "the converter writes overtime as OT, 2OT");
    let path = foreign_demo(&p);
    let loaded = load_mapped(&path, &LoadOptions::default(), Some(&mapping())).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(loaded.report.issue_count, 0, "{}", loaded.report.summary(false));
    assert_eq!(loaded.plays.len(), p.len());
    assert!(comparable(&loaded.plays) == comparable(&p), "the mapped league differs from the native one");
    // The charting columns are tags, named as the query language writes them.
    let tags = &loaded.plays.tags;
    assert_eq!(tags.names, vec!["pressure", "shell", "note"]);
    assert_eq!(tags.values[0], vec!["no", "yes"]);
    assert_eq!(tags.values[1], vec!["C1", "C2", "C3", "C4"]);
    assert!(tags.is_list(1) && !tags.is_list(2), "97 notes are searchable text, not a list");
    for i in (0..p.len()).step_by(997) {
        let seq = p.seq[i];
        assert_eq!(tags.value(1, i), Some(["C1", "C2", "C3", "C4"][(seq % 4) as usize]));
        assert_eq!(tags.value(0, i).is_some(), p.dropback[i] || p.kind[i].is_dropback());
    }
    // The native file has no tags; the mapping's text is part of the fingerprint.
    assert!(p.tags.is_empty());
    let other = format!("{MAPPING}\n# another comment\n");
    let again = load_mapped(&path, &LoadOptions::default(), Some(&Mapping::parse("m.toml", &other).unwrap())).unwrap();
    assert_ne!(again.fingerprint, loaded.fingerprint);
}

#[test]
fn the_same_split_tables_through_the_mapping() {
    let p = native();
    let path = foreign_demo(&p);
    let native = common::demo_league();
    let cfg = LeagueConfig { mapping: Some(mapping()), ..common::league_config(&path) };
    let mapped = League::open_with(&cfg).unwrap_or_else(|e| panic!("{e}"));
    for preset in [Preset::DEFAULT, Preset::TwoMinuteDrill, Preset::EverySnap] {
        let s = preset.situation(8);
        let a = lategame::splits::split_table(native.plays(), &native.values(), &s, 20);
        let b = lategame::splits::split_table(mapped.plays(), &mapped.values(), &s, 20);
        let (a, b) = (serde_json::to_value(&a).unwrap(), serde_json::to_value(&b).unwrap());
        assert!(a["rows"].as_array().is_some_and(|r| !r.is_empty()), "{}: an empty table proves nothing", preset.key());
        assert_eq!(a, b, "{}: split tables differ", preset.key());
    }
    let s = Situation::from_query_string("preset=end-of-game&down=3,4").unwrap();
    let a = lategame::splits::split_table(native.plays(), &native.values(), &s, 5);
    let b = lategame::splits::split_table(mapped.plays(), &mapped.values(), &s, 5);
    assert_eq!(serde_json::to_value(&a).unwrap(), serde_json::to_value(&b).unwrap());
    tags_over_http(mapped);
}

/// The mapped league's tags through the pages and the API.
fn tags_over_http(mapped: League) {
    let passer = mapped.plays().passers[0].clone();
    let base = common::spawn(mapped, None, None, None);
    let r = common::get(&format!("{base}/explore?preset=end-of-game&tag.shell=C2"));
    assert_eq!(r.status, 200);
    assert!(r.body.contains("name=\"tag.shell\"") && r.body.contains("<option value=\"C2\" selected>"), "a select per listed tag");
    assert!(r.body.contains("name=\"tag.note\"") && r.body.contains("placeholder=\"~text\""), "a search box for the 97-value tag");
    let r = common::get(&format!("{base}/api/splits?preset=end-of-game&tag.presure=yes"));
    assert_eq!(r.status, 400);
    assert!(r.body.contains("did you mean 'tag.pressure'?"), "{}", r.body);
    let q = |s: &str| s.replace(' ', "%20");
    let r = common::get(&format!("{base}/passer?passer={}&by-tag=shell", q(&passer)));
    assert_eq!(r.status, 200);
    assert!(r.body.contains("By tag: Shell") && r.body.contains("id=\"tag-table\""), "the breakdown section");
    let r = common::get(&format!("{base}/passer?passer={}&by-tag=shel", q(&passer)));
    assert_eq!(r.status, 400);
    let r = common::get(&format!("{base}/plays.csv?preset=end-of-game&tag.shell=C2"));
    assert_eq!(r.status, 200);
    let mut lines = r.body.lines();
    assert!(lines.next().unwrap_or("").contains("tag.pressure,tag.shell,tag.note"));
    assert!(lines.next().is_some_and(|l| l.contains(",C2,")), "the rows carry the tag");
}

/// A small foreign file: the first game of the demo league, with `edit`
/// applied to the text.
fn small_foreign(p: &Plays, edit: impl Fn(&str) -> String) -> String {
    let g = &p.games[0];
    edit(&foreign_text(p, g.start..g.end))
}

/// Replace column `col` of data row `row` (1-based) with `value`.
fn set_cell(text: &str, row: usize, col: &str, value: &str) -> String {
    let idx = HEADER.split(',').position(|h| h == col).expect("a column of the layout");
    text.lines()
        .enumerate()
        .map(|(k, line)| {
            if k != row {
                return line.to_string();
            }
            let mut f: Vec<String> = line.split(',').map(str::to_string).collect();
            f[idx] = value.to_string();
            f.join(",")
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// The first data row (1-based) whose column `col` satisfies `pred`.
fn row_where(text: &str, col: &str, pred: impl Fn(&str) -> bool) -> usize {
    let idx = HEADER.split(',').position(|h| h == col).unwrap();
    text.lines().enumerate().skip(1).find(|(_, l)| pred(l.split(',').nth(idx).unwrap_or(""))).map(|(k, _)| k).expect("a matching row")
}

fn load_text(name: &str, text: &str, lenient: bool) -> Result<playfile::Loaded, playfile::LoadError> {
    let path = scratch(name);
    std::fs::write(&path, text).unwrap();
    load_mapped(&path, &LoadOptions { lenient }, Some(&mapping()))
}

#[test]
fn every_malformed_foreign_file_names_their_column_and_value() {
    let p = native();
    let base = small_foreign(&p, |t| t.to_string());
    assert!(load_text("ok.csv", &base, false).is_ok(), "the untouched game loads");
    let pass = row_where(&base, "PlayCode", |c| c == "PC" || c == "PI");
    let any = 3;
    // (what is broken, the file, the words the first message must hold)
    let cases: Vec<(&str, String, String)> = vec![
        ("yard line off the field", set_cell(&base, any, "Spot", "OPP 0"), format!("row {any}: their column Spot: \"OPP 0\" is not a yard line")),
        ("yard line, unknown side word", set_cell(&base, any, "Spot", "MID 20"), "their column Spot: \"MID 20\" is not a yard line; expected OPP 1-49, OWN 1-49 or 50".into()),
        ("clock without its word", set_cell(&base, any, "TimeLeft", "12:34"), "their column TimeLeft: \"12:34\" is not a clock".into()),
        ("clock past 15:00", set_cell(&base, any, "TimeLeft", "16:10 remaining"), "their column TimeLeft: \"16:10 remaining\" is not a clock".into()),
        ("period word", set_cell(&base, any, "Frame", "fifth"), "their column Frame: \"fifth\" is not a period; expected 1-4, Q1-Q4 or OT".into()),
        ("side code", set_cell(&base, any, "HasBall", "X"), "their column HasBall: \"X\" is not a side; expected H (home) or G (away)".into()),
        ("yes/no word", set_cell(&base, pass, "Caught", "maybe"), "their column Caught: \"maybe\" is not a yes/no value".into()),
        ("play code", set_cell(&base, any, "PlayCode", "HB"), "their column PlayCode: \"HB\" is not a play kind the mapping lists".into()),
        ("down out of range", set_cell(&base, pass, "Dn", "6"), "their column Dn is 6; expected 1-4 on a pass snap".into()),
        ("score not a number", set_cell(&base, any, "HostPts", "abc"), "their column HostPts/GuestPts is abc; expected points 0-300".into()),
        ("distance zero", set_cell(&base, pass, "Dist", "0"), "their column Dist is 0; expected yards to go 1-99 with a down".into()),
        ("no passer on a pass", set_cell(&base, pass, "Thrower", ""), "their column Thrower is empty; expected a passer name on a pass snap".into()),
        ("a column missing", base.replacen("MatchRef,", "Match,", 1), "their column MatchRef (our game) is not in the file".into()),
        ("snaps out of order", set_cell(&base, 3, "SnapNo", "1"), "row 3: their column SnapNo is 1 after 2 on row 2".into()),
        ("an empty yard line", set_cell(&base, any, "Spot", ""), "their column Spot is empty; expected 1-99".into()),
    ];
    assert!(cases.len() >= 12);
    for (what, text, want) in &cases {
        let e = match load_text("bad.csv", text, false) {
            Err(e) => e,
            Ok(_) => panic!("{what}: accepted"),
        };
        let first = e.report.issues.first().map(|i| i.to_string()).unwrap_or_default();
        assert!(first.contains(want.as_str()), "{what}: expected «{want}» in «{first}»");
        assert!(first.starts_with("bad.csv"), "{what}: names the file: {first}");
    }
    // Lenient: the bad row is skipped, the rest kept; one issue, not two.
    let text = set_cell(&base, any, "Spot", "OPP 0");
    let loaded = load_text("lenient.csv", &text, true).expect("lenient keeps the other rows");
    assert_eq!(loaded.report.issue_count, 1, "{}", loaded.report.summary(true));
    assert_eq!(loaded.report.rows_skipped, 1);
}

#[test]
fn a_bad_mapping_is_refused_with_the_reason() {
    let cases = [
        (MAPPING.replace("ball_on = \"Spot\"", "ball_onn = \"Spot\""), "[columns] ball_onn is not one of our columns"),
        (MAPPING.replace("ball_on = \"Spot\"\n", ""), "[columns] ball_on is missing"),
        (MAPPING.replace("clock = \"m:ss remaining\"", "clock = \"hh:mm\""), "[values] clock is \"hh:mm\""),
        (MAPPING.replace("sack = [\"SK\"]", "sacks = [\"SK\"]"), "[kinds] sacks is not one of our play kinds"),
        (MAPPING.replace("sack = [\"SK\"]", "sack = [\"RN\"]"), "code \"RN\" is listed under both"),
        (MAPPING.replace("offense_home = \"H\"\n", ""), "needs offense_home and offense_away"),
        ("columns = 3".to_string(), "not a valid mapping"),
    ];
    for (text, want) in cases {
        let e = Mapping::parse("m.toml", &text).expect_err(want).to_string();
        assert!(e.contains(want), "expected «{want}» in «{e}»");
        assert!(e.starts_with("m.toml"), "{e}");
    }
}

#[test]
fn the_draft_guesses_what_it_can_and_marks_the_rest() {
    let p = native();
    let path = foreign_demo(&p);
    let bytes = std::fs::read(&path).unwrap();
    let df = playfile::read_frame("harbor-league.csv", &path, &bytes).unwrap();
    let draft = playfile::draft_mapping("harbor-league.csv", &df);
    for line in [
        "game = \"MatchRef\"",
        "week = \"Round\"",
        "down = \"Dn\"",
        "ball_on = \"Spot\"",
        "passer = \"Thrower\"",
        "home_score = \"HostPts\"",
        "scores = \"home_away\"",
        "offense = \"home_away\"",
        "offense_home = \"H\"",
        "yard_line = \"sides\"",
        "own = \"OWN\"",
        "opp = \"OPP\"",
        "overtime = [\"OT\"",
        "kickoff = [\"KO\"]",
        "# off_timeouts = \"\"  # FILL IN",
        "# FILL IN: \"PC\" is which kind?",
        "# kept as tags: BallTO, StopTO, HostLine, Pressure, Shell, Note",
    ] {
        assert!(draft.contains(line), "draft lacks «{line}»:\n{draft}");
    }
    assert!(draft.contains("clock = \"m:ss remaining\""), "{draft}");
    // As drafted it is refused for what still needs filling in.
    let e = Mapping::parse("draft.toml", &draft).unwrap_err().to_string();
    assert!(e.contains("off_timeouts is missing"), "{e}");
}

#[test]
fn our_own_layout_needs_no_mapping_and_keeps_extra_columns_as_tags() {
    let dir = scratch("native-tags.csv");
    let text = "game,season,week,home,away,seq,period,clock,offense,defense,off_score,def_score,off_timeouts,def_timeouts,down,to_go,ball_on,kind,passer,complete,intercepted,air_yards,gain,fumble_lost,touchback,points,home_line,Coverage Shell\n\
G1,2024,1,AAA,BBB,1,1,15:00,AAA,BBB,0,0,3,3,,,35,kickoff,,,,,,,true,0,3.5,\n\
G1,2024,1,AAA,BBB,2,1,15:00,BBB,AAA,0,0,3,3,1,10,25,pass,Quill Ostrander,true,false,8,12,false,,0,3.5,two high\n";
    std::fs::write(&dir, text).unwrap();
    let loaded = load(Path::new(&dir), &LoadOptions::default()).unwrap();
    assert_eq!(loaded.plays.tags.names, vec!["coverage_shell"]);
    assert_eq!(loaded.plays.tags.headers, vec!["Coverage Shell"]);
    assert_eq!(loaded.plays.tags.value(0, 0), None);
    assert_eq!(loaded.plays.tags.value(0, 1), Some("two high"));
}

#[test]
fn the_documented_example_loads_through_its_mapping() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("docs").join("mapping-example.csv");
    let loaded = load_mapped(&path, &LoadOptions::default(), Some(&mapping())).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(loaded.report.rows_kept, 12);
    assert_eq!(loaded.plays.tags.names, vec!["pressure", "shell", "note"]);
    // Row 6 (PX: intercepted, OWN 39, H has the ball): our notation.
    let i = loaded.plays.seq.iter().position(|&s| s == 6).unwrap();
    assert!(loaded.plays.intercepted[i]);
    assert_eq!(loaded.plays.ball_on[i], 39);
    assert_eq!(loaded.plays.clock[i], 13 * 60 + 1);
    assert_eq!(loaded.plays.teams[loaded.plays.offense[i] as usize], "FRH");
    assert_eq!(loaded.plays.tags.value(2, i), Some("hot read vs pressure"));
    // Without the mapping the file is refused: its columns are not ours.
    assert!(load(&path, &LoadOptions::default()).is_err());
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(48))]
    /// Any text in any of their cells: an error or a load, never a panic,
    /// and a refusal names one of their columns.
    #[test]
    fn any_cell_text_is_an_error_or_a_load_never_a_panic(col in 0usize..29, row in 1usize..4, text in "[A-Za-z0-9 :+.-]{0,12}") {
        let header: Vec<&str> = HEADER.split(',').collect();
        let base = format!("{HEADER}\n{}\n{}\n{}\n", SAMPLE_ROWS[0], SAMPLE_ROWS[1], SAMPLE_ROWS[2]);
        let text = set_cell(&base, row, header[col], &text);
        let path = scratch(&format!("prop-{}-{col}-{row}.csv", std::process::id()));
        std::fs::write(&path, text).unwrap();
        if let Err(e) = load_mapped(&path, &LoadOptions::default(), Some(&mapping())) {
            let first = e.report.issues.first().map(|i| i.to_string()).unwrap_or_default();
            proptest::prop_assert!(first.contains("their column "), "{}", first);
        }
    }
}

/// Three rows of the invented layout (from docs/mapping-example.csv).
const SAMPLE_ROWS: [&str; 3] = [
    "2020w01g01,2020,1,FRH,ALD,1,Q1,15:00 remaining,G,0,0,3,3,,,OWN 35,KO,,,,,0,FALSE,Y,0,5.9,,C2,",
    "2020w01g01,2020,1,FRH,ALD,2,Q1,15:00 remaining,H,0,0,3,3,1,10,OWN 25,RN,,,,,6,FALSE,N,0,5.9,,C3,",
    "2020w01g01,2020,1,FRH,ALD,5,Q1,13:07 remaining,H,0,0,3,3,2,7,OWN 39,PI,Lucan Gremulvey,N,0,21,0,FALSE,N,0,5.9,no,C2,boot right",
];

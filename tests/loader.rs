//! The play-file loader: every validation rule against a malformed file with
//! its exact message, lenient loading, CSV ↔ Parquet round trips, the
//! `check` command, and no panic on arbitrary bytes.

use lategame::playfile::{self, load, IssueKind, LoadOptions};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};

/// A scratch folder removed on drop.
struct TempDir(PathBuf);
static NEXT: AtomicUsize = AtomicUsize::new(0);
impl TempDir {
    fn new() -> TempDir {
        let p = std::env::temp_dir().join(format!("lategame-loader-{}-{}", std::process::id(), NEXT.fetch_add(1, Ordering::SeqCst)));
        std::fs::create_dir_all(&p).unwrap();
        TempDir(p)
    }
    fn path(&self) -> &Path {
        &self.0
    }
}
impl Drop for TempDir {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

const HEADER: &str = "game,season,week,home,away,seq,period,clock,offense,defense,off_score,def_score,off_timeouts,def_timeouts,down,to_go,ball_on,kind,passer,complete,intercepted,air_yards,gain,fumble_lost,touchback,points,home_line";

/// A small valid game (invented teams and passer). Data row k is line k+1.
const ROWS: &[&str] = &[
    "G1,2024,1,AAA,BBB,1,1,15:00,AAA,BBB,0,0,3,3,,,35,kickoff,,,,,,,true,0,3.5",
    "G1,2024,1,AAA,BBB,2,1,15:00,BBB,AAA,0,0,3,3,1,10,25,pass,Quill Ostrander,true,false,8,12,false,,0,3.5",
    "G1,2024,1,AAA,BBB,3,1,14:30,BBB,AAA,0,0,3,3,1,10,37,run,,,,,4,false,,0,3.5",
    "G1,2024,1,AAA,BBB,4,1,14:00,BBB,AAA,0,0,3,3,2,6,41,sack,Quill Ostrander,,,,-7,false,,0,3.5",
    "G1,2024,1,AAA,BBB,5,1,13:20,BBB,AAA,0,0,3,3,3,13,34,pass,Quill Ostrander,true,false,20,66,false,,6,3.5",
    "G1,2024,1,AAA,BBB,6,1,13:10,BBB,AAA,6,0,3,3,,,98,extra_point,,,,,,,,1,3.5",
    "G1,2024,1,AAA,BBB,7,1,13:10,BBB,AAA,7,0,3,3,,,35,kickoff,,,,,,,true,0,3.5",
    "G1,2024,1,AAA,BBB,8,4,0:05,AAA,BBB,0,7,3,3,1,10,25,kneel,,,,,-1,,,0,3.5",
];

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn csv_with(edit: impl Fn(usize, &str) -> String) -> String {
    let mut s = String::from(HEADER);
    s.push('\n');
    for (i, r) in ROWS.iter().enumerate() {
        s.push_str(&edit(i + 1, r));
        s.push('\n');
    }
    s
}

/// Replace field `col` (by name) of data row `row` (1-based) with `value`.
fn set(row: usize, col: &str, value: &str) -> String {
    let idx = HEADER.split(',').position(|h| h == col).unwrap();
    csv_with(|i, r| {
        if i != row {
            return r.to_string();
        }
        let mut f: Vec<String> = r.split(',').map(String::from).collect();
        f[idx] = value.to_string();
        f.join(",")
    })
}

/// The strict-mode messages for a file's text.
fn messages(text: &str) -> Vec<String> {
    let dir = TempDir::new();
    let p = write(dir.path(), "week7.csv", text);
    match load(&p, &LoadOptions::default()) {
        Ok(_) => vec![],
        Err(e) => e.report.issues.iter().map(|i| i.to_string()).collect(),
    }
}

fn first(text: &str) -> String {
    messages(text).into_iter().next().unwrap_or_else(|| "no error".into())
}

#[test]
fn valid_game_loads_with_derived_columns() {
    let dir = TempDir::new();
    let p = write(dir.path(), "ok.csv", &csv_with(|_, r| r.to_string()));
    let loaded = load(&p, &LoadOptions::default()).unwrap();
    let pl = &loaded.plays;
    assert_eq!(pl.len(), 8);
    assert_eq!(pl.games.len(), 1);
    let g = &pl.games[0];
    assert_eq!((g.home_final, g.away_final), (0, 7));
    assert_eq!(g.home_result(), 0.0);
    assert_eq!(pl.secs_half[1], 1800);
    assert_eq!(pl.secs_game[7], 5);
    assert_eq!(pl.dropback.iter().filter(|d| **d).count(), 3);
    // the pass that scored: next score for BBB's drive is its own touchdown
    assert_eq!(pl.next_score[1], lategame::plays::NextScore::OwnTouchdown);
    // the late kneel by AAA: nothing more is scored in that half
    assert_eq!(pl.next_score[7], lategame::plays::NextScore::NoScore);
    assert_eq!(pl.drive[1], 2);
    assert_eq!(pl.margin[7], -7);
    assert!(!loaded.fingerprint.is_empty());
}

#[test]
fn bad_down_names_file_row_column_value_and_expectation() {
    assert_eq!(first(&set(3, "down", "6")), "week7.csv row 3: column down is 6; expected 1-4 on a run snap");
}

/// No message contradicts itself: an empty down on a snap that needs one
/// asks for a down, not for "1-4 or empty".
#[test]
fn an_empty_down_asks_for_a_down() {
    let m = first(&set(2, "down", ""));
    assert_eq!(m, "week7.csv row 2: column down is empty; expected 1-4 on a pass snap");
    for text in [set(2, "down", ""), set(3, "down", "6"), set(2, "season", "abc"), set(2, "to_go", "")] {
        for m in messages(&text) {
            assert!(!(m.contains(" is empty;") && m.ends_with("or empty")), "contradicts itself: {m}");
        }
    }
}

/// "2.0" is down 2 (whole-number decimals, as Parquet float columns read,
/// count as that number in every whole-number column); "2.5" is no down.
#[test]
fn a_whole_number_decimal_is_a_down_and_a_fraction_is_not() {
    let dir = TempDir::new();
    let p = write(dir.path(), "ok.csv", &set(4, "down", "2.0"));
    let loaded = load(&p, &LoadOptions::default()).expect("2.0 is down 2");
    assert_eq!(loaded.plays.down[3], 2);
    assert_eq!(first(&set(4, "down", "2.5")), "week7.csv row 4: column down is 2.5; expected 1-4 on a sack snap");
    assert_eq!(first(&set(4, "to_go", "6.0")), "no error");
    assert_eq!(first(&set(4, "to_go", "6.5")), "week7.csv row 4: column to_go is 6.5; expected yards to go 1-99 with a down");
}

#[test]
fn wrong_types_and_ranges() {
    assert_eq!(first(&set(2, "season", "abc")), "week7.csv row 2: column season is abc; expected a season year 1-9999");
    assert_eq!(first(&set(2, "ball_on", "0")), "week7.csv row 2: column ball_on is 0; expected 1-99 (yards from the offense's own goal line)");
    assert_eq!(first(&set(2, "clock", "16:61")), "week7.csv row 2: column clock is 16:61; expected M:SS or whole seconds 0-900");
    assert_eq!(first(&set(2, "kind", "hailmary")), "week7.csv row 2: column kind is hailmary; expected one of pass, sack, scramble, run, punt, field_goal, kickoff, extra_point, two_point, kneel, spike, penalty");
    assert_eq!(first(&set(2, "off_timeouts", "4")), "week7.csv row 2: column off_timeouts is 4; expected 0-3");
    assert_eq!(first(&set(2, "to_go", "80")), "week7.csv row 2: column to_go is 80; expected at most 75 (the distance to the goal line from ball_on 25)");
    assert_eq!(first(&set(2, "passer", "")), "week7.csv row 2: column passer is empty; expected a passer name on a pass snap");
    assert_eq!(first(&set(2, "intercepted", "true")), "week7.csv row 2: column intercepted is true; expected false when complete is true");
    assert_eq!(first(&set(3, "points", "3")), "week7.csv row 3: column points is 3; expected 3 only on a field_goal");
    assert_eq!(first(&set(1, "down", "1")), "week7.csv row 1: column down is 1; expected empty on a kickoff snap");
}

#[test]
fn huge_numbers_are_values_not_crashes() {
    assert_eq!(
        first(&set(2, "seq", "99999999999999999999999")),
        "week7.csv row 2: column seq is 99999999999999999999999; expected a snap number 0-1,000,000"
    );
    assert_eq!(first(&set(2, "home_line", "1e400")), "week7.csv row 2: column home_line is 1e400; expected a number of points -80 to 80 or empty");
}

#[test]
fn offense_must_be_home_or_away() {
    assert_eq!(first(&set(3, "offense", "CCC")), "week7.csv row 3: column offense is CCC; expected the home team AAA or the away team BBB");
}

#[test]
fn seq_must_increase() {
    assert_eq!(first(&set(4, "seq", "3")), "week7.csv row 4: column seq is 3 after 3 on row 3; expected seq to increase within game G1");
}

#[test]
fn clock_must_not_run_backwards() {
    assert_eq!(
        first(&set(4, "clock", "14:45")),
        "week7.csv row 4: column clock is 14:45 after 14:30 on row 3; expected the clock not to run backwards within period 1"
    );
}

#[test]
fn scores_must_not_go_down() {
    // row 7 has BBB (offense) at 7; row 8 has BBB (defense) at 5
    assert_eq!(
        first(&set(8, "def_score", "5")),
        "week7.csv row 8: column def_score is 5 but that team had 7 on row 7; expected scores never to go down within game G1"
    );
}

#[test]
fn game_details_must_agree() {
    assert_eq!(
        first(&set(5, "week", "2")),
        "week7.csv row 5: column week is 2 but game G1 has 1 on row 1; expected the same on every row of a game"
    );
}

#[test]
fn header_problems() {
    let missing = HEADER.replace(",ball_on", "");
    let text = csv_with(|_, r| {
        let mut f: Vec<&str> = r.split(',').collect();
        f.remove(16);
        f.join(",")
    })
    .replacen(HEADER, &missing, 1);
    assert_eq!(first(&text), "week7.csv: column ball_on is missing; expected it in the header");
    let dup = csv_with(|_, r| r.to_string()).replacen("home_line", "season", 1);
    assert_eq!(first(&dup), "week7.csv: column season appears more than once; expected each column once");
}

#[test]
fn empty_and_header_only_files() {
    assert_eq!(first(""), "week7.csv: the file is empty; expected a header row naming the columns");
    assert_eq!(first(&format!("{HEADER}\n")), "week7.csv: the file has a header but no rows; expected one row per snap");
}

#[test]
fn non_utf8_names_the_row() {
    let mut bytes = csv_with(|_, r| r.to_string()).into_bytes();
    let pos = bytes.iter().enumerate().filter(|(_, b)| **b == b'\n').nth(2).unwrap().0 + 3;
    bytes[pos] = 0xff;
    let dir = TempDir::new();
    let p = dir.path().join("week7.csv");
    std::fs::write(&p, &bytes).unwrap();
    let e = load(&p, &LoadOptions::default()).err().unwrap();
    assert!(e.report.issues[0].to_string().starts_with("week7.csv: row 3: not valid UTF-8 text"), "{}", e.report.issues[0]);
}

#[test]
fn refused_report_lists_first_twenty_and_counts_per_kind() {
    let text = csv_with(|i, r| if i >= 2 { r.replacen("BBB,AAA,0,0,3,3,", "BBB,AAA,0,0,7,3,", 1) } else { r.to_string() });
    let dir = TempDir::new();
    let p = write(dir.path(), "t.csv", &text);
    let e = load(&p, &LoadOptions::default()).err().unwrap();
    let summary = e.report.summary(false);
    assert!(summary.contains("refused: 4 problem(s)"), "{summary}");
    assert!(summary.contains("bad value: 4"), "{summary}");
}

#[test]
fn lenient_skips_only_bad_rows() {
    let dir = TempDir::new();
    let p = write(dir.path(), "t.csv", &set(3, "down", "6"));
    assert!(load(&p, &LoadOptions::default()).is_err());
    let loaded = load(&p, &LoadOptions { lenient: true }).unwrap();
    assert_eq!(loaded.plays.len(), 7);
    assert_eq!(loaded.report.rows_skipped, 1);
    assert_eq!(loaded.report.issues[0].row, Some(3));
    assert_eq!(loaded.report.counts.get(IssueKind::BadValue.label()), Some(&1));
    // every other row kept, in order
    assert_eq!(loaded.plays.seq, vec![1, 2, 4, 5, 6, 7, 8]);
}

#[test]
fn csv_and_parquet_give_the_same_league() {
    let dir = TempDir::new();
    let p = write(dir.path(), "a.csv", &csv_with(|_, r| r.to_string()));
    let from_csv = load(&p, &LoadOptions::default()).unwrap().plays;
    // write the same rows back out as Parquet and CSV with our writer
    let rows: Vec<playfile::PlayRow> = (0..from_csv.len()).map(|i| from_csv.row(i)).collect();
    let pq = dir.path().join("b.parquet");
    playfile::write_rows(&rows, &pq).unwrap();
    let csv2 = dir.path().join("c.csv");
    playfile::write_rows(&rows, &csv2).unwrap();
    let mut a = from_csv.clone();
    let mut b = load(&pq, &LoadOptions::default()).unwrap().plays;
    let mut c = load(&csv2, &LoadOptions::default()).unwrap().plays;
    for x in [&mut a, &mut b, &mut c] {
        x.files.clear();
    }
    assert_eq!(a, b);
    assert_eq!(a, c);
}

#[test]
fn a_folder_loads_every_file() {
    let dir = TempDir::new();
    write(dir.path(), "s1.csv", &csv_with(|_, r| r.to_string()));
    write(dir.path(), "s2.csv", &csv_with(|_, r| r.replace("G1,2024", "G2,2025")));
    write(dir.path(), "notes.txt", "not a play file");
    let loaded = load(dir.path(), &LoadOptions::default()).unwrap();
    assert_eq!(loaded.plays.games.len(), 2);
    assert_eq!(loaded.plays.seasons(), vec![2024, 2025]);
    assert_eq!(loaded.report.files.len(), 2);
}

#[test]
fn check_command_reports_and_exits_nonzero() {
    let dir = TempDir::new();
    let bad = write(dir.path(), "week7.csv", &set(3, "down", "6"));
    let before = std::fs::read(&bad).unwrap();
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_lategame")).arg("check").arg(&bad).output().unwrap();
    assert!(!out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("week7.csv row 3: column down is 6; expected 1-4 on a run snap"), "{text}");
    assert!(text.contains("problems by kind:"), "{text}");
    // the staff's file is only ever read
    assert_eq!(std::fs::read(&bad).unwrap(), before);
    let good = write(dir.path(), "ok.csv", &csv_with(|_, r| r.to_string()));
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_lategame")).arg("check").arg(&good).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stdout));
}


/// `check --overtime FILE` says which rules each run of the file's seasons
/// plays, and names a block that covers none of them (likely a slip).
#[test]
fn check_says_which_overtime_rules_each_season_plays() {
    let dir = TempDir::new();
    let good = write(dir.path(), "ok.csv", &csv_with(|_, r| r.to_string()));
    let cfg = dir.path().join("overtime.toml");
    std::fs::write(
        &cfg,
        "[[overtime]]\nseasons = \"2024\"\nrules = \"first-score-wins\"\nperiod = \"15:00\"\n\n[[overtime]]\nseasons = \"1990-1992\"\nrules = \"both-possess\"\n",
    )
    .unwrap();
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_lategame")).arg("check").arg(&good).arg("--overtime").arg(&cfg).output().unwrap();
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(out.status.success(), "{text}");
    assert!(text.contains("overtime rules by season, from "), "{text}");
    assert!(text.contains("  2024: first-score-wins, 15:00, a level period is a tie"), "{text}");
    assert!(text.contains("the block for 1990-1992 (both-possess) names no season of the file, which covers 2024"), "{text}");
    // Without a config nothing is said of overtime.
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_lategame")).arg("check").arg(&good).output().unwrap();
    assert!(!String::from_utf8_lossy(&out.stdout).contains("overtime rules"));
}

#[test]
fn check_lenient_skips_bad_rows_and_prints_no_colour_codes() {
    let dir = TempDir::new();
    let bad = write(dir.path(), "week7.csv", &set(3, "down", "6"));
    let run = |args: &[&str]| std::process::Command::new(env!("CARGO_BIN_EXE_lategame")).args(args).arg(&bad).output().unwrap();
    let out = run(&["check", "--lenient"]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(out.status.success(), "{text}");
    assert!(text.contains("8 rows read, 1 games, 7 rows kept; 1 rows skipped"), "{text}");
    assert!(text.contains("column down is 6; expected 1-4 on a run snap"), "{text}");
    // Output to a pipe (not a terminal): plain text, in the report and in
    // the command line's own errors.
    for out in [run(&["check"]), run(&["check", "--lenient"]), run(&["check", "--no-such-flag"])] {
        for stream in [&out.stdout, &out.stderr] {
            assert!(!stream.contains(&0x1b), "an escape code in: {}", String::from_utf8_lossy(stream));
        }
    }
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig { cases: 64, ..Default::default() })]
    #[test]
    fn arbitrary_bytes_never_panic(bytes in proptest::collection::vec(proptest::prelude::any::<u8>(), 0..400)) {
        let dir = TempDir::new();
        let p = dir.path().join("x.csv");
        std::fs::write(&p, &bytes).unwrap();
        let _ = load(&p, &LoadOptions::default());
        let _ = load(&p, &LoadOptions { lenient: true });
        let q = dir.path().join("x.parquet");
        std::fs::write(&q, &bytes).unwrap();
        let _ = load(&q, &LoadOptions::default());
    }

    #[test]
    fn mangled_valid_files_never_panic(row in 0usize..8, col in 0usize..27, junk in "\\PC{0,12}") {
        let text = csv_with(|i, r| {
            if i != row + 1 { return r.to_string(); }
            let mut f: Vec<String> = r.split(',').map(String::from).collect();
            f[col] = junk.replace(',', ";");
            f.join(",")
        });
        let _ = messages(&text);
    }
}

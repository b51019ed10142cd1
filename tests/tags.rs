//! The staff's tags on a fixture small enough to count by hand: tag
//! filters pick exactly the snaps counted below, the by-tag breakdown's
//! numbers are those counts, the cut-up CSV carries the tag, and a tag the
//! file lacks is refused with the nearest name.

use lategame::playfile::{load, LoadOptions};
use lategame::plays::Plays;
use lategame::situation::Situation;
use lategame::splits::{self, SnapValues};
use std::path::PathBuf;

const HEADER: &str = "game,season,week,home,away,seq,period,clock,offense,defense,off_score,def_score,off_timeouts,def_timeouts,down,to_go,ball_on,kind,passer,complete,intercepted,air_yards,gain,fumble_lost,touchback,points,home_line,Pressure";

/// Dropbacks, by hand (Q = Quill Ostrander of BBB, T = Tamsin Velloway of AAA):
///
/// | seq | passer | what          | Pressure |
/// |-----|--------|---------------|----------|
/// | 2   | Q      | complete +8   | yes      |
/// | 3   | Q      | incomplete    | yes      |
/// | 4   | Q      | sack −7       | yes      |
/// | 5   | Q      | complete +12  | no       |
/// | 6   | Q      | intercepted   | no       |
/// | 7   | T      | complete +5   | no       |
/// | 8   | T      | incomplete    | yes      |
/// | 9   | T      | sack −6       | yes      |
/// | 10  | T      | complete +20  | (empty)  |
///
/// plus a kickoff (seq 1) and a run (seq 11, Pressure no; not a dropback).
const ROWS: &[&str] = &[
    "G1,2024,1,AAA,BBB,1,1,15:00,AAA,BBB,0,0,3,3,,,35,kickoff,,,,,,,true,0,3.5,",
    "G1,2024,1,AAA,BBB,2,1,14:55,BBB,AAA,0,0,3,3,1,10,25,pass,Quill Ostrander,true,false,6,8,false,,0,3.5,yes",
    "G1,2024,1,AAA,BBB,3,1,14:30,BBB,AAA,0,0,3,3,2,2,33,pass,Quill Ostrander,false,false,10,0,false,,0,3.5,yes",
    "G1,2024,1,AAA,BBB,4,1,14:25,BBB,AAA,0,0,3,3,3,2,33,sack,Quill Ostrander,,,,-7,false,,0,3.5,yes",
    "G1,2024,1,AAA,BBB,5,1,14:00,BBB,AAA,0,0,3,3,4,9,26,pass,Quill Ostrander,true,false,9,12,false,,0,3.5,no",
    "G1,2024,1,AAA,BBB,6,1,13:30,BBB,AAA,0,0,3,3,1,10,38,pass,Quill Ostrander,false,true,15,0,false,,0,3.5,no",
    "G1,2024,1,AAA,BBB,7,1,13:20,AAA,BBB,0,0,3,3,1,10,40,pass,Tamsin Velloway,true,false,3,5,false,,0,3.5,no",
    "G1,2024,1,AAA,BBB,8,1,12:50,AAA,BBB,0,0,3,3,2,5,45,pass,Tamsin Velloway,false,false,12,0,false,,0,3.5,yes",
    "G1,2024,1,AAA,BBB,9,1,12:45,AAA,BBB,0,0,3,3,3,5,45,sack,Tamsin Velloway,,,,-6,false,,0,3.5,YES",
    "G1,2024,1,AAA,BBB,10,1,12:10,AAA,BBB,0,0,3,3,4,11,39,pass,Tamsin Velloway,true,false,15,20,false,,0,3.5,",
    "G1,2024,1,AAA,BBB,11,1,11:40,AAA,BBB,0,0,3,3,1,10,59,run,,,,,3,false,,0,3.5,no",
];

fn fixture() -> Plays {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target").join("test-tags");
    std::fs::create_dir_all(&dir).unwrap();
    // One file per call: the tests run at the same time.
    static NEXT: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
    let path = dir.join(format!("tagged-{}-{}.csv", std::process::id(), NEXT.fetch_add(1, std::sync::atomic::Ordering::SeqCst)));
    std::fs::write(&path, format!("{HEADER}\n{}\n", ROWS.join("\n"))).unwrap();
    load(&path, &LoadOptions::default()).unwrap_or_else(|e| panic!("{e}")).plays
}

struct Zeros {
    epa: Vec<f64>,
    wp: Vec<f64>,
    wpa: Vec<f64>,
    cp: Vec<f64>,
}

fn zeros(n: usize) -> Zeros {
    Zeros { epa: vec![0.0; n], wp: vec![0.5; n], wpa: vec![0.0; n], cp: vec![0.6; n] }
}

fn values(z: &Zeros) -> SnapValues<'_> {
    SnapValues { epa: &z.epa, wp: &z.wp, wpa: &z.wpa, cp: &z.cp, choice: &[], execution: &[], league_sticks: &[] }
}

fn seqs(p: &Plays, z: &Zeros, query: &str, passer: Option<&str>) -> Vec<i32> {
    let s = Situation::from_query_string(query).unwrap();
    s.check_tags(p).unwrap();
    splits::play_list(p, &values(z), &s, passer, None).iter().map(|x| x.seq).collect()
}

#[test]
fn tag_filters_pick_the_snaps_counted_by_hand() {
    let p = fixture();
    let z = zeros(p.len());
    assert_eq!(p.tags.names, vec!["pressure"]);
    // "YES" on seq 9 is its own value in the file; the filter ignores case.
    assert_eq!(p.tags.values[0], vec!["YES", "no", "yes"]);
    assert_eq!(seqs(&p, &z, "tag.pressure=yes", None), vec![2, 3, 4, 8, 9]);
    assert_eq!(seqs(&p, &z, "tag.pressure=no", None), vec![5, 6, 7]);
    assert_eq!(seqs(&p, &z, "tag.pressure=yes,no", None), vec![2, 3, 4, 5, 6, 7, 8, 9]);
    assert_eq!(seqs(&p, &z, "tag.pressure=~e", None), vec![2, 3, 4, 8, 9]);
    assert_eq!(seqs(&p, &z, "tag.pressure=yes", Some("Quill Ostrander")), vec![2, 3, 4]);
    assert_eq!(seqs(&p, &z, "tag.pressure=yes&down=3", None), vec![4, 9]);
    assert_eq!(seqs(&p, &z, "", None).len(), 9, "every dropback without a tag filter");
    // The split table's league counts under the filter.
    let s = Situation::from_query_string("tag.pressure=yes").unwrap();
    let t = splits::split_table(&p, &values(&z), &s, 1);
    assert_eq!(t.league_dropbacks, 5);
    let j = splits::metric_index("sacks").unwrap();
    assert_eq!(t.league[j], Some(2.0));
}

#[test]
fn unknown_tags_and_values_are_refused_with_the_nearest() {
    let p = fixture();
    let e = Situation::from_query_string("tag.presure=yes").unwrap().check_tags(&p).unwrap_err().to_string();
    assert_eq!(e, "tag.presure=yes: unknown tag 'presure'; did you mean 'tag.pressure'?");
    let e = Situation::from_query_string("tag.pressure=yse").unwrap().check_tags(&p).unwrap_err().to_string();
    assert_eq!(e.to_lowercase(), "tag.pressure=yse: 'yse' is not a value of tag pressure; did you mean 'yes'?");
}

#[test]
fn the_breakdown_is_the_hand_count_per_value() {
    let p = fixture();
    let z = zeros(p.len());
    let every = Situation::default();
    let b = splits::tag_breakdown(&p, &values(&z), "Quill Ostrander", &every, "pressure", 1).unwrap();
    assert_eq!(b.header, "Pressure");
    let vals: Vec<&str> = b.lines.iter().map(|l| l.value.as_str()).collect();
    // "YES" and "yes" are one value (filters ignore case), spelled as most snaps spell it.
    assert_eq!(vals, vec!["yes", "no"]);
    let line = |v: &str| b.lines.iter().find(|l| l.value == v).unwrap();
    let idx = |k: &str| splits::metric_index(k).unwrap();
    // "yes" (matched without case: seq 2, 3, 4, 8, 9): Quill 3 dropbacks,
    // 2 throws, 1 caught, 1 sack; the league 5 dropbacks, 2 sacks.
    let yes = line("yes");
    let q = yes.row.as_ref().expect("Quill has dropbacks under pressure");
    assert_eq!(q.dropbacks, 3);
    assert_eq!(q.cells[idx("attempts")].value, Some(2.0));
    assert_eq!(q.cells[idx("comp_pct")].value, Some(50.0));
    assert!((q.cells[idx("sack_rate")].value.unwrap() - 100.0 / 3.0).abs() < 1e-9);
    assert_eq!(yes.league_dropbacks, 5);
    assert_eq!(yes.league[idx("sack_rate")], Some(40.0));
    // "no" (seq 5, 6, 7): Quill 2 throws, 1 caught, 1 intercepted; league 3 dropbacks.
    let no = line("no");
    let q = no.row.as_ref().unwrap();
    assert_eq!(q.dropbacks, 2);
    assert_eq!(q.cells[idx("int_rate")].value, Some(50.0));
    assert_eq!(q.cells[idx("comp_pct")].value, Some(50.0));
    assert_eq!(no.league_dropbacks, 3);
    assert!((no.league[idx("comp_pct")].unwrap() - 200.0 / 3.0).abs() < 1e-9);
    assert_eq!(no.league[idx("int_rate")].map(|x| (x * 1e6).round() / 1e6), Some((100.0f64 / 3.0 * 1e6).round() / 1e6));
    // Each line links to its snaps: the tag filter is in the query.
    assert!(no.query.contains(&("tag.pressure".to_string(), "no".to_string())));
    // The cell counts its throws (two passers are too few to fit a prior;
    // the estimate comes from the split engine as in the explorer).
    assert_eq!(q.cells[idx("comp_pct")].n, 2.0);
    assert!(splits::tag_breakdown(&p, &values(&z), "Quill Ostrander", &every, "presure", 1).is_err());
}

#[test]
fn the_cutup_carries_the_tags() {
    let p = fixture();
    let z = zeros(p.len());
    let s = Situation::from_query_string("tag.pressure=no").unwrap();
    let snaps = splits::play_list(&p, &values(&z), &s, None, None);
    let csv = lategame::export::cutup_csv(&snaps);
    let mut lines = csv.lines();
    assert!(lines.next().unwrap().ends_with(",tag.pressure"));
    assert_eq!(lines.clone().count(), 3);
    assert!(lines.all(|l| l.ends_with(",no")));
}

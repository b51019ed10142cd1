//! The typed Parquet path against the text path on the same data: every
//! cell read as it is must give the league and the messages that reading
//! the column as text gives (the text path is the reference).

use super::*;
use crate::playfile::read::{text_of, RawColumn};
use crate::playfile::COLUMNS;
use polars::prelude::*;
use std::io::Cursor;

/// The table read through the typed path (Parquet bytes of `df`).
fn typed(df: &mut DataFrame) -> RawTable {
    let mut bytes = Vec::new();
    ParquetWriter::new(&mut bytes).finish(df).expect("parquet");
    read_table("t.parquet", std::path::Path::new("t.parquet"), &bytes).unwrap_or_else(|i| panic!("{i:?}"))
}

/// The same frame with every column cast to text, as the loader read
/// every file before (the reference).
fn text(df: &DataFrame) -> RawTable {
    let columns = COLUMNS
        .iter()
        .map(|c| df.column(c.name).ok().map(|col| RawColumn::Text(text_of("t.parquet", col).expect("text"))))
        .collect();
    RawTable { file: "t.parquet".into(), height: df.height(), columns, tags: Vec::new(), mapped: None }
}

/// Messages (strict) or the league (files cleared).
fn outcome(t: RawTable) -> Result<Plays, Vec<String>> {
    match load_with(vec![t], &LoadOptions::default(), LoadReport::default()) {
        Ok(l) => Ok(Plays { files: Vec::new(), ..l.plays }),
        Err(e) => Err(e.report.issues.iter().map(|i| i.to_string()).collect()),
    }
}

#[test]
fn a_simulated_season_reads_the_same_typed_and_as_text() {
    // The bundled demo league (written by `rows_frame`), its first 30,000
    // rows. (Read from disk, not simulated: `playfile` does not import `sim`.)
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/demo-data/league.parquet");
    let file = std::fs::File::open(path).expect("the demo league");
    let mut df = ParquetReader::new(file).finish().expect("parquet").slice(0, 30_000);
    let a = typed(&mut df);
    assert!(matches!(a.columns[1], Some(RawColumn::Int32(_))), "season is read as numbers");
    assert!(matches!(a.columns[19], Some(RawColumn::Bool(_))), "complete is read as true/false");
    let a = outcome(a).expect("typed loads");
    let b = outcome(text(&df)).expect("text loads");
    assert_eq!(a, b);
    assert!(a.len() > 29_000);
}

const HEADER: &str = "game,season,week,home,away,seq,period,clock,offense,defense,off_score,def_score,off_timeouts,def_timeouts,down,to_go,ball_on,kind,passer,complete,intercepted,air_yards,gain,fumble_lost,touchback,points,home_line";
const ROWS: &[&str] = &[
    "G1,2024,1,AAA,BBB,1,1,900,AAA,BBB,0,0,3,3,,,35,kickoff,,,,,,,true,0,3.5",
    "G1,2024,1,AAA,BBB,2,1,900,BBB,AAA,0,0,3,3,1,10,25,pass,Quill Ostrander,true,false,8,12,false,,0,3.5",
    "G1,2024,1,AAA,BBB,3,1,870,BBB,AAA,0,0,3,3,1,10,37,run,,,,,4,false,,0,3.5",
    "G1,2024,1,AAA,BBB,4,1,840,BBB,AAA,0,0,3,3,2,6,41,sack,Quill Ostrander,,,,-7,false,,0,3.5",
    "G1,2024,1,AAA,BBB,5,1,800,BBB,AAA,0,0,3,3,3,13,34,pass,Quill Ostrander,true,false,20,66,false,,6,3.5",
    "G1,2024,1,AAA,BBB,6,1,790,BBB,AAA,6,0,3,3,,,98,extra_point,,,,,,,,1,3.5",
    "G1,2024,1,AAA,BBB,7,1,790,BBB,AAA,7,0,3,3,,,35,kickoff,,,,,,,true,0,3.5",
    "G1,2024,1,AAA,BBB,8,4,5,AAA,BBB,0,7,3,3,1,10,25,kneel,,,,,-1,,,0,3.5",
];

/// The rows with field `col` of data row `row` (1-based) set to `value`,
/// read by polars with types inferred (a column with a decimal becomes
/// floats, one with a word text).
fn frame_with(row: usize, col: &str, value: &str) -> DataFrame {
    let idx = HEADER.split(',').position(|h| h == col).expect("column");
    let mut s = format!("{HEADER}\n");
    for (i, r) in ROWS.iter().enumerate() {
        let mut f: Vec<String> = r.split(',').map(String::from).collect();
        if i + 1 == row {
            f[idx] = value.to_string();
        }
        s.push_str(&f.join(","));
        s.push('\n');
    }
    CsvReadOptions::default()
        .with_has_header(true)
        .with_infer_schema_length(Some(100))
        .into_reader_with_file_handle(Cursor::new(s.into_bytes()))
        .finish()
        .expect("csv")
}

#[test]
fn typed_cells_give_the_text_paths_messages() {
    let cases: &[(usize, &str, &str)] = &[
        (2, "season", "0"),
        (2, "season", "99999999999"),
        (2, "week", "31"),
        (3, "down", "6"),
        (4, "down", "2.5"),
        (4, "down", "2.0"),
        (4, "to_go", "6.5"),
        (4, "to_go", "6.0"),
        (2, "to_go", "80"),
        (1, "down", "1"),
        (1, "down", "0"),
        (2, "ball_on", "0"),
        (2, "clock", "901"),
        (2, "clock", "899.5"),
        (2, "off_timeouts", "4"),
        (2, "complete", "2"),
        (2, "complete", "1"),
        (2, "intercepted", "true"),
        (2, "air_yards", "2.5"),
        (2, "air_yards", "-31"),
        (2, "gain", "100"),
        (3, "points", "3"),
        (2, "points", "1.5"),
        (2, "home_line", "80.5"),
        (2, "home_line", "1e300"),
        (2, "home_line", "-0.1"),
        (2, "seq", "1"),
        (2, "def_score", "-1"),
        (2, "fumble_lost", "7"),
    ];
    for &(row, col, value) in cases {
        let mut df = frame_with(row, col, value);
        let got = outcome(typed(&mut df));
        let want = outcome(text(&df));
        assert_eq!(got, want, "{col} = {value} on row {row}");
    }
}

//! CSV views of split tables and play lists (the video staff's cut-up).
//! Every text cell that a spreadsheet could take for a formula is
//! neutralised.

use crate::numfmt::plain;
use crate::splits::{Cell, Snap, SplitTable, Stat, METRICS};
use std::borrow::Cow;

/// Text a spreadsheet could take for a formula (beginning with `=`, `+`,
/// `-`, `@`, a tab or a carriage return) gets a leading `'`, unless the
/// whole cell is a plain number such as `-0.52` or `+20`.
fn neutralise(s: &str) -> Cow<'_, str> {
    let risky = s.starts_with(['=', '+', '-', '@', '\t', '\r']);
    if risky && s.parse::<f64>().is_err() {
        Cow::Owned(format!("'{s}"))
    } else {
        Cow::Borrowed(s)
    }
}

/// Rows written with the `csv` crate, every cell neutralised.
struct CsvText(csv::Writer<Vec<u8>>);

impl CsvText {
    fn new() -> CsvText {
        // Flexible: a record of any length is accepted, so writing to memory
        // cannot fail.
        CsvText(csv::WriterBuilder::new().flexible(true).from_writer(Vec::new()))
    }
    fn row<S: AsRef<str>>(&mut self, cells: &[S]) {
        let written = self.0.write_record(cells.iter().map(|c| neutralise(c.as_ref()).into_owned()));
        debug_assert!(written.is_ok(), "writing CSV to memory: {written:?}");
    }
    fn finish(self) -> String {
        // Flushing into memory cannot fail.
        let bytes = self.0.into_inner().unwrap_or_default();
        // Every cell went in as UTF-8 text, so the output is UTF-8.
        String::from_utf8(bytes).unwrap_or_else(|e| String::from_utf8_lossy(e.as_bytes()).into_owned())
    }
}

/// One cell as it appears in our CSV files: neutralised (see `neutralise`)
/// and quoted when it holds a comma, a quote or a line break.
pub fn safe_cell(s: &str) -> String {
    if s.is_empty() {
        return String::new();
    }
    let mut out = CsvText::new();
    out.row(&[s]);
    let mut text = out.finish();
    text.pop(); // the record's line break
    text
}

/// The cut-up: one row per snap for the video staff, each thing the video
/// operator cues by in its own column.
pub fn cutup_csv(snaps: &[Snap]) -> String {
    cutup_rows(snaps, None, true)
}

/// The cut-up in pieces, for streaming a long list: the header line, then
/// `cutup_piece` for each run of snaps, concatenated, equal `cutup_csv`.
pub fn cutup_head(tag_names: &[String]) -> String {
    let mut out = CsvText::new();
    let head: Vec<String> = CUTUP_COLUMNS.iter().map(|c| c.to_string()).chain(tag_names.iter().map(|n| format!("tag.{n}"))).collect();
    out.row(&head);
    out.finish()
}

/// Rows of the cut-up without the header line.
pub fn cutup_piece(snaps: &[Snap]) -> String {
    cutup_rows(snaps, None, false)
}

/// A saved cut-up list: the cut-up with the staff's notes on each snap
/// (`notes[k]` belongs to `snaps[k]`).
pub fn cutup_csv_with_notes(snaps: &[Snap], notes: &[String]) -> String {
    cutup_rows(snaps, Some(notes), true)
}

/// A file name in words a video staff can sort by: `prefix`, then each
/// non-empty part, letters and digits kept, anything else a hyphen
/// ("cutup-DUV-Tiernan-Ivusk-end-of-game-2025.csv").
pub fn file_name(prefix: &str, parts: &[String], ext: &str) -> String {
    let mut words: Vec<String> = vec![prefix.to_string()];
    for p in parts {
        let cleaned: String = p.chars().map(|c| if c.is_ascii_alphanumeric() { c } else { '-' }).collect();
        let joined = cleaned.split('-').filter(|w| !w.is_empty()).collect::<Vec<_>>().join("-");
        if !joined.is_empty() {
            words.push(joined);
        }
    }
    let mut stem = words.join("-");
    stem.truncate(120);
    format!("{}.{ext}", stem.trim_end_matches('-'))
}

/// The parts that name a cut-up or a report: the team (the filter's, else
/// the one offense all the snaps share), the passer, the situation (its
/// preset's key or "custom", and the play results asked for) and the
/// seasons (asked for, else those the snaps span).
pub fn name_parts(s: &crate::situation::Situation, snaps: &[Snap]) -> Vec<String> {
    let shared = snaps.first().map(|x| x.offense.clone()).filter(|first| snaps.iter().all(|x| &x.offense == first));
    name_parts_from(s, shared, &snaps.iter().map(|x| x.season).collect::<Vec<_>>())
}

/// `name_parts` from what the snaps share: the one offense they all have
/// (if any) and their seasons.
pub fn name_parts_from(s: &crate::situation::Situation, shared_offense: Option<String>, snap_seasons: &[i32]) -> Vec<String> {
    let team = s.offense.clone().or(shared_offense);
    // The preset's window untouched (who, when and the result aside) keeps its key.
    let window = crate::situation::Situation { seasons: None, weeks: None, site: None, offense: None, opponent: None, passer: None, results: None, ..s.clone() };
    let situation = match s.preset {
        Some(p) if window == s.base() => p.key().to_string(),
        Some(p) => format!("{}-custom", p.key()),
        None => "custom".to_string(),
    };
    let results = s.results.as_ref().map(|rs| rs.iter().map(|r| r.key()).collect::<Vec<_>>().join("-")).unwrap_or_default();
    let seasons = match &s.seasons {
        Some(v) => span(v),
        None => span(snap_seasons),
    };
    vec![team.unwrap_or_default(), s.passer.clone().unwrap_or_default(), situation, results, seasons]
}

/// "2025", "2020-2025" (first to last), "" for none.
fn span(seasons: &[i32]) -> String {
    match (seasons.iter().min(), seasons.iter().max()) {
        (Some(a), Some(b)) if a == b => a.to_string(),
        (Some(a), Some(b)) => format!("{a}-{b}"),
        _ => String::new(),
    }
}

/// The cut-up's column names, in order (without the notes column).
pub const CUTUP_COLUMNS: [&str; 20] = [
    "game", "season", "week", "seq", "quarter", "clock", "offense", "defense", "score", "down", "to_go", "yard_line", "drive", "play_in_drive", "kind",
    "passer", "result", "epa", "wpa", "down_distance",
];

fn cutup_rows(snaps: &[Snap], notes: Option<&[String]>, with_head: bool) -> String {
    let mut out = CsvText::new();
    let mut head: Vec<String> = CUTUP_COLUMNS.iter().map(|c| c.to_string()).collect();
    // The staff's tags after our columns, as `tag.NAME` (the query's spelling).
    if let Some(first) = snaps.first() {
        head.extend(first.tags.iter().map(|(n, _)| format!("tag.{n}")));
    }
    if notes.is_some() {
        head.push("notes".into());
    }
    if with_head {
        out.row(&head);
    }
    let opt = |v: Option<i32>| v.map(|x| x.to_string()).unwrap_or_default();
    for (k, s) in snaps.iter().enumerate() {
        let mut cells = vec![
            s.game.clone(),
            s.season.to_string(),
            s.week.to_string(),
            s.seq.to_string(),
            s.quarter.clone(),
            s.clock.clone(),
            s.offense.clone(),
            s.defense.clone(),
            s.score.clone(),
            opt(s.down),
            opt(s.to_go),
            s.spot.clone(),
            s.drive.to_string(),
            s.play_in_drive.to_string(),
            s.kind.to_string(),
            s.passer.clone().unwrap_or_default(),
            s.result.clone(),
            plain(Some(s.epa), 3),
            plain(Some(s.wpa), 4),
            s.down_distance.clone(),
        ];
        cells.extend(s.tags.iter().map(|(_, v)| v.clone()));
        if let Some(n) = notes {
            cells.push(n.get(k).cloned().unwrap_or_default());
        }
        out.row(&cells);
    }
    out.finish()
}

#[cfg(test)]
mod name_tests {
    use super::*;
    use crate::situation::{decode_pairs, Situation};

    fn sit(q: &str) -> Situation {
        Situation::from_query(&decode_pairs(q)).expect("query")
    }

    #[test]
    fn file_names_say_team_passer_situation_and_seasons() {
        let s = sit("preset=end-of-game&team=DUV&passer=Tiernan Ivusk&season=2024,2025&result=interception");
        assert_eq!(file_name("cutup", &name_parts(&s, &[]), "csv"), "cutup-DUV-Tiernan-Ivusk-end-of-game-interception-2024-2025.csv");
        let s = sit("preset=end-of-game&down=3");
        assert_eq!(file_name("cutup", &name_parts(&s, &[]), "csv"), "cutup-end-of-game-custom.csv");
        assert_eq!(file_name("cutup", &name_parts(&sit("down=3"), &[]), "csv"), "cutup-custom.csv");
        // Odd characters never reach the file name.
        assert_eq!(file_name("report", &["A/B \"x\"".to_string(), String::new(), "2025".into()], "pdf"), "report-A-B-x-2025.pdf");
    }
}


/// What follows each rate or mean metric's value in the split CSV: column
/// suffix, the cell's number, and whether it is in the metric's units (else a
/// share or a percentile, with its own decimals).
type CellCol = (&'static str, fn(&Cell) -> Option<f64>, Option<usize>);
const CELL_COLS: &[CellCol] = &[
    ("league", |c| c.league, None),
    ("adjusted_league", |c| c.adjusted_league, None),
    ("estimate", |c| c.estimate, None),
    ("lo90", |c| c.lo, None),
    ("hi90", |c| c.hi, None),
    ("signal", |c| c.signal, Some(3)),
    ("percentile", |c| c.percentile, Some(0)),
    ("p_better", |c| c.p_better, Some(3)),
    ("normal", |c| c.normal, None),
    ("lift", |c| c.lift, None),
    ("lift_lo90", |c| c.lift_lo, None),
    ("lift_hi90", |c| c.lift_hi, None),
    ("lift_signal", |c| c.lift_signal, Some(3)),
];

/// The opponent-adjusted EPA columns at the end of each splits CSV row, in
/// `PasserRow` field order.
pub const OPP_COLS: [&str; 4] = ["epa_opp_adj", "epa_opp_adj_lo90", "epa_opp_adj_hi90", "epa_opp_faced"];

/// The split table: per passer (or offense, or defense: the first column
/// is named for the table's grouping), each metric's value, estimate and
/// interval, his normal and his lift with its interval.
pub fn split_csv(t: &SplitTable) -> String {
    let mut head = vec![t.group.key().to_string(), "team".to_string(), "qualified".to_string()];
    for m in METRICS {
        head.push(m.key.to_string());
        if m.stat != Stat::Count {
            for (suffix, _, _) in CELL_COLS {
                head.push(format!("{}_{suffix}", m.key));
            }
        }
    }
    // EPA per dropback against an average defense (`splits::opponent`).
    head.extend(OPP_COLS.iter().map(|c| c.to_string()));
    let mut out = CsvText::new();
    out.row(&head);
    // Counts are whole numbers; the rest carry one more decimal than the page.
    let places = |m: &crate::splits::MetricDef| if m.stat == Stat::Count && m.decimals == 0 { 0 } else { m.decimals + 1 };
    let mut league = vec!["LEAGUE".to_string(), String::new(), String::new()];
    for (j, m) in METRICS.iter().enumerate() {
        league.push(plain(t.league_row[j], places(m)));
        if m.stat != Stat::Count {
            league.extend(std::iter::repeat_n(String::new(), CELL_COLS.len()));
        }
    }
    league.extend(std::iter::repeat_n(String::new(), OPP_COLS.len()));
    out.row(&league);
    for r in &t.rows {
        let mut cells = vec![r.passer.clone(), r.team.clone(), r.qualified.to_string()];
        for (j, m) in METRICS.iter().enumerate() {
            let c = &r.cells[j];
            let d = places(m);
            cells.push(plain(c.value, d));
            if m.stat != Stat::Count {
                for (_, get, own) in CELL_COLS {
                    cells.push(plain(get(c), own.unwrap_or(d)));
                }
            }
        }
        for x in [r.epa_opp_adj, r.epa_opp_adj_lo, r.epa_opp_adj_hi, r.epa_opp_faced] {
            cells.push(plain(x, 4));
        }
        out.row(&cells);
    }
    out.finish()
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// The rule written out by hand: neutralise, then quote a cell holding
    /// a comma, a quote or a line break (RFC 4180), doubling its quotes.
    fn twin(s: &str) -> String {
        let risky = s.starts_with(['=', '+', '-', '@', '\t', '\r']);
        let s = if risky && s.parse::<f64>().is_err() { format!("'{s}") } else { s.to_string() };
        if s.contains([',', '"', '\n', '\r']) {
            format!("\"{}\"", s.replace('"', "\"\""))
        } else {
            s
        }
    }

    proptest! {
        #[test]
        fn the_csv_writer_quotes_as_the_rule_says(s in "[a-z=+@,\"\n\r\t 0-9.-]{0,12}") {
            prop_assert_eq!(safe_cell(&s), twin(&s));
        }

        #[test]
        fn rows_are_the_cells_joined(cells in proptest::collection::vec("[a-z=+,\" -]{0,6}", 2..5)) {
            let mut out = CsvText::new();
            out.row(&cells);
            let want = cells.iter().map(|c| twin(c)).collect::<Vec<_>>().join(",") + "\n";
            prop_assert_eq!(out.finish(), want);
        }
    }

    #[test]
    fn formula_cells_are_neutralised() {
        // source: common practice (spreadsheet formula injection), no source
        assert_eq!(safe_cell("=HYPERLINK(\"x\")"), "\"'=HYPERLINK(\"\"x\"\")\"");
        assert_eq!(safe_cell("+cmd"), "'+cmd");
        assert_eq!(safe_cell("-2+3"), "'-2+3");
        assert_eq!(safe_cell("@SUM(A1)"), "'@SUM(A1)");
        assert_eq!(safe_cell("-35"), "-35");
        assert_eq!(safe_cell("-0.52"), "-0.52");
        assert_eq!(safe_cell("+20"), "+20");
        assert_eq!(safe_cell("Kel, Harbor"), "\"Kel, Harbor\"");
        assert_eq!(safe_cell("plain"), "plain");
    }
}

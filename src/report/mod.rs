//! The one-page situation report: one passer in one situation against the
//! league, built from a single split-engine call, shown as print-ready HTML
//! (askama) or as a one-page PDF drawn here with krilla.

mod html;
mod list;
mod pdf;

pub use html::{html, REPORT_CSS};
pub use list::{ListSheet, ListSheetRow, LIST_COLUMNS};
pub use pdf::{render_list_pdf, render_pdf};

use crate::charts::{self, BarItem, DotRow, Figure};
use crate::league::League;
use crate::plays::Plays;
use crate::situation::Situation;
use crate::splits::{self, metric_index, Cell, Snap, SnapValues, METRICS};
use std::collections::HashMap;

/// Page size; both are printed landscape.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Paper {
    #[default]
    Letter,
    A4,
}

impl Paper {
    /// `letter` or `a4` (case-insensitive; empty means letter).
    pub fn parse(s: &str) -> Option<Paper> {
        match s.trim().to_ascii_lowercase().as_str() {
            "" | "letter" | "us-letter" => Some(Paper::Letter),
            "a4" => Some(Paper::A4),
            _ => None,
        }
    }
    pub fn key(self) -> &'static str {
        match self {
            Paper::Letter => "letter",
            Paper::A4 => "a4",
        }
    }
    /// Landscape width and height in PDF points.
    pub fn size_pt(self) -> (f32, f32) {
        match self {
            Paper::Letter => (792.0, 612.0),
            Paper::A4 => (841.89, 595.28),
        }
    }
}

/// Why a report could not be made, in words a coach can act on.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    #[error("no passer named '{0}' in this league; check the spelling on the splits page")]
    UnknownPasser(String),
    #[error("{passer} has no dropbacks in {situation}; pick another situation or season")]
    NoDropbacks { passer: String, situation: String },
    #[error("could not write the PDF: {0}")]
    Pdf(String),
}

/// The metrics on the page, in order.
pub const KEY_METRICS: [&str; 8] = ["epa", "success", "cpoe", "rating", "anya", "sack_rate", "int_rate", "wpa"];

/// The reading notes printed at the foot of the page (HTML and PDF).
pub const FOOTNOTES: [&str; 4] = [
    "EPA: expected points added, the change in the offense's expected points over the snap. CPOE: completion % over expected, caught % minus the model's completion chance of each throw.",
    "ANY/A: adjusted net yards per attempt: pass yards less sack yards, +20 per touchdown pass, -45 per interception, over throws plus sacks. WPA: win probability added, the change in the offense's chance of winning over the snap.",
    "Estimate: our number pulled toward his own level on his other snaps plus the league's shift here, by as much as it could be luck (a two-level model); 90% range: where his true level likely sits. Lift: his value here minus his normal. League: every passer in the same situation and seasons.",
    "Pct: percentile among qualified passers, 100 = best (for sacked % and INT %, low is good). Signal: how much of the estimate rests on his own snaps rather than the league.",
];

/// Where the numbers come from: stamped in the header.
#[derive(Debug, Clone, PartialEq)]
pub struct Provenance {
    pub fingerprint: String,
    pub model_version: String,
    /// YYYY-MM-DD.
    pub date: String,
}

/// One metric row: the split engine's cell as is, plus its display strings.
#[derive(Debug, Clone)]
pub struct KeyMetric {
    pub key: &'static str,
    pub label: &'static str,
    pub short: &'static str,
    pub higher_is_better: bool,
    pub decimals: usize,
    pub cell: Cell,
    pub value: String,
    pub estimate: String,
    /// "lo to hi".
    pub interval: String,
    pub league: String,
    pub percentile: String,
    pub signal: String,
    /// How many snaps it is taken over.
    pub n: String,
    /// The same with their kind, e.g. "58 attempts".
    pub basis: String,
    /// His lift with its 90% range, "-0.13 (-0.24 to -0.02)", or "–".
    pub lift: String,
    /// The lift in words under `splits::LIFT_RULE`, or "–".
    pub lift_words: String,
}

/// One snap in the biggest-plays lists.
#[derive(Debug, Clone)]
pub struct SnapLine {
    pub snap: Snap,
    /// "W7 @ KRV"; "'24 W7 @ KRV" when the report spans several seasons.
    pub game: String,
    /// "Q4 2:13", "OT 6:40".
    pub when: String,
    pub score: String,
    pub down_distance: String,
    pub spot: String,
    pub result: String,
    /// Signed, three decimals.
    pub wpa: String,
}

/// The passer's summed WPA in one game of the situation.
#[derive(Debug, Clone)]
pub struct GameWpa {
    pub game: String,
    pub label: String,
    pub dropbacks: u32,
    pub wpa: f64,
}

/// Everything on the page. Numbers are the split engine's, untouched.
#[derive(Debug, Clone)]
pub struct ReportData {
    pub passer: String,
    pub team: String,
    /// The situation in words (the split table's own description).
    pub situation: String,
    /// What the situation is, filter by filter, in words.
    pub definition: String,
    /// One plain line: better, worse or not told apart from the league.
    pub verdict: String,
    /// The situation as query parameters (the JSON API gives the same
    /// numbers for this query).
    pub query: Vec<(String, String)>,
    pub seasons: Vec<i32>,
    pub seasons_label: String,
    pub provenance: Provenance,
    pub min_dropbacks: u32,
    pub dropbacks: u32,
    pub qualified: bool,
    pub league_dropbacks: u32,
    pub passers: usize,
    pub qualified_passers: usize,
    pub metrics: Vec<KeyMetric>,
    pub sample_note: String,
    /// The key numbers where he is not about his normal, in a sentence.
    pub lift_note: String,
    pub best: Vec<SnapLine>,
    pub worst: Vec<SnapLine>,
    pub games: Vec<GameWpa>,
    /// One small dot-and-interval chart per key metric (own scale each).
    pub metric_charts: Vec<Figure>,
    /// Per-game WPA bars.
    pub game_chart: Figure,
}

/// Width in figure units of each metric's row chart and of the bar chart.
const ROW_CHART_W: f64 = 480.0;
const BAR_CHART_W: f64 = 620.0;
const BAR_CHART_H: f64 = 250.0;

/// The situation the report is computed on: the given one, for the current
/// (latest) season when it names none, without a passer filter (the
/// passer is the report's subject, not a filter on the league).
pub fn report_situation(p: &Plays, s: &Situation) -> Situation {
    let mut out = s.clone();
    out.passer = None;
    if out.seasons.is_none() {
        if let Some(&last) = p.seasons().last() {
            out.seasons = Some(vec![last]);
        }
    }
    out
}

impl ReportData {
    /// The report for `passer` in `situation` (current season when it names
    /// none), from an opened league.
    pub fn build(league: &League, situation: &Situation, passer: &str, min_dropbacks: u32) -> Result<ReportData, ReportError> {
        let provenance = Provenance {
            fingerprint: league.scored.fingerprint.clone(),
            model_version: crate::models::MODEL_VERSION.to_string(),
            date: today(),
        };
        ReportData::from_parts(league.plays(), &league.values(), provenance, situation, passer, min_dropbacks)
    }

    /// The report from plays and their model values. Calls the split
    /// engine once for the table (focused on `passer`) and once for the
    /// snaps behind it.
    pub fn from_parts(
        p: &Plays,
        v: &SnapValues,
        provenance: Provenance,
        situation: &Situation,
        passer: &str,
        min_dropbacks: u32,
    ) -> Result<ReportData, ReportError> {
        if p.passer_index(passer).is_none() {
            return Err(ReportError::UnknownPasser(passer.to_string()));
        }
        let s = report_situation(p, situation);
        // Focus on the subject: he gets estimates even below the minimum,
        // exactly as the API gives them for `passer=` in the query.
        let table = splits::split_table_for(p, v, &s, min_dropbacks, Some(passer));
        let Some(row) = table.row(passer) else {
            return Err(ReportError::NoDropbacks { passer: passer.to_string(), situation: table.situation.clone() });
        };
        let metrics: Vec<KeyMetric> = KEY_METRICS
            .iter()
            .filter_map(|k| metric_index(k))
            .map(|j| key_metric(j, &row.cells[j]))
            .collect();
        let snaps = splits::play_list(p, v, &s, Some(passer), None);
        let multi = table.seasons.len() > 1;
        let (best, worst) = biggest(p, &snaps, multi, 5);
        let games = per_game(&snaps, multi);
        let metric_charts = metrics.iter().map(row_chart).collect();
        let items: Vec<BarItem> = games.iter().map(|g| BarItem { label: g.label.clone(), value: g.wpa }).collect();
        let game_chart = charts::bars(
            &format!("WPA per game, {} dropbacks in this situation", row.dropbacks),
            &items,
            BAR_CHART_W,
            BAR_CHART_H,
            &|x| format!("{x:+.2}"),
        );
        Ok(ReportData {
            passer: row.passer.clone(),
            team: row.team.clone(),
            situation: table.situation.clone(),
            definition: Situation { preset: None, passer: None, ..s.clone() }.describe(),
            verdict: verdict(&row.passer, &metrics),
            query: table.query.clone(),
            seasons_label: seasons_label(&table.seasons),
            seasons: table.seasons.clone(),
            provenance,
            min_dropbacks,
            dropbacks: row.dropbacks,
            qualified: row.qualified,
            league_dropbacks: table.league_dropbacks,
            passers: table.rows.len(),
            qualified_passers: table.qualified().count(),
            sample_note: sample_note(row.dropbacks, row.qualified, min_dropbacks),
            lift_note: lift_note(&metrics),
            metrics,
            best,
            worst,
            games,
            metric_charts,
            game_chart,
        })
    }

    /// "41 dropbacks; league 3,204 by 61 passers (28 with 20+)".
    pub fn counts_line(&self) -> String {
        format!(
            "{} dropbacks · league {} dropbacks by {} passers ({} with {}+)",
            self.dropbacks,
            crate::playfile::group(self.league_dropbacks as usize),
            self.passers,
            self.qualified_passers,
            self.min_dropbacks.max(1)
        )
    }

    /// "data 3f9a0c12 · models lategame-models-1 · 2026-12-01".
    pub fn provenance_line(&self) -> String {
        let fp: String = self.provenance.fingerprint.chars().take(12).collect();
        format!("data {} · models {} · printed {}", fp, self.provenance.model_version, self.provenance.date)
    }

    /// The situation as a query string (what the splits page and the JSON
    /// API take).
    pub fn query_string(&self) -> String {
        self.query.iter().map(|(k, v)| format!("{k}={v}")).collect::<Vec<_>>().join("&")
    }
}

/// A number at a metric's display precision; "–" when absent (the one
/// formatter in `numfmt`, named here for the report's callers).
pub use crate::numfmt::fmt_metric;

/// The plain verdict from EPA per dropback: the estimate's 90% range above
/// the league, below it, or around it.
pub fn verdict(passer: &str, metrics: &[KeyMetric]) -> String {
    let Some(m) = metrics.iter().find(|m| m.key == "epa") else {
        return "No verdict: EPA per dropback is missing.".to_string();
    };
    let c = &m.cell;
    let (Some(est), Some(lo), Some(hi), Some(lg)) = (c.estimate, c.lo, c.hi, c.league) else {
        return format!("No verdict: too few snaps for an estimate of {passer}'s EPA per dropback.");
    };
    let f = |x: f64| fmt_metric(Some(x), m.decimals);
    let (word, range) = if lo > lg {
        ("better than", "all of its 90% range above the league")
    } else if hi < lg {
        ("worse than", "all of its 90% range below the league")
    } else {
        ("not told apart from", "its 90% range takes in the league")
    };
    format!("Verdict: {passer} is {word} the league here: EPA per dropback estimate {} against the league's {} ({} to {}; {range}).", f(est), f(lg), f(lo), f(hi))
}

fn key_metric(j: usize, c: &Cell) -> KeyMetric {
    let m = &METRICS[j];
    let d = m.decimals;
    let interval = match (c.lo, c.hi) {
        (Some(lo), Some(hi)) => format!("{} to {}", fmt_metric(Some(lo), d), fmt_metric(Some(hi), d)),
        _ => "–".to_string(),
    };
    KeyMetric {
        key: m.key,
        label: m.label,
        short: m.short,
        higher_is_better: m.higher_is_better,
        decimals: d,
        cell: c.clone(),
        value: fmt_metric(c.value, d),
        estimate: fmt_metric(c.estimate, d),
        interval,
        league: fmt_metric(c.league, d),
        percentile: c.percentile.map(|x| format!("{x:.0}")).unwrap_or_else(|| "–".into()),
        signal: c.signal.map(|x| format!("{:.0}%", x * 100.0)).unwrap_or_else(|| "–".into()),
        n: format!("{}", c.n as u64),
        basis: format!("{} {}", c.n as u64, m.unit.label()),
        lift: match (c.lift, c.lift_lo, c.lift_hi) {
            (Some(l), Some(lo), Some(hi)) => format!("{} ({} to {})", fmt_metric(Some(l), d), fmt_metric(Some(lo), d), fmt_metric(Some(hi), d)),
            _ => "–".to_string(),
        },
        lift_words: splits::lift_words(m, c).unwrap_or("–").to_string(),
    }
}

/// Against his normal, in one sentence: the key numbers whose lift is not
/// "about his normal" (the rule of `splits::LIFT_RULE`).
fn lift_note(metrics: &[KeyMetric]) -> String {
    if metrics.iter().all(|m| m.cell.lift.is_none()) {
        return "Against his normal: no lift here (no snaps elsewhere to compare with, or too few snaps).".into();
    }
    let off: Vec<String> = metrics
        .iter()
        .filter(|m| m.cell.lift.is_some() && m.lift_words != "about his normal")
        .map(|m| format!("{} {} ({})", m.short, m.lift_words, m.lift))
        .collect();
    if off.is_empty() {
        "Against his normal (his other snaps): about his normal on every key number.".into()
    } else {
        format!("Against his normal (his other snaps; lift, 90% range): {}; about his normal on the rest.", off.join("; "))
    }
}

fn row_chart(m: &KeyMetric) -> Figure {
    // The column heading fits the chart's label gutter; the table has the full names.
    let name = m.short;
    let label = if m.higher_is_better { name.to_string() } else { format!("{name} (low = good)") };
    let row = DotRow {
        label,
        estimate: m.cell.estimate,
        lo: m.cell.lo,
        hi: m.cell.hi,
        raw: m.cell.value,
        league: m.cell.league,
    };
    charts::dot_interval(&format!("{}: estimate, 90% range, raw and league", m.label), &[row], ROW_CHART_W)
}

fn ordinal_period(period: i32) -> String {
    match period {
        1..=4 => format!("Q{period}"),
        5 => "OT".to_string(),
        n => format!("{}OT", n - 4),
    }
}

fn game_label(p: &Plays, s: &Snap, multi_season: bool) -> String {
    let home = s.index < p.len() && p.off_home[s.index];
    let at = if home { "vs " } else { "@ " };
    let season = if multi_season { format!("'{:02} ", s.season.rem_euclid(100)) } else { String::new() };
    format!("{season}W{} {at}{}", s.week, s.defense)
}

fn snap_line(p: &Plays, s: &Snap, multi: bool) -> SnapLine {
    SnapLine {
        game: game_label(p, s, multi),
        when: format!("{} {}", ordinal_period(s.period), s.clock),
        score: s.score.clone(),
        down_distance: s.down_distance.clone(),
        spot: s.spot.clone(),
        result: s.result.clone(),
        wpa: format!("{:+.3}", s.wpa),
        snap: s.clone(),
    }
}

/// The `k` biggest gains and losses by WPA (ties: earlier snap first).
fn biggest(p: &Plays, snaps: &[Snap], multi: bool, k: usize) -> (Vec<SnapLine>, Vec<SnapLine>) {
    let mut scored: Vec<&Snap> = snaps.iter().filter(|s| s.wpa.is_finite()).collect();
    scored.sort_by(|a, b| b.wpa.partial_cmp(&a.wpa).unwrap_or(std::cmp::Ordering::Equal).then(a.index.cmp(&b.index)));
    let best = scored.iter().filter(|s| s.wpa > 0.0).take(k).map(|s| snap_line(p, s, multi)).collect();
    scored.sort_by(|a, b| a.wpa.partial_cmp(&b.wpa).unwrap_or(std::cmp::Ordering::Equal).then(a.index.cmp(&b.index)));
    let worst = scored.iter().filter(|s| s.wpa < 0.0).take(k).map(|s| snap_line(p, s, multi)).collect();
    (best, worst)
}

/// Summed WPA per game, in game order.
fn per_game(snaps: &[Snap], multi: bool) -> Vec<GameWpa> {
    let mut order: Vec<GameWpa> = Vec::new();
    let mut at: HashMap<&str, usize> = HashMap::new();
    for s in snaps {
        let k = *at.entry(s.game.as_str()).or_insert_with(|| {
            order.push(GameWpa {
                game: s.game.clone(),
                label: if multi { format!("{}-{}", s.season.rem_euclid(100), s.week) } else { format!("W{}", s.week) },
                dropbacks: 0,
                wpa: 0.0,
            });
            order.len() - 1
        });
        order[k].dropbacks += 1;
        if s.wpa.is_finite() {
            order[k].wpa += s.wpa;
        }
    }
    order
}

fn sample_note(n: u32, qualified: bool, min: u32) -> String {
    let mut s = if n < 50 {
        format!("n = {n} dropbacks: a small sample, so the 90% ranges are wide; lean on the estimates, not the raw numbers.")
    } else if n < 150 {
        format!("n = {n} dropbacks: a fair sample; the 90% ranges still matter more than the raw numbers.")
    } else {
        format!("n = {n} dropbacks: a solid sample for this situation.")
    };
    if !qualified {
        s.push_str(&format!(" Below the {min}-dropback minimum: percentiles compare him with passers who qualify."));
    }
    s
}

fn seasons_label(seasons: &[i32]) -> String {
    match seasons {
        [] => "no seasons".to_string(),
        [one] => format!("season {one}"),
        [first, .., last] if seasons.windows(2).all(|w| w[1] == w[0] + 1) => format!("seasons {first}–{last}"),
        many => format!("seasons {}", many.iter().map(|s| s.to_string()).collect::<Vec<_>>().join(", ")),
    }
}


/// Today's date (UTC) from the system clock, YYYY-MM-DD.
pub fn today() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs())
        .unwrap_or(0);
    let (y, m, d) = civil_from_days((secs / 86_400) as i64);
    format!("{y:04}-{m:02}-{d:02}")
}

/// Days since 1970-01-01 to (year, month, day), proleptic Gregorian
/// (H. Hinnant, "chrono-Compatible Low-Level Date Algorithms").
fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    (yoe + era * 400 + i64::from(m <= 2), m, d)
}

/// The one-page PDF for `passer` in `situation` (current season when it
/// names none), at the default qualifying minimum.
pub fn pdf(league: &League, situation: &Situation, passer: &str, paper: Paper) -> anyhow::Result<Vec<u8>> {
    let data = ReportData::build(league, situation, passer, splits::DEFAULT_MIN_DROPBACKS)?;
    Ok(render_pdf(&data, paper)?)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dates_from_days() {
        // source: H. Hinnant, chrono-Compatible Low-Level Date Algorithms
        assert_eq!(civil_from_days(0), (1970, 1, 1));
        assert_eq!(civil_from_days(19_723), (2024, 1, 1));
        assert_eq!(civil_from_days(19_782), (2024, 2, 29));
        assert_eq!(civil_from_days(-1), (1969, 12, 31));
        assert_eq!(today().len(), 10);
    }

    #[test]
    fn paper_names() {
        assert_eq!(Paper::parse("letter"), Some(Paper::Letter));
        assert_eq!(Paper::parse("A4"), Some(Paper::A4));
        assert_eq!(Paper::parse("legal"), None);
        assert_eq!(Paper::default(), Paper::Letter);
    }

    #[test]
    fn labels() {
        assert_eq!(crate::playfile::group(3204), "3,204");
        assert_eq!(crate::playfile::group(999), "999");
        assert_eq!(crate::playfile::group(1_234_567), "1,234,567");
        assert_eq!(seasons_label(&[2025]), "season 2025");
        assert_eq!(seasons_label(&[2021, 2022, 2023]), "seasons 2021–2023");
        assert_eq!(seasons_label(&[2021, 2023]), "seasons 2021, 2023");
        assert_eq!(ordinal_period(4), "Q4");
        assert_eq!(ordinal_period(6), "2OT");
        assert_eq!(fmt_metric(Some(-0.1234), 3), "-0.123");
        assert_eq!(fmt_metric(None, 1), "–");
    }
}

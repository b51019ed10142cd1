//! The report's content: one passer in one situation, from a single
//! split-engine call (the table) and the snaps behind it, with every
//! number already in its display form.

use super::words::{decisions_note, situation_words, verdict, ThrowValues};
use super::{DECISION_METRICS, KEY_METRICS};
use crate::charts::{self, BarItem, DotRow, Figure};
use crate::league::League;
use crate::numfmt::fmt_metric;
use crate::plays::Plays;
use crate::situation::Situation;
use crate::splits::{self, metric_index, Cell, Snap, SnapValues, METRICS};
use std::collections::HashMap;

use super::ReportError;

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
    /// Depth choice and execution per throw (the split engine's cells, the
    /// profile's Decisions panel); empty when the file gives none.
    pub decisions: Vec<KeyMetric>,
    /// What the decision values are, or plainly why there are none.
    pub decisions_note: String,
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
const BAR_CHART_H: f64 = 170.0;

/// The situation the report is computed on: the given one, without a
/// passer filter (the passer is the report's subject, not a filter on the
/// league). No season named means every season of the file, the same rule
/// as the pages; the header names them. The report is a passer's: rows per
/// passer whatever grouping the page it came from had.
pub fn report_situation(_p: &Plays, s: &Situation) -> Situation {
    Situation { passer: None, group: crate::situation::Group::Passer, ..s.clone() }
}

impl ReportData {
    /// The report for `passer` in `situation` (every season when it names
    /// none), from an opened league.
    pub fn build(league: &League, situation: &Situation, passer: &str, min_dropbacks: u32) -> Result<ReportData, ReportError> {
        ReportData::build_in(league, &splits::SplitIndex::build(league.plays(), &league.values()), situation, passer, min_dropbacks)
    }

    /// `build` on a league already indexed (the server keeps its index).
    pub fn build_in(league: &League, ix: &splits::SplitIndex, situation: &Situation, passer: &str, min_dropbacks: u32) -> Result<ReportData, ReportError> {
        let provenance = Provenance {
            fingerprint: league.scored.fingerprint.clone(),
            model_version: crate::models::MODEL_VERSION.to_string(),
            date: super::date::today(),
        };
        ReportData::from_parts_in(ix, league.plays(), &league.values(), provenance, situation, passer, min_dropbacks)
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
        ReportData::from_parts_in(&splits::SplitIndex::build(p, v), p, v, provenance, situation, passer, min_dropbacks)
    }

    /// `from_parts` on a league already indexed (`ix` built from `p`, `v`).
    pub fn from_parts_in(
        ix: &splits::SplitIndex,
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
        let table = splits::split_table_in(ix, p, v, &s, min_dropbacks, Some(passer));
        let Some(row) = table.row(passer) else {
            return Err(ReportError::NoDropbacks { passer: passer.to_string(), situation: table.situation.clone() });
        };
        let metrics: Vec<KeyMetric> = KEY_METRICS
            .iter()
            .filter_map(|k| metric_index(k))
            .map(|j| key_metric(j, &row.cells[j]))
            .collect();
        let throws = ThrowValues::of(p, v);
        let decisions: Vec<KeyMetric> = match throws {
            ThrowValues::Valued => DECISION_METRICS.iter().filter_map(|k| metric_index(k)).map(|j| key_metric(j, &row.cells[j])).collect(),
            _ => Vec::new(),
        };
        let decisions_note = decisions_note(throws, decisions.first().map(|m| m.cell.n as u64).unwrap_or(0));
        let decisions = if decisions.iter().all(|m| m.cell.n == 0.0) { Vec::new() } else { decisions };
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
            definition: situation_words(&s),
            verdict: {
                let epa = metrics.iter().find(|m| m.key == "epa");
                verdict(&row.passer, epa.map(|m| &m.cell), epa.map(|m| m.decimals).unwrap_or(3))
            },
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
            decisions,
            decisions_note,
            best,
            worst,
            games,
            metric_charts,
            game_chart,
        })
    }

    /// The header's situation line, with the seasons it covers always said
    /// (the split table names them only when the query does).
    pub fn heading(&self) -> String {
        if self.situation.contains("season") {
            self.situation.clone()
        } else {
            format!("{}; {}", self.situation, self.seasons_label)
        }
    }

    /// "41 dropbacks; league 3,204 by 61 passers (28 with 20+)".
    pub fn counts_line(&self) -> String {
        format!(
            "{} dropbacks · league {} dropbacks by {} passers ({} with {}+)",
            self.dropbacks,
            crate::numfmt::thousands(self.league_dropbacks as usize),
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



#[cfg(test)]
mod tests {
    use super::*;

    /// A key metric whose lift is `lift` with 90% range `lo..hi`, in words.
    fn lifted(short: &'static str, lift: f64, lo: f64, hi: f64, words: &str) -> KeyMetric {
        let s = String::new;
        KeyMetric {
            key: short,
            label: short,
            short,
            higher_is_better: true,
            decimals: 1,
            cell: Cell { lift: Some(lift), lift_lo: Some(lo), lift_hi: Some(hi), ..Cell::default() },
            value: s(),
            estimate: s(),
            interval: s(),
            league: s(),
            percentile: s(),
            signal: s(),
            n: s(),
            basis: s(),
            lift: format!("{lift}"),
            lift_words: words.into(),
        }
    }

    #[test]
    fn against_his_normal_names_the_three_surest_and_counts_the_rest() {
        // Ranges symmetric about the lift: the surer a lift, the further
        // its z from zero (1.0/0.5 = 2 sds ... 0.2/0.5).
        let ms = vec![
            lifted("A", 0.2, -0.3, 0.7, "leaning better"),
            lifted("B", 1.0, 0.5, 1.5, "better, fairly sure"),
            lifted("C", 0.0, -0.5, 0.5, "about his normal"),
            lifted("D", -0.8, -1.3, -0.3, "worse, fairly sure"),
            lifted("E", 0.6, 0.1, 1.1, "better, fairly sure"),
            lifted("F", -0.4, -0.9, 0.1, "leaning worse"),
        ];
        let note = lift_note(&ms);
        assert_eq!(
            note,
            "Against his normal (his other snaps; lift, 90% range): B better, fairly sure (1); D worse, fairly sure (-0.8); \
             E better, fairly sure (0.6); 2 more differ less surely (his page has them); about his normal on the rest."
        );
        assert_eq!(lift_note(&ms[..3]), "Against his normal (his other snaps; lift, 90% range): B better, fairly sure (1); A leaning better (0.2); about his normal on the rest.");
        assert!(lift_note(&ms[2..3]).ends_with("about his normal on every key number."));
    }

    #[test]
    fn labels() {
        assert_eq!(seasons_label(&[2025]), "season 2025");
        assert_eq!(seasons_label(&[2021, 2022, 2023]), "seasons 2021–2023");
        assert_eq!(seasons_label(&[2021, 2023]), "seasons 2021, 2023");
        assert_eq!(ordinal_period(4), "Q4");
        assert_eq!(ordinal_period(6), "2OT");
        assert_eq!(fmt_metric(Some(-0.1234), 3), "-0.123");
        assert_eq!(fmt_metric(None, 1), "–");
    }
}

/// At most this many key numbers are named against his normal: the sheet
/// has room for one short paragraph (three lines in the PDF).
const LIFT_NAMED: usize = 3;

/// Against his normal, in one sentence: the key numbers whose lift is not
/// "about his normal" (the rule of `splits::LIFT_RULE`), the surest first
/// (his chance of being above his normal furthest from even), at most
/// `LIFT_NAMED` of them and a count of the others.
fn lift_note(metrics: &[KeyMetric]) -> String {
    if metrics.iter().all(|m| m.cell.lift.is_none()) {
        return "Against his normal: no lift here (no snaps elsewhere to compare with, or too few snaps).".into();
    }
    let mut off: Vec<(f64, &KeyMetric)> = metrics
        .iter()
        .filter(|m| m.cell.lift.is_some() && m.lift_words != "about his normal")
        .map(|m| (splits::lift_above_zero(&m.cell).map_or(0.0, |up| (up - 0.5).abs()), m))
        .collect();
    // Stable: equally sure numbers keep the sheet's order.
    off.sort_by(|a, b| b.0.total_cmp(&a.0));
    if off.is_empty() {
        return "Against his normal (his other snaps): about his normal on every key number.".into();
    }
    let named: Vec<String> = off.iter().take(LIFT_NAMED).map(|(_, m)| format!("{} {} ({})", m.short, m.lift_words, m.lift)).collect();
    let more = match off.len().saturating_sub(LIFT_NAMED) {
        0 => String::new(),
        1 => "; 1 more differs less surely (his page has it)".into(),
        n => format!("; {n} more differ less surely (his page has them)"),
    };
    format!("Against his normal (his other snaps; lift, 90% range): {}{more}; about his normal on the rest.", named.join("; "))
}

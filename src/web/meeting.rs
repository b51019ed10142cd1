//! The meeting view: our passer's situations one screen at a time for the
//! projector in the staff meeting: a few key metrics against the league and
//! his own normal, in large type, and the snaps that moved win probability
//! most, with what the video operator needs to cue them. The view builder
//! is pure; the handler only gathers the split tables and snaps.

use super::query::Params;
use super::Shared;
use crate::numfmt;
use crate::situation::{Preset, Situation};
use crate::splits::{self, Cell, MetricInfo, Snap, SplitTable, Stat};
use askama::Template;
use axum::extract::{RawQuery, State};
use axum::http::{HeaderMap, StatusCode};
use axum::response::{Html, IntoResponse, Response};

/// The metrics on every screen (keys of `splits::METRICS`).
pub const MEETING_METRICS: [&str; 4] = ["epa", "success", "sack_rate", "int_rate"];
/// Snaps listed per screen.
pub const CUE_SNAPS: usize = 3;

/// What the builder needs for one screen, gathered by the handler.
pub struct ScreenData<'a> {
    pub preset: Preset,
    pub situation: &'a Situation,
    /// The situation's table; "his normal" is each cell's `normal`, the
    /// posterior of his own level (the number the profile and explorer show).
    pub table: &'a SplitTable,
    pub snaps: Vec<Snap>,
}

/// One metric as a large dot-and-interval line. Positions are percentages
/// of the chart's width.
pub struct MetricPanel {
    pub label: String,
    pub estimate: String,
    pub interval: String,
    pub league: String,
    pub normal: String,
    pub verdict: String,
    pub lo_pct: String,
    pub width_pct: String,
    pub dot_pct: String,
    pub league_pct: String,
    pub normal_pct: Option<String>,
}

/// A snap as the video operator cues it (game, quarter, clock, down and
/// distance, spot are the snap's own words) with its swing.
pub struct CueSnap {
    pub snap: Snap,
    pub wpa: String,
}

#[derive(Template)]
#[template(path = "meeting.html")]
pub struct MeetingView {
    pub passer: String,
    pub seasons: String,
    pub screen_no: usize,
    pub screen_count: usize,
    pub heading: String,
    pub words: String,
    pub dropbacks: String,
    pub metrics: Vec<MetricPanel>,
    pub snaps: Vec<CueSnap>,
    pub prev_href: String,
    pub next_href: String,
    pub exit_href: String,
    pub empty: Option<String>,
}

/// The screens, in order: every preset but "all snaps" (his normal).
pub fn screens() -> Vec<Preset> {
    Preset::situations().collect()
}

fn shown(m: &MetricInfo, v: Option<f64>) -> String {
    if m.stat == Stat::Rate {
        numfmt::percent(v, m.decimals)
    } else {
        numfmt::fixed(v, m.decimals)
    }
}

/// Where `v` sits between `lo` and `hi`, as a percentage string.
fn pct(v: f64, lo: f64, hi: f64) -> String {
    let t = if hi > lo { (v - lo) / (hi - lo) } else { 0.5 };
    format!("{:.2}%", (t * 100.0).clamp(0.0, 100.0))
}

/// "better than the league", "worse than ...", or "not clearly different
/// from ..." by where the 90% interval lies: the rule the page states.
pub fn verdict(lo: f64, hi: f64, reference: f64, higher_is_better: bool, whom: &str) -> String {
    let (above, below) = (lo > reference, hi < reference);
    match (above, below, higher_is_better) {
        (true, _, true) | (_, true, false) => format!("better than {whom}"),
        (true, _, false) | (_, true, true) => format!("worse than {whom}"),
        _ => format!("no clear difference from {whom}"),
    }
}

fn panel(m: &MetricInfo, cell: &Cell, league: Option<f64>, normal: Option<f64>) -> MetricPanel {
    let (lo, hi, est) = (cell.lo, cell.hi, cell.estimate);
    let mut points: Vec<f64> = [lo, hi, est, league, normal].into_iter().flatten().filter(|x| x.is_finite()).collect();
    points.sort_by(f64::total_cmp);
    let (min, max) = match (points.first(), points.last()) {
        (Some(a), Some(b)) => (*a, *b),
        _ => (0.0, 1.0),
    };
    let pad = ((max - min) * 0.15).max(1e-9);
    let (a, b) = (min - pad, max + pad);
    let verdict_words = match (lo, hi) {
        // A zero-width interval is no interval: the estimate claims a
        // certainty the data do not have, so the page says nothing.
        (Some(l), Some(h)) if h - l > 1e-9 => {
            let vs_league = league.map(|r| verdict(l, h, r, m.higher_is_better, "league")).unwrap_or_default();
            let vs_normal = normal.map(|r| verdict(l, h, r, m.higher_is_better, "his normal")).unwrap_or_default();
            [vs_league, vs_normal].into_iter().filter(|s| !s.is_empty()).collect::<Vec<_>>().join("; ")
        }
        (Some(_), Some(_)) => "no honest interval here yet: passers differ too little to estimate one".to_string(),
        _ => "too few snaps to say".to_string(),
    };
    MetricPanel {
        label: m.label.to_string(),
        estimate: shown(m, est),
        interval: format!("{} to {}", shown(m, lo), shown(m, hi)),
        league: shown(m, league),
        normal: shown(m, normal),
        verdict: verdict_words,
        lo_pct: pct(lo.unwrap_or(a), a, b),
        width_pct: format!("{:.2}%", match (lo, hi) {
            (Some(l), Some(h)) if b > a => ((h - l) / (b - a) * 100.0).max(0.4),
            _ => 0.0,
        }),
        dot_pct: pct(est.unwrap_or(a), a, b),
        league_pct: pct(league.unwrap_or(a), a, b),
        normal_pct: normal.map(|n| pct(n, a, b)),
    }
}

fn cue(s: &Snap) -> CueSnap {
    CueSnap { snap: s.clone(), wpa: numfmt::signed(Some(s.wpa * 100.0), 1, " pts of WP") }
}

/// Links to a screen: the passer, the seasons and the position.
fn screen_href(passer: &str, seasons: &[(String, String)], key: &str) -> String {
    let mut pairs: Vec<(String, String)> = vec![("passer".into(), passer.to_string())];
    pairs.extend(seasons.iter().cloned());
    pairs.push(("screen".into(), key.to_string()));
    format!("/meeting{}", super::query::to_query_string(&pairs))
}

/// The pure view of one screen.
pub fn view(passer: &str, season_pairs: &[(String, String)], seasons_text: &str, order: &[Preset], at: usize, d: &ScreenData) -> MeetingView {
    let n = order.len();
    let prev = order[(at + n - 1) % n];
    let next = order[(at + 1) % n];
    let row = d.table.row(passer);
    let mut metrics = Vec::new();
    if let Some(r) = row {
        for key in MEETING_METRICS {
            let Some(j) = d.table.metrics.iter().position(|m| m.key == key) else { continue };
            let m = &d.table.metrics[j];
            let Some(cell) = r.cell(key) else { continue };
            metrics.push(panel(m, cell, d.table.league[j], cell.normal));
        }
    }
    let mut snaps: Vec<&Snap> = d.snaps.iter().filter(|s| s.wpa.is_finite()).collect();
    snaps.sort_by(|a, b| b.wpa.abs().total_cmp(&a.wpa.abs()));
    MeetingView {
        passer: passer.to_string(),
        seasons: seasons_text.to_string(),
        screen_no: at + 1,
        screen_count: n,
        heading: d.preset.label().to_string(),
        words: d.situation.describe(),
        dropbacks: match row {
            Some(r) => format!("{} dropbacks here · league {} dropbacks", r.dropbacks, d.table.league_dropbacks),
            None => String::new(),
        },
        metrics,
        snaps: snaps.into_iter().take(CUE_SNAPS).map(cue).collect(),
        prev_href: screen_href(passer, season_pairs, prev.key()),
        next_href: screen_href(passer, season_pairs, next.key()),
        exit_href: format!("/passer{}", super::query::to_query_string(&[("passer".to_string(), passer.to_string())])),
        empty: row.is_none().then(|| format!("{passer} has no dropback in this situation in {seasons_text}.")),
    }
}

/// Why the meeting view cannot be drawn, on the site's error page.
fn refuse(st: &Shared, headers: &HeaderMap, status: StatusCode, text: String) -> Response {
    super::pages::error_page(st, headers, status, "The meeting view can't be drawn", text, "/")
}

pub async fn meeting(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let pairs = super::query::pairs(q.as_deref());
    let screen_key = pairs.iter().rev().find(|(k, _)| k == "screen").map(|(_, v)| v.clone());
    let rest: Vec<(String, String)> = pairs.iter().filter(|(k, _)| k != "screen").cloned().collect();
    let params = match Params::parse_in(Some(&serde_urlencoded::to_string(&rest).unwrap_or_default()), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return refuse(&st, &headers, StatusCode::BAD_REQUEST, e.to_string()),
    };
    let passer = match params.situation.passer.clone().or_else(|| super::service::ours(&st, &headers).1) {
        Some(p) => p,
        None => return super::pages::pick_passer(&st, &headers, Some(&params), "meeting", "/meeting", "the meeting view"),
    };
    let order = screens();
    let at = match &screen_key {
        None => 0,
        Some(k) => match order.iter().position(|p| p.key() == k) {
            Some(i) => i,
            None => {
                let keys: Vec<&str> = order.iter().map(|p| p.key()).collect();
                return refuse(&st, &headers, StatusCode::BAD_REQUEST, format!("screen '{k}' is not a situation of the meeting; choose one of {}", keys.join(", ")));
            }
        },
    };
    let st2 = st.clone();
    let seasons = params.situation.seasons.clone();
    let one_score = params.situation.one_score;
    let min = params.min_dropbacks;
    let who = passer.clone();
    let work = tokio::task::spawn_blocking(move || {
        let lg = st2.league();
        if lg.plays().passer_index(&who).is_none() {
            return Err(format!("passer '{who}' is not in the loaded file"));
        }
        let preset = order[at];
        let mut s = preset.situation(one_score);
        s.seasons = seasons;
        let table = st2.split_table(&s, min, Some(&who));
        let snaps = splits::play_list(lg.plays(), &lg.values(), &s, Some(&who), None);
        let season_pairs: Vec<(String, String)> = s.to_query().into_iter().filter(|(k, _)| k == "season").collect();
        let seasons_text = match &s.seasons {
            Some(v) if !v.is_empty() => format!("seasons {}", v.iter().map(|x| x.to_string()).collect::<Vec<_>>().join(", ")),
            _ => {
                let all = lg.plays().seasons();
                match (all.first(), all.last()) {
                    (Some(a), Some(b)) if a != b => format!("seasons {a}-{b}"),
                    (Some(a), _) => format!("season {a}"),
                    _ => "no seasons".into(),
                }
            }
        };
        let data = ScreenData { preset, situation: &s, table: &table, snaps };
        Ok(view(&who, &season_pairs, &seasons_text, &order, at, &data))
    })
    .await;
    match work {
        Ok(Ok(v)) => match v.render() {
            Ok(body) => Html(body).into_response(),
            Err(e) => refuse(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, format!("the meeting screen could not be drawn: {e}")),
        },
        Ok(Err(why)) => refuse(&st, &headers, StatusCode::NOT_FOUND, why),
        Err(e) => refuse(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, format!("meeting view failed: {e}")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn verdicts_follow_the_interval_and_direction() {
        // 90% interval 0.05..0.20 against a league value of 0.02, higher better.
        assert_eq!(verdict(0.05, 0.20, 0.02, true, "league"), "better than league");
        assert_eq!(verdict(0.05, 0.20, 0.02, false, "league"), "worse than league");
        assert_eq!(verdict(-0.1, 0.1, 0.0, true, "his normal"), "no clear difference from his normal");
        assert_eq!(verdict(-0.3, -0.1, 0.0, true, "league"), "worse than league");
    }

    /// "His normal" on a screen is the table's own `normal` for the cell:
    /// the posterior of his level, as the profile and explorer show it.
    #[test]
    fn his_normal_is_the_cells_normal() {
        let plays = crate::models::testkit::league(240, 2, 11);
        let n = plays.len();
        let epa: Vec<f64> = (0..n).map(|i| ((i * 37) % 23) as f64 / 10.0 - 1.1).collect();
        let wp: Vec<f64> = (0..n).map(|i| ((i * 13) % 97) as f64 / 100.0 + 0.005).collect();
        let wpa: Vec<f64> = (0..n).map(|i| ((i * 7) % 11) as f64 / 100.0 - 0.05).collect();
        let cp = vec![0.62; n];
        let v = splits::SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
        let s = Preset::TwoMinuteDrill.situation(8);
        let table = splits::split_table(&plays, &v, &s, 1);
        let row = table.rows.iter().find(|r| r.cell("epa").and_then(|c| c.normal).is_some()).expect("a passer with a normal");
        let data = ScreenData { preset: Preset::TwoMinuteDrill, situation: &s, table: &table, snaps: Vec::new() };
        let order = screens();
        let at = order.iter().position(|p| *p == Preset::TwoMinuteDrill).expect("a screen");
        let view = view(&row.passer, &[], "seasons 2000-2001", &order, at, &data);
        assert_eq!(view.metrics.len(), MEETING_METRICS.len());
        for (panel, key) in view.metrics.iter().zip(MEETING_METRICS) {
            let j = table.metrics.iter().position(|m| m.key == key).expect("metric");
            let cell = row.cell(key).expect("cell");
            let want = cell.normal.expect("his normal");
            assert_eq!(panel.normal, shown(&table.metrics[j], Some(want)), "{key}");
            assert!(panel.normal_pct.is_some(), "{key}: the normal is drawn");
        }
        // The EPA normal checked as a number, not only as the same string.
        let epa_normal = row.cell("epa").and_then(|c| c.normal).expect("epa normal");
        let shown_normal: f64 = view.metrics[0].normal.replace('\u{2212}', "-").parse().expect("a number");
        assert!((shown_normal - epa_normal).abs() <= 0.0005, "{shown_normal} vs {epa_normal}");
    }

    #[test]
    fn chart_positions_span_the_points() {
        assert_eq!(pct(5.0, 0.0, 10.0), "50.00%");
        assert_eq!(pct(-1.0, 0.0, 10.0), "0.00%");
        assert_eq!(pct(3.0, 3.0, 3.0), "50.00%");
    }
}

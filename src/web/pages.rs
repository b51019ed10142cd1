//! The server-rendered pages (askama templates): home, situation explorer,
//! passer profile, play list and cut-up export, game flow, calibration.
//! Each page is a view of the split engine's values; numbers are formatted
//! here, nowhere else.

use super::api::split_for;
use super::query::{self, to_query_string, Params};
use super::Shared;
use crate::charts::{self, DotRow, Marker, Series};
use crate::situation::params::Field;
use crate::situation::{PlayResult, Preset, Situation, SituationError, PARAMS};
use crate::splits::{self, metric_index, MetricInfo, SortBy, Stat, METRICS};
use askama::Template;
use axum::extract::{RawQuery, State};
use axum::http::{header, HeaderMap, StatusCode};
use axum::response::{Html, IntoResponse, Redirect, Response};

// ------------------------------------------------------------ shared bits

/// Page frame: title, navigation, projector toggle, our team and passer.
pub struct Chrome {
    pub title: String,
    pub active: &'static str,
    pub projector: bool,
    pub toggle_href: String,
    pub toggle_label: &'static str,
    pub our_team: Option<String>,
    pub our_passer: Option<String>,
    pub our_query: String,
    /// The preset the menu's links open on.
    pub default_preset: &'static str,
}

const TEAM_COOKIE: &str = "lg_team";
const PASSER_COOKIE: &str = "lg_passer";

/// Our team and passer: the cookie, else the `serve --team/--passer` default.
pub fn ours(st: &Shared, headers: &HeaderMap) -> (Option<String>, Option<String>) {
    let team = query::cookie(headers, TEAM_COOKIE).filter(|t| !t.is_empty()).or_else(|| st.team.clone());
    let passer = query::cookie(headers, PASSER_COOKIE).filter(|t| !t.is_empty()).or_else(|| st.passer.clone());
    (team, passer)
}

pub(super) fn chrome(st: &Shared, headers: &HeaderMap, params: Option<&Params>, title: String, active: &'static str, path: &str) -> Chrome {
    let projector = params.is_some_and(|p| p.projector);
    let toggle_href = match params {
        Some(p) => format!("{path}{}", p.with(&[("view", if projector { None } else { Some("projector") })])),
        None => format!("{path}{}", if projector { "" } else { "?view=projector" }),
    };
    let (our_team, our_passer) = ours(st, headers);
    let our_query = match &our_passer {
        Some(p) => to_query_string(&[("passer".to_string(), p.clone())]),
        None => String::new(),
    };
    Chrome {
        title,
        active,
        projector,
        toggle_href,
        toggle_label: if projector { "Laptop view" } else { "Projector view" },
        our_team,
        our_passer,
        our_query,
        default_preset: Preset::DEFAULT.key(),
    }
}

pub(super) fn html<T: Template>(t: &T) -> Response {
    match t.render() {
        Ok(body) => Html(body).into_response(),
        Err(e) => {
            tracing::error!("template: {e}");
            (StatusCode::INTERNAL_SERVER_ERROR, "the page could not be drawn").into_response()
        }
    }
}

#[derive(Template)]
#[template(path = "error.html")]
struct ErrorPage {
    chrome: Chrome,
    status: u16,
    heading: String,
    reason: String,
    back: String,
}

pub(super) fn error_page(st: &Shared, headers: &HeaderMap, status: StatusCode, heading: &str, reason: String, back: &str) -> Response {
    let page = ErrorPage {
        chrome: chrome(st, headers, None, heading.to_string(), "", "/"),
        status: status.as_u16(),
        heading: heading.to_string(),
        reason,
        back: back.to_string(),
    };
    let mut r = html(&page);
    *r.status_mut() = status;
    r
}

pub(super) fn bad_query(st: &Shared, headers: &HeaderMap, e: &SituationError, back: &str) -> Response {
    error_page(st, headers, StatusCode::BAD_REQUEST, "That view can't be drawn", e.to_string(), back)
}

pub async fn not_found(State(st): State<Shared>, headers: HeaderMap) -> Response {
    error_page(&st, &headers, StatusCode::NOT_FOUND, "No such page", "Nothing lives at this address.".into(), "/")
}

/// A number for a table cell; "–" when missing.
pub fn fmt(v: Option<f64>, decimals: usize) -> String {
    match v {
        Some(x) if x.is_finite() => {
            let s = format!("{x:.decimals$}");
            if s.starts_with('-') && s.trim_start_matches(['-', '0', '.']).is_empty() {
                s.trim_start_matches('-').to_string()
            } else {
                s
            }
        }
        _ => "–".to_string(),
    }
}

fn sort_value(v: Option<f64>) -> String {
    match v {
        Some(x) if x.is_finite() => format!("{x}"),
        _ => String::new(),
    }
}

// ------------------------------------------------------------ home

#[derive(Template)]
#[template(path = "home.html")]
struct HomePage {
    chrome: Chrome,
    file: String,
    fingerprint: String,
    model_version: &'static str,
    seasons: String,
    games: usize,
    snaps: usize,
    teams: Vec<String>,
    passers: Vec<String>,
    files: Vec<String>,
    rows_skipped: usize,
    issue_lines: Vec<String>,
    issue_counts: Vec<(String, usize)>,
    calibration_line: String,
    reload_note: Option<String>,
    presets: Vec<(String, String)>,
    fit_lines: Vec<String>,
}

pub async fn home(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = Params::parse(q.as_deref()).ok();
    let lg = st.league();
    let p = lg.plays();
    let seasons = p.seasons();
    let mut teams = p.teams.clone();
    teams.sort();
    // passers with at least one dropback, most dropbacks first
    let mut counts = vec![0usize; p.passers.len()];
    for i in 0..p.len() {
        if p.dropback[i] && p.passer[i] != crate::plays::NO_PASSER {
            counts[p.passer[i] as usize] += 1;
        }
    }
    let mut passers: Vec<(usize, String)> = counts.iter().enumerate().filter(|(_, c)| **c > 0).map(|(i, c)| (*c, p.passers[i].clone())).collect();
    passers.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(&b.1)));
    let presets = Preset::ALL.iter().map(|pr| (pr.label().to_string(), format!("/explore?preset={}", pr.key()))).collect();
    let page = HomePage {
        chrome: chrome(&st, &headers, params.as_ref(), "What is loaded".into(), "home", "/"),
        file: lg.source.display().to_string(),
        fingerprint: lg.scored.fingerprint.clone(),
        model_version: crate::models::MODEL_VERSION,
        seasons: match (seasons.first(), seasons.last()) {
            (Some(a), Some(b)) if a != b => format!("{a}–{b} ({} seasons)", seasons.len()),
            (Some(a), _) => a.to_string(),
            _ => "none".into(),
        },
        games: p.games.len(),
        snaps: p.len(),
        teams,
        passers: passers.into_iter().map(|(_, n)| n).collect(),
        files: lg.report.files.clone(),
        rows_skipped: lg.report.rows_skipped,
        issue_lines: lg.report.issues.iter().take(20).map(|i| i.to_string()).collect(),
        issue_counts: lg.report.counts.iter().map(|(k, v)| (k.clone(), *v)).collect(),
        calibration_line: super::calib::summary(&lg.scored.calibration),
        reload_note: st.reload_note(),
        presets,
        fit_lines: super::calib::fit_lines(&lg.scored.models.report),
    };
    html(&page)
}

/// Remember our team and passer in cookies, then go home.
pub async fn choose(RawQuery(q): RawQuery) -> Response {
    let pairs = query::pairs(q.as_deref());
    let get = |k: &str| pairs.iter().find(|(p, _)| p == k).map(|(_, v)| v.trim().to_string());
    let enc = |v: &str| serde_urlencoded::to_string([("v", v)]).unwrap_or_default().trim_start_matches("v=").to_string();
    let mut resp = Redirect::to("/").into_response();
    for (name, value) in [(TEAM_COOKIE, get("team")), (PASSER_COOKIE, get("passer"))] {
        if let Some(v) = value {
            let v: String = v.chars().take(200).collect();
            let cookie = format!("{name}={}; Path=/; Max-Age=31536000; SameSite=Lax", enc(&v));
            if let Ok(h) = header::HeaderValue::from_str(&cookie) {
                resp.headers_mut().append(header::SET_COOKIE, h);
            }
        }
    }
    resp
}

pub async fn reload(State(st): State<Shared>) -> Response {
    let st2 = st.clone();
    let _ = tokio::task::spawn_blocking(move || st2.reload()).await;
    Redirect::to("/").into_response()
}

// ------------------------------------------------------------ explorer

pub struct PresetLink {
    pub label: &'static str,
    pub href: String,
    pub active: bool,
}

pub struct FormField {
    pub key: &'static str,
    pub label: &'static str,
    pub value: String,
    pub placeholder: String,
    pub help: &'static str,
}

pub struct Column {
    pub key: &'static str,
    pub short: &'static str,
    pub label: &'static str,
    pub href: String,
    pub aria_sort: &'static str,
    pub numeric: bool,
    pub stability: String,
}

pub struct CellView {
    pub main: String,
    pub sub: String,
    pub signal: String,
    pub sort: String,
    pub href: String,
    pub title: String,
}

pub struct RowView {
    pub passer: String,
    pub team: String,
    pub ours: bool,
    pub profile_href: String,
    pub cells: Vec<CellView>,
}

#[derive(Template)]
#[template(path = "explore.html")]
struct ExplorePage {
    chrome: Chrome,
    presets: Vec<PresetLink>,
    preset_options: Vec<(&'static str, &'static str, bool)>,
    preset_value: String,
    os_value: String,
    site_value: String,
    fields: Vec<FormField>,
    min: u32,
    by_raw: bool,
    description: String,
    seasons: String,
    league_dropbacks: u32,
    qualified: usize,
    columns: Vec<Column>,
    league: Vec<String>,
    rows: Vec<RowView>,
    api_href: String,
    csv_href: String,
    plays_href: String,
    sort_note: String,
}

/// The columns shown: all metrics on a laptop, the projector set on a
/// projector.
fn shown_metrics(projector: bool) -> Vec<usize> {
    METRICS
        .iter()
        .enumerate()
        .filter(|(_, m)| if projector { m.projector } else { m.key != "completions" && m.key != "yards" && m.key != "wpa" })
        .map(|(j, _)| j)
        .collect()
}

/// A passer page link that keeps the seasons and the view.
pub fn passer_query(passer: &str, params: &Params) -> String {
    let mut q = vec![("passer".to_string(), passer.to_string())];
    if let Some(s) = params.situation.show(Field::Seasons) {
        q.push(("season".into(), s));
    }
    if params.projector {
        q.push(("view".into(), "projector".into()));
    }
    to_query_string(&q)
}

/// Does the query ask for a situation (a preset or any filter), even with
/// empty boxes? A bare page opens on the default preset.
pub fn asks_situation(raw: &[(String, String)]) -> bool {
    raw.iter().any(|(k, _)| crate::situation::params::spec(k).is_some_and(|s| s.field != Field::Page))
}

/// The link behind one number: a count opens exactly the snaps it counts
/// (`result=`), anything else its denominator (`metric=`), where the play
/// list marks the counted snaps of a rate.
pub fn number_query(situation: &Situation, passer: &str, metric: &str) -> Vec<(String, String)> {
    let mut s = Situation { passer: Some(passer.to_string()), ..situation.clone() };
    if let Some(res) = PlayResult::counted_by(metric) {
        if s.results.as_ref().is_none_or(|rs| rs.contains(&res)) {
            s.results = Some(vec![res]);
        }
    }
    let mut q = s.to_query();
    q.push(("metric".into(), metric.to_string()));
    q
}

pub async fn explore(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, &format!("/explore?preset={}", Preset::DEFAULT.key())),
    };
    let mut params = params;
    if !asks_situation(&params.raw) {
        // A bare /explore opens on the default preset.
        params.situation = Preset::DEFAULT.situation(params.situation.one_score);
        params.raw.push(("preset".into(), Preset::DEFAULT.key().into()));
    }
    let ch = chrome(&st, &headers, Some(&params), "Situation explorer".into(), "explore", "/explore");
    let table = split_for(&st, &params, ch.our_passer.as_deref());
    let sq = params.situation_query();
    let current_preset = params.situation.preset;
    let presets = Preset::ALL
        .iter()
        .map(|p| {
            let kept = Situation { seasons: params.situation.seasons.clone(), ..p.situation(params.situation.one_score) };
            let mut q = kept.to_query();
            if params.projector {
                q.push(("view".into(), "projector".into()));
            }
            PresetLink { label: p.label(), href: format!("/explore{}", to_query_string(&q)), active: current_preset == Some(*p) }
        })
        .collect();
    let own_get = |k: &str| sq.iter().find(|(p, _)| p == k).map(|(_, v)| v.clone()).unwrap_or_default();
    let base = params.situation.base();
    let fields = PARAMS
        .iter()
        .filter(|spec| spec.form)
        .map(|spec| FormField {
            key: spec.key,
            label: spec.label,
            value: own_get(spec.key),
            placeholder: base.show(spec.field).unwrap_or_else(|| "any".into()),
            help: spec.help,
        })
        .collect();
    let shown = shown_metrics(params.projector);
    let mut columns = vec![
        Column { key: "passer", short: "Passer", label: "Passer", href: String::new(), aria_sort: "none", numeric: false, stability: String::new() },
        Column { key: "team", short: "Team", label: "Team", href: String::new(), aria_sort: "none", numeric: false, stability: String::new() },
    ];
    for &j in &shown {
        let mi = &table.metrics[j];
        columns.push(Column {
            key: mi.key,
            short: mi.short,
            label: mi.label,
            href: String::new(),
            aria_sort: "none",
            numeric: true,
            stability: stability_note(mi),
        });
    }
    for c in columns.iter_mut() {
        let sorted_here = params.sort.as_deref() == Some(c.key);
        let next_dir = if sorted_here && params.descending { "asc" } else { "desc" };
        c.href = format!("/explore{}", params.with(&[("sort", Some(c.key)), ("dir", Some(next_dir))]));
        if sorted_here {
            c.aria_sort = if params.descending { "descending" } else { "ascending" };
        }
    }
    let league = shown.iter().map(|&j| fmt(table.league_row[j], METRICS[j].decimals)).collect();
    let (our_team, our_passer) = (ch.our_team.clone(), ch.our_passer.clone());
    let rows = table
        .rows
        .iter()
        .filter(|r| r.qualified || our_passer.as_deref() == Some(r.passer.as_str()))
        .map(|r| RowView {
            passer: r.passer.clone(),
            team: r.team.clone(),
            ours: our_passer.as_deref() == Some(r.passer.as_str()) || (our_passer.is_none() && our_team.as_deref() == Some(r.team.as_str())),
            profile_href: format!("/passer{}", passer_query(&r.passer, &params)),
            cells: shown
                .iter()
                .map(|&j| {
                    let m = &METRICS[j];
                    let c = &r.cells[j];
                    let (sub, signal) = if m.stat == Stat::Count {
                        (String::new(), String::new())
                    } else {
                        (
                            format!("{} [{}, {}]", fmt(c.estimate, m.decimals), fmt(c.lo, m.decimals), fmt(c.hi, m.decimals)),
                            c.signal.map(|s| format!("signal {:.0}%", s * 100.0)).unwrap_or_else(|| "signal –".into()),
                        )
                    };
                    let sortv = match params.sort_by {
                        SortBy::Estimate if m.stat != Stat::Count => c.estimate.or(c.value),
                        _ => c.value,
                    };
                    CellView {
                        main: fmt(c.value, m.decimals),
                        sub,
                        signal,
                        sort: sort_value(sortv),
                        href: format!("/plays{}", to_query_string(&number_query(&params.situation, &r.passer, m.key))),
                        title: format!("{} {}; pct {}", c.n, m.unit.label(), fmt(c.percentile, 0)),
                    }
                })
                .collect(),
        })
        .collect::<Vec<_>>();
    let sort_note = match &params.sort {
        Some(k) => format!(
            "sorted by {} ({}, {})",
            metric_index(k).map(|j| METRICS[j].label).unwrap_or(k.as_str()),
            if params.sort_by == SortBy::Estimate { "estimate" } else { "raw value" },
            if params.descending { "high to low" } else { "low to high" }
        ),
        None => "sorted by dropbacks".into(),
    };
    let page = ExplorePage {
        presets,
        preset_options: Preset::ALL.iter().map(|p| (p.key(), p.label(), current_preset == Some(*p))).collect(),
        preset_value: current_preset.map(|p| p.key().to_string()).unwrap_or_default(),
        os_value: params.situation.one_score.to_string(),
        site_value: own_get("site"),
        fields,
        min: params.min_dropbacks,
        by_raw: params.sort_by == SortBy::Value,
        description: table.situation.clone(),
        seasons: seasons_text(&table.seasons),
        league_dropbacks: table.league_dropbacks,
        qualified: table.qualified().count(),
        columns,
        league,
        rows,
        api_href: format!("/api/splits{}", params.with(&[("view", None)])),
        csv_href: format!("/api/splits.csv{}", params.with(&[("view", None)])),
        plays_href: format!("/plays{}", to_query_string(&sq)),
        sort_note,
        chrome: ch,
    };
    html(&page)
}

fn stability_note(mi: &MetricInfo) -> String {
    match mi.stability {
        Some(r) => format!("season-to-season r = {r:.2} over {} passer pairs", mi.stability_pairs),
        None if mi.stat == Stat::Count => "a total".into(),
        None => "too few passers qualified in consecutive seasons to judge".into(),
    }
}

fn seasons_text(s: &[i32]) -> String {
    match (s.first(), s.last()) {
        (Some(a), Some(b)) if a != b && s.len() == (b - a + 1) as usize => format!("{a}–{b}"),
        (Some(_), Some(_)) => s.iter().map(|x| x.to_string()).collect::<Vec<_>>().join(", "),
        _ => "none".into(),
    }
}

// ------------------------------------------------------------ profile

pub struct ProfileRowView {
    pub label: &'static str,
    pub href: String,
    pub dropbacks: String,
    pub cells: Vec<(String, String, String)>,
}

#[derive(Template)]
#[template(path = "profile.html")]
struct ProfilePage {
    chrome: Chrome,
    passer: String,
    team: String,
    passers: Vec<(String, bool)>,
    /// Which seasons the page shows, in words, and the season box's value.
    seasons_note: String,
    season_value: String,
    charts: Vec<(String, String)>,
    trend_chart: String,
    trend_label: String,
    epa_chart: String,
    table_heads: Vec<(&'static str, &'static str)>,
    rows: Vec<ProfileRowView>,
    decision_heads: Vec<(&'static str, &'static str)>,
    decision_rows: Vec<ProfileRowView>,
    api_href: String,
    report_href: String,
    games: Vec<(String, String)>,
}

/// The situation of the season trend (default late & close).
pub fn trend_situation(params: &Params) -> Situation {
    let preset = params.trend.as_deref().and_then(Preset::parse).unwrap_or(Preset::DEFAULT);
    preset.situation(params.situation.one_score)
}

const PROFILE_KEYS: &[&str] = &["epa", "success", "cpoe", "rating", "anya", "sack_rate", "int_rate", "wpa"];

pub async fn profile(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/passer"),
    };
    let lg = st.league();
    let p = lg.plays();
    let (_, our_passer) = ours(&st, &headers);
    let Some(name) = params.situation.passer.clone().or(our_passer) else {
        return error_page(&st, &headers, StatusCode::BAD_REQUEST, "Which passer?", "Choose our passer on the home page, or add ?passer=NAME.".into(), "/");
    };
    let trend = trend_situation(&params);
    let base = Situation { passer: None, ..params.situation.clone() };
    let Some(prof) = splits::profile(p, &lg.values(), &name, &base, &trend, params.min_dropbacks) else {
        return error_page(&st, &headers, StatusCode::NOT_FOUND, "No such passer", format!("No passer named {name} in this league."), "/");
    };
    let ch = chrome(&st, &headers, Some(&params), format!("Passer profile: {name}"), "passer", "/passer");
    let keys: Vec<usize> = PROFILE_KEYS.iter().filter_map(|k| metric_index(k)).collect();
    let width = if ch.projector { 560.0 } else { 420.0 };
    let charts = keys
        .iter()
        .map(|&j| {
            let m = &METRICS[j];
            let rows: Vec<DotRow> = prof
                .presets
                .iter()
                .map(|line| {
                    let c = line.row.as_ref().map(|r| &r.cells[j]);
                    DotRow {
                        label: line.label.to_string(),
                        estimate: c.and_then(|c| c.estimate),
                        lo: c.and_then(|c| c.lo),
                        hi: c.and_then(|c| c.hi),
                        raw: c.and_then(|c| c.value),
                        league: line.league[j],
                    }
                })
                .collect();
            let unit = if m.scale == 100.0 && !m.label.contains('%') { " (%)" } else { "" };
            (
                format!("{}{unit}", m.label),
                charts::dot_interval(&format!("{} — {name} by situation (dot: estimate, bar: 90% interval, tick: league)", m.label), &rows, width).to_svg(),
            )
        })
        .collect();
    let ej = metric_index("epa").unwrap_or(0);
    let trend_series = vec![
        Series { name: format!("{name} EPA per dropback"), class: "passer", points: prof.trend.iter().filter_map(|s| s.values[ej].map(|v| (s.season as f64, v))).collect() },
        Series { name: "League".into(), class: "league", points: prof.trend.iter().filter_map(|s| s.league[ej].map(|v| (s.season as f64, v))).collect() },
    ];
    let labels: Vec<(f64, String)> = prof.trend.iter().map(|s| (s.season as f64, s.season.to_string())).collect();
    let trend_chart = if prof.trend.len() >= 2 {
        charts::lines(&format!("EPA per dropback by season, {}", prof.trend_situation), &trend_series, &[], width * 1.4, 220.0, None, Some(&labels), &|v| format!("{v:.2}")).to_svg()
    } else {
        String::new()
    };
    let dist = splits::epa_distribution(p, &lg.values(), &Situation { passer: None, ..trend.clone() }, &name);
    let epa_chart = charts::histogram(
        &format!("EPA per dropback, {}: league (n = {}) vs {name} (n = {})", prof.trend_situation, dist.league_n, dist.passer_n),
        &dist.edges,
        ("League", &dist.league),
        (&name, &dist.passer),
        width * 1.4,
        220.0,
    )
    .to_svg();
    let table_keys: Vec<usize> = METRICS.iter().enumerate().filter(|(_, m)| m.stat != Stat::Count || m.key == "dropbacks").map(|(j, _)| j).collect();
    let decision_keys: Vec<usize> = METRICS.iter().enumerate().filter(|(_, m)| m.decision && m.stat != Stat::Count).map(|(j, _)| j).collect();
    let build_rows = |ks: &[usize]| -> Vec<ProfileRowView> {
        prof.presets
            .iter()
            .map(|line| ProfileRowView {
                label: line.label,
                href: {
                    let mut q = line.query.clone();
                    q.push(("passer".into(), name.clone()));
                    format!("/plays{}", to_query_string(&q))
                },
                dropbacks: line.row.as_ref().map(|r| r.dropbacks.to_string()).unwrap_or_else(|| "0".into()),
                cells: ks
                    .iter()
                    .map(|&j| {
                        let m = &METRICS[j];
                        let c = line.row.as_ref().map(|r| &r.cells[j]);
                        (
                            fmt(c.and_then(|c| c.value), m.decimals),
                            c.filter(|_| m.stat != Stat::Count)
                                .map(|c| format!("est {} [{}, {}]", fmt(c.estimate, m.decimals), fmt(c.lo, m.decimals), fmt(c.hi, m.decimals)))
                                .unwrap_or_default(),
                            fmt(line.league[j], m.decimals),
                        )
                    })
                    .collect(),
            })
            .collect()
    };
    let heads = |ks: &[usize]| ks.iter().map(|&j| (METRICS[j].short, METRICS[j].label)).collect::<Vec<_>>();
    // The passer's games, newest first, for the game-flow page.
    let who = p.passer_index(&name);
    let mut games: Vec<(String, String)> = Vec::new();
    for g in p.games.iter().rev() {
        if (g.start..g.end).any(|i| Some(p.passer[i]) == who) {
            let label = format!("{} wk {}: {} at {} ({}–{})", g.season, g.week, p.teams[g.away as usize], p.teams[g.home as usize], g.away_final, g.home_final);
            games.push((format!("/game{}", to_query_string(&[("game".into(), g.key.clone()), ("passer".into(), name.clone())])), label));
            if games.len() >= 12 {
                break;
            }
        }
    }
    let mut all: Vec<(String, bool)> = p.passers.iter().map(|n| (n.clone(), *n == name)).collect();
    all.sort();
    let page = ProfilePage {
        passer: name.clone(),
        team: prof.team.clone().unwrap_or_default(),
        passers: all,
        seasons_note: match &params.situation.seasons {
            Some(s) => format!("Seasons {}", seasons_text(s)),
            None => format!("All seasons ({})", seasons_text(&p.seasons())),
        },
        season_value: params.situation.show(Field::Seasons).unwrap_or_default(),
        charts,
        trend_chart,
        trend_label: prof.trend_situation.clone(),
        epa_chart,
        table_heads: heads(&table_keys),
        rows: build_rows(&table_keys),
        decision_heads: heads(&decision_keys),
        decision_rows: build_rows(&decision_keys),
        api_href: format!("/api/profile{}", params.with(&[("passer", Some(&name)), ("view", None)])),
        report_href: format!("/report{}", to_query_string(&Situation { passer: Some(name.clone()), seasons: params.situation.seasons.clone(), ..Preset::DEFAULT.situation(params.situation.one_score) }.to_query())),
        games,
        chrome: ch,
    };
    html(&page)
}

// ------------------------------------------------------------ play list

pub struct SnapView {
    pub game: String,
    pub seq: i32,
    pub game_href: String,
    pub when: String,
    /// "Q4", "OT".
    pub quarter: String,
    pub clock: String,
    pub teams: String,
    pub score: String,
    pub down_distance: String,
    pub spot: String,
    pub passer: String,
    pub result: String,
    pub epa: String,
    pub wpa: String,
    pub epa_sort: String,
    pub wpa_sort: String,
    /// Counted by the number the list was opened from (rates mark these).
    pub counted: bool,
}

#[derive(Template)]
#[template(path = "plays.html")]
struct PlaysPage {
    chrome: Chrome,
    description: String,
    count: usize,
    shown: usize,
    /// What the list is, against the number it came from.
    note: String,
    marking: bool,
    snaps: Vec<SnapView>,
    csv_href: String,
    api_href: String,
    back_href: String,
}

const PLAY_PAGE_LIMIT: usize = 2000;

fn snap_view(s: &splits::Snap) -> SnapView {
    SnapView {
        game: s.game.clone(),
        seq: s.seq,
        game_href: format!(
            "/game{}",
            to_query_string(&[("game".into(), s.game.clone()), ("passer".into(), s.passer.clone().unwrap_or_default())])
        ),
        when: format!("{} wk {}", s.season, s.week),
        quarter: s.quarter.clone(),
        clock: s.clock.clone(),
        teams: format!("{} vs {}", s.offense, s.defense),
        score: s.score.clone(),
        down_distance: s.down_distance.clone(),
        spot: s.spot.clone(),
        passer: s.passer.clone().unwrap_or_default(),
        result: s.result.clone(),
        epa: fmt(Some(s.epa), 2),
        wpa: fmt(Some(s.wpa), 3),
        epa_sort: sort_value(Some(s.epa)),
        wpa_sort: sort_value(Some(s.wpa)),
        counted: false,
    }
}

fn play_list_for(st: &Shared, params: &Params) -> Vec<splits::Snap> {
    let lg = st.league();
    let metric = params.metric.as_deref().and_then(metric_index).map(|j| &METRICS[j]);
    splits::play_list(lg.plays(), &lg.values(), &params.situation, params.situation.passer.as_deref(), metric)
}

/// What a play list opened from a number shows: exactly the counted snaps,
/// or the denominator with the counted ones marked, or every snap of a mean.
struct ListNote {
    text: String,
    /// Mark the snaps the metric counts.
    marking: bool,
}

fn list_note(params: &Params, snaps: &[splits::Snap], counted: &[bool]) -> ListNote {
    let Some(m) = params.metric.as_deref().and_then(metric_index).map(|j| &METRICS[j]) else {
        return ListNote { text: format!("{} dropbacks", snaps.len()), marking: false };
    };
    let unit = m.unit.label();
    let exact = PlayResult::counted_by(m.key).is_some_and(|r| params.situation.results.as_deref() == Some(&[r][..]));
    let n_counted = counted.iter().filter(|c| **c).count();
    match m.stat {
        Stat::Count if exact => ListNote { text: format!("{} snaps: exactly the ones counted in {}", snaps.len(), m.label), marking: false },
        Stat::Count if PlayResult::counted_by(m.key).is_some() => ListNote {
            text: format!("{} {unit}; the {n_counted} counted in {} are marked ● (sort on Counted to list them first)", snaps.len(), m.label),
            marking: true,
        },
        Stat::Rate => ListNote {
            text: format!("{} {unit}: the denominator of {}; the {n_counted} it counts are marked ● (sort on Counted to list them first)", snaps.len(), m.label),
            marking: true,
        },
        Stat::Count => ListNote { text: format!("{} {unit}: every one adds to {}", snaps.len(), m.label), marking: false },
        Stat::Mean => ListNote { text: format!("{} {unit}: {} is the average over these", snaps.len(), m.label), marking: false },
    }
}

pub async fn plays(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/explore"),
    };
    let snaps = play_list_for(&st, &params);
    let counted = super::api::counted(st.as_ref(), &params, &snaps).unwrap_or_else(|| vec![false; snaps.len()]);
    let note = list_note(&params, &snaps, &counted);
    let page = PlaysPage {
        chrome: chrome(&st, &headers, Some(&params), "Snaps behind the number".into(), "plays", "/plays"),
        description: params.situation.describe(),
        count: snaps.len(),
        shown: snaps.len().min(PLAY_PAGE_LIMIT),
        note: note.text,
        marking: note.marking,
        snaps: snaps.iter().zip(&counted).take(PLAY_PAGE_LIMIT).map(|(s, c)| SnapView { counted: *c, ..snap_view(s) }).collect(),
        csv_href: format!("/plays.csv{}", params.with(&[("view", None)])),
        api_href: format!("/api/plays{}", params.with(&[("view", None)])),
        back_href: format!("/explore{}", to_query_string(&Situation { passer: None, results: None, ..params.situation.clone() }.to_query())),
    };
    html(&page)
}

/// The cut-up export for the video staff.
pub async fn plays_csv(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/explore"),
    };
    let snaps = play_list_for(&st, &params);
    (
        [(header::CONTENT_TYPE, "text/csv; charset=utf-8"), (header::CONTENT_DISPOSITION, "attachment; filename=\"cutup.csv\"")],
        crate::export::cutup_csv(&snaps),
    )
        .into_response()
}

// ------------------------------------------------------------ game flow

#[derive(Template)]
#[template(path = "game.html")]
struct GamePage {
    chrome: Chrome,
    heading: String,
    chart: String,
    swings: Vec<SnapView>,
    passer: String,
    /// The team whose win probability the chart and the WPA column show.
    side: String,
    api_href: String,
    review_href: String,
}

/// The x-axis labels of a game chart: the four quarters, then each overtime
/// period the game reached (10 minutes each), then the end.
fn period_labels(last_period: i32) -> Vec<(f64, String)> {
    let mut labels: Vec<(f64, String)> = (1..=4).map(|q| (((q - 1) * 900) as f64, format!("Q{q}"))).collect();
    for per in 5..=last_period {
        labels.push(((3600 + (per - 5) * 600) as f64, splits::quarter(per)));
    }
    let end = if last_period <= 4 { 3600 } else { 3600 + (last_period - 4) * 600 };
    labels.push((end as f64, "end".into()));
    labels
}

pub async fn game(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/"),
    };
    let lg = st.league();
    let p = lg.plays();
    let Some(key) = params.game.clone() else {
        return error_page(&st, &headers, StatusCode::BAD_REQUEST, "Which game?", "game=: a game key is required (follow a link from a play list or a profile).".into(), "/");
    };
    let Some(gi) = p.games.iter().position(|g| g.key == key) else {
        return error_page(&st, &headers, StatusCode::NOT_FOUND, "No such game", format!("game={key}: no game with that key in this league."), "/");
    };
    let g = &p.games[gi];
    let home = p.teams[g.home as usize].clone();
    let away = p.teams[g.away as usize].clone();
    let snaps = splits::game_snaps(p, &lg.values(), gi);
    let passer = params.situation.passer.clone().unwrap_or_default();
    // Win probability from one side: our team when it plays, else the home team.
    let (our_team, _) = ours(&st, &headers);
    let ours_plays = our_team.as_deref().and_then(|t| [&home, &away].into_iter().find(|s| s.eq_ignore_ascii_case(t)).cloned());
    let side = ours_plays.clone().unwrap_or_else(|| home.clone());
    let side_home = side == home;
    let side_word = if ours_plays.is_some() { "our team" } else { "home team" };
    // x = seconds elapsed; overtime periods are 10 minutes.
    let elapsed = |i: usize| -> f64 {
        let per = p.period[i];
        if per <= 4 {
            ((per - 1) * 900 + (900 - p.clock[i])) as f64
        } else {
            (3600 + (per - 5) * 600 + (600 - p.clock[i].min(600))) as f64
        }
    };
    let wp = &lg.scored.scores.wp;
    let wpa = &lg.scored.scores.wpa;
    // The offense's win probability and WPA, turned to the side's.
    let side_sign = |i: usize| if p.off_home[i] == side_home { 1.0 } else { -1.0 };
    let side_wp = |i: usize| if side_sign(i) > 0.0 { wp[i] } else { 1.0 - wp[i] };
    let mut pts: Vec<(f64, f64)> = (g.start..g.end).map(|i| (elapsed(i), side_wp(i))).collect();
    if let Some(last) = pts.last().copied() {
        pts.push((last.0 + 1.0, if side_home { g.home_result() } else { 1.0 - g.home_result() }));
    }
    let mut lev: Vec<usize> = (g.start..g.end).filter(|&i| !passer.is_empty() && p.passer_name(i) == Some(passer.as_str())).collect();
    lev.sort_by(|&a, &b| wpa[b].abs().partial_cmp(&wpa[a].abs()).unwrap_or(std::cmp::Ordering::Equal));
    lev.truncate(8);
    let markers: Vec<Marker> = lev
        .iter()
        .map(|&i| Marker {
            x: elapsed(i),
            y: side_wp(i),
            class: if side_sign(i) * wpa[i] >= 0.0 { "pos" } else { "neg" },
            title: format!("{} {} {} — {} ({side} WPA {:+.3})", splits::quarter(p.period[i]), crate::playfile::format_clock(p.clock[i]), splits::down_distance(p.down[i], p.to_go[i], p.ball_on[i]), splits::result_text(p, i), side_sign(i) * wpa[i]),
        })
        .collect();
    let last_period = (g.start..g.end).map(|i| p.period[i]).max().unwrap_or(4);
    let chart = charts::lines(
        &format!("{side} win probability through the game ({side_word}){}", if passer.is_empty() { String::new() } else { format!("; dots: {passer}'s biggest swings") }),
        &[Series { name: format!("{side} win probability"), class: "passer", points: pts }],
        &markers,
        if params.projector { 1400.0 } else { 1000.0 },
        300.0,
        Some((0.0, 1.0)),
        Some(&period_labels(last_period)),
        &|v| format!("{:.0}%", v * 100.0),
    )
    .to_svg();
    let mut order: Vec<usize> = (0..snaps.len()).collect();
    order.sort_by(|&a, &b| snaps[b].wpa.abs().partial_cmp(&snaps[a].wpa.abs()).unwrap_or(std::cmp::Ordering::Equal));
    let swings = order
        .iter()
        .take(12)
        .map(|&k| {
            let s = &snaps[k];
            let signed = if s.offense == side { s.wpa } else { -s.wpa };
            SnapView { wpa: fmt(Some(signed), 3), wpa_sort: sort_value(Some(signed)), ..snap_view(s) }
        })
        .collect();
    let page = GamePage {
        chrome: chrome(&st, &headers, Some(&params), format!("Game flow: {away} at {home}"), "game", "/game"),
        heading: format!("{} week {}: {away} {} at {home} {}", g.season, g.week, g.away_final, g.home_final),
        chart,
        swings,
        passer,
        side,
        review_href: super::film::review_href(&key),
        api_href: format!("/api/game{}", to_query_string(&[("game".into(), key)])),
    };
    html(&page)
}

// ------------------------------------------------------------ calibration

#[derive(Template)]
#[template(path = "calibration.html")]
struct CalibrationPage {
    chrome: Chrome,
    fingerprint: String,
    model_version: &'static str,
    view: super::calib::CalibrationView,
    chart: String,
    fit_lines: Vec<String>,
}

pub async fn calibration(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = Params::parse(q.as_deref()).ok();
    let lg = st.league();
    let view = super::calib::view(&lg.scored.calibration);
    let chart = charts::reliability(&view.title, &view.bins, 420.0, 360.0).to_svg();
    let page = CalibrationPage {
        chrome: chrome(&st, &headers, params.as_ref(), "Model calibration".into(), "calibration", "/calibration"),
        fingerprint: lg.scored.fingerprint.clone(),
        model_version: crate::models::MODEL_VERSION,
        view,
        chart,
        fit_lines: super::calib::fit_lines(&lg.scored.models.report),
    };
    html(&page)
}

// ------------------------------------------------------------ report

/// The report's data for a request: the situation, our passer (or
/// `passer=`), the paper size.
fn report_data(st: &Shared, headers: &HeaderMap, q: Option<&str>) -> Result<(crate::report::ReportData, crate::report::Paper), Response> {
    let params = Params::parse_in(q, st.league().plays()).map_err(|e| bad_query(st, headers, &e, &format!("/report?preset={}", Preset::DEFAULT.key())))?;
    let (_, our_passer) = ours(st, headers);
    let Some(passer) = params.situation.passer.clone().or(our_passer) else {
        return Err(error_page(st, headers, StatusCode::BAD_REQUEST, "Which passer?", "passer=: name the report's passer, or choose our passer on the home page.".into(), "/"));
    };
    let mut situation = params.situation.clone();
    if !asks_situation(&params.raw.iter().filter(|(k, _)| k != "passer").cloned().collect::<Vec<_>>()) {
        situation = Situation { passer: situation.passer.clone(), ..Preset::DEFAULT.situation(situation.one_score) };
    }
    let paper = params.paper.as_deref().and_then(crate::report::Paper::parse).unwrap_or(crate::report::Paper::Letter);
    let lg = st.league();
    match crate::report::ReportData::build(&lg, &situation, &passer, params.min_dropbacks) {
        Ok(d) => Ok((d, paper)),
        Err(e) => Err(error_page(st, headers, StatusCode::BAD_REQUEST, "No report for that", e.to_string(), "/")),
    }
}

pub async fn report_html(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    match report_data(&st, &headers, q.as_deref()) {
        Ok((data, paper)) => Html(crate::report::html(&data, paper)).into_response(),
        Err(r) => r,
    }
}

pub async fn report_pdf(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let (data, paper) = match report_data(&st, &headers, q.as_deref()) {
        Ok(x) => x,
        Err(r) => return r,
    };
    match tokio::task::spawn_blocking(move || crate::report::render_pdf(&data, paper)).await {
        Ok(Ok(bytes)) => ([(header::CONTENT_TYPE, "application/pdf"), (header::CONTENT_DISPOSITION, "inline; filename=\"report.pdf\"")], bytes).into_response(),
        Ok(Err(e)) => error_page(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, "The PDF could not be made", e.to_string(), "/"),
        Err(_) => error_page(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, "The PDF could not be made", "the worker stopped".into(), "/"),
    }
}

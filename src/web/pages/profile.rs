//! The passer page: one passer against the league in every preset, his season trend and EPA distribution.

use super::*;

pub struct ProfileRowView {
    pub label: &'static str,
    pub href: String,
    pub dropbacks: String,
    pub cells: Vec<(String, String, String)>,
}

/// One cell of the lift-in-words table: the words, "lift +x [lo, hi]", "league +y".
pub type LiftWords = (String, String, String);

#[derive(Template)]
#[template(path = "profile.html")]
pub(super) struct ProfilePage {
    pub(super) chrome: Chrome,
    pub(super) passer: String,
    pub(super) team: String,
    pub(super) passers: Vec<(String, bool)>,
    /// Which seasons the page shows, in words, and the season box's value.
    pub(super) seasons_note: String,
    pub(super) season_value: String,
    pub(super) charts: Vec<(String, String)>,
    /// Per key metric: his lift in each game-on-the-line preset (dot and interval).
    pub(super) lift_charts: Vec<(String, String)>,
    /// Lift in words: heads (short, label), then per preset its cells (words, numbers).
    pub(super) lift_heads: Vec<(&'static str, &'static str)>,
    pub(super) lift_rows: Vec<(&'static str, Vec<LiftWords>)>,
    pub(super) lift_rule: &'static str,
    pub(super) trend_chart: String,
    pub(super) trend_label: String,
    pub(super) epa_chart: String,
    pub(super) table_heads: Vec<(&'static str, &'static str)>,
    pub(super) rows: Vec<ProfileRowView>,
    pub(super) decision_heads: Vec<(&'static str, &'static str)>,
    pub(super) decision_rows: Vec<ProfileRowView>,
    pub(super) api_href: String,
    pub(super) report_href: String,
    pub(super) games: Vec<(String, String)>,
}


/// The metrics of the lift-in-words table (fewer than the charts, so it fits a laptop).
const LIFT_WORD_KEYS: &[&str] = &["epa", "success", "cpoe", "rating", "sack_rate", "int_rate"];

pub(super) const PROFILE_KEYS: &[&str] = &["epa", "success", "cpoe", "rating", "anya", "sack_rate", "int_rate", "wpa"];

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
    let on_the_line: Vec<&splits::ProfileLine> = prof.presets.iter().filter(|l| l.preset != Preset::EverySnap.key()).collect();
    let lift_charts = keys
        .iter()
        .map(|&j| {
            let m = &METRICS[j];
            let rows: Vec<DotRow> = on_the_line
                .iter()
                .map(|line| {
                    let c = line.row.as_ref().map(|r| &r.cells[j]);
                    DotRow {
                        label: line.label.to_string(),
                        estimate: c.and_then(|c| c.lift),
                        lo: c.and_then(|c| c.lift_lo),
                        hi: c.and_then(|c| c.lift_hi),
                        raw: None,
                        league: Some(0.0),
                    }
                })
                .collect();
            let unit = if m.scale == 100.0 { " (points of %)" } else { "" };
            (
                format!("{}: lift{unit}", m.short),
                charts::dot_interval(&format!("{} — {name}'s lift by situation (dot: lift, bar: 90% interval, tick at 0: his normal)", m.label), &rows, width).to_svg(),
            )
        })
        .collect();
    let word_keys: Vec<usize> = LIFT_WORD_KEYS.iter().filter_map(|k| metric_index(k)).collect();
    let lift_rows = on_the_line
        .iter()
        .map(|line| {
            let cells = word_keys
                .iter()
                .map(|&j| {
                    let m = &METRICS[j];
                    match line.row.as_ref().map(|r| &r.cells[j]) {
                        Some(c) => (
                            splits::lift_words(m, c).unwrap_or("no lift: too few snaps").to_string(),
                            super::explore::lift_text(c, m.decimals),
                            format!("league {}", crate::numfmt::signed(line.league_lift[j], m.decimals, "")),
                        ),
                        None => ("no dropbacks here".to_string(), String::new(), String::new()),
                    }
                })
                .collect();
            (line.label, cells)
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
                            fixed(c.and_then(|c| c.value), m.decimals),
                            c.filter(|_| m.stat != Stat::Count)
                                .map(|c| format!("est {} [{}, {}]", fixed(c.estimate, m.decimals), fixed(c.lo, m.decimals), fixed(c.hi, m.decimals)))
                                .unwrap_or_default(),
                            fixed(line.league[j], m.decimals),
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
        lift_charts,
        lift_heads: word_keys.iter().map(|&j| (METRICS[j].short, METRICS[j].label)).collect(),
        lift_rows,
        lift_rule: splits::LIFT_RULE,
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

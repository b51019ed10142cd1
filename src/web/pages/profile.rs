//! The passer page: one passer against the league in every preset, his season trend and EPA distribution.

use super::*;
use crate::models::throw::{depth_by_distance, DepthLine, ThrowModel};

pub struct ProfileRowView {
    pub label: &'static str,
    pub href: String,
    pub dropbacks: String,
    pub cells: Vec<(String, String, String)>,
}

/// The by-tag section: the chosen tag, the choices, a chart and a table.
pub struct TagSection {
    pub tag: String,
    pub header: String,
    /// (tag name, header, selected) for the tag select (tags with a list).
    pub choices: Vec<(String, String, bool)>,
    pub situation: String,
    pub chart: String,
    pub heads: Vec<(&'static str, &'static str)>,
    pub rows: Vec<ProfileRowView>,
    /// Why there is no breakdown (no tag with a list, unknown tag).
    pub note: String,
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
    /// The trend's and the EPA histogram's titles, shown above them.
    pub(super) trend_title: String,
    pub(super) epa_title: String,
    pub(super) epa_chart: String,
    pub(super) table_heads: Vec<(&'static str, &'static str)>,
    pub(super) rows: Vec<ProfileRowView>,
    pub(super) decision_heads: Vec<(&'static str, &'static str)>,
    pub(super) decision_rows: Vec<ProfileRowView>,
    /// Choice and execution by situation (dot-interval charts).
    pub(super) throw_charts: Vec<(String, String)>,
    /// Yards needed vs depth chosen vs the league's depth on late downs.
    pub(super) depth: DepthView,
    pub(super) api_href: String,
    pub(super) report_href: String,
    pub(super) games: Vec<(String, String)>,
    pub(super) by_tag: Option<TagSection>,
    /// EPA per dropback against an average defense, per situation: (label, line).
    pub(super) opp_lines: Vec<(&'static str, String)>,
    pub(super) opp_words: &'static str,
}

/// "raw +0.120 · against an average defense +0.150 [−0.050, +0.350] · his
/// defenses 0.030 tougher than average" (EPA per dropback).
pub(super) fn opp_line(r: &splits::PasserRow) -> String {
    let ej = metric_index("epa").unwrap_or(0);
    let f = |x: Option<f64>| crate::numfmt::signed(x, 3, "");
    let raw = format!("raw {}", f(r.cells[ej].value));
    match (r.epa_opp_adj, r.epa_opp_adj_lo, r.epa_opp_adj_hi) {
        (Some(a), Some(lo), Some(hi)) => {
            let faced = match r.epa_opp_faced {
                Some(x) if x.abs() < 0.0005 => " · his defenses about average".to_string(),
                Some(x) if x < 0.0 => format!(" · his defenses {} tougher than average", fixed(Some(-x), 3)),
                Some(x) => format!(" · his defenses {} easier than average", fixed(Some(x), 3)),
                None => String::new(),
            };
            format!("{raw} · against an average defense {} [{}, {}]{faced}", f(Some(a)), f(Some(lo)), f(Some(hi)))
        }
        _ => format!("{raw} · against an average defense: too few passers or defenses here to fit"),
    }
}

pub(super) const TAG_KEYS: &[&str] = &["epa", "success", "comp_pct", "sack_rate", "int_rate", "anya"];

/// The passer by the values of tag `asked` (default: the file's first tag
/// with a list), in `situation`. None when the file has no tags.
fn tag_section(ix: &splits::SplitIndex, p: &crate::plays::Plays, v: &splits::SnapValues, name: &str, situation: &Situation, asked: Option<&str>, min: u32, width: f64) -> Option<TagSection> {
    let tags = &p.tags;
    if tags.is_empty() {
        return None;
    }
    let listed: Vec<usize> = (0..tags.names.len()).filter(|&t| tags.is_list(t)).collect();
    let tag = asked.map(str::to_string).or_else(|| listed.first().map(|&t| tags.names[t].clone())).unwrap_or_default();
    let choices = listed.iter().map(|&t| (tags.names[t].clone(), tags.headers[t].clone(), tags.names[t].eq_ignore_ascii_case(&tag))).collect();
    let mut section = TagSection { tag: tag.clone(), header: tag.clone(), choices, situation: situation.describe(), chart: String::new(), heads: Vec::new(), rows: Vec::new(), note: String::new() };
    let b = match splits::tag_breakdown_in(ix, p, v, name, situation, &tag, min) {
        Ok(b) => b,
        Err(e) => {
            section.note = e.to_string();
            return Some(section);
        }
    };
    section.header = b.header.clone();
    let keys: Vec<usize> = TAG_KEYS.iter().filter_map(|k| metric_index(k)).collect();
    let ej = metric_index("epa").unwrap_or(0);
    let dots: Vec<DotRow> = b.lines.iter().map(|l| dot_row(&l.value, l.row.as_ref().map(|r| &r.cells[ej]), l.league[ej], DotOf::Estimate)).collect();
    section.chart = charts::dot_interval(&format!("EPA per dropback — {name} by {} (dot: estimate, bar: 90% interval, tick: league)", b.header), &dots, width).to_svg();
    section.heads = keys.iter().map(|&j| (METRICS[j].short, METRICS[j].label)).collect();
    section.rows = b
        .lines
        .iter()
        .map(|l| ProfileRowView {
            label: "",
            href: {
                let mut q = l.query.clone();
                q.push(("passer".into(), name.to_string()));
                format!("/plays{}", to_query_string(&q))
            },
            dropbacks: format!("{}: {} of {}", l.value, l.row.as_ref().map(|r| r.dropbacks).unwrap_or(0), l.league_dropbacks),
            cells: keys
                .iter()
                .map(|&j| {
                    let m = &METRICS[j];
                    let c = l.row.as_ref().map(|r| &r.cells[j]);
                    (
                        fixed(c.and_then(|c| c.value), m.decimals),
                        c.map(|c| format!("est {} [{}, {}]", fixed(c.estimate, m.decimals), fixed(c.lo, m.decimals), fixed(c.hi, m.decimals))).unwrap_or_default(),
                        fixed(l.league[j], m.decimals),
                    )
                })
                .collect(),
        })
        .collect();
    Some(section)
}


/// What a dot-and-interval row shows of a split cell.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum DotOf {
    /// The estimate with its 90% interval and the raw value, against `league`.
    Estimate,
    /// The lift with its 90% interval, against his normal (a tick at 0).
    Lift,
}

/// One dot-and-interval row from a split cell (`None`: no dropbacks, an
/// empty row); `league` is the tick of an estimate row.
pub(super) fn dot_row(label: &str, c: Option<&splits::Cell>, league: Option<f64>, of: DotOf) -> DotRow {
    let part = |f: fn(&splits::Cell) -> Option<f64>| c.and_then(f);
    match of {
        DotOf::Estimate => DotRow { label: label.to_string(), estimate: part(|c| c.estimate), lo: part(|c| c.lo), hi: part(|c| c.hi), raw: part(|c| c.value), league },
        DotOf::Lift => DotRow { label: label.to_string(), estimate: part(|c| c.lift), lo: part(|c| c.lift_lo), hi: part(|c| c.lift_hi), raw: None, league: Some(0.0) },
    }
}

/// The late-down depth chart of the Decisions panel: yards needed, the depth
/// he chose and the depth the league chooses in the same spots.
pub struct DepthView {
    pub title: String,
    pub chart: String,
    pub rows: Vec<DepthRowView>,
    /// Why there is no chart (no air yards, no late-down throws); else empty.
    pub note: String,
}

/// One distance group of the depth table, formatted.
pub struct DepthRowView {
    pub label: String,
    pub throws: String,
    pub to_go: String,
    pub his: String,
    pub league: String,
}

/// His 3rd- and 4th-down throws with air yards in `situation` by distance:
/// the engine's snaps, the throw-value model's depths. `None` without a
/// throw-value model (no air yards in the file).
pub(super) fn depth_lines(model: Option<&ThrowModel>, p: &crate::plays::Plays, v: &splits::SnapValues, name: &str, situation: &Situation) -> Option<Vec<DepthLine>> {
    let m = model?;
    let snaps = splits::play_indices(p, v, &Situation { passer: None, ..situation.clone() }, Some(name), None);
    Some(depth_by_distance(m, p, &snaps))
}

/// The depth chart and table from the distance groups (pure).
pub(super) fn depth_view(lines: Option<&[DepthLine]>, name: &str, situation: &str, width: f64) -> DepthView {
    let title = format!("3rd and 4th down, {situation}: yards needed, {name}'s depth and the league's depth in the same spots (air yards)");
    let Some(lines) = lines else {
        return DepthView { title, chart: String::new(), rows: Vec::new(), note: "No depth chart: this file has no air yards.".into() };
    };
    let some = |x: f64| x.is_finite().then_some(x);
    let rows: Vec<DepthRowView> = lines
        .iter()
        .map(|l| DepthRowView {
            label: format!("{} to go", l.label),
            throws: l.throws.to_string(),
            to_go: fixed(some(l.to_go), 1),
            his: fixed(some(l.his_air), 1),
            league: fixed(some(l.league_air), 1),
        })
        .collect();
    if lines.iter().all(|l| l.throws == 0) {
        return DepthView { title, chart: String::new(), rows, note: format!("No 3rd- or 4th-down throws with air yards by {name} here.") };
    }
    let dots: Vec<charts::DepthRow> = lines
        .iter()
        .map(|l| charts::DepthRow { label: format!("{} to go ({})", l.label, l.throws), needed: some(l.to_go), his: some(l.his_air), league: some(l.league_air) })
        .collect();
    DepthView { chart: charts::depth_rows(&title, &dots, width).to_svg(), title, rows, note: String::new() }
}

/// The decisions panel: the throw values (charted), and beside them the
/// dropbacks the throw values leave out.
pub(super) const THROW_KEYS: &[&str] = &["choice", "execution"];
pub(super) const BESIDE_KEYS: &[&str] = &["sack_rate", "scramble_rate"];

/// The metrics of the lift-in-words table (fewer than the charts, so it fits a laptop).
const LIFT_WORD_KEYS: &[&str] = &["epa", "success", "cpoe", "rating", "sack_rate", "int_rate"];

pub(super) const PROFILE_KEYS: &[&str] = &["epa", "success", "cpoe", "rating", "anya", "sack_rate", "int_rate", "wpa"];

pub async fn profile(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let (st2, h2, q2) = (st.clone(), headers.clone(), q.clone());
    super::super::finished::answer(&st, "/passer", &headers, q.as_deref(), move || profile_now(st2, h2, q2)).await
}

fn profile_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return refused(&st, &headers, &e, "/passer", q.as_deref()),
    };
    let loaded = st.loaded();
    let (lg, ix) = (&loaded.league, &loaded.index);
    let p = lg.plays();
    let (_, our_passer) = ours(&st, &headers);
    let Some(name) = params.situation.passer.clone().or(our_passer) else {
        return super::pick::pick_passer(&st, &headers, Some(&params), "passer", "/passer", "his profile");
    };
    let trend = trend_situation(&params);
    let base = Situation { passer: None, ..params.situation.clone() };
    // His row of each preset alone (`split_row_in`), not the whole tables.
    let Some(prof) = splits::profile_in(ix, p, &lg.values(), &name, &base, &trend, params.min_dropbacks) else {
        return error_page(&st, &headers, StatusCode::NOT_FOUND, "No such passer", format!("No passer named {name} in this league."), "/");
    };
    let ch = chrome(&st, &headers, Some(&params), format!("Passer profile: {name}"), "passer", "/passer");
    let asked_tag = params.raw.iter().rev().find(|(k, v)| k == "by-tag" && !v.trim().is_empty()).map(|(_, v)| v.trim().to_string());
    if let Some(t) = &asked_tag {
        // An unknown tag is refused like any filter: the nearest name.
        let probe = crate::situation::TagFilter { name: t.to_ascii_lowercase(), keep: crate::situation::TagMatch::Contains(String::new()) };
        if let Err(mut e) = probe.check(p) {
            e.param = "by-tag".into();
            e.value = t.clone();
            return bad_query(&st, &headers, &e, "/passer");
        }
    }
    let tag_situation = Situation { seasons: params.situation.seasons.clone(), ..trend.clone() };
    let width = if ch.projector { 560.0 } else { 420.0 };
    let by_tag = tag_section(ix, p, &lg.values(), &name, &tag_situation, asked_tag.as_deref(), params.min_dropbacks, width);
    let dist = splits::epa_distribution_in(ix, p, &lg.values(), &Situation { passer: None, ..trend.clone() }, &name);
    let depth = depth_view(depth_lines(lg.throw_model.as_ref(), p, &lg.values(), &name, &tag_situation).as_deref(), &name, &tag_situation.describe(), width * 1.4);
    html(&profile_view(ch, &params, &name, &prof, &dist, p, by_tag, depth))
}

/// The passer page's view: a dot-and-interval chart per key metric across
/// the presets, the season trend, the EPA distribution against the league,
/// the decision and every-metric tables and his recent games. Pure: the
/// split engine's profile, distribution and tag breakdown in, no request.
#[allow(clippy::too_many_arguments)]
pub(super) fn profile_view(ch: Chrome, params: &Params, name: &str, prof: &splits::Profile, dist: &splits::EpaDistribution, p: &crate::plays::Plays, by_tag: Option<TagSection>, depth: DepthView) -> ProfilePage {
    let name = name.to_string();
    let keys: Vec<usize> = PROFILE_KEYS.iter().filter_map(|k| metric_index(k)).collect();
    let width = if ch.projector { 560.0 } else { 420.0 };
    let dot_chart = |j: usize| {
        let m = &METRICS[j];
        let rows: Vec<DotRow> = prof.presets.iter().map(|line| dot_row(line.label, line.row.as_ref().map(|r| &r.cells[j]), line.league[j], DotOf::Estimate)).collect();
        let unit = if m.scale == 100.0 && !m.label.contains('%') { " (%)" } else { "" };
        (
            format!("{}{unit}", m.label),
            charts::dot_interval(&format!("{} — {name} by situation (dot: estimate, bar: 90% interval, tick: league)", m.label), &rows, width).to_svg(),
        )
    };
    let charts: Vec<(String, String)> = keys.iter().map(|&j| dot_chart(j)).collect();
    let throw_charts: Vec<(String, String)> = THROW_KEYS.iter().filter_map(|k| metric_index(k)).map(dot_chart).collect();

    let on_the_line: Vec<&splits::ProfileLine> = prof.presets.iter().filter(|l| l.preset != Preset::EverySnap.key()).collect();
    let lift_charts = keys
        .iter()
        .map(|&j| {
            let m = &METRICS[j];
            let rows: Vec<DotRow> = on_the_line.iter().map(|line| dot_row(line.label, line.row.as_ref().map(|r| &r.cells[j]), None, DotOf::Lift)).collect();
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
    // The throw values first, sacks and scrambles beside them, then the rest.
    let first: Vec<usize> = THROW_KEYS.iter().chain(BESIDE_KEYS).filter_map(|k| metric_index(k)).collect();
    let decision_keys: Vec<usize> = first
        .iter()
        .copied()
        .chain(METRICS.iter().enumerate().filter(|(j, m)| m.decision && m.stat != Stat::Count && !first.contains(j)).map(|(j, _)| j))
        .collect();
    let build_rows = |ks: &[usize]| -> Vec<ProfileRowView> {
        prof.presets
            .iter()
            .map(|line| ProfileRowView {
                label: line.label,
                href: {
                    let mut q = line.query.clone();
                    q.push(("passer".into(), name.clone()));
                    format!("/plays{}", viewed(q, params.projector))
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
            games.push((format!("/game{}", viewed(vec![("game".into(), g.key.clone()), ("passer".into(), name.clone())], params.projector)), label));
            if games.len() >= 12 {
                break;
            }
        }
    }
    let mut all: Vec<(String, bool)> = p.passers.iter().map(|n| (n.clone(), *n == name)).collect();
    all.sort();
    ProfilePage {
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
        trend_title: format!("EPA per dropback by season, {}: {name} (solid) and the league (dashed)", prof.trend_situation),
        epa_title: format!("EPA per dropback, {}: the league (light, n = {}) and {name} (dark, n = {})", prof.trend_situation, dist.league_n, dist.passer_n),
        epa_chart,
        table_heads: heads(&table_keys),
        rows: build_rows(&table_keys),
        decision_heads: heads(&decision_keys),
        decision_rows: build_rows(&decision_keys),
        throw_charts,
        depth,
        api_href: format!("/api/profile{}", params.with(&[("passer", Some(&name)), ("view", None)])),
        report_href: format!("/report{}", viewed(Situation { passer: Some(name.clone()), seasons: params.situation.seasons.clone(), ..Preset::DEFAULT.situation(params.situation.one_score) }.to_query(), params.projector)),
        games,
        by_tag,
        opp_lines: prof.presets.iter().filter_map(|line| Some((line.label, opp_line(line.row.as_ref()?)))).collect(),
        opp_words: splits::OPPONENT_WORDS,
        chrome: ch,
    }
}

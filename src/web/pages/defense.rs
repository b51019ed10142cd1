//! The defense view: how one defense defends in a situation (default: late
//! and close), numbers allowed against the league's, with estimates,
//! intervals, its own level elsewhere and where it ranks among defenses;
//! every number links to the snaps behind it.

use super::explore::{number_query, row_situation, PresetLink};
use super::*;
use crate::situation::Group;

/// The lines of the defense view, by metric key; each reads with the
/// defense's words (`splits::headings`).
pub const DEFENSE_LINES: &[&str] = &["epa", "success", "sack_rate", "int_rate", "turnover", "comp_pct", "cpoe", "ypa", "anya", "rating", "wpa"];

/// One line of the defense view.
pub struct DefenseLine {
    pub label: &'static str,
    /// Which way is better for a defense, in words ("lower is better").
    pub better: &'static str,
    pub value: String,
    pub href: String,
    /// Snaps it is taken over ("412 dropbacks").
    pub over: String,
    pub league: String,
    pub estimate: String,
    pub interval: String,
    /// Its own level on its other snaps, and the lift here over it.
    pub normal: String,
    pub lift: String,
    /// "71% chance better than the league".
    pub chance: String,
    pub percentile: String,
    /// "better" / "worse" / "" (for the row's colour).
    pub tone: &'static str,
}

/// A team to pick.
pub struct TeamLink {
    pub team: String,
    pub href: String,
    pub active: bool,
}

#[derive(Template)]
#[template(path = "defense.html")]
pub(super) struct DefensePage {
    pub(super) chrome: Chrome,
    /// The defense shown (empty: pick one).
    pub(super) team: String,
    pub(super) description: String,
    pub(super) seasons: String,
    pub(super) presets: Vec<PresetLink>,
    pub(super) teams: Vec<TeamLink>,
    pub(super) lines: Vec<DefenseLine>,
    pub(super) dropbacks: String,
    pub(super) dropbacks_href: String,
    pub(super) league_dropbacks: String,
    /// Defenses ranked (at or above the minimum).
    pub(super) ranked: usize,
    pub(super) min: u32,
    pub(super) qualified: bool,
    pub(super) headline: String,
    pub(super) explore_href: String,
    pub(super) api_href: String,
    pub(super) csv_href: String,
}

pub async fn defense(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::super::service::engine(&st, move || defense_now(st2, headers, q)).await
}

fn defense_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let mut params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return refused(&st, &headers, &e, "/defense", q.as_deref()),
    };
    if !asks_situation(&params.raw.iter().filter(|(k, _)| k != "opponent").cloned().collect::<Vec<_>>()) {
        // No window asked: late and close (the default preset).
        let opponent = params.situation.opponent.take();
        params.situation = Situation { seasons: params.situation.seasons.take(), opponent, ..Preset::DEFAULT.situation(params.situation.one_score) };
    }
    params.situation.group = Group::Defense;
    if !params.raw.iter().any(|(k, v)| k == "min" && !v.trim().is_empty()) {
        params.min_dropbacks = splits::default_min_dropbacks(&params.situation);
    }
    let team = params.situation.opponent.clone();
    let title = match &team {
        Some(t) => format!("Defense: {t}"),
        None => "Defense view".into(),
    };
    let ch = chrome(&st, &headers, Some(&params), title, "defense", "/defense");
    let all = params.situation.without_row_pick();
    let table = st.split_table(&all, params.min_dropbacks, team.as_deref());
    let mut teams = st.league().plays().teams.clone();
    teams.sort();
    html(&defense_view(ch, &params, &table, &teams))
}

/// The defense view of a table grouped by defense (every defense, so the
/// percentiles and the count of defenses ranked are the league's). Pure.
pub(super) fn defense_view(ch: Chrome, params: &Params, table: &splits::SplitTable, teams: &[String]) -> DefensePage {
    let s = &params.situation;
    let team = s.opponent.clone().unwrap_or_default();
    let row = table.rows.iter().find(|r| r.passer.eq_ignore_ascii_case(&team));
    let keep = |q: Vec<(String, String)>| viewed(q, params.projector);
    let presets = Preset::ALL
        .iter()
        .map(|p| {
            let to = Situation { seasons: s.seasons.clone(), opponent: s.opponent.clone(), group: Group::Passer, ..p.situation(s.one_score) };
            PresetLink { label: p.label(), href: format!("/defense{}", keep(to.to_query())), active: s.preset == Some(*p) }
        })
        .collect();
    let teams = teams
        .iter()
        .map(|t| {
            let to = Situation { opponent: Some(t.clone()), group: Group::Passer, ..s.clone() };
            TeamLink { team: t.clone(), href: format!("/defense{}", keep(to.to_query())), active: t.eq_ignore_ascii_case(&team) }
        })
        .collect();
    let lines: Vec<DefenseLine> = match row {
        None => Vec::new(),
        Some(r) => DEFENSE_LINES
            .iter()
            .filter_map(|key| {
                let j = metric_index(key)?;
                let (m, mi, c) = (&METRICS[j], &table.metrics[j], &r.cells[j]);
                let label = mi.label;
                let d = m.decimals;
                let better = if splits::is_style(m.key) { "" } else if mi.higher_is_better { "higher is better" } else { "lower is better" };
                let tone = match c.p_better {
                    Some(pb) if pb >= 0.8 => "better",
                    Some(pb) if pb <= 0.2 => "worse",
                    _ => "",
                };
                Some(DefenseLine {
                    label,
                    better,
                    value: fixed(c.value, d),
                    href: format!("/plays{}", keep(number_query(s, &r.passer, m.key))),
                    over: format!("{} {}", crate::numfmt::thousands(c.n as usize), m.unit.label()),
                    league: fixed(table.league_row[j], d),
                    estimate: fixed(c.estimate, d),
                    interval: match (c.lo, c.hi) {
                        (Some(_), Some(_)) => format!("[{}, {}]", fixed(c.lo, d), fixed(c.hi, d)),
                        _ => String::new(),
                    },
                    normal: fixed(c.normal, d),
                    lift: super::explore::lift_text(c, d),
                    chance: c.p_better.map(|p| format!("{:.0}% chance better than the league", 100.0 * p)).unwrap_or_default(),
                    percentile: fixed(c.percentile, 0),
                    tone,
                })
            })
            .collect(),
    };
    let ranked = table.qualified().count();
    let headline = match row {
        None if team.is_empty() => "Pick a defense below.".to_string(),
        None => format!("{team} faced no dropback in this situation and seasons."),
        Some(r) => {
            let j = metric_index("epa").unwrap_or(0);
            let c = &r.cells[j];
            let pct = c.percentile.map(|p| format!("; {} percentile among {ranked} defenses, 100 = best", ordinal(p.round() as i64))).unwrap_or_default();
            format!(
                "{team} allowed {} EPA per dropback here against the league's {} (estimate {} [{}, {}]{pct}).",
                crate::numfmt::signed(c.value, 3, ""),
                crate::numfmt::signed(table.league_row[j], 3, ""),
                crate::numfmt::signed(c.estimate, 3, ""),
                crate::numfmt::signed(c.lo, 3, ""),
                crate::numfmt::signed(c.hi, 3, ""),
            )
        }
    };
    let grouped = Situation { group: Group::Defense, opponent: None, ..s.clone() };
    let mut table_q = grouped.to_query();
    table_q.push(("sort".into(), "epa".into()));
    table_q.push(("dir".into(), "asc".into()));
    let api_q = Situation { group: Group::Defense, ..s.clone() }.to_query();
    DefensePage {
        team: team.clone(),
        description: table.situation.clone(),
        seasons: super::explore::seasons_text(&table.seasons),
        presets,
        teams,
        lines,
        dropbacks: row.map(|r| crate::numfmt::thousands(r.dropbacks as usize)).unwrap_or_else(|| "0".into()),
        dropbacks_href: format!("/plays{}", keep(row_situation(&Situation { group: Group::Defense, ..s.clone() }, &team).to_query())),
        league_dropbacks: crate::numfmt::thousands(table.league_dropbacks as usize),
        ranked,
        min: params.min_dropbacks,
        qualified: row.is_some_and(|r| r.qualified),
        headline,
        explore_href: format!("/explore{}", keep(table_q)),
        api_href: format!("/api/splits{}", to_query_string(&api_q)),
        csv_href: format!("/api/splits.csv{}", to_query_string(&grouped.to_query())),
        chrome: ch,
    }
}

/// 1st, 2nd, 3rd, 4th, 11th, 21st ...
pub fn ordinal(n: i64) -> String {
    let suffix = match (n % 10, n % 100) {
        (_, 11..=13) => "th",
        (1, _) => "st",
        (2, _) => "nd",
        (3, _) => "rd",
        _ => "th",
    };
    format!("{n}{suffix}")
}

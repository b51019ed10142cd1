//! The snaps behind a number (marked when a rate counts them) and the cut-up CSV.

use super::*;

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
pub(super) struct PlaysPage {
    pub(super) chrome: Chrome,
    pub(super) description: String,
    pub(super) count: usize,
    pub(super) shown: usize,
    /// What the list is, against the number it came from.
    pub(super) note: String,
    pub(super) marking: bool,
    pub(super) snaps: Vec<SnapView>,
    pub(super) csv_href: String,
    pub(super) api_href: String,
    pub(super) back_href: String,
}

pub(super) const PLAY_PAGE_LIMIT: usize = 2000;

pub(super) fn snap_view(s: &splits::Snap) -> SnapView {
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
        epa: fixed(Some(s.epa), 2),
        wpa: fixed(Some(s.wpa), 3),
        epa_sort: sort_value(Some(s.epa)),
        wpa_sort: sort_value(Some(s.wpa)),
        counted: false,
    }
}

pub(super) fn play_list_for(st: &Shared, params: &Params) -> Vec<splits::Snap> {
    let lg = st.league();
    let metric = params.metric.as_deref().and_then(metric_index).map(|j| &METRICS[j]);
    splits::play_list(lg.plays(), &lg.values(), &params.situation, params.situation.passer.as_deref(), metric)
}

/// What a play list opened from a number shows: exactly the counted snaps,
/// or the denominator with the counted ones marked, or every snap of a mean.
pub(super) struct ListNote {
    pub(super) text: String,
    /// Mark the snaps the metric counts.
    pub(super) marking: bool,
}

pub(super) fn list_note(params: &Params, snaps: &[splits::Snap], counted: &[bool]) -> ListNote {
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
    let st2 = st.clone();
    super::super::service::engine(&st, move || plays_now(st2, headers, q)).await
}

fn plays_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/explore"),
    };
    let snaps = play_list_for(&st, &params);
    let counted = super::super::service::counted(st.as_ref(), &params, &snaps).unwrap_or_else(|| vec![false; snaps.len()]);
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
    let st2 = st.clone();
    super::super::service::engine(&st, move || plays_csv_now(st2, headers, q)).await
}

fn plays_csv_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
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

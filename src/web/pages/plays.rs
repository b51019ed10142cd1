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
    /// Throw choice and execution values ("–" off passes with air yards).
    pub choice: String,
    pub execution: String,
    pub choice_sort: String,
    pub execution_sort: String,
    /// Counted by the number the list was opened from (rates mark these).
    pub counted: bool,
    /// The staff's tag values, in the file's tag order.
    pub tags: Vec<String>,
}

#[derive(Template)]
#[template(path = "plays.html")]
pub(super) struct PlaysPage {
    pub(super) chrome: Chrome,
    pub(super) description: String,
    pub(super) count: usize,
    /// The page's snaps are `first..=last` of `count` (1-based).
    pub(super) first: usize,
    pub(super) last: usize,
    /// The next page, when there is one.
    pub(super) next_href: Option<String>,
    /// What the list is, against the number it came from.
    pub(super) note: String,
    pub(super) marking: bool,
    /// The file's tag names (a column each).
    pub(super) tag_names: Vec<String>,
    pub(super) snaps: Vec<SnapView>,
    pub(super) csv_href: String,
    pub(super) api_href: String,
    pub(super) back_href: String,
}

/// Snaps per page of the list (the `next` link goes on; the export has all).
pub(super) const PLAY_PAGE_LIMIT: usize = 500;

/// One snap for a table; its game link keeps the projector view.
pub(super) fn snap_view(s: &splits::Snap, projector: bool) -> SnapView {
    SnapView {
        game: s.game.clone(),
        seq: s.seq,
        game_href: format!("/game{}", viewed(vec![("game".into(), s.game.clone()), ("passer".into(), s.passer.clone().unwrap_or_default())], projector)),
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
        choice: fixed(s.choice.is_finite().then_some(s.choice), 3),
        execution: fixed(s.execution.is_finite().then_some(s.execution), 3),
        choice_sort: sort_value(s.choice.is_finite().then_some(s.choice)),
        execution_sort: sort_value(s.execution.is_finite().then_some(s.execution)),
        counted: false,
        tags: s.tags.iter().map(|(_, v)| v.clone()).collect(),
    }
}

/// What a play list opened from a number shows: exactly the counted snaps,
/// or the denominator with the counted ones marked, or every snap of a mean.
pub(super) struct ListNote {
    pub(super) text: String,
    /// Mark the snaps the metric counts.
    pub(super) marking: bool,
}

/// `total` snaps in the list, `n_counted` of them counted by its metric.
pub(super) fn list_note(params: &Params, total: usize, n_counted: usize) -> ListNote {
    let Some(m) = params.metric.as_deref().and_then(metric_index).map(|j| &METRICS[j]) else {
        return ListNote { text: format!("{total} dropbacks"), marking: false };
    };
    let unit = m.unit.label();
    let exact = PlayResult::counted_by(m.key).is_some_and(|r| params.situation.results.as_deref() == Some(&[r][..]));
    match m.stat {
        Stat::Count if exact => ListNote {
            text: match total {
                1 => format!("1 snap: exactly the one counted in {}", m.label),
                n => format!("{n} snaps: exactly the ones counted in {}", m.label),
            },
            marking: false,
        },
        Stat::Count if PlayResult::counted_by(m.key).is_some() => ListNote {
            text: format!("{} {unit}; the {n_counted} counted in {} are marked ● (sort on Counted to list them first)", total, m.label),
            marking: true,
        },
        Stat::Rate => ListNote {
            text: format!("{} {unit}: the denominator of {}; the {n_counted} it counts are marked ● (sort on Counted to list them first)", total, m.label),
            marking: true,
        },
        Stat::Count => ListNote { text: format!("{} {unit}: every one adds to {}", total, m.label), marking: false },
        Stat::Mean => ListNote { text: format!("{} {unit}: {} is the average over these", total, m.label), marking: false },
    }
}

pub async fn plays(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::super::service::engine(&st, move || plays_now(st2, headers, q)).await
}

fn plays_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let (rest, cursor) = match super::super::service::take_cursor(q.as_deref(), PLAY_PAGE_LIMIT) {
        Ok(x) => x,
        Err(e) => return bad_query(&st, &headers, &e, "/explore"),
    };
    let params = match Params::parse_in(rest.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return refused(&st, &headers, &e, "/plays", q.as_deref()),
    };
    let page = super::super::service::play_page(&st, &params, cursor);
    let ch = chrome(&st, &headers, Some(&params), "Snaps behind the number".into(), "plays", "/plays");
    let tag_names = st.league().plays().tags.names.clone();
    html(&plays_view(ch, &params, &page, cursor.limit, tag_names))
}

/// The play list's view: what the list is against the number it came
/// from, one page of its snaps (`PLAY_PAGE_LIMIT` unless the address says
/// otherwise) with the counted ones marked, and the links out (the next
/// page, the CSV of every snap). Pure: no request, no league.
pub(super) fn plays_view(ch: Chrome, params: &Params, page: &super::super::service::PlayPage, limit: usize, tag_names: Vec<String>) -> PlaysPage {
    let counted = page.counted.clone().unwrap_or_else(|| vec![false; page.snaps.len()]);
    let note = list_note(params, page.total, page.counted_total.unwrap_or(0));
    let next_href = page.next_after.map(|a| format!("/plays{}", params.with(&[("after", Some(&a.to_string())), ("limit", (limit != PLAY_PAGE_LIMIT).then(|| limit.to_string()).as_deref())])));
    PlaysPage {
        chrome: ch,
        description: params.situation.describe(),
        count: page.total,
        first: page.offset + usize::from(!page.snaps.is_empty()),
        last: page.offset + page.snaps.len(),
        next_href,
        note: note.text,
        marking: note.marking,
        tag_names,
        snaps: page.snaps.iter().zip(&counted).map(|(s, c)| SnapView { counted: *c, ..snap_view(s, params.projector) }).collect(),
        csv_href: format!("/plays.csv{}", params.with(&[("view", None)])),
        api_href: format!("/api/plays{}", params.with(&[("view", None)])),
        back_href: format!("/explore{}", viewed(Situation { passer: None, results: None, ..params.situation.clone() }.to_query(), params.projector)),
    }
}

/// The cut-up export for the video staff.
pub async fn plays_csv(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::super::service::engine(&st, move || plays_csv_now(st2, headers, q)).await
}

fn plays_csv_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return refused(&st, &headers, &e, "/plays", q.as_deref()),
    };
    let (name, body) = super::super::service::plays_csv_body(&st, &params);
    ([(header::CONTENT_TYPE, "text/csv; charset=utf-8".to_string()), (header::CONTENT_DISPOSITION, format!("attachment; filename=\"{name}\""))], body).into_response()
}

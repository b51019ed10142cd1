//! JSON twins of every table, with the same query parameters as the pages.
//! Bad input is a 400 with `{"error", "param", "value", "reason"}`.

use super::query::Params;
pub use super::service::split_for;

/// Snaps per `/api/plays` page unless `limit=` says otherwise (the `next`
/// link carries the cursor to the following page).
pub const PLAYS_PAGE: usize = 1000;
use super::Shared;
use crate::splits;
use axum::extract::{RawQuery, State};
use axum::http::{header, StatusCode};
use axum::response::{IntoResponse, Response};
use axum::Json;
use serde_json::json;

pub fn bad_request(e: &crate::situation::SituationError) -> Response {
    (
        StatusCode::BAD_REQUEST,
        Json(json!({ "error": e.to_string(), "param": e.param, "value": e.value, "reason": e.reason })),
    )
        .into_response()
}

fn not_found(what: &str) -> Response {
    (StatusCode::NOT_FOUND, Json(json!({ "error": what }))).into_response()
}

fn parse(st: &Shared, q: &Option<String>) -> Result<Params, Response> {
    Params::parse_in(q.as_deref(), st.league().plays()).map_err(|e| bad_request(&e))
}

pub async fn summary(State(st): State<Shared>) -> Response {
    let lg = st.league();
    let p = lg.plays();
    Json(json!({
        "file": lg.source.display().to_string(),
        "fingerprint": lg.scored.fingerprint,
        "model_version": crate::models::MODEL_VERSION,
        "seasons": p.seasons(),
        "games": p.games.len(),
        "snaps": p.len(),
        "teams": p.teams.len(),
        "passers": p.passers.len(),
        "validation": lg.report,
        "fit": lg.scored.models.report,
    }))
    .into_response()
}

pub async fn splits(State(st): State<Shared>, RawQuery(q): RawQuery) -> Response {
    let (st2, q2) = (st.clone(), q.clone());
    // The JSON is the same for every team and passer cookie: no headers in its key.
    super::finished::answer(&st, "/api/splits", &axum::http::HeaderMap::new(), q.as_deref(), move || splits_now(st2, q2)).await
}

fn splits_now(st: Shared, q: Option<String>) -> Response {
    match parse(&st, &q) {
        Ok(params) => Json(&*split_for(&st, &params, None)).into_response(),
        Err(r) => r,
    }
}

pub async fn splits_csv(State(st): State<Shared>, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::service::engine(&st, move || splits_csv_now(st2, q)).await
}

fn splits_csv_now(st: Shared, q: Option<String>) -> Response {
    match parse(&st, &q) {
        Ok(params) => (
            [(header::CONTENT_TYPE, "text/csv; charset=utf-8"), (header::CONTENT_DISPOSITION, "attachment; filename=\"splits.csv\"")],
            crate::export::split_csv(&split_for(&st, &params, None)),
        )
            .into_response(),
        Err(r) => r,
    }
}

pub async fn profile(State(st): State<Shared>, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::service::engine(&st, move || profile_now(st2, q)).await
}

fn profile_now(st: Shared, q: Option<String>) -> Response {
    let params = match parse(&st, &q) {
        Ok(p) => p,
        Err(r) => return r,
    };
    let Some(passer) = params.situation.passer.clone() else {
        return bad_request(&crate::situation::SituationError { param: "passer".into(), value: String::new(), reason: "a passer name is required".into() });
    };
    let loaded = st.loaded();
    let lg = &loaded.league;
    let trend = super::service::trend_situation(&params);
    let base = crate::situation::Situation { passer: None, ..params.situation.clone() };
    // His row of each preset alone (`split_row_in`), not the whole tables.
    match splits::profile_in(&loaded.index, lg.plays(), &lg.values(), &passer, &base, &trend, params.min_dropbacks) {
        Some(p) => Json(p).into_response(),
        None => not_found(&format!("no passer named {passer} in this league")),
    }
}

pub async fn plays(State(st): State<Shared>, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::service::engine(&st, move || plays_now(st2, q)).await
}

fn plays_now(st: Shared, q: Option<String>) -> Response {
    let (rest, cursor) = match super::service::take_cursor(q.as_deref(), PLAYS_PAGE) {
        Ok(x) => x,
        Err(e) => return bad_request(&e),
    };
    let params = match parse(&st, &rest) {
        Ok(p) => p,
        Err(r) => return r,
    };
    let page = super::service::play_page(&st, &params, cursor);
    let next = page.next_after.map(|a| format!("/api/plays{}", params.with(&[("after", Some(&a.to_string())), ("limit", Some(&cursor.limit.to_string()))])));
    Json(json!({
        "situation": params.situation.describe(),
        "count": page.total,
        "counted": page.counted_total,
        "offset": page.offset,
        "limit": cursor.limit,
        "next": next,
        "counted_snaps": page.counted,
        "snaps": page.snaps,
    }))
    .into_response()
}

pub async fn game(State(st): State<Shared>, RawQuery(q): RawQuery) -> Response {
    let params = match parse(&st, &q) {
        Ok(p) => p,
        Err(r) => return r,
    };
    let lg = st.league();
    let Some(key) = params.game.clone() else {
        return bad_request(&crate::situation::SituationError { param: "game".into(), value: String::new(), reason: "a game key is required".into() });
    };
    let Some(gi) = lg.plays().games.iter().position(|g| g.key == key) else {
        return not_found(&format!("no game {key} in this league"));
    };
    let snaps = splits::game_snaps(lg.plays(), &lg.values(), gi);
    let g = &lg.plays().games[gi];
    Json(json!({
        "game": g.key,
        "home": lg.plays().teams[g.home as usize],
        "away": lg.plays().teams[g.away as usize],
        "home_final": g.home_final,
        "away_final": g.away_final,
        "snaps": snaps,
    }))
    .into_response()
}

pub async fn calibration(State(st): State<Shared>) -> Response {
    let lg = st.league();
    Json(json!({
        "model_version": crate::models::MODEL_VERSION,
        "fingerprint": lg.scored.fingerprint,
        "calibration": lg.scored.calibration,
        "fit": lg.scored.models.report,
        // Which overtime rules WP was solved under, by runs of seasons.
        "overtime_rules": lg.plays().overtime.spans(&lg.plays().seasons()),
        "overtime_config": if lg.plays().overtime.is_default() { "default" } else { "given" },
    }))
    .into_response()
}

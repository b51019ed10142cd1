//! What pages and JSON share: our team and passer (cookie or serve
//! default), the split table for a query, which snaps of a list a number
//! counts, the trend's situation, links to a game's review. Pages and API
//! both call this module; it calls neither.

use super::query::{self, to_query_string, Params};
use super::Shared;
use crate::situation::{Preset, Situation};
use crate::splits::{self, metric_index, METRICS};
use axum::http::{HeaderMap, StatusCode};
use axum::response::{IntoResponse, Response};

pub const TEAM_COOKIE: &str = "lg_team";
pub const PASSER_COOKIE: &str = "lg_passer";

/// Our team and passer: the cookie, else the `serve --team/--passer` default.
pub fn ours(st: &Shared, headers: &HeaderMap) -> (Option<String>, Option<String>) {
    let team = query::cookie(headers, TEAM_COOKIE).filter(|t| !t.is_empty()).or_else(|| st.team.clone());
    let passer = query::cookie(headers, PASSER_COOKIE).filter(|t| !t.is_empty()).or_else(|| st.passer.clone());
    (team, passer)
}


/// Run a handler's engine work on tokio's blocking pool, at most
/// `HEAVY_AT_ONCE` at a time: the async worker threads stay free for
/// cheap requests while a big export or a new view is computed.
pub async fn engine(st: &Shared, work: impl FnOnce() -> Response + Send + 'static) -> Response {
    let Ok(permit) = st.heavy.clone().acquire_owned().await else {
        return (StatusCode::SERVICE_UNAVAILABLE, "503: the server is shutting down").into_response();
    };
    match tokio::task::spawn_blocking(move || {
        let answer = work();
        drop(permit);
        answer
    })
    .await
    {
        Ok(answer) => answer,
        Err(e) => {
            tracing::error!("engine work failed: {e}");
            (StatusCode::INTERNAL_SERVER_ERROR, "500: the engine failed on this request").into_response()
        }
    }
}

/// The split table; `sort`/`dir`/`by` order the rows as on the page.
pub fn split_for(st: &Shared, params: &Params, focus: Option<&str>) -> splits::SplitTable {
    let mut t = (*st.split_table(&params.situation, params.min_dropbacks, focus)).clone();
    if let Some(key) = &params.sort {
        t.sort(key, params.sort_by, params.descending);
    }
    t
}

/// For a list opened from a rate or a count of events (`metric=`): does the
/// metric count each snap (the rate's successes, the count's events)? None
/// for other metrics (totals of yards, averages) and without one.
pub fn counted(st: &super::AppState, params: &Params, snaps: &[splits::Snap]) -> Option<Vec<bool>> {
    let m = &METRICS[params.metric.as_deref().and_then(metric_index)?];
    if m.stat != splits::Stat::Rate && crate::situation::PlayResult::counted_by(m.key).is_none() {
        return None;
    }
    let lg = st.league();
    let v = lg.values();
    Some(snaps.iter().map(|s| splits::metrics::value(lg.plays(), &v, m, s.index) > 0.0).collect())
}

/// The situation of the season trend (default late & close).
pub fn trend_situation(params: &Params) -> Situation {
    let preset = params.trend.as_deref().and_then(Preset::parse).unwrap_or(Preset::DEFAULT);
    preset.situation(params.situation.one_score)
}

/// Link to a game's review (play lists and the game page link to it).
pub fn review_href(game: &str) -> String {
    format!("/review{}", to_query_string(&[("game".to_string(), game.to_string())]))
}

//! What pages and JSON share: our team and passer (cookie or serve
//! default), the split table for a query, which snaps of a list a number
//! counts, the trend's situation, links to a game's review. Pages and API
//! both call this module; it calls neither.

use super::query::{self, to_query_string, Params};
use super::Shared;
use crate::situation::{Preset, Situation};
use crate::splits::{self, metric_index, METRICS};
use axum::http::{HeaderMap, StatusCode};
use std::sync::Arc;
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
/// The cached table itself unless a sort asks for a copy.
pub fn split_for(st: &Shared, params: &Params, focus: Option<&str>) -> Arc<splits::SplitTable> {
    let t = st.split_table(&params.situation, params.min_dropbacks, focus);
    match &params.sort {
        Some(key) => {
            let mut t = (*t).clone();
            t.sort(key, params.sort_by, params.descending);
            Arc::new(t)
        }
        None => t,
    }
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

/// Where a page of a play list starts and how long it is: `after=` (the
/// position of the last snap of the page before; absent on the first page)
/// and `limit=`. They belong to the play-list URLs only, so they are taken
/// out of the query before the situation is read.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Cursor {
    pub after: Option<usize>,
    pub limit: usize,
}

/// Longest page `limit=` may ask for.
pub const MAX_PAGE: usize = 5000;

/// Split a play list's query into the rest (for `Params`) and its cursor.
pub fn take_cursor(q: Option<&str>, default_limit: usize) -> Result<(Option<String>, Cursor), crate::situation::SituationError> {
    let bad = |k: &str, v: &str, reason: &str| crate::situation::SituationError { param: k.into(), value: v.into(), reason: reason.into() };
    let mut cursor = Cursor { after: None, limit: default_limit };
    let mut rest = Vec::new();
    for (k, v) in query::pairs(q) {
        match k.as_str() {
            "after" if v.trim().is_empty() => {}
            "after" => cursor.after = Some(v.trim().parse().map_err(|_| bad(&k, &v, "expected the position of a snap (the `next` link's `after=`)"))?),
            "limit" => {
                cursor.limit = match v.trim().parse::<usize>() {
                    Ok(n) if (1..=MAX_PAGE).contains(&n) => n,
                    _ => return Err(bad(&k, &v, &format!("expected a whole number of snaps 1-{MAX_PAGE}"))),
                }
            }
            _ => rest.push((k, v)),
        }
    }
    let rest = to_query_string(&rest);
    Ok((rest.strip_prefix('?').map(str::to_string), cursor))
}

/// One page of the snaps behind a number.
pub struct PlayPage {
    /// Snaps in the whole list.
    pub total: usize,
    /// Of those, how many the list's metric counts (rates, counts of events).
    pub counted_total: Option<usize>,
    /// Position of the page's first snap in the list (0-based).
    pub offset: usize,
    pub snaps: Vec<splits::Snap>,
    /// Per snap of the page: counted by the metric? (None without one.)
    pub counted: Option<Vec<bool>>,
    /// The cursor of the next page, when there is one.
    pub next_after: Option<usize>,
}

/// The page of `params`' play list that `cursor` points at.
pub fn play_page(st: &Shared, params: &Params, cursor: Cursor) -> PlayPage {
    let lg = st.league();
    let (p, v) = (lg.plays(), lg.values());
    let metric = params.metric.as_deref().and_then(metric_index).map(|j| &METRICS[j]);
    let all = splits::play_indices(p, &v, &params.situation, params.situation.passer.as_deref(), metric);
    let offset = cursor.after.map_or(0, |a| all.partition_point(|&i| i <= a));
    let page = &all[offset..(offset + cursor.limit).min(all.len())];
    let counts = counts_metric(params).map(|m| (m, all.iter().filter(|&&i| splits::metrics::value(p, &v, m, i) > 0.0).count()));
    PlayPage {
        total: all.len(),
        counted_total: counts.map(|c| c.1),
        offset,
        counted: counts.map(|(m, _)| page.iter().map(|&i| splits::metrics::value(p, &v, m, i) > 0.0).collect()),
        snaps: page.iter().map(|&i| splits::snap_at(p, &v, i)).collect(),
        next_after: (offset + page.len() < all.len()).then(|| page.last().copied()).flatten(),
    }
}

/// The metric a list was opened from, when it counts each snap (a rate's
/// successes, a count's events).
fn counts_metric(params: &Params) -> Option<&'static splits::MetricDef> {
    let m = &METRICS[params.metric.as_deref().and_then(metric_index)?];
    (m.stat == splits::Stat::Rate || crate::situation::PlayResult::counted_by(m.key).is_some()).then_some(m)
}

/// The whole play list as CSV, streamed, with its file name: the snap positions are found at
/// once, the rows written a piece at a time on the blocking pool as the
/// client reads, so a list of every snap never sits whole in memory.
pub fn plays_csv_body(st: &Shared, params: &Params) -> (String, axum::body::Body) {
    const PIECE: usize = 2000;
    let loaded = st.loaded();
    let (p, v) = (loaded.league.plays(), loaded.league.values());
    let metric = params.metric.as_deref().and_then(metric_index).map(|j| &METRICS[j]);
    let all = Arc::new(splits::play_indices(p, &v, &params.situation, params.situation.passer.as_deref(), metric));
    let shared = all.first().map(|&i| p.offense[i]).filter(|&t| all.iter().all(|&i| p.offense[i] == t)).map(|t| p.teams[t as usize].clone());
    let seasons: Vec<i32> = all.iter().map(|&i| p.season[i]).collect();
    let name = crate::export::file_name("cutup", &crate::export::name_parts_from(&params.situation, shared, &seasons), "csv");
    let pieces = futures_util::stream::unfold(0usize, move |k| {
        let (loaded, all) = (loaded.clone(), all.clone());
        async move {
            if k > all.len() {
                return None;
            }
            let work = tokio::task::spawn_blocking(move || {
                if k == 0 {
                    return crate::export::cutup_head(&loaded.league.plays().tags.names);
                }
                let lg = &loaded.league;
                let v = lg.values();
                let snaps: Vec<splits::Snap> = all[k - 1..(k - 1 + PIECE).min(all.len())].iter().map(|&i| splits::snap_at(lg.plays(), &v, i)).collect();
                crate::export::cutup_piece(&snaps)
            });
            let next = if k == 0 { 1 } else { k + PIECE };
            Some((work.await.map_err(std::io::Error::other), next))
        }
    });
    (name, axum::body::Body::from_stream(pieces))
}

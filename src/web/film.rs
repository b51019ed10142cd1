//! Film-room pages: the week's game review for our team (every snap in each
//! late-game preset against the league's distribution in the same state)
//! and the staff's saved cut-up lists. Pure view builders; the handlers
//! gather the engine's values off the async threads.

use super::pages::{bad_query, chrome, error_page, html, Chrome};
use super::query::Params;
use super::Shared;
use crate::charts::{self, Series};
use crate::notes::{self, Cutup, Note};
use crate::numfmt;
use crate::splits::review::{game_review_with, GameReview, ReviewSnap};
use crate::splits::Snap;
use askama::Template;
use axum::extract::{RawQuery, State};
use axum::http::{HeaderMap, StatusCode};
use axum::response::Response;

/// A snap row of the review: the snap's own words and its numbers as text.
pub struct ReviewRow {
    pub snap: Snap,
    pub passer: String,
    pub epa: String,
    pub epa_pct: String,
    pub wpa: String,
    pub wpa_pct: String,
}

pub struct ReviewSectionView {
    pub label: String,
    pub rows: Vec<ReviewRow>,
}

#[derive(Template)]
#[template(path = "review.html")]
pub struct ReviewPage {
    pub chrome: Chrome,
    pub heading: String,
    pub chart: String,
    pub sections: Vec<ReviewSectionView>,
}

fn row(r: &ReviewSnap) -> ReviewRow {
    let s = &r.snap;
    ReviewRow {
        snap: s.clone(),
        passer: s.passer.clone().unwrap_or_default(),
        epa: numfmt::signed(Some(s.epa), 2, ""),
        epa_pct: numfmt::count(r.epa_pct),
        wpa: numfmt::signed(Some(s.wpa * 100.0), 1, "%"),
        wpa_pct: numfmt::count(r.wpa_pct),
    }
}

/// The pure view of a review.
pub fn review_view(chrome: Chrome, r: &GameReview, wide: bool) -> ReviewPage {
    let (us, them) = r.score;
    let outcome = match us.cmp(&them) {
        std::cmp::Ordering::Greater => "won",
        std::cmp::Ordering::Less => "lost",
        std::cmp::Ordering::Equal => "tied",
    };
    let heading = format!("Game review: {} {} {} {}-{} ({})", r.team, if r.home { "vs" } else { "at" }, r.opponent, us, them, outcome);
    let mut labels: Vec<(f64, String)> = vec![(0.0, "Q1".into()), (900.0, "Q2".into()), (1800.0, "Q3".into()), (2700.0, "Q4".into()), (3600.0, "end".into())];
    if r.wp_path.last().is_some_and(|p| p.0 > 3601.0) {
        labels.push((4200.0, "OT".into()));
    }
    let chart = charts::lines(
        &format!("{} win probability through the game (from {}'s side)", r.team, r.team),
        &[Series { name: format!("{} win probability", r.team), class: "passer", points: r.wp_path.clone() }],
        &[],
        if wide { 1700.0 } else { 1000.0 },
        260.0,
        Some((0.0, 1.0)),
        Some(&labels),
        &|v| numfmt::percent(Some(v * 100.0), 0),
    )
    .to_svg();
    let sections = r.sections.iter().map(|s| ReviewSectionView { label: s.label.to_string(), rows: s.snaps.iter().map(row).collect() }).collect();
    ReviewPage { chrome, heading, chart, sections }
}

/// The review the query asks for: (status, reason) when it cannot be built.
async fn build_review(st: &Shared, headers: &HeaderMap, params: &Params) -> Result<GameReview, (StatusCode, String)> {
    let Some(key) = params.game.clone() else {
        return Err((StatusCode::BAD_REQUEST, "game=: a game key is required (follow a link from a play list or the game page)".into()));
    };
    let lg = st.league();
    let p = lg.plays();
    let Some(gi) = p.games.iter().position(|g| g.key == key) else {
        return Err((StatusCode::NOT_FOUND, format!("game={key}: no game with that key in this league")));
    };
    let g = &p.games[gi];
    // Whose review: the team asked for, else our team when it played, else the home team.
    let asked = params.situation.offense.clone().or_else(|| super::service::ours(st, headers).0);
    let team = asked.and_then(|code| p.team_index(&code)).filter(|t| *t == g.home || *t == g.away).unwrap_or(g.home);
    let one_score = params.situation.one_score;
    let loaded = st.loaded();
    match tokio::task::spawn_blocking(move || game_review_with(&loaded.review, loaded.league.plays(), &loaded.league.values(), gi, team, one_score)).await {
        Ok(Some(r)) => Ok(r),
        _ => Err((StatusCode::INTERNAL_SERVER_ERROR, "the game review could not be built".into())),
    }
}

pub async fn review(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse(q.as_deref()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/"),
    };
    match build_review(&st, &headers, &params).await {
        Ok(r) => {
            let c = chrome(&st, &headers, Some(&params), format!("Game review {}", r.game), "review", "/review");
            html(&review_view(c, &r, params.projector))
        }
        Err((status, why)) => error_page(&st, &headers, status, "No review for that game", why, "/"),
    }
}

/// JSON twin of the review.
pub async fn review_json(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    use axum::response::IntoResponse;
    let params = match Params::parse(q.as_deref()) {
        Ok(p) => p,
        Err(e) => return super::api::bad_request(&e),
    };
    match build_review(&st, &headers, &params).await {
        Ok(r) => axum::Json(r).into_response(),
        Err((status, why)) => (status, axum::Json(serde_json::json!({ "error": why }))).into_response(),
    }
}

/// One saved list as shown on the page.
pub struct ListView {
    pub id: i64,
    pub name: String,
    pub csv_href: String,
    pub pdf_href: String,
    pub delete_url: String,
    pub rows: Vec<ListRow>,
    pub unplaced: usize,
}

pub struct ListRow {
    pub snap: Snap,
    pub passer: String,
    pub notes: String,
}

#[derive(Template)]
#[template(path = "cutups.html")]
pub struct CutupsPage {
    pub chrome: Chrome,
    pub lists: Vec<ListView>,
    pub off: Option<String>,
}

/// The pure view of the saved lists against the loaded league.
pub fn lists_view(p: &crate::plays::Plays, v: &crate::splits::SnapValues, lists: Vec<Cutup>, all_notes: &[Note]) -> Vec<ListView> {
    lists
        .into_iter()
        .map(|l| {
            let placed = super::notes::place_list(p, v, l, all_notes);
            let rows = placed
                .snaps
                .into_iter()
                .map(|s| ListRow { passer: s.snap.passer.clone().unwrap_or_default(), snap: s.snap, notes: s.notes.join(" | ") })
                .collect();
            let id = placed.id;
            ListView {
                id,
                name: placed.name,
                csv_href: format!("/api/cutups/{id}/csv"),
                pdf_href: format!("/api/cutups/{id}/pdf"),
                delete_url: format!("/api/cutups/{id}"),
                rows,
                unplaced: placed.unplaced,
            }
        })
        .collect()
}

pub async fn cutups(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse(q.as_deref()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/"),
    };
    let c = chrome(&st, &headers, Some(&params), "Cut-up lists".into(), "cutups", "/cutups");
    let Some(store) = st.notes() else {
        return html(&CutupsPage { chrome: c, lists: Vec::new(), off: Some("Notes and lists are off: the notes database could not be opened when the server started (see its log).".into()) });
    };
    let read = tokio::task::spawn_blocking(move || Ok::<_, notes::NotesError>((store.cutups()?, store.notes()?))).await;
    match read {
        Ok(Ok((lists, all_notes))) => {
            let lg = st.league();
            let lists = lists_view(lg.plays(), &lg.values(), lists, &all_notes);
            html(&CutupsPage { chrome: c, lists, off: None })
        }
        Ok(Err(e)) => error_page(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, "Lists unavailable", e.to_string(), "/"),
        Err(e) => error_page(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, "Lists unavailable", e.to_string(), "/"),
    }
}

//! The server-rendered pages (askama templates): home, situation explorer,
//! passer profile, play list and cut-up export, game flow, calibration.
//! Each page is a view of the split engine's values; numbers are formatted
//! by `numfmt`, nowhere else.

use super::service::{ours, review_href, split_for, trend_situation, PASSER_COOKIE, TEAM_COOKIE};
use super::query::{self, to_query_string, Params};
use super::Shared;
use crate::charts::{self, DotRow, Marker, Series};
use crate::numfmt::fixed;
use crate::situation::params::Field;
use crate::situation::{PlayResult, Preset, Situation, SituationError, PARAMS};
use crate::splits::{self, metric_index, MetricInfo, SortBy, Stat, METRICS, METRIC_GROUPS};
use askama::Template;
use axum::extract::{RawQuery, State};
use axum::http::{header, HeaderMap, StatusCode};
use axum::response::{Html, IntoResponse, Redirect, Response};

mod home;
mod explore;
mod defense;
mod profile;
mod plays;
mod game;
mod calibration;
mod report;
mod pick;
#[cfg(test)]
mod tests;

pub use home::*;
pub use explore::*;
pub use defense::*;
pub use profile::*;
pub use plays::*;
pub use game::*;
pub use calibration::*;
pub use report::*;
pub(crate) use pick::pick_passer;

/// Page frame: title, navigation, projector toggle, our team and passer.
pub struct Chrome {
    pub title: String,
    pub projector: bool,
    pub toggle_href: String,
    pub toggle_label: &'static str,
    pub our_team: Option<String>,
    pub our_passer: Option<String>,
    /// The menu: label, address (keeping the seasons, our passer and the
    /// projector view), and whether it is this page.
    pub menu: Vec<(&'static str, String, bool)>,
}

/// The situation the menu's report and PDF open on: the page's own (its
/// preset and filters, without a play-result narrowing) when it shows one,
/// else the default preset; always with the page's seasons and a passer
/// (the page's, else ours).
pub fn report_situation_for(params: Option<&Params>, our_passer: Option<&str>) -> Situation {
    let one_score = params.map(|p| p.situation.one_score).unwrap_or(8);
    let mut s = match params {
        Some(p) if asks_situation(&p.raw.iter().filter(|(k, _)| k != "passer").cloned().collect::<Vec<_>>()) => Situation { results: None, ..p.situation.clone() },
        _ => Situation {
            seasons: params.and_then(|p| p.situation.seasons.clone()),
            passer: params.and_then(|p| p.situation.passer.clone()),
            ..Preset::DEFAULT.situation(one_score)
        },
    };
    if s.passer.is_none() {
        s.passer = our_passer.map(str::to_string);
    }
    s
}

/// The top menu's links. Every link keeps the seasons asked for and the
/// projector view; the passer pages open on our passer (or the page's);
/// the report and its PDF open on the page's situation.
pub fn menu(active: &str, params: Option<&Params>, our_passer: Option<&str>) -> Vec<(&'static str, String, bool)> {
    let mut keep: Vec<(String, String)> = Vec::new();
    if let Some(s) = params.and_then(|p| p.situation.show(crate::situation::params::Field::Seasons)) {
        keep.push(("season".into(), s));
    }
    let view: Vec<(String, String)> = if params.is_some_and(|p| p.projector) { vec![("view".into(), "projector".into())] } else { Vec::new() };
    let with = |mut first: Vec<(String, String)>, seasons: bool| {
        first.extend(keep.iter().filter(|_| seasons).cloned());
        first.extend(view.iter().cloned());
        to_query_string(&first)
    };
    let preset_q = vec![("preset".to_string(), Preset::DEFAULT.key().to_string())];
    let page_passer = params.and_then(|p| p.situation.passer.as_deref()).or(our_passer);
    let passer_q: Vec<(String, String)> = page_passer.map(|p| vec![("passer".to_string(), p.to_string())]).unwrap_or_default();
    let mut report_view = report_situation_for(params, our_passer).to_query();
    report_view.extend(view.iter().cloned());
    vec![
        ("Home", format!("/{}", with(Vec::new(), false)), active == "home"),
        ("Situations", format!("/explore{}", with(preset_q, true)), active == "explore"),
        ("Passer", format!("/passer{}", with(passer_q.clone(), true)), active == "passer"),
        ("Meeting", format!("/meeting{}", with(passer_q, true)), active == "meeting"),
        ("Cut-ups", format!("/cutups{}", with(Vec::new(), false)), active == "cutups"),
        ("Calibration", format!("/calibration{}", with(Vec::new(), false)), active == "calibration"),
        ("Report", format!("/report{}", to_query_string(&report_view)), active == "report"),
        ("PDF", format!("/report.pdf{}", to_query_string(&report_view)), false),
    ]
}

pub(super) fn chrome(st: &Shared, headers: &HeaderMap, params: Option<&Params>, title: String, active: &'static str, path: &str) -> Chrome {
    let projector = params.is_some_and(|p| p.projector);
    let toggle_href = match params {
        Some(p) => format!("{path}{}", p.with(&[("view", if projector { None } else { Some("projector") })])),
        None => format!("{path}{}", if projector { "" } else { "?view=projector" }),
    };
    let (our_team, our_passer) = ours(st, headers);
    Chrome {
        menu: menu(active, params, our_passer.as_deref()),
        title,
        projector,
        toggle_href,
        toggle_label: if projector { "Laptop view" } else { "Projector view" },
        our_team,
        our_passer,
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

/// The same page without the parameters that could not be used: each
/// refused parameter is dropped in turn until the rest parses, so every
/// other filter, the seasons and the view are kept.
pub fn working_back(path: &str, q: Option<&str>, plays: &crate::plays::Plays) -> String {
    let mut pairs: Vec<(String, String)> = query::pairs(q).into_iter().filter(|(k, _)| k != "token").collect();
    loop {
        let qs = to_query_string(&pairs);
        match Params::parse_in(Some(qs.trim_start_matches('?')), plays) {
            Ok(_) => return format!("{path}{qs}"),
            Err(e) => {
                let before = pairs.len();
                pairs.retain(|(k, _)| *k != e.param);
                if pairs.len() == before {
                    return path.to_string();
                }
            }
        }
    }
}

/// A refused query on `path`: the reason, and a way back that keeps every
/// filter it can.
pub(super) fn refused(st: &Shared, headers: &HeaderMap, e: &SituationError, path: &str, q: Option<&str>) -> Response {
    let back = working_back(path, q, st.league().plays());
    bad_query(st, headers, e, &back)
}

pub async fn not_found(State(st): State<Shared>, headers: HeaderMap) -> Response {
    error_page(&st, &headers, StatusCode::NOT_FOUND, "No such page", "Nothing lives at this address.".into(), "/")
}

/// `?query` with `view=projector` added when the page is in projector view,
/// so links inside tables keep the view.
pub fn viewed(mut q: Vec<(String, String)>, projector: bool) -> String {
    if projector && !q.iter().any(|(k, _)| k == "view") {
        q.push(("view".into(), "projector".into()));
    }
    to_query_string(&q)
}

fn sort_value(v: Option<f64>) -> String {
    match v {
        Some(x) if x.is_finite() => format!("{x}"),
        _ => String::new(),
    }
}

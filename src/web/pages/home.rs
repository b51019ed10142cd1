//! The home page: what is loaded, the checks and models in brief, choosing our team and passer, reload.

use super::*;

#[derive(Template)]
#[template(path = "home.html")]
pub(super) struct HomePage {
    pub(super) chrome: Chrome,
    pub(super) file: String,
    pub(super) fingerprint: String,
    pub(super) model_version: &'static str,
    pub(super) seasons: String,
    pub(super) games: usize,
    pub(super) snaps: usize,
    pub(super) teams: Vec<String>,
    pub(super) passers: Vec<String>,
    pub(super) files: Vec<String>,
    pub(super) rows_skipped: usize,
    pub(super) issue_lines: Vec<String>,
    pub(super) issue_counts: Vec<(String, usize)>,
    pub(super) calibration_line: String,
    pub(super) reload_note: Option<String>,
    pub(super) presets: Vec<(String, String)>,
    pub(super) fit_lines: Vec<String>,
}

pub async fn home(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = Params::parse(q.as_deref()).ok();
    let lg = st.league();
    let facts = HomeFacts {
        file: lg.source.display().to_string(),
        fingerprint: lg.scored.fingerprint.clone(),
        calibration_line: super::super::calib::summary(&lg.scored.calibration),
        fit_lines: super::super::calib::fit_lines(&lg.scored.models.report),
        reload_note: st.reload_note(),
    };
    let ch = chrome(&st, &headers, params.as_ref(), "What is loaded".into(), "home", "/");
    html(&home_view(ch, lg.plays(), &lg.report, facts))
}

/// What the home page says about the loaded league besides its plays.
pub(super) struct HomeFacts {
    pub(super) file: String,
    pub(super) fingerprint: String,
    pub(super) calibration_line: String,
    pub(super) fit_lines: Vec<String>,
    pub(super) reload_note: Option<String>,
}

/// The home page's view: what is loaded, the checks, the models in brief,
/// and the team and passer lists (by name) to choose ours from. Pure.
pub(super) fn home_view(ch: Chrome, p: &crate::plays::Plays, report: &crate::playfile::LoadReport, facts: HomeFacts) -> HomePage {
    let seasons = p.seasons();
    let mut teams = p.teams.clone();
    teams.sort();
    // passers with at least one dropback, by name
    let mut counts = vec![0usize; p.passers.len()];
    for i in 0..p.len() {
        if p.dropback[i] && p.passer[i] != crate::plays::NO_PASSER {
            counts[p.passer[i] as usize] += 1;
        }
    }
    let mut passers: Vec<(usize, String)> = counts.iter().enumerate().filter(|(_, c)| **c > 0).map(|(i, c)| (*c, p.passers[i].clone())).collect();
    passers.sort_by(|a, b| a.1.cmp(&b.1));
    let presets = Preset::ALL.iter().map(|pr| (pr.label().to_string(), format!("/explore{}", viewed(vec![("preset".into(), pr.key().into())], ch.projector)))).collect();
    HomePage {
        chrome: ch,
        file: facts.file,
        fingerprint: facts.fingerprint,
        model_version: crate::models::MODEL_VERSION,
        seasons: match (seasons.first(), seasons.last()) {
            (Some(a), Some(b)) if a != b => format!("{a}–{b} ({} seasons)", seasons.len()),
            (Some(a), _) => a.to_string(),
            _ => "none".into(),
        },
        games: p.games.len(),
        snaps: p.len(),
        teams,
        passers: passers.into_iter().map(|(_, n)| n).collect(),
        files: report.files.clone(),
        rows_skipped: report.rows_skipped,
        issue_lines: report.issues.iter().take(20).map(|i| i.to_string()).collect(),
        issue_counts: report.counts.iter().map(|(k, v)| (k.clone(), *v)).collect(),
        calibration_line: facts.calibration_line,
        reload_note: facts.reload_note,
        presets,
        fit_lines: facts.fit_lines,
    }
}

/// Remember our team and passer in cookies, then go home.
pub async fn choose(RawQuery(q): RawQuery) -> Response {
    let pairs = query::pairs(q.as_deref());
    let get = |k: &str| pairs.iter().find(|(p, _)| p == k).map(|(_, v)| v.trim().to_string());
    let enc = |v: &str| serde_urlencoded::to_string([("v", v)]).unwrap_or_default().trim_start_matches("v=").to_string();
    let mut resp = Redirect::to("/").into_response();
    for (name, value) in [(TEAM_COOKIE, get("team")), (PASSER_COOKIE, get("passer"))] {
        if let Some(v) = value {
            let v: String = v.chars().take(200).collect();
            let cookie = format!("{name}={}; Path=/; Max-Age=31536000; SameSite=Lax", enc(&v));
            if let Ok(h) = header::HeaderValue::from_str(&cookie) {
                resp.headers_mut().append(header::SET_COOKIE, h);
            }
        }
    }
    resp
}

pub async fn reload(State(st): State<Shared>) -> Response {
    let st2 = st.clone();
    let reloaded = tokio::task::spawn_blocking(move || st2.reload()).await;
    if matches!(reloaded, Ok(Ok(()))) {
        st.warm_in_background();
    }
    Redirect::to("/").into_response()
}

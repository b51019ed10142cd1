//! Which passer? What a passer's view (profile, meeting, report) shows when
//! no passer is named and none is ours: the league's passers with their
//! latest team, seasons and dropbacks, each a link to the view asked for
//! with the rest of its query kept.

use super::*;
use crate::plays::{Plays, NO_PASSER};

pub struct PickRow {
    pub name: String,
    pub team: String,
    pub seasons: String,
    pub dropbacks: usize,
    pub href: String,
}

#[derive(Template)]
#[template(path = "pick.html")]
pub struct PickPage {
    pub chrome: Chrome,
    /// What the links open, in words ("his profile").
    pub opens: &'static str,
    pub rows: Vec<PickRow>,
}

/// Every passer with a dropback, most dropbacks first (ties by name): his
/// team in his latest season (the offense of his last dropback), his first
/// and last season, and a link to `path` with `keep` and `passer=`. Pure.
pub fn pick_rows(p: &Plays, path: &str, keep: &[(String, String)]) -> Vec<PickRow> {
    // Per passer: dropbacks, first season, last snap.
    let mut seen: Vec<(usize, i32, usize)> = vec![(0, i32::MAX, 0); p.passers.len()];
    for i in 0..p.len() {
        let who = p.passer[i];
        if !p.dropback[i] || who == NO_PASSER {
            continue;
        }
        let e = &mut seen[who as usize];
        e.0 += 1;
        e.1 = e.1.min(p.season[i]);
        e.2 = i;
    }
    let mut rows: Vec<PickRow> = seen
        .iter()
        .enumerate()
        .filter(|(_, e)| e.0 > 0)
        .map(|(k, &(n, first, last))| {
            let name = p.passers[k].clone();
            let mut q: Vec<(String, String)> = keep.iter().filter(|(key, _)| key != "passer").cloned().collect();
            q.push(("passer".into(), name.clone()));
            let latest = p.season[last];
            PickRow {
                team: p.teams[p.offense[last] as usize].clone(),
                seasons: if first == latest { first.to_string() } else { format!("{first}–{latest}") },
                dropbacks: n,
                href: format!("{path}{}", to_query_string(&q)),
                name,
            }
        })
        .collect();
    rows.sort_by(|a, b| b.dropbacks.cmp(&a.dropbacks).then_with(|| a.name.cmp(&b.name)));
    rows
}

/// The page: status 200 (choosing is not an error), the chrome of the
/// view asked for.
pub(crate) fn pick_passer(st: &Shared, headers: &HeaderMap, params: Option<&Params>, active: &'static str, path: &str, opens: &'static str) -> Response {
    let keep: Vec<(String, String)> = params.map(|p| p.raw.iter().filter(|(k, _)| k != "token").cloned().collect()).unwrap_or_default();
    let page = PickPage {
        chrome: chrome(st, headers, params, "Which passer?".into(), active, path),
        opens,
        rows: pick_rows(st.league().plays(), path, &keep),
    };
    html(&page)
}

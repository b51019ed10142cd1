//! Game flow: win probability through one game and its biggest swings.

use super::*;

#[derive(Template)]
#[template(path = "game.html")]
pub(super) struct GamePage {
    pub(super) chrome: Chrome,
    pub(super) heading: String,
    pub(super) chart: String,
    pub(super) swings: Vec<SnapView>,
    pub(super) passer: String,
    /// The team whose win probability the chart and the WPA column show.
    pub(super) side: String,
    pub(super) api_href: String,
    pub(super) review_href: String,
}

/// The x-axis labels of a game chart: the four quarters, then each overtime
/// period the game reached (10 minutes each), then the end.
fn period_labels(last_period: i32) -> Vec<(f64, String)> {
    let mut labels: Vec<(f64, String)> = (1..=4).map(|q| (((q - 1) * 900) as f64, format!("Q{q}"))).collect();
    for per in 5..=last_period {
        labels.push(((3600 + (per - 5) * 600) as f64, splits::quarter(per)));
    }
    let end = if last_period <= 4 { 3600 } else { 3600 + (last_period - 4) * 600 };
    labels.push((end as f64, "end".into()));
    labels
}

pub async fn game(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return refused(&st, &headers, &e, "/game", q.as_deref()),
    };
    let lg = st.league();
    let p = lg.plays();
    let Some(key) = params.game.clone() else {
        return error_page(&st, &headers, StatusCode::BAD_REQUEST, "Which game?", "game=: a game key is required (follow a link from a play list or a profile).".into(), "/");
    };
    let Some(gi) = p.games.iter().position(|g| g.key == key) else {
        return error_page(&st, &headers, StatusCode::NOT_FOUND, "No such game", format!("game={key}: no game with that key in this league."), "/");
    };
    let (our_team, _) = ours(&st, &headers);
    let g = &p.games[gi];
    let ch = chrome(&st, &headers, Some(&params), format!("Game flow: {} at {}", p.teams[g.away as usize], p.teams[g.home as usize]), "game", "/game");
    html(&game_view(ch, &params, p, &lg.values(), gi, our_team.as_deref()))
}

/// The game page's view: the chart of win probability from one side (our
/// team when it plays, else the home team) with the passer's biggest
/// swings, and the swings table signed from the same side. Pure: the
/// league's plays and values in, no request.
pub(super) fn game_view(ch: Chrome, params: &Params, p: &crate::plays::Plays, v: &splits::SnapValues, gi: usize, our_team: Option<&str>) -> GamePage {
    let g = &p.games[gi];
    let key = g.key.clone();
    let home = p.teams[g.home as usize].clone();
    let away = p.teams[g.away as usize].clone();
    let snaps = splits::game_snaps(p, v, gi);
    let passer = params.situation.passer.clone().unwrap_or_default();
    // Win probability from one side: our team when it plays, else the home team.
    let ours_plays = our_team.and_then(|t| [&home, &away].into_iter().find(|s| s.eq_ignore_ascii_case(t)).cloned());
    let side = ours_plays.clone().unwrap_or_else(|| home.clone());
    let side_home = side == home;
    let side_word = if ours_plays.is_some() { "our team" } else { "home team" };
    // x = seconds elapsed; overtime periods are 10 minutes.
    let elapsed = |i: usize| -> f64 {
        let per = p.period[i];
        if per <= 4 {
            ((per - 1) * 900 + (900 - p.clock[i])) as f64
        } else {
            (3600 + (per - 5) * 600 + (600 - p.clock[i].min(600))) as f64
        }
    };
    let (wp, wpa) = (v.wp, v.wpa);
    // The offense's win probability and WPA, turned to the side's.
    let side_sign = |i: usize| if p.off_home[i] == side_home { 1.0 } else { -1.0 };
    let side_wp = |i: usize| if side_sign(i) > 0.0 { wp[i] } else { 1.0 - wp[i] };
    let mut pts: Vec<(f64, f64)> = (g.start..g.end).map(|i| (elapsed(i), side_wp(i))).collect();
    if let Some(last) = pts.last().copied() {
        pts.push((last.0 + 1.0, if side_home { g.home_result() } else { 1.0 - g.home_result() }));
    }
    let mut lev: Vec<usize> = (g.start..g.end).filter(|&i| !passer.is_empty() && p.passer_name(i) == Some(passer.as_str())).collect();
    lev.sort_by(|&a, &b| wpa[b].abs().partial_cmp(&wpa[a].abs()).unwrap_or(std::cmp::Ordering::Equal));
    lev.truncate(8);
    let markers: Vec<Marker> = lev
        .iter()
        .map(|&i| Marker {
            x: elapsed(i),
            y: side_wp(i),
            class: if side_sign(i) * wpa[i] >= 0.0 { "pos" } else { "neg" },
            title: format!("{} {} {} — {} ({side} WPA {:+.3})", splits::quarter(p.period[i]), crate::playfile::format_clock(p.clock[i]), splits::down_distance(p.down[i], p.to_go[i], p.ball_on[i]), splits::result_text(p, i), side_sign(i) * wpa[i]),
        })
        .collect();
    let last_period = (g.start..g.end).map(|i| p.period[i]).max().unwrap_or(4);
    let chart = charts::lines(
        &format!("{side} win probability through the game ({side_word}){}", if passer.is_empty() { String::new() } else { format!("; dots: {passer}'s biggest swings") }),
        &[Series { name: format!("{side} win probability"), class: "passer", points: pts }],
        &markers,
        if params.projector { 1400.0 } else { 1000.0 },
        300.0,
        Some((0.0, 1.0)),
        Some(&period_labels(last_period)),
        &|v| format!("{:.0}%", v * 100.0),
    )
    .to_svg();
    let mut order: Vec<usize> = (0..snaps.len()).collect();
    order.sort_by(|&a, &b| snaps[b].wpa.abs().partial_cmp(&snaps[a].wpa.abs()).unwrap_or(std::cmp::Ordering::Equal));
    let swings = order
        .iter()
        .take(12)
        .map(|&k| {
            let s = &snaps[k];
            let signed = if s.offense == side { s.wpa } else { -s.wpa };
            SnapView { wpa: fixed(Some(signed), 3), wpa_sort: sort_value(Some(signed)), ..snap_view(s, params.projector) }
        })
        .collect();
    GamePage {
        chrome: ch,
        heading: format!("{} week {}: {away} {} at {home} {}", g.season, g.week, g.away_final, g.home_final),
        chart,
        swings,
        passer,
        side,
        review_href: format!("{}{}", review_href(&key), if params.projector { "&view=projector" } else { "" }),
        api_href: format!("/api/game{}", to_query_string(&[("game".into(), key)])),
    }
}

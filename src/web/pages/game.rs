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
    pub(super) api_href: String,
    pub(super) review_href: String,
}

pub async fn game(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return bad_query(&st, &headers, &e, "/"),
    };
    let lg = st.league();
    let p = lg.plays();
    let Some(key) = params.game.clone() else {
        return error_page(&st, &headers, StatusCode::BAD_REQUEST, "Which game?", "game=: a game key is required (follow a link from a play list or a profile).".into(), "/");
    };
    let Some(gi) = p.games.iter().position(|g| g.key == key) else {
        return error_page(&st, &headers, StatusCode::NOT_FOUND, "No such game", format!("game={key}: no game with that key in this league."), "/");
    };
    let g = &p.games[gi];
    let home = p.teams[g.home as usize].clone();
    let away = p.teams[g.away as usize].clone();
    let snaps = splits::game_snaps(p, &lg.values(), gi);
    let passer = params.situation.passer.clone().unwrap_or_default();
    // Home win probability across the game, x = seconds elapsed.
    let elapsed = |i: usize| -> f64 {
        let per = p.period[i];
        if per <= 4 {
            ((per - 1) * 900 + (900 - p.clock[i])) as f64
        } else {
            (3600 + (per - 5) * 600 + (600 - p.clock[i].min(600))) as f64
        }
    };
    let wp = &lg.scored.scores.wp;
    let mut pts: Vec<(f64, f64)> = (g.start..g.end).map(|i| (elapsed(i), if p.off_home[i] { wp[i] } else { 1.0 - wp[i] })).collect();
    if let Some(last) = pts.last().copied() {
        pts.push((last.0 + 1.0, g.home_result()));
    }
    let mut lev: Vec<usize> = (g.start..g.end).filter(|&i| !passer.is_empty() && p.passer_name(i) == Some(passer.as_str())).collect();
    lev.sort_by(|&a, &b| lg.scored.scores.wpa[b].abs().partial_cmp(&lg.scored.scores.wpa[a].abs()).unwrap_or(std::cmp::Ordering::Equal));
    lev.truncate(8);
    let markers: Vec<Marker> = lev
        .iter()
        .map(|&i| Marker {
            x: elapsed(i),
            y: if p.off_home[i] { wp[i] } else { 1.0 - wp[i] },
            class: if lg.scored.scores.wpa[i] >= 0.0 { "pos" } else { "neg" },
            title: format!("Q{} {} {} — {} (WPA {:+.3})", p.period[i], crate::playfile::format_clock(p.clock[i]), splits::down_distance(p.down[i], p.to_go[i], p.ball_on[i]), splits::result_text(p, i), lg.scored.scores.wpa[i]),
        })
        .collect();
    let labels: Vec<(f64, String)> = vec![(0.0, "Q1".into()), (900.0, "Q2".into()), (1800.0, "Q3".into()), (2700.0, "Q4".into()), (3600.0, "end".into())];
    let chart = charts::lines(
        &format!("{home} win probability through the game{}", if passer.is_empty() { String::new() } else { format!("; dots: {passer}'s biggest swings") }),
        &[Series { name: format!("{home} win probability"), class: "passer", points: pts }],
        &markers,
        if params.projector { 1400.0 } else { 1000.0 },
        300.0,
        Some((0.0, 1.0)),
        Some(&labels),
        &|v| format!("{:.0}%", v * 100.0),
    )
    .to_svg();
    let mut order: Vec<usize> = (0..snaps.len()).collect();
    order.sort_by(|&a, &b| snaps[b].wpa.abs().partial_cmp(&snaps[a].wpa.abs()).unwrap_or(std::cmp::Ordering::Equal));
    let swings = order.iter().take(12).map(|&k| snap_view(&snaps[k])).collect();
    let page = GamePage {
        chrome: chrome(&st, &headers, Some(&params), format!("Game flow: {away} at {home}"), "game", "/game"),
        heading: format!("{} week {}: {away} {} at {home} {}", g.season, g.week, g.away_final, g.home_final),
        chart,
        swings,
        passer,
        review_href: review_href(&key),
        api_href: format!("/api/game{}", to_query_string(&[("game".into(), key)])),
    };
    html(&page)
}

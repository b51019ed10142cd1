//! The real server over HTTP on a random loopback port: every page and API
//! answers for every preset, bad queries get a 400 with a reason, pages show
//! the API's numbers, sorting, escaping, security headers, the access token,
//! static-file traversal and the cut-up export.

mod common;
use common::*;

const PRESETS: &[&str] = &["end-of-game", "two-minute-drill", "four-minute-lead", "end-of-game-3rd-4th", "end-of-game-red-zone", "end-of-game-backed-up", "every-snap"];

/// The passer with the most end-of-game dropbacks.
fn busiest_passer(base: &str) -> String {
    let j = get(&format!("{base}/api/splits?preset=end-of-game")).json();
    j["rows"][0]["passer"].as_str().expect("a passer").to_string()
}

/// Every cookie an answer sets, as a request's Cookie header would send them.
fn cookies_set(r: &common::Reply) -> String {
    r.headers.iter().filter(|(k, _)| k.eq_ignore_ascii_case("set-cookie")).filter_map(|(_, v)| v.split(';').next()).collect::<Vec<_>>().join("; ")
}

#[test]
fn every_page_and_api_answers_for_every_preset() {
    let base = demo_server();
    let passer = enc(&busiest_passer(base));
    for p in PRESETS {
        for path in [
            format!("/explore?preset={p}"),
            format!("/explore?preset={p}&view=projector"),
            format!("/api/splits?preset={p}"),
            format!("/api/splits.csv?preset={p}"),
            format!("/plays?preset={p}&passer={passer}"),
            format!("/plays.csv?preset={p}&passer={passer}"),
            format!("/api/plays?preset={p}&passer={passer}"),
        ] {
            let r = get(&format!("{base}{path}"));
            assert_eq!(r.status, 200, "{path}: {}", &r.body[..r.body.len().min(300)]);
        }
    }
    for path in ["/", "/calibration", "/api/calibration", "/api/summary", "/static/app.css", "/static/app.js", "/explore"] {
        let r = get(&format!("{base}{path}"));
        assert_eq!(r.status, 200, "{path}");
    }
    // The calibration page and API say which overtime rules were solved
    // for which seasons: the demo league has no config, so the default.
    let cal = get(&format!("{base}/api/calibration")).json();
    assert_eq!(cal["overtime_config"], "default");
    assert_eq!(cal["overtime_rules"][0]["seasons"], "2020-2025");
    assert_eq!(cal["overtime_rules"][0]["rules"]["rule"], "touchdown-or-answer");
    assert_eq!(cal["overtime_rules"][0]["rules"]["period_secs"], 600);
    let page = get(&format!("{base}/calibration")).body;
    assert!(page.contains("2020-2025: touchdown-or-answer, 10:00, a level period is a tie"), "no overtime rules on the page");
    let r = get(&format!("{base}/passer?passer={passer}"));
    assert_eq!(r.status, 200);
    assert!(r.body.contains("<svg"), "profile has charts");
    let r = get(&format!("{base}/api/profile?passer={passer}"));
    assert_eq!(r.status, 200);
    assert_eq!(r.json()["presets"].as_array().map(|a| a.len()), Some(PRESETS.len()));
    let plays = get(&format!("{base}/api/plays?preset=end-of-game&passer={passer}")).json();
    let game = plays["snaps"][0]["game"].as_str().expect("a game").to_string();
    assert_eq!(get(&format!("{base}/game?game={}&passer={passer}", enc(&game))).status, 200);
    assert_eq!(get(&format!("{base}/api/game?game={}", enc(&game))).status, 200);
}

#[test]
fn bad_queries_get_400_with_a_reason_on_page_and_in_json() {
    let base = demo_server();
    let r = get(&format!("{base}/explore?margin=9..3"));
    assert_eq!(r.status, 400);
    assert!(r.body.contains("margin=9..3: lower bound above upper"), "{}", r.body);
    let r = get(&format!("{base}/api/splits?margin=9..3"));
    assert_eq!(r.status, 400);
    let j = r.json();
    assert_eq!(j["error"], "margin=9..3: lower bound above upper");
    assert_eq!(j["param"], "margin");
    for q in ["down=7", "preset=nowhere", "min=0", "sort=nonsense", "win-prob=0.2..1.5", "quarter=6", "ball-on=%ff", "downn=3", "preset=end-of-game&dn=3"] {
        let r = get(&format!("{base}/api/splits?{q}"));
        assert_eq!(r.status, 400, "{q}: {}", r.body);
        assert!(r.json()["reason"].as_str().is_some_and(|s| !s.is_empty()), "{q}");
        assert_eq!(get(&format!("{base}/explore?{q}")).status, 400, "{q}");
    }
    assert_eq!(get(&format!("{base}/game?game=NOPE")).status, 404);
    assert_eq!(get(&format!("{base}/nowhere")).status, 404);
}

/// `data-sort` values of one column of the explorer table, in row order.
fn column_values(html: &str, col: usize) -> Vec<String> {
    let body = html.split("<tbody>").nth(1).unwrap_or("").split("</tbody>").next().unwrap_or("");
    body.split("<tr")
        .skip(1)
        .map(|row| {
            let cells: Vec<&str> = row.split("data-sort=\"").skip(1).collect();
            cells.get(col).map(|c| c.split('"').next().unwrap_or("").to_string()).unwrap_or_default()
        })
        .collect()
}

#[test]
fn page_numbers_equal_the_json_api() {
    let base = demo_server();
    let q = "preset=end-of-game&sort=epa&dir=desc&cols=all";
    let page = get(&format!("{base}/explore?{q}")).body;
    let json = get(&format!("{base}/api/splits?{q}")).json();
    let rows = json["rows"].as_array().unwrap();
    let qualified: Vec<&serde_json::Value> = rows.iter().filter(|r| r["qualified"] == true).collect();
    // column 0 = passer, 1 = team, 2.. = every metric in order (cols=all)
    let names = column_values(&page, 0);
    assert_eq!(names.len(), qualified.len());
    for (n, r) in names.iter().zip(&qualified) {
        assert_eq!(n, r["passer"].as_str().unwrap());
    }
    // the EPA column carries the estimate the API reports, digit for digit
    let keys = json["metrics"].as_array().unwrap().iter().map(|m| m["key"].as_str().unwrap().to_string()).collect::<Vec<_>>();
    let shown: Vec<&String> = keys.iter().collect();
    let epa_col = 2 + shown.iter().position(|k| *k == "epa").unwrap();
    let epa_idx = keys.iter().position(|k| k == "epa").unwrap();
    let page_epa = column_values(&page, epa_col);
    for (v, r) in page_epa.iter().zip(&qualified) {
        let api = r["cells"][epa_idx]["estimate"].as_f64().unwrap();
        // serde_json reads floats to within an ulp or so; the page wrote the same f64
        let page_v = v.parse::<f64>().unwrap();
        assert!((page_v - api).abs() <= 1e-12 * api.abs().max(1.0), "{page_v} vs {api}");
    }
    // and the visible raw number is the API's value rounded to 3 places
    let raw = r_cell_text(&page, &qualified[0]["passer"].as_str().unwrap().to_string(), epa_col);
    assert_eq!(raw, format!("{:.3}", qualified[0]["cells"][epa_idx]["value"].as_f64().unwrap()));
}

fn r_cell_text(html: &str, passer: &str, col: usize) -> String {
    let row = html.split("<tr").find(|r| r.contains(&format!("data-sort=\"{passer}\""))).unwrap_or("");
    let cell = row.split("data-sort=\"").nth(col + 1).unwrap_or("");
    let link = cell.split("title=\"").nth(1).unwrap_or("");
    link.split('>').nth(1).unwrap_or("").split('<').next().unwrap_or("").to_string()
}

#[test]
fn sorting_orders_rows() {
    let base = demo_server();
    let j = get(&format!("{base}/api/splits?preset=every-snap&sort=epa&dir=desc")).json();
    let idx = j["metrics"].as_array().unwrap().iter().position(|m| m["key"] == "epa").unwrap();
    let est: Vec<f64> = j["rows"].as_array().unwrap().iter().filter_map(|r| r["cells"][idx]["estimate"].as_f64()).collect();
    assert!(est.len() > 5);
    assert!(est.windows(2).all(|w| w[0] >= w[1]), "{est:?}");
    let j = get(&format!("{base}/api/splits?preset=every-snap&sort=passer&dir=asc")).json();
    let names: Vec<String> = j["rows"].as_array().unwrap().iter().map(|r| r["passer"].as_str().unwrap().to_string()).collect();
    let mut sorted = names.clone();
    sorted.sort();
    assert_eq!(names, sorted);
    let page = get(&format!("{base}/explore?preset=every-snap&sort=epa&dir=asc")).body;
    assert!(page.contains("aria-sort=\"ascending\""));
}

#[test]
fn security_headers_and_static_files() {
    let base = demo_server();
    let r = get(&format!("{base}/"));
    assert!(r.header("content-security-policy").is_some_and(|v| v.contains("script-src 'self'") && !v.contains("unsafe-inline")));
    assert_eq!(r.header("x-content-type-options"), Some("nosniff"));
    assert_eq!(r.header("referrer-policy"), Some("no-referrer"));
    assert!(!r.body.contains("<script>"), "no inline scripts");
    for path in ["/static/../Cargo.toml", "/static/..%2f..%2fCargo.toml", "/static/%2e%2e%2fCargo.toml", "/static/%2fetc%2fpasswd", "/static//etc/passwd", "/static/app.css%00.js"] {
        let r = get(&format!("{base}{path}"));
        assert!(r.status == 404 || r.status == 400, "{path}: {}", r.status);
        assert!(!r.body.contains("[package]") && !r.body.contains("root:"), "{path}");
    }
}

#[test]
fn cutup_export_is_csv_with_safe_cells() {
    let base = demo_server();
    let passer = enc(&busiest_passer(base));
    let r = get(&format!("{base}/plays.csv?preset=end-of-game&passer={passer}"));
    assert!(r.header("content-type").unwrap_or("").starts_with("text/csv"));
    // A file name the video staff can sort by: team, passer, situation, seasons.
    let who = busiest_passer(base).replace(' ', "-");
    let disposition = r.header("content-disposition").unwrap_or("");
    assert!(disposition.contains(&format!("-{who}-end-of-game-")) && disposition.ends_with(".csv\""), "{disposition}");
    let named = get(&format!("{base}/plays.csv?preset=end-of-game&passer={passer}&season=2025&result=interception"));
    assert!(named.header("content-disposition").unwrap_or("").ends_with(&format!("-{who}-end-of-game-interception-2025.csv\"")), "{:?}", named.header("content-disposition"));
    let mut lines = r.body.lines();
    // Each thing the video operator cues by in its own column (overtime spelled in `quarter`).
    assert_eq!(lines.next(), Some("game,season,week,seq,quarter,clock,offense,defense,score,down,to_go,yard_line,drive,play_in_drive,kind,passer,result,epa,wpa,down_distance"));
    let n = lines.clone().count();
    let api = get(&format!("{base}/api/plays?preset=end-of-game&passer={passer}")).json();
    assert_eq!(n as u64, api["count"].as_u64().unwrap());
    for l in lines {
        for cell in l.split(',') {
            let risky = cell.starts_with(['=', '@']) || (cell.starts_with(['+', '-']) && cell.parse::<f64>().is_err());
            assert!(!risky, "{cell}");
        }
    }
}

#[test]
fn markup_from_the_file_is_shown_as_text() {
    use lategame::playfile::write_rows;
    use lategame::sim::{simulate, SimConfig};
    let mut out = simulate(&SimConfig { seasons: 1, seed: 3, first_season: 2030 });
    let victim = out.rows.iter().find_map(|r| r.passer.clone()).unwrap();
    let evil = "<script>alert(1)</script>";
    for r in out.rows.iter_mut() {
        if r.passer.as_deref() == Some(victim.as_str()) {
            r.passer = Some(evil.to_string());
        }
    }
    let dir = std::env::temp_dir().join(format!("lategame-http-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("evil.parquet");
    write_rows(&out.rows, &path).unwrap();
    let league = open_league(&path);
    let base = spawn(league, None, Some(evil.to_string()), None);
    for url in [format!("{base}/explore?preset=every-snap&min=1"), format!("{base}/passer?passer={}", enc(evil)), format!("{base}/plays?preset=every-snap&passer={}", enc(evil)), format!("{base}/")] {
        let r = get(&url);
        assert_eq!(r.status, 200, "{url}");
        assert!(!r.body.contains(evil), "{url} shows raw markup");
        assert!(r.body.contains("&lt;script&gt;") || r.body.contains("&#60;script&#62;") || r.body.contains("&#x3c;script"), "{url} shows the name escaped");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn shared_mode_needs_the_token() {
    let base = spawn(demo_league(), None, None, Some("abc123".into()));
    assert_eq!(get(&format!("{base}/")).status, 401);
    assert_eq!(get(&format!("{base}/api/summary")).status, 401);
    assert_eq!(get(&format!("{base}/?token=wrong")).status, 401);
    let r = get(&format!("{base}/explore?preset=every-snap&token=abc123"));
    assert_eq!(r.status, 303);
    assert_eq!(r.header("location"), Some("/explore?preset=every-snap"));
    let cookie = r.header("set-cookie").unwrap().split(';').next().unwrap().to_string();
    assert_eq!(get_with(&format!("{base}/api/summary"), &[("Cookie", &cookie)]).status, 200);
}

#[test]
fn choosing_our_passer_sets_a_cookie() {
    let base = demo_server();
    let passer = busiest_passer(base);
    let r = get(&format!("{base}/choose?team=&passer={}", enc(&passer)));
    assert_eq!(r.status, 303);
    let cookie = cookies_set(&r);
    assert!(cookie.contains("lg_passer="), "{cookie}");
    let page = get_with(&format!("{base}/explore?preset=end-of-game"), &[("Cookie", &cookie)]).body;
    assert!(page.contains("<tr class=\"ours\">"), "our passer's row is highlighted");
}

/// A passer's view asked with no passer and none ours lists the league's
/// passers, most dropbacks first, each a link to that view of him with the
/// seasons and view kept; the link opens it.
#[test]
fn a_passer_view_without_a_passer_offers_the_league_passers() {
    let base = demo_server();
    let busiest_late = busiest_passer(base);
    let every = get(&format!("{base}/api/splits?preset=every-snap&min=1")).json();
    let mut counts: Vec<(i64, String)> = every["rows"]
        .as_array()
        .expect("rows")
        .iter()
        .map(|r| (r["dropbacks"].as_i64().or_else(|| r["n"].as_i64()).unwrap_or(0), r["passer"].as_str().unwrap_or("").to_string()))
        .collect();
    counts.sort_by(|a, b| b.0.cmp(&a.0).then_with(|| a.1.cmp(&b.1)));
    for (path, title_word) in [("/passer", "profile"), ("/meeting", "meeting"), ("/report", "report"), ("/report.pdf", "report")] {
        let r = get(&format!("{base}{path}?season=2024&view=projector"));
        assert_eq!(r.status, 200, "{path}: {}", &r.body[..r.body.len().min(300)]);
        assert!(r.body.contains("Which passer?") && r.body.contains(title_word), "{path}");
        let picks: Vec<(String, String)> = links(&r.body).into_iter().filter(|(h, _)| h.starts_with(&format!("{path}?")) && h.contains("passer=")).collect();
        assert_eq!(picks.len(), counts.len(), "{path}: one link per passer with a dropback");
        // The first is the passer with the most dropbacks on every snap
        // (the splits API's count, not the picker's own).
        assert_eq!(picks[0].1, counts[0].1, "{path}");
        let one = picks.iter().find(|(_, name)| *name == busiest_late).expect("the busiest late passer is listed");
        assert_eq!(one.0, format!("{path}?season=2024&view=projector&passer={}", enc(&busiest_late).replace("%20", "+")), "{path}");
        if path != "/report.pdf" {
            assert_eq!(get(&format!("{base}{}", one.0)).status, 200, "{}", one.0);
        }
    }
}

/// A repeated view (explorer, passer profile, splits JSON) gets the same
/// answer, with the security headers; another "our passer" cookie gets its
/// own page, with his row marked; a refused request stays refused.
#[test]
fn repeated_views_get_the_same_answer_and_each_passer_cookie_its_own() {
    let base = demo_server();
    let passer = busiest_passer(base);
    for url in [format!("{base}/explore?preset=end-of-game&min=7"), format!("{base}/passer?passer={}&min=7", enc(&passer)), format!("{base}/api/splits?preset=end-of-game&min=7")] {
        let (a, b) = (get(&url), get(&url));
        assert_eq!((a.status, b.status), (200, 200), "{url}");
        assert_eq!(a.body, b.body, "{url}");
        assert_eq!(a.header("content-type"), b.header("content-type"), "{url}");
        assert_eq!(b.header("x-content-type-options"), Some("nosniff"), "{url}");
    }
    let url = format!("{base}/explore?preset=end-of-game&min=7");
    let plain = get(&url).body;
    let chosen = get(&format!("{base}/choose?team=&passer={}", enc(&passer)));
    let cookie = cookies_set(&chosen);
    let mine = get_with(&url, &[("Cookie", &cookie)]).body;
    assert!(!plain.contains("<tr class=\"ours\">"), "no passer's row is ours without the cookie");
    assert!(mine.contains("<tr class=\"ours\">") && mine.contains(&format!("our passer: <strong>{passer}</strong>")), "the cookie's passer {passer} is marked");
    assert_eq!(get_with(&url, &[("Cookie", &cookie)]).body, mine);
    for _ in 0..2 {
        assert_eq!(get(&format!("{base}/explore?preset=end-of-game&min=7&downn=3")).status, 400);
    }
}

#[test]
fn unknown_keys_are_refused_everywhere_with_the_nearest() {
    let base = demo_server();
    for path in ["/api/splits", "/api/splits.csv", "/explore", "/plays", "/plays.csv", "/api/plays"] {
        let r = get(&format!("{base}{path}?preset=end-of-game&downn=3"));
        assert_eq!(r.status, 400, "{path}: {}", &r.body[..r.body.len().min(300)]);
        assert!(r.body.contains("unknown filter &#39;downn&#39;; did you mean &#39;down&#39;?") || r.body.contains("unknown filter 'downn'; did you mean 'down'?"), "{path}: {}", r.body);
    }
    let j = get(&format!("{base}/api/splits?preset=end-of-game&downn=3")).json();
    assert_eq!(j["param"], "downn");
    assert_eq!(j["reason"], "unknown filter 'downn'; did you mean 'down'?");
    // the filter a bare key used to drop silently now filters
    let all = get(&format!("{base}/api/splits?preset=end-of-game")).json();
    let third = get(&format!("{base}/api/splits?preset=end-of-game&down=3")).json();
    assert!(third["league_dropbacks"].as_u64() < all["league_dropbacks"].as_u64());
}

#[test]
fn names_match_without_case_and_slips_get_the_nearest() {
    let base = demo_server();
    let passer = busiest_passer(base);
    let exact = get(&format!("{base}/api/plays?preset=end-of-game&passer={}", enc(&passer))).json();
    let lower = get(&format!("{base}/api/plays?preset=end-of-game&passer={}", enc(&passer.to_lowercase()))).json();
    assert_eq!(exact["count"], lower["count"]);
    assert!(exact["count"].as_u64() > Some(0));
    let slip: String = passer.chars().take(passer.chars().count() - 1).collect();
    let r = get(&format!("{base}/api/plays?preset=end-of-game&passer={}", enc(&slip)));
    assert_eq!(r.status, 400);
    assert_eq!(r.json()["reason"], format!("no passer '{slip}' in this league; did you mean '{passer}'?"));
    // The meeting view reads names the same way.
    let r = get(&format!("{base}/meeting?passer={}", enc(&slip)));
    assert_eq!(r.status, 400);
    assert!(r.body.contains(&format!("did you mean &#39;{passer}&#39;?")) || r.body.contains(&format!("did you mean &#x27;{passer}&#x27;?")), "{}", &r.body[..r.body.len().min(2000)]);
    assert_eq!(get(&format!("{base}/meeting?passer={}", enc(&passer.to_lowercase()))).status, 200);
    let team = exact["snaps"][0]["offense"].as_str().expect("a team").to_string();
    let a = get(&format!("{base}/api/splits?preset=end-of-game&team={}", enc(&team))).json();
    let b = get(&format!("{base}/api/splits?preset=end-of-game&team={}", enc(&team.to_lowercase()))).json();
    assert_eq!(a["league_dropbacks"], b["league_dropbacks"]);
    assert!(a["league_dropbacks"].as_u64() > Some(0));
}

/// Every link on a page with its visible text (`&amp;` undone).
fn links(html: &str) -> Vec<(String, String)> {
    html.split("<a href=\"")
        .skip(1)
        .map(|rest| {
            let href = rest.split('"').next().unwrap_or("").replace("&amp;", "&").replace("&#38;", "&");
            let text = rest.split('>').nth(1).unwrap_or("").split('<').next().unwrap_or("").to_string();
            (href, text)
        })
        .collect()
}

#[test]
fn a_count_opens_exactly_the_snaps_it_counts() {
    let base = demo_server();
    // (end of game: few enough snaps per passer that the play page shows them all)
    let page = get(&format!("{base}/explore?preset=end-of-game&min=1&cols=all")).body;
    let all = links(&page);
    // the first passer with interceptions: follow his count
    let (href, text) = all.iter().find(|(h, t)| h.ends_with("metric=int") && t != "0").expect("an interception count").clone();
    assert!(href.contains("result=interception"), "{href}");
    let n: u64 = text.parse().expect("a count");
    let list = get(&format!("{base}/api{href}")).json();
    assert_eq!(list["count"].as_u64(), Some(n), "{href}");
    let snaps = list["snaps"].as_array().expect("snaps");
    assert!(snaps.iter().all(|s| s["result"].as_str().is_some_and(|r| r.starts_with("intercepted"))));
    let shown = get(&format!("{base}{href}")).body;
    assert!(shown.contains(&format!("{n} snaps: exactly the ones counted in Interceptions")), "{shown}");
    // the same passer's interception rate opens his attempts, the n interceptions marked
    let passer = href.split("passer=").nth(1).and_then(|p| p.split('&').next()).expect("passer").to_string();
    let (rate, _) = all.iter().find(|(h, _)| h.ends_with("metric=int_rate") && h.contains(&format!("passer={passer}&"))).expect("his rate").clone();
    let list = get(&format!("{base}/api{rate}")).json();
    assert_eq!(list["counted"].as_u64(), Some(n), "{rate}");
    assert!(list["count"].as_u64() > Some(n));
    let shown = get(&format!("{base}{rate}")).body;
    assert!(shown.contains("attempts: the denominator of") && shown.contains(&format!("; the {n} it counts are marked")), "{shown}");
    assert_eq!(shown.matches("● counted").count() as u64, n);
    // sacks and touchdown passes too
    for (metric, result) in [("sacks", "sack"), ("td", "touchdown-pass")] {
        let (href, text) = all.iter().find(|(h, t)| h.ends_with(&format!("metric={metric}")) && t != "0").expect(metric).clone();
        assert!(href.contains(&format!("result={result}")), "{href}");
        assert_eq!(get(&format!("{base}/api{href}")).json()["count"].as_u64(), text.parse::<u64>().ok(), "{href}");
    }
}

#[test]
fn words_and_units_a_coach_writes() {
    let base = demo_server();
    let count = |q: &str| get(&format!("{base}/api/splits?{q}")).json()["league_dropbacks"].as_u64().unwrap_or_else(|| panic!("{q}"));
    assert_eq!(count("quarter=4&half-left=..2:00"), count("quarter=4&half-left=..120"));
    assert_eq!(count("ball-on=%2B20..%2B1"), count("ball-on=80..99"));
    // a `+` typed into the address bar arrives as a space and still means the opponent's side
    assert_eq!(count("ball-on=+20.."), count("ball-on=80.."));
    assert_eq!(count("win-prob=20..80%25"), count("win-prob=0.2..0.8"));
    assert_eq!(count("preset=end-of-game&margin=any"), count("quarter=4,ot&game-left=..7:30"));
    assert!(count("preset=end-of-game&result=interception") > 0);
}

#[test]
fn the_season_follows_a_passer_link_and_the_passer_page_says_which() {
    let base = demo_server();
    let season = get(&format!("{base}/api/summary")).json()["seasons"].as_array().and_then(|s| s.last().cloned()).expect("a season").to_string();
    let page = get(&format!("{base}/explore?preset=end-of-game&season={season}")).body;
    let (href, name) = links(&page).into_iter().find(|(h, _)| h.starts_with("/passer?passer=")).expect("a passer link in the table");
    assert!(href.ends_with(&format!("&season={season}")), "{href}");
    let profile = get(&format!("{base}{href}")).body;
    assert!(profile.contains(&format!("Seasons {season}</p>")), "season not shown");
    assert!(profile.contains(&format!("name=\"season\" value=\"{season}\"")), "season box");
    // a lower-case name opens the same page
    let lower = get(&format!("{base}/passer?passer={}&season={season}", enc(&name.to_lowercase())));
    assert_eq!(lower.status, 200);
    assert!(lower.body.contains(&format!("<h1>{name}")));
    let all = get(&format!("{base}/passer?passer={}", enc(&name))).body;
    assert!(all.contains("All seasons ("), "all seasons said");
    // a season the file lacks is named as such, with what it covers
    let r = get(&format!("{base}/api/splits?preset=end-of-game&season=1999"));
    assert_eq!(r.status, 400);
    let reason = r.json()["reason"].as_str().unwrap_or("").to_string();
    assert!(reason.starts_with("not in the file; the file covers ") && reason.ends_with(&season), "{reason}");
    assert_eq!(get(&format!("{base}/explore?preset=end-of-game&season=1999")).status, 400);
}

/// The cells of the game page's swings table: (offense vs defense, WPA).
fn swing_rows(html: &str) -> Vec<(String, f64)> {
    let body = html.split("<tbody>").nth(1).unwrap_or("").split("</tbody>").next().unwrap_or("");
    body.split("<tr")
        .skip(1)
        .map(|row| {
            let cells: Vec<String> = row.split("<td").skip(1).map(|c| c.split('>').nth(1).unwrap_or("").split('<').next().unwrap_or("").to_string()).collect();
            let wpa = cells.last().map(|c| c.replace('−', "-").replace('+', "")).and_then(|c| c.parse().ok()).unwrap_or(f64::NAN);
            (cells.get(2).cloned().unwrap_or_default(), wpa)
        })
        .collect()
}

#[test]
fn the_game_chart_is_drawn_from_our_side_and_labels_overtime() {
    let lg = demo_league();
    let p = lg.plays();
    // A game that went to overtime (the demo league has some).
    let ot = p.games.iter().find(|g| (g.start..g.end).any(|i| p.period[i] >= 5)).expect("an overtime game in the demo league");
    let (key, home, away) = (ot.key.clone(), p.teams[ot.home as usize].clone(), p.teams[ot.away as usize].clone());
    // We are the away team: the chart and the swings are ours.
    let base = spawn(demo_league(), Some(away.to_lowercase()), None, None);
    let page = get(&format!("{base}/game?game={}", enc(&key))).body;
    assert!(page.contains(&format!("{away} win probability through the game (our team)")), "title names our side");
    assert!(page.contains(">OT<"), "overtime labelled on the x axis");
    let api = get(&format!("{base}/api/game?game={}", enc(&key))).json();
    let snaps = api["snaps"].as_array().expect("snaps");
    let rows = swing_rows(&page);
    assert!(!rows.is_empty());
    for (teams, wpa) in &rows {
        let offense = teams.split(" vs ").next().unwrap_or("");
        // The snaps with this offense, their WPA from our side (the
        // offense's own, its sign turned when the offense is the home
        // side): the row's value, to the page's three decimals, is one of
        // them. (Two snaps of one offense can share a |WPA| to the third
        // decimal with opposite signs, so the sign is part of the match.)
        let ours = snaps
            .iter()
            .filter(|s| s["offense"] == offense)
            .map(|s| s["wpa"].as_f64().unwrap_or(f64::NAN) * if offense == away { 1.0 } else { -1.0 });
        let nearest = ours.map(|e| (wpa - e).abs()).fold(f64::INFINITY, f64::min);
        assert!(nearest <= 5e-4 + 1e-12, "{teams}: {wpa} is no snap's WPA from our side (nearest {nearest})");
    }
    assert!(rows.iter().any(|(t, w)| t.starts_with(&format!("{home} vs")) && *w != 0.0), "a home snap is shown with its sign turned");
    // Without our team in the game: the home side, said in the title.
    let neutral = get(&format!("{}/game?game={}", demo_server(), enc(&key))).body;
    assert!(neutral.contains(&format!("{home} win probability through the game (home team)")));
}

#[test]
fn the_league_row_holds_per_passer_quantities_and_csv_counts_are_whole() {
    let base = demo_server();
    let j = get(&format!("{base}/api/splits?preset=end-of-game")).json();
    let keys: Vec<String> = j["metrics"].as_array().expect("metrics").iter().map(|m| m["key"].as_str().unwrap_or("").to_string()).collect();
    let at = |k: &str| keys.iter().position(|x| x == k).expect(k);
    let (db, wpa_total, epa) = (at("dropbacks"), at("wpa_total"), at("epa"));
    // JSON: the league row has no count; the totals stay under league_totals.
    assert!(j["league"][db].is_null() && j["league"][wpa_total].is_null());
    assert_eq!(j["league_totals"][db].as_f64(), j["league_dropbacks"].as_f64());
    assert_eq!(j["league"][epa], j["league_totals"][epa]);
    assert!(j["league"][epa].is_number());
    // CSV: the same league row; counts written as whole numbers.
    let csv = get(&format!("{base}/api/splits.csv?preset=end-of-game")).body;
    let mut lines = csv.lines();
    let head: Vec<&str> = lines.next().expect("head").split(',').collect();
    let col = |k: &str| head.iter().position(|h| *h == k).expect(k);
    let league: Vec<&str> = lines.next().expect("league row").split(',').collect();
    assert_eq!(league[0], "LEAGUE");
    assert_eq!((league[col("dropbacks")], league[col("wpa_total")], league[col("int")]), ("", "", ""));
    assert!(league[col("epa")].parse::<f64>().is_ok());
    let first: Vec<&str> = lines.next().expect("a passer").split(',').collect();
    let dropbacks = first[col("dropbacks")];
    assert!(!dropbacks.contains('.') && dropbacks.parse::<u32>().unwrap_or(0) > 0, "{dropbacks}");
    assert_eq!(first[col("int")].parse::<u32>().map(|n| n.to_string()).as_deref(), Ok(first[col("int")]));
    // The page: the league row shows neither total.
    let page = get(&format!("{base}/explore?preset=end-of-game")).body;
    let row = page.split("<tr class=\"league\">").nth(1).expect("league row").split("</tr>").next().unwrap_or("");
    let total = j["league_dropbacks"].as_u64().expect("league dropbacks");
    assert!(!row.contains(&format!(">{total}<")), "league dropbacks total in the league row");
    let wpa = format!(">{:.3}<", j["league_totals"][wpa_total].as_f64().expect("a WPA total"));
    assert!(!row.contains(&wpa), "league WPA total in the league row");
    assert!(row.contains(">–<"));
}

#[test]
fn column_groups_choose_the_explorers_columns() {
    let base = demo_server();
    let heads = |q: &str| -> Vec<String> {
        let page = get(&format!("{base}/explore?{q}")).body;
        // after the passer and team columns
        page.split("data-key=\"").skip(3).map(|r| r.split('"').next().unwrap_or("").to_string()).collect()
    };
    // the default is the key numbers, in the group's order
    let want: Vec<String> = lategame::splits::METRIC_GROUPS[0].2.iter().map(|k| k.to_string()).collect();
    assert_eq!(heads("preset=end-of-game"), want);
    assert_eq!(heads("preset=end-of-game&cols=pressure")[1], "sacks");
    assert_eq!(heads("preset=end-of-game&cols=all").len(), lategame::splits::METRICS.len());
    let r = get(&format!("{base}/explore?cols=pasing"));
    assert_eq!(r.status, 400);
    assert!(r.body.contains("unknown column group"), "{}", r.body);
}

#[test]
fn the_menu_keeps_the_seasons_and_the_projector_view() {
    let base = demo_server();
    let page = get(&format!("{base}/explore?preset=two-minute-drill&season=2024,2025&view=projector")).body;
    let nav = page.split("<nav aria-label=\"Pages\">").nth(1).and_then(|n| n.split("</nav>").next()).expect("the menu");
    let hrefs: Vec<String> = nav.split("href=\"").skip(1).map(|r| r.split('"').next().unwrap_or("").replace("&amp;", "&").replace("&#38;", "&")).collect();
    assert_eq!(hrefs.len(), 8, "{nav}");
    assert!(hrefs.iter().all(|h| h.contains("view=projector")), "{hrefs:?}");
    assert!(hrefs.iter().any(|h| h.starts_with("/report.pdf?")), "a PDF button on every page: {hrefs:?}");
    for h in hrefs.iter().filter(|h| h.starts_with("/explore") || h.starts_with("/report") || h.starts_with("/passer")) {
        assert!(h.contains("season=2024,2025") || h.contains("season=2024%2C2025"), "{h}");
    }
    // and every one of them answers
    for h in &hrefs {
        let r = get(&format!("{base}{h}"));
        assert!(r.status == 200 || r.status == 400, "{h}: {}", r.status);
    }
}

#[test]
fn the_way_back_from_a_refused_view_keeps_every_filter_it_can() {
    let base = demo_server();
    // A season outside the file and a misspelt key: both dropped, the rest kept.
    let r = get(&format!("{base}/explore?preset=two-minute-drill&season=1999&down=3&downn=4&view=projector"));
    assert_eq!(r.status, 400);
    let href = r.body.split("href=\"").filter_map(|t| t.split('"').next()).find(|h| h.contains("down=3")).unwrap_or("").replace("&amp;", "&").replace("&#38;", "&");
    assert_eq!(href, "/explore?preset=two-minute-drill&down=3&view=projector", "{}", &r.body[..r.body.len().min(2000)]);
    let back = get(&format!("{base}{href}"));
    assert_eq!(back.status, 200);
    // The play list comes back to itself, passer and metric kept.
    let passer = busiest_passer(base);
    let r = get(&format!("{base}/plays?preset=end-of-game&passer={}&metric=int&margin=lots", enc(&passer)));
    assert_eq!(r.status, 400);
    let body = r.body.replace("&#38;", "&").replace("&amp;", "&");
    assert!(body.contains(&format!("/plays?preset=end-of-game&passer={}&metric=int\"", enc(&passer).replace("%20", "+"))), "{}", &body[..body.len().min(3000)]);
}

/// Every page link on a projector page keeps the projector view (the menu,
/// passer names, numbers, game links, presets); only the view toggle, the
/// downloads and the JSON twins leave it.
#[test]
fn projector_view_is_kept_on_every_page_link() {
    let base = demo_server();
    let passer = enc(&busiest_passer(base));
    let plays = format!("/plays?preset=end-of-game&passer={passer}&metric=int&view=projector");
    let game_link = {
        let body = get(&format!("{base}{plays}")).body.replace("&#38;", "&").replace("&amp;", "&");
        body.split("href=\"").filter_map(|t| t.split('"').next()).find(|h| h.starts_with("/game?")).map(str::to_string).expect("a game link")
    };
    for page in [format!("/explore?preset=end-of-game&view=projector"), format!("/passer?passer={passer}&view=projector"), plays.clone(), game_link] {
        let r = get(&format!("{base}{page}"));
        assert_eq!(r.status, 200, "{page}");
        let body = r.body.replace("&#38;", "&").replace("&amp;", "&");
        let mut checked = 0;
        for href in body.split("href=\"").skip(1).filter_map(|t| t.split('"').next()) {
            let leaves = href.starts_with("/static") || href.starts_with("/api") || href.contains(".csv") || href.contains(".pdf") || href.starts_with("data:") || href.starts_with('#');
            let toggle = !href.contains("view=projector") && body.contains(&format!("href=\"{href}\" class=\"toggle\"")) || body.contains(&format!("class=\"toggle\" href=\"{href}\""));
            if leaves || toggle || !href.starts_with('/') {
                continue;
            }
            assert!(href.contains("view=projector"), "{page}: {href} drops the projector view");
            checked += 1;
        }
        assert!(checked >= 8, "{page}: only {checked} links checked");
    }
}

/// The tables warmed at start are the ones the first pages ask for: after
/// `warm`, the explorer's default view and a preset over the latest season
/// compute no table of their own, and a passer's profile computes none (his
/// row of each preset alone).
#[test]
fn the_warmed_tables_are_the_ones_the_first_pages_ask() {
    let league = common::demo_league();
    let latest = *league.plays().seasons().last().expect("seasons");
    let app = lategame::web::App::new(league, lategame::web::AppConfig::new(common::league_config(&lategame::league::demo_path())));
    let state = app.state.clone();
    assert_eq!(state.tables_kept(), 0);
    let made = state.warm();
    assert_eq!(made, 2 * PRESETS.len());
    assert_eq!(state.tables_kept(), made);
    let base = common::spawn_app(app);
    for path in ["/explore".to_string(), format!("/explore?preset=end-of-game&season={latest}")] {
        assert_eq!(get(&format!("{base}{path}")).status, 200, "{path}");
        assert_eq!(state.tables_kept(), made, "{path} computed a table the warm-up had not");
    }
    // Per preset (all seasons), who is qualified and who has a row.
    let tables: Vec<serde_json::Value> = PRESETS.iter().map(|k| get(&format!("{base}/api/splits?preset={k}")).json()).collect();
    assert_eq!(state.tables_kept(), made, "the JSON of a warmed preset computed a table");
    let short_in = |name: &str| tables.iter().filter(|t| t["rows"].as_array().expect("rows").iter().any(|r| r["passer"] == name && r["qualified"] == false)).count();
    let every = &tables[PRESETS.iter().position(|k| *k == "every-snap").expect("every-snap")];
    let names: Vec<String> = every["rows"].as_array().expect("rows").iter().map(|r| r["passer"].as_str().expect("name").to_string()).collect();
    // A passer qualified everywhere and one short somewhere.
    let everywhere = names.iter().find(|n| short_in(n) == 0).expect("a passer qualified in every preset");
    let somewhere = names.iter().find(|n| short_in(n) > 0).expect("a passer short of the minimum in some preset");
    // A profile computes no whole table (his row of each preset alone,
    // `splits::split_row_in`), whether he is qualified or short somewhere:
    // the server keeps just the warmed tables.
    for name in [everywhere, somewhere] {
        assert_eq!(get(&format!("{base}/passer?passer={}", common::enc(name))).status, 200, "{name}");
        let prof = get(&format!("{base}/api/profile?passer={}", common::enc(name))).json();
        assert_eq!(state.tables_kept(), made, "profile of {name} (short in {} presets)", short_in(name));
        // His line of each preset is his row of that preset's table.
        for (k, t) in PRESETS.iter().zip(&tables) {
            let line = prof["presets"].as_array().expect("presets").iter().find(|l| l["preset"] == *k).expect("preset line");
            let row = t["rows"].as_array().expect("rows").iter().find(|r| r["passer"] == name.as_str());
            assert_eq!(line["row"]["dropbacks"], row.map(|r| r["dropbacks"].clone()).unwrap_or(serde_json::Value::Null), "{name} {k}");
            if let Some(r) = row.filter(|r| r["qualified"] == true) {
                assert_eq!(line["row"]["cells"], r["cells"], "{name} {k}");
            }
        }
    }
}

/// The room opens the same page at once: requests for an answer being made
/// wait for it and get the same bytes; the engine makes it once. Then a
/// repeat is answered from the kept answers, and another view is made anew.
#[test]
fn the_same_page_asked_at_once_is_made_once() {
    let league = common::demo_league();
    let app = lategame::web::App::new(league, lategame::web::AppConfig::new(common::league_config(&lategame::league::demo_path())));
    let state = app.state.clone();
    let base = common::spawn_app(app);
    let page = format!("{base}/explore?preset=end-of-game-red-zone&min=7");
    assert_eq!(state.answers_made(), 0);
    let replies: Vec<common::Reply> = std::thread::scope(|s| {
        let asks: Vec<_> = (0..8).map(|_| s.spawn(|| get(&page))).collect();
        asks.into_iter().map(|h| h.join().expect("request thread")).collect()
    });
    for r in &replies {
        assert_eq!(r.status, 200);
        assert_eq!(r.body, replies[0].body, "every waiter gets the same page");
    }
    assert!(replies[0].body.to_lowercase().contains("red zone"), "the red-zone page");
    assert_eq!(state.answers_made(), 1, "eight requests at once, one answer made");
    assert_eq!(get(&page).body, replies[0].body);
    assert_eq!(state.answers_made(), 1, "a repeat is the kept answer");
    assert_eq!(get(&format!("{base}/explore?preset=end-of-game-red-zone&min=8")).status, 200);
    assert_eq!(state.answers_made(), 2, "another view is made");
    // A bad request is an error for every waiter and is not kept.
    let bad = format!("{base}/explore?preset=end-of-game-red-zonee");
    assert_eq!(get(&bad).status, 400);
    assert_eq!(get(&bad).status, 400);
}

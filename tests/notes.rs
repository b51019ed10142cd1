//! Film notes and cut-up lists through the real server: validation, the
//! same-origin rule, a list's CSV, and durability across a SIGKILL.

mod common;

use common::*;
use lategame::notes::{database_path, NoteStore};
use lategame::web::{App, AppConfig};
use serde_json::{json, Value};
use std::path::PathBuf;
use std::process::Command;
use std::sync::atomic::{AtomicUsize, Ordering};

fn scratch_dir(tag: &str) -> PathBuf {
    static N: AtomicUsize = AtomicUsize::new(0);
    let d = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("target")
        .join("test-notes")
        .join(format!("{tag}-{}-{}", std::process::id(), N.fetch_add(1, Ordering::SeqCst)));
    let _ = std::fs::remove_dir_all(&d);
    d
}

fn send(method: &str, url: &str, body: Option<&Value>, headers: &[(&str, &str)]) -> Reply {
    let agent = ureq::AgentBuilder::new().redirects(0).timeout(std::time::Duration::from_secs(60)).build();
    let mut req = agent.request(method, url);
    for (k, v) in headers {
        req = req.set(k, v);
    }
    let result = match body {
        Some(b) => req.set("Content-Type", "application/json").send_string(&b.to_string()),
        None => req.call(),
    };
    let resp = match result {
        Ok(r) => r,
        Err(ureq::Error::Status(_, r)) => r,
        Err(e) => panic!("{method} {url}: {e}"),
    };
    let status = resp.status();
    let headers = resp.headers_names().into_iter().filter_map(|n| resp.header(&n).map(|v| (n.clone(), v.to_string()))).collect();
    Reply { status, body: resp.into_string().unwrap_or_default(), headers }
}

/// The text of a PDF the server answers (pdftotext from poppler-utils).
fn pdf_text(url: &str) -> String {
    let resp = ureq::get(url).call().unwrap_or_else(|e| panic!("GET {url}: {e}"));
    assert_eq!(resp.header("content-type"), Some("application/pdf"));
    let mut bytes = Vec::new();
    std::io::Read::read_to_end(&mut resp.into_reader(), &mut bytes).expect("PDF body");
    assert!(bytes.starts_with(b"%PDF"), "not a PDF");
    let dir = scratch_dir("pdf");
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("list.pdf");
    std::fs::write(&path, &bytes).unwrap();
    let pages = Command::new("pdfinfo").arg(&path).output().expect("pdfinfo (poppler-utils) runs");
    assert!(String::from_utf8_lossy(&pages.stdout).lines().any(|l| l.starts_with("Pages:") && l.trim_end().ends_with(" 1")), "one page");
    let out = Command::new("pdftotext").arg(&path).arg("-").output().expect("pdftotext (poppler-utils) runs");
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// A server with notes in a fresh folder; also returns three real snaps
/// (game key, seq) of the demo league.
fn server_with_notes() -> (String, Vec<(String, i32)>) {
    let league = demo_league();
    let p = league.plays();
    let g = &p.games[3];
    let snaps = (g.start..g.start + 3).map(|i| (g.key.clone(), p.seq[i])).collect();
    let dir = scratch_dir("http");
    {
        let store = NoteStore::open(&database_path(&dir)).expect("notes database opens");
        // Written against another version of the file: its game is not in this one.
        let gone = lategame::notes::SnapKey { game: "an-older-game".into(), seq: 4 };
        store.add_note("another-fingerprint", &gone, "from last year's file").expect("note written");
    }
    let cfg = AppConfig { data_dir: Some(dir), ..AppConfig::new(league_config(&league.source)) };
    (spawn_app(App::new(league, cfg)), snaps)
}

#[test]
fn notes_and_lists_through_the_api() {
    let (base, snaps) = server_with_notes();
    let (g, s0) = (&snaps[0].0, snaps[0].1);

    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": g, "seq": s0, "text": "<script>x</script> late INT"})), &[]);
    assert_eq!(r.status, 201, "{}", r.body);
    let note = r.json();
    let id = note["id"].as_i64().expect("id");
    assert_eq!(note["text"], "<script>x</script> late INT", "stored as typed");
    assert_eq!(note["snap"]["seq"], s0);

    // Refusals with reasons.
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": g, "seq": s0, "text": "  "})), &[]);
    assert_eq!(r.status, 400);
    assert!(r.json()["error"].as_str().unwrap().contains("empty"), "{}", r.body);
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": g, "seq": 987_654, "text": "x"})), &[]);
    assert_eq!(r.status, 400);
    assert!(r.body.contains("has no snap 987654"), "{}", r.body);
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": "nope", "seq": 1, "text": "x"})), &[]);
    assert!(r.status == 400 && r.body.contains("no game nope"), "{}", r.body);
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": g, "seq": s0, "text": "x".repeat(1001)})), &[]);
    assert!(r.status == 400 && r.body.contains("at most 1000"), "{}", r.body);
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": g})), &[]);
    assert!(r.status == 400 && r.body.contains("expected JSON like"), "{}", r.body);
    let r = send("PATCH", &format!("{base}/api/notes/abc"), Some(&json!({"text": "y"})), &[]);
    assert!(r.status == 400 && r.body.contains("'abc' is not a number"), "{}", r.body);
    assert_eq!(send("DELETE", &format!("{base}/api/notes/99999"), None, &[]).status, 404);

    // Cross-site writes are refused before any handler runs.
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": g, "seq": s0, "text": "x"})), &[("Origin", "http://elsewhere.example")]);
    assert_eq!(r.status, 403, "{}", r.body);
    let r = send("DELETE", &format!("{base}/api/notes/{id}"), None, &[("Sec-Fetch-Site", "cross-site")]);
    assert_eq!(r.status, 403, "{}", r.body);

    let r = send("PATCH", &format!("{base}/api/notes/{id}"), Some(&json!({"text": "late INT: stared down the hook"})), &[]);
    assert_eq!(r.status, 200, "{}", r.body);
    let list = get(&format!("{base}/api/notes?game={}", enc(g))).json();
    assert_eq!(list["count"], 1);
    assert_eq!(list["notes"][0]["text"], "late INT: stared down the hook");
    assert_eq!(list["unplaced"], 0, "the game filter leaves the older note out");
    let all = get(&format!("{base}/api/notes")).json();
    assert_eq!(all["count"], 1, "only notes whose snaps exist are shown");
    assert_eq!(all["unplaced"], 1);
    assert!(all["unplaced_text"].as_str().unwrap().starts_with("1 note could not be placed"));

    // A list: created with two snaps, one more added, one removed; order kept.
    let body = json!({"name": "Late-game INTs to review", "snaps": [{"game": g, "seq": snaps[1].1}, {"game": g, "seq": s0}]});
    let r = send("POST", &format!("{base}/api/cutups"), Some(&body), &[]);
    assert_eq!(r.status, 201, "{}", r.body);
    let lid = r.json()["id"].as_i64().unwrap();
    let r = send("POST", &format!("{base}/api/cutups"), Some(&json!({"name": "Late-game INTs to review"})), &[]);
    assert!(r.status == 400 && r.body.contains("already exists"), "{}", r.body);
    let change = json!({"add": [{"game": g, "seq": snaps[2].1}], "remove": [{"game": g, "seq": snaps[1].1}]});
    let r = send("PATCH", &format!("{base}/api/cutups/{lid}"), Some(&change), &[]);
    assert_eq!(r.status, 200, "{}", r.body);
    let l = r.json();
    let seqs: Vec<i64> = l["snaps"].as_array().unwrap().iter().map(|s| s["seq"].as_i64().unwrap()).collect();
    assert_eq!(seqs, vec![s0 as i64, snaps[2].1 as i64]);
    assert_eq!(l["snaps"][0]["notes"][0], "late INT: stared down the hook");

    // The list's CSV holds exactly its snaps, in order, with the notes.
    let r = get(&format!("{base}/api/cutups/{lid}/csv"));
    assert_eq!(r.status, 200);
    assert!(r.header("content-disposition").unwrap().contains("cutup-late-game-ints-to-review.csv"));
    let lines: Vec<&str> = r.body.lines().collect();
    assert_eq!(lines.len(), 3, "{}", r.body);
    assert!(lines[0].ends_with(",notes"));
    let seq_col = lines[0].split(',').position(|c| c == "seq").unwrap();
    assert_eq!(lines[1].split(',').nth(seq_col).unwrap(), s0.to_string());
    assert_eq!(lines[2].split(',').nth(seq_col).unwrap(), snaps[2].1.to_string());
    assert!(lines[1].ends_with(",late INT: stared down the hook"), "{}", lines[1]);
    assert!(lines[2].ends_with(','), "no note on the second snap: {}", lines[2]);

    // The one-page sheet holds the list's name, its snaps and the note.
    let text = pdf_text(&format!("{base}/api/cutups/{lid}/pdf"));
    assert!(text.contains("Late-game INTs to review"), "{text}");
    let has = |seq: i32| text.split_whitespace().any(|w| w == format!("#{seq}"));
    assert!(has(s0) && has(snaps[2].1), "{text}");
    assert!(!has(snaps[1].1), "the removed snap is gone: {text}");
    assert!(text.contains("stared down the hook"), "{text}");

    // The lists page shows the list and escapes what the staff typed.
    let page = get(&format!("{base}/cutups"));
    assert_eq!(page.status, 200);
    assert!(page.body.contains("Late-game INTs to review"));
    let r = send("PATCH", &format!("{base}/api/notes/{id}"), Some(&json!({"text": "<script>x</script> stared down the hook"})), &[]);
    assert_eq!(r.status, 200);
    let page = get(&format!("{base}/cutups"));
    assert!(page.body.contains("&lt;script&gt;x&lt;/script&gt; stared down the hook") || page.body.contains("&#60;script&#62;x&#60;/script&#62; stared down the hook"), "typed text is escaped");
    assert!(!page.body.contains("<script>x</script>"));

    assert_eq!(send("DELETE", &format!("{base}/api/cutups/{lid}"), None, &[]).status, 204);
    assert_eq!(get(&format!("{base}/api/cutups/{lid}")).status, 404);
    assert_eq!(send("DELETE", &format!("{base}/api/notes/{id}"), None, &[]).status, 204);
    let after = get(&format!("{base}/api/notes")).json();
    assert_eq!((after["count"].as_i64(), after["unplaced"].as_i64()), (Some(0), Some(1)));
}

#[test]
fn a_note_survives_sigkill_right_after_the_post_returns() {
    let data = scratch_dir("kill");
    let league = demo_league();
    let p = league.plays();
    let g = &p.games[7];
    let (game, seq) = (g.key.clone(), p.seq[g.start + 4]);
    drop(league);

    let (mut child, base) = common::start_binary(&data);
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": game, "seq": seq, "text": "check the protection here"})), &[]);
    assert_eq!(r.status, 201, "{}", r.body);
    let r = send("POST", &format!("{base}/api/cutups"), Some(&json!({"name": "Protection", "snaps": [{"game": game, "seq": seq}]})), &[]);
    assert_eq!(r.status, 201, "{}", r.body);
    // SIGKILL: no shutdown code runs.
    child.kill().expect("kill");
    child.wait().expect("wait");

    let (mut child, base) = common::start_binary(&data);
    let notes = get(&format!("{base}/api/notes")).json();
    let lists = get(&format!("{base}/api/cutups")).json();
    child.kill().ok();
    child.wait().ok();
    assert_eq!(notes["count"], 1, "{notes}");
    assert_eq!(notes["notes"][0]["text"], "check the protection here");
    assert_eq!(notes["notes"][0]["seq"], seq);
    assert_eq!(lists["lists"][0]["name"], "Protection");
    assert_eq!(lists["lists"][0]["snaps"][0]["seq"], seq);
}

/// EPA percentile of a snap among the league's scrimmage snaps in the same
/// down, distance band and field zone, counted here by brute force.
fn epa_pct_by_hand(p: &lategame::plays::Plays, epa: &[f64], i: usize) -> f64 {
    use lategame::playfile::Kind;
    let band = |d: i32| match d { ..=2 => 0, 3..=6 => 1, 7..=10 => 2, _ => 3 };
    let zone = |b: i32| match b { ..=20 => 0, 21..=50 => 1, 51..=79 => 2, _ => 3 };
    let same = |j: usize| {
        matches!(p.kind[j], Kind::Pass | Kind::Sack | Kind::Scramble | Kind::Run | Kind::Kneel | Kind::Spike)
            && (1..=4).contains(&p.down[j])
            && p.down[j] == p.down[i]
            && band(p.to_go[j]) == band(p.to_go[i])
            && zone(p.ball_on[j]) == zone(p.ball_on[i])
            && epa[j].is_finite()
    };
    let (mut n, mut below, mut tied) = (0.0, 0.0, 0.0);
    for j in (0..p.len()).filter(|&j| same(j)) {
        n += 1.0;
        if epa[j] < epa[i] {
            below += 1.0;
        } else if epa[j] == epa[i] {
            tied += 1.0;
        }
    }
    100.0 * (below + 0.5 * tied) / n
}

#[test]
fn game_review_places_each_snap_in_the_leagues_distribution() {
    let league = demo_league();
    // A game that reached the last minutes within one score.
    let p = league.plays();
    let epa = league.scored.scores.epa.clone();
    let gi = (0..p.games.len())
        .find(|&g| {
            let gm = &p.games[g];
            (gm.start..gm.end).any(|i| p.period[i] == 4 && p.clock[i] < 300 && p.margin[i].abs() <= 8 && p.dropback[i])
        })
        .expect("a close game");
    let key = p.games[gi].key.clone();
    let home = p.teams[p.games[gi].home as usize].clone();
    let away = p.teams[p.games[gi].away as usize].clone();
    let expected: Vec<(i32, f64)> = {
        let g = &p.games[gi];
        (g.start..g.end).map(|i| (p.seq[i], epa_pct_by_hand(p, &epa, i))).collect()
    };
    let base = spawn(league, None, None, None);
    let r = get(&format!("{base}/api/review?game={}&team={}", enc(&key), enc(&away)));
    assert_eq!(r.status, 200, "{}", r.body);
    let j = r.json();
    assert_eq!(j["team"], away.as_str());
    assert_eq!(j["opponent"], home.as_str());
    let mut checked = 0;
    for sec in j["sections"].as_array().unwrap() {
        for s in sec["snaps"].as_array().unwrap() {
            assert_eq!(s["offense"], away.as_str(), "only the team's own snaps");
            let seq = s["seq"].as_i64().unwrap() as i32;
            let want = expected.iter().find(|(q, _)| *q == seq).unwrap().1;
            if let Some(got) = s["epa_pct"].as_f64() {
                assert!((got - want).abs() < 1e-9, "seq {seq}: {got} vs {want}");
                checked += 1;
            }
        }
    }
    assert!(checked > 0, "the close game has late snaps for {away}");
    let path = j["wp_path"].as_array().unwrap();
    let last = path.last().unwrap()[1].as_f64().unwrap();
    assert!(last == 0.0 || last == 0.5 || last == 1.0, "ends at the result from the team's side");
    let page = get(&format!("{base}/review?game={}&team={}", enc(&key), enc(&away)));
    assert_eq!(page.status, 200);
    assert!(page.body.contains("data-game="));
    assert_eq!(get(&format!("{base}/review?game=nope")).status, 404);
    assert_eq!(get(&format!("{base}/api/review")).status, 400);
}

#[test]
fn without_a_notes_folder_reads_say_off_and_writes_are_refused() {
    let base = demo_server();
    let r = get(&format!("{base}/api/notes"));
    assert_eq!(r.status, 200);
    assert!(r.json()["off"].as_str().unwrap().starts_with("notes are off"));
    assert_eq!(get(&format!("{base}/api/cutups")).json()["count"], 0);
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": "x", "seq": 1, "text": "y"})), &[]);
    assert_eq!(r.status, 503, "{}", r.body);
    let page = get(&format!("{base}/cutups"));
    assert!(page.body.contains("Notes and lists are off"));
}

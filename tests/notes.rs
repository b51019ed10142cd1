//! Film notes and cut-up lists through the real server: validation, the
//! same-origin rule, a list's CSV, and durability across a SIGKILL.

mod common;

use common::*;
use lategame::notes::{database_path, NoteStore};
use lategame::web::AppState;
use serde_json::{json, Value};
use std::io::{BufRead, BufReader};
use std::path::PathBuf;
use std::process::{Command, Stdio};
use std::sync::Arc;
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

/// A server with notes in a fresh folder; also returns three real snaps
/// (game key, seq) of the demo league.
fn server_with_notes() -> (String, Vec<(String, i32)>) {
    let league = demo_league();
    let p = league.plays();
    let g = &p.games[3];
    let snaps = (g.start..g.start + 3).map(|i| (g.key.clone(), p.seq[i])).collect();
    let store = NoteStore::open(&database_path(&scratch_dir("http"))).expect("notes database opens");
    // Written against another version of the file: its game is not in this one.
    let gone = lategame::notes::SnapKey { game: "an-older-game".into(), seq: 4 };
    store.add_note("another-fingerprint", &gone, "from last year's file").expect("note written");
    let state = Arc::new(AppState::new(league, false, None, None, None).with_notes(store));
    (spawn_state(state), snaps)
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

    assert_eq!(send("DELETE", &format!("{base}/api/cutups/{lid}"), None, &[]).status, 204);
    assert_eq!(get(&format!("{base}/api/cutups/{lid}")).status, 404);
    assert_eq!(send("DELETE", &format!("{base}/api/notes/{id}"), None, &[]).status, 204);
    let after = get(&format!("{base}/api/notes")).json();
    assert_eq!((after["count"].as_i64(), after["unplaced"].as_i64()), (Some(0), Some(1)));
}

/// The server binary on a free port with its own notes folder; returns the
/// child and its base URL once it answers.
fn start_binary(data: &std::path::Path) -> (std::process::Child, String) {
    let cache = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target").join("test-cache");
    let mut child = Command::new(env!("CARGO_BIN_EXE_lategame"))
        .args(["serve", "--bind", "127.0.0.1:0", "--data-dir"])
        .arg(data)
        .env("LATEGAME_CACHE_DIR", cache)
        .stdout(Stdio::piped())
        .stderr(Stdio::null())
        .spawn()
        .expect("server binary starts");
    let out = child.stdout.take().expect("stdout");
    let mut lines = BufReader::new(out).lines();
    let url = loop {
        match lines.next() {
            Some(Ok(l)) => {
                if let Some(rest) = l.strip_prefix("lategame is serving on ") {
                    break rest.trim_end_matches('/').to_string();
                }
            }
            _ => {
                let _ = child.kill();
                panic!("server exited before saying where it serves");
            }
        }
    };
    // Keep draining stdout so the child never blocks on a full pipe.
    std::thread::spawn(move || for _ in lines {});
    (child, url)
}

#[test]
fn a_note_survives_sigkill_right_after_the_post_returns() {
    let data = scratch_dir("kill");
    let league = demo_league();
    let p = league.plays();
    let g = &p.games[7];
    let (game, seq) = (g.key.clone(), p.seq[g.start + 4]);
    drop(league);

    let (mut child, base) = start_binary(&data);
    let r = send("POST", &format!("{base}/api/notes"), Some(&json!({"game": game, "seq": seq, "text": "check the protection here"})), &[]);
    assert_eq!(r.status, 201, "{}", r.body);
    let r = send("POST", &format!("{base}/api/cutups"), Some(&json!({"name": "Protection", "snaps": [{"game": game, "seq": seq}]})), &[]);
    assert_eq!(r.status, 201, "{}", r.body);
    // SIGKILL: no shutdown code runs.
    child.kill().expect("kill");
    child.wait().expect("wait");

    let (mut child, base) = start_binary(&data);
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

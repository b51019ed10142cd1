//! The meeting view and film notes in a real browser against the real
//! server binary: arrow keys through every situation at projector and
//! small-projector sizes (sizes, contrast, no scrollbar), a note and a list
//! written through the page, then the server restarted and both found.

mod common;

use std::path::PathBuf;
use std::process::Command;

#[test]
fn meeting_view_walks_every_situation_and_notes_survive_a_restart() {
    if std::env::var("LATEGAME_SKIP_BROWSER").is_ok() {
        eprintln!("skipped: LATEGAME_SKIP_BROWSER is set");
        return;
    }
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    assert!(root.join("tests/browser/node_modules/playwright-core").exists(), "playwright-core is not installed: run `npm install` in tests/browser (.ci/run does)");
    let league = common::demo_league();
    let passer = {
        let s = lategame::situation::Preset::ALL[0].situation(8);
        let t = lategame::splits::split_table(league.plays(), &league.values(), &s, 20);
        t.rows[0].passer.clone()
    };
    drop(league);
    let keys: Vec<&str> = lategame::web::meeting_screens().iter().map(|p| p.key()).collect();
    let data = root.join("target/test-notes/meeting");
    let _ = std::fs::remove_dir_all(&data);
    let shots = root.join("target/screenshots");
    std::fs::create_dir_all(&shots).unwrap();

    let (mut child, base) = common::start_binary(&data);
    let out = Command::new("node").arg(root.join("tests/browser/meeting.mjs")).arg(&base).arg(&shots).arg(&passer).arg(keys.join(",")).output().expect("node runs");
    let text = format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr));
    child.kill().ok();
    child.wait().ok();
    assert!(out.status.success() && text.contains("meeting check passed"), "{text}");

    let (mut child, base) = common::start_binary(&data);
    let notes = common::get(&format!("{base}/api/notes")).json();
    let lists = common::get(&format!("{base}/api/cutups")).json();
    child.kill().ok();
    child.wait().ok();
    assert_eq!(notes["count"], 1, "{notes}");
    assert_eq!(notes["notes"][0]["text"], "Held the ball: watch the left side");
    assert_eq!(lists["lists"][0]["name"], "Meeting cut-up");
    assert_eq!(lists["lists"][0]["snaps"][0]["seq"], notes["notes"][0]["seq"], "the list holds the noted snap");
}

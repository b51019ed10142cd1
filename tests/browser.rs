//! A real browser against the real server: headless chromium (Debian's,
//! driven by playwright-core from npm) sorts the explorer by clicking,
//! submits the filter form with a preset and a season, and saves
//! screenshots of every page at laptop and projector sizes under
//! target/screenshots. `.ci/run` installs both; set LATEGAME_SKIP_BROWSER=1
//! to skip on a machine without them.

mod common;

#[test]
fn explorer_sorts_in_a_real_browser_and_pages_render() {
    if std::env::var("LATEGAME_SKIP_BROWSER").is_ok() {
        eprintln!("skipped: LATEGAME_SKIP_BROWSER is set");
        return;
    }
    let root = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let script = root.join("tests/browser/explore.mjs");
    assert!(
        root.join("tests/browser/node_modules/playwright-core").exists(),
        "playwright-core is not installed: run `npm install` in tests/browser (.ci/run does)"
    );
    assert!(std::path::Path::new("/usr/bin/chromium").exists(), "chromium is not installed: apt-get install chromium (.ci/run does)");
    let league = common::demo_league();
    let passer = {
        let t = lategame::splits::split_table(league.plays(), &league.values(), &lategame::situation::Preset::EndOfGame.situation(8), 20);
        t.rows[0].passer.clone()
    };
    let base = common::spawn(league, None, Some(passer.clone()), None);
    let shots = root.join("target/screenshots");
    std::fs::create_dir_all(&shots).unwrap();
    let out = std::process::Command::new("node").arg(&script).arg(&base).arg(&shots).arg(&passer).output().expect("node runs");
    let text = format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr));
    assert!(out.status.success(), "{text}");
    assert!(text.contains("browser check passed"), "{text}");
    eprintln!("{text}");
    for name in ["home", "explore", "profile", "plays", "calibration", "report"] {
        for size in ["laptop", "projector"] {
            assert!(shots.join(format!("{name}-{size}.png")).exists(), "{name}-{size}.png");
        }
    }
}

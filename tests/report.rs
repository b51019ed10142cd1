//! The situation report: its numbers are the split engine's, the PDF is one
//! page with extractable text that stays on the page, the HTML carries the
//! same numbers. Runs on a small invented league with stand-in model values.

use lategame::playfile::{Kind, PlayRow};
use lategame::plays::{Plays, Source};
use lategame::report::{self, Paper, Provenance, ReportData, ReportError};
use lategame::situation::{Preset, Situation};
use lategame::splits::{self, metric_index, SnapValues};
use std::path::Path;
use std::process::Command;

/// Invented passers, one per team; the last one is a rarely used backup.
const PASSERS: [&str; 9] = [
    "Quill Vantreck",
    "Bram Oskelund",
    "Corvin Ashgrove",
    "Dell Pyrmont",
    "Ezra Quennick",
    "Fitz Morrowe",
    "Gage Tallisker",
    "Hollis Brenneck",
    "Ike Backupworth",
];
const TEAMS: [&str; 8] = ["AAA", "BBB", "CCC", "DDD", "EEE", "FFF", "GGG", "HHH"];

struct Lcg(u64);
impl Lcg {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        self.0 >> 33
    }
    fn unit(&mut self) -> f64 {
        self.next() as f64 / (1u64 << 31) as f64
    }
    fn int(&mut self, lo: i32, hi: i32) -> i32 {
        lo + (self.next() % (hi - lo + 1) as u64) as i32
    }
}

/// A league of two seasons, 8 teams, 14 weeks: a few early snaps and a
/// late, close fourth quarter in every game. `long_name` renames the first
/// passer (to test truncation).
fn league(long_name: Option<&str>) -> (Plays, Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
    let mut rng = Lcg(7);
    let mut rows = Vec::new();
    let name = |k: usize| -> String {
        match (k, long_name) {
            (0, Some(n)) => n.to_string(),
            _ => PASSERS[k].to_string(),
        }
    };
    for season in [2024, 2025] {
        for week in 1..=14 {
            for g in 0..4 {
                let h = (g * 2 + week as usize) % 8;
                let a = (g * 2 + 1 + week as usize * 3) % 8;
                let a = if a == h { (a + 1) % 8 } else { a };
                let (home, away) = (TEAMS[h], TEAMS[a]);
                let key = format!("{season}-{week:02}-{away}-{home}");
                let mut seq = 0;
                let mut push = |rng: &mut Lcg, rows: &mut Vec<PlayRow>, period: i32, clock: i32, off: usize, off_score: i32, def_score: i32| {
                    seq += 1;
                    let (offense, defense) = if off == h { (home, away) } else { (away, home) };
                    let r = rng.unit();
                    let kind = if r < 0.68 {
                        Kind::Pass
                    } else if r < 0.76 {
                        Kind::Sack
                    } else if r < 0.83 {
                        Kind::Scramble
                    } else {
                        Kind::Run
                    };
                    let who = if off == 0 && rng.unit() < 0.08 { 8 } else { off };
                    let complete = kind == Kind::Pass && rng.unit() < 0.63;
                    let intercepted = kind == Kind::Pass && !complete && rng.unit() < 0.07;
                    let gain = match kind {
                        Kind::Pass if complete => rng.int(0, 35),
                        Kind::Pass => 0,
                        Kind::Sack => -rng.int(1, 11),
                        _ => rng.int(-2, 14),
                    };
                    let down = rng.int(1, 4);
                    let ball_on = rng.int(5, 90);
                    rows.push(PlayRow {
                        game: key.clone(),
                        season,
                        week,
                        home: home.to_string(),
                        away: away.to_string(),
                        seq,
                        period,
                        clock,
                        offense: offense.to_string(),
                        defense: defense.to_string(),
                        off_score,
                        def_score,
                        off_timeouts: 2,
                        def_timeouts: 2,
                        down: Some(down),
                        to_go: Some(rng.int(1, 15).min(100 - ball_on)),
                        ball_on,
                        kind,
                        passer: kind.is_dropback().then(|| name(who)),
                        complete: Some(complete),
                        intercepted: Some(intercepted),
                        air_yards: (kind == Kind::Pass).then(|| rng.int(-3, 30)),
                        gain: Some(gain),
                        fumble_lost: Some(false),
                        touchback: None,
                        points: 0,
                        home_line: Some(0.0),
                    });
                };
                for k in 0..6 {
                    push(&mut rng, &mut rows, 1, 900 - k * 40, if k % 2 == 0 { h } else { a }, 0, 0);
                }
                let (hs, as_) = (rng.int(10, 24), rng.int(10, 24));
                for k in 0..28 {
                    let off = if (k / 7) % 2 == 0 { h } else { a };
                    let (os, ds) = if off == h { (hs, as_) } else { (as_, hs) };
                    push(&mut rng, &mut rows, 4, 440 - k * 15, off, os, ds);
                }
            }
        }
    }
    let sources = (0..rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    let plays = Plays::from_rows(vec!["invented.csv".into()], &rows, sources);
    let n = plays.len();
    let mut rng = Lcg(11);
    let mut epa = vec![0.0; n];
    let mut wpa = vec![0.0; n];
    let wp = vec![0.5; n];
    let mut cp = vec![f64::NAN; n];
    for i in 0..n {
        let skill = plays.passer[i] as f64 * 0.02;
        let mut e = (plays.gain[i] as f64 - 4.5) / 7.0 + skill + (rng.unit() - 0.5) * 0.6;
        if plays.intercepted[i] {
            e -= 3.5;
        }
        epa[i] = e;
        wpa[i] = e * 0.025;
        if plays.kind[i] == Kind::Pass && plays.air_yards[i].is_some() {
            cp[i] = 0.62;
        }
    }
    (plays, epa, wp, wpa, cp)
}

fn provenance() -> Provenance {
    Provenance { fingerprint: "0123456789abcdef".into(), model_version: "test-models".into(), date: "2026-12-01".into() }
}

fn build(p: &Plays, v: &SnapValues, passer: &str) -> ReportData {
    ReportData::from_parts(p, v, provenance(), &Preset::EndOfGame.situation(8), passer, splits::DEFAULT_MIN_DROPBACKS).expect("report")
}

/// A fresh scratch folder for this test process.
fn scratch() -> std::path::PathBuf {
    static N: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
    let k = N.fetch_add(1, std::sync::atomic::Ordering::SeqCst);
    let dir = std::env::temp_dir().join(format!("lategame-report-test-{}-{k}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn tool(name: &str, args: &[&str]) -> String {
    let out = Command::new(name)
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("{name} is needed for the report tests (poppler-utils): {e}"));
    assert!(out.status.success(), "{name} {args:?} failed: {}", String::from_utf8_lossy(&out.stderr));
    String::from_utf8_lossy(&out.stdout).to_string()
}

fn write_pdf(dir: &Path, name: &str, bytes: &[u8]) -> String {
    let path = dir.join(name);
    std::fs::write(&path, bytes).unwrap();
    if let Ok(keep) = std::env::var("LATEGAME_REPORT_OUT") {
        let _ = std::fs::create_dir_all(&keep);
        let _ = std::fs::write(Path::new(&keep).join(name), bytes);
    }
    path.to_string_lossy().to_string()
}

/// Word boxes from `pdftotext -bbox`: (xmin, ymin, xmax, ymax, word).
fn words(pdf: &str) -> (f64, f64, Vec<(f64, f64, f64, f64, String)>) {
    let html = tool("pdftotext", &["-bbox", pdf, "-"]);
    let attr = |line: &str, key: &str| -> Option<f64> {
        let at = line.find(&format!("{key}=\""))? + key.len() + 2;
        line[at..].split('"').next()?.parse().ok()
    };
    let (mut pw, mut ph) = (0.0, 0.0);
    let mut out = Vec::new();
    for line in html.lines() {
        let line = line.trim();
        if line.starts_with("<page") {
            pw = attr(line, "width").unwrap_or(0.0);
            ph = attr(line, "height").unwrap_or(0.0);
        } else if line.starts_with("<word") {
            let text = line.split('>').nth(1).and_then(|t| t.split('<').next()).unwrap_or("").to_string();
            if let (Some(a), Some(b), Some(c), Some(d)) = (attr(line, "xMin"), attr(line, "yMin"), attr(line, "xMax"), attr(line, "yMax")) {
                out.push((a, b, c, d, text));
            }
        }
    }
    (pw, ph, out)
}

fn assert_on_page_without_overlaps(pdf: &str) {
    let (pw, ph, ws) = words(pdf);
    assert!(ws.len() > 150, "too few words: {}", ws.len());
    for w in &ws {
        assert!(w.0 >= 20.0 && w.2 <= pw - 20.0 && w.1 >= 20.0 && w.3 <= ph - 20.0, "word off the page margins: {w:?} on {pw}x{ph}");
    }
    for (i, a) in ws.iter().enumerate() {
        for b in &ws[i + 1..] {
            let ox = a.2.min(b.2) - a.0.max(b.0);
            let oy = a.3.min(b.3) - a.1.max(b.1);
            assert!(!(ox > 0.8 && oy > 1.5), "words overlap: {a:?} and {b:?}");
        }
    }
}

#[test]
fn numbers_are_the_split_engines() {
    let (p, epa, wp, wpa, cp) = league(None);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let d = build(&p, &v, PASSERS[2]);
    // Every season of the file by default, as on the pages.
    assert_eq!(d.seasons, p.seasons());
    let s = report::report_situation(&p, &Preset::EndOfGame.situation(8));
    let t = splits::split_table_for(&p, &v, &s, splits::DEFAULT_MIN_DROPBACKS, Some(PASSERS[2]));
    let row = t.row(PASSERS[2]).expect("row");
    assert_eq!(d.situation, t.situation);
    assert_eq!(d.query, t.query);
    assert_eq!(d.dropbacks, row.dropbacks);
    assert_eq!(d.league_dropbacks, t.league_dropbacks);
    assert_eq!(d.metrics.len(), report::KEY_METRICS.len());
    for m in &d.metrics {
        let j = metric_index(m.key).unwrap();
        let c = &row.cells[j];
        assert_eq!((m.cell.value, m.cell.estimate, m.cell.lo, m.cell.hi), (c.value, c.estimate, c.lo, c.hi), "{}", m.key);
        assert_eq!((m.cell.league, m.cell.percentile, m.cell.signal, m.cell.n), (c.league, c.percentile, c.signal, c.n), "{}", m.key);
        assert!(m.cell.estimate.is_some() && m.cell.lo.is_some() && m.cell.league.is_some(), "{} has no estimate", m.key);
        assert_eq!(m.estimate, format!("{:.*}", m.decimals, c.estimate.unwrap()));
    }
    // The same numbers through the JSON the API serves.
    let json = serde_json::to_value(&t).unwrap();
    let row_json = json["rows"].as_array().unwrap().iter().find(|r| r["passer"] == PASSERS[2]).unwrap();
    let epa_j = metric_index("epa").unwrap();
    assert_eq!(row_json["cells"][epa_j]["estimate"].as_f64(), d.metrics[0].cell.estimate);
    // Snaps: the biggest gains are sorted and come from his dropbacks.
    let snaps = splits::play_list(&p, &v, &s, Some(PASSERS[2]), None);
    let max = snaps.iter().map(|s| s.wpa).fold(f64::NEG_INFINITY, f64::max);
    assert_eq!(d.best.first().map(|s| s.snap.wpa), Some(max));
    assert!(d.best.windows(2).all(|w| w[0].snap.wpa >= w[1].snap.wpa));
    assert!(d.worst.windows(2).all(|w| w[0].snap.wpa <= w[1].snap.wpa));
    assert_eq!(d.best.len(), 5);
    assert_eq!(d.worst.len(), 5);
    let total: f64 = d.games.iter().map(|g| g.wpa).sum();
    assert!((total - snaps.iter().map(|s| s.wpa).sum::<f64>()).abs() < 1e-9);
    assert_eq!(d.games.iter().map(|g| g.dropbacks).sum::<u32>(), row.dropbacks);
}

#[test]
fn unknown_passer_and_empty_situation_are_errors() {
    let (p, epa, wp, wpa, cp) = league(None);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let s = Preset::EndOfGame.situation(8);
    let e = ReportData::from_parts(&p, &v, provenance(), &s, "Nobody Here", 20).unwrap_err();
    assert!(matches!(e, ReportError::UnknownPasser(_)));
    assert!(e.to_string().contains("Nobody Here"));
    let early = Situation { periods: Some(vec![2]), ..s };
    let e = ReportData::from_parts(&p, &v, provenance(), &early, PASSERS[1], 20).unwrap_err();
    assert!(matches!(e, ReportError::NoDropbacks { .. }), "{e}");
}

#[test]
fn pdf_is_one_page_with_the_numbers_in_its_text() {
    let dir = scratch();
    let (p, epa, wp, wpa, cp) = league(None);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    for (paper, size) in [(Paper::Letter, "792 x 612 pts"), (Paper::A4, "841.89 x 595.28 pts")] {
        let d = build(&p, &v, PASSERS[3]);
        let bytes = report::render_pdf(&d, paper).unwrap();
        assert!(bytes.starts_with(b"%PDF-"));
        let path = write_pdf(&dir, &format!("report-{}.pdf", paper.key()), &bytes);
        let info = tool("pdfinfo", &[&path]);
        assert!(info.lines().any(|l| l.starts_with("Pages:") && l.trim_end().ends_with(" 1")), "{info}");
        assert!(info.contains(size), "{info}");
        let text = tool("pdftotext", &["-layout", &path, "-"]);
        assert!(text.contains(PASSERS[3]), "{text}");
        assert!(text.contains(&d.team));
        assert!(text.contains("End of game, one score (8 points); seasons 2024–2025"), "{text}");
        for m in &d.metrics {
            assert!(text.contains(m.label), "{}", m.label);
            for s in [&m.value, &m.estimate, &m.interval, &m.league, &m.percentile, &m.signal] {
                assert!(text.contains(s.as_str()), "{} {s} missing from\n{text}", m.key);
            }
        }
        for s in d.best.iter().chain(&d.worst) {
            assert!(text.contains(&s.wpa), "{}", s.wpa);
        }
        assert!(text.contains(&d.sample_note[..30]));
        assert_on_page_without_overlaps(&path);
    }
}

#[test]
fn small_samples_and_long_names_still_fit() {
    let dir = scratch();
    let long = "Maximilian Bartholomew Fitzgerald-Wolstenholme Ashbury-Vandercourt the Third of Tallisker Mere";
    let (p, epa, wp, wpa, cp) = league(Some(long));
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let backup = build(&p, &v, PASSERS[8]);
    assert!(backup.dropbacks < 20 && !backup.qualified);
    assert!(backup.sample_note.starts_with(&format!("n = {} dropbacks", backup.dropbacks)), "{}", backup.sample_note);
    assert!(backup.sample_note.contains("wide"));
    // Below the minimum he still gets estimates and ranges (the report is about him).
    assert!(backup.metrics.iter().all(|m| m.cell.estimate.is_some() && m.cell.lo.is_some()), "no estimates for the backup");
    let path = write_pdf(&dir, "backup.pdf", &report::render_pdf(&backup, Paper::Letter).unwrap());
    assert_on_page_without_overlaps(&path);
    let d = build(&p, &v, long);
    let path = write_pdf(&dir, "long.pdf", &report::render_pdf(&d, Paper::Letter).unwrap());
    let info = tool("pdfinfo", &[&path]);
    assert!(info.contains("Pages:           1"), "{info}");
    assert!(tool("pdftotext", &[&path, "-"]).contains("Maximilian Bartholomew"));
    assert_on_page_without_overlaps(&path);
}

#[test]
fn html_has_the_same_numbers_and_no_inline_code() {
    let (p, epa, wp, wpa, cp) = league(None);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let d = build(&p, &v, PASSERS[0]);
    let html = report::html(&d, Paper::Letter);
    assert!(html.contains(r#"<link rel="stylesheet" href="/static/report.css">"#));
    assert!(html.contains("paper-letter"));
    assert!(report::html(&d, Paper::A4).contains("paper-a4"));
    assert!(html.contains(PASSERS[0]));
    assert!(html.contains("End of game, one score (8 points); seasons 2024–2025"), "situation missing");
    for m in &d.metrics {
        for s in [&m.value, &m.estimate, &m.league, &m.percentile] {
            assert!(html.contains(&format!(">{s}<")), "{} {s}", m.key);
        }
    }
    assert_eq!(html.matches("<svg").count(), d.metric_charts.len() + 1);
    let lower = html.to_ascii_lowercase();
    assert!(!lower.contains("<script"), "inline script");
    assert!(!lower.contains(" style="), "inline style");
    assert!(!lower.contains("<style"), "style element");
    assert!(report::REPORT_CSS.contains("@page"));
    if let Ok(keep) = std::env::var("LATEGAME_REPORT_OUT") {
        // For a look in a browser: the page beside its stylesheet.
        let _ = std::fs::create_dir_all(&keep);
        let local = |h: String| h.replace("/static/report.css", "report.css");
        let _ = std::fs::write(Path::new(&keep).join("report.css"), report::REPORT_CSS);
        let _ = std::fs::write(Path::new(&keep).join("report-letter.html"), local(html));
        let _ = std::fs::write(Path::new(&keep).join("report-a4.html"), local(report::html(&d, Paper::A4)));
    }
}

/// Made-up throw values for the fixture's passes with air yards (NaN elsewhere).
fn throw_values(p: &Plays, wpa: &[f64]) -> (Vec<f64>, Vec<f64>) {
    let choice: Vec<f64> = (0..p.len())
        .map(|i| if p.kind[i] == Kind::Pass && p.air_yards[i].is_some() { ((i * 7) % 13) as f64 * 0.001 - 0.006 + p.passer[i] as f64 * 0.0004 } else { f64::NAN })
        .collect();
    let execution = choice.iter().zip(wpa).map(|(c, w)| if c.is_finite() { w - c } else { f64::NAN }).collect();
    (choice, execution)
}

#[test]
fn decision_values_are_the_split_engines_or_plainly_missing() {
    let dir = scratch();
    let (mut p, epa, wp, wpa, cp) = league(None);
    let (choice, execution) = throw_values(&p, &wpa);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &choice, execution: &execution, league_sticks: &[] };
    let d = build(&p, &v, PASSERS[3]);
    let s = report::report_situation(&p, &Preset::EndOfGame.situation(8));
    let t = splits::split_table_for(&p, &v, &s, splits::DEFAULT_MIN_DROPBACKS, Some(PASSERS[3]));
    let row = t.row(PASSERS[3]).expect("row");
    assert_eq!(d.decisions.iter().map(|m| m.key).collect::<Vec<_>>(), report::DECISION_METRICS);
    for m in &d.decisions {
        let c = &row.cells[metric_index(m.key).unwrap()];
        assert_eq!((m.cell.value, m.cell.estimate, m.cell.lo, m.cell.hi, m.cell.league, m.cell.n), (c.value, c.estimate, c.lo, c.hi, c.league, c.n), "{}", m.key);
        assert_eq!((m.cell.lift, m.cell.lift_lo, m.cell.lift_hi), (c.lift, c.lift_lo, c.lift_hi), "{}", m.key);
        assert!(c.estimate.is_some() && c.lift.is_some() && c.n > 20.0, "{}: {c:?}", m.key);
        assert_eq!(m.estimate, format!("{:.4}", c.estimate.unwrap()));
    }
    assert!(d.decisions_note.contains(&format!("over {} throws with air yards", d.decisions[0].n)), "{}", d.decisions_note);
    let html = report::html(&d, Paper::Letter);
    let path = write_pdf(&dir, "decisions.pdf", &report::render_pdf(&d, Paper::Letter).unwrap());
    let text = tool("pdftotext", &["-layout", &path, "-"]);
    for m in &d.decisions {
        for v in [&m.value, &m.estimate, &m.interval, &m.lift, &m.league] {
            assert!(text.contains(v.as_str()), "{} {v} missing from the PDF\n{text}", m.key);
            assert!(html.contains(&format!(">{v}<")), "{} {v} missing from the HTML", m.key);
        }
    }
    let flat = tool("pdftotext", &[&path, "-"]).split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(flat.contains("Sacks and scrambles are outside both") && flat.contains("Depth choice"), "{flat}");
    assert!(!flat.contains('…'), "something is cut off:\n{flat}");
    assert_on_page_without_overlaps(&path);
    let info = tool("pdfinfo", &[&path]);
    assert!(info.contains("Pages:           1"), "{info}");

    // No throw values for the file, then no air yards at all: said, not zeros.
    let bare = SnapValues { choice: &[], execution: &[], ..v };
    let d = build(&p, &bare, PASSERS[3]);
    assert!(d.decisions.is_empty() && d.decisions_note.contains("no throw values were computed"), "{}", d.decisions_note);
    p.air_yards = vec![None; p.len()];
    let d = build(&p, &bare, PASSERS[3]);
    assert!(d.decisions.is_empty() && d.decisions_note.contains("this file has no air yards"), "{}", d.decisions_note);
    let html = report::html(&d, Paper::Letter);
    assert!(html.contains("this file has no air yards") && !html.contains("Lift (90% range)"));
    let path = write_pdf(&dir, "no-air.pdf", &report::render_pdf(&d, Paper::Letter).unwrap());
    let text = tool("pdftotext", &[&path, "-"]).split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(text.contains("this file has no air yards") && !text.contains("0.0000"), "{text}");
    assert_on_page_without_overlaps(&path);
}

// ---- the bundled demo league, with fitted models, through the real API ----

mod common;

/// The passer with the most end-of-game dropbacks in the demo league
/// (every season), and his report.
fn demo_report(league: &lategame::league::League) -> ReportData {
    let s = report::report_situation(league.plays(), &Preset::EndOfGame.situation(8));
    let t = splits::split_table(league.plays(), &league.values(), &s, splits::DEFAULT_MIN_DROPBACKS);
    let passer = t.rows.first().expect("a passer").passer.clone();
    ReportData::build(league, &Preset::EndOfGame.situation(8), &passer, splits::DEFAULT_MIN_DROPBACKS).expect("report")
}

#[test]
fn demo_report_numbers_equal_the_json_api() {
    let league = common::demo_league();
    let d = demo_report(&league);
    assert_eq!(d.seasons, league.plays().seasons());
    assert_eq!(d.provenance.fingerprint, league.scored.fingerprint);
    assert_eq!(d.provenance.model_version, lategame::models::MODEL_VERSION);
    let url = format!("{}/api/splits?{}&passer={}", common::demo_server(), d.query_string(), common::enc(&d.passer));
    let json = common::get(&url).json();
    // The API names the passer filter too; the situation is the same.
    assert_eq!(json["situation"].as_str(), Some(format!("{}; passer {}", d.situation, d.passer).as_str()));
    let row = &json["rows"][0];
    assert_eq!(row["passer"].as_str(), Some(d.passer.as_str()));
    assert_eq!(row["dropbacks"].as_u64(), Some(d.dropbacks as u64));
    let close = |a: Option<f64>, b: Option<f64>| match (a, b) {
        (Some(x), Some(y)) => (x - y).abs() <= 1e-12 * x.abs().max(1.0),
        (None, None) => true,
        _ => false,
    };
    // The decision values too: the demo league has air yards.
    assert_eq!(d.decisions.len(), report::DECISION_METRICS.len(), "{}", d.decisions_note);
    for m in d.metrics.iter().chain(&d.decisions) {
        let c = &row["cells"][metric_index(m.key).unwrap()];
        assert_eq!(c["key"].as_str(), Some(m.key));
        for (field, ours) in [("value", m.cell.value), ("estimate", m.cell.estimate), ("lo", m.cell.lo), ("hi", m.cell.hi), ("league", m.cell.league), ("percentile", m.cell.percentile), ("signal", m.cell.signal), ("lift", m.cell.lift)] {
            assert!(close(c[field].as_f64(), ours), "{} {field}: api {:?}, report {ours:?}", m.key, c[field]);
        }
        assert_eq!(report::fmt_metric(c["estimate"].as_f64(), m.decimals), m.estimate, "{}", m.key);
        assert_eq!(report::fmt_metric(c["league"].as_f64(), m.decimals), m.league, "{}", m.key);
    }
}

#[test]
fn demo_pdf_and_html_carry_the_numbers() {
    let league = common::demo_league();
    let d = demo_report(&league);
    let dir = scratch();
    for paper in [Paper::Letter, Paper::A4] {
        let path = write_pdf(&dir, &format!("demo-{}.pdf", paper.key()), &report::pdf(&league, &Preset::EndOfGame.situation(8), &d.passer, paper).unwrap());
        let info = tool("pdfinfo", &[&path]);
        assert!(info.contains("Pages:           1"), "{info}");
        let text = tool("pdftotext", &["-layout", &path, "-"]);
        assert!(text.contains(&d.passer) && text.contains(&d.situation), "{text}");
        for m in &d.metrics {
            for s in [&m.value, &m.estimate, &m.interval, &m.league, &m.percentile, &m.signal] {
                assert!(text.contains(s.as_str()), "{} {s} missing", m.key);
            }
        }
        for m in &d.decisions {
            for s in [&m.value, &m.estimate, &m.interval, &m.lift, &m.league] {
                assert!(text.contains(s.as_str()), "{} {s} missing", m.key);
            }
        }
        assert_on_page_without_overlaps(&path);
    }
    let html = report::html(&d, Paper::Letter);
    for m in &d.metrics {
        assert!(html.contains(&format!(">{}<", m.estimate)), "{}", m.key);
    }
    if let Ok(keep) = std::env::var("LATEGAME_REPORT_OUT") {
        let _ = std::fs::write(Path::new(&keep).join("demo-letter.html"), html.replace("/static/report.css", "report.css"));
    }
    let css = common::get(&format!("{}/static/report.css", common::demo_server()));
    assert!(css.header("content-type").is_some_and(|t| t.starts_with("text/css")));
}

#[test]
fn report_command_writes_one_page() {
    let league = common::demo_league();
    let d = demo_report(&league);
    let dir = scratch();
    let out = dir.join("cli.pdf");
    let run = Command::new(env!("CARGO_BIN_EXE_lategame"))
        .args(["report", "--passer", &d.passer, "--paper", "a4", "-o"])
        .arg(&out)
        .env("LATEGAME_CACHE_DIR", std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target").join("test-cache"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    let info = tool("pdfinfo", &[&out.to_string_lossy()]);
    assert!(info.contains("Pages:           1") && info.contains("(A4)"), "{info}");
    let bad = Command::new(env!("CARGO_BIN_EXE_lategame"))
        .args(["report", "--passer", "Nobody Here", "-o"])
        .arg(dir.join("x.pdf"))
        .env("LATEGAME_CACHE_DIR", std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target").join("test-cache"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    assert!(!bad.status.success());
    assert!(String::from_utf8_lossy(&bad.stderr).contains("no passer named 'Nobody Here'"));
}

#[test]
fn the_report_defines_the_situation_gives_a_verdict_and_a_glossary() {
    let dir = scratch();
    let (p, epa, wp, wpa, cp) = league(None);
    let v = SnapValues { epa: &epa, wp: &wp, wpa: &wpa, cp: &cp, choice: &[], execution: &[], league_sticks: &[] };
    let d = build(&p, &v, PASSERS[3]);
    // The preset's window in a coach's words, not the query's, and none of the preset's name.
    assert_eq!(d.definition, "4th quarter, 7:30 or less, or overtime; within 8 points");
    // The verdict follows the EPA estimate's range and the league, in one line.
    let m = d.metrics.iter().find(|m| m.key == "epa").expect("EPA");
    let (lo, hi, lg) = (m.cell.lo.unwrap(), m.cell.hi.unwrap(), m.cell.league.unwrap());
    let word = if lo > lg { "is better than" } else if hi < lg { "is worse than" } else { "shows no clear difference from" };
    assert!(d.verdict.starts_with(&format!("Verdict: {} {word} the league here", PASSERS[3])), "{}", d.verdict);
    assert!(d.verdict.contains(&m.estimate) && d.verdict.contains(&m.league), "{}", d.verdict);
    let html = report::html(&d, Paper::Letter);
    let esc = |t: &str| t.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('\'', "&#39;");
    assert!(html.contains(&format!("Situation: {}", esc(&d.definition))), "{}", d.definition);
    assert!(html.contains(&esc(&d.verdict)), "{}", d.verdict);
    for term in ["EPA: ", "CPOE: ", "ANY/A: ", "WPA: ", "Estimate: "] {
        assert!(html.contains(term), "{term} missing from the glossary");
    }
    let path = write_pdf(&dir, "glossary.pdf", &report::render_pdf(&d, Paper::Letter).unwrap());
    let text = tool("pdftotext", &[&path, "-"]).split_whitespace().collect::<Vec<_>>().join(" ");
    for term in ["EPA: expected points added", "CPOE: completion % over expected", "ANY/A: adjusted net yards", "WPA: win probability added", "Estimate: his number", "Verdict:", "Situation: 4th quarter, 7:30 or less, or overtime; within 8 points"] {
        assert!(text.contains(term), "{term} missing from the PDF:\n{text}");
    }
    assert!(!text.contains('…'), "something is cut off:\n{text}");
    // The verdict is one line on the page.
    let layout = tool("pdftotext", &["-layout", &path, "-"]);
    assert!(layout.lines().any(|l| l.trim_start().starts_with("Verdict:") && l.trim_end().ends_with(").")), "{layout}");
    assert_on_page_without_overlaps(&path);
}

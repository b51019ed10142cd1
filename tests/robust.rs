//! The server under randomized requests and a file that changes on disk:
//! 10,000+ seeded random queries against every endpoint (no 5xx, every 400
//! has a reason), and reloading keeps serving the old league when the new
//! file is bad.

mod common;
use common::*;
use lategame::playfile::write_rows;
use lategame::sim::{simulate, SimConfig};

/// A small deterministic generator (xorshift64*), so failures repeat.
struct Gen(u64);
impl Gen {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545F4914F6CDD1D)
    }
    fn pick<'a>(&mut self, xs: &'a [&'a str]) -> &'a str {
        xs[(self.next() % xs.len() as u64) as usize]
    }
}

const KEYS: &[&str] = &[
    "preset", "os", "per", "hs", "gs", "mg", "dn", "tg", "yl", "wp", "to", "dto", "sn", "wk", "site", "tm", "opp", "passer", "min", "sort", "dir", "by",
    "view", "metric", "game", "trend", "paper", "token", "x", "",
];
const VALUES: &[&str] = &[
    "", "0", "1", "3", "-8..8", "9..3", "..", "5..", "..-1", "0.5", "0.2..0.8", "abc", "late-close", "two-minute", "all", "nope", "ot", "4,ot", "1,2,3,4",
    "3,4", "2020", "2020..2021", "99999999999999999999", "-1", "1e308", "NaN", "inf", "%00", "%ff%fe", "<script>", "'\"", "epa", "rating", "passer", "asc",
    "desc", "raw", "est", "projector", "laptop", "home", "away", "letter", "a4", "%2e%2e%2f", "1..1..1", ",,,", "7", "8", "100000", "100001",
];
const PATHS: &[&str] = &[
    "/", "/explore", "/passer", "/plays", "/plays.csv", "/game", "/calibration", "/api/summary", "/api/splits", "/api/splits.csv", "/api/profile",
    "/api/plays", "/api/game", "/api/calibration", "/report", "/report.pdf", "/static/app.css", "/choose", "/nowhere",
];

fn small_league_file(seasons: u32, seed: u64, dir: &std::path::Path, name: &str) -> std::path::PathBuf {
    let out = simulate(&SimConfig { seasons, seed, first_season: 2040 });
    let path = dir.join(name);
    write_rows(&out.rows, &path).unwrap();
    path
}

fn scratch(tag: &str) -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("lategame-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

#[test]
fn ten_thousand_random_requests_never_get_a_5xx() {
    let dir = scratch("robust");
    let path = small_league_file(1, 11, &dir, "one.parquet");
    let league = open_league(&path);
    let passer = league.plays().passers[0].clone();
    let base = spawn(league, None, None, None);
    let mut g = Gen(0x5eed_1234_abcd_0001);
    let (mut ok, mut bad, mut other) = (0, 0, 0);
    let n = 10_000;
    for k in 0..n {
        let path = g.pick(PATHS);
        let pairs = (g.next() % 5) as usize;
        let mut q = Vec::new();
        for _ in 0..pairs {
            let key = g.pick(KEYS);
            let value = if key == "passer" && g.next() % 2 == 0 { enc(&passer) } else { g.pick(VALUES).to_string() };
            q.push(format!("{key}={value}"));
        }
        let url = format!("{base}{path}?{}", q.join("&"));
        let r = get(&url);
        assert!(r.status < 500, "request {k}: {url} answered {}: {}", r.status, &r.body[..r.body.len().min(200)]);
        match r.status {
            200 | 303 => ok += 1,
            400 => {
                bad += 1;
                assert!(r.body.contains("class=\"reason\"") || r.body.contains("\"reason\""), "400 without a reason: {url}");
            }
            _ => other += 1,
        }
    }
    println!("{n} requests: {ok} answered, {bad} refused with a reason, {other} other (404 etc.)");
    assert!(ok > n / 10 && bad > n / 10);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_bad_new_file_does_not_replace_the_loaded_one() {
    let dir = scratch("reload");
    let path = small_league_file(1, 21, &dir, "league.parquet");
    let league = open_league(&path);
    let snaps = league.plays().len() as u64;
    let base = spawn(league, None, None, None);
    // the file changes under the running server: garbage first
    std::fs::write(&path, b"this is not a play file").unwrap();
    assert_eq!(get(&format!("{base}/api/summary")).json()["snaps"].as_u64(), Some(snaps));
    let r = post(&format!("{base}/reload"));
    assert_eq!(r.status, 303);
    assert_eq!(get(&format!("{base}/api/summary")).json()["snaps"].as_u64(), Some(snaps), "old league still served");
    assert!(get(&format!("{base}/")).body.contains("reload refused"));
    // then a good, different league
    let out = simulate(&SimConfig { seasons: 1, seed: 22, first_season: 2041 });
    write_rows(&out.rows, &path).unwrap();
    assert_eq!(post(&format!("{base}/reload")).status, 303);
    assert_eq!(get(&format!("{base}/api/summary")).json()["snaps"].as_u64(), Some(out.rows.len() as u64));
    let _ = std::fs::remove_dir_all(&dir);
}

//! Test support: the demo league opened once per test binary, and a real
//! server on 127.0.0.1:0 talking HTTP.

#![allow(dead_code)]

pub mod rows;

use lategame::league::{demo_path, League, LeagueConfig};
use lategame::web::{serve_on, App, AppConfig};
use std::path::{Path, PathBuf};
use std::sync::OnceLock;

/// Cached model coefficients go under target/, never into the user's cache.
pub fn test_cache_dir() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target").join("test-cache")
}

/// How the tests open a league: strict, with the test cache folder.
pub fn league_config(path: &Path) -> LeagueConfig {
    LeagueConfig { cache_dir: Some(test_cache_dir()), ..LeagueConfig::new(path) }
}

pub fn open_league(path: &Path) -> League {
    League::open_with(&league_config(path)).unwrap_or_else(|e| panic!("{} opens: {e}", path.display()))
}

pub fn demo_league() -> League {
    open_league(&demo_path())
}

/// Start a server for `league` on a random loopback port; returns the base URL.
/// A reload reads the league's own file again.
pub fn spawn(league: League, team: Option<String>, passer: Option<String>, token: Option<String>) -> String {
    let cfg = AppConfig { team, passer, token, ..AppConfig::new(league_config(&league.source)) };
    spawn_app(App::new(league, cfg))
}

/// Serve `app` on a random loopback port; returns the base URL.
pub fn spawn_app(app: App) -> String {
    let (tx, rx) = std::sync::mpsc::channel();
    std::thread::spawn(move || {
        let rt = tokio::runtime::Builder::new_multi_thread().worker_threads(2).enable_all().build().expect("runtime");
        rt.block_on(async move {
            let listener = tokio::net::TcpListener::bind("127.0.0.1:0").await.expect("bind");
            tx.send(listener.local_addr().expect("addr")).expect("send");
            let _ = serve_on(listener, app).await;
        });
    });
    let addr = rx.recv().expect("server address");
    format!("http://{addr}")
}

/// The demo league's server, shared by the tests of one binary.
pub fn demo_server() -> &'static str {
    static URL: OnceLock<String> = OnceLock::new();
    URL.get_or_init(|| spawn(demo_league(), None, None, None))
}

pub struct Reply {
    pub status: u16,
    pub body: String,
    pub headers: Vec<(String, String)>,
}

impl Reply {
    pub fn header(&self, name: &str) -> Option<&str> {
        self.headers.iter().find(|(k, _)| k.eq_ignore_ascii_case(name)).map(|(_, v)| v.as_str())
    }
    pub fn json(&self) -> serde_json::Value {
        serde_json::from_str(&self.body).unwrap_or_else(|e| panic!("not JSON ({e}): {}", &self.body[..self.body.len().min(300)]))
    }
}

fn agent() -> ureq::Agent {
    ureq::AgentBuilder::new().redirects(0).timeout(std::time::Duration::from_secs(60)).build()
}

/// Every header of an answer, a repeated one (Set-Cookie) once per value.
fn all_headers(resp: &ureq::Response) -> Vec<(String, String)> {
    let mut names = resp.headers_names();
    names.sort();
    names.dedup();
    names.into_iter().flat_map(|n| resp.all(&n).into_iter().map(move |v| (n.clone(), v.to_string())).collect::<Vec<_>>()).collect()
}

pub fn get(url: &str) -> Reply {
    get_with(url, &[])
}

pub fn get_with(url: &str, headers: &[(&str, &str)]) -> Reply {
    let mut req = agent().get(url);
    for (k, v) in headers {
        req = req.set(k, v);
    }
    let resp = match req.call() {
        Ok(r) => r,
        Err(ureq::Error::Status(_, r)) => r,
        Err(e) => panic!("GET {url}: {e}"),
    };
    let status = resp.status();
    let headers = all_headers(&resp);
    let body = resp.into_string().unwrap_or_default();
    Reply { status, body, headers }
}

pub fn post(url: &str) -> Reply {
    let resp = match agent().post(url).call() {
        Ok(r) => r,
        Err(ureq::Error::Status(_, r)) => r,
        Err(e) => panic!("POST {url}: {e}"),
    };
    let status = resp.status();
    let headers = all_headers(&resp);
    Reply { status, body: resp.into_string().unwrap_or_default(), headers }
}

/// Percent-encode a query value.
pub fn enc(s: &str) -> String {
    s.bytes()
        .map(|b| match b {
            b'A'..=b'Z' | b'a'..=b'z' | b'0'..=b'9' | b'-' | b'_' | b'.' | b'~' => (b as char).to_string(),
            _ => format!("%{b:02X}"),
        })
        .collect()
}

/// The `lategame` binary serving the demo league on a free loopback port
/// with its notes in `data` and models from the test cache; returns the
/// child (kill it when done) and its base URL once it says where it serves.
pub fn start_binary(data: &Path) -> (std::process::Child, String) {
    use std::io::{BufRead, BufReader};
    use std::process::{Command, Stdio};
    let mut child = Command::new(env!("CARGO_BIN_EXE_lategame"))
        .args(["serve", "--bind", "127.0.0.1:0", "--data-dir"])
        .arg(data)
        .env("LATEGAME_CACHE_DIR", test_cache_dir())
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

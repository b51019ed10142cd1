//! A load test for `lategame serve`: N clients on keep-alive connections
//! (plain std threads and TCP, HTTP/1.1) for a while, each asking in turn
//! for the explorer (all seasons and one season), `/api/splits` and
//! passer profiles (up to 200 passers in turn, LATEGAME_LOADTEST_PASSERS to change); prints p50/p99, errors and timeouts per endpoint, and
//! the server's peak RSS when its pid is given. With `fresh` last, every
//! request asks for one of 200 minimum-dropback settings (`min=`), so
//! nearly every answer is a table the server has not finished before (its
//! situations' passes are memoised): the engine's path, not its caches.
//! With `new` last, every request of every client asks for a situation no
//! request has asked before (a margin window of its own, `margin=LO..HI`,
//! on the view's preset): no pass, fit or answer is kept for it, so each one
//! costs what the engine costs, and 32 such requests at once queue for the
//! cores.
//!
//! `cargo run --release --example loadtest -- http://127.0.0.1:8750 [clients] [seconds] [server pid] [fresh|new]`

use std::io::{BufRead, BufReader, Read, Write};
use std::net::TcpStream;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

/// Passers whose profiles are asked for, in turn (LATEGAME_LOADTEST_PASSERS
/// sets another number; earlier runs asked for 6).
const PASSERS: usize = 200;
/// A request that took longer than this counts as a timeout.
const TIMEOUT: Duration = Duration::from_secs(10);

#[derive(Default)]
struct Tally {
    times_ms: Vec<f64>,
    errors: usize,
    timeouts: usize,
}

/// Read one HTTP/1.1 response (Content-Length or chunked); its status.
fn read_response(r: &mut BufReader<TcpStream>) -> std::io::Result<u16> {
    let mut line = String::new();
    r.read_line(&mut line)?;
    let status: u16 = line.split_whitespace().nth(1).and_then(|s| s.parse().ok()).ok_or_else(|| std::io::Error::other(format!("bad status line {line:?}")))?;
    let (mut length, mut chunked) = (None, false);
    loop {
        line.clear();
        r.read_line(&mut line)?;
        let l = line.trim_end();
        if l.is_empty() {
            break;
        }
        let lower = l.to_ascii_lowercase();
        if let Some(v) = lower.strip_prefix("content-length:") {
            length = v.trim().parse::<usize>().ok();
        } else if lower.starts_with("transfer-encoding:") && lower.contains("chunked") {
            chunked = true;
        }
    }
    if chunked {
        loop {
            line.clear();
            r.read_line(&mut line)?;
            let size = usize::from_str_radix(line.trim(), 16).map_err(std::io::Error::other)?;
            let mut skip = vec![0u8; size + 2];
            r.read_exact(&mut skip)?;
            if size == 0 {
                break;
            }
        }
    } else if let Some(n) = length {
        let mut body = vec![0u8; n];
        r.read_exact(&mut body)?;
    }
    Ok(status)
}

fn connect(host: &str) -> std::io::Result<BufReader<TcpStream>> {
    let s = TcpStream::connect(host)?;
    s.set_read_timeout(Some(TIMEOUT))?;
    s.set_nodelay(true)?;
    Ok(BufReader::new(s))
}

/// The server's resident and peak resident size (VmRSS, VmHWM) in MiB.
fn rss_mib(pid: &str) -> Option<(f64, f64)> {
    let s = std::fs::read_to_string(format!("/proc/{pid}/status")).ok()?;
    let field = |name: &str| -> Option<f64> { s.lines().find(|l| l.starts_with(name))?.split_whitespace().nth(1)?.parse::<f64>().ok().map(|kb| kb / 1024.0) };
    Some((field("VmRSS:")?, field("VmHWM:")?))
}

/// The machine's load average over the last minute, as the kernel says.
fn load_average() -> String {
    std::fs::read_to_string("/proc/loadavg").ok().and_then(|s| s.split_whitespace().next().map(str::to_string)).unwrap_or_else(|| "unknown".into())
}

/// The `n`th margin window, each one different: LO from -9 down to -98,
/// HI from 1 up to 99, so 8,910 windows before one comes round again (more
/// than a 30-second test asks at the engine's speed).
fn margin_window(n: usize) -> (i64, i64) {
    let n = n % (90 * 99);
    (-9 - (n % 90) as i64, 1 + (n / 90) as i64)
}

fn pct(v: &[f64], p: f64) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    v[(((v.len() - 1) as f64) * p).round() as usize]
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let base = args.get(1).cloned().unwrap_or_else(|| "http://127.0.0.1:8750".into());
    let clients: usize = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(32);
    let secs: u64 = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(30);
    let pid = args.get(4).cloned().filter(|a| a != "fresh" && a != "new");
    let fresh = args.last().is_some_and(|a| a == "fresh");
    let new = args.last().is_some_and(|a| a == "new");
    let host = base.trim_start_matches("http://").trim_end_matches('/').to_string();

    // The league's seasons and busiest passers, from the API.
    let fetch = |path: &str| -> String {
        let mut body = Vec::new();
        let got = TcpStream::connect(&host).and_then(|mut s| {
            write!(s, "GET {path} HTTP/1.0\r\nHost: {host}\r\n\r\n")?;
            s.read_to_end(&mut body)
        });
        let text = String::from_utf8_lossy(&body).into_owned();
        match (got, text.split_once("\r\n\r\n")) {
            (Ok(_), Some((_, b))) => b.to_string(),
            _ => String::new(),
        }
    };
    let summary: serde_json::Value = serde_json::from_str(&fetch("/api/summary")).unwrap_or_default();
    let last = summary["seasons"].as_array().and_then(|a| a.last()).and_then(|s| s.as_i64()).unwrap_or(2024);
    // Up to 200 passers of every season, so most profile requests in a
    // 30-second test ask for a passer the server has not answered yet.
    let table: serde_json::Value = serde_json::from_str(&fetch("/api/splits?preset=every-snap")).unwrap_or_default();
    let how_many = std::env::var("LATEGAME_LOADTEST_PASSERS").ok().and_then(|n| n.parse().ok()).unwrap_or(PASSERS);
    let passers: Vec<String> = table["rows"].as_array().map(|r| r.iter().take(how_many).filter_map(|x| x["passer"].as_str().map(str::to_string)).collect()).unwrap_or_default();
    let enc = |s: &str| s.bytes().map(|b| if b.is_ascii_alphanumeric() { (b as char).to_string() } else { format!("%{b:02X}") }).collect::<String>();
    let mut endpoints: Vec<(String, Vec<String>)> = vec![
        ("explore, all seasons".into(), vec!["/explore?preset=end-of-game".into()]),
        ("explore, one season".into(), vec![format!("/explore?preset=end-of-game&season={last}")]),
        ("/api/splits".into(), vec!["/api/splits?preset=end-of-game".into(), format!("/api/splits?preset=two-minute-drill&season={last}")]),
    ];
    endpoints.push(("passer profile".into(), passers.iter().map(|p| format!("/passer?passer={}", enc(p))).collect()));
    let mode = if fresh {
        ", a new minimum on each request"
    } else if new {
        ", a situation never asked on each request"
    } else {
        ""
    };
    println!("load test: {clients} clients, {secs} s, {base}{mode}; {} passers' profiles", passers.len());
    println!("load average at the start: {}", load_average());
    if let Some((rss, peak)) = pid.as_deref().and_then(rss_mib) {
        println!("server before the test: resident {rss:.0} MiB, peak {peak:.0} MiB");
    }

    let tallies: Arc<Vec<Mutex<Tally>>> = Arc::new(endpoints.iter().map(|_| Mutex::new(Tally::default())).collect());
    let endpoints = Arc::new(endpoints);
    let stop = Instant::now() + Duration::from_secs(secs);
    // One counter for all clients: request n of the test gets window n.
    let serial = Arc::new(AtomicUsize::new(0));
    let threads: Vec<_> = (0..clients)
        .map(|c| {
            let (tallies, endpoints, host, serial) = (tallies.clone(), endpoints.clone(), host.clone(), serial.clone());
            std::thread::spawn(move || {
                let mut conn = connect(&host).ok();
                let mut k = c;
                while Instant::now() < stop {
                    let e = k % endpoints.len();
                    let urls = &endpoints[e].1;
                    let url = &urls[(k / endpoints.len()) % urls.len().max(1)];
                    let url = if fresh {
                        format!("{url}&min={}", 5 + (k * 7919) % 200)
                    } else if new {
                        let (lo, hi) = margin_window(serial.fetch_add(1, Ordering::Relaxed));
                        format!("{url}&margin={lo}..{hi}")
                    } else {
                        url.clone()
                    };
                    k += 1;
                    let t = Instant::now();
                    let result = (|| -> std::io::Result<u16> {
                        if conn.is_none() {
                            conn = Some(connect(&host)?);
                        }
                        let r = conn.as_mut().ok_or_else(|| std::io::Error::other("no connection"))?;
                        write!(r.get_mut(), "GET {url} HTTP/1.1\r\nHost: {host}\r\nConnection: keep-alive\r\n\r\n")?;
                        read_response(r)
                    })();
                    let ms = t.elapsed().as_secs_f64() * 1000.0;
                    let mut tally = tallies[e].lock().unwrap_or_else(|p| p.into_inner());
                    match result {
                        Ok(200) => tally.times_ms.push(ms),
                        Ok(_) => tally.errors += 1,
                        Err(err) if matches!(err.kind(), std::io::ErrorKind::WouldBlock | std::io::ErrorKind::TimedOut) => {
                            tally.timeouts += 1;
                            conn = None;
                        }
                        Err(_) => {
                            tally.errors += 1;
                            conn = None;
                        }
                    }
                }
            })
        })
        .collect();
    for t in threads {
        let _ = t.join();
    }
    println!("{:<22} {:>9} {:>8} {:>9} {:>9} {:>7} {:>9}", "endpoint", "requests", "req/s", "p50 ms", "p99 ms", "errors", "timeouts");
    for (e, (name, _)) in endpoints.iter().enumerate() {
        let mut t = tallies[e].lock().unwrap_or_else(|p| p.into_inner());
        t.times_ms.sort_by(f64::total_cmp);
        let n = t.times_ms.len();
        println!(
            "{name:<22} {n:>9} {:>8.1} {:>9.1} {:>9.1} {:>7} {:>9}",
            n as f64 / secs as f64,
            pct(&t.times_ms, 0.5),
            pct(&t.times_ms, 0.99),
            t.errors,
            t.timeouts
        );
    }
    println!("load average at the end: {}", load_average());
    if let Some(pid) = pid {
        match rss_mib(&pid) {
            Some((rss, peak)) => println!("server peak RSS (VmHWM) {peak:.0} MiB; resident now {rss:.0} MiB"),
            None => println!("server peak RSS: /proc/{pid}/status not readable"),
        }
    }
}

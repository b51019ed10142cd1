//! Long play lists over HTTP: `/api/plays` pages with an `after=` cursor
//! that together list every snap once, the page shows N of M with a next
//! link, and the streamed cut-up CSV has every row.

mod common;
use common::*;

#[test]
fn json_pages_follow_the_cursor_through_every_snap_once() {
    let base = demo_server();
    let first = get(&format!("{base}/api/plays?preset=every-snap&limit=5000")).json();
    let total = first["count"].as_u64().expect("count") as usize;
    assert!(total > 10_000, "the demo league has more than two pages of dropbacks: {total}");
    let mut seen = Vec::new();
    let mut page = first;
    loop {
        let snaps = page["snaps"].as_array().expect("snaps");
        assert!(snaps.len() <= 5000);
        seen.extend(snaps.iter().map(|s| s["index"].as_u64().expect("index")));
        match page["next"].as_str() {
            Some(next) => page = get(&format!("{base}{next}")).json(),
            None => break,
        }
    }
    assert_eq!(seen.len(), total);
    assert!(seen.windows(2).all(|w| w[0] < w[1]), "pages in game order, no snap twice");
    // The whole list as CSV (over 10 MB: read as a stream, not a string).
    let resp = ureq::get(&format!("{base}/plays.csv?preset=every-snap")).call().expect("the cut-up");
    assert_eq!(resp.status(), 200);
    let mut bytes = Vec::new();
    std::io::Read::read_to_end(&mut resp.into_reader(), &mut bytes).expect("the whole body");
    let text = String::from_utf8(bytes).expect("UTF-8");
    assert!(text.starts_with("game,season,week,seq,"));
    assert_eq!(text.lines().count(), total + 1, "header and one line per snap");
}

#[test]
fn the_page_shows_n_of_m_with_a_next_link_and_bad_cursors_are_refused() {
    let base = demo_server();
    let r = get(&format!("{base}/plays?preset=every-snap"));
    assert_eq!(r.status, 200);
    assert!(r.body.contains("snaps 1–500 of"), "{}", &r.body[..r.body.len().min(2000)]);
    assert!(r.body.contains("rel=\"next\""));
    for bad in ["after=x", "limit=0", "limit=999999"] {
        let r = get(&format!("{base}/api/plays?preset=every-snap&{bad}"));
        assert_eq!(r.status, 400, "{bad}");
        let key = bad.split('=').next().unwrap_or_default();
        assert_eq!(r.json()["param"], key);
    }
}

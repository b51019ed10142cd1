//! Finished answers of the read-only views (the explorer, the passer
//! profile, the splits JSON), by request. The league never changes until a
//! reload, and these views show nothing the staff writes, so the same
//! address with the same "our team / our passer" gets the same bytes: a
//! repeat is answered without waiting for an engine permit. Only successful
//! answers are kept; bounded by bytes, least recently used out; the key
//! holds the loaded league, and a reload empties the cache. Requests for an
//! answer being made wait for it rather than make it again (the projector
//! and the laptops in the room open the same page at once).

use super::service::{engine, ours};
use super::Shared;
use axum::body::{Body, Bytes};
use axum::http::{HeaderMap, StatusCode};
use axum::response::Response;
use std::collections::HashMap;
use std::sync::atomic::Ordering;
use std::sync::Arc;

/// How many bytes of finished answers are kept at most (a 25-season
/// explorer page is about 0.5 MB, its splits JSON about 3 MB).
pub const FINISHED_BYTES: usize = 32 << 20;

/// Finished answers (headers and body) by key, least recently used first
/// out, each weighing its body's bytes.
pub type FinishedCache = crate::bounded::Bounded<(HeaderMap, Bytes)>;

/// An empty cache of at most `FINISHED_BYTES` (no bound on the count).
pub fn finished_cache() -> FinishedCache {
    FinishedCache::new(usize::MAX, FINISHED_BYTES)
}

/// An answer as made: status, headers and body.
#[derive(Clone)]
pub struct Made {
    status: StatusCode,
    headers: HeaderMap,
    body: Bytes,
}

/// Answers being made, by key; each waiter holds the same cell.
pub type InFlight = HashMap<String, Arc<tokio::sync::OnceCell<Made>>>;

/// The answer to `path?q` for this request's team and passer: kept, being
/// made (then waited for), or made by `make` on the engine's pool
/// (`service::engine`) and kept when it is a success.
pub async fn answer(st: &Shared, path: &str, headers: &HeaderMap, q: Option<&str>, make: impl FnOnce() -> Response + Send + 'static) -> Response {
    let (team, passer) = ours(st, headers);
    let league = Arc::as_ptr(&st.loaded().league) as usize;
    let key = format!("{league:x}|{path}?{}|{team:?}|{passer:?}", q.unwrap_or(""));
    if let Some((headers, body)) = st.finished.lock().ok().and_then(|mut c| c.get(&key)) {
        return respond(Made { status: StatusCode::OK, headers, body });
    }
    let cell = match st.in_flight.lock() {
        Ok(mut m) => m.entry(key.clone()).or_default().clone(),
        Err(_) => Arc::new(tokio::sync::OnceCell::new()),
    };
    let made = cell
        .get_or_init(|| async {
            st.answers_made.fetch_add(1, Ordering::Relaxed);
            let (parts, body) = engine(st, make).await.into_parts();
            let body = match axum::body::to_bytes(body, usize::MAX).await {
                Ok(b) => b,
                Err(_) => return Made { status: StatusCode::INTERNAL_SERVER_ERROR, headers: HeaderMap::new(), body: Bytes::from_static(b"the answer could not be read back") },
            };
            if parts.status == StatusCode::OK {
                if let Ok(mut c) = st.finished.lock() {
                    c.insert(key.clone(), (parts.headers.clone(), body.clone()), body.len());
                    tracing::debug!(kept = c.len(), bytes = c.bytes(), "finished answers");
                }
            }
            Made { status: parts.status, headers: parts.headers, body }
        })
        .await
        .clone();
    // The first waiter to get here takes the cell out (an error is made
    // again on the next request; a success is kept above).
    if let Ok(mut m) = st.in_flight.lock() {
        if m.get(&key).is_some_and(|c| Arc::ptr_eq(c, &cell)) {
            m.remove(&key);
        }
    }
    respond(made)
}

fn respond(made: Made) -> Response {
    let mut r = Response::new(Body::from(made.body));
    *r.status_mut() = made.status;
    *r.headers_mut() = made.headers;
    r
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kept(c: &mut FinishedCache, key: &str) -> Option<usize> {
        c.get(key).map(|(_, b)| b.len())
    }

    #[test]
    fn least_recently_used_answers_go_past_the_budget() {
        let mut c = FinishedCache::new(usize::MAX, 100);
        let body = |n: usize| (HeaderMap::new(), Bytes::from(vec![b'x'; n]));
        c.insert("a".into(), body(40), 40);
        c.insert("b".into(), body(40), 40);
        assert_eq!(c.bytes(), 80);
        // "a" read, so "b" is the least recently used when "c" comes.
        assert_eq!(kept(&mut c, "a"), Some(40));
        c.insert("c".into(), body(40), 40);
        assert_eq!((kept(&mut c, "a"), kept(&mut c, "b"), kept(&mut c, "c")), (Some(40), None, Some(40)));
        assert_eq!(c.bytes(), 80);
        // The same key again counts its bytes once; one bigger than the
        // budget stays alone.
        c.insert("c".into(), body(10), 10);
        assert_eq!(c.bytes(), 50);
        c.insert("d".into(), body(500), 500);
        assert_eq!((c.len(), c.bytes()), (1, 500));
        c.clear();
        assert_eq!((c.len(), c.bytes()), (0, 0));
    }
}

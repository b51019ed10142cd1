//! Finished answers of the read-only views (the explorer, the passer
//! profile, the splits JSON), by request. The league never changes until a
//! reload, and these views show nothing the staff writes, so the same
//! address with the same "our team / our passer" gets the same bytes: a
//! repeat is answered without waiting for an engine permit. Only successful
//! answers are kept; bounded by bytes, least recently used out; the key
//! holds the loaded league, and a reload empties the cache.

use super::service::{engine, ours};
use super::Shared;
use axum::body::{Body, Bytes};
use axum::http::{HeaderMap, StatusCode};
use axum::response::{IntoResponse, Response};
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

/// The answer to `path?q` for this request's team and passer: kept, or made
/// by `make` on the engine's pool (`service::engine`) and kept when it is a
/// success.
pub async fn answer(st: &Shared, path: &str, headers: &HeaderMap, q: Option<&str>, make: impl FnOnce() -> Response + Send + 'static) -> Response {
    let (team, passer) = ours(st, headers);
    let league = Arc::as_ptr(&st.loaded().league) as usize;
    let key = format!("{league:x}|{path}?{}|{team:?}|{passer:?}", q.unwrap_or(""));
    if let Some((headers, body)) = st.finished.lock().ok().and_then(|mut c| c.get(&key)) {
        let mut r = Response::new(Body::from(body));
        *r.headers_mut() = headers;
        return r;
    }
    let made = engine(st, make).await;
    if made.status() != StatusCode::OK {
        return made;
    }
    let (parts, body) = made.into_parts();
    let Ok(body) = axum::body::to_bytes(body, usize::MAX).await else {
        return (StatusCode::INTERNAL_SERVER_ERROR, "the answer could not be read back").into_response();
    };
    if let Ok(mut c) = st.finished.lock() {
        c.insert(key, (parts.headers.clone(), body.clone()), body.len());
        tracing::debug!(kept = c.len(), bytes = c.bytes(), "finished answers");
    }
    Response::from_parts(parts, Body::from(body))
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

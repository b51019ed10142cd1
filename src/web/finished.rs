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
use std::collections::HashMap;
use std::sync::Arc;

/// How many bytes of finished answers are kept at most (a 25-season
/// explorer page is about 0.5 MB, its splits JSON about 3 MB).
pub const FINISHED_BYTES: usize = 32 << 20;

/// One kept answer: its headers and body.
struct Kept {
    headers: HeaderMap,
    body: Bytes,
    used: u64,
}

/// Finished answers by key, least recently used first out.
#[derive(Default)]
pub struct FinishedCache {
    map: HashMap<String, Kept>,
    bytes: usize,
    tick: u64,
}

impl FinishedCache {
    /// The answer under `key`, marked as just used.
    fn get(&mut self, key: &str) -> Option<Response> {
        self.tick += 1;
        let k = self.map.get_mut(key)?;
        k.used = self.tick;
        let mut r = Response::new(Body::from(k.body.clone()));
        *r.headers_mut() = k.headers.clone();
        Some(r)
    }

    /// Keep an answer under `key`, then let those used least recently go
    /// until the rest fit in `budget` bytes (the one just added stays).
    fn insert(&mut self, key: String, headers: HeaderMap, body: Bytes, budget: usize) {
        self.tick += 1;
        self.bytes += body.len();
        if let Some(old) = self.map.insert(key.clone(), Kept { headers, body, used: self.tick }) {
            self.bytes -= old.body.len();
        }
        while self.bytes > budget && self.map.len() > 1 {
            let Some(oldest) = self.map.iter().filter(|(k, _)| **k != key).min_by_key(|(_, v)| v.used).map(|(k, _)| k.clone()) else { break };
            if let Some(gone) = self.map.remove(&oldest) {
                self.bytes -= gone.body.len();
            }
        }
    }

    pub fn clear(&mut self) {
        self.map.clear();
        self.bytes = 0;
    }

    #[cfg(test)]
    fn bytes(&self) -> usize {
        self.bytes
    }
}

/// The answer to `path?q` for this request's team and passer: kept, or made
/// by `make` on the engine's pool (`service::engine`) and kept when it is a
/// success.
pub async fn answer(st: &Shared, path: &str, headers: &HeaderMap, q: Option<&str>, make: impl FnOnce() -> Response + Send + 'static) -> Response {
    let (team, passer) = ours(st, headers);
    let league = Arc::as_ptr(&st.loaded().league) as usize;
    let key = format!("{league:x}|{path}?{}|{team:?}|{passer:?}", q.unwrap_or(""));
    if let Some(r) = st.finished.lock().ok().and_then(|mut c| c.get(&key)) {
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
        c.insert(key, parts.headers.clone(), body.clone(), FINISHED_BYTES);
        tracing::debug!(kept = c.map.len(), bytes = c.bytes, "finished answers");
    }
    Response::from_parts(parts, Body::from(body))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kept(c: &mut FinishedCache, key: &str) -> Option<usize> {
        c.map.get(key).map(|k| k.body.len()).filter(|_| c.get(key).is_some())
    }

    #[test]
    fn least_recently_used_answers_go_past_the_budget() {
        let mut c = FinishedCache::default();
        let body = |n: usize| Bytes::from(vec![b'x'; n]);
        c.insert("a".into(), HeaderMap::new(), body(40), 100);
        c.insert("b".into(), HeaderMap::new(), body(40), 100);
        assert_eq!(c.bytes(), 80);
        // "a" read, so "b" is the least recently used when "c" comes.
        assert_eq!(kept(&mut c, "a"), Some(40));
        c.insert("c".into(), HeaderMap::new(), body(40), 100);
        assert_eq!((kept(&mut c, "a"), kept(&mut c, "b"), kept(&mut c, "c")), (Some(40), None, Some(40)));
        assert_eq!(c.bytes(), 80);
        // The same key again counts its bytes once; one bigger than the
        // budget stays alone.
        c.insert("c".into(), HeaderMap::new(), body(10), 100);
        assert_eq!(c.bytes(), 50);
        c.insert("d".into(), HeaderMap::new(), body(500), 100);
        assert_eq!((c.map.len(), c.bytes()), (1, 500));
        c.clear();
        assert_eq!((c.map.len(), c.bytes()), (0, 0));
    }
}

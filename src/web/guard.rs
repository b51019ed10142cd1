//! The same-origin rule for requests that change state (notes, lists,
//! reload): a browser's cross-site request is refused before any handler
//! runs. Tools without a browser (curl, tests) send no `Origin` and pass.

use axum::extract::Request;
use axum::http::{header, Method, StatusCode};
use axum::middleware::Next;
use axum::response::{IntoResponse, Response};

/// Why a state-changing request is refused, or `None` when it may go on.
pub fn cross_site(method: &Method, origin: Option<&str>, host: Option<&str>, fetch_site: Option<&str>) -> Option<String> {
    if matches!(*method, Method::GET | Method::HEAD | Method::OPTIONS) {
        return None;
    }
    if let Some(site) = fetch_site {
        if site != "same-origin" && site != "none" {
            return Some(format!("a {site} page may not change notes, lists or the loaded file"));
        }
    }
    let origin = origin?;
    let origin_host = origin.strip_prefix("http://").or_else(|| origin.strip_prefix("https://")).unwrap_or("");
    match host {
        Some(h) if h.eq_ignore_ascii_case(origin_host) => None,
        _ => Some(format!("request from {origin} refused: only pages of this server may change notes, lists or the loaded file")),
    }
}

pub async fn same_origin(req: Request, next: Next) -> Response {
    let h = req.headers();
    let text = |name: header::HeaderName| h.get(name).and_then(|v| v.to_str().ok());
    let refused = cross_site(req.method(), text(header::ORIGIN), text(header::HOST), h.get("sec-fetch-site").and_then(|v| v.to_str().ok()));
    match refused {
        Some(why) => (StatusCode::FORBIDDEN, axum::Json(serde_json::json!({ "error": why }))).into_response(),
        None => next.run(req).await,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_cross_site_writes_are_refused() {
        let post = Method::POST;
        assert_eq!(cross_site(&Method::GET, Some("http://evil.example"), Some("127.0.0.1:8750"), Some("cross-site")), None);
        assert_eq!(cross_site(&post, None, Some("127.0.0.1:8750"), None), None, "no browser, no origin");
        assert_eq!(cross_site(&post, Some("http://127.0.0.1:8750"), Some("127.0.0.1:8750"), Some("same-origin")), None);
        assert!(cross_site(&post, Some("http://evil.example"), Some("127.0.0.1:8750"), None).is_some());
        assert!(cross_site(&Method::DELETE, Some("http://127.0.0.1:8750"), Some("127.0.0.1:8750"), Some("cross-site")).is_some());
        assert!(cross_site(&Method::PATCH, Some("null"), Some("127.0.0.1:8750"), None).is_some());
    }
}

//! Static files compiled into the binary: a fixed set of names, so no path
//! from a request ever reaches the file system.

use axum::extract::Path;
use axum::http::{header, StatusCode};
use axum::response::{IntoResponse, Response};

const FILES: &[(&str, &str, &str)] = &[
    ("app.css", "text/css; charset=utf-8", include_str!("../../static/app.css")),
    ("app.js", "text/javascript; charset=utf-8", include_str!("../../static/app.js")),
    ("meeting.css", "text/css; charset=utf-8", include_str!("../../static/meeting.css")),
    ("meeting.js", "text/javascript; charset=utf-8", include_str!("../../static/meeting.js")),
    ("notes.js", "text/javascript; charset=utf-8", include_str!("../../static/notes.js")),
    ("report.css", "text/css; charset=utf-8", include_str!("../../static/report.css")),
];

pub fn lookup(name: &str) -> Option<(&'static str, &'static str)> {
    FILES.iter().find(|(n, _, _)| *n == name).map(|(_, t, b)| (*t, *b))
}

pub async fn serve(Path(name): Path<String>) -> Response {
    match lookup(&name) {
        Some((mime, body)) => ([(header::CONTENT_TYPE, mime), (header::CACHE_CONTROL, "max-age=300")], body).into_response(),
        None => (StatusCode::NOT_FOUND, "404: no such file").into_response(),
    }
}

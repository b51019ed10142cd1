//! The HTTP server: shared state (the loaded league behind a swappable
//! `Arc`), the router, security headers, the access token for shared mode,
//! limits and timeouts. Pages live in `pages`, JSON in `api`.

mod api;
mod assets;
mod calib;
mod film;
mod guard;
mod meeting;
mod notes;
mod pages;
mod service;
pub mod memory;
mod finished;
pub mod query;
mod tables;

use crate::league::{League, LeagueConfig};
use axum::extract::{Request, State};
use axum::http::{header, HeaderValue, StatusCode};
use axum::middleware::{self, Next};
use axum::response::{IntoResponse, Response};
use axum::routing::{get, post};
use crate::notes::NoteStore;
use axum::Router;
use axum_extra::extract::cookie::{Cookie, CookieJar, SameSite};
use std::net::SocketAddr;
use std::sync::{Arc, RwLock};
use std::time::Duration;
use tower_http::limit::RequestBodyLimitLayer;
use tower_http::set_header::SetResponseHeaderLayer;
use tower_http::timeout::TimeoutLayer;
use tower_http::trace::TraceLayer;
use tower_http::classify::{ServerErrorsAsFailures, SharedClassifier};

pub use meeting::screens as meeting_screens;
pub use query::Params;

/// What the app needs besides the league: where the league is reloaded
/// from (with its cache folder), our team and passer, the access token.
#[derive(Debug, Clone)]
pub struct AppConfig {
    pub league: LeagueConfig,
    /// Defaults for "our team" and "our passer" (a cookie overrides them).
    pub team: Option<String>,
    pub passer: Option<String>,
    /// Required on every request when set (shared mode).
    pub token: Option<String>,
    /// Folder of the staff's film notes and cut-up lists; `None` turns them
    /// off (the pages say so).
    pub data_dir: Option<std::path::PathBuf>,
}

impl AppConfig {
    /// Reload from `league`; no team, passer, token or notes.
    pub fn new(league: LeagueConfig) -> AppConfig {
        AppConfig { league, team: None, passer: None, token: None, data_dir: None }
    }
}

/// How to serve: the app, the address, and whether other machines may
/// connect (then with a fresh access token). The CLI builds it from its flags.
#[derive(Debug, Clone)]
pub struct ServeConfig {
    pub app: AppConfig,
    /// Address to listen on, e.g. `127.0.0.1:8750`.
    pub bind: String,
    pub share: bool,
}

/// Why the server could not start or stopped.
#[derive(Debug, thiserror::Error)]
pub enum ServeError {
    #[error("--bind {0}: expected an address like 127.0.0.1:8750")]
    BadAddress(String),
    #[error("--bind {0}: not a loopback address; add --share to serve other machines (with an access token)")]
    NotLoopback(SocketAddr),
    #[error("reading random bytes for the access token: {0}")]
    Random(String),
    #[error("binding {addr}: {source}")]
    Bind { addr: SocketAddr, source: std::io::Error },
    #[error("serving: {0}")]
    Io(#[from] std::io::Error),
}

/// A loaded league with its split index (swapped together on reload).
pub struct Loaded {
    pub league: Arc<League>,
    pub index: Arc<crate::splits::SplitIndex>,
    /// The league's distributions the game review ranks snaps in.
    pub review: crate::splits::review::LeagueStates,
}

impl Loaded {
    fn new(league: League) -> Loaded {
        let t = std::time::Instant::now();
        let index = crate::splits::SplitIndex::build(league.plays(), &league.values());
        tracing::info!(rows = index.len(), "split index built in {:.0} ms", t.elapsed().as_secs_f64() * 1000.0);
        Loaded { league: Arc::new(league), index: Arc::new(index), review: crate::splits::review::LeagueStates::new() }
    }
}

/// What every handler sees.
pub struct AppState {
    league: RwLock<Arc<Loaded>>,
    /// Where the league came from and how, for reloading.
    config: LeagueConfig,
    /// Defaults for "our team" and "our passer" (a cookie overrides them).
    pub team: Option<String>,
    pub passer: Option<String>,
    /// Required on every request in shared mode.
    token: Option<String>,
    /// Last reload outcome, shown on the home page.
    reload_note: RwLock<Option<String>>,
    /// Split tables already computed for this league, by view (the league
    /// never changes until a reload, which empties it), bounded by count
    /// and bytes (`tables::TableCache`).
    splits_cache: std::sync::Mutex<tables::TableCache>,
    /// Finished answers of the read-only views, by request (`finished`).
    finished: std::sync::Mutex<finished::FinishedCache>,
    /// Answers being made, by the same key: a request for one waits for it
    /// instead of making it again (`finished::answer`).
    in_flight: std::sync::Mutex<finished::InFlight>,
    /// Answers made by the engine for `finished::answer` since start.
    answers_made: std::sync::atomic::AtomicU64,
    /// The staff's film notes and cut-up lists (None when the database
    /// could not be opened; the rest of the server still works).
    notes: Option<Arc<NoteStore>>,
    /// Permits for engine work on the blocking pool (`service::engine`).
    heavy: Arc<tokio::sync::Semaphore>,
}

/// Engine requests computed at once; the rest wait their turn without
/// holding an async worker thread.
pub const HEAVY_AT_ONCE: usize = 4;

impl AppState {
    fn new(league: League, cfg: AppConfig) -> AppState {
        let notes = cfg.data_dir.as_ref().and_then(|dir| match NoteStore::open(&crate::notes::database_path(dir)) {
            Ok(store) => {
                tracing::info!("film notes and cut-up lists in {}", store.path().display());
                Some(Arc::new(store))
            }
            Err(e) => {
                tracing::warn!("notes are off: {e}");
                None
            }
        });
        AppState {
            league: RwLock::new(Arc::new(Loaded::new(league))),
            heavy: Arc::new(tokio::sync::Semaphore::new(HEAVY_AT_ONCE)),
            config: LeagueConfig { refit: false, ..cfg.league },
            team: cfg.team,
            passer: cfg.passer,
            token: cfg.token,
            reload_note: RwLock::new(None),
            splits_cache: std::sync::Mutex::new(tables::table_cache()),
            finished: std::sync::Mutex::new(finished::finished_cache()),
            in_flight: std::sync::Mutex::new(finished::InFlight::default()),
            answers_made: std::sync::atomic::AtomicU64::new(0),
            notes,
        }
    }

    pub fn notes(&self) -> Option<Arc<NoteStore>> {
        self.notes.clone()
    }

    /// The league as loaded now (a reload swaps it; requests in flight keep
    /// the one they started with).
    pub fn league(&self) -> Arc<League> {
        self.loaded().league.clone()
    }

    /// The league and its split index as loaded now.
    pub fn loaded(&self) -> Arc<Loaded> {
        match self.league.read() {
            Ok(g) => g.clone(),
            Err(p) => p.into_inner().clone(),
        }
    }

    /// Load the file again. The new file is validated and scored first; if
    /// anything fails the old league keeps serving.
    pub fn reload(&self) -> Result<(), String> {
        let result = League::open_with(&self.config);
        let note = match result {
            Ok(new) => {
                let msg = format!("reloaded {}: {} snaps", self.config.path.display(), new.plays().len());
                let new = Arc::new(Loaded::new(new));
                match self.league.write() {
                    Ok(mut g) => *g = new,
                    Err(p) => *p.into_inner() = new,
                }
                if let Ok(mut c) = self.splits_cache.lock() {
                    c.clear();
                }
                if let Ok(mut c) = self.finished.lock() {
                    c.clear();
                }
                memory::release_free_memory();
                Ok(msg)
            }
            Err(e) => Err(format!("reload refused, still serving the earlier file: {e:#}")),
        };
        let text = match &note {
            Ok(m) | Err(m) => m.clone(),
        };
        if let Ok(mut g) = self.reload_note.write() {
            *g = Some(text);
        }
        note.map(|_| ())
    }

    /// The split table for a situation, minimum and focus passer, computed
    /// once per loaded league. The key is the situation's canonical query.
    pub fn split_table(&self, situation: &crate::situation::Situation, min: u32, focus: Option<&str>) -> Arc<crate::splits::SplitTable> {
        if let Some(f) = focus {
            // A focus passer who is qualified (or absent) changes nothing:
            // share the table without one.
            let plain = self.split_table(situation, min, None);
            if plain.rows.iter().find(|r| r.passer == f).is_none_or(|r| r.qualified) {
                return plain;
            }
        }
        let loaded = self.loaded();
        let league = &loaded.league;
        let key = format!("{:?}|{min}|{focus:?}|{:p}", situation.to_query(), Arc::as_ptr(league));
        if let Some(t) = self.splits_cache.lock().ok().and_then(|mut c| c.get(&key)) {
            return t;
        }
        let t = Arc::new(crate::splits::split_table_in(&loaded.index, league.plays(), &league.values(), situation, min, focus));
        if let Ok(mut c) = self.splits_cache.lock() {
            tables::keep(&mut c, key, t.clone());
            tracing::debug!(tables = c.len(), bytes = c.bytes(), "split table cache");
        }
        t
    }

    /// Compute the tables the staff opens first, so the first explorer
    /// page and every passer's profile find them ready: each preset over
    /// all seasons and over the latest one, at the default one-score bound
    /// and minimum (what a profile and the explorer ask when the address
    /// says nothing else). Returns how many tables it computed.
    pub fn warm(&self) -> usize {
        let loaded = self.loaded();
        let latest = loaded.league.plays().seasons().last().copied();
        let base = crate::situation::Situation::default();
        let seasons = std::iter::once(None).chain(latest.map(|y| Some(vec![y])));
        let mut made = 0;
        for seasons in seasons {
            for preset in crate::situation::Preset::ALL {
                let s = crate::situation::Situation { seasons: seasons.clone(), ..preset.situation(base.one_score) };
                let min = crate::splits::default_min_dropbacks(&s);
                // Another league loaded meanwhile: its own warm-up follows.
                if !Arc::ptr_eq(&self.loaded(), &loaded) {
                    return made;
                }
                self.split_table(&s, min, None);
                made += 1;
            }
        }
        made
    }

    /// `warm` on a thread of its own, logged; the server answers meanwhile.
    pub fn warm_in_background(self: &Arc<Self>) {
        let st = self.clone();
        let spawned = std::thread::Builder::new().name("warm".into()).spawn(move || {
            let t = std::time::Instant::now();
            let n = st.warm();
            tracing::info!(tables = n, "preset tables ready in {:.0} ms", t.elapsed().as_secs_f64() * 1000.0);
        });
        if let Err(e) = spawned {
            tracing::warn!("preset tables not computed ahead: {e}");
        }
    }

    /// How many split tables the server keeps now.
    pub fn tables_kept(&self) -> usize {
        self.splits_cache.lock().map(|c| c.len()).unwrap_or(0)
    }

    /// How many answers of the read-only views the engine has made (a
    /// request that found its answer kept or being made adds none).
    pub fn answers_made(&self) -> u64 {
        self.answers_made.load(std::sync::atomic::Ordering::Relaxed)
    }

    pub fn reload_note(&self) -> Option<String> {
        self.reload_note.read().ok().and_then(|g| g.clone())
    }
}

pub type Shared = Arc<AppState>;

/// The app: its shared state and the router over it.
pub struct App {
    pub state: Shared,
    pub router: Router,
}

impl App {
    /// The one way to build the app: `serve`, the tests and the benches all
    /// come through here, the cache folder in `cfg.league`.
    pub fn new(league: League, cfg: AppConfig) -> App {
        let state = Arc::new(AppState::new(league, cfg));
        App { router: router(state.clone()), state }
    }
}

/// Content-Security-Policy: our own scripts, styles and images only.
pub const CSP: &str = "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' data:; connect-src 'self'; form-action 'self'; base-uri 'none'; frame-ancestors 'none'";

fn router(state: Shared) -> Router {
    Router::new()
        .route("/", get(pages::home))
        .route("/explore", get(pages::explore))
        .route("/defense", get(pages::defense))
        .route("/passer", get(pages::profile))
        .route("/plays", get(pages::plays))
        .route("/plays.csv", get(pages::plays_csv))
        .route("/game", get(pages::game))
        .route("/calibration", get(pages::calibration))
        .route("/choose", get(pages::choose))
        .route("/reload", post(pages::reload))
        .route("/report", get(pages::report_html))
        .route("/report.pdf", get(pages::report_pdf))
        .route("/api/summary", get(api::summary))
        .route("/api/splits", get(api::splits))
        .route("/api/splits.csv", get(api::splits_csv))
        .route("/api/profile", get(api::profile))
        .route("/api/plays", get(api::plays))
        .route("/api/game", get(api::game))
        .route("/api/calibration", get(api::calibration))
        .route("/meeting", get(meeting::meeting))
        .route("/review", get(film::review))
        .route("/api/review", get(film::review_json))
        .route("/cutups", get(film::cutups))
        .route("/api/notes", get(notes::list_notes).post(notes::create_note))
        .route("/api/notes/{id}", get(notes::get_note).patch(notes::update_note).delete(notes::delete_note))
        .route("/api/cutups", get(notes::list_cutups).post(notes::create_cutup))
        .route("/api/cutups/{id}", get(notes::get_cutup).patch(notes::update_cutup).delete(notes::delete_cutup))
        .route("/api/cutups/{id}/csv", get(notes::cutup_csv))
        .route("/api/cutups/{id}/pdf", get(notes::cutup_pdf))
        .route("/static/{file}", get(assets::serve))
        .fallback(pages::not_found)
        .layer(middleware::from_fn(guard::same_origin))
        .layer(middleware::from_fn_with_state(state.clone(), require_token))
        .layer(RequestBodyLimitLayer::new(16 * 1024))
        .layer(TimeoutLayer::with_status_code(StatusCode::SERVICE_UNAVAILABLE, Duration::from_secs(20)))
        .layer(SetResponseHeaderLayer::overriding(header::CONTENT_SECURITY_POLICY, HeaderValue::from_static(CSP)))
        .layer(SetResponseHeaderLayer::overriding(header::X_CONTENT_TYPE_OPTIONS, HeaderValue::from_static("nosniff")))
        .layer(SetResponseHeaderLayer::overriding(header::REFERRER_POLICY, HeaderValue::from_static("no-referrer")))
        .layer(SetResponseHeaderLayer::overriding(header::X_FRAME_OPTIONS, HeaderValue::from_static("DENY")))
        .layer(request_log())
        .with_state(state)
}

/// One log line per request with its status and time taken, in a span
/// naming the method and path (never the query: it may hold the token).
fn request_log() -> TraceLayer<
    SharedClassifier<ServerErrorsAsFailures>,
    impl Fn(&Request) -> tracing::Span + Clone,
    (),
    impl Fn(&Response, Duration, &tracing::Span) + Clone,
> {
    TraceLayer::new_for_http()
        .make_span_with(|req: &Request| tracing::info_span!("request", method = %req.method(), path = %req.uri().path()))
        .on_request(())
        .on_response(|res: &Response, latency: Duration, _: &tracing::Span| {
            tracing::info!(status = res.status().as_u16(), "answered in {:.1} ms", latency.as_secs_f64() * 1000.0)
        })
}

const TOKEN_COOKIE: &str = "lategame_token";

/// In shared mode every request must carry the token: `?token=` once
/// (answered with a cookie and a redirect to the same page without it), then
/// the cookie.
async fn require_token(State(state): State<Shared>, jar: CookieJar, req: Request, next: Next) -> Response {
    let Some(token) = state.token.clone() else {
        return next.run(req).await;
    };
    if jar.get(TOKEN_COOKIE).is_some_and(|c| constant_eq(c.value(), &token)) {
        return next.run(req).await;
    }
    let pairs = query::pairs(req.uri().query());
    if pairs.iter().any(|(k, v)| k == "token" && constant_eq(v, &token)) {
        let rest: Vec<(String, String)> = pairs.into_iter().filter(|(k, _)| k != "token").collect();
        let target = format!("{}{}", req.uri().path(), query::to_query_string(&rest));
        let cookie = Cookie::build((TOKEN_COOKIE, token)).path("/").http_only(true).same_site(SameSite::Strict);
        return (StatusCode::SEE_OTHER, jar.add(cookie), [(header::LOCATION, target)]).into_response();
    }
    (StatusCode::UNAUTHORIZED, "401: this lategame server is shared with an access token; open the address printed when it started (it ends in ?token=...)").into_response()
}

fn constant_eq(a: &str, b: &str) -> bool {
    a.len() == b.len() && a.bytes().zip(b.bytes()).fold(0u8, |acc, (x, y)| acc | (x ^ y)) == 0
}

/// A random token of 32 hex digits from the operating system.
pub fn new_token() -> Result<String, ServeError> {
    let mut bytes = [0u8; 16];
    getrandom::fill(&mut bytes).map_err(|e| ServeError::Random(e.to_string()))?;
    Ok(bytes.iter().map(|b| format!("{b:02x}")).collect())
}

/// Bind and serve until Ctrl-C. Loopback only unless `share`.
pub fn serve_blocking(league: League, cfg: ServeConfig) -> Result<(), ServeError> {
    let addr: SocketAddr = cfg.bind.parse().map_err(|_| ServeError::BadAddress(cfg.bind.clone()))?;
    if !addr.ip().is_loopback() && !cfg.share {
        return Err(ServeError::NotLoopback(addr));
    }
    let token = if cfg.share { Some(new_token()?) } else { None };
    let app = App::new(league, AppConfig { token: token.clone(), ..cfg.app });
    // The load's and the index build's buffers are gone: give their pages back.
    memory::release_free_memory();
    if let Some((rss, peak)) = memory::resident_mib() {
        tracing::info!("resident {rss:.0} MiB after start-up (peak {peak:.0} MiB)");
    }
    app.state.warm_in_background();
    let rt = tokio::runtime::Builder::new_multi_thread().enable_all().build()?;
    rt.block_on(async move {
        let listener = tokio::net::TcpListener::bind(addr).await.map_err(|source| ServeError::Bind { addr, source })?;
        let local = listener.local_addr()?;
        match &token {
            Some(t) => println!("lategame is serving on http://{local}/?token={t}\n(shared mode: give this address only to your staff; the token is printed once)"),
            None => println!("lategame is serving on http://{local}/"),
        }
        axum::serve(listener, app.router)
            .with_graceful_shutdown(async {
                let _ = tokio::signal::ctrl_c().await;
            })
            .await?;
        Ok(())
    })
}

/// Serve `app` on an already bound listener (tests bind 127.0.0.1:0).
pub async fn serve_on(listener: tokio::net::TcpListener, app: App) -> std::io::Result<()> {
    axum::serve(listener, app.router).await
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tokens_are_32_hex_digits_and_differ() {
        let a = new_token().expect("random bytes");
        let b = new_token().expect("random bytes");
        assert_eq!(a.len(), 32);
        assert!(a.bytes().all(|c| c.is_ascii_hexdigit() && !c.is_ascii_uppercase()), "{a}");
        assert_ne!(a, b);
    }

    #[test]
    fn tokens_compare_in_full() {
        assert!(constant_eq("abc123", "abc123"));
        assert!(!constant_eq("abc123", "abc124"));
        assert!(!constant_eq("abc123", "abc12"));
    }
}

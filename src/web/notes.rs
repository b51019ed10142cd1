//! JSON for film notes and cut-up lists (read, write, edit, delete) and a
//! list's cut-up CSV with its notes. Database work runs on the blocking
//! pool; every refusal is a 4xx with `{"error": reason}`.

use super::Shared;
use crate::notes::{self, Cutup, CutupChange, Note, NoteStore, NotesError, SnapKey};
use crate::splits::{snap_at, Snap};
use axum::body::Bytes;
use axum::extract::{Path, RawQuery, State};
use axum::http::{header, StatusCode};
use axum::response::{IntoResponse, Response};
use axum::Json;
use serde::{Deserialize, Serialize};
use serde_json::json;
use std::sync::Arc;

fn refuse(status: StatusCode, why: impl Into<String>) -> Response {
    (status, Json(json!({ "error": why.into() }))).into_response()
}

fn failed(e: NotesError) -> Response {
    match e {
        NotesError::Invalid(why) => refuse(StatusCode::BAD_REQUEST, why),
        other => {
            tracing::error!("notes: {other}");
            refuse(StatusCode::INTERNAL_SERVER_ERROR, format!("the notes database failed: {other}"))
        }
    }
}

fn store(st: &Shared) -> Result<Arc<NoteStore>, Response> {
    st.notes().ok_or_else(|| refuse(StatusCode::SERVICE_UNAVAILABLE, "notes are off: the notes database could not be opened when the server started (see its log)"))
}

fn id_of(kind: &str, raw: &str) -> Result<i64, Response> {
    raw.parse::<i64>().map_err(|_| refuse(StatusCode::BAD_REQUEST, format!("{kind} id '{raw}' is not a number")))
}

/// The database and the id in the address, or the refusal.
fn store_and_id(st: &Shared, kind: &str, raw: &str) -> Result<(Arc<NoteStore>, i64), Response> {
    Ok((store(st)?, id_of(kind, raw)?))
}

fn body<T: serde::de::DeserializeOwned>(bytes: &Bytes, expected: &str) -> Result<T, Response> {
    serde_json::from_slice(bytes).map_err(|e| refuse(StatusCode::BAD_REQUEST, format!("request body: {e}; expected JSON like {expected}")))
}

/// Run store work off the async threads.
async fn blocking<T: Send + 'static>(f: impl FnOnce() -> Result<T, NotesError> + Send + 'static) -> Result<T, Response> {
    match tokio::task::spawn_blocking(f).await {
        Ok(r) => r.map_err(failed),
        Err(e) => Err(refuse(StatusCode::INTERNAL_SERVER_ERROR, format!("notes task failed: {e}"))),
    }
}

/// A note with the snap it belongs to, as the loaded file has it.
#[derive(Serialize)]
struct PlacedNote {
    #[serde(flatten)]
    note: Note,
    snap: Snap,
}

fn placed_notes(st: &Shared, all: Vec<Note>, game: Option<&str>) -> (Vec<PlacedNote>, usize) {
    let lg = st.league();
    let (p, v) = (lg.plays(), lg.values());
    let all: Vec<Note> = all.into_iter().filter(|n| game.is_none_or(|g| n.game == g)).collect();
    let (placed, lost) = notes::place(p, all, |n| SnapKey { game: n.game.clone(), seq: n.seq });
    (placed.into_iter().map(|(note, i)| PlacedNote { note, snap: snap_at(p, &v, i) }).collect(), lost)
}

/// "2 notes could not be placed ...", or nothing when all were placed.
fn unplaced_text(lost: usize, one: &str, many: &str) -> Option<String> {
    let what = if lost == 1 { one } else { many };
    (lost > 0).then(|| format!("{lost} {what} could not be placed: written against another version of the file, not in the loaded one"))
}

/// Reads answer 200 with `off` set when notes are off, so pages can tell
/// without an error; writes answer 503.
fn off_json(what: &str) -> Response {
    Json(json!({ "off": "notes are off: the server has no notes folder, or the notes database could not be opened (see its log)", "count": 0, what: [] })).into_response()
}

pub async fn list_notes(State(st): State<Shared>, RawQuery(q): RawQuery) -> Response {
    let game = crate::web::query::pairs(q.as_deref()).into_iter().find(|(k, _)| k == "game").map(|(_, v)| v);
    let Some(s) = st.notes() else { return off_json("notes") };
    let all = match blocking(move || s.notes()).await {
        Ok(a) => a,
        Err(r) => return r,
    };
    let (placed, lost) = placed_notes(&st, all, game.as_deref());
    Json(json!({
        "fingerprint": st.league().scored.fingerprint,
        "count": placed.len(),
        "notes": placed,
        "unplaced": lost,
        "unplaced_text": unplaced_text(lost, "note", "notes"),
    }))
    .into_response()
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct NewNote {
    game: String,
    seq: i32,
    text: String,
}

const NOTE_EXAMPLE: &str = r#"{"game": "...", "seq": 12, "text": "..."}"#;

pub async fn create_note(State(st): State<Shared>, bytes: Bytes) -> Response {
    let new: NewNote = match body(&bytes, NOTE_EXAMPLE) {
        Ok(n) => n,
        Err(r) => return r,
    };
    let s = match store(&st) {
        Ok(s) => s,
        Err(r) => return r,
    };
    let key = SnapKey { game: new.game, seq: new.seq };
    let lg = st.league();
    let i = match notes::check_snaps(lg.plays(), std::slice::from_ref(&key)) {
        Ok(ix) => ix[0],
        Err(e) => return failed(e),
    };
    let fp = lg.scored.fingerprint.clone();
    match blocking(move || s.add_note(&fp, &key, &new.text)).await {
        Ok(note) => (StatusCode::CREATED, Json(PlacedNote { note, snap: snap_at(lg.plays(), &lg.values(), i) })).into_response(),
        Err(r) => r,
    }
}

pub async fn get_note(State(st): State<Shared>, Path(raw): Path<String>) -> Response {
    let (s, id) = match store_and_id(&st, "note", &raw) {
        Ok(x) => x,
        Err(r) => return r,
    };
    match blocking(move || s.note(id)).await {
        Ok(Some(n)) => Json(n).into_response(),
        Ok(None) => refuse(StatusCode::NOT_FOUND, format!("no note {id}")),
        Err(r) => r,
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct NoteEdit {
    text: String,
}

pub async fn update_note(State(st): State<Shared>, Path(raw): Path<String>, bytes: Bytes) -> Response {
    let (s, id) = match store_and_id(&st, "note", &raw) {
        Ok(x) => x,
        Err(r) => return r,
    };
    let edit: NoteEdit = match body(&bytes, r#"{"text": "..."}"#) {
        Ok(e) => e,
        Err(r) => return r,
    };
    match blocking(move || s.update_note(id, &edit.text)).await {
        Ok(Some(n)) => Json(n).into_response(),
        Ok(None) => refuse(StatusCode::NOT_FOUND, format!("no note {id}")),
        Err(r) => r,
    }
}

/// Delete by id: 204, or 404 naming what was not there.
async fn delete_with(st: &Shared, kind: &str, what: &str, raw: &str, delete: fn(&NoteStore, i64) -> Result<bool, NotesError>) -> Response {
    let (s, id) = match store_and_id(st, kind, raw) {
        Ok(x) => x,
        Err(r) => return r,
    };
    match blocking(move || delete(&s, id)).await {
        Ok(true) => StatusCode::NO_CONTENT.into_response(),
        Ok(false) => refuse(StatusCode::NOT_FOUND, format!("no {what} {id}")),
        Err(r) => r,
    }
}

pub async fn delete_note(State(st): State<Shared>, Path(raw): Path<String>) -> Response {
    delete_with(&st, "note", "note", &raw, NoteStore::delete_note).await
}

/// A list as the loaded file has it: its snaps in order, each with its
/// notes, and how many could not be placed.
#[derive(Serialize)]
pub(super) struct PlacedList {
    pub(super) id: i64,
    pub(super) name: String,
    created_at: String,
    updated_at: String,
    count: usize,
    pub(super) snaps: Vec<ListSnap>,
    pub(super) unplaced: usize,
    unplaced_text: Option<String>,
}

#[derive(Serialize)]
pub(super) struct ListSnap {
    #[serde(flatten)]
    pub(super) snap: Snap,
    pub(super) notes: Vec<String>,
}

fn placed_list(st: &Shared, list: Cutup, all_notes: &[Note]) -> PlacedList {
    let lg = st.league();
    place_list(lg.plays(), &lg.values(), list, all_notes)
}

/// A list against a loaded league: its snaps that are there, in order, each
/// with its notes, and how many are not (pages and JSON share it).
pub(super) fn place_list(p: &crate::plays::Plays, v: &crate::splits::SnapValues, list: Cutup, all_notes: &[Note]) -> PlacedList {
    let (placed, lost) = notes::place(p, list.snaps, |k| k.clone());
    let snaps: Vec<ListSnap> = placed
        .into_iter()
        .map(|(k, i)| ListSnap {
            snap: snap_at(p, v, i),
            notes: all_notes.iter().filter(|n| n.game == k.game && n.seq == k.seq).map(|n| n.text.clone()).collect(),
        })
        .collect();
    PlacedList {
        id: list.id,
        name: list.name,
        created_at: list.created_at,
        updated_at: list.updated_at,
        count: snaps.len(),
        snaps,
        unplaced: lost,
        unplaced_text: unplaced_text(lost, "snap of this list", "snaps of this list"),
    }
}

pub async fn list_cutups(State(st): State<Shared>) -> Response {
    let Some(s) = st.notes() else { return off_json("lists") };
    match blocking(move || Ok((s.cutups()?, s.notes()?))).await {
        Ok((lists, all_notes)) => {
            let lists: Vec<PlacedList> = lists.into_iter().map(|l| placed_list(&st, l, &all_notes)).collect();
            Json(json!({ "count": lists.len(), "lists": lists })).into_response()
        }
        Err(r) => r,
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct NewList {
    name: String,
    #[serde(default)]
    snaps: Vec<SnapKey>,
}

pub async fn create_cutup(State(st): State<Shared>, bytes: Bytes) -> Response {
    let new: NewList = match body(&bytes, r#"{"name": "Late-game INTs to review", "snaps": [{"game": "...", "seq": 12}]}"#) {
        Ok(n) => n,
        Err(r) => return r,
    };
    let lg = st.league();
    if let Err(e) = notes::check_snaps(lg.plays(), &new.snaps) {
        return failed(e);
    }
    let s = match store(&st) {
        Ok(s) => s,
        Err(r) => return r,
    };
    let fp = lg.scored.fingerprint.clone();
    match blocking(move || Ok((s.create_cutup(&fp, &new.name, &new.snaps)?, s.notes()?))).await {
        Ok((list, all_notes)) => (StatusCode::CREATED, Json(placed_list(&st, list, &all_notes))).into_response(),
        Err(r) => r,
    }
}

async fn one_list(st: &Shared, raw: &str) -> Result<PlacedList, Response> {
    let s = store(st)?;
    let id = id_of("list", raw)?;
    match blocking(move || Ok((s.cutup(id)?, s.notes()?))).await? {
        (Some(l), all_notes) => Ok(placed_list(st, l, &all_notes)),
        (None, _) => Err(refuse(StatusCode::NOT_FOUND, format!("no cut-up list {id}"))),
    }
}

pub async fn get_cutup(State(st): State<Shared>, Path(raw): Path<String>) -> Response {
    match one_list(&st, &raw).await {
        Ok(l) => Json(l).into_response(),
        Err(r) => r,
    }
}

pub async fn update_cutup(State(st): State<Shared>, Path(raw): Path<String>, bytes: Bytes) -> Response {
    let (s, id) = match store_and_id(&st, "list", &raw) {
        Ok(x) => x,
        Err(r) => return r,
    };
    let change: CutupChange = match body(&bytes, r#"{"name": "...", "add": [{"game": "...", "seq": 12}], "remove": [], "snaps": [...]}"#) {
        Ok(c) => c,
        Err(r) => return r,
    };
    let lg = st.league();
    let new_keys: Vec<SnapKey> = change.add.iter().chain(change.snaps.iter().flatten()).cloned().collect();
    if let Err(e) = notes::check_snaps(lg.plays(), &new_keys) {
        return failed(e);
    }
    let fp = lg.scored.fingerprint.clone();
    match blocking(move || Ok((s.update_cutup(id, &fp, &change)?, s.notes()?))).await {
        Ok((Some(l), all_notes)) => Json(placed_list(&st, l, &all_notes)).into_response(),
        Ok((None, _)) => refuse(StatusCode::NOT_FOUND, format!("no cut-up list {id}")),
        Err(r) => r,
    }
}

pub async fn delete_cutup(State(st): State<Shared>, Path(raw): Path<String>) -> Response {
    delete_with(&st, "list", "cut-up list", &raw, NoteStore::delete_cutup).await
}

/// The list as the video staff's cut-up CSV, with a notes column.
pub async fn cutup_csv(State(st): State<Shared>, Path(raw): Path<String>) -> Response {
    let list = match one_list(&st, &raw).await {
        Ok(l) => l,
        Err(r) => return r,
    };
    let notes: Vec<String> = list.snaps.iter().map(|s| s.notes.join(" | ")).collect();
    let snaps: Vec<Snap> = list.snaps.into_iter().map(|s| s.snap).collect();
    let name: String = list.name.chars().map(|c| if c.is_ascii_alphanumeric() { c.to_ascii_lowercase() } else { '-' }).collect();
    let disposition = format!("attachment; filename=\"cutup-{}.csv\"", name.trim_matches('-'));
    ([(header::CONTENT_TYPE, "text/csv; charset=utf-8".to_string()), (header::CONTENT_DISPOSITION, disposition)], crate::export::cutup_csv_with_notes(&snaps, &notes)).into_response()
}

/// The list as a one-page sheet (PDF) for the video staff.
pub async fn cutup_pdf(State(st): State<Shared>, Path(raw): Path<String>) -> Response {
    use crate::report::{render_list_pdf, ListSheet, ListSheetRow, Paper};
    let list = match one_list(&st, &raw).await {
        Ok(l) => l,
        Err(r) => return r,
    };
    let rows: Vec<ListSheetRow> = list
        .snaps
        .iter()
        .map(|s| ListSheetRow { snap: s.snap.clone(), note: s.notes.join(" | ") })
        .collect();
    let mut subtitle = format!("{} snaps · list last changed {}", rows.len(), list.updated_at.replace('T', " ").trim_end_matches('Z'));
    if let Some(t) = &list.unplaced_text {
        subtitle.push_str(&format!(" · {t}"));
    }
    let sheet = ListSheet { title: list.name.clone(), subtitle, rows };
    match tokio::task::spawn_blocking(move || render_list_pdf(&sheet, Paper::Letter)).await {
        Ok(Ok(bytes)) => {
            let name: String = list.name.chars().map(|c| if c.is_ascii_alphanumeric() { c.to_ascii_lowercase() } else { '-' }).collect();
            let disposition = format!("inline; filename=\"cutup-{}.pdf\"", name.trim_matches('-'));
            ([(header::CONTENT_TYPE, "application/pdf".to_string()), (header::CONTENT_DISPOSITION, disposition)], bytes).into_response()
        }
        Ok(Err(e)) => refuse(StatusCode::INTERNAL_SERVER_ERROR, e.to_string()),
        Err(e) => refuse(StatusCode::INTERNAL_SERVER_ERROR, format!("PDF task failed: {e}")),
    }
}

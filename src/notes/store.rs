//! The SQLite side of notes and cut-up lists: schema, reads and writes.
//! Write-ahead log with `synchronous=FULL`, so a write is on disk when the
//! call returns.

use super::{check_list_name, check_note_text, NotesError, SnapKey, LIST_MAX_SNAPS};
use rusqlite::{params, Connection, OptionalExtension};
use serde::Serialize;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

const SCHEMA: &str = "
CREATE TABLE IF NOT EXISTS notes (
    id          INTEGER PRIMARY KEY,
    fingerprint TEXT NOT NULL,
    game        TEXT NOT NULL,
    seq         INTEGER NOT NULL,
    text        TEXT NOT NULL,
    created_at  TEXT NOT NULL,
    updated_at  TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS notes_by_snap ON notes (game, seq);
CREATE TABLE IF NOT EXISTS cutups (
    id          INTEGER PRIMARY KEY,
    name        TEXT NOT NULL UNIQUE,
    created_at  TEXT NOT NULL,
    updated_at  TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS cutup_snaps (
    cutup_id    INTEGER NOT NULL REFERENCES cutups (id) ON DELETE CASCADE,
    position    INTEGER NOT NULL,
    fingerprint TEXT NOT NULL,
    game        TEXT NOT NULL,
    seq         INTEGER NOT NULL,
    PRIMARY KEY (cutup_id, position)
);
";

const NOW: &str = "strftime('%Y-%m-%dT%H:%M:%SZ', 'now')";

#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct Note {
    pub id: i64,
    pub game: String,
    pub seq: i32,
    pub text: String,
    /// The play file the note was written against.
    pub fingerprint: String,
    pub created_at: String,
    pub updated_at: String,
}

#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct Cutup {
    pub id: i64,
    pub name: String,
    /// In the order the staff put them.
    pub snaps: Vec<SnapKey>,
    pub created_at: String,
    pub updated_at: String,
}

/// The open database. One connection behind a mutex: the staff writes a
/// note at a time, and SQLite serialises writers anyway.
pub struct NoteStore {
    conn: Mutex<Connection>,
    path: PathBuf,
}

impl NoteStore {
    /// Open (creating folders, file and tables as needed).
    pub fn open(path: &Path) -> Result<NoteStore, NotesError> {
        let open_err = |source| NotesError::Open { path: path.to_path_buf(), source };
        if let Some(dir) = path.parent() {
            if !dir.as_os_str().is_empty() {
                std::fs::create_dir_all(dir).map_err(|e| NotesError::Invalid(format!("cannot create the notes folder {}: {e}", dir.display())))?;
            }
        }
        let conn = Connection::open(path).map_err(open_err)?;
        let mode: String = conn.query_row("PRAGMA journal_mode = WAL", [], |r| r.get(0)).map_err(open_err)?;
        if !mode.eq_ignore_ascii_case("wal") {
            tracing::warn!("notes database {} is in {mode} mode, not WAL", path.display());
        }
        conn.execute_batch("PRAGMA synchronous = FULL; PRAGMA foreign_keys = ON; PRAGMA busy_timeout = 5000;").map_err(open_err)?;
        conn.execute_batch(SCHEMA).map_err(open_err)?;
        Ok(NoteStore { conn: Mutex::new(conn), path: path.to_path_buf() })
    }

    pub fn path(&self) -> &Path {
        &self.path
    }

    fn with<T>(&self, f: impl FnOnce(&mut Connection) -> Result<T, NotesError>) -> Result<T, NotesError> {
        let mut guard = match self.conn.lock() {
            Ok(g) => g,
            Err(p) => p.into_inner(),
        };
        f(&mut guard)
    }

    pub fn add_note(&self, fingerprint: &str, key: &SnapKey, text: &str) -> Result<Note, NotesError> {
        check_note_text(text)?;
        self.with(|c| {
            c.execute(
                &format!("INSERT INTO notes (fingerprint, game, seq, text, created_at, updated_at) VALUES (?1, ?2, ?3, ?4, {NOW}, {NOW})"),
                params![fingerprint, key.game, key.seq, text],
            )?;
            let id = c.last_insert_rowid();
            note_by_id(c, id)?.ok_or_else(|| NotesError::Invalid(format!("note {id} vanished after writing")))
        })
    }

    /// Every note, oldest first.
    pub fn notes(&self) -> Result<Vec<Note>, NotesError> {
        self.with(|c| {
            let mut st = c.prepare("SELECT id, game, seq, text, fingerprint, created_at, updated_at FROM notes ORDER BY id")?;
            let rows = st.query_map([], note_row)?.collect::<Result<Vec<_>, _>>()?;
            Ok(rows)
        })
    }

    pub fn note(&self, id: i64) -> Result<Option<Note>, NotesError> {
        self.with(|c| note_by_id(c, id))
    }

    /// New text for a note; `None` when there is no such note.
    pub fn update_note(&self, id: i64, text: &str) -> Result<Option<Note>, NotesError> {
        check_note_text(text)?;
        self.with(|c| {
            let n = c.execute(&format!("UPDATE notes SET text = ?1, updated_at = {NOW} WHERE id = ?2"), params![text, id])?;
            if n == 0 {
                return Ok(None);
            }
            note_by_id(c, id)
        })
    }

    pub fn delete_note(&self, id: i64) -> Result<bool, NotesError> {
        self.with(|c| Ok(c.execute("DELETE FROM notes WHERE id = ?1", params![id])? > 0))
    }

    pub fn create_cutup(&self, fingerprint: &str, name: &str, snaps: &[SnapKey]) -> Result<Cutup, NotesError> {
        check_list_name(name)?;
        check_list_len(snaps.len())?;
        self.with(|c| {
            let tx = c.transaction()?;
            if name_taken(&tx, name, None)? {
                return Err(NotesError::Invalid(format!("a cut-up list named \"{name}\" already exists; choose another name or add to it")));
            }
            tx.execute(&format!("INSERT INTO cutups (name, created_at, updated_at) VALUES (?1, {NOW}, {NOW})"), params![name])?;
            let id = tx.last_insert_rowid();
            write_snaps(&tx, id, fingerprint, snaps, 0)?;
            tx.commit()?;
            cutup_by_id(c, id)?.ok_or_else(|| NotesError::Invalid(format!("list {id} vanished after writing")))
        })
    }

    /// Every list with its snaps, oldest first.
    pub fn cutups(&self) -> Result<Vec<Cutup>, NotesError> {
        self.with(|c| {
            let ids: Vec<i64> = c.prepare("SELECT id FROM cutups ORDER BY id")?.query_map([], |r| r.get(0))?.collect::<Result<_, _>>()?;
            let mut out = Vec::with_capacity(ids.len());
            for id in ids {
                if let Some(l) = cutup_by_id(c, id)? {
                    out.push(l);
                }
            }
            Ok(out)
        })
    }

    pub fn cutup(&self, id: i64) -> Result<Option<Cutup>, NotesError> {
        self.with(|c| cutup_by_id(c, id))
    }

    /// Rename, replace the snaps, and/or append snaps; `None` when there is
    /// no such list. Snaps already on the list are not appended twice.
    pub fn update_cutup(&self, id: i64, fingerprint: &str, change: &CutupChange) -> Result<Option<Cutup>, NotesError> {
        if let Some(name) = &change.name {
            check_list_name(name)?;
        }
        self.with(|c| {
            let tx = c.transaction()?;
            let Some(current) = cutup_by_id(&tx, id)? else {
                return Ok(None);
            };
            if let Some(name) = &change.name {
                if name_taken(&tx, name, Some(id))? {
                    return Err(NotesError::Invalid(format!("a cut-up list named \"{name}\" already exists")));
                }
                tx.execute(&format!("UPDATE cutups SET name = ?1, updated_at = {NOW} WHERE id = ?2"), params![name, id])?;
            }
            let mut snaps = match &change.snaps {
                Some(s) => s.clone(),
                None => current.snaps.clone(),
            };
            for k in &change.add {
                if !snaps.contains(k) {
                    snaps.push(k.clone());
                }
            }
            snaps.retain(|k| !change.remove.contains(k));
            check_list_len(snaps.len())?;
            if snaps != current.snaps {
                tx.execute("DELETE FROM cutup_snaps WHERE cutup_id = ?1", params![id])?;
                write_snaps(&tx, id, fingerprint, &snaps, 0)?;
                tx.execute(&format!("UPDATE cutups SET updated_at = {NOW} WHERE id = ?1"), params![id])?;
            }
            tx.commit()?;
            cutup_by_id(c, id)
        })
    }

    pub fn delete_cutup(&self, id: i64) -> Result<bool, NotesError> {
        self.with(|c| Ok(c.execute("DELETE FROM cutups WHERE id = ?1", params![id])? > 0))
    }
}

/// What a PATCH of a list asks for.
#[derive(Debug, Default, Clone, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CutupChange {
    pub name: Option<String>,
    /// Replace the snaps with these, in this order.
    pub snaps: Option<Vec<SnapKey>>,
    /// Append these (after any replacement).
    #[serde(default)]
    pub add: Vec<SnapKey>,
    /// Take these off.
    #[serde(default)]
    pub remove: Vec<SnapKey>,
}

fn check_list_len(n: usize) -> Result<(), NotesError> {
    if n > LIST_MAX_SNAPS {
        return Err(NotesError::Invalid(format!("a cut-up list holds at most {LIST_MAX_SNAPS} snaps; this one would hold {n}")));
    }
    Ok(())
}

fn note_row(r: &rusqlite::Row<'_>) -> rusqlite::Result<Note> {
    Ok(Note {
        id: r.get(0)?,
        game: r.get(1)?,
        seq: r.get(2)?,
        text: r.get(3)?,
        fingerprint: r.get(4)?,
        created_at: r.get(5)?,
        updated_at: r.get(6)?,
    })
}

fn note_by_id(c: &Connection, id: i64) -> Result<Option<Note>, NotesError> {
    Ok(c.query_row("SELECT id, game, seq, text, fingerprint, created_at, updated_at FROM notes WHERE id = ?1", params![id], note_row)
        .optional()?)
}

fn name_taken(c: &Connection, name: &str, except: Option<i64>) -> Result<bool, NotesError> {
    let hit: Option<i64> = c.query_row("SELECT id FROM cutups WHERE name = ?1", params![name], |r| r.get(0)).optional()?;
    Ok(matches!(hit, Some(h) if Some(h) != except))
}

fn write_snaps(c: &Connection, id: i64, fingerprint: &str, snaps: &[SnapKey], from: usize) -> Result<(), NotesError> {
    let mut st = c.prepare("INSERT INTO cutup_snaps (cutup_id, position, fingerprint, game, seq) VALUES (?1, ?2, ?3, ?4, ?5)")?;
    for (k, s) in snaps.iter().enumerate() {
        st.execute(params![id, (from + k) as i64, fingerprint, s.game, s.seq])?;
    }
    Ok(())
}

fn cutup_by_id(c: &Connection, id: i64) -> Result<Option<Cutup>, NotesError> {
    let head = c
        .query_row("SELECT id, name, created_at, updated_at FROM cutups WHERE id = ?1", params![id], |r| {
            Ok((r.get::<_, i64>(0)?, r.get::<_, String>(1)?, r.get::<_, String>(2)?, r.get::<_, String>(3)?))
        })
        .optional()?;
    let Some((id, name, created_at, updated_at)) = head else {
        return Ok(None);
    };
    let snaps = c
        .prepare("SELECT game, seq FROM cutup_snaps WHERE cutup_id = ?1 ORDER BY position")?
        .query_map(params![id], |r| Ok(SnapKey { game: r.get(0)?, seq: r.get(1)? }))?
        .collect::<Result<Vec<_>, _>>()?;
    Ok(Some(Cutup { id, name, snaps, created_at, updated_at }))
}

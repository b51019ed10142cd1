//! Film notes and cut-up lists that the staff writes: an embedded SQLite
//! database in the user's data directory, never the play file. A snap is
//! named by its game key and snap order (`seq`), with the fingerprint of the
//! file it was written against; a reloaded file shows the notes whose snaps
//! still exist and counts the rest.

mod store;

pub use store::{Cutup, CutupChange, Note, NoteStore};

use crate::plays::Plays;
use serde::{Deserialize, Serialize};
use std::path::PathBuf;

/// Longest note, in characters (a line or two for the video staff).
pub const NOTE_MAX_CHARS: usize = 1000;
/// Longest cut-up list name, in characters.
pub const LIST_NAME_MAX_CHARS: usize = 80;
/// Most snaps on one cut-up list.
pub const LIST_MAX_SNAPS: usize = 2000;

/// One snap of the league: game key and snap order within the game.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SnapKey {
    pub game: String,
    pub seq: i32,
}

#[derive(Debug, thiserror::Error)]
pub enum NotesError {
    /// The request asked for something the rules refuse; the text says why.
    #[error("{0}")]
    Invalid(String),
    #[error("cannot open the notes database {path}: {source}")]
    Open { path: PathBuf, source: rusqlite::Error },
    #[error("notes database: {0}")]
    Db(#[from] rusqlite::Error),
}

/// The database file under a data directory.
pub fn database_path(data_dir: &std::path::Path) -> PathBuf {
    data_dir.join("notes.sqlite3")
}

/// The default data directory: `LATEGAME_DATA_DIR`, else the user's data
/// directory (`~/.local/share/lategame` on Linux), else `./lategame-data`.
pub fn default_data_dir() -> PathBuf {
    if let Some(d) = std::env::var_os("LATEGAME_DATA_DIR") {
        return PathBuf::from(d);
    }
    dirs::data_dir().map(|d| d.join("lategame")).unwrap_or_else(|| PathBuf::from("lategame-data"))
}

/// A note's text as typed, refused when empty or too long.
pub fn check_note_text(text: &str) -> Result<(), NotesError> {
    if text.trim().is_empty() {
        return Err(NotesError::Invalid("note text is empty; write a word or two".into()));
    }
    let n = text.chars().count();
    if n > NOTE_MAX_CHARS {
        return Err(NotesError::Invalid(format!("note text is {n} characters; at most {NOTE_MAX_CHARS}")));
    }
    Ok(())
}

/// A list name, refused when empty or too long.
pub fn check_list_name(name: &str) -> Result<(), NotesError> {
    if name.trim().is_empty() {
        return Err(NotesError::Invalid("list name is empty; name the cut-up, e.g. \"Late-game INTs to review\"".into()));
    }
    let n = name.chars().count();
    if n > LIST_NAME_MAX_CHARS {
        return Err(NotesError::Invalid(format!("list name is {n} characters; at most {LIST_NAME_MAX_CHARS}")));
    }
    Ok(())
}

/// Where a snap is in the loaded league, if it is there.
pub fn locate(p: &Plays, key: &SnapKey) -> Option<usize> {
    let g = p.games.iter().find(|g| g.key == key.game)?;
    (g.start..g.end).find(|&i| p.seq[i] == key.seq)
}

/// Every snap must exist in the loaded league; the error names the first
/// that does not.
pub fn check_snaps(p: &Plays, keys: &[SnapKey]) -> Result<Vec<usize>, NotesError> {
    keys.iter()
        .map(|k| {
            locate(p, k).ok_or_else(|| {
                if p.games.iter().any(|g| g.key == k.game) {
                    NotesError::Invalid(format!("game {} has no snap {} in the loaded file", k.game, k.seq))
                } else {
                    NotesError::Invalid(format!("no game {} in the loaded file", k.game))
                }
            })
        })
        .collect()
}

/// Items whose snaps are in the loaded league (with their positions), and
/// how many could not be placed.
pub fn place<T>(p: &Plays, items: Vec<T>, key: impl Fn(&T) -> SnapKey) -> (Vec<(T, usize)>, usize) {
    let mut placed = Vec::with_capacity(items.len());
    let mut lost = 0;
    for it in items {
        match locate(p, &key(&it)) {
            Some(i) => placed.push((it, i)),
            None => lost += 1,
        }
    }
    (placed, lost)
}

#[cfg(test)]
mod tests;

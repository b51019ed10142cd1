//! Fitted coefficients and calibration on disk, as JSON keyed by (data
//! fingerprint, MODEL_VERSION), in the user's cache folder (or
//! `LATEGAME_CACHE_DIR`); never beside the play file. Models fitted after
//! the league is scored (the throw-value model) keep a file of their own
//! under the same key (`load_part`, `store_part`), so the background
//! calibration, which rewrites the models' entry, never races them. The
//! per-snap scores sit beside them as raw columns (`columns`), so a warm
//! start reads them instead of scoring every snap again. Every write
//! keeps the folder bounded (`prune`); every read marks the entry used.

pub mod columns;
pub mod prune;
pub use columns::{columns_file_name, digest, finish_writes, load_columns, store_columns, store_columns_behind, ColumnsKey, Miss};

use super::{Calibration, Models, MODEL_VERSION};
use super::error::{ModelError, Result};
use serde::de::DeserializeOwned;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::path::{Path, PathBuf};

/// Environment variable naming the cache folder (overrides the default).
pub const CACHE_DIR_VAR: &str = "LATEGAME_CACHE_DIR";

/// What one cache file holds.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Entry {
    pub fingerprint: String,
    pub model_version: String,
    pub models: Models,
    /// `None` until the held-out calibration has been computed.
    #[serde(default)]
    pub calibration: Option<Calibration>,
}

/// The cache folder: `$LATEGAME_CACHE_DIR` if set and non-empty, else
/// `<user cache dir>/lategame`. `None` when neither is known.
pub fn cache_dir() -> Option<PathBuf> {
    match std::env::var_os(CACHE_DIR_VAR) {
        Some(d) if !d.is_empty() => Some(PathBuf::from(d)),
        _ => dirs::cache_dir().map(|d| d.join("lategame")),
    }
}

/// The key the models, their calibration and the per-snap scores are
/// cached under: the data fingerprint, joined by the overtime config when
/// it is not the default (it changes WP values, so a league opened with
/// another config never reads scores fitted under the old one; the
/// default keeps the plain fingerprint and the caches written before).
pub fn model_key(fingerprint: &str, overtime: &crate::overtime::OvertimeConfig) -> String {
    let k = overtime.key();
    if k.is_empty() {
        fingerprint.to_string()
    } else {
        format!("{fingerprint}+overtime[{k}]")
    }
}

/// File name for a fingerprint under the current model version.
pub fn file_name(fingerprint: &str) -> String {
    format!("models-{}.json", key(fingerprint))
}

/// File name of a part (`throw`, ...) for a fingerprint under the current
/// model version.
pub fn part_file_name(part: &str, fingerprint: &str) -> String {
    format!("{part}-{}.json", key(fingerprint))
}

fn key(fingerprint: &str) -> String {
    let mut h = Sha256::new();
    h.update(fingerprint.as_bytes());
    h.update([0u8]);
    h.update(MODEL_VERSION.as_bytes());
    let d = h.finalize();
    d.iter().take(12).map(|b| format!("{b:02x}")).collect()
}

/// What a part's file holds: the key beside the coefficients.
#[derive(Debug, Clone, Serialize, Deserialize)]
struct Part<T> {
    fingerprint: String,
    model_version: String,
    part: String,
    value: T,
}

/// Read part `part` for `fingerprint` from `dir`: `Ok(None)` when missing
/// or for another key; an unreadable file is an error the caller may log.
pub fn load_part<T: DeserializeOwned>(dir: &Path, part: &str, fingerprint: &str) -> Result<Option<T>> {
    let path = dir.join(part_file_name(part, fingerprint));
    let text = match std::fs::read_to_string(&path) {
        Ok(t) => t,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(None),
        Err(source) => return Err(ModelError::CacheIo { path, source }),
    };
    let entry: Part<T> = serde_json::from_str(&text).map_err(|source| ModelError::CacheEntry { path: path.clone(), source })?;
    if entry.fingerprint != fingerprint || entry.model_version != MODEL_VERSION || entry.part != part {
        return Ok(None);
    }
    touch(&path);
    Ok(Some(entry.value))
}

/// Write part `part` for `fingerprint` into `dir` (created if needed).
pub fn store_part<T: Serialize>(dir: &Path, part: &str, fingerprint: &str, value: &T) -> Result<PathBuf> {
    let entry = Part { fingerprint: fingerprint.to_string(), model_version: MODEL_VERSION.to_string(), part: part.to_string(), value };
    let text = serde_json::to_string(&entry).map_err(ModelError::Serialize)?;
    write_bytes(dir, &part_file_name(part, fingerprint), fingerprint, text.as_bytes())
}

/// Mark a file just read as recently used (its modification time now, the
/// age `prune` goes by); a file that cannot be touched is left as it is.
pub fn touch(path: &Path) {
    if let Ok(f) = std::fs::OpenOptions::new().append(true).open(path) {
        let _ = f.set_modified(std::time::SystemTime::now());
    }
}

/// Write `bytes` to `dir/name` through a temporary file and a rename, so a
/// reader never sees half a file.
fn write_bytes(dir: &Path, name: &str, fingerprint: &str, text: &[u8]) -> Result<PathBuf> {
    std::fs::create_dir_all(dir).map_err(|source| ModelError::CacheIo { path: dir.to_path_buf(), source })?;
    let path = dir.join(name);
    let tmp = dir.join(format!("{name}.tmp{}", std::process::id()));
    std::fs::write(&tmp, text).map_err(|source| ModelError::CacheIo { path: tmp.clone(), source })?;
    std::fs::rename(&tmp, &path).map_err(|source| ModelError::CacheIo { path: path.clone(), source })?;
    prune::after_write(dir, &key(fingerprint), fingerprint);
    Ok(path)
}

/// Read the entry for `fingerprint` from `dir`. A missing, unreadable or
/// mismatched file is a miss (`Ok(None)` or an error the caller may log).
pub fn load(dir: &Path, fingerprint: &str) -> Result<Option<Entry>> {
    let path = dir.join(file_name(fingerprint));
    let text = match std::fs::read_to_string(&path) {
        Ok(t) => t,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(None),
        Err(source) => return Err(ModelError::CacheIo { path, source }),
    };
    let entry: Entry = serde_json::from_str(&text).map_err(|source| ModelError::CacheEntry { path: path.clone(), source })?;
    if entry.fingerprint != fingerprint || entry.model_version != MODEL_VERSION {
        return Ok(None);
    }
    touch(&path);
    Ok(Some(entry))
}

/// Write the entry for `fingerprint` into `dir` (created if needed), through
/// a temporary file and a rename so a reader never sees half a file.
pub fn store(
    dir: &Path,
    fingerprint: &str,
    models: &Models,
    calibration: Option<&Calibration>,
) -> Result<PathBuf> {
    let entry = Entry {
        fingerprint: fingerprint.to_string(),
        model_version: MODEL_VERSION.to_string(),
        models: models.clone(),
        calibration: calibration.cloned(),
    };
    let text = serde_json::to_string(&entry).map_err(ModelError::Serialize)?;
    write_bytes(dir, &file_name(fingerprint), fingerprint, text.as_bytes())
}


//! Fitted coefficients and calibration on disk, as JSON keyed by (data
//! fingerprint, MODEL_VERSION), in the user's cache folder (or
//! `LATEGAME_CACHE_DIR`); never beside the play file.

use super::{Calibration, Models, MODEL_VERSION};
use super::error::{ModelError, Result};
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

/// File name for a fingerprint under the current model version.
pub fn file_name(fingerprint: &str) -> String {
    let mut h = Sha256::new();
    h.update(fingerprint.as_bytes());
    h.update([0u8]);
    h.update(MODEL_VERSION.as_bytes());
    let d = h.finalize();
    let hex: String = d.iter().take(12).map(|b| format!("{b:02x}")).collect();
    format!("models-{hex}.json")
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
    std::fs::create_dir_all(dir).map_err(|source| ModelError::CacheIo { path: dir.to_path_buf(), source })?;
    let entry = Entry {
        fingerprint: fingerprint.to_string(),
        model_version: MODEL_VERSION.to_string(),
        models: models.clone(),
        calibration: calibration.cloned(),
    };
    let path = dir.join(file_name(fingerprint));
    let tmp = dir.join(format!(
        "{}.tmp{}",
        file_name(fingerprint),
        std::process::id()
    ));
    let text = serde_json::to_string(&entry).map_err(ModelError::Serialize)?;
    std::fs::write(&tmp, text).map_err(|source| ModelError::CacheIo { path: tmp.clone(), source })?;
    std::fs::rename(&tmp, &path).map_err(|source| ModelError::CacheIo { path: path.clone(), source })?;
    Ok(path)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A league restored from the cache must score exactly as the fit it
    /// was written from: every coefficient reads back bit for bit.
    #[test]
    fn coefficients_read_back_bit_for_bit() {
        let plays = crate::models::testkit::league(120, 2, 9);
        let models = crate::models::fit(&plays).expect("fit");
        let dir = std::env::temp_dir().join(format!("lategame-cache-test-{}", std::process::id()));
        store(&dir, "fp-roundtrip", &models, None).expect("store");
        let back = load(&dir, "fp-roundtrip").expect("load").expect("an entry");
        let _ = std::fs::remove_dir_all(&dir);
        let bits = |m: &Models| {
            let v = serde_json::to_value(m).expect("json");
            let mut out = Vec::new();
            collect_numbers(&v, &mut out);
            out
        };
        let (a, b) = (bits(&models), bits(&back.models));
        assert!(a.len() > 50, "only {} numbers: the test would prove little", a.len());
        assert_eq!(a, b);
    }

    fn collect_numbers(v: &serde_json::Value, out: &mut Vec<u64>) {
        match v {
            serde_json::Value::Number(n) => out.push(n.as_f64().map(f64::to_bits).unwrap_or(0)),
            serde_json::Value::Array(xs) => xs.iter().for_each(|x| collect_numbers(x, out)),
            serde_json::Value::Object(m) => m.values().for_each(|x| collect_numbers(x, out)),
            _ => {}
        }
    }
}

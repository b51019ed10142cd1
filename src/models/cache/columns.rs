//! Per-snap score columns on disk beside the coefficients: raw
//! little-endian f64, one file per part (`scores`, `throw-scores`) under
//! the same key as the coefficients, read back in one go so a warm start
//! scores nothing. The header names the key, the columns, the number of
//! snaps and a digest of the coefficients they were scored with; a
//! checksum over the columns closes the file. Anything that does not match
//! (another file, another model version, other coefficients, a short or
//! damaged file) is a miss, and the caller scores as if there were no file.

use super::{key, write_bytes, MODEL_VERSION};
use crate::models::error::{ModelError, Result};
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::io::Read;
use std::path::{Path, PathBuf};
use std::sync::Mutex;
use std::thread::JoinHandle;

/// The first bytes of every columns file.
const MAGIC: &[u8; 8] = b"LGCOLS01";

/// What the header of a columns file says.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
struct Header {
    fingerprint: String,
    model_version: String,
    part: String,
    /// Digest of the coefficients the columns were scored with (`digest`).
    models: String,
    rows: u64,
    columns: Vec<String>,
}

/// File name of part `part`'s columns for a fingerprint under the current
/// model version.
pub fn columns_file_name(part: &str, fingerprint: &str) -> String {
    format!("{part}-{}.bin", key(fingerprint))
}

/// A short digest of anything serializable (the fitted coefficients the
/// columns come from): hex SHA-256 of its JSON, first 16 bytes.
pub fn digest<T: Serialize>(value: &T) -> Result<String> {
    let text = serde_json::to_vec(value).map_err(ModelError::Serialize)?;
    let d = Sha256::digest(&text);
    Ok(d.iter().take(16).map(|b| format!("{b:02x}")).collect())
}

/// A fast checksum of the column bytes (not cryptographic: it catches a
/// damaged or half-copied file, the header catches the rest).
fn checksum(words: impl Iterator<Item = u64>, mut h: u64) -> u64 {
    for w in words {
        h = (h ^ w).wrapping_mul(0x9E37_79B9_7F4A_7C15).rotate_left(29);
    }
    h
}

/// Which columns of a part, and the coefficients behind them.
pub struct ColumnsKey<'a> {
    pub part: &'a str,
    pub fingerprint: &'a str,
    /// `digest` of the coefficients the columns are scored with.
    pub models: &'a str,
    /// Column names in order (a file with other names is a miss).
    pub names: &'a [&'a str],
}

impl ColumnsKey<'_> {
    fn header(&self, rows: usize) -> Header {
        Header {
            fingerprint: self.fingerprint.to_string(),
            model_version: MODEL_VERSION.to_string(),
            part: self.part.to_string(),
            models: self.models.to_string(),
            rows: rows as u64,
            columns: self.names.iter().map(|s| s.to_string()).collect(),
        }
    }
}

/// Write `columns` (each `rows` long, in the order of `k.names`) into `dir`
/// (created if needed), through a temporary file and a rename.
pub fn store_columns(dir: &Path, k: &ColumnsKey, columns: &[&[f64]]) -> Result<PathBuf> {
    let bytes = encode(k, columns)?;
    write_bytes(dir, &columns_file_name(k.part, k.fingerprint), k.fingerprint, &bytes)
}

/// Column files being written on threads of their own, by path: a read of
/// the same file waits for its write (`load_columns`), `finish_writes` for
/// every one.
static WRITING: Mutex<Vec<(PathBuf, JoinHandle<()>)>> = Mutex::new(Vec::new());

fn writing() -> std::sync::MutexGuard<'static, Vec<(PathBuf, JoinHandle<()>)>> {
    WRITING.lock().unwrap_or_else(|e| e.into_inner())
}

/// `store_columns` with the file written on a thread of its own: the
/// columns are encoded here, the league is ready while the bytes go to
/// disk (on the bench league, writing the scores and the throw values took
/// 0.9 s of a first start). `what` names them in the log.
pub fn store_columns_behind(dir: &Path, k: &ColumnsKey, columns: &[&[f64]], what: &'static str) {
    let bytes = match encode(k, columns) {
        Ok(b) => b,
        Err(e) => return tracing::warn!("could not cache the {what}: {e:#}"),
    };
    let (dir, name, fingerprint) = (dir.to_path_buf(), columns_file_name(k.part, k.fingerprint), k.fingerprint.to_string());
    let path = dir.join(&name);
    let write = move || match write_bytes(&dir, &name, &fingerprint, &bytes) {
        Ok(p) => tracing::info!("{what} cached in {}", p.display()),
        Err(e) => tracing::warn!("could not cache the {what}: {e:#}"),
    };
    let mut w = writing();
    // A server writes again after each reload: forget the writes done.
    w.retain(|(_, h)| !h.is_finished());
    match std::thread::Builder::new().name("cache-write".into()).spawn(write) {
        Ok(h) => w.push((path, h)),
        Err(e) => tracing::warn!("could not cache the {what}: {e}"),
    }
}

/// Wait for the writes of `path` under way (`None`: every write).
fn wait_for(path: Option<&Path>) {
    let mine: Vec<JoinHandle<()>> = {
        let mut w = writing();
        let (mine, rest): (Vec<_>, Vec<_>) = w.drain(..).partition(|(p, _)| path.is_none_or(|q| p == q));
        *w = rest;
        mine.into_iter().map(|(_, h)| h).collect()
    };
    for h in mine {
        let _ = h.join();
    }
}

/// Wait until every column file written behind is on disk (before the
/// process ends).
pub fn finish_writes() {
    wait_for(None);
}

/// A columns file's bytes: magic, header, the columns, their checksum.
fn encode(k: &ColumnsKey, columns: &[&[f64]]) -> Result<Vec<u8>> {
    let rows = columns.first().map_or(0, |c| c.len());
    assert!(columns.len() == k.names.len() && columns.iter().all(|c| c.len() == rows), "one column per name, all of one length");
    let header = serde_json::to_vec(&k.header(rows)).map_err(ModelError::Serialize)?;
    let mut out = Vec::with_capacity(MAGIC.len() + 4 + header.len() + 8 * rows * columns.len() + 8);
    out.extend_from_slice(MAGIC);
    out.extend_from_slice(&(header.len() as u32).to_le_bytes());
    out.extend_from_slice(&header);
    let mut sum = 0u64;
    for c in columns {
        sum = checksum(c.iter().map(|x| x.to_bits()), sum);
        for x in c.iter() {
            out.extend_from_slice(&x.to_le_bytes());
        }
    }
    out.extend_from_slice(&sum.to_le_bytes());
    Ok(out)
}

/// The fingerprint in a columns file's header, if it has a readable one.
pub(super) fn header_fingerprint(path: &Path) -> Option<String> {
    let mut f = std::fs::File::open(path).ok()?;
    let mut head = [0u8; 12];
    f.read_exact(&mut head).ok()?;
    if &head[..8] != MAGIC {
        return None;
    }
    let len = u32::from_le_bytes([head[8], head[9], head[10], head[11]]) as usize;
    if len > 1 << 20 {
        return None;
    }
    let mut text = vec![0u8; len];
    f.read_exact(&mut text).ok()?;
    serde_json::from_slice::<Header>(&text).ok().map(|h| h.fingerprint)
}

/// Why a columns file was not used (logged by the caller; never fatal).
#[derive(Debug, thiserror::Error)]
pub enum Miss {
    #[error("no file")]
    Missing,
    #[error("{0}")]
    Io(#[from] std::io::Error),
    #[error("not a columns file")]
    Magic,
    #[error("unreadable header: {0}")]
    Header(String),
    #[error("written for {0}")]
    Other(&'static str),
    #[error("the file is shorter or longer than its header says")]
    Length,
    #[error("the checksum does not match (damaged file)")]
    Checksum,
}

/// Read part `k.part`'s columns for `rows` snaps from `dir`: every column,
/// or why not.
pub fn load_columns(dir: &Path, k: &ColumnsKey, rows: usize) -> std::result::Result<Vec<Vec<f64>>, Miss> {
    let path = dir.join(columns_file_name(k.part, k.fingerprint));
    wait_for(Some(&path));
    let mut f = match std::fs::File::open(&path) {
        Ok(f) => f,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Err(Miss::Missing),
        Err(e) => return Err(Miss::Io(e)),
    };
    let size = f.metadata()?.len();
    let mut head = [0u8; 12];
    f.read_exact(&mut head).map_err(|_| Miss::Length)?;
    if &head[..8] != MAGIC {
        return Err(Miss::Magic);
    }
    let header_len = u32::from_le_bytes([head[8], head[9], head[10], head[11]]) as u64;
    if header_len > 1 << 20 || 12 + header_len > size {
        return Err(Miss::Length);
    }
    let mut text = vec![0u8; header_len as usize];
    f.read_exact(&mut text)?;
    let header: Header = serde_json::from_slice(&text).map_err(|e| Miss::Header(e.to_string()))?;
    let want = k.header(rows);
    if header.fingerprint != want.fingerprint || header.part != want.part {
        return Err(Miss::Other("another file"));
    }
    if header.model_version != want.model_version {
        return Err(Miss::Other("another model version"));
    }
    if header.models != want.models {
        return Err(Miss::Other("other coefficients"));
    }
    if header.rows != want.rows || header.columns != want.columns {
        return Err(Miss::Other("another shape"));
    }
    let body = 8 * rows as u64 * want.columns.len() as u64;
    if 12 + header_len + body + 8 != size {
        return Err(Miss::Length);
    }
    // Each column is read straight into its vector, a piece at a time.
    let mut buf = vec![0u8; 8 * 65_536];
    let mut sum = 0u64;
    let mut out = Vec::with_capacity(want.columns.len());
    for _ in &want.columns {
        let mut col: Vec<f64> = Vec::with_capacity(rows);
        while col.len() < rows {
            let take = (rows - col.len()).min(65_536);
            let bytes = &mut buf[..8 * take];
            f.read_exact(bytes)?;
            col.extend(bytes.chunks_exact(8).map(|b| f64::from_le_bytes([b[0], b[1], b[2], b[3], b[4], b[5], b[6], b[7]])));
        }
        sum = checksum(col.iter().map(|x| x.to_bits()), sum);
        out.push(col);
    }
    let mut tail = [0u8; 8];
    f.read_exact(&mut tail)?;
    if u64::from_le_bytes(tail) != sum {
        return Err(Miss::Checksum);
    }
    super::touch(&path);
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn dir(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("lategame-columns-{tag}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        d
    }

    const NAMES: [&str; 2] = ["a", "b"];

    fn key<'a>(fp: &'a str, models: &'a str) -> ColumnsKey<'a> {
        ColumnsKey { part: "scores", fingerprint: fp, models, names: &NAMES }
    }

    #[test]
    fn columns_read_back_bit_for_bit_and_every_mismatch_is_a_miss() {
        let d = dir("round");
        // Values that text would bend: NaN, -0.0, subnormals, the extremes.
        let a: Vec<f64> = (0..200_000).map(|i| (i as f64 * 0.37).sin() / 3.0).collect();
        let mut b: Vec<f64> = vec![f64::NAN, -0.0, f64::MIN_POSITIVE / 3.0, f64::MAX, f64::NEG_INFINITY];
        b.resize(a.len(), 0.1 + 0.2);
        let path = store_columns(&d, &key("fp", "m1"), &[&a, &b]).expect("store");
        let back = load_columns(&d, &key("fp", "m1"), a.len()).expect("load");
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        assert_eq!(bits(&back[0]), bits(&a));
        assert_eq!(bits(&back[1]), bits(&b));
        // Another file, other coefficients, another length: misses.
        assert!(matches!(load_columns(&d, &key("other", "m1"), a.len()), Err(Miss::Missing)));
        assert!(matches!(load_columns(&d, &key("fp", "m2"), a.len()), Err(Miss::Other(_))));
        assert!(matches!(load_columns(&d, &key("fp", "m1"), a.len() - 1), Err(Miss::Other(_))));
        let bytes = std::fs::read(&path).expect("read");
        // One bit flipped in the middle of a column: the checksum says so.
        let mut flipped = bytes.clone();
        let mid = flipped.len() / 2;
        flipped[mid] ^= 0x10;
        std::fs::write(&path, &flipped).expect("write");
        assert!(matches!(load_columns(&d, &key("fp", "m1"), a.len()), Err(Miss::Checksum)));
        // Cut short anywhere (in the header, in a column, before the
        // checksum), empty, or not ours at all: a miss, never a panic.
        for cut in [0, 5, 11, 30, bytes.len() / 3, bytes.len() - 8, bytes.len() - 1] {
            std::fs::write(&path, &bytes[..cut]).expect("write");
            assert!(load_columns(&d, &key("fp", "m1"), a.len()).is_err(), "cut at {cut}");
        }
        std::fs::write(&path, b"LGCOLS01\xff\xff\xff\xff{").expect("write");
        assert!(load_columns(&d, &key("fp", "m1"), a.len()).is_err());
        std::fs::write(&path, b"{\"not\": \"columns\"}").expect("write");
        assert!(matches!(load_columns(&d, &key("fp", "m1"), a.len()), Err(Miss::Magic)));
        let _ = std::fs::remove_dir_all(&d);
    }

    #[test]
    fn the_digest_follows_the_coefficients() {
        let x = digest(&vec![1.0f64, 2.0]).expect("digest");
        assert_eq!(x, digest(&vec![1.0f64, 2.0]).expect("digest"));
        assert_ne!(x, digest(&vec![1.0f64, 2.0 + f64::EPSILON * 2.0]).expect("digest"));
        assert_eq!(x.len(), 32);
    }
}

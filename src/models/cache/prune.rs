//! Keeping the cache folder bounded. After an entry is written: the same
//! play file's entries under other keys (another model version) go, temp
//! files left by a writer more than an hour ago go, and while our files
//! pass `MAX_BYTES` the least recently used go (modification time; a read
//! touches it). Only regular files whose names we write are looked at:
//! never a symlink, a folder, or another program's file.

use std::path::Path;
use std::time::{Duration, SystemTime};

#[cfg(test)]
use super::touch;

/// The most the cache folder's entries may hold.
pub const MAX_BYTES: u64 = 1 << 30;

/// Temp files older than this are left over from a writer that stopped.
pub const STALE_TEMP: Duration = Duration::from_secs(3600);

/// The parts we write (`models`, then the parts and columns beside it).
const PARTS: [&str; 4] = ["models", "throw", "scores", "throw-scores"];

/// What a name in the cache folder is to us.
#[derive(Debug, PartialEq)]
pub(super) enum Name<'a> {
    /// An entry: its key (hex digest) and whether it is a columns file.
    Entry { key: &'a str, columns: bool },
    /// A writer's temp file (`<entry>.tmp<pid>`).
    Temp,
}

/// Our file names: `<part>-<24 hex>.json|.bin`, and those with `.tmp<digits>`.
pub(super) fn parse(name: &str) -> Option<Name<'_>> {
    if let Some((entry, pid)) = name.rsplit_once(".tmp") {
        let ours = !pid.is_empty() && pid.bytes().all(|b| b.is_ascii_digit()) && matches!(parse(entry), Some(Name::Entry { .. }));
        return ours.then_some(Name::Temp);
    }
    let (stem, columns) = if let Some(s) = name.strip_suffix(".json") {
        (s, false)
    } else {
        (name.strip_suffix(".bin")?, true)
    };
    let (part, key) = stem.rsplit_once('-')?;
    let ours = PARTS.contains(&part) && key.len() == 24 && key.bytes().all(|b| b.is_ascii_hexdigit() && !b.is_ascii_uppercase());
    ours.then_some(Name::Entry { key, columns })
}

/// After writing an entry with key `keep` for `fingerprint` into `dir`:
/// prune with the limit `MAX_BYTES`. Problems are logged, never fatal.
pub fn after_write(dir: &Path, keep: &str, fingerprint: &str) {
    prune(dir, keep, fingerprint, MAX_BYTES, SystemTime::now());
}

/// What `prune` removed.
#[derive(Debug, Default, PartialEq)]
pub struct Pruned {
    pub other_keys: usize,
    pub temps: usize,
    pub least_used: usize,
}

/// Remove from `dir`: entries of `fingerprint` under keys other than `keep`,
/// temp files older than `STALE_TEMP` at `now`, then the least recently
/// used entries (never `keep`'s) while the entries hold more than `limit`
/// bytes.
pub fn prune(dir: &Path, keep: &str, fingerprint: &str, limit: u64, now: SystemTime) -> Pruned {
    let mut out = Pruned::default();
    let Ok(list) = std::fs::read_dir(dir) else { return out };
    let mut kept: Vec<(SystemTime, u64, std::path::PathBuf)> = Vec::new();
    let mut total = 0u64;
    for e in list.flatten() {
        let name = e.file_name();
        let Some(name) = name.to_str() else { continue };
        let Some(kind) = parse(name) else { continue };
        // `DirEntry::metadata` does not follow symlinks.
        let Ok(meta) = e.metadata() else { continue };
        if !meta.file_type().is_file() {
            continue;
        }
        let path = e.path();
        let mtime = meta.modified().unwrap_or(now);
        match kind {
            Name::Temp => {
                if now.duration_since(mtime).is_ok_and(|age| age > STALE_TEMP) && remove(&path) {
                    out.temps += 1;
                }
            }
            Name::Entry { key, columns } => {
                if key != keep && fingerprint_of(&path, columns).as_deref() == Some(fingerprint) {
                    if remove(&path) {
                        out.other_keys += 1;
                    }
                    continue;
                }
                total += meta.len();
                if key != keep {
                    kept.push((mtime, meta.len(), path));
                }
            }
        }
    }
    kept.sort_by(|a, b| a.0.cmp(&b.0).then_with(|| a.2.cmp(&b.2)));
    for (_, len, path) in kept {
        if total <= limit {
            break;
        }
        if remove(&path) {
            total -= len;
            out.least_used += 1;
        }
    }
    out
}

fn remove(path: &Path) -> bool {
    match std::fs::remove_file(path) {
        Ok(()) => true,
        // Another process pruned it first.
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => false,
        Err(e) => {
            tracing::warn!("could not remove {} from the model cache: {e}", path.display());
            false
        }
    }
}

/// The play-file fingerprint an entry was written for, if readable.
fn fingerprint_of(path: &Path, columns: bool) -> Option<String> {
    if columns {
        return super::columns::header_fingerprint(path);
    }
    #[derive(serde::Deserialize)]
    struct Keyed {
        fingerprint: String,
    }
    let text = std::fs::read(path).ok()?;
    serde_json::from_slice::<Keyed>(&text).ok().map(|k| k.fingerprint)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::models::cache::{key, part_file_name};

    #[test]
    fn only_our_names_are_ours() {
        let k = "0123456789abcdef01234567";
        assert_eq!(parse(&format!("models-{k}.json")), Some(Name::Entry { key: k, columns: false }));
        assert_eq!(parse(&format!("throw-scores-{k}.bin")), Some(Name::Entry { key: k, columns: true }));
        assert_eq!(parse(&format!("scores-{k}.bin.tmp4711")), Some(Name::Temp));
        for other in [format!("notes-{k}.json"), format!("models-{k}.txt"), "models-0123.json".into(), format!("models-{}.json", k.to_uppercase()), format!("models-{k}.json.tmp"), format!("models-{k}.json.tmpx1"), "league.parquet".into()] {
            assert_eq!(parse(&other), None, "{other}");
        }
    }

    fn write(dir: &Path, name: &str, body: &str, age: Duration) {
        let path = dir.join(name);
        std::fs::write(&path, body).expect("write");
        let f = std::fs::OpenOptions::new().append(true).open(&path).expect("open");
        f.set_modified(SystemTime::now() - age).expect("mtime");
    }

    #[test]
    fn other_keys_stale_temps_and_the_least_used_go() {
        let dir = std::env::temp_dir().join(format!("lategame-prune-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).expect("dir");
        let hour = Duration::from_secs(3600);
        let entry = |fp: &str| format!("{{\"fingerprint\":\"{fp}\",\"pad\":\"{}\"}}", "x".repeat(1000));
        let (keep, old_version) = (key("file-a"), "aaaaaaaaaaaaaaaaaaaaaaaa");
        // The same file under another key (removed, columns too) and this
        // key (kept). The columns are written first: a write prunes.
        let cols = crate::models::cache::ColumnsKey { part: "scores", fingerprint: "file-a", models: "m", names: &["x"] };
        crate::models::cache::store_columns(&dir, &cols, &[&[1.0, 2.0]]).expect("columns");
        let old_cols = dir.join(format!("scores-{old_version}.bin"));
        std::fs::rename(dir.join(crate::models::cache::columns_file_name("scores", "file-a")), &old_cols).expect("rename");
        write(&dir, &part_file_name("models", "file-a"), &entry("file-a"), hour * 5);
        write(&dir, &format!("models-{old_version}.json"), &entry("file-a"), Duration::ZERO);
        // Other files' entries, oldest first by modification time.
        for (i, fp) in ["file-b", "file-c", "file-d"].iter().enumerate() {
            write(&dir, &part_file_name("models", fp), &entry(fp), hour * (3 - i as u32));
        }
        // Temp files: one stale, one being written now.
        write(&dir, &format!("models-{keep}.json.tmp12"), "half", hour * 2);
        write(&dir, &format!("throw-{keep}.json.tmp13"), "half", Duration::from_secs(60));
        // Not ours: left alone whatever their age and size.
        write(&dir, "notes.json", &entry("file-a"), hour * 9);
        write(&dir, &format!("models-{}.json.bak", key("file-b")), &entry("file-b"), hour * 9);
        #[cfg(unix)]
        {
            let target = dir.join("elsewhere.json");
            write(&dir, "elsewhere.json", &entry("file-a"), hour * 9);
            std::os::unix::fs::symlink(&target, dir.join(format!("models-{}.json", "bbbbbbbbbbbbbbbbbbbbbbbb"))).expect("symlink");
        }
        // A limit that holds this file's entry and two others: the oldest other goes.
        let size = |n: &str| std::fs::metadata(dir.join(n)).expect("size").len();
        let limit = size(&part_file_name("models", "file-a")) + 2 * size(&part_file_name("models", "file-b"));
        let got = prune(&dir, &keep, "file-a", limit, SystemTime::now());
        assert_eq!(got, Pruned { other_keys: 2, temps: 1, least_used: 1 });
        let mut left: Vec<String> = std::fs::read_dir(&dir).expect("list").flatten().map(|e| e.file_name().to_string_lossy().into_owned()).collect();
        left.sort();
        let mut want = vec![
            part_file_name("models", "file-a"),
            part_file_name("models", "file-c"),
            part_file_name("models", "file-d"),
            format!("throw-{keep}.json.tmp13"),
            "notes.json".to_string(),
            format!("models-{}.json.bak", key("file-b")),
        ];
        #[cfg(unix)]
        want.extend(["elsewhere.json".to_string(), "models-bbbbbbbbbbbbbbbbbbbbbbbb.json".to_string()]);
        want.sort();
        assert_eq!(left, want);
        // A read marks an entry used: then the other one is the oldest.
        touch(&dir.join(part_file_name("models", "file-c")));
        let got = prune(&dir, &keep, "file-a", limit - size(&part_file_name("models", "file-c")), SystemTime::now());
        assert_eq!(got.least_used, 1);
        assert!(dir.join(part_file_name("models", "file-c")).exists() && !dir.join(part_file_name("models", "file-d")).exists());
        // The entry being written is never removed, even alone over the limit.
        let got = prune(&dir, &keep, "file-a", 10, SystemTime::now());
        assert_eq!(got.least_used, 1);
        assert!(dir.join(part_file_name("models", "file-a")).exists());
        let _ = std::fs::remove_dir_all(&dir);
    }
}

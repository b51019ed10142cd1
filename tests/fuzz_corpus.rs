//! Fuzz regression tests: every input kept under fuzz/corpus (what the fuzzer
//! found interesting) and fuzz/regressions (inputs that once broke a check)
//! replayed through the same checks the fuzz targets run
//! (`lategame::fuzz_props`), so CI catches a return of any old finding
//! without the instrumented build.

use std::path::{Path, PathBuf};

fn inputs(target: &str) -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("fuzz");
    let mut out = Vec::new();
    for dir in ["corpus", "regressions"] {
        let Ok(entries) = std::fs::read_dir(root.join(dir).join(target)) else { continue };
        for e in entries.flatten() {
            let p = e.path();
            if p.is_file() && p.file_name().is_some_and(|n| n != ".keep") {
                out.push(p);
            }
        }
    }
    out.sort();
    out
}

fn replay(target: &str, check: fn(&[u8]), at_least: usize) {
    let files = inputs(target);
    assert!(files.len() >= at_least, "{target}: expected at least {at_least} kept inputs, found {}", files.len());
    let mut failed = Vec::new();
    for f in &files {
        let bytes = std::fs::read(f).unwrap();
        if std::panic::catch_unwind(|| check(&bytes)).is_err() {
            failed.push(f.display().to_string());
        }
    }
    assert!(failed.is_empty(), "{target}: {} of {} inputs fail:\n{}", failed.len(), files.len(), failed.join("\n"));
}

#[test]
fn loader_corpus_replays_clean() {
    replay("loader_csv", lategame::fuzz_props::loader_csv, 5);
}

#[test]
fn situation_corpus_replays_clean() {
    replay("situation_query", lategame::fuzz_props::situation_query, 10);
}

/// The seed with a bad cell exercises the refusal branch of the property:
/// strict mode really refuses it, with the cell-level message.
#[test]
fn loader_check_sees_a_strict_refusal() {
    let bad = std::fs::read(Path::new(env!("CARGO_MANIFEST_DIR")).join("fuzz/corpus/loader_csv/bad_down_lenient")).unwrap();
    let text = std::str::from_utf8(&bad[1..]).unwrap();
    let name = "bad.csv";
    let table = lategame::playfile::read_table(name, Path::new(name), text.as_bytes()).unwrap();
    let strict = lategame::playfile::load_with(vec![table], &Default::default(), Default::default());
    let err = strict.err().expect("strict mode refuses a bad down");
    assert!(err.to_string().contains("column down is 6"), "{err}");
}

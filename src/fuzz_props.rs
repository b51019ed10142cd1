//! What the fuzz targets (fuzz/fuzz_targets) assert about arbitrary input,
//! kept in the library so the corpus regression test (tests/fuzz_corpus.rs)
//! replays exactly the same checks in every `cargo test` run.
//!
//! Each function panics when a property fails; a panic anywhere below it
//! (a reader, the validator, the parser) is a finding too.

use crate::playfile::{load_with, read_table, LoadOptions, LoadReport};
use crate::situation::Situation;
use crate::web::query::{to_query_string, Params};
use std::path::Path;

/// The play-file loader on arbitrary CSV bytes. The first byte picks strict
/// (even) or lenient (odd) validation; the rest is the file.
///
/// Properties: no panic; a refusal always carries at least one issue and a
/// non-empty summary; an accepted file keeps no more rows than it read,
/// every kept snap has a game, and strict mode accepts only files without
/// issues.
pub fn loader_csv(data: &[u8]) {
    let Some((&mode, bytes)) = data.split_first() else { return };
    let opts = LoadOptions { lenient: mode % 2 == 1 };
    let name = "fuzz.csv";
    let table = match read_table(name, Path::new(name), bytes) {
        Ok(t) => t,
        Err(issues) => {
            assert!(!issues.is_empty(), "a refused file must say why");
            for i in &issues {
                assert!(!i.to_string().is_empty());
            }
            return;
        }
    };
    match load_with(vec![table], &opts, LoadReport::default()) {
        Ok(loaded) => {
            let r = &loaded.report;
            assert!(r.rows_kept <= r.rows_read, "kept {} of {} rows", r.rows_kept, r.rows_read);
            assert_eq!(loaded.plays.len(), r.rows_kept, "plays and the report disagree");
            if !opts.lenient {
                assert!(!r.has_errors(), "strict mode accepted a file with issues:\n{}", r.summary(false));
            }
            assert!(r.games <= r.rows_kept.max(1));
            let _ = r.summary(opts.lenient);
        }
        Err(e) => {
            assert!(e.report.issue_count > 0 || e.report.rows_kept == 0, "refused without an issue");
            assert!(!e.to_string().is_empty());
        }
    }
}

/// The page/API query parser on an arbitrary query string.
///
/// Properties: no panic; a refusal (a bad value or an unknown key) names its
/// parameter and gives a reason;
/// an accepted situation survives the round trip through its own query
/// pairs and through the percent-encoded link the pages build from them,
/// and can be put in words.
pub fn situation_query(data: &[u8]) {
    let Ok(query) = std::str::from_utf8(data) else { return };
    match Params::parse(Some(query)) {
        Ok(p) => {
            let s = &p.situation;
            let pairs = s.to_query();
            let again = Situation::from_query(&pairs).unwrap_or_else(|e| panic!("own pairs {pairs:?} refused: {e:?}"));
            assert_eq!(&again, s, "round trip through {pairs:?}");
            let link = to_query_string(&pairs);
            let from_link = Params::parse(Some(link.trim_start_matches('?')))
                .unwrap_or_else(|e| panic!("own link {link} refused: {e:?}"));
            assert_eq!(&from_link.situation, s, "round trip through the link {link}");
            assert!(!s.describe().is_empty());
        }
        Err(e) => {
            assert!(!e.param.is_empty(), "a refusal must name its parameter");
            assert!(!e.reason.is_empty(), "a refusal must give a reason");
        }
    }
}

//! Opening a league: load and validate the play file, fit (or restore from
//! the cache) the models, score every snap. The result is what the split
//! engine, pages, API and report read.

use crate::models::{self, Scored};
use crate::playfile::{self, LoadOptions, LoadReport};
use crate::splits::SnapValues;
use anyhow::Result;
use std::path::{Path, PathBuf};

/// A scored league and how it was loaded.
pub struct League {
    pub source: PathBuf,
    pub report: LoadReport,
    pub scored: Scored,
}

impl League {
    pub fn open(path: &Path, opts: &LoadOptions, refit: bool) -> Result<League> {
        let loaded = playfile::load(path, opts)?;
        tracing::info!(
            snaps = loaded.plays.len(),
            games = loaded.plays.games.len(),
            skipped = loaded.report.rows_skipped,
            "loaded {}",
            path.display()
        );
        let scored = models::fit_and_score(loaded.plays, &loaded.fingerprint, refit)?;
        Ok(League { source: path.to_path_buf(), report: loaded.report, scored })
    }

    pub fn values(&self) -> SnapValues<'_> {
        let s = &self.scored.scores;
        SnapValues { epa: &s.epa, wp: &s.wp, wpa: &s.wpa, cp: &s.cp }
    }

    pub fn plays(&self) -> &crate::plays::Plays {
        &self.scored.plays
    }
}

/// The bundled demo league (used when no file is given).
pub fn demo_path() -> PathBuf {
    let here = PathBuf::from("demo-data/league.parquet");
    if here.exists() {
        return here;
    }
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("demo-data/league.parquet")
}

//! The throw-value model of a whole league from the coefficient cache when
//! it holds one for this file and model version, else fitted on every snap
//! and stored there (`cache::store_part`, part `throw`).

use super::{fit, ThrowModel};
use crate::models::cache;
use crate::models::error::ModelError;
use crate::plays::Plays;
use std::path::Path;

/// The cache part the throw-value coefficients are kept under.
pub const PART: &str = "throw";

/// A league's throw-value model and where it came from.
#[derive(Debug, Clone)]
pub struct Restored {
    /// `None` when the file has no passes with air yards.
    pub model: Option<ThrowModel>,
    pub from_cache: bool,
    /// Wall time of the fit or of the read.
    pub seconds: f64,
}

/// The model from `dir` (unless `refit`), else fitted on every snap and
/// stored in `dir`. A cache that cannot be read or written is logged and
/// otherwise ignored.
pub fn fit_cached(p: &Plays, fingerprint: &str, dir: Option<&Path>, refit: bool) -> Result<Restored, ModelError> {
    let started = std::time::Instant::now();
    if let (Some(d), false) = (dir, refit) {
        match cache::load_part::<ThrowModel>(d, PART, fingerprint) {
            Ok(Some(model)) => return Ok(Restored { model: Some(model), from_cache: true, seconds: started.elapsed().as_secs_f64() }),
            Ok(None) => {}
            Err(e) => tracing::warn!("ignoring the cached throw-value model: {e:#}"),
        }
    }
    let rows: Vec<u32> = (0..p.len() as u32).collect();
    let model = fit(p, &rows, &Default::default())?;
    if let (Some(d), Some(m)) = (dir, &model) {
        match cache::store_part(d, PART, fingerprint, m) {
            Ok(path) => tracing::info!("throw-value model cached in {}", path.display()),
            Err(e) => tracing::warn!("could not cache the throw-value model: {e:#}"),
        }
    }
    Ok(Restored { model, from_cache: false, seconds: started.elapsed().as_secs_f64() })
}

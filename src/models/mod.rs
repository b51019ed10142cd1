//! Models fitted from the league itself: expected points, win probability,
//! completion probability, their calibration, the on-disk coefficient cache,
//! and the scored frame (every snap with EP, EPA, WP, WPA, completion prob).

pub mod cache;
pub mod calib;
pub mod clock;
pub mod cp;
pub mod ep;
pub mod error;
pub mod finish;
pub mod fit;
pub mod logit;
pub mod pending;
pub mod score;
pub mod scored;
pub mod strata;
pub mod throw;
#[cfg(test)]
pub(crate) mod testkit;
pub mod wp;

pub use calib::{calibrate_with, CalibOptions, Calibration, Plan};
pub use error::ModelError;
pub use fit::{fit, fit_rows, fit_rows_from, FitReport, Models, Scores};
pub use logit::FitStats as ModelReport;
pub use pending::{CalibStatus, CalibrationCell};
pub use scored::{calibrate, fit_and_score, fit_and_score_beside, fit_and_score_in, scored_frame, Scored};

/// Bumped whenever features, labels or conventions change; part of the cache key.
pub const MODEL_VERSION: &str = "lategame-models-25";

//! Scoring rules for probability forecasts (Brier score, log loss), shared
//! by the held-out calibration and the late-game strata.

use super::wp::P_EPS;
use serde::{Deserialize, Serialize};

/// Brier score and log loss of one set of win probabilities.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct ProbScore {
    pub n: usize,
    pub brier: f64,
    pub log_loss: f64,
}

pub fn prob_score(pred: &[f64], actual: &[f64]) -> ProbScore {
    let n = pred.len();
    let (mut b, mut l) = (0.0, 0.0);
    for (&p, &y) in pred.iter().zip(actual) {
        b += (p - y) * (p - y);
        let pc = p.clamp(P_EPS, 1.0 - P_EPS);
        l -= y * pc.ln() + (1.0 - y) * (1.0 - pc).ln();
    }
    let d = n.max(1) as f64;
    ProbScore {
        n,
        brier: b / d,
        log_loss: l / d,
    }
}


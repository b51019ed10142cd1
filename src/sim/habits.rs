//! Passer habits the demo league does not have but a test league can switch
//! on: throwing short when trailing late (a shift of the depth tilt). Off by
//! default, so the bundled league stays byte for byte the same.

use serde::Serialize;

/// Some passers throw shorter when trailing in the final 7:30 of the 4th
/// quarter or in overtime.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct ThrowShort {
    /// Every `every`-th passer of the league's pool (by the order the league
    /// drew them, from the first) has the habit; 0: nobody.
    pub every: usize,
    /// Shift of his depth tilt there (negative: shorter; the tilt multiplies
    /// the band index, so −1 makes each deeper band about e times rarer).
    pub tilt: f64,
}

impl ThrowShort {
    /// The tilt shift of passer `id` (0 without the habit).
    pub fn shift(&self, id: usize) -> f64 {
        if self.every > 0 && id % self.every == 0 {
            self.tilt
        } else {
            0.0
        }
    }
}

/// When the habit applies: trailing in the final 7:30 of the 4th or in overtime.
pub(crate) fn trailing_late(period: i32, clock: i32, margin: i32) -> bool {
    margin < 0 && (period >= 5 || (period == 4 && clock <= 450))
}

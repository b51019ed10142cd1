//! True late-game shifts for the simulator: per passer, on the logit scale,
//! in his sack, interception and completion chances late and close.

use super::draw;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use serde::Serialize;

/// True late-game shifts: each passer gets his own shift, on the logit scale,
/// in his sack, interception and completion chances on late-and-close
/// dropbacks (see `truth`), drawn N(0, sd²) once per passer from a stream of
/// its own (so the rest of the league plays out as without them). Off (all 0)
/// in `simulate` and the bundled demo league.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct LateShifts {
    pub sack_sd: f64,
    pub interception_sd: f64,
    pub complete_sd: f64,
}

/// One passer's late-and-close shifts (logit scale).
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct LateShift {
    pub sack: f64,
    pub interception: f64,
    pub complete: f64,
}

impl LateShifts {
    /// Passer `pid`'s shifts for a league drawn with `seed`.
    pub(crate) fn of(&self, seed: u64, pid: usize) -> LateShift {
        if *self == LateShifts::default() {
            return LateShift::default();
        }
        let mut rng = ChaCha8Rng::seed_from_u64(seed ^ 0x1A7E_5C1F_7000_0000);
        rng.set_stream(pid as u64 + 1);
        LateShift {
            sack: self.sack_sd * draw::normal(&mut rng),
            interception: self.interception_sd * draw::normal(&mut rng),
            complete: self.complete_sd * draw::normal(&mut rng),
        }
    }
}

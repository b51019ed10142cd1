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

/// `--late-shifts` could not be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("late shifts '{given}': expected one SD for all three (0.5) or three SDs SACK,INTERCEPTION,COMPLETION (0.5,0.4,0.3), each a number from 0 to 3")]
pub struct LateShiftsError {
    pub given: String,
}

impl std::str::FromStr for LateShifts {
    type Err = LateShiftsError;

    /// One SD for all three shifts (`0.5`), or three: sack, interception,
    /// completion (`0.5,0.4,0.3`); each in 0..=3 (logit scale).
    fn from_str(s: &str) -> Result<LateShifts, LateShiftsError> {
        let bad = || LateShiftsError { given: s.to_string() };
        let sds: Vec<f64> = s.split(',').map(|x| x.trim().parse::<f64>().map_err(|_| bad())).collect::<Result<_, _>>()?;
        if sds.iter().any(|x| !(0.0..=3.0).contains(x)) {
            return Err(bad());
        }
        match sds.as_slice() {
            [sd] => Ok(LateShifts { sack_sd: *sd, interception_sd: *sd, complete_sd: *sd }),
            [sack, int, comp] => Ok(LateShifts { sack_sd: *sack, interception_sd: *int, complete_sd: *comp }),
            _ => Err(bad()),
        }
    }
}

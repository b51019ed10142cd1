//! The simulator's tuning: field spots, the home boost and game-day form,
//! the dropback model's levels, penalty, fumble, run and kicking levels and
//! the backed-up rules. See DEVELOPERS.md "The demo league's calibration".

use crate::sim::league::TeamStrength;

/// Ball spot of a kicked try (snap from the 15) and of a two-point try (from the 2).
pub const KICK_TRY_SPOT: i32 = 85;
pub const TWO_POINT_SPOT: i32 = 98;
/// Kickoff spot, touchback spots, free-kick spot after a safety.
pub(super) const KICKOFF_SPOT: i32 = 35;
pub(super) const SAFETY_KICK_SPOT: i32 = 20;
pub(super) const KICKOFF_TOUCHBACK: i32 = 25;
pub(super) const PUNT_TOUCHBACK: i32 = 20;

/// How much a club's `home_edge` of 1.0 lifts each home strength.
pub(super) const HOME_BOOST: TeamStrength = TeamStrength {
    run_off: 0.13,
    run_def: 0.13,
    pass_off: 0.036,
    pass_def: 0.036,
    protection: 0.043,
    pass_rush: 0.043,
    kicking: 0.0,
    pass_lean: 0.0,
};

/// Spread of a club's game-day form (one draw for its offense, one for its
/// defense), in the units of the run and pass strengths.
pub(super) const FORM_RUN: f64 = 0.432;
pub(super) const FORM_PASS: f64 = 0.132;

// ---- dropback model ----
/// Depth bands of a throw: behind the line, 1-5, 6-10, 11-15, 16-25, 26+.
pub(super) const BANDS: usize = 6;
pub(super) const BAND_MIN: [i32; BANDS] = [-4, 1, 6, 11, 16, 26];
pub(super) const BAND_MAX: [i32; BANDS] = [0, 5, 10, 15, 25, 55];
pub(super) const BAND_SHARE: [f64; BANDS] = [0.17, 0.28, 0.22, 0.14, 0.11, 0.08];
pub(super) const COMP_LOGIT: [f64; BANDS] = [1.58, 1.13, 0.45, 0.05, -0.47, -1.02];
pub(super) const INT_LOGIT: [f64; BANDS] = [-5.15, -4.55, -3.85, -3.4, -3.0, -2.65];
pub(super) const YAC_MEAN: [f64; BANDS] = [5.13, 3.61, 2.95, 2.85, 3.23, 4.75];
pub(super) const SACK_LOGIT: f64 = -2.75;
pub(super) const SCRAMBLE_LOGIT: f64 = -3.3;
/// League-wide shift of the play-call logit.
pub(super) const PASS_SHIFT: f64 = 0.15;
/// Share of scrimmage snaps that end in an accepted penalty instead of a play.
pub(super) const PENALTY_RATE: f64 = 0.12;
/// Lost fumbles: on a run that is not a touchdown or safety, after a catch.
pub(super) const RUN_FUMBLE_LOST: f64 = 0.014;
pub(super) const CATCH_FUMBLE_LOST: f64 = 0.02;
/// Mean gain of an ordinary run (not a loss, not a breakaway) before strengths.
pub(super) const RUN_BASE: f64 = 3.3;
/// Field-goal make logit at 20 yards before the kicker's strength.
pub(super) const FG_BASE_LOGIT: f64 = 3.7;

// ---- backed up ----
/// At or inside its own 15 the offense is cramped: the defense crowds the
/// line, the passer has no room to drop, the punter stands at the end line.
/// These four constants (with the dropback and penalty levels above) were set
/// by simulating 12-season leagues until first-and-ten EP by strip came
/// within about half a point of Carter & Machol (1971), see tests/models.rs.
pub(super) const BACKED_UP_LINE: i32 = 15;
pub(super) const BACKED_UP_SACK_LOGIT: f64 = 1.2;
pub(super) const BACKED_UP_RUN_LOSS: f64 = 2.5;
pub(super) const BACKED_UP_PUNT_SHORT: f64 = 7.0;

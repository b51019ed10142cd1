//! Where each of our columns sits in a `RawTable` (the order of
//! `COLUMNS`), for the cell checks and the name numbering.

pub(super) const C_GAME: usize = 0;
pub(super) const C_SEASON: usize = 1;
pub(super) const C_WEEK: usize = 2;
pub(super) const C_HOME: usize = 3;
pub(super) const C_AWAY: usize = 4;
pub(super) const C_SEQ: usize = 5;
pub(super) const C_PERIOD: usize = 6;
pub(super) const C_CLOCK: usize = 7;
pub(super) const C_OFFENSE: usize = 8;
pub(super) const C_DEFENSE: usize = 9;
pub(super) const C_OFF_SCORE: usize = 10;
pub(super) const C_DEF_SCORE: usize = 11;
pub(super) const C_OFF_TO: usize = 12;
pub(super) const C_DEF_TO: usize = 13;
pub(super) const C_DOWN: usize = 14;
pub(super) const C_TO_GO: usize = 15;
pub(super) const C_BALL_ON: usize = 16;
pub(super) const C_KIND: usize = 17;
pub(super) const C_PASSER: usize = 18;
pub(super) const C_COMPLETE: usize = 19;
pub(super) const C_INTERCEPTED: usize = 20;
pub(super) const C_AIR: usize = 21;
pub(super) const C_GAIN: usize = 22;
pub(super) const C_FUMBLE: usize = 23;
pub(super) const C_TOUCHBACK: usize = 24;
pub(super) const C_POINTS: usize = 25;
pub(super) const C_LINE: usize = 26;

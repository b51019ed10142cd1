//! The game clock: running and stopped clock, out of bounds, the two-minute
//! warning, timeouts and the play clock between snaps, hurry-up and
//! running out the clock, the end of a period and of overtime.

use super::tuning::*;
use super::*;
use crate::overtime::Rule;

impl Engine<'_, '_> {
    /// Out of bounds stops the clock (last 2:00 of the half, 5:00 of the game, overtime).
    pub(super) fn oob_stops(&self) -> bool {
        (self.period == 2 && self.clock <= 120) || (self.period == 4 && self.clock <= 300) || self.period >= 5
    }

    /// The offense `team` plays against the clock.
    pub(super) fn hurry(&self, team: usize) -> bool {
        let m = self.margin_of(team);
        match self.period {
            2 => self.clock <= 120 && self.ball_on >= 20,
            4 => (m < 0 && self.clock <= 300) || (m < -8 && self.clock <= 540) || (m == 0 && self.clock <= 120 && self.ball_on >= 30),
            p if p >= 5 => m < 0 || self.clock <= 120,
            _ => false,
        }
    }

    /// The defense leads comfortably in the second half and gives up the
    /// short stuff (more completions underneath, more yards on the ground).
    pub(super) fn soft_defense(&self) -> bool {
        self.period >= 3 && self.margin() <= -9
    }

    /// The offense `team` runs the clock down.
    pub(super) fn milk(&self, team: usize) -> bool {
        let m = self.margin_of(team);
        (self.period == 4 && m > 0 && self.clock <= 720) || (self.period >= 3 && m >= 9)
    }

    /// The play took `secs`; the clock then runs on or stops. A play that
    /// crosses 2:00 of the 2nd or 4th period brings the two-minute warning.
    pub(super) fn use_clock(&mut self, secs: i32, keeps_running: bool) {
        let before = self.clock;
        self.clock = (before - secs).max(0);
        self.running = keeps_running;
        if (self.period == 2 || self.period == 4) && before > 120 && self.clock <= 120 {
            self.running = false;
        }
    }

    /// A play that ends in bounds keeps the clock running; out of bounds stops
    /// it late in a half (earlier it restarts on the ready signal).
    pub(super) fn use_clock_oob(&mut self, secs: i32, out_of_bounds: bool) {
        self.use_clock(secs, true);
        if out_of_bounds && self.oob_stops() {
            self.running = false;
        }
    }

    /// Time between plays with the clock running: the play clock, timeouts,
    /// the two-minute warning, hurrying to the line for a spike.
    pub(super) fn between_snaps(&mut self) {
        let (off, def) = (self.poss, self.def());
        let dm = self.margin_of(def);
        let off_stop = self.hurry(off)
            && ((self.period == 2 && self.clock <= 70)
                || (self.period >= 4 && self.clock <= 110)
                || (self.period >= 4 && self.margin() <= -9 && self.clock <= 300));
        let def_stop = (self.period == 4 && (-16..0).contains(&dm) && self.clock <= 240)
            || (self.period >= 5 && dm <= 0 && self.clock <= 180);
        let kneeling = std::mem::take(&mut self.kneeling);
        if off_stop && !kneeling && self.timeouts[off] > 0 {
            let e = int_in(self.rng, 2, 6);
            self.tick(e);
            self.timeouts[off] -= 1;
            self.running = false;
            return;
        }
        if def_stop && self.timeouts[def] > 0 {
            let e = int_in(self.rng, 2, 5);
            self.tick(e);
            self.timeouts[def] -= 1;
            self.running = false;
            return;
        }
        if kneeling {
            self.tick(39);
            return;
        }
        if self.hurry(off) && self.timeouts[off] == 0 && self.down <= 3 && self.clock <= 60 && self.clock > 2 {
            let e = int_in(self.rng, 9, 14).min(self.clock - 2);
            self.tick(e);
            self.spike_next = true;
            return;
        }
        if self.period <= 4 && self.clock > 150 && chance(self.rng, 0.010) {
            let t = usize::from(chance(self.rng, 0.5));
            if self.timeouts[t] > 0 {
                let e = int_in(self.rng, 15, 35);
                self.tick(e);
                if self.running {
                    self.timeouts[t] -= 1;
                    self.running = false;
                }
                return;
            }
        }
        let pace = if self.hurry(off) {
            int_in(self.rng, 10, 18)
        } else if self.milk(off) {
            int_in(self.rng, 36, 39)
        } else {
            (31.0 + 4.0 * normal(self.rng)).round().clamp(18.0, 39.0) as i32
        };
        self.tick(pace);
    }

    /// Run the clock between plays, stopping at the two-minute warning.
    pub(super) fn tick(&mut self, secs: i32) {
        let before = self.clock;
        let mut after = before - secs;
        if (self.period == 2 || self.period == 4) && before > 120 && after <= 120 {
            after = 120;
            self.running = false;
        }
        self.clock = after.max(0);
    }

    pub(super) fn end_period(&mut self, next: Next) -> Next {
        self.running = false;
        self.spike_next = false;
        self.kneeling = false;
        match self.period {
            1 | 3 => {
                self.period += 1;
                self.clock = 900;
                next
            }
            2 => {
                self.period = 3;
                self.clock = 900;
                self.timeouts = [3, 3];
                Next::Kickoff { kicker: self.opening_receiver, spot: KICKOFF_SPOT }
            }
            4 if self.score[0] == self.score[1] => {
                self.period = 5;
                self.clock = self.g.overtime.period_secs;
                self.timeouts = [2, 2];
                let receiver = usize::from(chance(self.rng, 0.5));
                self.ot_first = receiver;
                self.ot_poss = 0;
                self.ot_fg_hold = false;
                self.ot_answered = false;
                Next::Kickoff { kicker: 1 - receiver, spot: KICKOFF_SPOT }
            }
            // Level after an overtime period without ties: another period,
            // play going on from where it stands.
            p if p >= 5 && self.score[0] == self.score[1] && !self.g.overtime.ties => {
                self.period += 1;
                self.clock = self.g.overtime.period_secs;
                self.timeouts = [2, 2];
                next
            }
            _ => Next::Done,
        }
    }

    /// Whether the overtime is decided (`crate::overtime::Rule`).
    /// Touchdown or answer: a touchdown or a defensive score on any
    /// possession ends it; a field goal on the first possession gives the
    /// other side one possession; after that any lead wins. First score
    /// wins: any lead. Both possess: a lead once the second side has had
    /// its possession (scored on it, or lost the ball), or when the second
    /// side leads.
    pub(super) fn ot_over(&self) -> bool {
        let level = self.score[0] == self.score[1];
        match self.g.overtime.rule {
            Rule::TouchdownOrAnswer => !level && !(self.ot_fg_hold && self.ot_poss <= 2),
            Rule::FirstScoreWins => !level,
            Rule::BothPossess => {
                let leader = usize::from(self.score[1] > self.score[0]);
                !level && (self.ot_poss >= 3 || leader != self.ot_first || self.ot_answered)
            }
        }
    }

    /// After an overtime touchdown: the game is over, or (both possess,
    /// not yet decided) the try follows.
    pub(super) fn ot_after_touchdown(&mut self) -> Next {
        if self.g.overtime.rule == Rule::BothPossess && !self.ot_over() {
            Next::Try
        } else {
            Next::Done
        }
    }
}

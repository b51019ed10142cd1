//! Kicks: kickoffs (onside, touchback, returns), tries after a touchdown,
//! field goals and punts.

use super::tuning::*;
use super::*;

impl Engine<'_, '_> {
    pub(super) fn kickoff(&mut self, kicker: usize, spot: i32) -> Next {
        self.poss = kicker;
        self.ball_on = spot;
        let mut row = self.snap_row(Kind::Kickoff);
        let recv = 1 - kicker;
        let deficit = -self.margin_of(kicker);
        let onside = spot == KICKOFF_SPOT
            && self.period == 4
            && (1..=16).contains(&deficit)
            && (self.clock <= 150 || (deficit > 8 && self.clock <= 300));
        row.touchback = Some(false);
        let next;
        if onside {
            if chance(self.rng, 0.12) {
                self.first_down_at(spot + 11);
                self.use_clock(3, false);
                next = Next::Scrimmage;
            } else {
                self.poss = recv;
                self.first_down_at(100 - spot - 11);
                self.use_clock(3, false);
                next = Next::Scrimmage;
            }
        } else if spot == KICKOFF_SPOT && chance(self.rng, 0.60) {
            row.touchback = Some(true);
            self.poss = recv;
            self.first_down_at(KICKOFF_TOUCHBACK);
            self.use_clock(0, false);
            next = Next::Scrimmage;
        } else {
            let mean = if spot == KICKOFF_SPOT { 24.0 } else { 37.0 };
            let mut at = mean + 6.0 * normal(self.rng);
            if chance(self.rng, 0.03) {
                at += exp_mean(self.rng, 20.0);
            }
            let at = at.round() as i32;
            let secs = int_in(self.rng, 5, 8);
            self.use_clock(secs, false);
            if at >= 100 || chance(self.rng, 0.002) {
                next = self.defense_touchdown(&mut row);
            } else {
                self.poss = recv;
                self.first_down_at(at.clamp(1, 99));
                next = Next::Scrimmage;
            }
        }
        if self.period >= 5 && next == Next::Scrimmage && self.poss == recv {
            self.ot_poss += 1;
        }
        self.push(row);
        next
    }

    pub(super) fn try_after_touchdown(&mut self) -> Next {
        let off = self.poss;
        let m = self.margin();
        let late = self.period == 4 || (self.period == 3 && self.clock < 300);
        let two = if late {
            matches!(m, -2 | -5 | -9 | -10 | 1 | 5 | 12) || chance(self.rng, 0.015)
        } else if self.period == 3 {
            matches!(m, -2 | -5 | -10 | 1 | 5) || chance(self.rng, 0.015)
        } else {
            chance(self.rng, 0.015)
        };
        self.ball_on = if two { TWO_POINT_SPOT } else { KICK_TRY_SPOT };
        let mut row = self.snap_row(if two { Kind::TwoPoint } else { Kind::ExtraPoint });
        let p = if two { 0.48 } else { logistic(2.75 + self.strength[off].kicking) };
        if chance(self.rng, p) {
            let pts = if two { 2 } else { 1 };
            row.points = pts;
            self.score[off] += pts;
        }
        self.running = false;
        if self.period >= 5 && off != self.ot_first {
            self.ot_answered = true;
        }
        self.push(row);
        Next::Kickoff { kicker: off, spot: KICKOFF_SPOT }
    }

    pub(super) fn backed_up(&self) -> bool {
        self.ball_on <= BACKED_UP_LINE
    }

    pub(super) fn fg_prob(&self, distance: i32) -> f64 {
        let d = (distance - 20) as f64;
        logistic(FG_BASE_LOGIT - 0.06 * d - 0.0016 * d * d + self.strength[self.poss].kicking)
    }

    pub(super) fn field_goal(&mut self) -> Next {
        let mut row = self.snap_row(Kind::FieldGoal);
        let distance = 100 - self.ball_on + 17;
        let p = self.fg_prob(distance);
        let secs = int_in(self.rng, 4, 6);
        self.use_clock(secs, false);
        let next = if chance(self.rng, p) {
            row.points = 3;
            let off = self.poss;
            self.score[off] += 3;
            self.running = false;
            self.note_score(self.period >= 5 && self.ot_poss == 1 && off == self.ot_first);
            if self.period >= 5 && off != self.ot_first {
                self.ot_answered = true;
            }
            Next::Kickoff { kicker: off, spot: KICKOFF_SPOT }
        } else {
            let kick_spot = self.ball_on - 7;
            self.change_possession((100 - kick_spot).max(20));
            Next::Scrimmage
        };
        self.push(row);
        next
    }

    pub(super) fn punt(&mut self) -> Next {
        let mut row = self.snap_row(Kind::Punt);
        row.touchback = Some(false);
        let short = if self.backed_up() { BACKED_UP_PUNT_SHORT } else { 0.0 };
        let gross = (45.5 - short + 6.5 * normal(self.rng) + 2.0 * self.strength[self.poss].kicking).round() as i32;
        let mut land = self.ball_on + gross.max(20);
        let secs = int_in(self.rng, 7, 10);
        self.use_clock(secs, false);
        let mut returned = true;
        if self.ball_on > 50 && chance(self.rng, 0.62) {
            // aimed short of the goal line and downed or fair caught
            land = land.min(100 - int_in(self.rng, 3, 15));
            returned = false;
        }
        let next = if land >= 100 {
            row.touchback = Some(true);
            self.change_possession(PUNT_TOUCHBACK);
            Next::Scrimmage
        } else if !returned || chance(self.rng, 0.55) {
            self.change_possession(100 - land);
            Next::Scrimmage
        } else if chance(self.rng, 0.008) {
            self.defense_touchdown(&mut row)
        } else {
            let ret = exp_mean(self.rng, 8.5).round() as i32;
            self.change_possession((100 - land + ret).min(99));
            Next::Scrimmage
        };
        self.push(row);
        next
    }
}

//! The offense's choices before a snap: spike, kneel, last-play kick,
//! fourth down (go, punt, field goal) and run or pass.

use super::tuning::*;
use super::*;

impl Engine<'_, '_> {
    pub(super) fn scrimmage(&mut self) -> Next {
        if std::mem::take(&mut self.spike_next) && self.down <= 3 {
            return self.spike();
        }
        if self.should_kneel() {
            return self.kneel();
        }
        if self.last_play_kick() {
            return self.field_goal();
        }
        if self.down == 4 {
            match self.fourth_down() {
                Fourth::Punt => return self.punt(),
                Fourth::FieldGoal => return self.field_goal(),
                Fourth::Go => {}
            }
        }
        if chance(self.rng, PENALTY_RATE) {
            return self.penalty();
        }
        let p = self.pass_prob();
        if chance(self.rng, p) {
            self.dropback()
        } else {
            self.run_play()
        }
    }

    pub(super) fn should_kneel(&self) -> bool {
        let m = self.margin();
        let def_to = self.timeouts[self.def()];
        if self.down == 4 {
            return self.clock <= 2 && ((self.period >= 4 && m > 0) || (self.period == 2 && self.ball_on < 50));
        }
        let d = 4 - self.down; // kneels left before fourth down
        match self.period {
            4 | 5 => m > 0 && self.clock <= 2 * d + 39 * (d - def_to).max(0),
            2 => self.ball_on < 50 && self.clock <= 30,
            _ => false,
        }
    }

    /// Kick now: the clock will not allow another snap and a field goal helps.
    pub(super) fn last_play_kick(&self) -> bool {
        let distance = 100 - self.ball_on + 17;
        let m = self.margin();
        let helps = self.period == 2 || (self.period >= 4 && (-3..=0).contains(&m));
        let last = self.clock <= 5 || (self.clock <= 16 && self.timeouts[self.poss] == 0 && self.period != 5);
        helps && last && distance <= 60
    }

    pub(super) fn fourth_down(&mut self) -> Fourth {
        let dist = 100 - self.ball_on;
        let fg_dist = dist + 17;
        let m = self.margin();
        let left = self.secs_game();
        let late = self.period >= 4;
        let kick_ok = |d: i32, long: f64| d <= 50 || (d <= 58 && long > 0.0);
        if late && m < 0 {
            let deficit = -m;
            let scores = (deficit + 7) / 8;
            if deficit <= 3 && fg_dist <= 56 {
                return Fourth::FieldGoal;
            }
            if self.period >= 5 || left < 110 * scores + 60 {
                return Fourth::Go;
            }
        }
        if self.period >= 5 && m == 0 && fg_dist <= 55 {
            return Fourth::FieldGoal;
        }
        let tg = self.to_go;
        let on = self.ball_on;
        let mut p_go: f64 = if tg <= 1 {
            match on {
                60.. => 0.60,
                45..=59 => 0.55,
                35..=44 => 0.25,
                _ => 0.05,
            }
        } else if tg <= 3 {
            match on {
                60.. => 0.30,
                45..=59 => 0.25,
                _ => 0.02,
            }
        } else if tg <= 6 {
            if (55..72).contains(&on) {
                0.15
            } else {
                0.02
            }
        } else {
            0.01
        };
        if late && m < 0 {
            p_go = (p_go * 2.0).min(0.9);
        } else if late && m > 0 {
            p_go *= 0.4;
        }
        if self.period == 2 && self.clock <= 30 {
            p_go = 0.0;
        }
        if chance(self.rng, p_go) {
            return Fourth::Go;
        }
        let long_try = if fg_dist > 50 { 0.35 + self.strength[self.poss].kicking - 0.08 * (fg_dist - 51) as f64 } else { 0.0 };
        if kick_ok(fg_dist, long_try - unit(self.rng)) || (self.period == 2 && self.clock <= 20 && fg_dist <= 58) {
            Fourth::FieldGoal
        } else {
            Fourth::Punt
        }
    }

    pub(super) fn pass_prob(&self) -> f64 {
        let (d, tg) = (self.down, self.to_go);
        let mut x = match d {
            1 => {
                if tg >= 10 {
                    0.06 * (tg - 10) as f64
                } else {
                    -0.25
                }
            }
            2 => {
                if tg >= 8 {
                    0.45
                } else if tg >= 4 {
                    0.05
                } else {
                    -0.5
                }
            }
            3 => {
                if tg >= 5 {
                    1.9
                } else if tg >= 3 {
                    0.9
                } else {
                    -0.15
                }
            }
            _ => {
                if tg >= 4 {
                    1.9
                } else if tg >= 2 {
                    0.6
                } else {
                    -0.45
                }
            }
        };
        let f = 1.0 - self.secs_game() as f64 / 3600.0;
        let f = if self.period >= 5 { 1.0 } else { f };
        x -= self.margin().clamp(-24, 24) as f64 * (0.012 + 0.05 * f * f * f);
        if self.hurry(self.poss) {
            x += 1.3;
        } else if self.milk(self.poss) {
            x -= 0.9;
        }
        if 100 - self.ball_on <= 3 {
            x -= 0.4;
        }
        x += PASS_SHIFT + self.strength[self.poss].pass_lean;
        logistic(x)
    }
}

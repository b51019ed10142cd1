//! Plays from scrimmage: runs, kneels, spikes, penalties and dropbacks
//! (the dropback model, sacks, scrambles, throws).

use super::tuning::*;
use super::*;

impl Engine<'_, '_> {
    pub(super) fn run_play(&mut self) -> Next {
        let mut row = self.snap_row(Kind::Run);
        let (off, def) = (self.poss, self.def());
        let adv = self.strength[off].run_off - self.strength[def].run_def;
        let dist = 100 - self.ball_on;
        let u = unit(self.rng);
        let mut gain = if u < 0.09 {
            -(int_in(self.rng, 1, 3) as f64)
        } else if u < 0.19 {
            5.0 + exp_mean(self.rng, 11.0) + 2.0 * adv
        } else {
            let short = if self.to_go <= 2 { 0.4 } else { 0.0 };
            let soft = if self.soft_defense() { 0.8 } else { 0.0 };
            let cramped = if self.backed_up() { BACKED_UP_RUN_LOSS } else { 0.0 };
            RUN_BASE - cramped + adv + short + soft + 2.7 * normal(self.rng)
        };
        if dist <= 5 {
            gain = gain.min(dist as f64 + 1.0) - 0.8;
        }
        let gain = (gain.round() as i32).max(-self.ball_on).min(dist);
        row.gain = Some(gain);
        let secs = int_in(self.rng, 4, 7);
        let spot = self.ball_on + gain;
        if spot > 0 && spot < 100 && chance(self.rng, RUN_FUMBLE_LOST) {
            row.fumble_lost = Some(true);
            self.use_clock(secs, false);
            self.change_possession(100 - spot);
            self.push(row);
            return Next::Scrimmage;
        }
        let oob = chance(self.rng, if self.hurry(off) { 0.25 } else { 0.09 });
        self.use_clock_oob(secs, oob);
        let next = self.advance(&mut row, gain);
        self.push(row);
        next
    }

    pub(super) fn kneel(&mut self) -> Next {
        let mut row = self.snap_row(Kind::Kneel);
        let gain = if self.ball_on > 1 { -1 } else { 0 };
        row.gain = Some(gain);
        self.use_clock(2, true);
        let next = self.advance(&mut row, gain);
        self.push(row);
        next
    }

    pub(super) fn spike(&mut self) -> Next {
        let mut row = self.snap_row(Kind::Spike);
        row.passer = Some(self.passer_name().to_string());
        row.gain = Some(0);
        self.down += 1;
        self.use_clock(1, false);
        self.push(row);
        Next::Scrimmage
    }

    pub(super) fn penalty(&mut self) -> Next {
        let mut row = self.snap_row(Kind::Penalty);
        let u = unit(self.rng);
        let dist = 100 - self.ball_on;
        // (yards for the offense, automatic first down, live ball, spot foul)
        let (yards, auto_first, live, spot_foul) = if u < 0.30 {
            (-5, false, false, false)
        } else if u < 0.55 {
            (-10, false, true, false)
        } else if u < 0.78 {
            (5, false, false, false)
        } else if u < 0.90 {
            (5, true, true, false)
        } else {
            ((16.0 + 8.0 * normal(self.rng)).round().clamp(1.0, 45.0) as i32, true, true, true)
        };
        let yards = if yards < 0 {
            yards.max(-(self.ball_on / 2))
        } else if spot_foul {
            yards.min(dist - 1)
        } else {
            yards.min(dist / 2)
        };
        row.gain = Some(yards);
        let spot = self.ball_on + yards;
        if yards > 0 && (yards >= self.to_go || auto_first) {
            self.first_down_at(spot);
        } else {
            self.ball_on = spot;
            self.to_go -= yards;
        }
        let keep = self.running && !self.oob_stops();
        // a period never ends on a foul (the down is replayed untimed)
        let secs = if live { int_in(self.rng, 4, 7).min(self.clock - 1).max(0) } else { 0 };
        self.use_clock(secs, keep);
        self.push(row);
        Next::Scrimmage
    }

    pub(super) fn passer_id(&self) -> usize {
        self.g.qb_ids[self.poss][self.qb[self.poss]]
    }

    pub(super) fn passer_name(&self) -> &str {
        self.g.qb_names[self.poss][self.qb[self.poss]]
    }

    pub(super) fn drop_probs(&self, late_close: bool) -> DropProbs {
        self.drop_probs_against(late_close, &self.strength[self.def()])
    }

    /// The dropback model against defensive strengths `sd` (the truth's
    /// neutral rates use a defense without pass-defense or pass-rush edge).
    fn drop_probs_against(&self, late_close: bool, sd: &TeamStrength) -> DropProbs {
        let off = self.poss;
        let s = self.g.qb_skills[off][self.qb[off]];
        let so = &self.strength[off];
        let m = self.margin();
        let hurry = self.hurry(off);
        let desperate = self.period >= 4 && hurry && m < 0;
        let prevent = (self.period >= 4 && m <= -9 && self.clock <= 300) || self.soft_defense();
        let long = self.down >= 3 && self.to_go >= 7;
        let poise = if late_close { s.poise } else { 0.0 };
        let shift = if late_close { self.g.late_shift[off][self.qb[off]] } else { LateShift::default() };
        let dist = 100 - self.ball_on;

        let cramped = if self.backed_up() { BACKED_UP_SACK_LOGIT } else { 0.0 };
        let mut sack = SACK_LOGIT + cramped + sd.pass_rush - so.protection - s.sack_avoidance - 0.5 * poise;
        if long {
            sack += 0.35;
        }
        if desperate {
            sack += 0.2;
        }
        sack += shift.sack;
        let mut scr = SCRAMBLE_LOGIT + s.scrambling;
        if self.down >= 3 {
            scr += 0.3;
        }

        let mut tilt = 0.22 * s.arm;
        if long {
            tilt += 0.04 * (self.to_go - 7).min(10) as f64 + 0.1;
        }
        if self.to_go <= 3 {
            tilt -= 0.08;
        }
        if desperate {
            tilt += if self.clock <= 60 { 0.35 } else { 0.15 };
        } else if self.milk(off) {
            tilt -= 0.12;
        }
        let short = self.g.throw_short[off][self.qb[off]];
        if short != 0.0 && crate::sim::habits::trailing_late(self.period, self.clock, m) {
            tilt += short;
        }
        let mut band = [0.0; BANDS];
        let mut total = 0.0;
        for (c, b) in band.iter_mut().enumerate() {
            if BAND_MIN[c] <= dist + 5 {
                *b = BAND_SHARE[c] * (tilt * (c as f64 - 2.5)).exp();
                total += *b;
            }
        }
        for b in &mut band {
            *b /= total;
        }

        let mut comp_shift = s.accuracy + so.pass_off - sd.pass_def + poise;
        if dist <= 10 {
            comp_shift -= 0.35;
        }
        comp_shift += shift.complete;
        let mut int_shift = s.interceptions + 0.8 * (sd.pass_def - so.pass_off) - poise;
        if desperate {
            int_shift += 0.35;
        }
        int_shift += shift.interception;
        let mut comp = [0.0; BANDS];
        let mut int = [0.0; BANDS];
        for c in 0..BANDS {
            let soft = if prevent && c <= 2 { 0.35 } else { 0.0 };
            int[c] = logistic(INT_LOGIT[c] + int_shift);
            comp[c] = (1.0 - int[c]) * logistic(COMP_LOGIT[c] + comp_shift + soft);
        }
        DropProbs { sack: logistic(sack), scramble: logistic(scr), band, comp, int }
    }

    pub(super) fn dropback(&mut self) -> Next {
        let off = self.poss;
        let late_close = late_and_close(self.period, self.clock, self.margin());
        let pr = self.drop_probs(late_close);
        let expected = |pr: &DropProbs| {
            let (mut comp, mut int) = (0.0, 0.0);
            for c in 0..BANDS {
                comp += pr.band[c] * pr.comp[c];
                int += pr.band[c] * pr.int[c];
            }
            (comp, int)
        };
        let (exp_comp, exp_int) = expected(&pr);
        let neutral_sd = TeamStrength { pass_def: 0.0, pass_rush: 0.0, ..self.strength[self.def()] };
        let np = self.drop_probs_against(late_close, &neutral_sd);
        let (n_comp, n_int) = expected(&np);
        let pid = self.passer_id();
        self.truth.record(
            pid,
            self.g.team_ids[off],
            self.g.season,
            late_close,
            DropbackTruth {
                complete: exp_comp,
                interception: exp_int,
                sack: pr.sack,
                scramble: (1.0 - pr.sack) * pr.scramble,
                neutral: [n_comp, n_int, np.sack],
            },
        );
        let name = self.passer_name().to_string();
        let sacked = chance(self.rng, pr.sack);
        let next = if sacked {
            self.sack(name)
        } else if chance(self.rng, pr.scramble) {
            self.scramble(name)
        } else {
            self.pass(name, &pr)
        };
        // the passer may be hurt on the play; the backup finishes the game
        let p_hurt = if sacked { 0.010 } else { 0.0007 };
        if self.qb[off] == 0 && chance(self.rng, p_hurt) {
            self.qb[off] = 1;
            self.injured.push(pid);
        }
        next
    }

    pub(super) fn sack(&mut self, name: String) -> Next {
        let mut row = self.snap_row(Kind::Sack);
        row.passer = Some(name);
        let loss = (2.0 + exp_mean(self.rng, 4.5)).round() as i32;
        let loss = loss.min(20).min(self.ball_on);
        row.gain = Some(-loss);
        let secs = int_in(self.rng, 4, 7);
        let spot = self.ball_on - loss;
        if spot > 0 && chance(self.rng, 0.05) {
            row.fumble_lost = Some(true);
            self.use_clock(secs, false);
            if chance(self.rng, 0.08) {
                let next = self.defense_touchdown(&mut row);
                self.push(row);
                return next;
            }
            self.change_possession(100 - spot);
            self.push(row);
            return Next::Scrimmage;
        }
        self.use_clock(secs, true);
        let next = self.advance(&mut row, -loss);
        self.push(row);
        next
    }

    pub(super) fn scramble(&mut self, name: String) -> Next {
        let mut row = self.snap_row(Kind::Scramble);
        row.passer = Some(name);
        let dist = 100 - self.ball_on;
        let mut g = 5.5 + 4.5 * normal(self.rng);
        if chance(self.rng, 0.08) {
            g += exp_mean(self.rng, 14.0);
        }
        let gain = (g.round() as i32).max(-3).max(1 - self.ball_on).min(dist);
        row.gain = Some(gain);
        let secs = int_in(self.rng, 5, 8);
        let oob = chance(self.rng, if self.hurry(self.poss) { 0.6 } else { 0.35 });
        self.use_clock_oob(secs, oob);
        let next = self.advance(&mut row, gain);
        self.push(row);
        next
    }

    pub(super) fn pass(&mut self, name: String, pr: &DropProbs) -> Next {
        let mut row = self.snap_row(Kind::Pass);
        row.passer = Some(name);
        let dist = 100 - self.ball_on;
        let c = pick(self.rng, &pr.band);
        let hi = BAND_MAX[c].min(dist + 9);
        let air = if c == BANDS - 1 {
            (BAND_MIN[c] + exp_mean(self.rng, 7.0).round() as i32).min(hi)
        } else {
            int_in(self.rng, BAND_MIN[c], hi)
        };
        let air = air.max(BAND_MIN[c].min(hi)).max(1 - self.ball_on);
        row.air_yards = Some(air);
        let u = unit(self.rng);
        if u < pr.int[c] {
            row.complete = Some(false);
            row.intercepted = Some(true);
            row.gain = Some(0);
            let secs = int_in(self.rng, 5, 9);
            self.use_clock(secs, false);
            let spot = self.ball_on + air;
            let next = if chance(self.rng, 0.06) {
                self.defense_touchdown(&mut row)
            } else if spot >= 100 && chance(self.rng, 0.8) {
                self.change_possession(PUNT_TOUCHBACK);
                Next::Scrimmage
            } else {
                let ret = exp_mean(self.rng, 9.0).round() as i32;
                self.change_possession((100 - spot.min(99) + ret).min(99));
                Next::Scrimmage
            };
            self.push(row);
            return next;
        }
        if u >= pr.int[c] + pr.comp[c] {
            row.complete = Some(false);
            row.intercepted = Some(false);
            row.gain = Some(0);
            let secs = int_in(self.rng, 4, 6);
            self.use_clock(secs, false);
            let next = self.advance(&mut row, 0);
            self.push(row);
            return next;
        }
        row.complete = Some(true);
        row.intercepted = Some(false);
        let off = self.poss;
        let mut yac = exp_mean(self.rng, YAC_MEAN[c] * (1.0 + 0.8 * self.strength[off].pass_off));
        if chance(self.rng, 0.03) {
            yac += exp_mean(self.rng, 18.0);
        }
        let gain = (air + yac.round() as i32).max(1 - self.ball_on).min(dist);
        row.gain = Some(gain);
        let secs = (5.0 + air.max(0) as f64 / 8.0 + yac / 6.0).round().min(12.0) as i32;
        let spot = self.ball_on + gain;
        if spot < 100 && chance(self.rng, CATCH_FUMBLE_LOST) {
            row.fumble_lost = Some(true);
            self.use_clock(secs, false);
            self.change_possession(100 - spot);
            self.push(row);
            return Next::Scrimmage;
        }
        let oob = chance(self.rng, if self.hurry(off) { 0.45 } else { 0.17 });
        self.use_clock_oob(secs, oob);
        let next = self.advance(&mut row, gain);
        self.push(row);
        next
    }
}

//! One game, snap by snap: kickoffs, downs, runs, dropbacks, kicks, tries, the
//! clock (play clock, two-minute warning, timeouts, spikes, kneels), overtime.
//! Writes `PlayRow`s and feeds the truth book; keeps no state between games.

use super::draw::{chance, exp_mean, int_in, logistic, normal, pick, unit, SimRng};
use super::league::{PasserSkills, TeamStrength};
use super::truth::{late_and_close, DropbackTruth, TruthBook};
use crate::playfile::{Kind, PlayRow};

/// Ball spot of a kicked try (snap from the 15) and of a two-point try (from the 2).
pub const KICK_TRY_SPOT: i32 = 85;
pub const TWO_POINT_SPOT: i32 = 98;
/// Kickoff spot, touchback spots, free-kick spot after a safety.
const KICKOFF_SPOT: i32 = 35;
const SAFETY_KICK_SPOT: i32 = 20;
const KICKOFF_TOUCHBACK: i32 = 25;
const PUNT_TOUCHBACK: i32 = 20;

/// How much a club's `home_edge` of 1.0 lifts each home strength.
const HOME_BOOST: TeamStrength = TeamStrength {
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
const FORM_RUN: f64 = 0.432;
const FORM_PASS: f64 = 0.132;

// ---- dropback model ----
/// Depth bands of a throw: behind the line, 1-5, 6-10, 11-15, 16-25, 26+.
const BANDS: usize = 6;
const BAND_MIN: [i32; BANDS] = [-4, 1, 6, 11, 16, 26];
const BAND_MAX: [i32; BANDS] = [0, 5, 10, 15, 25, 55];
const BAND_SHARE: [f64; BANDS] = [0.17, 0.28, 0.22, 0.14, 0.11, 0.08];
const COMP_LOGIT: [f64; BANDS] = [1.58, 1.13, 0.45, 0.05, -0.47, -1.02];
const INT_LOGIT: [f64; BANDS] = [-5.15, -4.55, -3.85, -3.4, -3.0, -2.65];
const YAC_MEAN: [f64; BANDS] = [5.13, 3.61, 2.95, 2.85, 3.23, 4.75];
const SACK_LOGIT: f64 = -2.75;
const SCRAMBLE_LOGIT: f64 = -3.3;
/// League-wide shift of the play-call logit.
const PASS_SHIFT: f64 = 0.15;
/// Share of scrimmage snaps that end in an accepted penalty instead of a play.
const PENALTY_RATE: f64 = 0.12;
/// Lost fumbles: on a run that is not a touchdown or safety, after a catch.
const RUN_FUMBLE_LOST: f64 = 0.014;
const CATCH_FUMBLE_LOST: f64 = 0.02;
/// Mean gain of an ordinary run (not a loss, not a breakaway) before strengths.
const RUN_BASE: f64 = 3.3;
/// Field-goal make logit at 20 yards before the kicker's strength.
const FG_BASE_LOGIT: f64 = 3.7;

// ---- backed up ----
/// At or inside its own 15 the offense is cramped: the defense crowds the
/// line, the passer has no room to drop, the punter stands at the end line.
/// These four constants (with the dropback and penalty levels above) were set
/// by simulating 12-season leagues until first-and-ten EP by strip came
/// within about half a point of Carter & Machol (1971), see tests/models.rs.
const BACKED_UP_LINE: i32 = 15;
const BACKED_UP_SACK_LOGIT: f64 = 1.2;
const BACKED_UP_RUN_LOSS: f64 = 2.5;
const BACKED_UP_PUNT_SHORT: f64 = 7.0;

/// Everything the engine needs to know before kickoff. Index 0 is home.
pub(crate) struct GameSetup<'a> {
    pub key: String,
    pub season: i32,
    pub week: i32,
    pub codes: [String; 2],
    pub team_ids: [usize; 2],
    pub strength: [TeamStrength; 2],
    pub home_edge: f64,
    /// Passer ids dressed: starter, backup.
    pub qb_ids: [[usize; 2]; 2],
    pub qb_names: [[&'a str; 2]; 2],
    pub qb_skills: [[PasserSkills; 2]; 2],
    pub home_line: f64,
}

/// Play one game: rows are appended to `out`; returns the passer ids hurt.
pub(crate) fn play_game(g: &GameSetup, rng: &mut SimRng, out: &mut Vec<PlayRow>, truth: &mut TruthBook) -> Vec<usize> {
    let mut strength = g.strength;
    let e = g.home_edge;
    let h = &mut strength[0];
    h.run_off += e * HOME_BOOST.run_off;
    h.run_def += e * HOME_BOOST.run_def;
    h.pass_off += e * HOME_BOOST.pass_off;
    h.pass_def += e * HOME_BOOST.pass_def;
    h.protection += e * HOME_BOOST.protection;
    h.pass_rush += e * HOME_BOOST.pass_rush;
    // game-day form: what no pregame line can see
    for s in &mut strength {
        let (off, def) = (normal(rng), normal(rng));
        s.run_off += FORM_RUN * off;
        s.pass_off += FORM_PASS * off;
        s.run_def += FORM_RUN * def;
        s.pass_def += FORM_PASS * def;
    }
    let mut eng = Engine {
        g,
        rng,
        out,
        truth,
        strength,
        seq: 0,
        period: 1,
        clock: 900,
        score: [0, 0],
        timeouts: [3, 3],
        qb: [0, 0],
        poss: 0,
        ball_on: 25,
        down: 1,
        to_go: 10,
        running: false,
        spike_next: false,
        kneeling: false,
        opening_receiver: 0,
        ot_first: 0,
        ot_poss: 0,
        ot_fg_hold: false,
        injured: Vec::new(),
    };
    eng.run();
    eng.injured
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Next {
    Kickoff { kicker: usize, spot: i32 },
    Try,
    Scrimmage,
    Done,
}

enum Fourth {
    Go,
    Punt,
    FieldGoal,
}

/// The engine's probabilities for one dropback.
struct DropProbs {
    sack: f64,
    /// P(scramble | no sack).
    scramble: f64,
    band: [f64; BANDS],
    /// P(complete | band), P(interception | band); they never sum above 1.
    comp: [f64; BANDS],
    int: [f64; BANDS],
}

struct Engine<'s, 'a> {
    g: &'s GameSetup<'a>,
    rng: &'s mut SimRng,
    out: &'s mut Vec<PlayRow>,
    truth: &'s mut TruthBook,
    /// Strengths with the home boost applied.
    strength: [TeamStrength; 2],
    seq: i32,
    period: i32,
    clock: i32,
    score: [i32; 2],
    timeouts: [i32; 2],
    /// Which dressed passer is in: 0 starter, 1 backup.
    qb: [usize; 2],
    poss: usize,
    ball_on: i32,
    down: i32,
    to_go: i32,
    /// The clock runs from the end of the last play to the next snap.
    running: bool,
    spike_next: bool,
    /// The last snap was a kneel: the offense lets the play clock run.
    kneeling: bool,
    opening_receiver: usize,
    ot_first: usize,
    ot_poss: u32,
    /// The first overtime possession ended in a field goal and nothing else
    /// has been scored: the other side still gets its possession.
    ot_fg_hold: bool,
    injured: Vec<usize>,
}

impl Engine<'_, '_> {
    fn run(&mut self) {
        let receiver = usize::from(chance(self.rng, 0.5));
        self.opening_receiver = receiver;
        let mut next = Next::Kickoff { kicker: 1 - receiver, spot: KICKOFF_SPOT };
        loop {
            if next == Next::Scrimmage && self.running {
                self.between_snaps();
            }
            if self.clock <= 0 && next != Next::Try {
                next = self.end_period(next);
                if next == Next::Done {
                    break;
                }
                continue;
            }
            next = match next {
                Next::Kickoff { kicker, spot } => self.kickoff(kicker, spot),
                Next::Try => self.try_after_touchdown(),
                Next::Scrimmage => self.scrimmage(),
                Next::Done => break,
            };
            if next == Next::Done || (self.period >= 5 && self.ot_over()) {
                break;
            }
        }
    }

    // ---------------------------------------------------------------- state

    fn def(&self) -> usize {
        1 - self.poss
    }
    fn margin_of(&self, team: usize) -> i32 {
        self.score[team] - self.score[1 - team]
    }
    fn margin(&self) -> i32 {
        self.margin_of(self.poss)
    }
    fn secs_game(&self) -> i32 {
        if self.period >= 5 {
            self.clock
        } else {
            (4 - self.period) * 900 + self.clock
        }
    }
    /// Out of bounds stops the clock (last 2:00 of the half, 5:00 of the game, overtime).
    fn oob_stops(&self) -> bool {
        (self.period == 2 && self.clock <= 120) || (self.period == 4 && self.clock <= 300) || self.period >= 5
    }
    /// The offense `team` plays against the clock.
    fn hurry(&self, team: usize) -> bool {
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
    fn soft_defense(&self) -> bool {
        self.period >= 3 && self.margin() <= -9
    }

    /// The offense `team` runs the clock down.
    fn milk(&self, team: usize) -> bool {
        let m = self.margin_of(team);
        (self.period == 4 && m > 0 && self.clock <= 720) || (self.period >= 3 && m >= 9)
    }

    fn snap_row(&self, kind: Kind) -> PlayRow {
        let (off, def) = (self.poss, self.def());
        let downs = !kind.is_downless();
        PlayRow {
            game: self.g.key.clone(),
            season: self.g.season,
            week: self.g.week,
            home: self.g.codes[0].clone(),
            away: self.g.codes[1].clone(),
            seq: self.seq + 1,
            period: self.period,
            clock: self.clock,
            offense: self.g.codes[off].clone(),
            defense: self.g.codes[def].clone(),
            off_score: self.score[off],
            def_score: self.score[def],
            off_timeouts: self.timeouts[off],
            def_timeouts: self.timeouts[def],
            down: downs.then_some(self.down),
            to_go: downs.then_some(self.to_go),
            ball_on: self.ball_on,
            kind,
            passer: None,
            complete: None,
            intercepted: None,
            air_yards: None,
            gain: None,
            fumble_lost: matches!(kind, Kind::Pass | Kind::Run | Kind::Sack | Kind::Scramble).then_some(false),
            touchback: None,
            points: 0,
            home_line: Some(self.g.home_line),
        }
    }

    fn push(&mut self, row: PlayRow) {
        self.seq = row.seq;
        self.kneeling = row.kind == Kind::Kneel;
        self.out.push(row);
    }

    /// The play took `secs`; the clock then runs on or stops. A play that
    /// crosses 2:00 of the 2nd or 4th period brings the two-minute warning.
    fn use_clock(&mut self, secs: i32, keeps_running: bool) {
        let before = self.clock;
        self.clock = (before - secs).max(0);
        self.running = keeps_running;
        if (self.period == 2 || self.period == 4) && before > 120 && self.clock <= 120 {
            self.running = false;
        }
    }

    /// A play that ends in bounds keeps the clock running; out of bounds stops
    /// it late in a half (earlier it restarts on the ready signal).
    fn use_clock_oob(&mut self, secs: i32, out_of_bounds: bool) {
        self.use_clock(secs, true);
        if out_of_bounds && self.oob_stops() {
            self.running = false;
        }
    }

    /// Time between plays with the clock running: the play clock, timeouts,
    /// the two-minute warning, hurrying to the line for a spike.
    fn between_snaps(&mut self) {
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
    fn tick(&mut self, secs: i32) {
        let before = self.clock;
        let mut after = before - secs;
        if (self.period == 2 || self.period == 4) && before > 120 && after <= 120 {
            after = 120;
            self.running = false;
        }
        self.clock = after.max(0);
    }

    fn end_period(&mut self, next: Next) -> Next {
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
                self.clock = 600;
                self.timeouts = [2, 2];
                let receiver = usize::from(chance(self.rng, 0.5));
                self.ot_first = receiver;
                self.ot_poss = 0;
                self.ot_fg_hold = false;
                Next::Kickoff { kicker: 1 - receiver, spot: KICKOFF_SPOT }
            }
            _ => Next::Done,
        }
    }

    /// Modified sudden death: a touchdown or a defensive score on any
    /// possession ends it; a field goal on the first possession gives the other
    /// side one possession; after that any lead wins.
    fn ot_over(&self) -> bool {
        self.score[0] != self.score[1] && !(self.ot_fg_hold && self.ot_poss <= 2)
    }

    /// Bookkeeping for overtime on every score.
    fn note_score(&mut self, first_possession_fg: bool) {
        if self.period >= 5 {
            self.ot_fg_hold = first_possession_fg;
        }
    }

    /// The ball changes hands; `spot` is from the new offense's goal line.
    fn change_possession(&mut self, spot: i32) {
        self.poss = 1 - self.poss;
        self.first_down_at(spot);
        self.running = false;
        if self.period >= 5 {
            self.ot_poss += 1;
        }
    }

    fn first_down_at(&mut self, spot: i32) {
        self.ball_on = spot.clamp(1, 99);
        self.down = 1;
        self.to_go = 10.min(100 - self.ball_on);
    }

    // ------------------------------------------------------------- scoring

    fn offense_touchdown(&mut self, row: &mut PlayRow) -> Next {
        row.points = 6;
        self.score[self.poss] += 6;
        self.running = false;
        self.note_score(false);
        if self.period >= 5 {
            return Next::Done;
        }
        Next::Try
    }

    fn defense_touchdown(&mut self, row: &mut PlayRow) -> Next {
        row.points = -6;
        let d = self.def();
        self.score[d] += 6;
        self.poss = d;
        self.running = false;
        self.note_score(false);
        if self.period >= 5 {
            return Next::Done;
        }
        Next::Try
    }

    fn safety(&mut self, row: &mut PlayRow) -> Next {
        row.points = -2;
        let d = self.def();
        self.score[d] += 2;
        self.running = false;
        self.note_score(false);
        if self.period >= 5 {
            return Next::Done;
        }
        Next::Kickoff { kicker: self.poss, spot: SAFETY_KICK_SPOT }
    }

    /// Move the ball `gain` yards on a play the offense kept: touchdown,
    /// safety, first down, next down or turnover on downs.
    fn advance(&mut self, row: &mut PlayRow, gain: i32) -> Next {
        let spot = self.ball_on + gain;
        if spot >= 100 {
            return self.offense_touchdown(row);
        }
        if spot <= 0 {
            return self.safety(row);
        }
        if gain >= self.to_go {
            self.first_down_at(spot);
        } else if self.down == 4 {
            self.change_possession(100 - spot);
        } else {
            self.ball_on = spot;
            self.down += 1;
            self.to_go -= gain;
        }
        Next::Scrimmage
    }

    // ------------------------------------------------------------- kicks

    fn kickoff(&mut self, kicker: usize, spot: i32) -> Next {
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

    fn try_after_touchdown(&mut self) -> Next {
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
        self.push(row);
        Next::Kickoff { kicker: off, spot: KICKOFF_SPOT }
    }

    fn backed_up(&self) -> bool {
        self.ball_on <= BACKED_UP_LINE
    }

    fn fg_prob(&self, distance: i32) -> f64 {
        let d = (distance - 20) as f64;
        logistic(FG_BASE_LOGIT - 0.06 * d - 0.0016 * d * d + self.strength[self.poss].kicking)
    }

    fn field_goal(&mut self) -> Next {
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
            Next::Kickoff { kicker: off, spot: KICKOFF_SPOT }
        } else {
            let kick_spot = self.ball_on - 7;
            self.change_possession((100 - kick_spot).max(20));
            Next::Scrimmage
        };
        self.push(row);
        next
    }

    fn punt(&mut self) -> Next {
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

    // ------------------------------------------------------- scrimmage

    fn scrimmage(&mut self) -> Next {
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

    fn should_kneel(&self) -> bool {
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
    fn last_play_kick(&self) -> bool {
        let distance = 100 - self.ball_on + 17;
        let m = self.margin();
        let helps = self.period == 2 || (self.period >= 4 && (-3..=0).contains(&m));
        let last = self.clock <= 5 || (self.clock <= 16 && self.timeouts[self.poss] == 0 && self.period != 5);
        helps && last && distance <= 60
    }

    fn fourth_down(&mut self) -> Fourth {
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

    fn pass_prob(&self) -> f64 {
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

    // ------------------------------------------------------------ plays

    fn run_play(&mut self) -> Next {
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

    fn kneel(&mut self) -> Next {
        let mut row = self.snap_row(Kind::Kneel);
        let gain = if self.ball_on > 1 { -1 } else { 0 };
        row.gain = Some(gain);
        self.use_clock(2, true);
        let next = self.advance(&mut row, gain);
        self.push(row);
        next
    }

    fn spike(&mut self) -> Next {
        let mut row = self.snap_row(Kind::Spike);
        row.passer = Some(self.passer_name().to_string());
        row.gain = Some(0);
        self.down += 1;
        self.use_clock(1, false);
        self.push(row);
        Next::Scrimmage
    }

    fn penalty(&mut self) -> Next {
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

    fn passer_id(&self) -> usize {
        self.g.qb_ids[self.poss][self.qb[self.poss]]
    }
    fn passer_name(&self) -> &str {
        self.g.qb_names[self.poss][self.qb[self.poss]]
    }

    fn drop_probs(&self, late_close: bool) -> DropProbs {
        let (off, def) = (self.poss, self.def());
        let s = self.g.qb_skills[off][self.qb[off]];
        let (so, sd) = (&self.strength[off], &self.strength[def]);
        let m = self.margin();
        let hurry = self.hurry(off);
        let desperate = self.period >= 4 && hurry && m < 0;
        let prevent = (self.period >= 4 && m <= -9 && self.clock <= 300) || self.soft_defense();
        let long = self.down >= 3 && self.to_go >= 7;
        let poise = if late_close { s.poise } else { 0.0 };
        let dist = 100 - self.ball_on;

        let cramped = if self.backed_up() { BACKED_UP_SACK_LOGIT } else { 0.0 };
        let mut sack = SACK_LOGIT + cramped + sd.pass_rush - so.protection - s.sack_avoidance - 0.5 * poise;
        if long {
            sack += 0.35;
        }
        if desperate {
            sack += 0.2;
        }
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
        let mut int_shift = s.interceptions + 0.8 * (sd.pass_def - so.pass_off) - poise;
        if desperate {
            int_shift += 0.35;
        }
        let mut comp = [0.0; BANDS];
        let mut int = [0.0; BANDS];
        for c in 0..BANDS {
            let soft = if prevent && c <= 2 { 0.35 } else { 0.0 };
            int[c] = logistic(INT_LOGIT[c] + int_shift);
            comp[c] = (1.0 - int[c]) * logistic(COMP_LOGIT[c] + comp_shift + soft);
        }
        DropProbs { sack: logistic(sack), scramble: logistic(scr), band, comp, int }
    }

    fn dropback(&mut self) -> Next {
        let off = self.poss;
        let late_close = late_and_close(self.period, self.clock, self.margin());
        let pr = self.drop_probs(late_close);
        let mut exp_comp = 0.0;
        let mut exp_int = 0.0;
        for c in 0..BANDS {
            exp_comp += pr.band[c] * pr.comp[c];
            exp_int += pr.band[c] * pr.int[c];
        }
        let pid = self.passer_id();
        self.truth.record(
            pid,
            self.g.team_ids[off],
            self.g.season,
            late_close,
            DropbackTruth { complete: exp_comp, interception: exp_int, sack: pr.sack, scramble: (1.0 - pr.sack) * pr.scramble },
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

    fn sack(&mut self, name: String) -> Next {
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

    fn scramble(&mut self, name: String) -> Next {
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

    fn pass(&mut self, name: String, pr: &DropProbs) -> Next {
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

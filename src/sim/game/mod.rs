//! One game, snap by snap: kickoffs, downs, runs, dropbacks, kicks, tries, the
//! clock (play clock, two-minute warning, timeouts, spikes, kneels), overtime.
//! Writes `PlayRow`s and feeds the truth book; keeps no state between games.
//! Here: the engine's state, the snap row and scoring; the clock, kicks,
//! pre-snap decisions, scrimmage plays and tuning constants have a file each.

use super::draw::{chance, exp_mean, int_in, logistic, normal, pick, unit, SimRng};
use super::league::{PasserSkills, TeamStrength};
use super::shift::LateShift;
use super::truth::{late_and_close, DropbackTruth, TruthBook};
use crate::playfile::{Kind, PlayRow};
use tuning::*;

mod clock;
mod decisions;
mod kicks;
mod scrimmage;
mod tuning;

pub use tuning::{KICK_TRY_SPOT, TWO_POINT_SPOT};

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
    /// Each dressed passer's depth-tilt shift when trailing late (`habits`).
    pub throw_short: [[f64; 2]; 2],
    /// Each dressed passer's true late-and-close shifts (0 when off).
    pub late_shift: [[LateShift; 2]; 2],
    pub home_line: f64,
    /// The overtime rules of the game's season.
    pub overtime: crate::overtime::Rules,
}

/// Play one game: rows are appended to `out`; returns the passer ids hurt.
pub(crate) fn play_game(g: &GameSetup, rng: &mut SimRng, out: &mut Vec<PlayRow>, truth: &mut TruthBook) -> Vec<usize> {
    play_game_with(g, rng, out, truth, None)
}

fn play_game_with<'s>(
    g: &'s GameSetup,
    rng: &'s mut SimRng,
    out: &'s mut Vec<PlayRow>,
    truth: &'s mut TruthBook,
    probe: Option<Probe<'s>>,
) -> Vec<usize> {
    let st = State {
        strength: day_strength(g, rng),
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
        ot_answered: false,
        injured: Vec::new(),
    };
    let mut eng = Engine { g, rng, out, truth, probe, st };
    eng.run();
    eng.st.injured
}

/// Both clubs' strengths on the day: the home boost and a fresh draw of
/// game-day form, what no pregame line can see.
fn day_strength(g: &GameSetup, rng: &mut SimRng) -> [TeamStrength; 2] {
    let mut strength = g.strength;
    let e = g.home_edge;
    let h = &mut strength[0];
    h.run_off += e * HOME_BOOST.run_off;
    h.run_def += e * HOME_BOOST.run_def;
    h.pass_off += e * HOME_BOOST.pass_off;
    h.pass_def += e * HOME_BOOST.pass_def;
    h.protection += e * HOME_BOOST.protection;
    h.pass_rush += e * HOME_BOOST.pass_rush;
    for s in &mut strength {
        let (off, def) = (normal(rng), normal(rng));
        s.run_off += FORM_RUN * off;
        s.pass_off += FORM_PASS * off;
        s.run_def += FORM_RUN * def;
        s.pass_def += FORM_PASS * def;
    }
    strength
}

/// The engine at a snap: its state and what comes next. Playing on from it
/// with another generator gives another way the game could end.
#[derive(Clone)]
pub(crate) struct Snapshot {
    st: State,
    next: Next,
}

impl Snapshot {
    /// The snap's `seq` in the game's rows (from 1).
    pub(crate) fn seq(&self) -> i32 {
        self.st.seq + 1
    }

    pub(crate) fn period(&self) -> i32 {
        self.st.period
    }

    pub(crate) fn clock(&self) -> i32 {
        self.st.clock
    }

    /// Home score minus away score.
    pub(crate) fn home_margin(&self) -> i32 {
        self.st.score[0] - self.st.score[1]
    }
}

/// Told before every snap of a game (`play_game_probed`).
pub(crate) type Probe<'p> = &'p mut dyn FnMut(&Snapshot);

/// `play_game`, calling `probe` before every snap with the engine's state
/// (the probe draws nothing from `rng`, so the game plays out as without it).
pub(crate) fn play_game_probed<'s>(
    g: &'s GameSetup,
    rng: &'s mut SimRng,
    out: &'s mut Vec<PlayRow>,
    truth: &'s mut TruthBook,
    probe: Probe<'s>,
) -> Vec<usize> {
    play_game_with(g, rng, out, truth, Some(probe))
}

/// Play the rest of the game from `snap` with `rng` (its rows go to `out`
/// and its dropbacks to `truth`; pass scratch ones); returns the final
/// score, home first.
/// With `fresh_form` the day's form is drawn again from `rng` first, as if
/// only the clubs' strengths were known, not how they are playing today.
pub(crate) fn play_on(
    g: &GameSetup,
    snap: &Snapshot,
    fresh_form: bool,
    rng: &mut SimRng,
    out: &mut Vec<PlayRow>,
    truth: &mut TruthBook,
) -> [i32; 2] {
    let mut st = snap.st.clone();
    if fresh_form {
        st.strength = day_strength(g, rng);
    }
    let mut eng = Engine { g, rng, out, truth, probe: None, st };
    eng.play_from(snap.next, true);
    eng.st.score
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
    probe: Option<Probe<'s>>,
    st: State,
}

/// The game so far: everything the engine carries from snap to snap.
#[derive(Clone)]
struct State {
    /// Strengths with the home boost and the game-day form applied.
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
    /// Both possess: the second side's possession has scored (its try
    /// taken), so a lead now ends the game.
    ot_answered: bool,
    injured: Vec<usize>,
}

/// The engine's files read and write the state as `self.clock`, `self.score`.
impl std::ops::Deref for Engine<'_, '_> {
    type Target = State;
    fn deref(&self) -> &State {
        &self.st
    }
}

impl std::ops::DerefMut for Engine<'_, '_> {
    fn deref_mut(&mut self) -> &mut State {
        &mut self.st
    }
}

impl Engine<'_, '_> {
    fn run(&mut self) {
        let receiver = usize::from(chance(self.rng, 0.5));
        self.opening_receiver = receiver;
        self.play_from(Next::Kickoff { kicker: 1 - receiver, spot: KICKOFF_SPOT }, false);
    }

    /// Play until the game ends; `at_snap`: the state is already at the
    /// snap of `next` (the clock between snaps has run).
    fn play_from(&mut self, mut next: Next, mut at_snap: bool) {
        loop {
            if !std::mem::take(&mut at_snap) {
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
            }
            if let Some(probe) = self.probe.as_mut() {
                probe(&Snapshot { st: self.st.clone(), next });
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

    fn offense_touchdown(&mut self, row: &mut PlayRow) -> Next {
        row.points = 6;
        let off = self.poss;
        self.score[off] += 6;
        self.running = false;
        self.note_score(false);
        if self.period >= 5 {
            return self.ot_after_touchdown();
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
            return self.ot_after_touchdown();
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
}

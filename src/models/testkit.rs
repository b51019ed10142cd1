//! A crude seeded league for the models' own tests: drives of runs and
//! passes, punts, field goals, tries and kickoffs, a clock and a line.
//! Not the project's simulator; only good enough to exercise the fits.

use crate::playfile::{Kind, PlayRow};
use crate::plays::{Plays, Source};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

struct G {
    rows: Vec<PlayRow>,
    key: String,
    season: i32,
    week: i32,
    home: String,
    away: String,
    line: f64,
    strength: [f64; 2], // home, away
    score: [i32; 2],
    timeouts: [i32; 2],
    period: i32,
    clock: i32,
}

impl G {
    fn push(
        &mut self,
        off: usize,
        down: Option<(i32, i32)>,
        ball_on: i32,
        kind: Kind,
        rng: &mut ChaCha8Rng,
    ) -> usize {
        let names = [self.home.clone(), self.away.clone()];
        let seq = self.rows.len() as i32 + 1;
        self.rows.push(PlayRow {
            game: self.key.clone(),
            season: self.season,
            week: self.week,
            home: self.home.clone(),
            away: self.away.clone(),
            seq,
            period: self.period,
            clock: self.clock,
            offense: names[off].clone(),
            defense: names[1 - off].clone(),
            off_score: self.score[off],
            def_score: self.score[1 - off],
            off_timeouts: self.timeouts[off],
            def_timeouts: self.timeouts[1 - off],
            down: down.map(|d| d.0),
            to_go: down.map(|d| d.1),
            ball_on,
            kind,
            passer: kind.needs_passer().then(|| format!("{}-QB", names[off])),
            complete: None,
            intercepted: None,
            air_yards: None,
            gain: Some(0),
            fumble_lost: None,
            touchback: None,
            points: 0,
            home_line: Some(self.line),
        });
        let _ = rng;
        self.rows.len() - 1
    }

    /// Run the clock; true when the half (or game) ended.
    fn tick(&mut self, secs: i32) -> bool {
        self.clock -= secs;
        if self.clock <= 0 {
            self.clock = 900;
            self.period += 1;
            if self.period == 3 {
                self.timeouts = [3, 3];
            }
            return self.period == 3 || self.period == 5;
        }
        false
    }
}

/// `games` games over `seasons` seasons among 8 teams.
pub fn league(games: usize, seasons: i32, seed: u64) -> Plays {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let teams: Vec<String> = (0..8).map(|t| format!("T{t}")).collect();
    let mut rows = Vec::new();
    let per_season = games.div_ceil(seasons as usize);
    for gi in 0..games {
        let h = rng.random_range(0..8);
        let mut a = rng.random_range(0..7);
        if a >= h {
            a += 1;
        }
        let sh: f64 = rng.random_range(-1.0..1.0);
        let sa: f64 = rng.random_range(-1.0..1.0);
        let mut g = G {
            rows: Vec::new(),
            key: format!("G{gi:06}"),
            season: 2000 + (gi / per_season) as i32,
            week: (gi % per_season) as i32 / 4 + 1,
            home: teams[h].clone(),
            away: teams[a].clone(),
            line: ((sh - sa) * 8.0 + 2.0).round(),
            strength: [sh + 0.12, sa],
            score: [0, 0],
            timeouts: [3, 3],
            period: 1,
            clock: 900,
        };
        play_game(&mut g, &mut rng);
        rows.extend(g.rows);
    }
    let sources = (0..rows.len())
        .map(|i| Source {
            file: 0,
            row: i as u32 + 1,
        })
        .collect();
    Plays::from_rows(vec!["synthetic".into()], &rows, sources)
}

fn play_game(g: &mut G, rng: &mut ChaCha8Rng) {
    // kicking team on the opening kickoff; second half the other one
    let first_kick = rng.random_range(0..2usize);
    let mut kick = first_kick;
    let mut need_kickoff = true;
    let mut off = 0usize;
    let (mut down, mut to_go, mut ball) = (1, 10, 25);
    loop {
        if g.period >= 5 {
            break;
        }
        if need_kickoff {
            let i = g.push(kick, None, 35, Kind::Kickoff, rng);
            let tb = rng.random::<f64>() < 0.6;
            g.rows[i].touchback = Some(tb);
            off = 1 - kick;
            ball = if tb { 25 } else { rng.random_range(10..40) };
            down = 1;
            to_go = 10;
            need_kickoff = false;
            let ended = g.tick(if tb { 0 } else { 6 });
            if ended {
                kick = 1 - first_kick;
                need_kickoff = true;
            }
            continue;
        }
        let edge = g.strength[off] - g.strength[1 - off];
        let kind;
        let mut gain: i32;
        let mut points = 0;
        let mut turnover = false;
        if down == 4 && ball >= 63 {
            kind = Kind::FieldGoal;
            let dist = 100 - ball + 17;
            let make = 1.0 / (1.0 + (-(6.0 - 0.11 * dist as f64)).exp());
            gain = 0;
            if rng.random::<f64>() < make {
                points = 3;
            } else {
                turnover = true;
            }
        } else if down == 4 && !(to_go <= 2 && ball > 45) {
            kind = Kind::Punt;
            gain = 0;
            turnover = true;
            ball = (ball + rng.random_range(35..50)).min(80);
        } else if rng.random::<f64>() < 0.55 {
            let air: i32 = rng.random_range(-3..25);
            let cp = 1.0 / (1.0 + (-(1.4 - 0.07 * air as f64 + 0.3 * edge)).exp());
            let complete = rng.random::<f64>() < cp;
            let int = !complete && rng.random::<f64>() < 0.05;
            let gain = if complete {
                (air + rng.random_range(0..8)).min(100 - ball)
            } else {
                0
            };
            let points = if complete && ball + gain >= 100 { 6 } else { 0 };
            let i = g.push(off, Some((down, to_go)), ball, Kind::Pass, rng);
            g.rows[i].air_yards = Some(air);
            g.rows[i].complete = Some(complete);
            g.rows[i].intercepted = Some(int);
            g.rows[i].gain = Some(gain);
            g.rows[i].points = points;
            finish(
                g,
                rng,
                &mut off,
                &mut down,
                &mut to_go,
                &mut ball,
                &mut kick,
                &mut need_kickoff,
                gain,
                points,
                int,
                Kind::Pass,
            );
            continue;
        } else {
            kind = Kind::Run;
            gain = rng.random_range(-3..9)
                + if rng.random::<f64>() < 0.05 + 0.02 * edge {
                    20
                } else {
                    0
                };
        }
        gain = gain.min(100 - ball);
        if kind == Kind::Run && ball + gain >= 100 {
            points = 6;
        }
        if kind == Kind::Run && ball + gain <= 0 {
            points = -2;
        }
        let i = g.push(off, Some((down, to_go)), ball, kind, rng);
        g.rows[i].gain = Some(gain);
        g.rows[i].points = points;
        finish(
            g,
            rng,
            &mut off,
            &mut down,
            &mut to_go,
            &mut ball,
            &mut kick,
            &mut need_kickoff,
            gain,
            points,
            turnover,
            kind,
        );
    }
}

#[allow(clippy::too_many_arguments)]
fn finish(
    g: &mut G,
    rng: &mut ChaCha8Rng,
    off: &mut usize,
    down: &mut i32,
    to_go: &mut i32,
    ball: &mut i32,
    kick: &mut usize,
    need_kickoff: &mut bool,
    gain: i32,
    points: i32,
    turnover: bool,
    kind: Kind,
) {
    if points > 0 {
        g.score[*off] += points;
    } else if points < 0 {
        g.score[1 - *off] -= points;
    }
    if points == 6 {
        // the try, at the same clock
        let two = rng.random::<f64>() < 0.1;
        let i = g.push(
            *off,
            None,
            if two { 98 } else { 85 },
            if two {
                Kind::TwoPoint
            } else {
                Kind::ExtraPoint
            },
            rng,
        );
        let good = rng.random::<f64>() < if two { 0.48 } else { 0.94 };
        let p = if good {
            if two {
                2
            } else {
                1
            }
        } else {
            0
        };
        g.rows[i].points = p;
        g.score[*off] += p;
    }
    let ended = g.tick(rng.random_range(20..42));
    if points != 0 {
        // the scoring team kicks; after a safety, the team that gave it up
        *kick = *off;
        *need_kickoff = true;
        if ended {
            *kick = if g.period == 3 {
                rng.random_range(0..2)
            } else {
                *kick
            };
        }
        return;
    }
    if ended {
        *need_kickoff = true;
        *kick = rng.random_range(0..2);
        return;
    }
    if turnover {
        *off = 1 - *off;
        *ball = match kind {
            Kind::Punt => 100 - *ball,
            Kind::FieldGoal => (100 - *ball).clamp(20, 80),
            _ => (100 - *ball).clamp(1, 99),
        };
        *down = 1;
        *to_go = 10;
        return;
    }
    *ball = (*ball + gain).clamp(1, 99);
    if gain >= *to_go {
        *down = 1;
        *to_go = 10.min(100 - *ball);
    } else {
        *to_go -= gain;
        *down += 1;
        if *down > 4 {
            *off = 1 - *off;
            *ball = 100 - *ball;
            *down = 1;
            *to_go = 10;
        }
    }
}

/// Every number in `v`'s JSON form, as bits in document order: two values
/// whose lists are equal read back bit for bit.
#[cfg(test)]
pub fn json_bits<T: serde::Serialize>(v: &T) -> Vec<u64> {
    fn numbers(v: &serde_json::Value, out: &mut Vec<u64>) {
        match v {
            serde_json::Value::Number(n) => out.push(n.as_f64().map(f64::to_bits).unwrap_or(0)),
            serde_json::Value::Array(xs) => xs.iter().for_each(|x| numbers(x, out)),
            serde_json::Value::Object(m) => m.values().for_each(|x| numbers(x, out)),
            _ => {}
        }
    }
    let mut out = Vec::new();
    numbers(&serde_json::to_value(v).expect("json"), &mut out);
    out
}

//! The demo league between games: clubs and their hidden strengths, passers
//! and their hidden skills, depth charts, injuries, the off-season (ageing,
//! retirements, releases, rookies, signings) and the weekly schedule.

use super::draw::{chance, int_in, normal, shuffle, unit, SimRng};
use super::names::{clubs, NameMaker};
use serde::Serialize;

pub(crate) const TEAMS: usize = 32;
pub(crate) const WEEKS: i32 = 17;

/// A club's hidden strengths. Run terms are yards per carry; pass terms are
/// logit shifts on completion (`pass_off`, `pass_def`) and on sacks
/// (`protection` lowers, `pass_rush` raises); `kicking` shifts field-goal
/// and extra-point logits; `pass_lean` shifts the play-call logit.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct TeamStrength {
    pub run_off: f64,
    pub run_def: f64,
    pub pass_off: f64,
    pub pass_def: f64,
    pub protection: f64,
    pub pass_rush: f64,
    pub kicking: f64,
    pub pass_lean: f64,
}

/// Spread of each strength across clubs (standard deviations).
const STRENGTH_SD: TeamStrength = TeamStrength {
    run_off: 0.40,
    run_def: 0.40,
    pass_off: 0.13,
    pass_def: 0.13,
    protection: 0.20,
    pass_rush: 0.20,
    kicking: 0.30,
    pass_lean: 0.20,
};

/// Year-to-year persistence of club strengths (AR(1) coefficient).
const STRENGTH_CARRY: f64 = 0.6;

/// A passer's hidden skills, all logit shifts except `arm` (tilts the depth
/// of his throws) and `scrambling` (logit of leaving the pocket).
/// `poise` applies only late and close (see `truth`): it adds to completion
/// and subtracts from interception and sack logits there.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct PasserSkills {
    pub accuracy: f64,
    pub interceptions: f64,
    pub sack_avoidance: f64,
    pub arm: f64,
    pub scrambling: f64,
    pub poise: f64,
}

impl PasserSkills {
    /// What a club's scouts weigh when ranking passers (roughly points per
    /// game of each skill; the home-line weights in `mod.rs` are the fitted ones).
    fn worth(&self) -> f64 {
        self.accuracy * 6.0 - self.interceptions * 3.0 + self.sack_avoidance * 2.0 + self.arm * 0.8
            + self.scrambling * 0.4
    }
}

pub(crate) struct Passer {
    pub name: String,
    pub skills: PasserSkills,
    pub age: i32,
    pub team: Option<usize>,
    /// Global week index from which he can play again.
    pub out_until: i32,
    pub retired: bool,
    pub rookie_season: i32,
    pub unsigned_seasons: u32,
}

pub(crate) struct Team {
    pub code: &'static str,
    pub city: String,
    pub nickname: String,
    /// Multiplier on the league's home boost (around 1).
    pub home_edge: f64,
    pub strength: TeamStrength,
    /// Passer ids in depth order; the first two healthy ones dress.
    pub depth: Vec<usize>,
}

pub(crate) struct League {
    pub teams: Vec<Team>,
    pub passers: Vec<Passer>,
    /// The season being played (or prepared).
    pub season: i32,
    rng: SimRng,
    names: NameMaker,
}

impl League {
    pub(crate) fn new(mut rng: SimRng, first_season: i32) -> League {
        let mut names = NameMaker::new();
        let mut teams: Vec<Team> = clubs()
            .into_iter()
            .map(|(code, city, nickname)| Team {
                code,
                city,
                nickname,
                home_edge: (1.0 + 0.25 * normal(&mut rng)).clamp(0.4, 1.6),
                strength: draw_strength(&mut rng),
                depth: Vec::new(),
            })
            .collect();
        // 80 passers: the best-looking 32 start, the next 32 back up, the rest wait.
        let mut pool: Vec<Passer> = (0..80)
            .map(|_| {
                let age = int_in(&mut rng, 22, 35);
                Passer {
                    name: names.next(&mut rng),
                    skills: veteran_skills(&mut rng),
                    age,
                    team: None,
                    out_until: 0,
                    retired: false,
                    rookie_season: first_season - (age - 22).max(0),
                    unsigned_seasons: 0,
                }
            })
            .collect();
        let mut order: Vec<usize> = (0..pool.len()).collect();
        let looks: Vec<f64> = pool.iter().map(|p| p.skills.worth() + 0.8 * normal(&mut rng)).collect();
        order.sort_by(|&a, &b| looks[b].total_cmp(&looks[a]));
        let mut slots: Vec<usize> = (0..TEAMS).collect();
        shuffle(&mut rng, &mut slots);
        for (rank, &pid) in order.iter().enumerate().take(2 * TEAMS) {
            let t = slots[rank % TEAMS];
            teams[t].depth.push(pid);
            pool[pid].team = Some(t);
        }
        League { teams, passers: pool, season: first_season, rng, names }
    }

    /// Off-season before `season` (nothing on the first one): strengths drift,
    /// passers age, some retire or are released, rookies arrive, clubs sign.
    pub(crate) fn offseason(&mut self, season: i32) {
        self.season = season;
        let rng = &mut self.rng;
        let keep = (1.0 - STRENGTH_CARRY * STRENGTH_CARRY).sqrt();
        for t in &mut self.teams {
            let fresh = draw_strength(rng);
            let s = &mut t.strength;
            s.run_off = STRENGTH_CARRY * s.run_off + keep * fresh.run_off;
            s.run_def = STRENGTH_CARRY * s.run_def + keep * fresh.run_def;
            s.pass_off = STRENGTH_CARRY * s.pass_off + keep * fresh.pass_off;
            s.pass_def = STRENGTH_CARRY * s.pass_def + keep * fresh.pass_def;
            s.protection = STRENGTH_CARRY * s.protection + keep * fresh.protection;
            s.pass_rush = STRENGTH_CARRY * s.pass_rush + keep * fresh.pass_rush;
            s.kicking = STRENGTH_CARRY * s.kicking + keep * fresh.kicking;
            s.pass_lean = STRENGTH_CARRY * s.pass_lean + keep * fresh.pass_lean;
        }
        // ageing, development, retirement
        for pid in 0..self.passers.len() {
            let p = &mut self.passers[pid];
            if p.retired {
                continue;
            }
            p.age += 1;
            p.out_until = 0;
            develop(rng, p);
            let starter = p.team.is_some_and(|t| self.teams[t].depth.first() == Some(&pid));
            let age_term = (0.12 * (p.age - 33) as f64).max(0.0);
            let p_retire = if p.team.is_none() {
                0.25 + 0.15 * p.unsigned_seasons as f64 + age_term
            } else if starter {
                age_term
            } else {
                0.04 + age_term
            };
            if chance(rng, p_retire.min(0.95)) || p.age >= 41 {
                p.retired = true;
                p.team = None;
            }
        }
        // releases and trades into the open pool
        for t in 0..TEAMS {
            let depth = std::mem::take(&mut self.teams[t].depth);
            let mut kept = Vec::new();
            for (slot, pid) in depth.into_iter().enumerate() {
                let p = &mut self.passers[pid];
                if p.retired {
                    continue;
                }
                let release = match slot {
                    0 => 0.08,
                    1 => 0.22,
                    _ => 1.0,
                };
                if chance(rng, release) {
                    p.team = None;
                } else {
                    kept.push(pid);
                }
            }
            self.teams[t].depth = kept;
        }
        for p in &mut self.passers {
            if !p.retired && p.team.is_none() {
                p.unsigned_seasons += 1;
            }
        }
        // rookies
        for _ in 0..10 {
            let name = self.names.next(rng);
            let skills = rookie_skills(rng);
            self.passers.push(Passer {
                name,
                skills,
                age: int_in(rng, 21, 23),
                team: None,
                out_until: 0,
                retired: false,
                rookie_season: season,
                unsigned_seasons: 0,
            });
        }
        // signings: fill every depth chart to two, upgrade weak starters
        let mut order: Vec<usize> = (0..TEAMS).collect();
        shuffle(rng, &mut order);
        for &t in &order {
            while self.teams[t].depth.len() < 2 {
                let Some(pid) = self.best_free_agent(None) else { break };
                self.sign(t, pid);
            }
            let starter = self.teams[t].depth[0];
            let bar = self.passers[starter].skills.worth() + 0.6;
            if let Some(pid) = self.best_free_agent(Some(bar)) {
                // the old starter becomes the backup; the old backup is let go
                if let Some(old_backup) = self.teams[t].depth.pop() {
                    self.passers[old_backup].team = None;
                }
                self.sign(t, pid);
                let d = &mut self.teams[t].depth;
                let last = d.len() - 1;
                d.swap(0, last);
            }
        }
        // each club starts whoever looks better in camp
        for t in 0..TEAMS {
            let d = &self.teams[t].depth;
            if d.len() >= 2 {
                let a = self.passers[d[0]].skills.worth() + 0.5 * normal(&mut self.rng) + 0.3; // incumbency
                let b = self.passers[d[1]].skills.worth() + 0.5 * normal(&mut self.rng);
                if b > a {
                    self.teams[t].depth.swap(0, 1);
                }
            }
        }
    }

    /// The free agent who looks best (scouting noise), optionally only if he
    /// looks better than `bar`. Creates a journeyman when the pool is empty
    /// and no bar is set.
    fn best_free_agent(&mut self, bar: Option<f64>) -> Option<usize> {
        let mut best: Option<(usize, f64)> = None;
        for (pid, p) in self.passers.iter().enumerate() {
            if p.retired || p.team.is_some() {
                continue;
            }
            let look = p.skills.worth() + 0.6 * normal(&mut self.rng) - 0.05 * (p.age - 28).max(0) as f64;
            if best.is_none_or(|(_, b)| look > b) {
                best = Some((pid, look));
            }
        }
        match (best, bar) {
            (Some((pid, look)), Some(bar)) => (look > bar).then_some(pid),
            (Some((pid, _)), None) => Some(pid),
            (None, Some(_)) => None,
            (None, None) => {
                let name = self.names.next(&mut self.rng);
                let mut skills = veteran_skills(&mut self.rng);
                skills.accuracy -= 0.15;
                let age = int_in(&mut self.rng, 25, 31);
                self.passers.push(Passer {
                    name,
                    skills,
                    age,
                    team: None,
                    out_until: 0,
                    retired: false,
                    rookie_season: self.season,
                    unsigned_seasons: 0,
                });
                Some(self.passers.len() - 1)
            }
        }
    }

    fn sign(&mut self, team: usize, pid: usize) {
        let p = &mut self.passers[pid];
        p.team = Some(team);
        p.unsigned_seasons = 0;
        self.teams[team].depth.push(pid);
    }

    /// The two passers who dress for `team` in global week `week`: the first
    /// two healthy ones on the depth chart, signing free agents if needed.
    pub(crate) fn dress(&mut self, team: usize, week: i32) -> [usize; 2] {
        loop {
            let healthy: Vec<usize> = self.teams[team]
                .depth
                .iter()
                .copied()
                .filter(|&pid| self.passers[pid].out_until <= week)
                .take(2)
                .collect();
            if healthy.len() == 2 {
                return [healthy[0], healthy[1]];
            }
            match self.best_free_agent(None) {
                Some(pid) => self.sign(team, pid),
                None => unreachable!("best_free_agent without a bar always returns a passer"),
            }
        }
    }

    /// A passer hurt in a game in global week `week`: out for some games.
    pub(crate) fn injure(&mut self, pid: usize, week: i32) {
        let missed = match unit(&mut self.rng) {
            u if u < 0.30 => 1,
            u if u < 0.50 => 2,
            u if u < 0.65 => 3,
            u if u < 0.77 => 4,
            u if u < 0.87 => 6,
            u if u < 0.94 => 9,
            _ => 40,
        };
        self.passers[pid].out_until = week + missed + 1;
    }

    /// The season's 17 weeks of 16 games, `(home, away)` team indices: the
    /// circle method on a shuffled club order gives the pairings; hosts go to
    /// the club with fewer home games so far, then a repair pass leaves every
    /// club 8 or 9 home games.
    pub(crate) fn schedule(&mut self) -> Vec<Vec<(usize, usize)>> {
        let mut order: Vec<usize> = (0..TEAMS).collect();
        shuffle(&mut self.rng, &mut order);
        let fixed = order[TEAMS - 1];
        let ring: Vec<usize> = order[..TEAMS - 1].to_vec();
        let n = ring.len(); // 31
        let first_round = int_in(&mut self.rng, 0, n as i32 - 1) as usize;
        let mut hosted = [0u32; TEAMS];
        let mut weeks: Vec<Vec<(usize, usize)>> = (0..WEEKS as usize)
            .map(|w| {
                let r = (first_round + w) % n;
                let at = |i: usize| ring[(i + r) % n];
                let mut pairs = vec![(fixed, at(0))];
                pairs.extend((1..TEAMS / 2).map(|i| (at(i), at(n - i))));
                pairs
                    .into_iter()
                    .map(|(a, b)| {
                        let a_hosts = match hosted[a].cmp(&hosted[b]) {
                            std::cmp::Ordering::Less => true,
                            std::cmp::Ordering::Greater => false,
                            std::cmp::Ordering::Equal => chance(&mut self.rng, 0.5),
                        };
                        let (h, v) = if a_hosts { (a, b) } else { (b, a) };
                        hosted[h] += 1;
                        (h, v)
                    })
                    .collect()
            })
            .collect();
        // repair: flip a game from a club with 10+ home games to one with 8 or fewer
        for _ in 0..200 {
            let Some(over) = (0..TEAMS).find(|&t| hosted[t] >= 10) else { break };
            let flip = weeks
                .iter()
                .enumerate()
                .flat_map(|(w, g)| g.iter().enumerate().map(move |(k, &p)| (w, k, p)))
                .find(|&(_, _, (h, v))| h == over && hosted[v] <= 8);
            let Some((w, k, (h, v))) = flip else { break };
            weeks[w][k] = (v, h);
            hosted[h] -= 1;
            hosted[v] += 1;
        }
        for t in 0..TEAMS {
            while hosted[t] <= 7 {
                let flip = weeks
                    .iter()
                    .enumerate()
                    .flat_map(|(w, g)| g.iter().enumerate().map(move |(k, &p)| (w, k, p)))
                    .find(|&(_, _, (h, v))| v == t && hosted[h] >= 9);
                let Some((w, k, (h, v))) = flip else { break };
                weeks[w][k] = (v, h);
                hosted[h] -= 1;
                hosted[v] += 1;
            }
        }
        weeks
    }
}

fn draw_strength(rng: &mut SimRng) -> TeamStrength {
    let s = STRENGTH_SD;
    TeamStrength {
        run_off: s.run_off * normal(rng),
        run_def: s.run_def * normal(rng),
        pass_off: s.pass_off * normal(rng),
        pass_def: s.pass_def * normal(rng),
        protection: s.protection * normal(rng),
        pass_rush: s.pass_rush * normal(rng),
        kicking: s.kicking * normal(rng),
        pass_lean: s.pass_lean * normal(rng),
    }
}

fn veteran_skills(rng: &mut SimRng) -> PasserSkills {
    PasserSkills {
        accuracy: 0.22 * normal(rng),
        interceptions: 0.22 * normal(rng),
        sack_avoidance: 0.25 * normal(rng),
        arm: 0.5 * normal(rng),
        scrambling: 0.6 * normal(rng),
        poise: 0.15 * normal(rng),
    }
}

fn rookie_skills(rng: &mut SimRng) -> PasserSkills {
    PasserSkills {
        accuracy: -0.12 + 0.24 * normal(rng),
        interceptions: 0.10 + 0.22 * normal(rng),
        sack_avoidance: -0.10 + 0.25 * normal(rng),
        arm: 0.10 + 0.5 * normal(rng),
        scrambling: 0.20 + 0.6 * normal(rng),
        poise: 0.15 * normal(rng),
    }
}

/// One year of growth or decline.
fn develop(rng: &mut SimRng, p: &mut Passer) {
    let dev = match p.age {
        ..=25 => 0.05,
        26..=29 => 0.015,
        30..=32 => -0.01,
        a => -0.04 - 0.01 * (a - 33) as f64,
    };
    let s = &mut p.skills;
    s.accuracy += dev + 0.04 * normal(rng);
    s.interceptions += -0.7 * dev + 0.04 * normal(rng);
    s.sack_avoidance += 0.5 * dev + 0.05 * normal(rng);
    s.arm += if p.age >= 31 { -0.06 } else { 0.02 } + 0.05 * normal(rng);
    s.scrambling += if p.age >= 29 { -0.08 } else { 0.0 } + 0.06 * normal(rng);
    s.poise += 0.03 * normal(rng);
}

//! Situations: a set of filters on scored snaps, read from (and written back
//! to) query parameters in words (`params::PARAMS`), plus the named presets a
//! staff starts from. Knows nothing about HTTP or HTML; the split engine
//! applies it.

pub mod params;
mod preset;
mod result;
pub mod tags;
pub mod values;

use crate::plays::Plays;
use params::{check_key, parse_group, parse_preset, parse_quarters, parse_results, show_quarters, Field};
use serde::Serialize;
use std::fmt;
use values::{err, parse_int_list, parse_name, parse_probability, parse_range, show_list, show_probability, show_range};

pub use params::{decode_pairs, readme_table, ParamSpec, PARAMS};
pub use preset::Preset;
pub use result::{PlayResult, RESULTS};
pub use tags::{TagFilter, TagMatch};

/// An inclusive range; either end may be open.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Default)]
pub struct Range {
    pub lo: Option<f64>,
    pub hi: Option<f64>,
}

impl Range {
    pub fn new(lo: Option<f64>, hi: Option<f64>) -> Range {
        Range { lo, hi }
    }
    pub fn contains(&self, x: f64) -> bool {
        self.lo.is_none_or(|lo| x >= lo) && self.hi.is_none_or(|hi| x <= hi)
    }
}

/// Whether the offense is at home or away.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Site {
    Home,
    Away,
}

/// What a split table's rows are: passers (the default), offenses or
/// defenses. Each row's numbers come from its own snaps in the situation,
/// season by season (passer-seasons, offense-seasons, defense-seasons).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum Group {
    #[default]
    Passer,
    Offense,
    Defense,
}

impl Group {
    pub const ALL: [Group; 3] = [Group::Passer, Group::Offense, Group::Defense];

    /// As written in links (`group=`).
    pub fn key(self) -> &'static str {
        match self {
            Group::Passer => "passer",
            Group::Offense => "offense",
            Group::Defense => "defense",
        }
    }

    pub fn parse(v: &str) -> Option<Group> {
        Group::ALL.into_iter().find(|g| g.key().eq_ignore_ascii_case(v.trim()))
    }

    /// A row is a team (offense or defense), not a passer.
    pub fn is_team(self) -> bool {
        self != Group::Passer
    }

    /// The filter that names a row of this grouping (`passer`, `team` for
    /// the offense, `opponent` for the defense): in a table it picks the
    /// row shown, never the snaps the league is measured on.
    pub fn row_field(self) -> Field {
        match self {
            Group::Passer => Field::Passer,
            Group::Offense => Field::Team,
            Group::Defense => Field::Opponent,
        }
    }
}

/// Period code for "any overtime period" in `Situation::periods`.
pub const OT: i32 = 5;

/// A situation: every filter is optional (absent = no restriction).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Situation {
    /// The preset this started from, if any (for naming and the URL).
    pub preset: Option<Preset>,
    /// The one-score bound the preset used.
    pub one_score: i32,
    /// Periods 1-4; `OT` (5) stands for every overtime period.
    pub periods: Option<Vec<i32>>,
    /// Seconds left in the half (in overtime: in the period).
    pub half_secs: Option<Range>,
    /// Seconds left in regulation; overtime snaps are not limited by it.
    pub game_secs: Option<Range>,
    /// Offense score minus defense score.
    pub margin: Option<Range>,
    pub downs: Option<Vec<i32>>,
    pub to_go: Option<Range>,
    /// Yards from the offense's own goal line (1-99).
    pub ball_on: Option<Range>,
    /// Offense win probability before the snap (0-1).
    pub wp: Option<Range>,
    pub off_timeouts: Option<Range>,
    pub def_timeouts: Option<Range>,
    pub seasons: Option<Vec<i32>>,
    pub weeks: Option<Range>,
    pub site: Option<Site>,
    /// Offense team code; matched without regard to case.
    pub offense: Option<String>,
    pub opponent: Option<String>,
    pub passer: Option<String>,
    /// What the snap ended in (any of these).
    pub results: Option<Vec<PlayResult>>,
    /// The staff's tags (`tag.NAME=...`), by name.
    pub tags: Vec<TagFilter>,
    /// What a split table's rows are (not a filter: `matches` ignores it).
    pub group: Group,
}

impl Default for Situation {
    fn default() -> Self {
        Situation {
            preset: None,
            one_score: 8,
            periods: None,
            half_secs: None,
            game_secs: None,
            margin: None,
            downs: None,
            to_go: None,
            ball_on: None,
            wp: None,
            off_timeouts: None,
            def_timeouts: None,
            seasons: None,
            weeks: None,
            site: None,
            offense: None,
            opponent: None,
            passer: None,
            results: None,
            tags: Vec::new(),
            group: Group::Passer,
        }
    }
}

/// A query parameter we could not use, and why.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SituationError {
    pub param: String,
    pub value: String,
    pub reason: String,
}

impl fmt::Display for SituationError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}={}: {}", self.param, self.value, self.reason)
    }
}
impl std::error::Error for SituationError {}

const CLOCK_HALF: values::Scale = values::clock(1800.0);
const CLOCK_GAME: values::Scale = values::clock(3600.0);
const MARGIN: values::Scale = values::plain(-200.0, 200.0);
const TO_GO: values::Scale = values::plain(1.0, 99.0);
const TIMEOUTS: values::Scale = values::plain(0.0, 3.0);
const WEEKS: values::Scale = values::plain(1.0, 30.0);

impl Situation {
    /// Parse query pairs. Every key must be in `PARAMS` (page settings
    /// included; they are left to the caller). An empty value means "as the
    /// preset says"; `any` lifts a restriction.
    pub fn from_query(pairs: &[(String, String)]) -> Result<Situation, SituationError> {
        for (k, v) in pairs {
            check_key(k, v)?;
        }
        let get = |f: Field| {
            let key = params::spec_of(f).map(|s| s.key).unwrap_or("");
            pairs.iter().rev().find(|(p, v)| p == key && !v.trim().is_empty()).map(|(_, v)| (key, v.as_str()))
        };
        let one_score = match get(Field::OneScore) {
            None => 8,
            Some((k, v)) => match v.trim() {
                "7" => 7,
                "8" => 8,
                _ => return Err(err(k, v, "expected 7 or 8")),
            },
        };
        let mut s = match get(Field::Preset) {
            None => Situation { one_score, ..Situation::default() },
            Some((k, v)) => parse_preset(k, v)?.situation(one_score),
        };
        for (k, v) in pairs {
            if v.trim().is_empty() {
                continue;
            }
            if let Some(spec) = params::spec(k) {
                s.set(spec.field, k, v)?;
            }
        }
        Ok(s)
    }

    /// Parse a query string (`a=1&b=2`, percent-encoded or not): the CLI's
    /// `--where` and the pages read the same language.
    pub fn from_query_string(query: &str) -> Result<Situation, SituationError> {
        Situation::from_query(&decode_pairs(query))
    }

    /// Set one filter from its written value (`any` clears it).
    fn set(&mut self, field: Field, k: &str, v: &str) -> Result<(), SituationError> {
        let any = v.trim().eq_ignore_ascii_case("any");
        macro_rules! put {
            ($f:ident, $parse:expr) => {
                self.$f = if any { None } else { Some($parse?) }
            };
        }
        match field {
            Field::Preset | Field::OneScore | Field::Page => {}
            Field::Group => self.group = parse_group(k, v)?,
            Field::Quarters => put!(periods, parse_quarters(k, v)),
            Field::HalfClock => put!(half_secs, parse_range(k, v, &CLOCK_HALF)),
            Field::GameClock => put!(game_secs, parse_range(k, v, &CLOCK_GAME)),
            Field::Margin => put!(margin, parse_range(k, v, &MARGIN)),
            Field::Downs => put!(downs, parse_int_list(k, v, 1, 4)),
            Field::ToGo => put!(to_go, parse_range(k, v, &TO_GO)),
            Field::BallOn => {
                // A `+` typed into an address bar arrives as a space.
                let v = v.trim_end().replace(' ', "+");
                put!(ball_on, parse_range(k, &v, &values::YARD_LINE))
            }
            Field::WinProb => put!(wp, parse_probability(k, v)),
            Field::Timeouts => put!(off_timeouts, parse_range(k, v, &TIMEOUTS)),
            Field::DefenseTimeouts => put!(def_timeouts, parse_range(k, v, &TIMEOUTS)),
            Field::Seasons => put!(seasons, parse_int_list(k, v, 1, 9999)),
            Field::Weeks => put!(weeks, parse_range(k, v, &WEEKS)),
            Field::Site => {
                let site = match v.trim().to_ascii_lowercase().as_str() {
                    "home" => Ok(Site::Home),
                    "away" => Ok(Site::Away),
                    _ => Err(err(k, v, "expected home, away or any")),
                };
                put!(site, site)
            }
            Field::Team => put!(offense, parse_name(k, v)),
            Field::Opponent => put!(opponent, parse_name(k, v)),
            Field::Passer => put!(passer, parse_name(k, v)),
            Field::Results => put!(results, parse_results(k, v)),
            Field::Tag => {
                let name = tags::tag_name(k).unwrap_or("").to_ascii_lowercase();
                self.tags.retain(|t| t.name != name);
                if !any {
                    self.tags.push(tags::parse_tag(k, v)?);
                    self.tags.sort_by(|a, b| a.name.cmp(&b.name));
                }
            }
        }
        Ok(())
    }

    /// One filter as written in links; None when it does not restrict.
    pub fn show(&self, field: Field) -> Option<String> {
        let plain = |r: &Range| show_range(r, values::num);
        match field {
            Field::Preset => self.preset.map(|p| p.key().to_string()),
            Field::OneScore => Some(self.one_score.to_string()),
            Field::Page => None,
            Field::Quarters => self.periods.as_deref().map(show_quarters),
            Field::HalfClock => self.half_secs.as_ref().map(|r| show_range(r, values::show_clock)),
            Field::GameClock => self.game_secs.as_ref().map(|r| show_range(r, values::show_clock)),
            Field::Margin => self.margin.as_ref().map(plain),
            Field::Downs => self.downs.as_deref().map(|v| show_list(v, |x| x.to_string())),
            Field::ToGo => self.to_go.as_ref().map(plain),
            Field::BallOn => self.ball_on.as_ref().map(|r| show_range(r, values::show_yard_line)),
            Field::WinProb => self.wp.as_ref().map(show_probability),
            Field::Timeouts => self.off_timeouts.as_ref().map(plain),
            Field::DefenseTimeouts => self.def_timeouts.as_ref().map(plain),
            Field::Seasons => self.seasons.as_deref().map(|v| show_list(v, |x| x.to_string())),
            Field::Weeks => self.weeks.as_ref().map(plain),
            Field::Site => self.site.map(|s| match s {
                Site::Home => "home".to_string(),
                Site::Away => "away".to_string(),
            }),
            Field::Team => self.offense.clone(),
            Field::Opponent => self.opponent.clone(),
            Field::Passer => self.passer.clone(),
            Field::Results => self.results.as_deref().map(|v| show_list(v, |r| r.key().to_string())),
            // Several at once: `to_query` writes each.
            Field::Tag => None,
            Field::Group => (self.group != Group::Passer).then(|| self.group.key().to_string()),
        }
    }

    /// The situation its preset (or no preset) stands for, before any
    /// parameter changed it.
    pub fn base(&self) -> Situation {
        match self.preset {
            Some(p) => p.situation(self.one_score),
            None => Situation { one_score: self.one_score, ..Situation::default() },
        }
    }

    /// Back to query pairs: only what differs from the preset (or everything,
    /// without one), so `from_query(to_query(s)) == s`. A preset's
    /// restriction that was lifted is written `any`.
    pub fn to_query(&self) -> Vec<(String, String)> {
        let base = self.base();
        let mut q = Vec::new();
        for spec in PARAMS {
            let value = match spec.field {
                Field::Preset => self.show(Field::Preset),
                Field::OneScore => (self.one_score != 8).then(|| self.one_score.to_string()),
                Field::Page => None,
                Field::Tag => {
                    q.extend(self.tags.iter().map(|t| (t.key(), t.show())));
                    None
                }
                f => {
                    let (mine, theirs) = (self.show(f), base.show(f));
                    (mine != theirs).then(|| mine.unwrap_or_else(|| "any".to_string()))
                }
            };
            if let Some(v) = value {
                q.push((spec.key.to_string(), v));
            }
        }
        q
    }

    /// Every restriction as query pairs (preset-derived ones included), for
    /// showing what a preset means.
    pub fn to_query_full(&self) -> Vec<(String, String)> {
        Situation { preset: None, ..self.clone() }.to_query()
    }

    /// The same situation with another season list (used for stability and
    /// season-by-season views).
    pub fn with_seasons(&self, seasons: Option<Vec<i32>>) -> Situation {
        Situation { seasons, ..self.clone() }
    }

    /// The name of the row the table shows (`passer`, or for teams `team` /
    /// `opponent` by the grouping), if one is picked.
    pub fn row_pick(&self) -> Option<&str> {
        match self.group {
            Group::Passer => self.passer.as_deref(),
            Group::Offense => self.offense.as_deref(),
            Group::Defense => self.opponent.as_deref(),
        }
    }

    /// The snaps a grouped table is measured on: the filter that picks its
    /// row (`row_pick`) lifted, every other filter kept.
    pub fn without_row_pick(&self) -> Situation {
        let mut s = self.clone();
        match self.group {
            Group::Passer => s.passer = None,
            Group::Offense => s.offense = None,
            Group::Defense => s.opponent = None,
        }
        s
    }

    /// Does snap `i` belong? `wp` is the offense's win probability before it.
    pub fn matches(&self, plays: &Plays, wp: &[f64], i: usize) -> bool {
        let period = plays.period[i];
        let within = |r: &Option<Range>, x: f64| r.as_ref().is_none_or(|r| r.contains(x));
        let listed = |l: &Option<Vec<i32>>, x: i32| l.as_ref().is_none_or(|l| l.contains(&x));
        listed(&self.periods, period.min(OT))
            && within(&self.half_secs, plays.secs_half[i] as f64)
            && (period >= 5 || within(&self.game_secs, plays.secs_game[i] as f64))
            && within(&self.margin, plays.margin[i] as f64)
            && listed(&self.downs, plays.down[i])
            && (self.to_go.is_none() || (plays.down[i] != 0 && within(&self.to_go, plays.to_go[i] as f64)))
            && within(&self.ball_on, plays.ball_on[i] as f64)
            && self.wp.as_ref().is_none_or(|r| wp.get(i).is_some_and(|&w| r.contains(w)))
            && within(&self.off_timeouts, plays.off_timeouts[i] as f64)
            && within(&self.def_timeouts, plays.def_timeouts[i] as f64)
            && listed(&self.seasons, plays.season[i])
            && within(&self.weeks, plays.week[i] as f64)
            && self.site.is_none_or(|site| plays.off_home[i] == (site == Site::Home))
            && self.offense.as_ref().is_none_or(|t| plays.teams[plays.offense[i] as usize].eq_ignore_ascii_case(t))
            && self.opponent.as_ref().is_none_or(|t| plays.teams[plays.defense[i] as usize].eq_ignore_ascii_case(t))
            && self.passer.as_ref().is_none_or(|p| plays.passer_name(i) == Some(p.as_str()))
            && self.results.as_ref().is_none_or(|rs| rs.iter().any(|r| r.of(plays, i)))
            && self.tags.iter().all(|t| t.matches(plays, i))
    }

    /// Every tag filter against the tags the file has (unknown tag or value:
    /// the refusal with the nearest one).
    pub fn check_tags(&self, plays: &Plays) -> Result<(), SituationError> {
        self.tags.iter().try_for_each(|t| t.check(plays))
    }

    /// The situation in words, for headers and the report.
    pub fn describe(&self) -> String {
        let mut parts: Vec<String> = Vec::new();
        if let Some(p) = self.preset {
            let mut label = p.label().to_string();
            if p.uses_one_score() {
                // "End of game, one score (8 points)", not "one score (one score = 8)"
                if label.contains("one score") {
                    label.push_str(&format!(" ({} points)", self.one_score));
                } else {
                    label.push_str(&format!(" (one score = {})", self.one_score));
                }
            }
            parts.push(label);
        }
        for (k, v) in self.to_query() {
            match params::spec(&k) {
                Some(spec) if spec.field == params::Field::Tag => parts.push(format!("{} {}", tags::tag_name(&k).unwrap_or(""), v)),
                Some(spec) if spec.field.is_filter() => parts.push(spec.words.replace("{}", &v)),
                _ => {}
            }
        }
        if parts.is_empty() {
            "Every snap".to_string()
        } else {
            parts.join("; ")
        }
    }
}

#[cfg(test)]
mod tests;

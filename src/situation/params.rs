//! The one table of query parameters. The parser (`Situation::from_query`),
//! canonical links (`to_query`), the explorer's filter form and its help,
//! `describe()`, the CLI's `--where` and README's parameter table are all
//! views of `PARAMS`; a key not in it is refused with the nearest known one.

use super::preset::Preset;
use super::result::PlayResult;
use super::values::{self, err, nearest};
use super::{Group, SituationError};

/// What a parameter sets.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Field {
    Preset,
    OneScore,
    Quarters,
    HalfClock,
    GameClock,
    Margin,
    Downs,
    ToGo,
    BallOn,
    WinProb,
    Timeouts,
    DefenseTimeouts,
    Seasons,
    Weeks,
    Site,
    Team,
    Opponent,
    Passer,
    Results,
    /// The staff's own columns: `tag.NAME` (one spec stands for every tag).
    Tag,
    /// What a table's rows are: passers, offenses or defenses (not a filter).
    Group,
    /// Not a filter: a page's own setting, read by `web::query`.
    Page,
}

impl Field {
    /// A filter on snaps (not the preset, its bound, or a page setting).
    pub fn is_filter(self) -> bool {
        !matches!(self, Field::Preset | Field::OneScore | Field::Group | Field::Page)
    }
}

/// One query parameter.
#[derive(Debug, Clone, Copy)]
pub struct ParamSpec {
    pub key: &'static str,
    pub field: Field,
    /// The filter form's label.
    pub label: &'static str,
    /// What it means (README, the form's tooltip, CLI help).
    pub help: &'static str,
    /// An example value (README).
    pub example: &'static str,
    /// The situation in words: `{}` is the value as written in links.
    pub words: &'static str,
    /// A text box in the explorer's filter form.
    pub form: bool,
}

const fn p(key: &'static str, field: Field, label: &'static str, help: &'static str, example: &'static str, words: &'static str, form: bool) -> ParamSpec {
    ParamSpec { key, field, label, help, example, words, form }
}

/// Every parameter the pages, the API, the CSV and the CLI understand, in
/// the order links and the form show them.
pub const PARAMS: &[ParamSpec] = &[
    p("preset", Field::Preset, "Start from", "a named window to start from: end-of-game, two-minute-drill, four-minute-lead, end-of-game-3rd-4th, end-of-game-red-zone, end-of-game-backed-up, every-snap", "end-of-game", "{}", false),
    p("one-score", Field::OneScore, "One score is", "how many points the presets call one score: 8 (default) or 7", "7", "one score = {}", false),
    p("quarter", Field::Quarters, "Quarters", "quarters: 1, 2, 3, 4, ot (every overtime period)", "4,ot", "quarters {}", true),
    p("half-left", Field::HalfClock, "Clock left in half", "time left in the half (in overtime: in the period), m:ss or seconds", "..2:00", "{} left in the half", true),
    p("game-left", Field::GameClock, "Clock left in game", "time left in regulation, m:ss or seconds; overtime snaps always pass", "..7:30", "{} left in regulation", true),
    p("margin", Field::Margin, "Margin", "offense score minus defense score before the snap", "-8..0", "margin {}", true),
    p("down", Field::Downs, "Down", "downs, 1-4", "3,4", "down {}", true),
    p("to-go", Field::ToGo, "To go", "yards to go", "5..", "{} to go", true),
    p("ball-on", Field::BallOn, "Ball on", "yard line: -35 own half, +20 opponent's half, 50 midfield (or 1-99 from own goal); ends in either order", "+20..+1", "ball on {}", true),
    p("win-prob", Field::WinProb, "Win prob.", "offense's chance of winning before the snap: percent with % (20..80%) or a share 0-1 (0.2..0.8)", "20..80%", "win prob. {}", true),
    p("timeouts", Field::Timeouts, "Timeouts", "offense timeouts left, 0-3", "0", "{} timeouts left", true),
    p("defense-timeouts", Field::DefenseTimeouts, "Defense timeouts", "defense timeouts left, 0-3", "0..1", "defense {} timeouts left", true),
    p("season", Field::Seasons, "Seasons", "seasons, list or range", "2024,2025", "seasons {}", true),
    p("week", Field::Weeks, "Weeks", "weeks, range", "10..", "weeks {}", true),
    p("site", Field::Site, "Site", "offense at home or away", "home", "offense {}", false),
    p("team", Field::Team, "Offense", "offense team code (any case)", "QRM", "offense {}", true),
    p("opponent", Field::Opponent, "Opponent", "defense team code (any case)", "QRM", "vs {}", true),
    p("passer", Field::Passer, "Passer", "passer name (any case)", "NAME", "passer {}", false),
    p("result", Field::Results, "Result", "what the snap ended in, any of: completion, incompletion, interception, sack, scramble, touchdown-pass, touchdown, first-down, fumble-lost", "interception", "result {}", true),
    p("tag.NAME", Field::Tag, "Tags", "the staff's own columns (tags, any column beyond ours): values of tag NAME, a list, or ~text to search a tag with more than 50 values", "yes,no", "{}", false),
    p("group", Field::Group, "Rows", "table rows per passer (default), per offense or per defense (a team's snaps in the situation, numbers allowed); grouped by team, team= (offense) or opponent= (defense) picks the row shown, not the snaps, and for a defense less is better (EPA, success, completions allowed) or more (sacks, interceptions)", "defense", "rows per {}", false),
    p("min", Field::Page, "Min. dropbacks", "table: dropbacks a passer (or team) needs to be ranked (default 20; 5 for passers against one opponent, who meet it once or twice a season)", "30", "", false),
    p("sort", Field::Page, "Sort", "table: column to sort on: passer (the row's name: passer or team), team or a metric key such as epa", "epa", "", false),
    p("dir", Field::Page, "Direction", "table: desc (high to low, default) or asc", "asc", "", false),
    p("by", Field::Page, "Sort on", "table: sort on the estimate (est, default), the raw number (raw) or the lift, his value here minus his normal (lift)", "raw", "", false),
    p("view", Field::Page, "View", "laptop (default) or projector: large type, fewer columns", "projector", "", false),
    p("metric", Field::Page, "Metric", "play list: only the snaps a metric is taken over (its key, e.g. int_rate)", "int_rate", "", false),
    p("game", Field::Page, "Game", "game page: the game's key", "KEY", "", false),
    p("by-tag", Field::Page, "By tag", "passer page: break the passer down by the values of one of the staff's tags (its NAME)", "pressure", "", false),
    p("trend", Field::Page, "Trend", "passer page: the preset of the season trend", "two-minute-drill", "", false),
    p("cols", Field::Page, "Columns", "explorer: the column group, key (default), passing, pressure, value or all", "passing", "", false),
    p("screen", Field::Page, "Screen", "meeting view: the situation on screen (a preset's key)", "two-minute-drill", "", false),
    p("paper", Field::Page, "Paper", "report: letter (default) or a4", "a4", "", false),
    p("token", Field::Page, "Token", "shared mode: the access token, on the first visit only", "TOKEN", "", false),
];

/// The spec of `key`, if it is known (`tag.NAME` for any NAME).
pub fn spec(key: &str) -> Option<&'static ParamSpec> {
    if super::tags::tag_name(key).is_some() {
        return spec_of(Field::Tag);
    }
    PARAMS.iter().find(|s| s.key == key)
}

/// The spec that sets `field`.
pub fn spec_of(field: Field) -> Option<&'static ParamSpec> {
    PARAMS.iter().find(|s| s.field == field)
}

/// Is `key` a known parameter? If not: the refusal, with the nearest key.
pub fn check_key(key: &str, value: &str) -> Result<&'static ParamSpec, SituationError> {
    if let Some(s) = spec(key) {
        return Ok(s);
    }
    let shown = if key.is_empty() { "(no name)" } else { key };
    let hint = match nearest(key, PARAMS.iter().map(|s| s.key)) {
        Some(k) if !key.is_empty() => format!("; did you mean '{k}'?"),
        _ => format!("; known filters: {}", PARAMS.iter().filter(|s| s.field != Field::Page).map(|s| s.key).collect::<Vec<_>>().join(", ")),
    };
    Err(err(shown, value, format!("unknown filter '{shown}'{hint}")))
}

/// `key=value&...` with `+` and percent escapes undone (a query string, a
/// CLI `--where`). Undecodable input keeps what splits cleanly, raw.
pub fn decode_pairs(query: &str) -> Vec<(String, String)> {
    let q = query.trim().trim_start_matches('?');
    serde_urlencoded::from_str::<Vec<(String, String)>>(q).unwrap_or_else(|_| {
        q.split('&')
            .filter(|kv| !kv.is_empty())
            .map(|kv| {
                let (k, v) = kv.split_once('=').unwrap_or((kv, ""));
                (k.to_string(), v.to_string())
            })
            .collect()
    })
}

/// README's parameter table, written from `PARAMS` (a test compares).
pub fn readme_table() -> String {
    let mut s = String::from("| parameter | meaning | example |\n|---|---|---|\n");
    for p in PARAMS {
        s.push_str(&format!("| `{}` | {} | `{}={}` |\n", p.key, p.help, p.key, p.example));
    }
    s
}

/// A preset key, or the refusal listing them.
pub fn parse_preset(param: &str, v: &str) -> Result<Preset, SituationError> {
    Preset::parse(v).ok_or_else(|| {
        let hint = match nearest(v.trim(), Preset::ALL.iter().map(|p| p.key())) {
            Some(k) => format!("did you mean '{k}'? The presets: "),
            None => "expected one of ".to_string(),
        };
        err(param, v, format!("unknown preset; {hint}{}", Preset::keys()))
    })
}

/// `1,2,3,4,ot`; `ot` (or 5) stands for every overtime period.
pub fn parse_quarters(param: &str, v: &str) -> Result<Vec<i32>, SituationError> {
    let item = |p: &str| -> Result<i32, String> {
        match p.trim().to_ascii_lowercase().as_str() {
            "ot" => Ok(super::OT),
            x => match x.parse::<i32>() {
                Ok(n @ 1..=4) => Ok(n),
                _ => Err(format!("'{}' is not a quarter; expected 1, 2, 3, 4 or ot", p.trim())),
            },
        }
    };
    values::parse_list(param, v, item, None).map_err(|e| if e.reason == "empty list" { err(param, v, "empty list; expected 1, 2, 3, 4 or ot") } else { e })
}

pub fn show_quarters(v: &[i32]) -> String {
    values::show_list(v, |x| if *x == super::OT { "ot".to_string() } else { x.to_string() })
}

pub fn parse_results(param: &str, v: &str) -> Result<Vec<PlayResult>, SituationError> {
    let item = |p: &str| -> Result<PlayResult, String> {
        PlayResult::parse(p).ok_or_else(|| {
            let keys = super::result::RESULTS.iter().map(|r| r.1);
            match nearest(p.trim(), keys) {
                Some(k) => format!("'{}' is not a play result; did you mean '{k}'?", p.trim()),
                None => format!("'{}' is not a play result; expected {}", p.trim(), PlayResult::keys()),
            }
        })
    };
    values::parse_list(param, v, item, None)
}

/// `passer`, `offense` or `defense`; anything else is refused with the nearest.
pub fn parse_group(param: &str, v: &str) -> Result<Group, SituationError> {
    Group::parse(v).ok_or_else(|| {
        let keys = Group::ALL.map(|g| g.key());
        match nearest(v.trim(), keys) {
            Some(k) => err(param, v, format!("unknown grouping; did you mean '{k}'? Expected passer, offense or defense")),
            None => err(param, v, "unknown grouping; expected passer, offense or defense"),
        }
    })
}

//! Query strings and cookies: the situation plus the page's own parameters
//! (minimum dropbacks, sort, projector view, subject passer, metric, game),
//! each checked with a reason a coach can read.

use crate::plays::Plays;
use crate::situation::params::{spec_of, Field};
use crate::situation::values::nearest;
use crate::situation::{Situation, SituationError};
use crate::splits::{default_min_dropbacks, metric_index, SortBy};
use axum::http::HeaderMap;

/// Decoded `key=value` pairs (`+` and percent escapes undone), read the
/// same way as the CLI's `--where`.
pub fn pairs(query: Option<&str>) -> Vec<(String, String)> {
    query.map(crate::situation::decode_pairs).unwrap_or_default()
}

/// `?a=1&b=2` (empty when there are no pairs), percent-encoded.
pub fn to_query_string(pairs: &[(String, String)]) -> String {
    if pairs.is_empty() {
        return String::new();
    }
    match serde_urlencoded::to_string(pairs) {
        Ok(s) => format!("?{s}"),
        Err(_) => String::new(),
    }
}

pub fn cookie(headers: &HeaderMap, name: &str) -> Option<String> {
    for value in headers.get_all(axum::http::header::COOKIE) {
        let Ok(text) = value.to_str() else { continue };
        for part in text.split(';') {
            if let Some((k, v)) = part.trim().split_once('=') {
                if k == name {
                    let decoded: Vec<(String, String)> = serde_urlencoded::from_str(&format!("v={v}")).unwrap_or_default();
                    return decoded.into_iter().next().map(|(_, v)| v).or(Some(v.to_string()));
                }
            }
        }
    }
    None
}

/// Everything a page or API call can be asked for.
#[derive(Debug, Clone)]
pub struct Params {
    pub situation: Situation,
    /// The raw pairs (to rebuild links).
    pub raw: Vec<(String, String)>,
    pub min_dropbacks: u32,
    pub sort: Option<String>,
    pub descending: bool,
    pub sort_by: SortBy,
    pub projector: bool,
    pub metric: Option<String>,
    pub game: Option<String>,
    pub trend: Option<String>,
    /// Explorer column group (`splits::METRIC_GROUPS`); None = the default.
    pub cols: Option<String>,
    pub paper: Option<String>,
}

fn bad(param: &str, value: &str, reason: &str) -> SituationError {
    SituationError { param: param.into(), value: value.into(), reason: reason.into() }
}

impl Params {
    pub fn parse(query: Option<&str>) -> Result<Params, SituationError> {
        let raw = pairs(query);
        let situation = Situation::from_query(&raw)?;
        let get = |k: &str| raw.iter().rev().find(|(p, _)| p == k).map(|(_, v)| v.clone());
        let min_dropbacks = match get("min") {
            None => default_min_dropbacks(&situation),
            Some(v) if v.trim().is_empty() => default_min_dropbacks(&situation),
            Some(v) => match v.trim().parse::<u32>() {
                Ok(n) if (1..=100_000).contains(&n) => n,
                _ => return Err(bad("min", &v, "expected a whole number of dropbacks 1-100000")),
            },
        };
        let sort = match get("sort") {
            None => None,
            Some(v) if v.is_empty() => None,
            Some(v) if v == "passer" || v == "team" || metric_index(&v).is_some() => Some(v),
            Some(v) => return Err(bad("sort", &v, "unknown column; expected passer, team or a metric key such as epa")),
        };
        let descending = match get("dir").as_deref() {
            None | Some("") | Some("desc") => true,
            Some("asc") => false,
            Some(v) => return Err(bad("dir", v, "expected asc or desc")),
        };
        let sort_by = match get("by").as_deref() {
            None | Some("") | Some("est") => SortBy::Estimate,
            Some("raw") => SortBy::Value,
            Some("lift") => SortBy::Lift,
            Some(v) => return Err(bad("by", v, "expected est, raw or lift")),
        };
        let projector = match get("view").as_deref() {
            None | Some("") | Some("laptop") => false,
            Some("projector") => true,
            Some(v) => return Err(bad("view", v, "expected laptop or projector")),
        };
        let metric = match get("metric") {
            None => None,
            Some(v) if v.is_empty() => None,
            Some(v) if metric_index(&v).is_some() => Some(v),
            Some(v) => return Err(bad("metric", &v, "unknown metric key")),
        };
        let trend = match get("trend") {
            None => None,
            Some(v) if v.is_empty() => None,
            Some(v) if crate::situation::Preset::parse(&v).is_some() => Some(v),
            Some(v) => return Err(bad("trend", &v, &format!("unknown preset; expected one of {}", crate::situation::Preset::keys()))),
        };
        let cols = match get("cols") {
            None => None,
            Some(v) if v.is_empty() => None,
            Some(v) if crate::splits::metric_group(&v).is_some() => Some(v),
            Some(v) => {
                let keys: Vec<&str> = crate::splits::METRIC_GROUPS.iter().map(|g| g.0).collect();
                return Err(bad("cols", &v, &format!("unknown column group; expected one of {}", keys.join(", "))));
            }
        };
        let paper = match get("paper").as_deref() {
            None | Some("") => None,
            Some(v @ ("letter" | "a4")) => Some(v.to_string()),
            Some(v) => return Err(bad("paper", v, "expected letter or a4")),
        };
        Ok(Params {
            situation,
            min_dropbacks,
            sort,
            descending,
            sort_by,
            projector,
            metric,
            game: get("game").filter(|g| !g.is_empty()),
            trend,
            cols,
            paper,
            raw,
        })
    }

    /// Parse, then spell team codes and passer names as the league does.
    pub fn parse_in(query: Option<&str>, plays: &Plays) -> Result<Params, SituationError> {
        let mut p = Params::parse(query)?;
        resolve_names(plays, &mut p.situation)?;
        Ok(p)
    }

    /// The situation's own query (no page parameters).
    pub fn situation_query(&self) -> Vec<(String, String)> {
        self.situation.to_query()
    }

    /// The full query with some keys replaced (None removes a key).
    pub fn with(&self, changes: &[(&str, Option<&str>)]) -> String {
        let mut q: Vec<(String, String)> = self.raw.iter().filter(|(k, _)| !changes.iter().any(|(c, _)| c == k) && k != "token").cloned().collect();
        for (k, v) in changes {
            if let Some(v) = v {
                q.push((k.to_string(), v.to_string()));
            }
        }
        to_query_string(&q)
    }
}

/// Team codes and passer names as the league spells them, matched without
/// regard to case; a name the league lacks is refused with the nearest one,
/// and seasons the file lacks with the seasons it covers.
pub fn resolve_names(plays: &Plays, s: &mut Situation) -> Result<(), SituationError> {
    resolve(Field::Team, &mut s.offense, &plays.teams, "team")?;
    resolve(Field::Opponent, &mut s.opponent, &plays.teams, "team")?;
    resolve(Field::Passer, &mut s.passer, &plays.passers, "passer")?;
    s.check_tags(plays)?;
    check_seasons(plays, s)
}

/// A season list with no season of the file in it is refused with the
/// seasons the file covers (an empty table would say "lower the minimum").
fn check_seasons(plays: &Plays, s: &Situation) -> Result<(), SituationError> {
    let Some(asked) = &s.seasons else { return Ok(()) };
    let have = plays.seasons();
    if have.is_empty() || asked.iter().any(|x| have.contains(x)) {
        return Ok(());
    }
    let covers = match (have.first(), have.last()) {
        (Some(a), Some(b)) if a != b && have.len() == (b - a + 1) as usize => format!("{a}-{b}"),
        _ => have.iter().map(|x| x.to_string()).collect::<Vec<_>>().join(", "),
    };
    let key = spec_of(Field::Seasons).map(|s| s.key).unwrap_or("season");
    let value = s.show(Field::Seasons).unwrap_or_default();
    Err(bad(key, &value, &format!("not in the file; the file covers {covers}")))
}

fn resolve(field: Field, name: &mut Option<String>, known: &[String], what: &str) -> Result<(), SituationError> {
    let Some(n) = name.as_deref() else { return Ok(()) };
    if known.iter().any(|k| k == n) {
        return Ok(());
    }
    let lower = n.to_lowercase();
    if let Some(k) = known.iter().find(|k| k.to_lowercase() == lower) {
        *name = Some(k.clone());
        return Ok(());
    }
    let key = spec_of(field).map(|s| s.key).unwrap_or(what);
    let reason = match nearest(n, known.iter().map(String::as_str)) {
        Some(k) => format!("no {what} '{n}' in this league; did you mean '{k}'?"),
        None => format!("no {what} '{n}' in this league (the home page lists them)"),
    };
    Err(bad(key, n, &reason))
}

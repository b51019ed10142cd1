//! A mapping: how to read a play file in another layout (TOML). Which of
//! their columns is which of ours, and how their values are written (play
//! kinds, yes/no, clocks, periods, yard lines, scores, the offense). Read
//! and checked here; applied by `mapping_apply`, drafted by `mapping_draft`.

use super::mapping_values::{ClockForm, YardForm};
use super::{Kind, COLUMNS};
use serde::Deserialize;
use std::collections::BTreeMap;
use std::path::Path;

/// Our columns a mapping may name beyond `COLUMNS`: scores kept as home
/// and away instead of offense and defense.
pub const EXTRA_KEYS: [&str; 2] = ["home_score", "away_score"];

/// A mapping file that cannot be used, and why.
#[derive(Debug, thiserror::Error)]
pub enum MappingError {
    #[error("{file}: cannot read the mapping: {reason}")]
    Unreadable { file: String, reason: String },
    #[error("{file}: not a valid mapping: {reason}")]
    Invalid { file: String, reason: String },
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct MappingFile {
    columns: BTreeMap<String, String>,
    #[serde(default)]
    values: ValuesFile,
    #[serde(default)]
    kinds: BTreeMap<String, Vec<String>>,
    #[serde(default)]
    tags: TagsFile,
}

#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct ValuesFile {
    clock: Option<String>,
    yard_line: Option<String>,
    own: Option<String>,
    opp: Option<String>,
    #[serde(default)]
    overtime: Vec<String>,
    #[serde(rename = "true")]
    yes: Option<Vec<String>>,
    #[serde(rename = "false")]
    no: Option<Vec<String>>,
    scores: Option<String>,
    offense: Option<String>,
    offense_home: Option<String>,
    offense_away: Option<String>,
}

#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct TagsFile {
    #[serde(default)]
    skip: Vec<String>,
}

/// How their file names the team with the ball.
#[derive(Debug, Clone, PartialEq)]
pub enum OffenseForm {
    /// The team itself, spelled as in the home and away columns.
    Team,
    /// A code for the home side and one for the away side.
    Side { home: String, away: String },
}

/// A checked mapping.
#[derive(Debug, Clone)]
pub struct Mapping {
    /// Their column for each of ours, in `COLUMNS` order (`None`: not in
    /// their file; derived or optional).
    pub columns: Vec<Option<String>>,
    /// Scores as home and away: their two columns.
    pub home_away_scores: Option<(String, String)>,
    pub offense: OffenseForm,
    pub clock: ClockForm,
    pub yard_line: YardForm,
    /// Their spellings of overtime periods: the first is period 5, then 6...
    pub overtime: Vec<String>,
    pub yes: Vec<String>,
    pub no: Vec<String>,
    /// Their play-kind codes (compared without regard to case) and ours.
    pub kinds: Vec<(String, Kind)>,
    /// Their columns not to keep as tags.
    pub skip_tags: Vec<String>,
    /// The file's text (part of the data fingerprint).
    pub text: String,
}

fn col(name: &str) -> usize {
    COLUMNS.iter().position(|c| c.name == name).unwrap_or(usize::MAX)
}

impl Mapping {
    /// Read and check a mapping file.
    pub fn open(path: &Path) -> Result<Mapping, MappingError> {
        let file = path.display().to_string();
        let text = std::fs::read_to_string(path).map_err(|e| MappingError::Unreadable { file: file.clone(), reason: e.to_string() })?;
        Mapping::parse(&file, &text)
    }

    /// Check a mapping's text; `file` is what messages call it.
    pub fn parse(file: &str, text: &str) -> Result<Mapping, MappingError> {
        let invalid = |reason: String| MappingError::Invalid { file: file.to_string(), reason };
        let raw: MappingFile = basic_toml::from_str(text).map_err(|e| invalid(e.to_string()))?;
        let mut columns: Vec<Option<String>> = vec![None; COLUMNS.len()];
        let (mut home_score, mut away_score) = (None, None);
        for (ours, theirs) in &raw.columns {
            let theirs = theirs.trim();
            if theirs.is_empty() {
                return Err(invalid(format!("[columns] {ours} is empty; name their column or leave the line out")));
            }
            match ours.as_str() {
                "home_score" => home_score = Some(theirs.to_string()),
                "away_score" => away_score = Some(theirs.to_string()),
                k => match COLUMNS.iter().position(|c| c.name == k) {
                    Some(i) => columns[i] = Some(theirs.to_string()),
                    None => {
                        let ours: Vec<&str> = COLUMNS.iter().map(|c| c.name).chain(EXTRA_KEYS).collect();
                        return Err(invalid(format!("[columns] {k} is not one of our columns; expected one of {}", ours.join(", "))));
                    }
                },
            }
        }
        let v = &raw.values;
        let home_away_scores = match v.scores.as_deref().unwrap_or("offense_defense") {
            "offense_defense" => None,
            "home_away" => match (home_score, away_score) {
                (Some(h), Some(a)) => Some((h, a)),
                _ => return Err(invalid("[values] scores = \"home_away\" needs home_score and away_score under [columns]".into())),
            },
            other => return Err(invalid(format!("[values] scores is \"{other}\"; expected \"offense_defense\" or \"home_away\""))),
        };
        let offense = match v.offense.as_deref().unwrap_or("team") {
            "team" => OffenseForm::Team,
            "home_away" => match (&v.offense_home, &v.offense_away) {
                (Some(h), Some(a)) if !h.trim().is_empty() && !a.trim().is_empty() => OffenseForm::Side { home: h.trim().to_string(), away: a.trim().to_string() },
                _ => return Err(invalid("[values] offense = \"home_away\" needs offense_home and offense_away (their codes for each side)".into())),
            },
            other => return Err(invalid(format!("[values] offense is \"{other}\"; expected \"team\" or \"home_away\""))),
        };
        let clock = match v.clock.as_deref() {
            None => ClockForm::MinSec,
            Some(c) => ClockForm::parse(c).ok_or_else(|| invalid(format!("[values] clock is \"{c}\"; expected {}", ClockForm::KEYS)))?,
        };
        let own = v.own.clone().unwrap_or_else(|| "own".into());
        let opp = v.opp.clone().unwrap_or_else(|| "opp".into());
        let yard_line = match v.yard_line.as_deref() {
            None => YardForm::FromOwn,
            Some(y) => YardForm::parse(y, &own, &opp).ok_or_else(|| invalid(format!("[values] yard_line is \"{y}\"; expected {}", YardForm::KEYS)))?,
        };
        let words = |w: &Option<Vec<String>>, default: &[&str]| -> Vec<String> {
            match w {
                Some(list) => list.iter().map(|s| s.trim().to_string()).collect(),
                None => default.iter().map(|s| s.to_string()).collect(),
            }
        };
        let yes = words(&v.yes, &["true", "t", "1", "yes", "y"]);
        let no = words(&v.no, &["false", "f", "0", "no", "n"]);
        if let Some(both) = yes.iter().find(|y| no.iter().any(|n| n.eq_ignore_ascii_case(y))) {
            return Err(invalid(format!("[values] \"{both}\" is listed as both true and false")));
        }
        let mut kinds = Vec::new();
        for (ours, codes) in &raw.kinds {
            let Some(k) = Kind::parse(ours) else {
                let all: Vec<&str> = Kind::ALL.iter().map(|k| k.as_str()).collect();
                return Err(invalid(format!("[kinds] {ours} is not one of our play kinds; expected one of {}", all.join(", "))));
            };
            for c in codes {
                let c = c.trim().to_string();
                if let Some((_, other)) = kinds.iter().find(|(x, _): &&(String, Kind)| x.eq_ignore_ascii_case(&c)) {
                    if *other != k {
                        return Err(invalid(format!("[kinds] code \"{c}\" is listed under both {} and {}", other.as_str(), k.as_str())));
                    }
                }
                kinds.push((c, k));
            }
        }
        if kinds.is_empty() {
            kinds = Kind::ALL.iter().map(|k| (k.as_str().to_string(), *k)).collect();
        }
        // Every required column of ours must come from somewhere.
        for (i, spec) in COLUMNS.iter().enumerate() {
            let derived = match spec.name {
                "defense" => true,
                "off_score" | "def_score" => home_away_scores.is_some(),
                _ => false,
            };
            if spec.required && columns[i].is_none() && !derived {
                return Err(invalid(format!("[columns] {} is missing; name their column that holds it", spec.name)));
            }
        }
        if home_away_scores.is_some() && (columns[col("off_score")].is_some() || columns[col("def_score")].is_some()) {
            return Err(invalid("[columns] off_score/def_score and [values] scores = \"home_away\" both given; keep one".into()));
        }
        Ok(Mapping {
            columns,
            home_away_scores,
            offense,
            clock,
            yard_line,
            overtime: v.overtime.iter().map(|s| s.trim().to_string()).collect(),
            yes,
            no,
            kinds,
            skip_tags: raw.tags.skip.clone(),
            text: text.to_string(),
        })
    }

    /// Every column of theirs the mapping reads.
    pub fn their_columns(&self) -> Vec<&str> {
        let mut v: Vec<&str> = self.columns.iter().flatten().map(String::as_str).collect();
        if let Some((h, a)) = &self.home_away_scores {
            v.push(h);
            v.push(a);
        }
        v
    }
}

pub(super) fn col_index(name: &str) -> usize {
    col(name)
}

//! The staff's overtime config: which seasons play which rule set, a few
//! lines they can write by hand (a small part of TOML):
//!
//! ```toml
//! [[overtime]]
//! seasons = "2000-2011"      # or one season: "2014"
//! rules = "first-score-wins" # touchdown-or-answer, first-score-wins, both-possess
//! period = "15:00"           # optional (default 10:00); m:ss or seconds
//! ties = true                # optional (default true): a level period is a tie
//! ```
//!
//! Seasons no block lists play the default (`Rules::default`). Bad input is
//! refused with the file, line, key, value and what was expected.

use super::{Rule, Rules, MAX_PERIOD_SECS, MIN_PERIOD_SECS, PERIOD_STEP_SECS};
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// One block: seasons `from..=to` play `rules`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub struct SeasonRules {
    pub from: i32,
    pub to: i32,
    pub rules: Rules,
}

/// Which seasons play which overtime rules (empty: every season the default).
#[derive(Debug, Clone, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub struct OvertimeConfig {
    pub sets: Vec<SeasonRules>,
}

/// Seasons with one rule set, for pages and the API.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SeasonSpan {
    /// "2000-2005" or "2008".
    pub seasons: String,
    pub rules: Rules,
    /// `Rules::label`.
    pub label: String,
}

/// Why a config file was refused.
#[derive(Debug, thiserror::Error)]
pub enum OvertimeConfigError {
    #[error("reading the overtime config {path}: {source}")]
    Io { path: PathBuf, source: std::io::Error },
    #[error("{path}, line {line}: {what}")]
    Bad { path: PathBuf, line: usize, what: String },
}

impl OvertimeConfig {
    /// The rules of `season`.
    pub fn rules_for(&self, season: i32) -> Rules {
        self.sets.iter().find(|s| (s.from..=s.to).contains(&season)).map_or_else(Rules::default, |s| s.rules)
    }

    /// Every season plays the default rules.
    pub fn is_default(&self) -> bool {
        self.sets.iter().all(|s| s.rules == Rules::default())
    }

    /// A canonical text of what the config changes ("" for the default):
    /// part of the model cache key.
    pub fn key(&self) -> String {
        let mut parts: Vec<String> = self
            .sets
            .iter()
            .filter(|s| s.rules != Rules::default())
            .map(|s| format!("{}-{}:{}/{}/{}", s.from, s.to, s.rules.rule.name(), s.rules.period_secs, s.rules.ties))
            .collect();
        parts.sort();
        parts.join(";")
    }

    /// `seasons` (sorted) grouped into runs that play the same rules.
    pub fn spans(&self, seasons: &[i32]) -> Vec<SeasonSpan> {
        let mut out: Vec<(i32, i32, Rules)> = Vec::new();
        for &s in seasons {
            let r = self.rules_for(s);
            match out.last_mut() {
                Some(last) if last.2 == r => last.1 = s,
                _ => out.push((s, s, r)),
            }
        }
        out.into_iter()
            .map(|(a, b, rules)| SeasonSpan {
                seasons: if a == b { a.to_string() } else { format!("{a}-{b}") },
                label: rules.label(),
                rules,
            })
            .collect()
    }

    /// What `lategame check --overtime FILE` says of the config against a
    /// file's `seasons` (sorted): the rules of each run of seasons, then
    /// each block that names no season of the file (a likely slip).
    pub fn report(&self, seasons: &[i32]) -> Vec<String> {
        let mut lines: Vec<String> = self.spans(seasons).iter().map(|s| format!("  {}: {}", s.seasons, s.label)).collect();
        let covers = match (seasons.first(), seasons.last()) {
            (Some(a), Some(b)) if a == b => a.to_string(),
            (Some(a), Some(b)) => format!("{a}-{b}"),
            _ => "no season".to_string(),
        };
        for b in self.sets.iter().filter(|b| !seasons.iter().any(|s| (b.from..=b.to).contains(s))) {
            let named = if b.from == b.to { b.from.to_string() } else { format!("{}-{}", b.from, b.to) };
            lines.push(format!("  the block for {named} ({}) names no season of the file, which covers {covers}", b.rules.rule.name()));
        }
        lines
    }

    /// Read and check a config file.
    pub fn load(path: &Path) -> Result<OvertimeConfig, OvertimeConfigError> {
        let text = std::fs::read_to_string(path).map_err(|source| OvertimeConfigError::Io { path: path.to_path_buf(), source })?;
        OvertimeConfig::parse(&text, path)
    }

    /// Parse a config's text (`path` names it in errors).
    pub fn parse(text: &str, path: &Path) -> Result<OvertimeConfig, OvertimeConfigError> {
        let bad = |line: usize, what: String| OvertimeConfigError::Bad { path: path.to_path_buf(), line, what };
        let mut blocks: Vec<Block> = Vec::new();
        for (n, raw) in text.lines().enumerate() {
            let line = n + 1;
            let t = strip_comment(raw).trim();
            if t.is_empty() {
                continue;
            }
            if t.starts_with('[') {
                if t != "[[overtime]]" {
                    return Err(bad(line, format!("`{t}` is not a section of this file; expected [[overtime]]")));
                }
                blocks.push(Block { line, ..Block::default() });
                continue;
            }
            let Some((k, v)) = t.split_once('=') else {
                return Err(bad(line, format!("`{t}` is not a setting; expected key = value (seasons, rules, period, ties)")));
            };
            let (k, v) = (k.trim(), v.trim());
            let Some(b) = blocks.last_mut() else {
                return Err(bad(line, format!("key `{k}` comes before any [[overtime]] block; expected [[overtime]] first")));
            };
            let value = Value::read(v).ok_or_else(|| bad(line, format!("key `{k}` has value {v}, which is neither a quoted text, a number nor true/false")))?;
            let slot = match k {
                "seasons" => &mut b.seasons,
                "rules" => &mut b.rules,
                "period" => &mut b.period,
                "ties" => &mut b.ties,
                _ => {
                    let near = nearest(k, &["seasons", "rules", "period", "ties"]);
                    return Err(bad(line, format!("unknown key `{k}` = {v}; expected seasons, rules, period or ties (did you mean `{near}`?)")));
                }
            };
            if let Some((first, _)) = slot {
                return Err(bad(line, format!("key `{k}` = {v} is set twice in this block (first on line {first})")));
            }
            *slot = Some((line, value));
        }
        let mut sets: Vec<(usize, SeasonRules)> = Vec::new();
        for b in blocks {
            let set = b.check(&bad)?;
            if let Some((other, _)) = sets.iter().find(|(_, s)| s.from <= set.to && set.from <= s.to) {
                let l = b.seasons.map_or(b.line, |(l, _)| l);
                return Err(bad(l, format!("key `seasons` = \"{}-{}\" overlaps the block on line {other}; expected each season in one block", set.from, set.to)));
            }
            sets.push((b.line, set));
        }
        Ok(OvertimeConfig { sets: sets.into_iter().map(|(_, s)| s).collect() })
    }
}

/// A value as written: a quoted text, a whole number or true/false.
#[derive(Debug, Clone, PartialEq)]
enum Value {
    Text(String),
    Int(i64),
    Bool(bool),
}

impl Value {
    fn read(v: &str) -> Option<Value> {
        if let Some(s) = v.strip_prefix('"').and_then(|s| s.strip_suffix('"')) {
            return (!s.contains('"')).then(|| Value::Text(s.to_string()));
        }
        match v {
            "true" => Some(Value::Bool(true)),
            "false" => Some(Value::Bool(false)),
            _ => v.parse().ok().map(Value::Int),
        }
    }

    fn shown(&self) -> String {
        match self {
            Value::Text(s) => format!("\"{s}\""),
            Value::Int(i) => i.to_string(),
            Value::Bool(b) => b.to_string(),
        }
    }
}

/// One `[[overtime]]` block as read: each key with its line.
#[derive(Debug, Default)]
struct Block {
    line: usize,
    seasons: Option<(usize, Value)>,
    rules: Option<(usize, Value)>,
    period: Option<(usize, Value)>,
    ties: Option<(usize, Value)>,
}

impl Block {
    fn check(&self, bad: &dyn Fn(usize, String) -> OvertimeConfigError) -> Result<SeasonRules, OvertimeConfigError> {
        let missing = |k: &str, what: &str| bad(self.line, format!("the [[overtime]] block has no `{k}`; expected {what}"));
        let (sl, sv) = self.seasons.as_ref().ok_or_else(|| missing("seasons", "seasons = \"2000-2011\" or \"2014\""))?;
        let (from, to) = seasons(sv).ok_or_else(|| {
            bad(*sl, format!("key `seasons` = {} is not a season range; expected \"FIRST-LAST\" or one season, e.g. \"2000-2011\" (first not after last)", sv.shown()))
        })?;
        let (rl, rv) = self.rules.as_ref().ok_or_else(|| missing("rules", "rules = \"first-score-wins\" (or another rule set)"))?;
        let names: Vec<&str> = Rule::ALL.iter().map(|r| r.name()).collect();
        let rule = match rv {
            Value::Text(s) => Rule::from_name(s.trim()),
            _ => None,
        }
        .ok_or_else(|| {
            let near = match rv {
                Value::Text(s) => format!(" (nearest: {})", nearest(s, &names)),
                _ => String::new(),
            };
            bad(*rl, format!("key `rules` = {} is not a rule set; expected one of {}{near}", rv.shown(), names.join(", ")))
        })?;
        let period_secs = match &self.period {
            None => super::DEFAULT_PERIOD_SECS,
            Some((pl, pv)) => period(pv).ok_or_else(|| {
                bad(
                    *pl,
                    format!(
                        "key `period` = {} is not a period length; expected m:ss (or seconds) from {}:00 to {}:00 in steps of {} s, e.g. \"15:00\"",
                        pv.shown(),
                        MIN_PERIOD_SECS / 60,
                        MAX_PERIOD_SECS / 60,
                        PERIOD_STEP_SECS
                    ),
                )
            })?,
        };
        let ties = match &self.ties {
            None => true,
            Some((_, Value::Bool(b))) => *b,
            Some((tl, tv)) => return Err(bad(*tl, format!("key `ties` = {} is not true or false; expected true (a level period is a tie) or false (another period)", tv.shown()))),
        };
        Ok(SeasonRules { from, to, rules: Rules { rule, period_secs, ties } })
    }
}

fn seasons(v: &Value) -> Option<(i32, i32)> {
    let (a, b) = match v {
        Value::Int(i) => (i32::try_from(*i).ok()?, i32::try_from(*i).ok()?),
        Value::Text(s) => match s.split_once('-') {
            Some((a, b)) => (a.trim().parse().ok()?, b.trim().parse().ok()?),
            None => {
                let y = s.trim().parse().ok()?;
                (y, y)
            }
        },
        Value::Bool(_) => return None,
    };
    (a <= b && (1800..=2999).contains(&a) && (1800..=2999).contains(&b)).then_some((a, b))
}

fn period(v: &Value) -> Option<i32> {
    let secs = match v {
        Value::Int(i) => i32::try_from(*i).ok()?,
        Value::Text(s) => match s.trim().split_once(':') {
            Some((m, sec)) if sec.len() == 2 => {
                let (m, sec): (i32, i32) = (m.parse().ok()?, sec.parse().ok()?);
                if !(0..60).contains(&sec) {
                    return None;
                }
                m * 60 + sec
            }
            Some(_) => return None,
            None => s.trim().parse().ok()?,
        },
        Value::Bool(_) => return None,
    };
    ((MIN_PERIOD_SECS..=MAX_PERIOD_SECS).contains(&secs) && secs % PERIOD_STEP_SECS == 0).then_some(secs)
}

/// The text before a `#` that is not inside quotes.
fn strip_comment(line: &str) -> &str {
    let mut quoted = false;
    for (i, c) in line.char_indices() {
        match c {
            '"' => quoted = !quoted,
            '#' if !quoted => return &line[..i],
            _ => {}
        }
    }
    line
}

/// The candidate with the fewest edits from `s`.
fn nearest<'a>(s: &str, candidates: &[&'a str]) -> &'a str {
    candidates.iter().copied().min_by_key(|c| edits(&s.to_lowercase(), c)).unwrap_or("")
}

fn edits(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut prev = row[0];
        row[0] = i + 1;
        for j in 0..b.len() {
            let cur = row[j + 1];
            row[j + 1] = (prev + usize::from(ca != b[j])).min(row[j] + 1).min(cur + 1);
            prev = cur;
        }
    }
    row[b.len()]
}

#[cfg(test)]
mod tests;

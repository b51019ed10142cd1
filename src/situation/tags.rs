//! Filters on the staff's own columns (tags): `tag.NAME=v1,v2` keeps snaps
//! whose tag is one of the values, `tag.NAME=~text` those whose tag contains
//! the text (for tags with too many values to list). Checked against the
//! tags the loaded file has.

use super::values::{err, nearest};
use super::SituationError;
use crate::plays::Plays;
use serde::Serialize;

/// The prefix of a tag parameter.
pub const TAG_PREFIX: &str = "tag.";

/// What a tag filter keeps.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub enum TagMatch {
    /// The tag is one of these values (compared without regard to case).
    Any(Vec<String>),
    /// The tag contains this text (without regard to case).
    Contains(String),
}

/// One tag filter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TagFilter {
    /// The tag's name as the query language writes it (lower case).
    pub name: String,
    pub keep: TagMatch,
}

/// The tag name in a `tag.NAME` key, if the key is one.
pub fn tag_name(key: &str) -> Option<&str> {
    key.strip_prefix(TAG_PREFIX)
}

/// Read `tag.NAME=value`.
pub fn parse_tag(key: &str, v: &str) -> Result<TagFilter, SituationError> {
    let name = tag_name(key).unwrap_or("").trim();
    if name.is_empty() || !name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_') {
        return Err(err(key, v, "a tag parameter is tag.NAME, NAME in lower-case letters, digits and _ (tag.pressure=yes)"));
    }
    let t = v.trim();
    let keep = match t.strip_prefix('~') {
        Some(text) if !text.trim().is_empty() => TagMatch::Contains(text.trim().to_string()),
        Some(_) => return Err(err(key, v, "~ needs text to search for (tag.note=~blitz)")),
        None => {
            let mut values: Vec<String> = t.split(',').map(|x| x.trim().to_string()).filter(|x| !x.is_empty()).collect();
            values.dedup();
            if values.is_empty() {
                return Err(err(key, v, "empty list; expected one or more values (tag.pressure=yes,no)"));
            }
            TagMatch::Any(values)
        }
    };
    Ok(TagFilter { name: name.to_ascii_lowercase(), keep })
}

impl TagFilter {
    /// The value as written in links.
    pub fn show(&self) -> String {
        match &self.keep {
            TagMatch::Any(v) => v.join(","),
            TagMatch::Contains(t) => format!("~{t}"),
        }
    }
    pub fn key(&self) -> String {
        format!("{TAG_PREFIX}{}", self.name)
    }
    /// Does snap `i` pass? A snap with the tag empty passes no filter.
    pub fn matches(&self, plays: &Plays, i: usize) -> bool {
        let Some(t) = plays.tags.index(&self.name) else { return false };
        let Some(v) = plays.tags.value(t, i) else { return false };
        match &self.keep {
            TagMatch::Any(list) => list.iter().any(|x| x.eq_ignore_ascii_case(v)),
            TagMatch::Contains(text) => v.to_lowercase().contains(&text.to_lowercase()),
        }
    }
    /// Is the tag in the file, and (for a tag with a list) each value one of
    /// its values? If not: the refusal, with the nearest name or value.
    pub fn check(&self, plays: &Plays) -> Result<(), SituationError> {
        let tags = &plays.tags;
        let key = self.key();
        let shown = self.show();
        let Some(t) = tags.index(&self.name) else {
            let reason = if tags.is_empty() {
                "the file has no tags (columns beyond ours)".to_string()
            } else {
                match nearest(&self.name, tags.names.iter().map(String::as_str)) {
                    Some(n) => format!("unknown tag '{}'; did you mean 'tag.{n}'?", self.name),
                    None => format!("unknown tag '{}'; the file's tags: {}", self.name, tags.names.iter().map(|n| format!("tag.{n}")).collect::<Vec<_>>().join(", ")),
                }
            };
            return Err(err(&key, &shown, reason));
        };
        if let TagMatch::Any(list) = &self.keep {
            if tags.is_list(t) {
                let have = &tags.values[t];
                for v in list {
                    if !have.iter().any(|h| h.eq_ignore_ascii_case(v)) {
                        let hint = match nearest(v, have.iter().map(String::as_str)) {
                            Some(n) => format!("did you mean '{n}'?"),
                            None => format!("its values: {}", have.join(", ")),
                        };
                        return Err(err(&key, &shown, format!("'{v}' is not a value of tag {}; {hint}", self.name)));
                    }
                }
            }
        }
        Ok(())
    }
}

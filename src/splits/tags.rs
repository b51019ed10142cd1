//! A passer broken down by the values of one of the staff's tags: for each
//! value, his numbers against the league's on snaps with that value, with
//! the usual estimates and intervals (the split engine run with the tag
//! filter added, once per value).

use super::metrics::SnapValues;
use super::index::SplitIndex;
use super::table::{split_table_in, MetricInfo, PasserRow};
use crate::plays::Plays;
use crate::situation::{Situation, TagFilter, TagMatch};
use serde::Serialize;

/// One value of the tag.
#[derive(Debug, Clone, Serialize)]
pub struct TagLine {
    pub value: String,
    /// The situation with the tag filter, as query pairs (for links).
    pub query: Vec<(String, String)>,
    pub league: Vec<Option<f64>>,
    pub league_dropbacks: u32,
    /// None when the passer has no dropback with this value.
    pub row: Option<PasserRow>,
}

/// A passer by the values of a tag, in `situation`.
#[derive(Debug, Clone, Serialize)]
pub struct TagBreakdown {
    pub passer: String,
    /// The tag's name (`tag.NAME`) and its header in the file.
    pub tag: String,
    pub header: String,
    pub situation: String,
    pub metrics: Vec<MetricInfo>,
    pub lines: Vec<TagLine>,
}

/// Why a breakdown cannot be drawn.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TagBreakdownError {
    #[error("no tag called '{0}' in the file")]
    UnknownTag(String),
    #[error("tag {0} has more than 50 values; it is searchable text, not a breakdown")]
    TooManyValues(String),
    #[error("no passer called '{0}' in the file")]
    UnknownPasser(String),
}

/// `passer` in `situation`, split by each value of tag `tag` (snaps
/// without a value are left out). Passers qualify at `min_dropbacks`
/// within each value, as in the explorer.
pub fn tag_breakdown(p: &Plays, v: &SnapValues, passer: &str, situation: &Situation, tag: &str, min_dropbacks: u32) -> Result<TagBreakdown, TagBreakdownError> {
    tag_breakdown_in(&SplitIndex::build(p, v), p, v, passer, situation, tag, min_dropbacks)
}

/// `tag_breakdown` on a league already indexed (`ix` built from `p`, `v`).
pub fn tag_breakdown_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, passer: &str, situation: &Situation, tag: &str, min_dropbacks: u32) -> Result<TagBreakdown, TagBreakdownError> {
    let t = p.tags.index(tag).ok_or_else(|| TagBreakdownError::UnknownTag(tag.to_string()))?;
    if !p.tags.is_list(t) {
        return Err(TagBreakdownError::TooManyValues(p.tags.names[t].clone()));
    }
    if p.passer_index(passer).is_none() {
        return Err(TagBreakdownError::UnknownPasser(passer.to_string()));
    }
    let name = p.tags.names[t].clone();
    let base = Situation { passer: None, group: crate::situation::Group::Passer, ..situation.clone() };
    let mut metrics = Vec::new();
    let mut lines = Vec::new();
    for value in &spellings(p, t) {
        let mut s = base.clone();
        s.tags.retain(|f| f.name != name);
        s.tags.push(TagFilter { name: name.clone(), keep: TagMatch::Any(vec![value.clone()]) });
        s.tags.sort_by(|a, b| a.name.cmp(&b.name));
        let table = split_table_in(ix, p, v, &s, min_dropbacks, Some(passer));
        if metrics.is_empty() {
            metrics = table.metrics.clone();
        }
        lines.push(TagLine {
            value: value.clone(),
            query: s.to_query(),
            league: table.league.clone(),
            league_dropbacks: table.league_dropbacks,
            row: table.row(passer).cloned(),
        });
    }
    Ok(TagBreakdown {
        passer: passer.to_string(),
        tag: name,
        header: p.tags.headers[t].clone(),
        situation: base.describe(),
        metrics,
        lines,
    })
}

/// The tag's values, one per spelling that differs only in case (filters
/// ignore case): the spelling on the most snaps, in the file's order.
fn spellings(p: &Plays, t: usize) -> Vec<String> {
    let values = &p.tags.values[t];
    let mut counts = vec![0usize; values.len()];
    for &c in &p.tags.codes[t] {
        if let Some(n) = counts.get_mut(c as usize) {
            *n += 1;
        }
    }
    let mut out: Vec<(String, usize)> = Vec::new();
    for (v, &n) in values.iter().zip(&counts) {
        match out.iter_mut().find(|(x, _)| x.eq_ignore_ascii_case(v)) {
            Some(best) if n > best.1 => *best = (v.clone(), n),
            Some(_) => {}
            None => out.push((v.clone(), n)),
        }
    }
    out.into_iter().map(|(v, _)| v).collect()
}

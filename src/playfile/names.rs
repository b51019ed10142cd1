//! The name columns of every file (game, home, away, offense, defense,
//! passer) as indices into one list of distinct names, trimmed: the cell
//! checks, the game checks and `Plays` then compare and number names
//! without hashing text on every row.

use super::at::{C_AWAY, C_DEFENSE, C_GAME, C_HOME, C_OFFENSE, C_PASSER};
use super::read::{RawColumn, RawTable};
use crate::plays::NO_NAME;
use std::collections::HashMap;

/// The name columns, in the order `Names::codes` holds them.
pub(super) const NAME_COLUMNS: [usize; 6] = [C_GAME, C_HOME, C_AWAY, C_OFFENSE, C_DEFENSE, C_PASSER];

/// Longest name accepted, in characters.
pub(super) const NAME_MAX_CHARS: usize = 200;

pub(super) struct Names {
    /// Distinct names in order of first appearance.
    pub list: Vec<String>,
    /// Per name: longer than `NAME_MAX_CHARS`.
    pub too_long: Vec<bool>,
    /// Per table, per `NAME_COLUMNS` entry, per row: the name's index, or
    /// `NO_NAME` when the cell is empty (or the column absent).
    codes: Vec<[Vec<u32>; 6]>,
}

impl Names {
    /// Number the name columns of every table, taking them out of the
    /// tables (their text is no longer needed).
    pub fn build(tables: &mut [RawTable]) -> Names {
        let mut list: Vec<String> = Vec::new();
        let mut index: HashMap<String, u32> = HashMap::new();
        let mut codes = Vec::with_capacity(tables.len());
        for t in tables.iter_mut() {
            let height = t.height;
            let per_column = NAME_COLUMNS.map(|col| {
                let Some(Some(RawColumn::Text(c))) = t.columns.get_mut(col).map(Option::take) else {
                    return vec![NO_NAME; height];
                };
                let mut out = Vec::with_capacity(height);
                // Names come in runs (a game's rows, a drive's offense):
                // the previous cell answers most lookups.
                let mut prev: (&str, u32) = ("", NO_NAME);
                for v in c.iter() {
                    let v = v.map_or("", str::trim);
                    if v == prev.0 {
                        out.push(prev.1);
                        continue;
                    }
                    let code = if v.is_empty() {
                        NO_NAME
                    } else if let Some(&code) = index.get(v) {
                        code
                    } else {
                        list.push(v.to_string());
                        index.insert(v.to_string(), list.len() as u32 - 1);
                        list.len() as u32 - 1
                    };
                    prev = (v, code);
                    out.push(code);
                }
                out
            });
            codes.push(per_column);
        }
        let too_long = list.iter().map(|v| v.chars().count() > NAME_MAX_CHARS).collect();
        Names { list, too_long, codes }
    }

    /// The name in name column `k` (an index into `NAME_COLUMNS`) of table
    /// `table`, row `row`.
    #[inline]
    pub fn code(&self, table: usize, k: usize, row: usize) -> u32 {
        self.codes[table][k].get(row).copied().unwrap_or(NO_NAME)
    }

    pub fn name(&self, code: u32) -> &str {
        self.list.get(code as usize).map_or("", String::as_str)
    }
}

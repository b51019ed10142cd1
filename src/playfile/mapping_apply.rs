//! Applying a mapping to one of their files: their columns become ours in
//! our notation (a `RawTable` the usual cell and game checks then read),
//! every cell the mapping cannot read is reported with their column and
//! value, and their other columns are kept as tags.

use super::mapping::{col_index, Mapping, OffenseForm};
use super::mapping_values::{read_bool, read_kind, read_period};
use super::read::{text_of, Mapped, RawColumn, RawTable};
use super::report::{Issue, IssueKind};
use super::COLUMNS;
use polars::prelude::*;

/// How one of our columns is read from theirs.
#[derive(Clone, Copy, PartialEq)]
enum Reader {
    Text,
    Bool,
    Clock,
    Period,
    YardLine,
    Kind,
    Offense,
}

fn reader_of(name: &str) -> Reader {
    match name {
        "complete" | "intercepted" | "fumble_lost" | "touchback" => Reader::Bool,
        "clock" => Reader::Clock,
        "period" => Reader::Period,
        "ball_on" => Reader::YardLine,
        "kind" => Reader::Kind,
        "offense" | "defense" => Reader::Offense,
        _ => Reader::Text,
    }
}

fn quoted(v: &str) -> String {
    let short: String = v.chars().take(40).collect();
    if short.len() < v.len() {
        format!("\"{short}…\"")
    } else {
        format!("\"{short}\"")
    }
}

/// Their file (every column as read) through `m`, as our table.
pub fn translate(m: &Mapping, name: &str, df: &DataFrame) -> Result<RawTable, Vec<Issue>> {
    let height = df.height();
    let mut missing = Vec::new();
    let mut theirs = |their: &str, ours: &str| -> Option<StringChunked> {
        match df.column(their) {
            Ok(c) => text_of(name, c).ok(),
            Err(_) => {
                missing.push(Issue::column(name, their, IssueKind::MissingColumn, format!("their column {their} (our {ours}) is not in the file; the mapping names it")));
                None
            }
        }
    };
    let sources: Vec<Option<StringChunked>> = COLUMNS.iter().zip(&m.columns).map(|(spec, c)| c.as_deref().and_then(|c| theirs(c, spec.name))).collect();
    let scores = m.home_away_scores.as_ref().map(|(h, a)| (theirs(h, "home_score"), theirs(a, "away_score")));
    if !missing.is_empty() {
        return Err(missing);
    }
    let mut mapped = Mapped {
        labels: COLUMNS.iter().zip(&m.columns).map(|(spec, c)| c.clone().unwrap_or_else(|| spec.name.to_string())).collect(),
        ..Mapped::default()
    };
    let cell = |c: &Option<StringChunked>, r: usize| -> Option<String> {
        let v = c.as_ref()?.get(r)?.trim();
        (!v.is_empty()).then(|| v.to_string())
    };
    let mut out: Vec<Vec<Option<String>>> = vec![Vec::with_capacity(height); COLUMNS.len()];
    let (c_home, c_away, c_off, c_def) = (col_index("home"), col_index("away"), col_index("offense"), col_index("defense"));
    let (c_os, c_ds) = (col_index("off_score"), col_index("def_score"));
    for r in 0..height {
        for (ci, spec) in COLUMNS.iter().enumerate() {
            let raw = cell(&sources[ci], r);
            let value = match (raw, reader_of(spec.name)) {
                (None, _) => None,
                (Some(v), reader) => {
                    let read = match reader {
                        Reader::Text => Ok(v.clone()),
                        Reader::Bool => read_bool(&v, &m.yes, &m.no).map(|b| b.to_string()),
                        Reader::Clock => m.clock.read(&v).map(|s| s.to_string()),
                        Reader::Period => read_period(&v, &m.overtime).map(|p| p.to_string()),
                        Reader::YardLine => m.yard_line.read(&v).map(|b| b.to_string()),
                        Reader::Kind => read_kind(&v, &m.kinds).map(|k| k.as_str().to_string()),
                        Reader::Offense => match &m.offense {
                            OffenseForm::Team => Ok(v.clone()),
                            OffenseForm::Side { home, away } => {
                                if v.eq_ignore_ascii_case(home) {
                                    cell(&sources[c_home], r).ok_or_else(|| "names the home side, but the home team is empty".to_string())
                                } else if v.eq_ignore_ascii_case(away) {
                                    cell(&sources[c_away], r).ok_or_else(|| "names the away side, but the away team is empty".to_string())
                                } else {
                                    Err(format!("is not a side; expected {home} (home) or {away} (away)"))
                                }
                            }
                        },
                    };
                    match read {
                        Ok(x) => Some(x),
                        Err(why) => {
                            let label = &mapped.labels[ci];
                            mapped.issues.push(Issue {
                                file: name.to_string(),
                                row: Some(r + 1),
                                column: Some(label.clone()),
                                kind: IssueKind::BadValue,
                                message: format!("their column {label}: {} {why}", quoted(&v)),
                            });
                            mapped.failed.insert((r, ci));
                            None
                        }
                    }
                }
            };
            out[ci].push(value);
        }
        // Our columns their file does not hold: the defense, and scores
        // from the offense's side.
        let (home, away) = (out[c_home][r].clone(), out[c_away][r].clone());
        let offense = out[c_off][r].clone();
        let off_home = match (&offense, &home, &away) {
            (Some(o), Some(h), _) if o == h => Some(true),
            (Some(o), _, Some(a)) if o == a => Some(false),
            _ => None,
        };
        if m.columns[c_def].is_none() {
            out[c_def][r] = match off_home {
                Some(true) => away.clone(),
                Some(false) => home.clone(),
                None => {
                    mapped.failed.insert((r, c_def));
                    None
                }
            };
        }
        if let Some((hs, as_)) = &scores {
            let (h, a) = (cell(hs, r), cell(as_, r));
            let (os, ds) = match off_home {
                Some(true) => (h, a),
                Some(false) => (a, h),
                None => {
                    mapped.failed.insert((r, c_os));
                    mapped.failed.insert((r, c_ds));
                    (None, None)
                }
            };
            out[c_os][r] = os;
            out[c_ds][r] = ds;
        }
    }
    if let Some((h, a)) = &m.home_away_scores {
        // Messages about a score name both of their columns.
        mapped.labels[c_os] = format!("{h}/{a}");
        mapped.labels[c_ds] = format!("{h}/{a}");
    }
    let columns: Vec<Option<RawColumn>> = COLUMNS
        .iter()
        .enumerate()
        .map(|(ci, spec)| {
            let derived = (ci == c_def) || (m.home_away_scores.is_some() && (ci == c_os || ci == c_ds));
            (sources[ci].is_some() || derived).then(|| {
                let mut ca: StringChunked = out[ci].iter().map(|v| v.as_deref()).collect();
                ca.rename(PlSmallStr::from(spec.name));
                RawColumn::Text(ca)
            })
        })
        .collect();
    let used = m.their_columns();
    let mut tags = Vec::new();
    for c in df.columns() {
        let n = c.name().as_str();
        if used.contains(&n) || m.skip_tags.iter().any(|s| s == n) {
            continue;
        }
        tags.push((n.to_string(), text_of(name, c)?));
    }
    Ok(RawTable { file: name.to_string(), height, columns, tags, mapped: Some(mapped) })
}

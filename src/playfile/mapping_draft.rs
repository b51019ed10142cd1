//! Drafting a mapping from their header and a sample of their values
//! (`lategame map FILE`): what can be guessed is filled in, the rest is
//! marked `# FILL IN` for the staff. The draft is TOML `Mapping::parse` reads.

use super::mapping::EXTRA_KEYS;
use super::read::text_of;
use super::{Kind, COLUMNS};
use polars::prelude::*;
use std::fmt::Write;

/// Rows looked at for the values.
const SAMPLE: usize = 5000;

/// Header words (lower case, letters and digits only) that likely hold
/// each of our columns. Plain English, no particular feed's names.
const HINTS: &[(&str, &[&str])] = &[
    ("game", &["game", "gameid", "gamekey", "gameref", "match", "matchid", "matchref", "contest", "contestid"]),
    ("season", &["season", "year", "yr", "campaign"]),
    ("week", &["week", "wk", "round", "rnd"]),
    ("home", &["home", "hometeam", "host", "hostteam", "hostclub"]),
    ("away", &["away", "awayteam", "visitor", "visitors", "vis", "guest", "guestteam", "guestclub"]),
    ("seq", &["seq", "sequence", "playno", "playnum", "snap", "snapno", "snapnum", "order"]),
    ("period", &["period", "qtr", "quarter", "per", "frame"]),
    ("clock", &["clock", "time", "timeleft", "gameclock", "remaining"]),
    ("offense", &["offense", "off", "offteam", "possession", "poss", "hasball", "ballteam"]),
    ("defense", &["defense", "def", "defteam"]),
    ("off_score", &["offscore", "offensescore", "offpts", "possscore"]),
    ("def_score", &["defscore", "defensescore", "defpts"]),
    ("home_score", &["homescore", "homepts", "hostscore", "hostpts"]),
    ("away_score", &["awayscore", "awaypts", "visscore", "vispts", "guestscore", "guestpts"]),
    ("off_timeouts", &["offtimeouts", "offto", "offtol", "posstimeouts", "possto"]),
    ("def_timeouts", &["deftimeouts", "defto", "deftol"]),
    ("down", &["down", "dn"]),
    ("to_go", &["togo", "distance", "dist", "yardstogo", "ydstogo"]),
    ("ball_on", &["ballon", "yardline", "yardln", "ydline", "spot", "los", "fieldpos"]),
    ("kind", &["kind", "playtype", "type", "playkind", "playcode", "code", "call"]),
    ("passer", &["passer", "qb", "quarterback", "thrower"]),
    ("complete", &["complete", "completed", "comp", "caught", "catch"]),
    ("intercepted", &["intercepted", "int", "interception", "picked", "pick"]),
    ("air_yards", &["airyards", "air", "airyds", "depth"]),
    ("gain", &["gain", "yards", "yds", "netyards", "netyds", "net", "netgain"]),
    ("fumble_lost", &["fumblelost", "fumlost", "lostfumble"]),
    ("touchback", &["touchback", "tb"]),
    ("points", &["points", "pts", "scored"]),
    ("home_line", &["homeline", "line", "spread"]),
];

fn norm(s: &str) -> String {
    s.chars().filter(|c| c.is_ascii_alphanumeric()).flat_map(|c| c.to_lowercase()).collect()
}

fn q(s: &str) -> String {
    format!("\"{}\"", s.replace('\\', "\\\\").replace('"', "\\\""))
}

/// Which of their headers holds each of our columns (a header is used once).
fn guess_columns(header: &[String]) -> Vec<(&'static str, Option<String>)> {
    let mut used = vec![false; header.len()];
    let mut out = Vec::new();
    for (ours, hints) in HINTS {
        let found = header.iter().enumerate().find(|(i, h)| !used[*i] && (norm(h) == norm(ours) || hints.contains(&norm(h).as_str())));
        out.push((*ours, found.map(|(i, h)| {
            used[i] = true;
            h.clone()
        })));
    }
    out
}

/// A sample of distinct values of one of their columns, in order of first sight.
fn distinct(df: &DataFrame, col: &str, max: usize) -> Vec<String> {
    let Ok(c) = df.column(col) else { return Vec::new() };
    let Ok(text) = text_of("", c) else { return Vec::new() };
    let mut out: Vec<String> = Vec::new();
    for v in text.iter().take(SAMPLE).flatten() {
        let v = v.trim();
        if !v.is_empty() && !out.iter().any(|x| x == v) {
            out.push(v.to_string());
            if out.len() >= max {
                break;
            }
        }
    }
    out
}

/// Our kind for one of their codes, when its words say it.
fn guess_kind(code: &str) -> Option<Kind> {
    let c = code.trim().to_lowercase();
    if let Some(k) = Kind::parse(&c.replace(' ', "_")) {
        return Some(k);
    }
    let has = |w: &str| c.split(|ch: char| !ch.is_ascii_alphanumeric()).any(|t| t == w) || c.contains(w) && w.len() > 3;
    let rules: [(&[&str], Kind); 12] = [
        (&["sack", "sacked"], Kind::Sack),
        (&["scramble", "scram"], Kind::Scramble),
        (&["kneel", "knee"], Kind::Kneel),
        (&["spike"], Kind::Spike),
        (&["two", "2pt"], Kind::TwoPoint),
        (&["extra", "xp", "pat"], Kind::ExtraPoint),
        (&["fg", "field"], Kind::FieldGoal),
        (&["kickoff", "ko"], Kind::Kickoff),
        (&["punt"], Kind::Punt),
        (&["penalty", "flag", "pen"], Kind::Penalty),
        (&["pass", "p"], Kind::Pass),
        (&["run", "rush", "r"], Kind::Run),
    ];
    rules.iter().find(|(words, _)| words.iter().any(|w| has(w))).map(|(_, k)| *k)
}

/// The draft mapping for their file (every column read as text).
pub fn draft_mapping(file: &str, df: &DataFrame) -> String {
    let header: Vec<String> = df.get_column_names().iter().map(|s| s.to_string()).collect();
    let cols = guess_columns(&header);
    let theirs = |ours: &str| cols.iter().find(|(o, _)| *o == ours).and_then(|(_, t)| t.clone());
    let home_away = theirs("home_score").is_some() && theirs("away_score").is_some() && theirs("off_score").is_none();
    let mut s = String::new();
    let _ = writeln!(s, "# Mapping drafted by `lategame map` from {file} ({} rows looked at).", df.height().min(SAMPLE));
    let _ = writeln!(s, "# Check every line; lines marked FILL IN need the staff. README: \"Another layout\".\n");
    s.push_str("[columns]\n# our column = their column\n");
    for (ours, t) in &cols {
        let required = COLUMNS.iter().find(|c| c.name == *ours).is_some_and(|c| c.required);
        let skip = (home_away && (*ours == "off_score" || *ours == "def_score")) || (!home_away && EXTRA_KEYS.contains(ours) && t.is_none());
        match t {
            Some(t) => {
                let _ = writeln!(s, "{ours} = {}", q(t));
            }
            None if skip => {}
            None if *ours == "defense" => s.push_str("# defense: left out, the team not on offense\n"),
            None if required => {
                let _ = writeln!(s, "# {ours} = \"\"  # FILL IN: their column for {ours}");
            }
            None => {
                let _ = writeln!(s, "# {ours} = \"\"  # optional; not found");
            }
        }
    }
    s.push_str("\n[values]\n");
    if home_away {
        s.push_str("scores = \"home_away\"\n");
    }
    if let Some(c) = theirs("clock") {
        let vals = distinct(df, &c, 200);
        let form = if vals.iter().any(|v| v.to_lowercase().ends_with("remaining")) {
            "m:ss remaining"
        } else if vals.iter().any(|v| v.contains(':')) {
            "m:ss"
        } else {
            "seconds"
        };
        let _ = writeln!(s, "clock = {}  # seen: {}", q(form), sample_words(&vals));
    }
    if let Some(c) = theirs("ball_on") {
        let vals = distinct(df, &c, 200);
        if vals.iter().any(|v| v.chars().any(|ch| ch.is_alphabetic())) {
            let mut words: Vec<String> = Vec::new();
            for v in &vals {
                let w: String = v.chars().take_while(|ch| ch.is_alphabetic()).collect();
                if !w.is_empty() && !words.contains(&w) {
                    words.push(w);
                }
            }
            let own = words.iter().find(|w| w.to_lowercase().contains("own"));
            let opp = words.iter().find(|w| w.to_lowercase().contains("opp"));
            s.push_str("yard_line = \"sides\"\n");
            match (own, opp) {
                (Some(o), Some(p)) => {
                    let _ = writeln!(s, "own = {}\nopp = {}", q(o), q(p));
                }
                _ => {
                    let _ = writeln!(s, "own = \"\"  # FILL IN: their word for the offense's own half (seen: {})", words.join(", "));
                    s.push_str("opp = \"\"  # FILL IN: their word for the opponent's half\n");
                }
            }
        } else if vals.iter().any(|v| v.starts_with('-') || v.starts_with('+')) {
            s.push_str("yard_line = \"signed\"  # -35 own half, +20 opponent's half\n");
        } else {
            s.push_str("yard_line = \"from_own\"  # FILL IN: \"from_own\" or \"from_opp\" (1-99 counted from which goal line?)\n");
        }
    }
    if let Some(c) = theirs("period") {
        let ot: Vec<String> = distinct(df, &c, 50).into_iter().filter(|v| v.strip_prefix(['Q', 'q']).unwrap_or(v).parse::<i32>().is_err()).collect();
        if !ot.is_empty() {
            let _ = writeln!(s, "overtime = [{}]  # the first is period 5, the next 6", ot.iter().map(|v| q(v)).collect::<Vec<_>>().join(", "));
        }
    }
    if let Some(c) = theirs("offense") {
        let vals = distinct(df, &c, 50);
        let teams: Vec<String> = ["home", "away"].iter().filter_map(|k| theirs(k)).flat_map(|h| distinct(df, &h, 500)).collect();
        if !vals.is_empty() && vals.len() <= 2 && !vals.iter().any(|v| teams.contains(v)) {
            let home = vals.iter().find(|v| v.to_lowercase().starts_with('h')).cloned().unwrap_or_else(|| vals[0].clone());
            let away = vals.iter().find(|v| **v != home).cloned().unwrap_or_default();
            let _ = writeln!(s, "offense = \"home_away\"  # FILL IN: check which code is the home side\noffense_home = {}\noffense_away = {}", q(&home), q(&away));
        }
    }
    let mut yes: Vec<String> = Vec::new();
    let mut no: Vec<String> = Vec::new();
    let mut unknown: Vec<String> = Vec::new();
    for k in ["complete", "intercepted", "fumble_lost", "touchback"] {
        for v in theirs(k).map(|c| distinct(df, &c, 20)).unwrap_or_default() {
            let l = v.to_lowercase();
            let list = if ["true", "t", "1", "yes", "y"].contains(&l.as_str()) {
                &mut yes
            } else if ["false", "f", "0", "no", "n"].contains(&l.as_str()) {
                &mut no
            } else {
                &mut unknown
            };
            if !list.contains(&v) {
                list.push(v);
            }
        }
    }
    if !yes.is_empty() || !no.is_empty() {
        let list = |v: &[String]| v.iter().map(|x| q(x)).collect::<Vec<_>>().join(", ");
        let _ = writeln!(s, "true = [{}]\nfalse = [{}]", list(&yes), list(&no));
    }
    if !unknown.is_empty() {
        let _ = writeln!(s, "# FILL IN: yes/no words not recognised: {}", sample_words(&unknown));
    }
    s.push_str("\n[kinds]\n# our kind = [their codes]\n");
    if let Some(c) = theirs("kind") {
        let codes = distinct(df, &c, 200);
        for k in Kind::ALL {
            let mine: Vec<String> = codes.iter().filter(|c| guess_kind(c) == Some(k)).map(|c| q(c)).collect();
            if !mine.is_empty() {
                let _ = writeln!(s, "{} = [{}]", k.as_str(), mine.join(", "));
            }
        }
        for c in codes.iter().filter(|c| guess_kind(c).is_none()) {
            let _ = writeln!(s, "# FILL IN: {} is which kind?", q(c));
        }
    }
    let mapped: Vec<String> = cols.iter().filter_map(|(_, t)| t.clone()).collect();
    let tags: Vec<&String> = header.iter().filter(|h| !mapped.contains(h)).collect();
    s.push_str("\n[tags]\n");
    if !tags.is_empty() {
        let _ = writeln!(s, "# kept as tags: {}", tags.iter().map(|t| t.as_str()).collect::<Vec<_>>().join(", "));
    }
    s.push_str("skip = []  # their columns not to keep\n");
    s
}

fn sample_words(v: &[String]) -> String {
    let mut w: Vec<&str> = v.iter().take(4).map(String::as_str).collect();
    if v.len() > 4 {
        w.push("...");
    }
    w.join(", ")
}

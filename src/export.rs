//! CSV views of split tables and play lists (the video staff's cut-up).
//! Every text cell that a spreadsheet could take for a formula is
//! neutralised.

use crate::splits::{Snap, SplitTable, METRICS};

/// A cell safe to open in a spreadsheet: text beginning with `=`, `+`,
/// `-`, `@` (or a tab / carriage return) gets a leading `'`, unless the
/// whole cell is a plain number such as `-0.52` or `+20`.
pub fn safe_cell(s: &str) -> String {
    let risky = s.starts_with(['=', '+', '-', '@', '\t', '\r']);
    let numeric = s.parse::<f64>().is_ok();
    let s = if risky && !numeric { format!("'{s}") } else { s.to_string() };
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s
    }
}

fn line(cells: &[String]) -> String {
    let mut s = cells.iter().map(|c| safe_cell(c)).collect::<Vec<_>>().join(",");
    s.push('\n');
    s
}

fn num(v: f64, decimals: usize) -> String {
    if v.is_finite() {
        format!("{v:.decimals$}")
    } else {
        String::new()
    }
}

/// The cut-up: one row per snap for the video staff.
pub fn cutup_csv(snaps: &[Snap]) -> String {
    cutup_rows(snaps, None)
}

/// A saved cut-up list: the cut-up with the staff's notes on each snap
/// (`notes[k]` belongs to `snaps[k]`).
pub fn cutup_csv_with_notes(snaps: &[Snap], notes: &[String]) -> String {
    cutup_rows(snaps, Some(notes))
}

fn cutup_rows(snaps: &[Snap], notes: Option<&[String]>) -> String {
    let mut head = ["game", "season", "week", "seq", "period", "clock", "offense", "defense", "score", "down_distance", "spot", "kind", "passer", "result", "epa", "wpa"].map(String::from).to_vec();
    if notes.is_some() {
        head.push("notes".into());
    }
    let mut out = line(&head);
    for (k, s) in snaps.iter().enumerate() {
        let mut cells = vec![
            s.game.clone(),
            s.season.to_string(),
            s.week.to_string(),
            s.seq.to_string(),
            s.period.to_string(),
            s.clock.clone(),
            s.offense.clone(),
            s.defense.clone(),
            s.score.clone(),
            s.down_distance.clone(),
            s.spot.clone(),
            s.kind.to_string(),
            s.passer.clone().unwrap_or_default(),
            s.result.clone(),
            num(s.epa, 3),
            num(s.wpa, 4),
        ];
        if let Some(n) = notes {
            cells.push(n.get(k).cloned().unwrap_or_default());
        }
        out.push_str(&line(&cells));
    }
    out
}

/// The split table: per passer, each metric's value, estimate and interval.
pub fn split_csv(t: &SplitTable) -> String {
    let mut head = vec!["passer".to_string(), "team".to_string(), "qualified".to_string()];
    for m in METRICS {
        head.push(m.key.to_string());
        if m.stat != crate::splits::Stat::Count {
            for suffix in ["league", "adjusted_league", "estimate", "lo90", "hi90", "signal", "percentile"] {
                head.push(format!("{}_{suffix}", m.key));
            }
        }
    }
    let mut out = line(&head);
    let opt = |v: Option<f64>, d: usize| v.map(|x| num(x, d)).unwrap_or_default();
    let mut league = vec!["LEAGUE".to_string(), String::new(), String::new()];
    for (j, m) in METRICS.iter().enumerate() {
        league.push(opt(t.league[j], m.decimals + 1));
        if m.stat != crate::splits::Stat::Count {
            league.extend(std::iter::repeat_n(String::new(), 7));
        }
    }
    out.push_str(&line(&league));
    for r in &t.rows {
        let mut cells = vec![r.passer.clone(), r.team.clone(), r.qualified.to_string()];
        for (j, m) in METRICS.iter().enumerate() {
            let c = &r.cells[j];
            let d = m.decimals + 1;
            cells.push(opt(c.value, d));
            if m.stat != crate::splits::Stat::Count {
                cells.push(opt(c.league, d));
                cells.push(opt(c.adjusted_league, d));
                cells.push(opt(c.estimate, d));
                cells.push(opt(c.lo, d));
                cells.push(opt(c.hi, d));
                cells.push(opt(c.signal, 3));
                cells.push(opt(c.percentile, 0));
            }
        }
        out.push_str(&line(&cells));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::safe_cell;

    #[test]
    fn formula_cells_are_neutralised() {
        // source: common practice (spreadsheet formula injection), no source
        assert_eq!(safe_cell("=HYPERLINK(\"x\")"), "\"'=HYPERLINK(\"\"x\"\")\"");
        assert_eq!(safe_cell("+cmd"), "'+cmd");
        assert_eq!(safe_cell("-2+3"), "'-2+3");
        assert_eq!(safe_cell("@SUM(A1)"), "'@SUM(A1)");
        assert_eq!(safe_cell("-35"), "-35");
        assert_eq!(safe_cell("-0.52"), "-0.52");
        assert_eq!(safe_cell("+20"), "+20");
        assert_eq!(safe_cell("Kel, Harbor"), "\"Kel, Harbor\"");
        assert_eq!(safe_cell("plain"), "plain");
    }
}

//! The situation explorer: presets, the filter form, the table of passers
//! (or offenses, or defenses: `group=`) with estimates and intervals; every
//! number links to its snaps.

use super::*;
use crate::numfmt::{Fixed, Signed};
use crate::situation::Group;

pub struct PresetLink {
    pub label: &'static str,
    pub href: String,
    pub active: bool,
}

pub struct FormField {
    pub key: &'static str,
    pub label: &'static str,
    pub value: String,
    pub placeholder: String,
    pub help: &'static str,
}

/// One of the staff's tags in the filter form: a select when it has at
/// most `TAG_LIST_MAX` values, a text search (`~text`) otherwise.
pub struct TagField {
    pub key: String,
    pub label: String,
    pub list: bool,
    /// (value, selected) for a select; the first is "any" (empty value).
    pub options: Vec<(String, bool)>,
    /// The text box's value for a searchable tag.
    pub value: String,
}

/// The form's tag fields for the league's tags and the current filters.
pub fn tag_fields(plays: &crate::plays::Plays, s: &Situation) -> Vec<TagField> {
    let tags = &plays.tags;
    tags.names
        .iter()
        .enumerate()
        .map(|(t, name)| {
            let current = s.tags.iter().find(|f| &f.name == name).map(|f| f.show()).unwrap_or_default();
            let list = tags.is_list(t);
            let mut options = Vec::new();
            if list {
                options = tags.values[t].iter().map(|v| (v.clone(), v.eq_ignore_ascii_case(&current))).collect();
                if !current.is_empty() && !options.iter().any(|(_, sel)| *sel) {
                    options.insert(0, (current.clone(), true));
                }
            }
            TagField { key: format!("tag.{name}"), label: tags.headers[t].clone(), list, options, value: if list { String::new() } else { current } }
        })
        .collect()
}

pub struct Column {
    pub key: &'static str,
    pub short: &'static str,
    pub label: &'static str,
    pub href: String,
    pub aria_sort: &'static str,
    pub numeric: bool,
    pub stability: String,
}

/// One number of the table and what is written beside it. Written where
/// the page is drawn: the numbers are no `String`s of their own (a
/// 25-season table has a couple of thousand cells).
pub struct CellView {
    pub main: Fixed,
    /// Under a rate or a mean (none under a count).
    pub beneath: Option<Beneath>,
    pub sort: SortValue,
    pub href: String,
    pub title: CellTitle,
}

/// The lines under a rate's or a mean's number, in one block: the estimate
/// [90% interval], the share of the spread that is signal, and his lift
/// with its 90% interval ("lift +2.1 [−1.0, +5.3]").
pub struct Beneath {
    pub estimate: Interval,
    pub signal: SignalShare,
    pub lift: Lift,
}

/// "83.8 [80.1, 87.5]": a value and its interval.
pub struct Interval(pub Fixed, pub Fixed, pub Fixed);

impl std::fmt::Display for Interval {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} [{}, {}]", self.0, self.1, self.2)
    }
}

/// "signal 81%", or "signal –".
pub struct SignalShare(pub Option<f64>);

impl std::fmt::Display for SignalShare {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self.0 {
            Some(s) => write!(f, "signal {:.0}%", s * 100.0),
            None => f.write_str("signal –"),
        }
    }
}

/// "lift +2.1 [−1.0, +5.3]": his value here minus his normal, with its 90%
/// interval; "lift –" when there is none (no other snaps, or no estimate).
pub struct Lift(pub Option<(f64, f64, f64)>, pub usize);

impl Lift {
    pub fn of(c: &crate::splits::Cell, decimals: usize) -> Lift {
        Lift(c.lift.zip(c.lift_lo).zip(c.lift_hi).map(|((l, lo), hi)| (l, lo, hi)), decimals)
    }
}

impl std::fmt::Display for Lift {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self.0 {
            Some((l, lo, hi)) => {
                let s = |x: f64| Signed(Some(x), self.1);
                write!(f, "lift {} [{}, {}]", s(l), s(lo), s(hi))
            }
            None => f.write_str("lift –"),
        }
    }
}

/// What a cell sorts on in the browser (`data-sort`): the value as an
/// `f64` prints it, empty when missing or not finite.
pub struct SortValue(pub Option<f64>);

impl std::fmt::Display for SortValue {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self.0 {
            Some(x) if x.is_finite() => write!(f, "{x}"),
            _ => Ok(()),
        }
    }
}

/// "1260 attempts; pct 79": the cell's count and percentile.
pub struct CellTitle {
    pub n: f64,
    pub unit: &'static str,
    pub percentile: Fixed,
}

impl std::fmt::Display for CellTitle {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} {}; pct {}", self.n, self.unit, self.percentile)
    }
}

pub struct RowView {
    pub passer: String,
    pub team: String,
    pub ours: bool,
    pub profile_href: String,
    pub cells: Vec<CellView>,
    /// EPA per dropback against an average defense ("+0.150" and "[lo, hi]"),
    /// with its sort value; shown when the columns include EPA per dropback.
    pub opp: (String, String, String),
}

#[derive(Template)]
#[template(path = "explore.html")]
pub(super) struct ExplorePage {
    pub(super) chrome: Chrome,
    pub(super) presets: Vec<PresetLink>,
    pub(super) groups: Vec<GroupLink>,
    pub(super) cols_value: String,
    pub(super) preset_options: Vec<(&'static str, &'static str, bool)>,
    pub(super) preset_value: String,
    pub(super) os_value: String,
    pub(super) site_value: String,
    pub(super) fields: Vec<FormField>,
    pub(super) tag_fields: Vec<TagField>,
    pub(super) min: u32,
    /// The `by` setting: est, raw or lift.
    pub(super) by: &'static str,
    /// The rows: (key, label, selected) for the form's select.
    pub(super) group_options: Vec<(&'static str, &'static str, bool)>,
    /// "passers", "offenses" or "defenses".
    pub(super) rows_noun: &'static str,
    /// What a row's numbers are and which way is better, for team rows.
    pub(super) group_note: String,
    /// The caption of the table.
    pub(super) caption: String,
    /// A team column beside the name (passer rows only).
    pub(super) team_column: bool,
    /// Why the minimum is lower than usual, when it is.
    pub(super) min_note: String,
    /// The defense view of the opponent filtered on, if there is one.
    pub(super) defense_href: String,
    /// Too many columns for a laptop ("All columns"): the table scrolls in
    /// its own box with its heading rows and name column held.
    pub(super) wide: bool,
    pub(super) description: String,
    pub(super) seasons: String,
    pub(super) league_dropbacks: String,
    pub(super) qualified: usize,
    pub(super) columns: Vec<Column>,
    pub(super) league: Vec<String>,
    pub(super) rows: Vec<RowView>,
    pub(super) api_href: String,
    pub(super) csv_href: String,
    pub(super) plays_href: String,
    pub(super) sort_note: String,
    /// Whether the opponent-adjusted EPA column is shown (when EPA is), and its heading's explanation.
    pub(super) opp_column: bool,
    pub(super) opp_words: &'static str,
}

/// The columns shown: the projector's short set unless a group is asked
/// for; on a laptop the group (default: the key numbers, which fit 1366 px).
pub(super) fn shown_metrics(projector: bool, cols: Option<&str>) -> Vec<usize> {
    let group = match cols {
        None if projector => return METRICS.iter().enumerate().filter(|(_, m)| m.projector).map(|(j, _)| j).collect(),
        None => METRIC_GROUPS[0],
        Some(k) => *splits::metric_group(k).unwrap_or(&METRIC_GROUPS[0]),
    };
    if group.2.is_empty() {
        return (0..METRICS.len()).collect();
    }
    group.2.iter().filter_map(|k| metric_index(k)).collect()
}

/// More metric columns than this do not fit 1366 px (the widest group, Passing, has 11).
const WIDE_COLUMNS: usize = 12;

/// A link to one column group of the explorer.
pub struct GroupLink {
    pub label: &'static str,
    pub href: String,
    pub active: bool,
}

/// A passer page link that keeps the seasons and the view.
pub fn passer_query(passer: &str, params: &Params) -> String {
    let mut q = vec![("passer".to_string(), passer.to_string())];
    if let Some(s) = params.situation.show(Field::Seasons) {
        q.push(("season".into(), s));
    }
    if params.projector {
        q.push(("view".into(), "projector".into()));
    }
    to_query_string(&q)
}

/// Does the query ask for a situation (a preset or any filter), even with
/// empty boxes? A bare page opens on the default preset.
pub fn asks_situation(raw: &[(String, String)]) -> bool {
    raw.iter().any(|(k, _)| crate::situation::params::spec(k).is_some_and(|s| s.field != Field::Page))
}

/// The situation of a row's snaps: the passer's, or the offense's or
/// defense's (`team=` / `opponent=`), as a plain filter on snaps.
pub fn row_situation(situation: &Situation, name: &str) -> Situation {
    let mut s = Situation { group: Group::Passer, ..situation.clone() };
    match situation.group {
        Group::Passer => s.passer = Some(name.to_string()),
        Group::Offense => s.offense = Some(name.to_string()),
        Group::Defense => s.opponent = Some(name.to_string()),
    }
    s
}

/// What a row is, in words (singular, plural).
pub fn row_nouns(g: Group) -> (&'static str, &'static str) {
    match g {
        Group::Passer => ("passer", "passers"),
        Group::Offense => ("offense", "offenses"),
        Group::Defense => ("defense", "defenses"),
    }
}

/// The link behind one number: a count opens exactly the snaps it counts
/// (`result=`), anything else its denominator (`metric=`), where the play
/// list marks the counted snaps of a rate. `name` is the row's passer or
/// team (by the situation's grouping).
pub fn number_query(situation: &Situation, name: &str, metric: &str) -> Vec<(String, String)> {
    let mut s = row_situation(situation, name);
    if let Some(res) = PlayResult::counted_by(metric) {
        if s.results.as_ref().is_none_or(|rs| rs.contains(&res)) {
            s.results = Some(vec![res]);
        }
    }
    let mut q = s.to_query();
    q.push(("metric".into(), metric.to_string()));
    q
}

/// The row's snaps as a query string ("?..."), the start of every link
/// behind its numbers but the counts (`number_href`).
fn plays_prefix(situation: &Situation, name: &str) -> String {
    to_query_string(&row_situation(situation, name).to_query())
}

/// `/plays` with `number_query`, with the row's part from `prefix`
/// (`plays_prefix`) when the metric adds only itself (a count also picks
/// its result: built in full).
fn number_href(prefix: &str, situation: &Situation, name: &str, metric: &str, projector: bool) -> String {
    if PlayResult::counted_by(metric).is_some() || prefix.is_empty() || !metric.bytes().all(|b| b.is_ascii_alphanumeric() || b == b'_') {
        return format!("/plays{}", viewed(number_query(situation, name, metric), projector));
    }
    format!("/plays{prefix}&metric={metric}{}", if projector { "&view=projector" } else { "" })
}

pub async fn explore(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let (st2, h2, q2) = (st.clone(), headers.clone(), q.clone());
    super::super::finished::answer(&st, "/explore", &headers, q.as_deref(), move || explore_now(st2, h2, q2)).await
}

fn explore_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let params = match Params::parse_in(q.as_deref(), st.league().plays()) {
        Ok(p) => p,
        Err(e) => return refused(&st, &headers, &e, "/explore", q.as_deref()),
    };
    let mut params = params;
    if !asks_situation(&params.raw) {
        // A bare /explore opens on the default preset.
        params.situation = Preset::DEFAULT.situation(params.situation.one_score);
        params.raw.push(("preset".into(), Preset::DEFAULT.key().into()));
    }
    let ch = chrome(&st, &headers, Some(&params), "Situation explorer".into(), "explore", "/explore");
    let table = split_for(&st, &params, ch.our_passer.as_deref());
    let tags = tag_fields(st.league().plays(), &params.situation);
    html(&explore_view(ch, &params, &table, tags))
}

/// The explorer's view of a split table: presets, the form, the column
/// groups, the league row and a row per ranked passer (ours too), every
/// number linked to its snaps, the staff's tag filters. Pure: no request,
/// no league.
pub(super) fn explore_view(ch: Chrome, params: &Params, table: &splits::SplitTable, tags: Vec<TagField>) -> ExplorePage {
    let sq = params.situation_query();
    let current_preset = params.situation.preset;
    let presets = Preset::ALL
        .iter()
        .map(|p| {
            let kept = Situation { seasons: params.situation.seasons.clone(), ..p.situation(params.situation.one_score) };
            let mut q = kept.to_query();
            if params.projector {
                q.push(("view".into(), "projector".into()));
            }
            PresetLink { label: p.label(), href: format!("/explore{}", to_query_string(&q)), active: current_preset == Some(*p) }
        })
        .collect();
    let own_get = |k: &str| sq.iter().find(|(p, _)| p == k).map(|(_, v)| v.clone()).unwrap_or_default();
    let base = params.situation.base();
    let fields = PARAMS
        .iter()
        .filter(|spec| spec.form)
        .map(|spec| FormField {
            key: spec.key,
            label: spec.label,
            value: own_get(spec.key),
            placeholder: base.show(spec.field).unwrap_or_else(|| "any".into()),
            help: spec.help,
        })
        .collect();
    let shown = shown_metrics(params.projector, params.cols.as_deref());
    let current_group = params.cols.as_deref().unwrap_or(if params.projector { "" } else { METRIC_GROUPS[0].0 });
    let groups: Vec<GroupLink> = METRIC_GROUPS
        .iter()
        .map(|g| GroupLink { label: g.1, href: format!("/explore{}", params.with(&[("cols", Some(g.0))])), active: g.0 == current_group })
        .collect();
    let group = params.situation.group;
    let (_, nouns) = row_nouns(group);
    let name_short = match group {
        Group::Passer => "Passer",
        Group::Offense => "Offense",
        Group::Defense => "Defense",
    };
    let mut columns = vec![Column { key: "passer", short: name_short, label: name_short, href: String::new(), aria_sort: "none", numeric: false, stability: String::new() }];
    if !group.is_team() {
        columns.push(Column { key: "team", short: "Team", label: "Team", href: String::new(), aria_sort: "none", numeric: false, stability: String::new() });
    }
    for &j in &shown {
        let mi = &table.metrics[j];
        columns.push(Column {
            key: mi.key,
            short: mi.short,
            label: mi.label,
            href: String::new(),
            aria_sort: "none",
            numeric: true,
            stability: stability_note(mi, nouns),
        });
    }
    for c in columns.iter_mut() {
        let sorted_here = params.sort.as_deref() == Some(c.key);
        let next_dir = if sorted_here && params.descending { "asc" } else { "desc" };
        c.href = format!("/explore{}", params.with(&[("sort", Some(c.key)), ("dir", Some(next_dir))]));
        if sorted_here {
            c.aria_sort = if params.descending { "descending" } else { "ascending" };
        }
    }
    let league = shown.iter().map(|&j| fixed(table.league_row[j], METRICS[j].decimals)).collect();
    let (our_team, our_passer) = (ch.our_team.clone(), ch.our_passer.clone());
    let rows = table
        .rows
        .iter()
        .filter(|r| r.qualified || (!group.is_team() && our_passer.as_deref() == Some(r.passer.as_str())) || params.situation.row_pick().is_some())
        .map(|r| (r, plays_prefix(&params.situation, &r.passer)))
        .map(|(r, prefix)| RowView {
            passer: r.passer.clone(),
            team: r.team.clone(),
            ours: if group.is_team() {
                our_team.as_deref() == Some(r.passer.as_str())
            } else {
                our_passer.as_deref() == Some(r.passer.as_str()) || (our_passer.is_none() && our_team.as_deref() == Some(r.team.as_str()))
            },
            profile_href: row_href(&r.passer, params),
            opp: (
                crate::numfmt::signed(r.epa_opp_adj, 3, ""),
                match (r.epa_opp_adj_lo, r.epa_opp_adj_hi) {
                    (Some(lo), Some(hi)) => format!("[{}, {}]", crate::numfmt::signed(Some(lo), 3, ""), crate::numfmt::signed(Some(hi), 3, "")),
                    _ => String::new(),
                },
                sort_value(r.epa_opp_adj),
            ),
            cells: shown
                .iter()
                .map(|&j| {
                    let m = &METRICS[j];
                    let c = &r.cells[j];
                    let d = m.decimals;
                    let beneath = (m.stat != Stat::Count).then(|| Beneath {
                        estimate: Interval(Fixed(c.estimate, d), Fixed(c.lo, d), Fixed(c.hi, d)),
                        signal: SignalShare(c.signal),
                        lift: Lift::of(c, d),
                    });
                    let sortv = match params.sort_by {
                        SortBy::Estimate if m.stat != Stat::Count => c.estimate.or(c.value),
                        SortBy::Lift => c.lift,
                        _ => c.value,
                    };
                    CellView {
                        main: Fixed(c.value, d),
                        beneath,
                        sort: SortValue(sortv),
                        href: number_href(&prefix, &params.situation, &r.passer, m.key, params.projector),
                        title: CellTitle { n: c.n, unit: m.unit.label(), percentile: Fixed(c.percentile, 0) },
                    }
                })
                .collect(),
        })
        .collect::<Vec<_>>();
    let sort_note = match &params.sort {
        Some(k) => format!(
            "sorted by {} ({}, {})",
            metric_index(k).map(|j| METRICS[j].label).unwrap_or(k.as_str()),
            match params.sort_by {
                SortBy::Estimate => "estimate",
                SortBy::Value => "raw value",
                SortBy::Lift => "lift: his value here minus his normal",
            },
            if params.descending { "high to low" } else { "low to high" }
        ),
        None => "sorted by dropbacks".into(),
    };
    let group_note = match group {
        Group::Passer => String::new(),
        Group::Offense => "Each row is one offense: every passer's dropbacks for that team in this situation, each team against its own level on its other snaps.".into(),
        Group::Defense => "Each row is one defense: the dropbacks it faced in this situation, numbers allowed. Better flips for a defense: less EPA, success, completions and yards allowed and more sacks and interceptions rank higher (percentile 100 = the best defense); lift is its value here minus its own level on its other snaps.".into(),
    };
    let caption = match group {
        Group::Passer => "Passers in this situation. Each cell: the raw number; below it the estimate [90% interval], centred on his own level elsewhere; the share of the spread between passers that is signal rather than noise; and his lift: his value here minus his normal (his other snaps in the same seasons) [90% interval]. Click a number for the snaps behind it.".to_string(),
        _ => format!("{} in this situation. Each cell: the raw number; below it the estimate [90% interval], centred on the team's own level elsewhere; the share of the spread between {nouns} that is signal rather than noise; and its lift: its value here minus its level on its other snaps in the same seasons [90% interval]. Click a number for the snaps behind it.", capitalised(nouns)),
    };
    ExplorePage {
        presets,
        groups,
        cols_value: params.cols.clone().unwrap_or_default(),
        preset_options: Preset::ALL.iter().map(|p| (p.key(), p.label(), current_preset == Some(*p))).collect(),
        preset_value: current_preset.map(|p| p.key().to_string()).unwrap_or_default(),
        os_value: params.situation.one_score.to_string(),
        site_value: own_get("site"),
        fields,
        tag_fields: tags,
        min: params.min_dropbacks,
        group_options: Group::ALL.iter().map(|g| (g.key(), row_nouns(*g).1, *g == group)).collect(),
        rows_noun: nouns,
        group_note,
        caption,
        team_column: !group.is_team(),
        wide: shown.len() > WIDE_COLUMNS,
        min_note: {
            let asked = params.raw.iter().any(|(k, v)| k == "min" && !v.trim().is_empty());
            if !asked && params.min_dropbacks == splits::DEFAULT_MIN_VS_ONE_DEFENSE && params.situation.opponent.is_some() && group == Group::Passer {
                format!(
                    "Against one opponent a passer has a game or two a season, so the minimum is {} dropbacks (usually {}). To see how {} defends against every passer, open its defense view.",
                    splits::DEFAULT_MIN_VS_ONE_DEFENSE,
                    splits::DEFAULT_MIN_DROPBACKS,
                    params.situation.opponent.as_deref().unwrap_or("")
                )
            } else {
                String::new()
            }
        },
        defense_href: match (&params.situation.opponent, group) {
            (Some(t), Group::Passer) => format!("/defense{}", viewed(Situation { opponent: Some(t.clone()), passer: None, ..params.situation.clone() }.to_query(), params.projector)),
            _ => String::new(),
        },
        by: match params.sort_by {
            SortBy::Estimate => "est",
            SortBy::Value => "raw",
            SortBy::Lift => "lift",
        },
        description: table.situation.clone(),
        seasons: seasons_text(&table.seasons),
        league_dropbacks: crate::numfmt::thousands(table.league_dropbacks as usize),
        qualified: table.qualified().count(),
        columns,
        league,
        rows,
        api_href: format!("/api/splits{}", params.with(&[("view", None)])),
        csv_href: format!("/api/splits.csv{}", params.with(&[("view", None)])),
        plays_href: format!("/plays{}", viewed(sq.clone(), params.projector)),
        sort_note,
        // Beside the value metrics (and every column); the key numbers keep
        // to what fits a laptop's width.
        opp_column: !params.projector && matches!(params.cols.as_deref(), Some("value") | Some("all")) && shown.iter().any(|&j| METRICS[j].key == splits::ADJUSTED_METRIC),
        opp_words: splits::OPPONENT_WORDS,
        chrome: ch,
    }
}

/// The column heading's note on season-to-season stability; `nouns` is
/// what the rows are ("passers", "defenses", ...).
pub(super) fn stability_note(mi: &MetricInfo, nouns: &str) -> String {
    let one = nouns.trim_end_matches('s');
    match mi.stability {
        Some(r) => match (mi.stability_lo, mi.stability_hi) {
            (Some(lo), Some(hi)) => format!(
                "season-to-season r = {r:.2} (90% interval {lo:.2} to {hi:.2}) over {} {one} pairs: {}",
                mi.stability_pairs,
                splits::stability_words(lo, hi)
            ),
            _ => format!("season-to-season r = {r:.2} over {} {one} pairs", mi.stability_pairs),
        },
        None if mi.stat == Stat::Count => "a total".into(),
        None => format!("too few {nouns} qualified in consecutive seasons to judge"),
    }
}

fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    c.next().map(|f| f.to_uppercase().chain(c).collect()).unwrap_or_default()
}

/// Where a row's name leads: a passer to his page, a defense to the defense
/// view, an offense to its passers in the same situation.
pub fn row_href(name: &str, params: &Params) -> String {
    let viewed_q = |q: Vec<(String, String)>| viewed(q, params.projector);
    match params.situation.group {
        Group::Passer => format!("/passer{}", passer_query(name, params)),
        Group::Defense => format!("/defense{}", viewed_q(row_situation(&params.situation, name).to_query())),
        Group::Offense => format!("/explore{}", viewed_q(row_situation(&Situation { passer: None, ..params.situation.clone() }, name).to_query())),
    }
}

pub(super) fn seasons_text(s: &[i32]) -> String {
    match (s.first(), s.last()) {
        (Some(a), Some(b)) if a != b && s.len() == (b - a + 1) as usize => format!("{a}–{b}"),
        (Some(_), Some(_)) => s.iter().map(|x| x.to_string()).collect::<Vec<_>>().join(", "),
        _ => "none".into(),
    }
}

/// "lift +2.1 [−1.0, +5.3]" as text (`Lift`).
pub(super) fn lift_text(c: &crate::splits::Cell, decimals: usize) -> String {
    Lift::of(c, decimals).to_string()
}

#[cfg(test)]
mod href_tests {
    use super::*;

    /// The shortcut gives the same link as the query built in full, for
    /// every metric, grouping and view.
    #[test]
    fn number_links_match_the_full_query() {
        for group in Group::ALL {
            let s = Situation { seasons: Some(vec![2031, 2032]), group, ..Preset::EndOfGame.situation(8) };
            for name in ["Ava Quill", "J. Moss & Co"] {
                let prefix = plays_prefix(&s, name);
                for m in METRICS {
                    for projector in [false, true] {
                        let full = format!("/plays{}", viewed(number_query(&s, name, m.key), projector));
                        assert_eq!(number_href(&prefix, &s, name, m.key, projector), full);
                    }
                }
            }
        }
    }
}

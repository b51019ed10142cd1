//! Tests of the demo league: league-level realism, structural invariants of
//! the rows, determinism, the home line, and the truth file.

use super::*;
use crate::playfile::{write_rows, Kind};
use crate::plays::{Plays, Source};
use sha2::{Digest, Sha256};
use std::collections::{HashMap, HashSet};
use std::sync::OnceLock;

/// Seasons in the league shared by the statistical tests.
const SHARED_SEASONS: u32 = 12;

/// Twelve seasons shared by the statistical tests (simulated once).
fn shared_league() -> &'static SimOutput {
    static OUT: OnceLock<SimOutput> = OnceLock::new();
    OUT.get_or_init(|| simulate(&SimConfig { seasons: SHARED_SEASONS, seed: 11, first_season: 2020 }))
}

fn plays_of(rows: &[PlayRow]) -> Plays {
    let sources = (0..rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    Plays::from_rows(vec!["sim".into()], rows, sources)
}

/// League-level figures, each per team-game unless named a rate.
#[derive(Debug)]
#[allow(dead_code)] // read through Debug
struct Figures {
    seasons: f64,
    games: f64,
    points: f64,
    dropbacks: f64,
    completion: f64,
    yards_per_attempt: f64,
    interception: f64,
    sack: f64,
    scramble: f64,
    punts: f64,
    fg_pct: f64,
    fg_attempts: f64,
    home_win: f64,
    close_late: f64,
    snaps_per_season: f64,
    runs: f64,
    yards_per_carry: f64,
    touchdowns: f64,
    penalties: f64,
    kneels: f64,
    kneels_first_half: f64,
    spikes: f64,
    two_point_tries: f64,
    fourth_down_goes: f64,
    overtime: f64,
    ties: f64,
    kickoff_touchback: f64,
    margin_sd: f64,
}

fn figures(out: &SimOutput) -> Figures {
    let rows = &out.rows;
    let plays = plays_of(rows);
    let games = plays.games.len() as f64;
    let tg = 2.0 * games;
    let count = |k: Kind| rows.iter().filter(|r| r.kind == k).count() as f64;
    let passes: Vec<&PlayRow> = rows.iter().filter(|r| r.kind == Kind::Pass).collect();
    let att = passes.len() as f64;
    let dropbacks = rows.iter().filter(|r| r.kind.is_dropback()).count() as f64;
    let comp = passes.iter().filter(|r| r.complete == Some(true)).count() as f64;
    let ints = passes.iter().filter(|r| r.intercepted == Some(true)).count() as f64;
    let pass_yards: f64 = passes.iter().map(|r| r.gain.unwrap_or(0) as f64).sum();
    let run_rows: Vec<&PlayRow> = rows.iter().filter(|r| r.kind == Kind::Run).collect();
    let run_yards: f64 = run_rows.iter().map(|r| r.gain.unwrap_or(0) as f64).sum();
    let fga = count(Kind::FieldGoal);
    let fgm = rows.iter().filter(|r| r.kind == Kind::FieldGoal && r.points == 3).count() as f64;
    let points: f64 = plays.games.iter().map(|g| (g.home_final + g.away_final) as f64).sum();
    let home_win: f64 = plays.games.iter().map(|g| g.home_result()).sum::<f64>() / games;
    let ties = plays.games.iter().filter(|g| g.home_final == g.away_final).count() as f64;
    let margins: Vec<f64> = plays.games.iter().map(|g| (g.home_final - g.away_final) as f64).collect();
    let mean_m = margins.iter().sum::<f64>() / games;
    let margin_sd = (margins.iter().map(|m| (m - mean_m).powi(2)).sum::<f64>() / games).sqrt();
    let mut close = 0.0;
    let mut overtime = 0.0;
    for g in &plays.games {
        if let Some(i) = (g.start..g.end).find(|&i| plays.period[i] >= 5 || (plays.period[i] == 4 && plays.clock[i] <= 450)) {
            if plays.margin[i].abs() <= 8 {
                close += 1.0;
            }
        }
        if (g.start..g.end).any(|i| plays.period[i] >= 5) {
            overtime += 1.0;
        }
    }
    let kickoffs35: Vec<&PlayRow> = rows.iter().filter(|r| r.kind == Kind::Kickoff && r.ball_on == 35).collect();
    let tds = rows.iter().filter(|r| r.points.abs() == 6).count() as f64;
    let goes = rows
        .iter()
        .filter(|r| r.down == Some(4) && matches!(r.kind, Kind::Pass | Kind::Run | Kind::Sack | Kind::Scramble))
        .count() as f64;
    let seasons = plays.seasons().len() as f64;
    Figures {
        seasons,
        games,
        points: points / tg,
        dropbacks: dropbacks / tg,
        completion: comp / att,
        yards_per_attempt: pass_yards / att,
        interception: ints / att,
        sack: count(Kind::Sack) / dropbacks,
        scramble: count(Kind::Scramble) / dropbacks,
        punts: count(Kind::Punt) / tg,
        fg_pct: fgm / fga,
        fg_attempts: fga / tg,
        home_win,
        close_late: close / games,
        snaps_per_season: rows.len() as f64 / seasons,
        runs: run_rows.len() as f64 / tg,
        yards_per_carry: run_yards / run_rows.len() as f64,
        touchdowns: tds / tg,
        penalties: count(Kind::Penalty) / tg,
        kneels: count(Kind::Kneel) / tg,
        kneels_first_half: rows.iter().filter(|r| r.kind == Kind::Kneel && r.period <= 2).count() as f64 / tg,
        spikes: count(Kind::Spike) / tg,
        two_point_tries: count(Kind::TwoPoint) / tg,
        fourth_down_goes: goes / tg,
        overtime: overtime / games,
        ties: ties / games,
        kickoff_touchback: kickoffs35.iter().filter(|r| r.touchback == Some(true)).count() as f64 / kickoffs35.len() as f64,
        margin_sd,
    }
}

#[test]
fn sim_league_level_is_realistic() {
    let f = figures(shared_league());
    println!("{f:#?}");
    // Ranges: common practice, no source (professional-league figures from memory).
    let checks: [(&str, f64, f64, f64); 11] = [
        ("points per team-game", f.points, 19.0, 25.0),
        ("dropbacks per team-game", f.dropbacks, 33.0, 42.0),
        ("completion rate", f.completion, 0.60, 0.68),
        ("yards per attempt", f.yards_per_attempt, 6.3, 7.6),
        ("interception rate", f.interception, 0.020, 0.030),
        ("sack rate per dropback", f.sack, 0.05, 0.08),
        ("punts per team-game", f.punts, 3.5, 5.5),
        ("field-goal rate", f.fg_pct, 0.80, 0.90),
        ("home-win share", f.home_win, 0.53, 0.60),
        ("share within 8 at 7:30 of the 4th", f.close_late, 0.45, 0.65),
        ("snaps per season", f.snaps_per_season, 40_000.0, 50_000.0),
    ];
    let bad: Vec<String> = checks
        .iter()
        .filter(|(_, v, lo, hi)| !(lo..=hi).contains(&v))
        .map(|(n, v, lo, hi)| format!("{n} = {v:.4}, expected {lo}-{hi}"))
        .collect();
    assert!(bad.is_empty(), "{}", bad.join("\n"));
}

#[test]
fn sim_rows_keep_the_invariants() {
    let out = simulate(&SimConfig { seasons: 1, seed: 3, first_season: 2031 });
    let rows = &out.rows;
    assert!(!rows.is_empty());
    let mut keys_seen = HashSet::new();
    let mut team_games: HashMap<&str, u32> = HashMap::new();
    let mut start = 0;
    while start < rows.len() {
        let key = &rows[start].game;
        assert!(keys_seen.insert(key.clone()), "game {key} is not contiguous");
        let end = (start..rows.len()).find(|&i| &rows[i].game != key).unwrap_or(rows.len());
        let g = &rows[start..end];
        check_game(g);
        // `{season}w{week:02}g{number:02}`, numbered from 1 within the week
        let number: i32 = key[8..].parse().unwrap_or(0);
        assert_eq!(*key, game_key(g[0].season, g[0].week, number), "game key {key}");
        assert!((1..=16).contains(&number), "game key {key}");
        *team_games.entry(g[0].home.as_str()).or_default() += 1;
        *team_games.entry(g[0].away.as_str()).or_default() += 1;
        start = end;
    }
    assert_eq!(keys_seen.len(), GAMES_PER_SEASON);
    assert_eq!(team_games.len(), 32);
    assert!(team_games.values().all(|&n| n == 17), "{team_games:?}");
    let mut sorted = rows.iter().map(|r| (&r.game, r.seq)).collect::<Vec<_>>();
    sorted.sort();
    assert!(sorted.iter().zip(rows.iter()).all(|((g, s), r)| *g == &r.game && *s == r.seq), "rows sorted by game, seq");
}

fn check_game(g: &[PlayRow]) {
    let first = &g[0];
    let ctx = |r: &PlayRow| format!("{} seq {} ({:?})", r.game, r.seq, r.kind);
    assert_eq!(first.kind, Kind::Kickoff, "{}", ctx(first));
    assert_eq!((first.period, first.clock, first.off_score, first.def_score), (1, 900, 0, 0));
    let mut score: HashMap<&str, i32> = HashMap::from([(first.home.as_str(), 0), (first.away.as_str(), 0)]);
    for (i, r) in g.iter().enumerate() {
        let c = ctx(r);
        assert!(r.season == first.season && r.week == first.week && r.home == first.home && r.away == first.away, "{c}");
        assert_eq!(r.home_line, first.home_line, "{c}");
        assert!(r.home_line.is_some(), "{c}");
        assert!(r.offense == r.home || r.offense == r.away, "{c}");
        assert!(r.defense != r.offense && (r.defense == r.home || r.defense == r.away), "{c}");
        assert_eq!(r.off_score, score[r.offense.as_str()], "{c}: offense score before the snap");
        assert_eq!(r.def_score, score[r.defense.as_str()], "{c}: defense score before the snap");
        assert!((1..=5).contains(&r.period), "{c}");
        let max_clock = if r.period == 5 { 600 } else { 900 };
        assert!((0..=max_clock).contains(&r.clock), "{c}: clock {}", r.clock);
        assert!(r.clock > 0 || r.kind.is_try(), "{c}: only a try is snapped at 0:00");
        let max_to = if r.period == 5 { 2 } else { 3 };
        assert!((0..=max_to).contains(&r.off_timeouts) && (0..=max_to).contains(&r.def_timeouts), "{c}");
        assert!((1..=99).contains(&r.ball_on), "{c}");
        if r.kind.is_downless() {
            assert!(r.down.is_none() && r.to_go.is_none(), "{c}");
        } else {
            let (d, t) = (r.down.unwrap_or(0), r.to_go.unwrap_or(0));
            assert!((1..=4).contains(&d), "{c}: down {d}");
            assert!(t >= 1 && t <= 100 - r.ball_on, "{c}: to_go {t} at {}", r.ball_on);
        }
        assert_eq!(r.passer.is_some(), r.kind.needs_passer(), "{c}");
        assert_eq!(r.complete.is_some(), r.kind == Kind::Pass, "{c}");
        assert_eq!(r.intercepted.is_some(), r.kind == Kind::Pass, "{c}");
        assert_eq!(r.air_yards.is_some(), r.kind == Kind::Pass, "{c}");
        assert!(!(r.complete == Some(true) && r.intercepted == Some(true)), "{c}");
        let kick = matches!(r.kind, Kind::Kickoff | Kind::Punt | Kind::FieldGoal | Kind::ExtraPoint | Kind::TwoPoint);
        assert_eq!(r.gain.is_none(), kick, "{c}: gain");
        assert_eq!(r.touchback.is_some(), matches!(r.kind, Kind::Kickoff | Kind::Punt), "{c}");
        let scrimmage = matches!(r.kind, Kind::Pass | Kind::Run | Kind::Sack | Kind::Scramble);
        assert_eq!(r.fumble_lost.is_some(), scrimmage, "{c}: fumble_lost");
        let ok_points = match r.kind {
            Kind::ExtraPoint => [0, 1].contains(&r.points),
            Kind::TwoPoint => [0, 2].contains(&r.points),
            Kind::FieldGoal => [0, 3].contains(&r.points),
            Kind::Kickoff | Kind::Punt => [0, -6].contains(&r.points),
            Kind::Pass => [0, 6, -6].contains(&r.points),
            Kind::Run | Kind::Scramble | Kind::Sack | Kind::Kneel => [0, 6, -6, -2].contains(&r.points),
            Kind::Spike | Kind::Penalty => r.points == 0,
        };
        assert!(ok_points, "{c}: points {}", r.points);
        if let Some(g) = r.gain {
            if !matches!(r.kind, Kind::Penalty) {
                assert!(r.ball_on + g <= 100 && r.ball_on + g >= 0, "{c}: gain {g} from {}", r.ball_on);
            }
        }
        // score after the snap
        if r.points > 0 {
            *score.entry(r.offense.as_str()).or_default() += r.points;
        } else {
            *score.entry(r.defense.as_str()).or_default() -= r.points;
        }
        let Some(n) = g.get(i + 1) else { continue };
        assert!(n.seq > r.seq, "{c}: seq");
        assert!(n.period >= r.period, "{c}: period");
        if n.period == r.period {
            assert!(n.clock <= r.clock, "{c}: clock runs backwards");
        }
        let same_period = n.period == r.period;
        if r.points.abs() == 6 {
            assert!(n.kind.is_try(), "{c}: a touchdown is followed by a try");
            let scorer = if r.points > 0 { &r.offense } else { &r.defense };
            assert_eq!(&n.offense, scorer, "{c}: the scorer tries");
        }
        if r.kind.is_try() && same_period {
            assert!(n.kind == Kind::Kickoff && n.offense == r.offense && n.ball_on == 35, "{c}: try then kickoff");
        }
        if r.points == -2 && same_period {
            assert!(n.kind == Kind::Kickoff && n.offense == r.offense && n.ball_on == 20, "{c}: free kick after safety");
        }
        if r.kind == Kind::FieldGoal && r.points == 3 && same_period {
            assert!(n.kind == Kind::Kickoff && n.offense == r.offense, "{c}: kickoff after field goal");
        }
        if n.period == 3 && r.period == 2 {
            assert_eq!((n.kind, n.off_timeouts, n.def_timeouts), (Kind::Kickoff, 3, 3), "{c}: second half");
        }
    }
    // the game ended properly
    let last = g.last().map(|r| r.period).unwrap_or(0);
    let (h, a) = (score[first.home.as_str()], score[first.away.as_str()]);
    assert!(last >= 4, "{}: ended in period {last}", first.game);
    if last == 4 {
        assert_ne!(h, a, "{}: a tie after regulation goes to overtime", first.game);
    }
}

#[test]
fn sim_is_deterministic() {
    let cfg = SimConfig { seasons: 1, seed: 42, first_season: 2020 };
    let a = simulate(&cfg);
    let b = simulate(&cfg);
    assert!(a.rows == b.rows, "same seed, same rows");
    assert_eq!(a.truth, b.truth);
    let c = simulate(&SimConfig { seed: 43, ..cfg.clone() });
    assert!(a.rows != c.rows, "another seed, other rows");
    let dir = std::env::temp_dir().join(format!("lategame-sim-det-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let hash = |out: &SimOutput, name: &str| {
        let path = dir.join(name);
        write_rows(&out.rows, &path).expect("write parquet");
        let bytes = std::fs::read(&path).expect("read back");
        Sha256::digest(&bytes).to_vec()
    };
    let (ha, hb) = (hash(&a, "a.parquet"), hash(&b, "b.parquet"));
    let _ = std::fs::remove_dir_all(&dir);
    assert_eq!(ha, hb, "same seed, same file bytes");
}

#[test]
fn sim_home_line_predicts_the_margin() {
    let out = shared_league();
    let plays = plays_of(&out.rows);
    let (mut xs, mut ys) = (Vec::new(), Vec::new());
    for g in &plays.games {
        xs.push(g.home_line.expect("every game carries a line"));
        ys.push((g.home_final - g.away_final) as f64);
    }
    let (slope, intercept, resid_sd) = simple_regression(&xs, &ys);
    let n = xs.len() as f64;
    let line_sd = (xs.iter().map(|x| x * x).sum::<f64>() / n - (xs.iter().sum::<f64>() / n).powi(2)).sqrt();
    println!("home margin on home_line: slope {slope:.3}, intercept {intercept:.2}, residual SD {resid_sd:.2}, line SD {line_sd:.2}, games {n}");
    // Ranges: common practice, no source (point spreads are unbiased with SD ~13-14 of the error).
    assert!((0.85..=1.15).contains(&slope), "slope {slope}");
    assert!((12.0..=16.0).contains(&resid_sd), "residual SD {resid_sd}");
}

/// (slope, intercept, residual SD) of y on x.
fn simple_regression(x: &[f64], y: &[f64]) -> (f64, f64, f64) {
    let n = x.len() as f64;
    let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
    let sxy: f64 = x.iter().zip(y).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = x.iter().map(|a| (a - mx).powi(2)).sum();
    let slope = sxy / sxx;
    let intercept = my - slope * mx;
    let rss: f64 = x.iter().zip(y).map(|(a, b)| (b - intercept - slope * a).powi(2)).sum();
    (slope, intercept, (rss / (n - 2.0)).sqrt())
}

#[test]
fn sim_truth_covers_the_passers() {
    let out = shared_league();
    let in_rows: HashSet<&str> =
        out.rows.iter().filter(|r| r.kind.is_dropback()).filter_map(|r| r.passer.as_deref()).collect();
    let in_truth: HashSet<&str> = out.truth.iter().map(|t| t.passer.as_str()).collect();
    assert_eq!(in_rows, in_truth, "truth rows are exactly the passers who dropped back");
    assert_eq!(in_truth.len(), out.truth.len(), "one truth row per passer");
    let codes: HashSet<&str> = out.league.teams.iter().map(|t| t.code.as_str()).collect();
    let mut lc_total = 0;
    for t in &out.truth {
        assert!(codes.contains(t.last_team.as_str()), "{}", t.last_team);
        assert!(t.seasons >= 1 && t.seasons <= SHARED_SEASONS, "{}: seasons {}", t.passer, t.seasons);
        for p in [t.complete, t.interception, t.sack, t.scramble] {
            assert!((0.0..=1.0).contains(&p), "{}: {p}", t.passer);
        }
        assert!(t.complete + t.interception <= 1.0);
        assert_eq!(t.end_of_game_complete.is_some(), t.end_of_game_dropbacks > 0);
        lc_total += t.end_of_game_dropbacks;
        let n = out.rows.iter().filter(|r| r.kind.is_dropback() && r.passer.as_deref() == Some(t.passer.as_str())).count();
        assert_eq!(n as u32, t.dropbacks, "{}", t.passer);
    }
    // late-and-close dropbacks match the rows' own reading of the situation
    let lc_rows = out
        .rows
        .iter()
        .filter(|r| r.kind.is_dropback() && (r.period >= 5 || (r.period == 4 && r.clock <= 450)) && (r.off_score - r.def_score).abs() <= 8)
        .count();
    assert_eq!(lc_rows as u32, lc_total);
    // the engine's mean probabilities are close to what happened
    let att = out.rows.iter().filter(|r| r.kind == Kind::Pass).count() as f64;
    let comp = out.rows.iter().filter(|r| r.complete == Some(true)).count() as f64;
    let db = out.rows.iter().filter(|r| r.kind.is_dropback()).count() as f64;
    let sacks = out.rows.iter().filter(|r| r.kind == Kind::Sack).count() as f64;
    let w_sack: f64 = out.truth.iter().map(|t| t.sack * t.dropbacks as f64).sum::<f64>() / db;
    assert!((w_sack - sacks / db).abs() < 0.004, "sack truth {w_sack} vs rows {}", sacks / db);
    // P(complete | pass) averaged over passes is not the same set as over dropbacks; loose check
    let w_comp: f64 = out.truth.iter().map(|t| t.complete * t.dropbacks as f64).sum::<f64>() / db;
    assert!((w_comp - comp / att).abs() < 0.02, "completion truth {w_comp} vs rows {}", comp / att);
    // every passer and club in the league description is named once
    let names: HashSet<&str> = out.league.passers.iter().map(|p| p.name.as_str()).collect();
    assert_eq!(names.len(), out.league.passers.len());
    assert!(in_truth.iter().all(|n| names.contains(n)));
    assert_eq!(out.league.team_seasons.len(), 32 * SHARED_SEASONS as usize);
}

#[test]
fn sim_writes_truth_csv() {
    let out = simulate(&SimConfig { seasons: 1, seed: 5, first_season: 2020 });
    let dir = std::env::temp_dir().join(format!("lategame-sim-truth-{}", std::process::id()));
    let path = dir.join("truth.csv");
    write_truth(&out.truth, &path).expect("write truth");
    let text = std::fs::read_to_string(&path).expect("read truth");
    let _ = std::fs::remove_dir_all(&dir);
    let mut lines = text.lines();
    let header = lines.next().expect("header");
    assert!(header.starts_with("passer,last_team,seasons,end_of_game_dropbacks,"));
    let cols = header.split(',').count();
    let body: Vec<&str> = lines.collect();
    assert_eq!(body.len(), out.truth.len());
    assert!(body.iter().all(|l| l.split(',').count() == cols));
}

/// Passers move, get hurt, retire; rookies arrive.
#[test]
fn sim_passers_have_careers() {
    let out = shared_league();
    let rows = &out.rows;
    // passer → set of (season, team)
    let mut stints: HashMap<&str, HashSet<(i32, &str)>> = HashMap::new();
    let mut starters: HashMap<(&str, &str), &str> = HashMap::new(); // (game, team) → first passer
    let mut backups_started = 0;
    for r in rows.iter().filter(|r| r.kind.is_dropback()) {
        let p = r.passer.as_deref().unwrap_or("");
        stints.entry(p).or_default().insert((r.season, r.offense.as_str()));
        starters.entry((r.game.as_str(), r.offense.as_str())).or_insert(p);
    }
    let moved = stints.values().filter(|s| s.iter().map(|(_, t)| *t).collect::<HashSet<_>>().len() > 1).count();
    let seasons_of = |p: &str| stints[p].iter().map(|(s, _)| *s).collect::<HashSet<_>>();
    let rookies = stints.keys().filter(|p| seasons_of(p).iter().min() > Some(&2020)).count();
    let retired = stints.keys().filter(|p| seasons_of(p).iter().max() < Some(&2031)).count();
    // starters per team-season: more than one means an injury or a benching
    let mut per_team_season: HashMap<(i32, &str), HashSet<&str>> = HashMap::new();
    for ((game, team), p) in &starters {
        let season: i32 = game[..4].parse().unwrap_or(0);
        per_team_season.entry((season, team)).or_default().insert(p);
    }
    for s in per_team_season.values() {
        if s.len() > 1 {
            backups_started += 1;
        }
    }
    println!(
        "passers {}, moved clubs {moved}, entered after 2020 {rookies}, gone before 2031 {retired}, team-seasons with 2+ starters {backups_started} of {}",
        stints.len(),
        per_team_season.len()
    );
    assert!(moved >= 10 && rookies >= 20 && retired >= 20, "careers look frozen");
    assert!(backups_started >= 20, "starters never get hurt");
}

/// Time for 25 seasons (run with `--ignored --nocapture`).
#[test]
#[ignore]
fn sim_time_25_seasons() {
    let t = std::time::Instant::now();
    let out = simulate(&SimConfig { seasons: 25, seed: 2, first_season: 2000 });
    println!("25 seasons: {} rows in {:.2?}", out.rows.len(), t.elapsed());
}

/// The pilot regression behind `LINE_WEIGHTS` (run with `--ignored --nocapture`):
/// 16 independent leagues of 10 seasons (seeds 1-16), then the slope of the
/// fitted line on 5 held-out leagues.
#[test]
#[ignore]
fn pilot_home_line_weights() {
    let league = |seed: u64| {
        let mut log = FeatureLog::new();
        let out = run(&SimConfig { seasons: 10, seed, first_season: 2000 }, &|_, _| {}, Some(&mut log), &LateShifts::default());
        let plays = plays_of(&out.rows);
        let y: Vec<f64> = plays.games.iter().map(|g| (g.home_final - g.away_final) as f64).collect();
        (log, y)
    };
    let (mut feats, mut y) = (FeatureLog::new(), Vec::new());
    for seed in 1..=16 {
        let (f, m) = league(seed);
        feats.extend(f);
        y.extend(m);
    }
    let n = y.len();
    let x = nalgebra::DMatrix::from_fn(n, FEATURES, |i, k| feats[i][k]);
    let yv = nalgebra::DVector::from_vec(y.clone());
    let xtx = x.transpose() * &x;
    let xty = x.transpose() * &yv;
    let beta = xtx.clone().lu().solve(&xty).expect("full-rank features");
    let fitted = &x * &beta;
    let rss: f64 = (0..n).map(|i| (y[i] - fitted[i]).powi(2)).sum();
    let inv = xtx.try_inverse().expect("invertible");
    let s2 = rss / (n - FEATURES) as f64;
    let fm = (0..n).map(|i| fitted[i]).sum::<f64>() / n as f64;
    let fsd = ((0..n).map(|i| (fitted[i] - fm).powi(2)).sum::<f64>() / n as f64).sqrt();
    println!("games {n}, residual SD {:.2}, fitted line SD {fsd:.2}", s2.sqrt());
    for k in 0..FEATURES {
        println!("  w[{k:2}] = {:8.3}  (se {:.3})", beta[k], (s2 * inv[(k, k)]).sqrt());
    }
    let ws: Vec<String> = beta.iter().map(|b| format!("{b:.2}")).collect();
    println!("[{}]", ws.join(", "));
    for seed in 101..=105 {
        let (f, m) = league(seed);
        let line: Vec<f64> = f.iter().map(|f| f.iter().zip(beta.iter()).map(|(a, b)| a * b).sum()).collect();
        let (slope, _, resid) = simple_regression(&line, &m);
        println!("held-out seed {seed}: slope {slope:.3}, residual SD {resid:.2}");
    }
}

/// Key figures over several seeds (run with `--ignored --nocapture`).
#[test]
#[ignore]
fn sim_figures_across_seeds() {
    for seed in 1..=5u64 {
        let out = simulate(&SimConfig { seasons: 8, seed: 100 + seed, first_season: 2020 });
        let f = figures(&out);
        let plays = plays_of(&out.rows);
        let xs: Vec<f64> = plays.games.iter().map(|g| g.home_line.unwrap_or(0.0)).collect();
        let ys: Vec<f64> = plays.games.iter().map(|g| (g.home_final - g.away_final) as f64).collect();
        let (slope, _, resid) = simple_regression(&xs, &ys);
        println!(
            "seed {}: pts {:.2} db {:.1} comp {:.3} ypa {:.2} int {:.4} sack {:.4} punts {:.2} fg {:.3} home {:.3} close {:.3} snaps {:.0} slope {:.3} resid {:.2}",
            100 + seed, f.points, f.dropbacks, f.completion, f.yards_per_attempt, f.interception, f.sack, f.punts, f.fg_pct, f.home_win, f.close_late, f.snaps_per_season, slope, resid
        );
    }
}

#[test]
fn sim_schedule_is_balanced() {
    let out = simulate(&SimConfig { seasons: 2, seed: 9, first_season: 2020 });
    let plays = plays_of(&out.rows);
    let mut home: HashMap<(i32, u16), u32> = HashMap::new();
    let mut pairs = HashSet::new();
    for g in &plays.games {
        *home.entry((g.season, g.home)).or_default() += 1;
        let key = (g.season, g.home.min(g.away), g.home.max(g.away));
        assert!(pairs.insert(key), "{} repeats a matchup", g.key);
    }
    let counts: Vec<u32> = home.values().copied().collect();
    println!("home games per club-season: min {:?} max {:?}", counts.iter().min(), counts.iter().max());
    assert!(counts.iter().all(|&c| (8..=9).contains(&c)), "{counts:?}");
}


/// The loader accepts the simulated league as CSV and as Parquet.
#[test]
fn sim_output_passes_the_loader() {
    let out = simulate(&SimConfig { seasons: 1, seed: 21, first_season: 2024 });
    let dir = std::env::temp_dir().join(format!("lategame-sim-load-{}", std::process::id()));
    for name in ["demo.csv", "demo.parquet"] {
        let path = dir.join(name);
        write_rows(&out.rows, &path).expect("write");
        let loaded = crate::playfile::load(&path, &Default::default());
        let report = match &loaded {
            Ok(l) => &l.report,
            Err(e) => &e.report,
        };
        assert!(!report.has_errors(), "{name}: {}", report.summary(false));
        assert_eq!(report.rows_kept, out.rows.len(), "{name}");
        assert_eq!(report.games, GAMES_PER_SEASON, "{name}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

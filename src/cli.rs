//! The command line: `serve`, `check`, `simulate`, `score`, `splits`,
//! `report`. Parses arguments with clap, sets up logging and progress bars,
//! and calls the library; no logic of its own.

use crate::league::{demo_path, League, LeagueConfig};
use crate::numfmt;
use crate::playfile::{self, LoadOptions};
use crate::situation::{Preset, Situation};
use crate::splits::{self, METRICS};
use crate::web::{AppConfig, ServeConfig};
use anyhow::{Context, Result};
use clap::{Parser, Subcommand, ValueEnum};
use indicatif::{ProgressBar, ProgressStyle};
use std::path::PathBuf;
use std::process::ExitCode;

/// Our team and passer in the bundled demo league.
pub const DEMO_TEAM: &str = "BEK";
pub const DEMO_PASSER: &str = "Wendell Jastennox";

#[derive(Parser)]
#[command(name = "lategame", version, about = "Late-game passer review: fits its own EP/WP models from a league play file and serves situation splits.")]
struct Cli {
    #[command(subcommand)]
    cmd: Option<Cmd>,
}

#[derive(Subcommand)]
enum Cmd {
    /// Serve the pages and the JSON API (default: the bundled demo league).
    Serve(ServeArgs),
    /// Validate a play file (or folder) and print the report; non-zero exit on errors.
    Check {
        file: PathBuf,
        #[command(flatten)]
        map: MapArg,
        /// Count bad rows as skipped (as `serve --lenient` would) and exit 0 when valid rows remain.
        #[arg(long)]
        lenient: bool,
    },
    /// Draft a mapping for a play file in another layout from its header and a sample of its values (README: "Another layout").
    Map {
        file: PathBuf,
        /// Write the draft here (default: print it).
        #[arg(short, long)]
        out: Option<PathBuf>,
    },
    /// Generate the simulated demo league (play file plus truth file).
    Simulate {
        #[arg(long, default_value_t = 6)]
        seasons: u32,
        #[arg(long, default_value_t = 7)]
        seed: u64,
        #[arg(long, default_value_t = 2020)]
        first_season: i32,
        /// Output play file (.parquet or .csv); the truth file is written beside it.
        #[arg(long, default_value = "demo-data/league.parquet")]
        out: PathBuf,
        /// Give each passer true late-and-close shifts (logit scale): one SD for
        /// sack, interception and completion chances, or three (SACK,INT,COMP);
        /// the truth file records each passer's shifts. Off by default (the demo league).
        #[arg(long, value_name = "SD[,SD,SD]")]
        late_shifts: Option<crate::sim::LateShifts>,
        /// Play each season's overtime under the rules this file gives it (README: "Overtime rules"); default (the demo league): touchdown-or-answer, 10:00, a level period a tie.
        #[arg(long, value_name = "FILE")]
        overtime: Option<PathBuf>,
    },
    /// Write every snap with its input columns plus EP, EPA, WP, WPA and completion probability.
    Score {
        file: PathBuf,
        #[command(flatten)]
        map: MapArg,
        #[arg(short, long)]
        out: PathBuf,
        #[arg(long)]
        lenient: bool,
        #[arg(long)]
        refit: bool,
    },
    /// Print the passer split table for a situation.
    Splits {
        file: Option<PathBuf>,
        #[command(flatten)]
        map: MapArg,
        #[arg(long, conflicts_with = "r#where", help = preset_help())]
        preset: Option<String>,
        /// A situation in the pages' query language, e.g. 'preset=end-of-game&down=3,4&ball-on=+20..' (see README, "Situation parameters").
        #[arg(long = "where")]
        r#where: Option<String>,
        /// Season(s) to include (repeat or comma list).
        #[arg(long, value_delimiter = ',')]
        season: Vec<i32>,
        /// Minimum dropbacks to qualify (default 20; 5 for passers against one defense, 'opponent=').
        #[arg(long)]
        min: Option<u32>,
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
        #[arg(long)]
        lenient: bool,
    },
    /// Write the one-page situation report as PDF, without the server.
    Report {
        file: Option<PathBuf>,
        #[command(flatten)]
        map: MapArg,
        #[arg(long)]
        passer: String,
        #[arg(long, default_value = Preset::DEFAULT.key(), help = preset_help())]
        preset: String,
        #[arg(long, value_delimiter = ',')]
        season: Vec<i32>,
        /// Page size: letter (landscape, default) or a4 (landscape).
        #[arg(long, default_value = "letter")]
        paper: String,
        #[arg(short, long)]
        out: PathBuf,
    },
}

/// How to read a league, for every command that opens one: `--map M.toml`
/// reads the play file through a mapping (another layout); `--overtime
/// FILE` says which seasons played which overtime rules.
#[derive(clap::Args, Clone, Default)]
pub struct MapArg {
    /// A mapping for a play file in another layout (draft one with `lategame map FILE`).
    #[arg(long = "map", value_name = "M.toml")]
    pub map: Option<PathBuf>,
    /// Which seasons played which overtime rules (README: "Overtime rules"); default: touchdown-or-answer, 10:00, a level period a tie.
    #[arg(long = "overtime", value_name = "FILE")]
    pub overtime: Option<PathBuf>,
}

impl MapArg {
    fn open(&self) -> Result<Option<playfile::Mapping>> {
        self.map.as_deref().map(playfile::Mapping::open).transpose().map_err(Into::into)
    }

    /// The overtime config named by `--overtime` (the default without one).
    fn overtime(&self) -> Result<crate::overtime::OvertimeConfig> {
        overtime_config(self.overtime.as_deref())
    }

    /// The one place a league's configuration is built from the flags.
    fn league(&self, file: Option<PathBuf>, lenient: bool, refit: bool) -> Result<LeagueConfig> {
        Ok(LeagueConfig {
            load: LoadOptions { lenient },
            refit,
            mapping: self.open()?,
            overtime: self.overtime()?,
            ..LeagueConfig::new(file.unwrap_or_else(demo_path))
        })
    }
}

/// Read an overtime config file (`None`: the default).
fn overtime_config(path: Option<&std::path::Path>) -> Result<crate::overtime::OvertimeConfig> {
    Ok(path.map(crate::overtime::OvertimeConfig::load).transpose()?.unwrap_or_default())
}

#[derive(clap::Args)]
pub struct ServeArgs {
    pub file: Option<PathBuf>,
    #[command(flatten)]
    pub map: MapArg,
    /// Address to listen on.
    #[arg(long, default_value = "127.0.0.1:8750")]
    pub bind: String,
    /// Skip bad rows instead of refusing the file.
    #[arg(long)]
    pub lenient: bool,
    /// Fit the models again even when cached coefficients exist.
    #[arg(long)]
    pub refit: bool,
    /// Our team's code (pages highlight it).
    #[arg(long)]
    pub team: Option<String>,
    /// Our passer's name.
    #[arg(long)]
    pub passer: Option<String>,
    /// Allow binding beyond loopback; every request then needs the access token printed at start.
    #[arg(long)]
    pub share: bool,
    /// Folder for the staff's film notes and cut-up lists (default: LATEGAME_DATA_DIR, else the user's data directory).
    #[arg(long)]
    pub data_dir: Option<PathBuf>,
}

impl ServeArgs {
    /// The server's own configuration from these flags (models cached in
    /// the user's cache folder).
    fn config(&self) -> Result<ServeConfig> {
        let league = self.map.league(self.file.clone(), self.lenient, self.refit)?;
        Ok(ServeConfig {
            app: AppConfig {
                team: self.team.clone(),
                passer: self.passer.clone(),
                data_dir: Some(self.data_dir.clone().unwrap_or_else(crate::notes::default_data_dir)),
                ..AppConfig::new(league)
            },
            bind: self.bind.clone(),
            share: self.share,
        })
    }
}

#[derive(Clone, Copy, ValueEnum)]
enum Format {
    Table,
    Csv,
    Json,
}

pub fn main() -> ExitCode {
    let cli = Cli::parse();
    tracing_subscriber::fmt()
        .with_env_filter(tracing_subscriber::EnvFilter::try_from_default_env().unwrap_or_else(|_| "lategame=info,warn".into()))
        .with_writer(std::io::stderr)
        // colour only for a person at a terminal, never into a file or pipe
        .with_ansi(std::io::IsTerminal::is_terminal(&std::io::stderr()))
        .init();
    let code = match run(cli) {
        Ok(code) => code,
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::FAILURE
        }
    };
    // Score columns written behind the first open reach the disk.
    crate::models::cache::finish_writes();
    code
}

fn spinner(msg: &str) -> ProgressBar {
    let pb = ProgressBar::new_spinner();
    pb.set_style(ProgressStyle::with_template("{spinner} {msg} {elapsed}").unwrap_or_else(|_| ProgressStyle::default_spinner()));
    pb.set_message(msg.to_string());
    pb.enable_steady_tick(std::time::Duration::from_millis(120));
    pb
}

/// Load, fit and score with a spinner.
pub fn open_league(file: Option<PathBuf>, map: &MapArg, lenient: bool, refit: bool) -> Result<League> {
    open_configured(&map.league(file, lenient, refit)?)
}

fn open_configured(cfg: &LeagueConfig) -> Result<League> {
    let pb = spinner(&format!("loading {} and fitting models", cfg.path.display()));
    let league = League::open_with(cfg);
    pb.finish_and_clear();
    let league = league?;
    if league.report.has_errors() {
        eprint!("{}", league.report.summary(true));
    }
    Ok(league)
}

fn run(cli: Cli) -> Result<ExitCode> {
    let cmd = cli.cmd.unwrap_or(Cmd::Serve(ServeArgs {
        file: None,
        map: MapArg::default(),
        bind: "127.0.0.1:8750".into(),
        lenient: false,
        refit: false,
        team: None,
        passer: None,
        share: false,
        data_dir: None,
    }));
    match cmd {
        Cmd::Serve(args) => {
            crate::web::memory::tune_allocator();
            let demo = args.file.is_none();
            let mut cfg = args.config()?;
            let league = open_configured(&cfg.app.league)?;
            if demo && cfg.app.team.is_none() && cfg.app.passer.is_none() {
                // The bundled demo's scenario (demo-data/README.md).
                cfg.app.team = Some(DEMO_TEAM.to_string());
                cfg.app.passer = league.plays().passer_index(DEMO_PASSER).map(|_| DEMO_PASSER.to_string());
            }
            crate::web::serve_blocking(league, cfg)?;
            Ok(ExitCode::SUCCESS)
        }
        Cmd::Check { file, map, lenient } => {
            let mapping = map.open()?;
            let overtime = map.overtime()?;
            let pb = spinner(&format!("checking {}", file.display()));
            let result = playfile::load_mapped(&file, &LoadOptions { lenient }, mapping.as_ref());
            pb.finish_and_clear();
            match result {
                Ok(loaded) => {
                    out(&format!("{}fingerprint {}\n", loaded.report.summary(lenient), loaded.fingerprint));
                    if let Some(path) = &map.overtime {
                        let lines = overtime.report(&loaded.plays.seasons());
                        out(&format!("overtime rules by season, from {}:\n{}\n", path.display(), lines.join("\n")));
                    }
                    Ok(ExitCode::SUCCESS)
                }
                Err(e) => {
                    out(&e.report.summary(false));
                    Ok(ExitCode::FAILURE)
                }
            }
        }
        Cmd::Map { file, out } => {
            let bytes = std::fs::read(&file).with_context(|| format!("reading {}", file.display()))?;
            let name = file.file_name().map(|n| n.to_string_lossy().to_string()).unwrap_or_else(|| file.display().to_string());
            let df = playfile::read_frame(&name, &file, &bytes).map_err(|issues| anyhow::anyhow!("{}", issues.iter().map(|i| i.to_string()).collect::<Vec<_>>().join("\n")))?;
            let draft = playfile::draft_mapping(&name, &df);
            match out {
                Some(out) => {
                    std::fs::write(&out, &draft).with_context(|| format!("writing {}", out.display()))?;
                    println!("draft mapping written to {}; fill in the lines marked FILL IN, then run `lategame check {} --map {}`", out.display(), file.display(), out.display());
                }
                None => print!("{draft}"),
            }
            Ok(ExitCode::SUCCESS)
        }
        Cmd::Simulate { seasons, seed, first_season, out, late_shifts, overtime } => {
            let cfg = crate::sim::SimConfig { seasons, seed, first_season };
            let overtime = overtime_config(overtime.as_deref())?;
            let pb = ProgressBar::new(0);
            pb.set_style(ProgressStyle::with_template("simulating {bar:40} {pos}/{len} games {elapsed}").unwrap_or_else(|_| ProgressStyle::default_bar()));
            let started = std::time::Instant::now();
            let shifts = late_shifts.unwrap_or_default();
            let output = crate::sim::simulate_with_overtime(&cfg, &shifts, crate::sim::DefenseSpread::default(), &overtime, &|done, total| {
                pb.set_length(total as u64);
                pb.set_position(done as u64);
            });
            pb.finish_and_clear();
            playfile::write_rows(&output.rows, &out)?;
            let truth = truth_path(&out);
            crate::sim::write_truth(&output.truth, &truth)?;
            println!(
                "{} snaps in {} seasons written to {} (truth: {}) in {:.1} s",
                output.rows.len(),
                seasons,
                out.display(),
                truth.display(),
                started.elapsed().as_secs_f64()
            );
            Ok(ExitCode::SUCCESS)
        }
        Cmd::Score { file, map, out, lenient, refit } => {
            if std::fs::canonicalize(&out).ok().is_some_and(|o| std::fs::canonicalize(&file).ok() == Some(o)) {
                anyhow::bail!("{}: refusing to overwrite the play file; choose another output", out.display());
            }
            let league = open_league(Some(file), &map, lenient, refit)?;
            let mut df = crate::models::scored_frame(&league.scored)?;
            playfile::write_frame(&mut df, &out)?;
            println!("{} scored snaps written to {}", league.plays().len(), out.display());
            Ok(ExitCode::SUCCESS)
        }
        Cmd::Splits { file, map, preset, r#where, season, min, format, lenient } => {
            let mut situation = situation_from(preset.as_deref(), r#where.as_deref())?;
            if !season.is_empty() {
                situation.seasons = Some(season);
            }
            let league = open_league(file, &map, lenient, false)?;
            situation.check_tags(league.plays()).map_err(|e| anyhow::anyhow!("--where: {e}"))?;
            let min = min.unwrap_or_else(|| splits::default_min_dropbacks(&situation));
            let table = splits::split_table(league.plays(), &league.values(), &situation, min);
            match format {
                Format::Json => out(&format!("{}\n", serde_json::to_string_pretty(&table)?)),
                Format::Csv => out(&crate::export::split_csv(&table)),
                Format::Table => out(&text_table(&table)),
            }
            Ok(ExitCode::SUCCESS)
        }
        Cmd::Report { file, map, passer, preset, season, paper, out } => {
            let mut situation = situation_from(Some(&preset), None)?;
            if !season.is_empty() {
                situation.seasons = Some(season);
            }
            let paper = crate::report::Paper::parse(&paper).context("--paper: expected letter or a4")?;
            let league = open_league(file, &map, false, false)?;
            let pdf = crate::report::pdf(&league, &situation, &passer, paper)?;
            std::fs::write(&out, pdf).with_context(|| format!("writing {}", out.display()))?;
            println!("report written to {}", out.display());
            Ok(ExitCode::SUCCESS)
        }
    }
}

fn truth_path(out: &std::path::Path) -> PathBuf {
    let stem = out.file_stem().map(|s| s.to_string_lossy().to_string()).unwrap_or_else(|| "league".into());
    out.with_file_name(format!("{stem}-truth.csv"))
}

/// "A preset: ..." with every preset's key, for `--preset`.
fn preset_help() -> String {
    format!("A preset: {}.", Preset::keys())
}

/// The situation of `--preset` or `--where`, read by the pages' own parser
/// (percent escapes undone, unknown keys refused with the nearest one).
fn situation_from(preset: Option<&str>, query: Option<&str>) -> Result<Situation> {
    let parsed = match (preset, query) {
        (Some(p), _) => Situation::from_query(&[("preset".to_string(), p.to_string())]),
        (None, Some(q)) => {
            let pairs = crate::situation::decode_pairs(q);
            if let Some((k, _)) = pairs.iter().find(|(k, _)| crate::situation::params::spec(k).is_some_and(|s| s.field == crate::situation::params::Field::Page)) {
                anyhow::bail!("--where: '{k}' is a page setting, not a situation filter (the command takes --min, --season, --format)");
            }
            Situation::from_query(&pairs)
        }
        (None, None) => Ok(Preset::DEFAULT.situation(8)),
    };
    parsed.map_err(|e| anyhow::anyhow!("{e}"))
}

/// Print to standard output; a reader that stops early (`| head`) ends the
/// output quietly instead of a panic.
fn out(text: &str) {
    use std::io::Write;
    let mut so = std::io::stdout().lock();
    if let Err(e) = so.write_all(text.as_bytes()).and_then(|_| so.flush()) {
        if e.kind() != std::io::ErrorKind::BrokenPipe {
            eprintln!("error: writing the output: {e}");
        }
    }
}

/// Seasons as a coach writes them: `2020-2025`, or a list when not consecutive.
fn season_words(seasons: &[i32]) -> String {
    match (seasons.first(), seasons.last()) {
        (Some(a), Some(b)) if a == b => a.to_string(),
        (Some(a), Some(b)) if seasons.windows(2).all(|w| w[1] == w[0] + 1) => format!("{a}-{b}"),
        _ => seasons.iter().map(|s| s.to_string()).collect::<Vec<_>>().join(", "),
    }
}

/// The split table as text, as the explorer shows it: per passer the raw
/// numbers, and below them the estimate [90% interval] of each rate or mean.
fn text_table(t: &splits::SplitTable) -> String {
    let keys = ["dropbacks", "comp_pct", "ypa", "int_rate", "sack_rate", "rating", "anya", "epa", "success", "wpa_total", "cpoe"];
    let idx: Vec<usize> = keys.iter().filter_map(|k| splits::metric_index(k)).collect();
    let num = |v: Option<f64>, j: usize| numfmt::as_computed(v, METRICS[j].decimals, "-");
    let estimate = |c: &splits::Cell, j: usize| match c.estimate {
        Some(_) => format!("{} [{}, {}]", num(c.estimate, j), num(c.lo, j), num(c.hi, j)),
        None => String::new(),
    };
    // Lines of cells: heading, league, then two per qualified passer.
    let mut lines: Vec<(String, String, Vec<String>)> = vec![
        (t.group.key().into(), "team".into(), idx.iter().map(|&j| METRICS[j].short.to_string()).collect()),
        ("LEAGUE".into(), String::new(), idx.iter().map(|&j| num(t.league_row[j], j)).collect()),
    ];
    for r in t.qualified() {
        lines.push((r.passer.chars().take(22).collect(), r.team.clone(), idx.iter().map(|&j| num(r.cells[j].value, j)).collect()));
        lines.push(("  estimate [90%]".into(), String::new(), idx.iter().map(|&j| estimate(&r.cells[j], j)).collect()));
    }
    let widths: Vec<usize> = (0..idx.len()).map(|k| lines.iter().map(|l| l.2[k].chars().count()).max().unwrap_or(0).max(8)).collect();
    // The seasons are said once: by the situation when it names them, else here.
    let seasons = if t.situation.contains("season") { String::new() } else { format!("seasons {}, ", season_words(&t.seasons)) };
    let mut s = format!("{} — {seasons}ranked with at least {} dropbacks\n", t.situation, t.min_dropbacks);
    for (name, team, cells) in &lines {
        let mut line = format!("{name:<22} {team:<5}");
        for (c, w) in cells.iter().zip(&widths) {
            line.push_str(&format!(" {c:>w$}"));
        }
        s.push_str(line.trim_end());
        s.push('\n');
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_text_table_shows_estimates_and_intervals_and_says_things_once() {
        let league = crate::league::League::open_with(&LeagueConfig::new(demo_path())).expect("the demo league");
        let t = splits::split_table(league.plays(), &league.values(), &Preset::DEFAULT.situation(8), 20);
        let text = text_table(&t);
        let mut lines = text.lines();
        let heading = lines.next().expect("a heading");
        assert_eq!(heading, format!("End of game, one score (8 points) — seasons {}, ranked with at least 20 dropbacks", season_words(&t.seasons)));
        let words: Vec<String> = heading.split([' ', ',', '(', ')']).filter(|w| w.len() > 2).map(str::to_lowercase).collect();
        for (k, w) in words.iter().enumerate() {
            assert!(!words[k + 1..].contains(w), "'{w}' twice in: {heading}");
        }
        // The first ranked passer's EPA: raw number, then estimate [lo, hi] below it.
        let r = t.qualified().next().expect("a ranked passer");
        let j = splits::metric_index("epa").expect("epa");
        let c = &r.cells[j];
        let name: String = r.passer.chars().take(22).collect();
        let at = text.lines().position(|l| l.starts_with(&name)).expect("the passer's line");
        let below = text.lines().nth(at + 1).expect("the estimate line");
        assert!(below.starts_with("  estimate [90%]"), "{below}");
        let want = format!("{:.3} [{:.3}, {:.3}]", c.estimate.unwrap(), c.lo.unwrap(), c.hi.unwrap());
        assert!(below.contains(&want), "{want} in {below}");
        assert!(c.lo.unwrap() <= c.estimate.unwrap() && c.estimate.unwrap() <= c.hi.unwrap());
        // With seasons asked for, the heading still says them once.
        let s2025 = crate::situation::Situation { seasons: Some(vec![2025]), ..Preset::DEFAULT.situation(8) };
        let t2 = splits::split_table(league.plays(), &league.values(), &s2025, 20);
        let h2 = text_table(&t2).lines().next().unwrap_or_default().to_string();
        assert_eq!(h2.matches("2025").count(), 1, "{h2}");
        assert_eq!(season_words(&[2020, 2021, 2022]), "2020-2022");
        assert_eq!(season_words(&[2020, 2022]), "2020, 2022");
    }

    #[test]
    fn where_reads_the_pages_language() {
        let s = situation_from(None, Some("preset=end-of-game&down=3,4&ball-on=%2B20..")).unwrap();
        assert_eq!(s, Situation::from_query_string("preset=end-of-game&down=3,4&ball-on=%2B20..").unwrap());
        assert_eq!(s.ball_on, Some(crate::situation::Range::new(Some(80.0), None)));
        // an unescaped `+` (a space once decoded) still means the opponent's side
        assert_eq!(situation_from(None, Some("preset=end-of-game&down=3,4&ball-on=+20..")).unwrap(), s);
        let e = situation_from(None, Some("preset=end-of-game&downn=3")).unwrap_err().to_string();
        assert_eq!(e, "downn=3: unknown filter 'downn'; did you mean 'down'?");
        let e = situation_from(None, Some("min=3")).unwrap_err().to_string();
        assert!(e.contains("'min' is a page setting"), "{e}");
        assert_eq!(situation_from(Some("two-minute-drill"), None).unwrap(), Preset::TwoMinuteDrill.situation(8));
        assert!(situation_from(Some("late-close"), None).is_err());
        assert_eq!(situation_from(None, None).unwrap(), Preset::DEFAULT.situation(8));
    }
}

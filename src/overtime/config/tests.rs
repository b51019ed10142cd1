use super::super::Rule;
use super::*;

fn parse(text: &str) -> Result<OvertimeConfig, OvertimeConfigError> {
    OvertimeConfig::parse(text, Path::new("ot.toml"))
}

fn err(text: &str) -> String {
    match parse(text) {
        Ok(c) => panic!("accepted: {c:?}"),
        Err(e) => e.to_string(),
    }
}

#[test]
fn blocks_give_each_season_its_rules_and_the_rest_the_default() {
    let c = parse(
        "# two rule sets\n[[overtime]]\nseasons = \"2000-2005\"\nrules = \"first-score-wins\" # old days\nperiod = \"15:00\"\n\n[[overtime]]\nseasons = 2008\nrules = \"both-possess\"\nties = false\nperiod = 480\n",
    )
    .expect("parse");
    assert_eq!(c.sets.len(), 2);
    let old = c.rules_for(2003);
    assert_eq!((old.rule, old.period_secs, old.ties), (Rule::FirstScoreWins, 900, true));
    let r = c.rules_for(2008);
    assert_eq!((r.rule, r.period_secs, r.ties), (Rule::BothPossess, 480, false));
    assert_eq!(c.rules_for(2006), Rules::default());
    assert_eq!(c.rules_for(1999), Rules::default());
    assert!(!c.is_default());
    let spans = c.spans(&[2004, 2005, 2006, 2007, 2008]);
    let shown: Vec<(&str, &str)> = spans.iter().map(|s| (s.seasons.as_str(), s.label.as_str())).collect();
    assert_eq!(
        shown,
        [
            ("2004-2005", "first-score-wins, 15:00, a level period is a tie"),
            ("2006-2007", "touchdown-or-answer, 10:00, a level period is a tie"),
            ("2008", "both-possess, 8:00, a level period is followed by another"),
        ]
    );
}

#[test]
fn the_default_written_out_is_the_default_and_keys_differ_otherwise() {
    let empty = parse("# nothing\n").expect("empty");
    assert!(empty.is_default() && empty.key().is_empty());
    let spelled = parse("[[overtime]]\nseasons = \"2000-2020\"\nrules = \"touchdown-or-answer\"\nperiod = \"10:00\"\n").expect("spelled");
    assert!(spelled.is_default());
    assert_eq!(spelled.key(), "");
    let a = parse("[[overtime]]\nseasons = \"2000-2005\"\nrules = \"first-score-wins\"\n").expect("a");
    let b = parse("[[overtime]]\nseasons = \"2000-2006\"\nrules = \"first-score-wins\"\n").expect("b");
    assert!(!a.key().is_empty());
    assert_ne!(a.key(), b.key());
}

#[test]
fn bad_input_names_the_file_line_key_value_and_what_was_expected() {
    let e = err("[[overtime]]\nseasons = \"2000-2005\"\nrules = \"first-scor-wins\"\n");
    assert!(e.starts_with("ot.toml, line 3: key `rules` = \"first-scor-wins\""), "{e}");
    assert!(e.contains("expected one of touchdown-or-answer, first-score-wins, both-possess (nearest: first-score-wins)"), "{e}");
    let e = err("[[overtime]]\nseasons = \"2005-2000\"\nrules = \"both-possess\"\n");
    assert!(e.starts_with("ot.toml, line 2: key `seasons` = \"2005-2000\""), "{e}");
    let e = err("[[overtime]]\nseasons = \"2000\"\nrules = \"both-possess\"\nperiod = \"15:30\"\n");
    assert!(e.starts_with("ot.toml, line 4: key `period` = \"15:30\"") && e.contains("expected m:ss"), "{e}");
    let e = err("[[overtime]]\nseasons = \"2000\"\nrules = \"both-possess\"\nties = \"yes\"\n");
    assert!(e.starts_with("ot.toml, line 4: key `ties` = \"yes\""), "{e}");
    let e = err("[[overtime]]\nseason = \"2000\"\n");
    assert!(e.contains("line 2: unknown key `season`") && e.contains("did you mean `seasons`"), "{e}");
    let e = err("seasons = \"2000\"\n");
    assert!(e.contains("line 1") && e.contains("before any [[overtime]]"), "{e}");
    let e = err("[[overtime]]\nrules = \"both-possess\"\n");
    assert!(e.contains("line 1: the [[overtime]] block has no `seasons`"), "{e}");
    let e = err("[[overtime]]\nseasons = \"2000-2004\"\nrules = \"both-possess\"\n[[overtime]]\nseasons = \"2004\"\nrules = \"first-score-wins\"\n");
    assert!(e.contains("line 5") && e.contains("overlaps the block on line 1"), "{e}");
    let e = err("[[overtime]]\nseasons = \"2000\"\nseasons = \"2001\"\n");
    assert!(e.contains("line 3") && e.contains("set twice"), "{e}");
    let e = err("[overtime]\n");
    assert!(e.contains("line 1") && e.contains("expected [[overtime]]"), "{e}");
    let e = OvertimeConfig::load(Path::new("/nonexistent/ot.toml")).expect_err("missing file").to_string();
    assert!(e.contains("/nonexistent/ot.toml"), "{e}");
}

#[test]
fn a_config_file_is_read_from_disk() {
    let path = std::env::temp_dir().join(format!("lategame-ot-{}.toml", std::process::id()));
    std::fs::write(&path, "[[overtime]]\nseasons = \"2000-2002\"\nrules = \"first-score-wins\"\nperiod = \"15:00\"\n").expect("write");
    let c = OvertimeConfig::load(&path).expect("load");
    assert_eq!(c.rules_for(2001).period_secs, 900);
    std::fs::write(&path, "[[overtime]]\nseasons = \"2000-2002\"\nrules = \"first score\"\n").expect("write");
    let e = OvertimeConfig::load(&path).expect_err("bad name").to_string();
    assert!(e.contains(&path.display().to_string()) && e.contains("line 3") && e.contains("nearest: first-score-wins"), "{e}");
    let _ = std::fs::remove_file(&path);
}

//! The query language: refusals name the parameter and the reason, links
//! round-trip, the units coaches write read as meant, README's table is the
//! spec's.

use super::values::{parse_range, plain};
use super::*;
use super::tags::TagMatch;

fn q(s: &str) -> Vec<(String, String)> {
    decode_pairs(s)
}

fn parse(s: &str) -> Situation {
    Situation::from_query(&q(s)).unwrap_or_else(|e| panic!("{s}: {e}"))
}

fn refusal(s: &str) -> String {
    Situation::from_query(&q(s)).expect_err(s).to_string()
}

#[test]
fn bad_values_name_param_and_reason() {
    assert_eq!(refusal("margin=9..3"), "margin=9..3: lower bound above upper");
    assert_eq!(refusal("down=5"), "down=5: 5 is outside 1-4");
    assert!(refusal("ball-on=abc").starts_with("ball-on=abc: 'abc' is not a yard line"));
    assert!(refusal("preset=nope").starts_with("preset=nope: unknown preset"));
    assert!(refusal("preset=end-of-gme").contains("did you mean 'end-of-game'?"));
    // Found by the situation_query fuzz target: "per=," was an empty filter
    // that matched no snap and did not survive the round trip.
    assert_eq!(refusal("quarter=,"), "quarter=,: empty list; expected 1, 2, 3, 4 or ot");
    assert!(refusal("result=intercepton").contains("did you mean 'interception'?"));
}

#[test]
fn unknown_keys_are_refused_with_the_nearest() {
    assert_eq!(refusal("downn=3"), "downn=3: unknown filter 'downn'; did you mean 'down'?");
    assert_eq!(refusal("preset=end-of-game&togo=5"), "togo=5: unknown filter 'togo'; did you mean 'to-go'?");
    assert!(refusal("zzzzzzzz=1").contains("known filters: preset, one-score, quarter"));
    let e = Situation::from_query(&q("=4")).expect_err("a nameless key");
    assert!(!e.param.is_empty() && !e.reason.is_empty());
    // page settings are known (left to the page)
    parse("sort=epa&dir=asc&by=raw&min=5&view=projector&metric=epa&game=x&trend=every-snap&paper=a4&token=t");
}

#[test]
fn presets_round_trip_through_the_query() {
    for p in Preset::ALL {
        for os in [7, 8] {
            let s = p.situation(os);
            let back = Situation::from_query(&s.to_query()).unwrap();
            assert_eq!(back, s, "{p:?}");
        }
    }
    let s = parse("preset=end-of-game&down=3,4&ball-on=50..&season=2021..2023&passer=A B&result=sack,interception");
    assert_eq!(Situation::from_query(&s.to_query()).unwrap(), s);
    assert_eq!(s.seasons, Some(vec![2021, 2022, 2023]));
    assert_eq!(s.results, Some(vec![PlayResult::Interception, PlayResult::Sack]));
    // Found by the situation_query fuzz target: season 5 came back as "ot".
    let s = parse("season=5&quarter=4,ot");
    assert_eq!(Situation::from_query(&s.to_query()).unwrap(), s);
}

#[test]
fn an_empty_box_keeps_the_preset_and_any_lifts_it() {
    let form = "preset=end-of-game&one-score=8&quarter=&half-left=&game-left=&margin=&down=&season=2025&site=&min=20&by=est";
    let s = parse(form);
    assert_eq!(s, Situation { seasons: Some(vec![2025]), ..Preset::EndOfGame.situation(8) });
    let lifted = parse("preset=end-of-game&margin=any");
    assert_eq!(lifted.margin, None);
    assert_eq!(lifted.periods, Some(vec![4, OT]));
    assert_eq!(lifted.to_query(), q("preset=end-of-game&margin=any"));
    assert_eq!(Situation::from_query(&lifted.to_query()).unwrap(), lifted);
}

#[test]
fn end_of_game_is_what_it_says() {
    let s = Preset::EndOfGame.situation(8);
    assert_eq!(s.margin, Some(Range::new(Some(-8.0), Some(8.0))));
    assert_eq!(s.periods, Some(vec![4, OT]));
    assert_eq!(s.to_query_full(), q("quarter=4,ot&game-left=..7:30&margin=-8..8"));
    let s7 = parse("preset=end-of-game&one-score=7");
    assert_eq!(s7.margin, Some(Range::new(Some(-7.0), Some(7.0))));
    assert_eq!(s7.describe(), "End of game, one score (7 points)");
}

#[test]
fn clock_reads_m_ss_and_seconds() {
    assert_eq!(parse("half-left=..2:00").half_secs, Some(Range::new(None, Some(120.0))));
    assert_eq!(parse("half-left=..120").half_secs, parse("half-left=..2:00").half_secs);
    assert_eq!(parse("game-left=1:05..7:30").game_secs, Some(Range::new(Some(65.0), Some(450.0))));
    assert_eq!(parse("game-left=90").to_query(), q("game-left=1:30"));
    assert!(refusal("half-left=2:5").contains("not a clock time"));
    assert!(refusal("half-left=1:75").contains("seconds go up to 59"));
    assert!(refusal("half-left=31:00").contains("31:00 is outside 0:00..30:00"));
    assert!(refusal("half-left=12.5").contains("not a clock time"));
}

#[test]
fn yard_lines_read_coaching_notation() {
    assert_eq!(parse("ball-on=-35").ball_on, Some(Range::new(Some(35.0), Some(35.0))));
    assert_eq!(parse("ball-on=+20..").ball_on, Some(Range::new(Some(80.0), None)));
    assert_eq!(parse("ball-on=+20..+1").ball_on, Some(Range::new(Some(80.0), Some(99.0))));
    // a span of the field: either order
    assert_eq!(parse("ball-on=+1..+20").ball_on, parse("ball-on=80..99").ball_on);
    assert_eq!(parse("ball-on=-10..-1").ball_on, Some(Range::new(Some(1.0), Some(10.0))));
    assert_eq!(parse("ball-on=50").ball_on, parse("ball-on=+50").ball_on);
    assert_eq!(parse("ball-on=35..65").to_query(), q("ball-on=-35..%2B35"));
    assert_eq!(Preset::EndOfGameRedZone.situation(8).show(params::Field::BallOn).as_deref(), Some("+20..+1"));
    assert_eq!(Preset::EndOfGameBackedUp.situation(8).show(params::Field::BallOn).as_deref(), Some("-1..-10"));
    assert!(refusal("ball-on=+51").contains("off the field"));
    assert!(refusal("ball-on=0").contains("off the field"));
}

#[test]
fn win_probability_reads_percent_and_shares() {
    let a = parse("win-prob=20..80%").wp;
    assert_eq!(a, Some(Range::new(Some(0.2), Some(0.8))));
    assert_eq!(parse("win-prob=0.2..0.8").wp, a);
    assert_eq!(parse("win-prob=20%..80%").wp, a);
    assert_eq!(parse("win-prob=0.2..0.8").to_query(), q("win-prob=20..80%25"));
    assert!(refusal("win-prob=20..80").contains("percent with %"));
    assert!(refusal("win-prob=20..180%").contains("outside"));
    let odd = parse("win-prob=0.123456789..");
    assert_eq!(Situation::from_query(&odd.to_query()).unwrap(), odd);
}

#[test]
fn describe_is_in_words() {
    let s = parse("preset=two-minute-drill&down=3,4&result=interception&ball-on=-20..-1&team=qrm");
    assert_eq!(
        s.describe(),
        "Two-minute, tied or behind (one score = 8); down 3,4; ball on -1..-20; offense qrm; result interception"
    );
    assert_eq!(Situation::default().describe(), "Every snap");
}

#[test]
fn readme_table_is_the_spec() {
    let readme = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md")).expect("README.md");
    let table = readme_table();
    assert!(readme.contains(&table), "README.md's parameter table differs from situation::PARAMS; paste this:\n{table}");
    // the preset and result help name every key there is
    let preset_help = params::spec("preset").map(|s| s.help).unwrap_or("");
    assert!(preset_help.ends_with(&Preset::keys()), "{preset_help}");
    let result_help = params::spec("result").map(|s| s.help).unwrap_or("");
    assert!(result_help.ends_with(&PlayResult::keys()), "{result_help}");
    // every example parses
    for spec in PARAMS {
        let pair = vec![(spec.key.to_string(), spec.example.to_string())];
        assert!(Situation::from_query(&pair).is_ok(), "{}={}", spec.key, spec.example);
    }
}

#[test]
fn keys_are_unique_and_plain_words() {
    for (i, a) in PARAMS.iter().enumerate() {
        // one spec stands for every tag: `tag.NAME`
        let key = if a.field == params::Field::Tag { a.key.strip_prefix("tag.").unwrap_or("?").to_ascii_lowercase() } else { a.key.to_string() };
        assert!(key.chars().all(|c| c.is_ascii_lowercase() || c == '-'), "{}", a.key);
        assert!(PARAMS[i + 1..].iter().all(|b| b.key != a.key), "{} twice", a.key);
        if a.field.is_filter() {
            assert!(a.words.contains("{}"), "{}", a.key);
        }
    }
}

proptest::proptest! {
    #[test]
    fn range_parser_never_panics(s in "\\PC{0,20}") {
        let _ = parse_range("x", &s, &plain(-100.0, 100.0));
        let _ = Situation::from_query(&[("margin".to_string(), s.clone()), ("quarter".to_string(), s.clone()), ("ball-on".to_string(), s.clone()), ("win-prob".to_string(), s.clone()), ("half-left".to_string(), s)]);
    }

    #[test]
    fn parsed_range_contains_its_bounds(a in -50i32..50, b in -50i32..50) {
        let (lo, hi) = (a.min(b), a.max(b));
        let r = parse_range("margin", &format!("{lo}..{hi}"), &plain(-200.0, 200.0)).unwrap();
        proptest::prop_assert!(r.contains(lo as f64) && r.contains(hi as f64));
        proptest::prop_assert!(!r.contains(lo as f64 - 1.0) && !r.contains(hi as f64 + 1.0));
    }

    #[test]
    fn every_yard_line_and_clock_reads_back(b in 1i32..=99, secs in 0u32..=3600) {
        let s = parse(&format!("ball-on={b}&game-left={secs}"));
        proptest::prop_assert_eq!(Situation::from_query(&s.to_query()).unwrap(), s);
    }
}

#[test]
fn preset_labels_fit_the_profile_charts() {
    // the profile's dot charts show about 26 characters of a row label
    for p in Preset::ALL {
        assert!(p.label().chars().count() <= 26, "{} is too long for a chart row", p.label());
    }
}

#[test]
fn tag_filters_read_back_and_describe_themselves() {
    let s = parse("preset=end-of-game&tag.shell=C2,C3&tag.pressure=yes&tag.note=~blitz");
    assert_eq!(s.tags.len(), 3);
    assert_eq!(s.tags[0].name, "note");
    assert_eq!(s.tags[0].keep, TagMatch::Contains("blitz".into()));
    assert_eq!(s.tags[2].keep, TagMatch::Any(vec!["C2".into(), "C3".into()]));
    assert_eq!(Situation::from_query(&s.to_query()).unwrap(), s);
    let d = s.describe();
    assert!(d.ends_with("note ~blitz; pressure yes; shell C2,C3"), "{d}");
    // `any` lifts one; a later value replaces an earlier one
    assert!(parse("tag.shell=C2&tag.shell=any").tags.is_empty());
    assert_eq!(parse("tag.shell=C2&tag.shell=C4").tags[0].keep, TagMatch::Any(vec!["C4".into()]));
    for bad in ["tag.=yes", "tag.a%20b=yes", "tag.note=~", "tag.shell=,"] {
        assert!(Situation::from_query_string(bad).is_err(), "{bad}");
    }
}

#[test]
fn grouping_reads_back_and_is_refused_with_the_nearest() {
    let s = parse("preset=end-of-game&group=defense&opponent=QRM");
    assert_eq!(s.group, Group::Defense);
    assert_eq!(s.row_pick(), Some("QRM"));
    assert_eq!(s.without_row_pick().opponent, None);
    assert_eq!(Situation::from_query(&s.to_query()).unwrap(), s);
    assert!(s.to_query().contains(&("group".to_string(), "defense".to_string())));
    // passer rows are the default and are not written in links
    assert_eq!(parse("group=passer"), Situation::default());
    assert!(parse("group=passer&passer=A B").to_query().iter().all(|(k, _)| k != "group"));
    assert_eq!(parse("group=Offense&team=QRM").row_pick(), Some("QRM"));
    // a grouping is not a filter: the description does not change
    assert_eq!(parse("preset=end-of-game&group=offense").describe(), parse("preset=end-of-game").describe());
    assert_eq!(
        refusal("group=defence"),
        "group=defence: unknown grouping; did you mean 'defense'? Expected passer, offense or defense"
    );
    assert_eq!(refusal("group=qb"), "group=qb: unknown grouping; expected passer, offense or defense");
}

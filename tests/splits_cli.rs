//! `lategame splits` on the bundled demo league: the minimum to qualify
//! follows the same default as the pages (20 dropbacks; 5 for passers
//! against one defense), and `--min` overrides it.

use std::process::Command;

fn splits(args: &[&str]) -> serde_json::Value {
    let cache = std::env::temp_dir().join(format!("lategame-splits-cli-{}", std::process::id()));
    let run = Command::new(env!("CARGO_BIN_EXE_lategame"))
        .arg("splits")
        .args(args)
        .args(["--format", "json"])
        .env("LATEGAME_CACHE_DIR", &cache)
        .output()
        .expect("the binary runs");
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    serde_json::from_slice(&run.stdout).expect("JSON on stdout")
}

fn min_of(t: &serde_json::Value) -> u64 {
    t["min_dropbacks"].as_u64().expect("min_dropbacks")
}

#[test]
fn the_minimum_follows_the_pages_default_against_one_defense() {
    let all = splits(&["--where", "preset=end-of-game"]);
    assert_eq!(min_of(&all), 20);
    // A defense that appears in the table: the first row's team faces it
    // never, so take any other team's code from the rows.
    let rows = all["rows"].as_array().expect("rows");
    let first = rows[0]["team"].as_str().expect("team").to_string();
    let other = rows.iter().filter_map(|r| r["team"].as_str()).find(|t| *t != first).expect("a second team").to_string();

    let vs = splits(&["--where", &format!("preset=end-of-game&opponent={other}")]);
    assert_eq!(min_of(&vs), 5, "against one defense the default is 5");
    let qualified = |t: &serde_json::Value| t["rows"].as_array().unwrap().iter().filter(|r| r["qualified"] == true).count();
    let ranked = qualified(&vs);
    assert!(ranked > 0, "at 5 dropbacks somebody qualifies against {other}");
    // Every qualified row has at least 5 dropbacks and every other row fewer.
    for r in vs["rows"].as_array().unwrap() {
        let n = r["dropbacks"].as_u64().unwrap();
        assert_eq!(r["qualified"] == true, n >= 5, "{r}");
    }

    let asked = splits(&["--where", &format!("preset=end-of-game&opponent={other}"), "--min", "20"]);
    assert_eq!(min_of(&asked), 20, "--min wins over the default");
    assert!(qualified(&asked) < ranked);
}

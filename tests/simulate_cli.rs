//! `lategame simulate --late-shifts`: the flag draws each passer's true
//! late-and-close shifts and writes them into the truth file; without it
//! they are 0; a bad value is refused with the reason.

use std::path::PathBuf;
use std::process::Command;

fn simulate(dir: &std::path::Path, extra: &[&str]) -> (std::process::Output, PathBuf) {
    let out = dir.join("league.csv");
    let mut args = vec!["simulate", "--seasons", "1", "--seed", "3", "--out"];
    let out_s = out.to_string_lossy().to_string();
    args.push(&out_s);
    args.extend_from_slice(extra);
    let run = Command::new(env!("CARGO_BIN_EXE_lategame")).args(&args).output().expect("the binary runs");
    (run, dir.join("league-truth.csv"))
}

/// The truth file's `late_shift_*` columns, per passer.
fn shifts(truth: &std::path::Path) -> Vec<[f64; 3]> {
    let text = std::fs::read_to_string(truth).expect("truth file");
    let mut lines = text.lines();
    let head: Vec<&str> = lines.next().expect("header").split(',').collect();
    let col = |name: &str| head.iter().position(|h| *h == name).unwrap_or_else(|| panic!("column {name}"));
    let cols = [col("late_shift_sack"), col("late_shift_interception"), col("late_shift_complete")];
    lines.map(|l| {
        let cells: Vec<&str> = l.split(',').collect();
        cols.map(|c| cells[c].parse::<f64>().expect("a number"))
    })
    .collect()
}

#[test]
fn the_late_shifts_flag_writes_the_shifts_into_the_truth_file() {
    let root = std::env::temp_dir().join(format!("lategame-sim-cli-{}", std::process::id()));
    let (on, off) = (root.join("on"), root.join("off"));
    std::fs::create_dir_all(&on).unwrap();
    std::fs::create_dir_all(&off).unwrap();

    let (run, truth) = simulate(&on, &["--late-shifts", "0.6,0.4,0.3"]);
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    let with = shifts(&truth);
    assert!(with.len() >= 40, "{} passers", with.len());
    // Drawn N(0, sd²) per passer: the spread of each column is near its SD.
    for (k, sd) in [0.6, 0.4, 0.3].into_iter().enumerate() {
        let xs: Vec<f64> = with.iter().map(|s| s[k]).collect();
        let rms = (xs.iter().map(|x| x * x).sum::<f64>() / xs.len() as f64).sqrt();
        assert!(xs.iter().all(|x| x.is_finite()) && (rms / sd - 1.0).abs() < 0.35, "column {k}: rms {rms} for sd {sd}");
    }

    let (run, truth) = simulate(&off, &[]);
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    assert!(shifts(&truth).iter().all(|s| *s == [0.0; 3]), "no flag, no shifts");
    // The league plays out the same apart from the late-and-close snaps: the
    // same passers.
    assert_eq!(shifts(&truth).len(), with.len());

    let (run, _) = simulate(&off, &["--late-shifts", "0.5,x"]);
    let err = String::from_utf8_lossy(&run.stderr);
    assert!(!run.status.success() && err.contains("late shifts '0.5,x'") && err.contains("SACK,INTERCEPTION,COMPLETION"), "{err}");
    let _ = std::fs::remove_dir_all(&root);
}

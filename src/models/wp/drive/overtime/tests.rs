use super::*;
use crate::overtime::{Rule, Rules};

fn o(swing: i32, keep: bool, steps: u16, share: f64) -> Outcome {
    Outcome { swing, keep, zone: 1, steps, off_used: 0, def_used: 0, share }
}

/// Every possession, whatever its zone, ends the same way.
fn uniform(outcomes: &[Outcome]) -> DriveParams {
    let n = DriveParams { cells: Vec::new(), drives: 0, snaps: Default::default() };
    let cells = vec![outcomes.to_vec(); super::super::NMODE * NZ * super::super::NTO];
    DriveParams { cells, ..n }
}

/// Worked by hand. Each possession takes 60 s (12 steps): a touchdown a
/// quarter of the time, a field goal a quarter, nothing half. First
/// possession with 60 s left: the touchdown wins (¼); a field goal ends
/// the period ahead (¼); nothing ends it level (½ · ½): ¾. Answering a
/// field goal with 60 s: only the touchdown wins, a field goal ties (½ of
/// its ¼): ¼ + ⅛ = 3/8. Sudden death with 60 s: any score wins (½), none
/// ties (¼): ¾. With 120 s, sudden death: ½ + ½ · (1 − ¾) = 5/8.
#[test]
fn modified_sudden_death_by_hand() {
    let t = OvertimeTable::solve(&uniform(&[o(7, false, 12, 0.25), o(3, false, 12, 0.25), o(0, false, 12, 0.5)]));
    assert!((t.get(12, Phase::First, 2) - 0.75).abs() < 1e-12);
    assert!((t.get(12, Phase::Answer(3), 2) - 0.375).abs() < 1e-12);
    assert!((t.get(12, Phase::Sudden, 2) - 0.75).abs() < 1e-12);
    assert!((t.get(24, Phase::Sudden, 2) - 0.625).abs() < 1e-12);
    // First possession with 120 s: touchdown ¼; field goal ¼ · (1 − 3/8);
    // nothing ½ · (1 − ¾).
    let first = 0.25 + 0.25 * (1.0 - 0.375) + 0.5 * 0.25;
    assert!((t.get(24, Phase::First, 2) - first).abs() < 1e-12);
    // At 0:00 level is a tie, trailing a loss.
    assert_eq!(t.get(0, Phase::First, 0), 0.5);
    assert_eq!(t.get(0, Phase::Answer(3), 0), 0.0);
    // On grid points `value` is the grid.
    assert!((t.value(Phase::First, 120.0, ZONE_AT[2]) - first).abs() < 1e-12);
}

fn rules(rule: Rule, period_secs: i32, ties: bool) -> Rules {
    Rules { rule, period_secs, ties }
}

/// The same possessions as above: a touchdown (7) ¼, a field goal ¼,
/// nothing ½, each 60 s.
fn quarter_mix() -> DriveParams {
    uniform(&[o(7, false, 12, 0.25), o(3, false, 12, 0.25), o(0, false, 12, 0.5)])
}

/// First score wins: the first possession is sudden death. 60 s: a score
/// ½, none ½ · ½: ¾; 120 s: ½ + ½ · (1 − ¾) = 5/8, for First and Sudden alike.
#[test]
fn first_score_wins_by_hand() {
    let t = OvertimeTable::solve_rules(&quarter_mix(), &rules(Rule::FirstScoreWins, 600, true));
    for p in [Phase::First, Phase::Sudden] {
        assert!((t.get(12, p, 2) - 0.75).abs() < 1e-12);
        assert!((t.get(24, p, 2) - 0.625).abs() < 1e-12);
        assert_eq!(t.get(0, p, 2), 0.5);
    }
    // Today's set gives more to a first possession with 120 s (17/32: its
    // touchdown wins outright), this one 5/8 = 20/32 (its field goal too).
    let a = OvertimeTable::solve(&quarter_mix());
    assert!((a.get(24, Phase::First, 2) - 17.0 / 32.0).abs() < 1e-12);
}

/// Both possess: a first-possession touchdown (7) gets an answer. 60 s:
/// the answer has no time (¼ + ¼ + ½ · ½ = ¾, as today's set). 120 s:
/// answering 7 with 60 s, only a touchdown ties (½ of ¼ = 1/8); a field
/// goal is answered with 3/8 as before; nothing leaves sudden death with
/// 60 s (¾ for the other side): ¼ · 7/8 + ¼ · 5/8 + ½ · ¼ = ½.
#[test]
fn both_possess_by_hand() {
    let t = OvertimeTable::solve_rules(&quarter_mix(), &rules(Rule::BothPossess, 600, true));
    assert!((t.get(12, Phase::First, 2) - 0.75).abs() < 1e-12);
    assert!((t.get(12, Phase::Answer(7), 2) - 0.125).abs() < 1e-12);
    assert!((t.get(12, Phase::Answer(3), 2) - 0.375).abs() < 1e-12);
    assert!((t.get(24, Phase::First, 2) - 0.5).abs() < 1e-12);
    assert_eq!(t.get(0, Phase::Answer(7), 2), 0.0);
    // A bigger deficit is never easier to answer; and a first possession
    // is worth no more than under today's set (its touchdown now gets an
    // answer; the other branches are the same phases), less once the
    // answer has time.
    let a = OvertimeTable::solve(&quarter_mix());
    for k in 0..t.nt {
        for d in 1..MAX_ANSWER {
            assert!(t.get(k, Phase::Answer(d + 1), 2) <= t.get(k, Phase::Answer(d), 2) + 1e-12);
        }
        assert!(t.get(k, Phase::First, 2) <= a.get(k, Phase::First, 2) + 1e-12, "k {k}");
        assert_eq!(t.get(k, Phase::Sudden, 2), a.get(k, Phase::Sudden, 2));
    }
    assert!(t.get(120, Phase::First, 2) < a.get(120, Phase::First, 2) - 0.01);
}

/// No ties: a level period is followed by another, so the end of a period
/// is worth a full period. A 60 s period of first score wins, a score ½
/// each possession: V = ½ + ½ · (1 − V), V = 2/3 (the end value too).
#[test]
fn no_ties_plays_on_by_hand() {
    let t = OvertimeTable::solve_rules(&quarter_mix(), &rules(Rule::FirstScoreWins, 60, false));
    assert_eq!(t.nt, 13);
    for k in [0, 12] {
        assert!((t.get(k, Phase::Sudden, 2) - 2.0 / 3.0).abs() < 1e-9, "k {k}: {}", t.get(k, Phase::Sudden, 2));
    }
    // Trailing at the end still loses.
    assert_eq!(t.get(0, Phase::Answer(3), 2), 0.0);
}

/// The period's length is the time axis: 15:00 reaches 180 steps, and the
/// default set solved by name is today's table.
#[test]
fn period_length_and_the_default() {
    let long = OvertimeTable::solve_rules(&quarter_mix(), &rules(Rule::TouchdownOrAnswer, 900, true));
    assert_eq!(long.nt, 181);
    let short = OvertimeTable::solve(&quarter_mix());
    assert_eq!(short.nt, 121);
    assert_eq!(short, OvertimeTable::solve_rules(&quarter_mix(), &Rules::default()));
    // Beyond the grid the value is clamped to the full period.
    assert_eq!(short.value(Phase::First, 900.0, 40.0), short.value(Phase::First, 600.0, 40.0));
    assert!((long.value(Phase::First, 900.0, 40.0) - long.get(180, Phase::First, 2)).abs() < 1e-12);
}

/// The single rule set solved before rule sets existed (answers up to 5
/// points), kept here to hold the default to it bit for bit: the WP fits
/// of a league without an overtime config do not move.
fn solve_before(params: &DriveParams) -> Vec<f64> {
    const MAX: i32 = 5;
    const NP: usize = 2 + MAX as usize;
    let nt = (600 / STEP_SECS) as usize + 1;
    let phi = |p: Phase| match p {
        Phase::First => 0,
        Phase::Sudden => 1,
        Phase::Answer(d) => 1 + d.clamp(1, MAX) as usize,
    };
    let at = |k: usize, p: usize, z: usize| (k * NP + p) * NZ + z;
    let phases: Vec<Phase> = [Phase::First, Phase::Sudden].into_iter().chain((1..=MAX).map(Phase::Answer)).collect();
    let next = |p: Phase, o: &Outcome| -> Next {
        let s = o.swing;
        match p {
            Phase::First if s >= 6 => Next::Decided(1.0),
            Phase::First if s > 0 => {
                if o.keep { Next::Decided(1.0) } else { Next::Goes(Phase::Answer(s.min(MAX)), false) }
            }
            Phase::Answer(d) if s > d => Next::Decided(1.0),
            Phase::Answer(d) if s == d => Next::Goes(Phase::Sudden, o.keep),
            Phase::Answer(_) => Next::Decided(0.0),
            _ if s > 0 => Next::Decided(1.0),
            _ if s < 0 => Next::Decided(0.0),
            _ => Next::Goes(Phase::Sudden, o.keep),
        }
    };
    let mut v = vec![0.0; nt * NP * NZ];
    for &p in &phases {
        for z in 0..NZ {
            v[at(0, phi(p), z)] = at_end(p);
        }
    }
    for k in 1..nt {
        for &p in &phases {
            for z in 0..NZ {
                let mut val = 0.0;
                for o in params.plain(z) {
                    let steps = o.steps as usize;
                    val += o.share
                        * match next(p, o) {
                            Next::Decided(r) if steps > k => {
                                let f = k as f64 / steps as f64;
                                f * r + (1.0 - f) * at_end(p)
                            }
                            Next::Goes(q, keep) if steps > k => {
                                let f = k as f64 / steps as f64;
                                let e = if keep { at_end(q) } else { 1.0 - at_end(q) };
                                f * e + (1.0 - f) * at_end(p)
                            }
                            Next::Decided(r) => r,
                            Next::Goes(q, keep) => {
                                let w = v[at(k - steps, phi(q), o.zone as usize)];
                                if keep { w } else { 1.0 - w }
                            }
                        };
                }
                v[at(k, phi(p), z)] = val.clamp(0.0, 1.0);
            }
        }
    }
    v
}

#[test]
fn the_default_set_is_the_former_solver_bit_for_bit() {
    let plays = crate::models::testkit::league(300, 2, 5);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let params = DriveParams::estimate(&plays, &rows).expect("drives");
    let before = solve_before(&params);
    let t = OvertimeTable::solve(&params);
    let mut phases = vec![Phase::First, Phase::Sudden];
    phases.extend((1..=5).map(Phase::Answer));
    for k in 0..t.nt {
        for (pi, &p) in phases.iter().enumerate() {
            for z in 0..NZ {
                let old = before[(k * 7 + pi) * NZ + z];
                assert_eq!(t.get(k, p, z).to_bits(), old.to_bits(), "k {k} {p:?} z {z}");
            }
        }
    }
    // The values are not all ½: the comparison has something to compare.
    assert!(t.get(t.nt - 1, Phase::Answer(3), 2) < 0.45 && t.get(t.nt - 1, Phase::First, 2) > 0.5);
}

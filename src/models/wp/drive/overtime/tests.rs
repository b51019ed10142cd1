use super::*;

fn o(swing: i32, keep: bool, steps: u16, share: f64) -> Outcome {
    Outcome { swing, keep, zone: 1, steps, off_used: 0, def_used: 0, share }
}

/// Every possession, whatever its zone, ends the same way.
fn uniform(outcomes: &[Outcome]) -> DriveParams {
    let n = DriveParams { cells: Vec::new(), drives: 0 };
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

use super::super::overtime::{OvertimeTable, Phase};
use super::super::{DriveParams, NZ};
use super::*;
use crate::models::testkit;

fn o(swing: i32, keep: bool, steps: u16, share: f64) -> Outcome {
    Outcome { swing, keep, zone: 1, steps, off_used: 0, def_used: 0, share }
}

/// Every snap's cell ends its drive the same way.
fn every_cell(outcomes: &[Outcome]) -> SnapParams {
    SnapParams { cells: vec![outcomes.to_vec(); NMODE * SNAP_ZONES * NDOWN * NTO], snaps: 0 }
}

/// A drive table where every possession gains 3 in 60 s and hands the ball
/// over (worked by hand in `drive::tests::backward_induction_by_hand`).
fn field_goal_table() -> DriveTable {
    let cells = vec![vec![o(3, false, 12, 1.0)]; NMODE * NZ * NTO];
    DriveParams { cells, drives: 0, snaps: SnapParams::default() }.solve()
}

fn snap(margin: f64, secs: f64, ball_on: i32, down: i32, to_go: i32) -> Snap {
    Snap { margin, secs, ball_on, down, to_go, off_to: 3, def_to: 3 }
}

#[test]
fn down_and_distance_classes() {
    assert_eq!(down_class(1, 10), Some(0));
    assert_eq!(down_class(1, 3), Some(0));
    assert_eq!(down_class(2, 5), Some(1));
    assert_eq!(down_class(2, 6), Some(2));
    assert_eq!(down_class(3, 2), Some(3));
    assert_eq!(down_class(3, 6), Some(4));
    assert_eq!(down_class(3, 7), Some(5));
    assert_eq!(down_class(4, 1), Some(6));
    assert_eq!(down_class(4, 11), Some(7));
    assert_eq!(down_class(0, 0), None);
    assert_eq!(snap_zone(0), 0);
    assert_eq!(snap_zone(9), 0);
    assert_eq!(snap_zone(10), 1);
    assert_eq!(snap_zone(99), 9);
}

/// Worked by hand. The rest of each drive: a touchdown (7) half the time,
/// nothing half, 30 s either way, the other side getting the ball; then
/// every possession gains 3 in 60 s. Level with 60 s left: after the
/// touchdown the other side, down 7 with 30 s, gets half a field goal's
/// way before the clock ends: it cannot win, so 1; after nothing it has
/// 30 s level: ½ · (its field goal) + ½ · (a tie, ½) = ¾ for it, ¼ for
/// us. ½ · 1 + ½ · ¼ = 5/8. With 20 s the drive gets 2/3 of its outcome:
/// touchdown 2/3 · 1 + 1/3 · ½, nothing ½: ½ · 5/6 + ½ · ½ = 2/3.
#[test]
fn rest_of_the_drive_by_hand() {
    let t = field_goal_table();
    let p = every_cell(&[o(7, false, 6, 0.5), o(0, false, 6, 0.5)]);
    let v = p.value(&t, &snap(0.0, 60.0, 45, 1, 10)).expect("a cell");
    assert!((v - 0.625).abs() < 1e-12, "{v}");
    let v = p.value(&t, &snap(0.0, 20.0, 45, 3, 8)).expect("a cell");
    assert!((v - 2.0 / 3.0).abs() < 1e-12, "{v}");
    // No down (a kickoff or a try): no cell.
    assert_eq!(p.value(&t, &snap(0.0, 60.0, 45, 0, 0)), None);
}

/// Between two zones' centres the value is interpolated: at the 30 (the
/// middle of the 25 and the 35), half the 20s' cell and half the 30s'.
/// A cell nobody was seen in gives `None` (the caller falls back to the
/// possession's start).
#[test]
fn zones_are_interpolated() {
    let t = field_goal_table();
    let mut p = every_cell(&[o(0, false, 6, 1.0)]);
    for md in [Mode::Other, Mode::Trail, Mode::Lead, Mode::Tie] {
        for c in 0..NTO {
            p.cells[cell(md, 3, 0, c)] = vec![o(7, false, 6, 1.0)];
        }
    }
    // Level with 20 s: a touchdown in 30 s gets 2/3 of its win (5/6 in
    // all); nothing stays level (½).
    let at = |ball_on| p.value(&t, &snap(0.0, 20.0, ball_on, 1, 10)).expect("a cell");
    assert!((at(25) - 0.5).abs() < 1e-12);
    assert!((at(35) - 5.0 / 6.0).abs() < 1e-12);
    assert!((at(30) - 0.5 * (0.5 + 5.0 / 6.0)).abs() < 1e-12);
    p.cells[cell(Mode::Other, 6, 0, 0)].clear();
    assert_eq!(p.value(&t, &snap(0.0, 600.0, 65, 1, 10)), None);
}

/// In overtime (touchdown-or-answer, ties at the period's end) a first
/// possession's touchdown wins outright; a drive the clock cuts short gets
/// its share: with 20 s left and 30 s to score, 2/3 · 1 + 1/3 · ½.
#[test]
fn overtime_rest_of_the_drive_by_hand() {
    let params = DriveParams { cells: vec![vec![o(3, false, 12, 1.0)]; NMODE * NZ * NTO], drives: 0, snaps: SnapParams::default() };
    let ot = OvertimeTable::solve(&params);
    let p = every_cell(&[o(7, false, 6, 1.0)]);
    let v = p.overtime_value(&ot, Phase::First, 120.0, &snap(0.0, 120.0, 45, 1, 10)).expect("a cell");
    assert!((v - 1.0).abs() < 1e-12, "{v}");
    let v = p.overtime_value(&ot, Phase::First, 20.0, &snap(0.0, 20.0, 45, 1, 10)).expect("a cell");
    assert!((v - (2.0 / 3.0 + 0.5 / 3.0)).abs() < 1e-12, "{v}");
    // Answering a field goal (down 3): the touchdown wins too.
    let v = p.overtime_value(&ot, Phase::Answer(3), 120.0, &snap(-3.0, 120.0, 45, 1, 10)).expect("a cell");
    assert!((v - 1.0).abs() < 1e-12, "{v}");
}

/// Counted from a league: each cell's shares sum to 1, and the football
/// holds — first and goal scores a touchdown far more often than first
/// and ten at one's own 25, and third and long less often than first down
/// from the same zone.
#[test]
fn estimated_from_a_league() {
    let plays = testkit::league(400, 2, 5);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let p = SnapParams::estimate(&plays, &rows);
    assert!(p.snaps > 30_000, "{} snaps", p.snaps);
    for c in p.cells.iter().filter(|c| !c.is_empty()) {
        let s: f64 = c.iter().map(|o| o.share).sum();
        assert!((s - 1.0).abs() < 1e-9, "shares sum to {s}");
    }
    let td = |z: usize, dc: usize| {
        p.cells[cell(Mode::Other, z, dc, 0)].iter().filter(|o| o.swing >= 6 && !o.keep).map(|o| o.share).sum::<f64>()
    };
    assert!(td(9, 0) > td(2, 0) + 0.3, "{} vs {}", td(9, 0), td(2, 0));
    assert!(td(5, 5) < td(5, 0), "{} vs {}", td(5, 5), td(5, 0));
}

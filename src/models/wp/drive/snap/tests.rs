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
    assert_eq!(down_class(1, 10), Some(7));
    assert_eq!(down_class(1, 3), Some(7));
    assert_eq!(down_class(2, 5), Some(0));
    assert_eq!(down_class(2, 6), Some(1));
    assert_eq!(down_class(3, 2), Some(2));
    assert_eq!(down_class(3, 6), Some(3));
    assert_eq!(down_class(3, 7), Some(4));
    assert_eq!(down_class(4, 1), Some(5));
    assert_eq!(down_class(4, 11), Some(6));
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
    let v = p.value(&t, &snap(0.0, 60.0, 45, 2, 10)).expect("a cell");
    assert!((v - 0.625).abs() < 1e-12, "{v}");
    let v = p.value(&t, &snap(0.0, 20.0, 45, 3, 8)).expect("a cell");
    assert!((v - 2.0 / 3.0).abs() < 1e-12, "{v}");
    // No down (a kickoff or a try): no cell. A first down has its own.
    assert_eq!(p.value(&t, &snap(0.0, 60.0, 45, 0, 0)), None);
    assert!((p.value(&t, &snap(0.0, 60.0, 45, 1, 10)).expect("a cell") - 0.625).abs() < 1e-12);
}

/// Between two zones' centres the value is interpolated: at the 30 (the
/// middle of the 25 and the 35), half the 20s' cell and half the 30s'.
/// A zone nobody was seen in gives way to the other zone of its pair;
/// `None` (the caller falls back to the possession's start) only when both
/// are empty.
#[test]
fn zones_are_interpolated() {
    let t = field_goal_table();
    let mut p = every_cell(&[o(0, false, 6, 1.0)]);
    for md in [Mode::Other, Mode::Trail, Mode::Lead, Mode::Tie] {
        for (c, dc) in (0..NTO).flat_map(|c| [(c, 0), (c, 1)]) {
            p.cells[cell(md, 3, dc, c)] = vec![o(7, false, 6, 1.0)];
        }
    }
    // Level with 20 s: a touchdown in 30 s gets 2/3 of its win (5/6 in
    // all); nothing stays level (½).
    let at = |ball_on| p.value(&t, &snap(0.0, 20.0, ball_on, 2, 10)).expect("a cell");
    assert!((at(25) - 0.5).abs() < 1e-12);
    assert!((at(35) - 5.0 / 6.0).abs() < 1e-12);
    assert!((at(30) - 0.5 * (0.5 + 5.0 / 6.0)).abs() < 1e-12);
    // The 60s empty, the 70s a touchdown: at the 64 the 50s' value alone
    // (nothing, ½), from the 65 on the 70s' (5/6).
    for md in [Mode::Other, Mode::Trail, Mode::Lead, Mode::Tie] {
        for (c, dc) in (0..NTO).flat_map(|c| [(c, 0), (c, 1)]) {
            p.cells[cell(md, 6, dc, c)].clear();
            p.cells[cell(md, 7, dc, c)] = vec![o(7, false, 6, 1.0)];
        }
    }
    let at = |p: &SnapParams, ball_on| p.value(&t, &snap(0.0, 20.0, ball_on, 2, 10));
    assert!((at(&p, 64).expect("the 50s") - 0.5).abs() < 1e-12);
    for ball_on in [65, 66, 70, 75] {
        assert!((at(&p, ball_on).expect("the 70s") - 5.0 / 6.0).abs() < 1e-12, "{ball_on}");
    }
    for md in [Mode::Other, Mode::Trail, Mode::Lead, Mode::Tie] {
        for (c, dc) in (0..NTO).flat_map(|c| [(c, 0), (c, 1)]) {
            p.cells[cell(md, 7, dc, c)].clear();
        }
    }
    assert_eq!(at(&p, 66), None);
}

/// Between two classes of a down the value follows the yards to go:
/// level with 20 s, a touchdown in 30 s is worth 5/6, nothing ½ (as
/// above). 2nd & 1-5 scoring, 2nd & 6+ not: 5/6 to the 3 (the short
/// class's distance), ½ from the 10, at the 6 three sevenths of the way
/// from 5/6 to ½. The other way
/// round (the long class ahead) the two are pooled: 2/3 at every distance.
/// On 3rd down (1-2 nothing, 3-6 a touchdown, 7+ nothing) the first two
/// pool to 2/3, the last stays ½: 2/3 to the 4½, then down to ½ at the 10.
#[test]
fn distance_is_interpolated_and_never_pays() {
    let t = field_goal_table();
    let td = vec![o(7, false, 6, 1.0)];
    let none = vec![o(0, false, 6, 1.0)];
    let with = |lists: &[(usize, &Vec<Outcome>)]| {
        let mut p = every_cell(&none);
        for &(dc, l) in lists {
            for md in [Mode::Other, Mode::Trail, Mode::Lead, Mode::Tie] {
                for z in 0..SNAP_ZONES {
                    for c in 0..NTO {
                        p.cells[cell(md, z, dc, c)] = l.clone();
                    }
                }
            }
        }
        p
    };
    let at = |p: &SnapParams, down: i32, to_go: i32| p.value(&t, &snap(0.0, 20.0, 45, down, to_go)).expect("a cell");
    let close = |x: f64, y: f64| (x - y).abs() < 1e-12;
    let p = with(&[(0, &td), (1, &none)]);
    for (to_go, want) in [(1, 5.0 / 6.0), (3, 5.0 / 6.0), (10, 0.5), (15, 0.5)] {
        assert!(close(at(&p, 2, to_go), want), "2nd & {to_go}: {}", at(&p, 2, to_go));
    }
    let six = p.value(&t, &snap(0.0, 20.0, 45, 2, 6)).expect("a cell");
    assert!(close(six, 5.0 / 6.0 + (0.5 - 5.0 / 6.0) * 3.0 / 7.0), "2nd & 6: {six}");
    let p = with(&[(0, &none), (1, &td)]);
    for to_go in [1, 3, 6, 10, 15] {
        assert!(close(at(&p, 2, to_go), 2.0 / 3.0), "pooled 2nd & {to_go}: {}", at(&p, 2, to_go));
    }
    let p = with(&[(2, &none), (3, &td), (4, &none)]);
    for (to_go, want) in [(1, 2.0 / 3.0), (4, 2.0 / 3.0), (10, 0.5), (12, 0.5)] {
        assert!(close(at(&p, 3, to_go), want), "3rd & {to_go}: {}", at(&p, 3, to_go));
    }
    assert!(close(at(&p, 3, 7), 2.0 / 3.0 + (0.5 - 2.0 / 3.0) * 2.5 / 5.5), "3rd & 7: {}", at(&p, 3, 7));
}

/// In overtime (touchdown-or-answer, ties at the period's end) a first
/// possession's touchdown wins outright; a drive the clock cuts short gets
/// its share: with 20 s left and 30 s to score, 2/3 · 1 + 1/3 · ½.
#[test]
fn overtime_rest_of_the_drive_by_hand() {
    let params = DriveParams { cells: vec![vec![o(3, false, 12, 1.0)]; NMODE * NZ * NTO], drives: 0, snaps: SnapParams::default() };
    let ot = OvertimeTable::solve(&params);
    let p = every_cell(&[o(7, false, 6, 1.0)]);
    let v = p.overtime_value(&ot, Phase::First, 120.0, &snap(0.0, 120.0, 45, 2, 10)).expect("a cell");
    assert!((v - 1.0).abs() < 1e-12, "{v}");
    let v = p.overtime_value(&ot, Phase::First, 20.0, &snap(0.0, 20.0, 45, 2, 10)).expect("a cell");
    assert!((v - (2.0 / 3.0 + 0.5 / 3.0)).abs() < 1e-12, "{v}");
    // Answering a field goal (down 3): the touchdown wins too.
    let v = p.overtime_value(&ot, Phase::Answer(3), 120.0, &snap(-3.0, 120.0, 45, 2, 10)).expect("a cell");
    assert!((v - 1.0).abs() < 1e-12, "{v}");
}

/// Counted from a league: each cell's shares sum to 1, and the football
/// holds — second and short inside the 10 scores a touchdown far more
/// often than at one's own 25, and third and long less often than second
/// and short from the same zone.
#[test]
fn estimated_from_a_league() {
    let plays = testkit::league(400, 2, 5);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let p = SnapParams::estimate(&plays, &rows);
    assert!(p.snaps > 20_000, "{} snaps", p.snaps);
    for c in p.cells.iter().filter(|c| !c.is_empty()) {
        let s: f64 = c.iter().map(|o| o.share).sum();
        assert!((s - 1.0).abs() < 1e-9, "shares sum to {s}");
    }
    let td = |z: usize, dc: usize| {
        p.cells[cell(Mode::Other, z, dc, 0)].iter().filter(|o| o.swing >= 6 && !o.keep).map(|o| o.share).sum::<f64>()
    };
    assert!(td(9, 0) > td(2, 0) + 0.3, "{} vs {}", td(9, 0), td(2, 0));
    assert!(td(5, 4) < td(5, 0), "{} vs {}", td(5, 4), td(5, 0));
}

/// Each outcome priced on its own by `DriveTable::value`, as the sum was
/// first written: `after_outcomes` must give the same values.
fn one_at_a_time(table: &DriveTable, list: &[Outcome], margin: f64, secs: f64, a: i32, b: i32) -> f64 {
    let end = |m: f64| if m > 0.0 { 1.0 } else if m < 0.0 { 0.0 } else { 0.5 };
    let mut p = 0.0;
    for o in list {
        let after = margin + f64::from(o.swing);
        let took = f64::from(o.steps) * f64::from(super::super::STEP_SECS);
        let (a2, b2) = ((a - i32::from(o.off_used)).max(0), (b - i32::from(o.def_used)).max(0));
        let at = super::super::ZONE_AT[o.zone as usize];
        p += o.share
            * if took > secs {
                let f = secs / took;
                f * end(after) + (1.0 - f) * end(margin)
            } else if o.keep {
                table.value(after, secs - took, at, a2, b2)
            } else {
                1.0 - table.value(-after, secs - took, at, b2, a2)
            };
    }
    p
}

/// The outcome sum matches pricing each outcome with `value`, on a league's
/// own cells and table, over margins (whole and not), clocks, timeouts.
#[test]
fn outcome_sum_matches_one_outcome_at_a_time() {
    let plays = testkit::league(400, 2, 5);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let d = DriveParams::estimate(&plays, &rows).expect("drives");
    let t = d.solve();
    let mut n = 0;
    for (ci, list) in d.snaps.cells.iter().enumerate().filter(|(_, l)| !l.is_empty()).step_by(7) {
        for margin in [-31.0, -8.0, -3.0, -0.5, 0.0, 2.0, 6.6, 17.0, 29.0] {
            for secs in [0.0, 3.0, 17.0, 60.0, 122.5, 300.0, 655.0, 900.0] {
                for (a, b) in [(0, 0), (3, 1), (2, 3), (3, 3)] {
                    let fast = t.after_outcomes(list, margin, secs, a, b);
                    let slow = one_at_a_time(&t, list, margin, secs, a, b);
                    assert!((fast - slow).abs() < 1e-12, "cell {ci} margin {margin} secs {secs} {a}/{b}: {fast} vs {slow}");
                    n += 1;
                }
            }
        }
    }
    assert!(n > 10_000, "{n} cases");
}

/// Worked by hand: in the final 2:00 the timeouts class below bounds a
/// snap's value, since a side may leave its timeouts unused. Every drive
/// takes 30 s, so with 20 s left it gets 2/3 of its outcome.
/// - Behind by 3 with three timeouts (class 2-3), whose drives come to
///   nothing (0), where drives with 0-1 timeouts score a touchdown
///   (2/3 · 1 + 1/3 · 0): 2/3, the class below.
/// - Ahead by 3, the defense holding three timeouts, whose drives score
///   (1), where against 0-1 they are returned for 7 (2/3 · 0 + 1/3 · 1):
///   1/3, the class below.
/// - With 2:30 left the classes stand as counted: the value is the one of
///   the class alone (its cells in both classes), bit for bit.
#[test]
fn fewer_timeouts_bound_the_final_two_minutes() {
    let t = field_goal_table();
    let none = vec![o(0, false, 6, 1.0)];
    let mut p = every_cell(&none);
    for z in 0..SNAP_ZONES {
        for dc in 0..NDOWN {
            p.cells[cell(Mode::Trail, z, dc, 0)] = vec![o(7, false, 6, 1.0)];
            p.cells[cell(Mode::Lead, z, dc, 0)] = vec![o(-7, false, 6, 1.0)];
            p.cells[cell(Mode::Lead, z, dc, 1)] = vec![o(7, false, 6, 1.0)];
        }
    }
    let trailing = p.value(&t, &snap(-3.0, 20.0, 45, 2, 10)).expect("a cell");
    assert!((trailing - 2.0 / 3.0).abs() < 1e-12, "{trailing}");
    let leading = p.value(&t, &snap(3.0, 20.0, 45, 2, 10)).expect("a cell");
    assert!((leading - 1.0 / 3.0).abs() < 1e-12, "{leading}");
    // Outside the final 2:00: class 2-3's own cells.
    let mut q = p.clone();
    for z in 0..SNAP_ZONES {
        for dc in 0..NDOWN {
            q.cells[cell(Mode::Trail, z, dc, 0)] = none.clone();
            q.cells[cell(Mode::Lead, z, dc, 0)] = vec![o(7, false, 6, 1.0)];
        }
    }
    for margin in [-3.0, 3.0] {
        let s = snap(margin, 150.0, 45, 2, 10);
        assert_eq!(p.value(&t, &s), q.value(&t, &s), "{margin}");
    }
}

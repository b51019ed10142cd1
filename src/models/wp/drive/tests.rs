use super::*;
use crate::models::testkit;

/// Every (mode, zone, timeouts class) cell ends the same way.
fn uniform(outcomes: &[Outcome]) -> DriveParams {
    DriveParams { cells: vec![outcomes.to_vec(); NMODE * NZ * NTO], drives: 0, snaps: Default::default() }
}

fn o(swing: i32, keep: bool, steps: u16, share: f64) -> Outcome {
    Outcome { swing, keep, zone: 1, steps, off_used: 0, def_used: 0, share }
}

/// A table cell with both sides holding three timeouts (what the
/// timeout-free worked examples below assume).
impl DriveTable {
    fn g(&self, k: usize, m: i32, z: usize) -> f64 {
        self.get(k, m, z, 3, 3)
    }
}

/// Worked by hand: every possession takes 60 s (12 steps) and gains 3.
/// Tied with 60 s left: the field goal comes as time runs out, so the team
/// with the ball wins (V = 1). Tied with 120 s: it goes up 3 with 60 s left
/// and hands the ball over, the other side ties it at 0:00: ½. Up 3 with
/// 120 s: up 6, the other side gets only to −3: 1. With 55 s (11 steps)
/// the drive gets 11/12 of its outcome: 11/12 + ½/12 = 23/24. When a drive
/// takes 120 s and 60 s are left, half: ½ · 1 + ½ · ½ = 0.75 at a tie.
#[test]
fn backward_induction_by_hand() {
    let t = uniform(&[o(3, false, 12, 1.0)]).solve();
    assert_eq!(t.g(0, 0, 2), 0.5);
    assert_eq!(t.g(0, 1, 2), 1.0);
    assert_eq!(t.g(0, -1, 2), 0.0);
    assert_eq!(t.g(12, 0, 2), 1.0);
    assert_eq!(t.g(24, 0, 2), 0.5);
    assert_eq!(t.g(24, 3, 2), 1.0);
    assert_eq!(t.g(24, -3, 2), 0.0);
    assert!((t.g(11, 0, 0) - 23.0 / 24.0).abs() < 1e-12);
    let slow = uniform(&[o(3, false, 24, 1.0)]).solve();
    assert_eq!(slow.g(12, 0, 4), 0.75);
    // Two ways, each half the time, 30 s each, the other side getting the
    // ball: a touchdown (7) or nothing. Down 4 with 30 s: ½ (score as the
    // clock ends, or not). Down 4 with 60 s: after a touchdown (up 3) the
    // other side has 30 s and wins half the time; after nothing it is up
    // 4 with 30 s and always wins: ½ · ½ + ½ · 0 = ¼.
    let td = uniform(&[o(7, false, 6, 0.5), o(0, false, 6, 0.5)]).solve();
    assert_eq!(td.g(6, -4, 1), 0.5);
    assert_eq!(td.g(12, -4, 1), 0.25);
    // Keeping the ball after a return score against (−7 each 30 s): with
    // 60 s left only a lead above 14 holds, 14 ties.
    let keep = uniform(&[o(-7, true, 6, 1.0)]).solve();
    assert_eq!(keep.g(12, 15, 0), 1.0);
    assert_eq!(keep.g(12, 14, 0), 0.5);
    assert_eq!(keep.g(12, 10, 0), 0.0);
}

/// The trailing side's timeouts, worked by hand. Drives of a trailing
/// offense (final 5:00) with 0-1 timeouts score 3 in 24 steps, with 2-3 in
/// 12, and hand the ball over; all other drives gain nothing in 12 steps.
/// Down 1 with 12 steps (60 s) left: with 2 or 3 timeouts the field goal
/// comes in time (1); with 0 or 1 the drive gets half of it. Down 1 with 24
/// steps and 3 timeouts: up 2 with 12 steps left, the other side, down 2,
/// scores in time with 3 timeouts (0 for us) and gets half of it with 1
/// (½ for us): the other side's timeouts are read from its own side.
#[test]
fn timeouts_of_the_trailing_side() {
    let mut p = uniform(&[o(0, false, 12, 1.0)]);
    for z in 0..NZ {
        for c in 0..2 {
            p.cells[cell_of(Mode::Trail, z, c)] = vec![o(3, false, 24 - 12 * c as u16, 1.0)];
        }
    }
    let t = p.solve();
    assert_eq!(t.get(12, -1, 1, 3, 0), 1.0);
    assert_eq!(t.get(12, -1, 1, 2, 0), 1.0);
    assert!((t.get(12, -1, 1, 1, 3) - 0.5).abs() < 1e-12);
    assert!((t.get(12, -1, 1, 0, 3) - 0.5).abs() < 1e-12);
    assert_eq!(t.get(24, -1, 1, 3, 3), 0.0);
    assert!((t.get(24, -1, 1, 3, 1) - 0.5).abs() < 1e-12);
    // Timeouts used are taken off: a trailing offense with 2-3 timeouts
    // keeps the ball one step per timeout it calls; with 0-1 it scores 3
    // in one step.
    let mut q = uniform(&[o(0, false, 12, 1.0)]);
    for z in 0..NZ {
        q.cells[cell_of(Mode::Trail, z, 0)] = vec![o(3, false, 1, 1.0)];
        q.cells[cell_of(Mode::Trail, z, 1)] = vec![Outcome { off_used: 1, ..o(0, true, 1, 1.0) }];
    }
    let t = q.solve();
    assert_eq!(t.get(1, -1, 1, 1, 3), 1.0);
    assert_eq!(t.get(2, -1, 1, 2, 3), 1.0);
    assert_eq!(t.get(1, -1, 1, 2, 3), 0.0);
    assert_eq!(t.get(3, -1, 1, 3, 3), 1.0);
    assert_eq!(t.get(2, -1, 1, 3, 3), 0.0);
}

#[test]
fn value_interpolates_the_grid() {
    let t = uniform(&[o(7, false, 6, 0.5), o(0, false, 6, 0.5)]).solve();
    // On grid points (time, margin, a zone's own yard line) it is the grid.
    assert!((t.value(-4.0, 60.0, 25.0, 3, 3) - t.g(12, -4, 1)).abs() < 1e-12);
    assert!((t.value(-4.0, 30.0, 82.0, 3, 3) - t.g(6, -4, 4)).abs() < 1e-12);
    let mid = t.value(-3.5, 60.0, 25.0, 3, 3);
    assert!((mid - 0.5 * (t.g(12, -4, 1) + t.g(12, -3, 1))).abs() < 1e-12);
    let between = t.value(-4.0, 62.5, 25.0, 3, 3);
    assert!((between - 0.5 * (t.g(12, -4, 1) + t.g(13, -4, 1))).abs() < 1e-12);
    // Off the grid it clamps.
    assert_eq!(t.value(50.0, 2000.0, 150.0, 3, 3), t.g(NT - 1, MAX_MARGIN, NZ - 1));
}

#[test]
fn estimated_from_a_league() {
    let plays = testkit::league(400, 2, 5);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let p = DriveParams::estimate(&plays, &rows).expect("drives in every zone");
    assert!(p.drives > 5000, "{} drives", p.drives);
    for c in &p.cells {
        let s: f64 = c.iter().map(|o| o.share).sum();
        assert!((s - 1.0).abs() < 1e-9, "shares sum to {s}");
        assert!(c.iter().all(|o| o.steps >= 1 && o.swing.abs() <= MAX_SWING));
    }
    // Drives from deep in the opponent's half score more than from one's own 10.
    let pts = |z: usize| p.cells[cell_of(Mode::Other, z, 0)].iter().map(|o| o.share * o.swing as f64).sum::<f64>();
    assert!(pts(4) > pts(0) + 1.0, "{} vs {}", pts(4), pts(0));
    let t0 = std::time::Instant::now();
    let t = p.solve();
    eprintln!("drive table solved in {:.1} ms", t0.elapsed().as_secs_f64() * 1e3);
    for k in 0..NT {
        for z in 0..NZ {
            for (ta, tb) in (0..NTO).flat_map(|a| (0..NTO).map(move |b| (a, b))) {
                for m in -MAX_MARGIN..MAX_MARGIN {
                    let (a, b) = (t.get(k, m, z, ta, tb), t.get(k, m + 1, z, ta, tb));
                    assert!((0.0..=1.0).contains(&a) && a <= b, "k {k} m {m} z {z} timeouts {ta}/{tb}");
                }
            }
        }
    }
    // Up 8 with the ball and a minute left nearly always wins; a tie at
    // 15:00 is near a coin flip, the ball at the opponent's 18 worth more.
    assert!(t.value(8.0, 60.0, 40.0, 3, 3) > 0.95);
    let tie = t.value(0.0, 900.0, 25.0, 3, 3);
    assert!((0.4..0.7).contains(&tie), "{tie}");
    assert!(t.value(0.0, 900.0, 82.0, 3, 3) > tie);
    // Held-out rows are never read: the drives of one season alone differ.
    let first: Vec<u32> = rows.iter().copied().filter(|&i| plays.season[i as usize] == plays.season[0]).collect();
    let q = DriveParams::estimate(&plays, &first).expect("one season");
    assert!(q.drives < p.drives && q.drives > 1000);
    // Kept in the cache as shares: a model read back solves the same table.
    let m = DriveModel::new(p);
    let back: DriveModel = serde_json::from_str(&serde_json::to_string(&m).expect("json")).expect("parse");
    assert_eq!(back, m);
    assert_eq!(back.table(), m.table());
}

/// The backward induction one grid cell at a time, as `solve` did before
/// it summed a row's timeouts pairs side by side.
fn solve_one_cell_at_a_time(params: &DriveParams) -> DriveTable {
    let per_k = NM * NZ * NTO * NTO;
    let mut v = vec![0.0; NT * per_k];
    let end = |m: i32| match m.signum() {
        1 => 1.0,
        -1 => 0.0,
        _ => 0.5,
    };
    for m in -MAX_MARGIN..=MAX_MARGIN {
        for z in 0..NZ {
            for ab in 0..NTO * NTO {
                v[at(0, m, z, ab / NTO, ab % NTO)] = end(m);
            }
        }
    }
    for k in 1..NT {
        let secs = k as i32 * STEP_SECS;
        let (done, now) = v.split_at_mut(k * per_k);
        let now = &mut now[..per_k];
        for (mi, row) in now.chunks_mut(NZ * NTO * NTO).enumerate() {
            let m = mi as i32 - MAX_MARGIN;
            let md = mode(secs, m);
            for z in 0..NZ {
                for a in 0..NTO {
                    for b in 0..NTO {
                        let mut p = 0.0;
                        for o in &params.cells[cell_of(md, z, to_class(md, a, b))] {
                            let after = (m + o.swing).clamp(-MAX_MARGIN, MAX_MARGIN);
                            let steps = o.steps as usize;
                            let a2 = a.saturating_sub(o.off_used as usize);
                            let b2 = b.saturating_sub(o.def_used as usize);
                            p += o.share
                                * if steps > k {
                                    let f = k as f64 / steps as f64;
                                    f * end(after) + (1.0 - f) * end(m)
                                } else if o.keep {
                                    done[at(k - steps, after, o.zone as usize, a2, b2)]
                                } else {
                                    1.0 - done[at(k - steps, -after, o.zone as usize, b2, a2)]
                                };
                        }
                        row[(z * NTO + a) * NTO + b] = p.clamp(0.0, 1.0);
                    }
                }
            }
        }
        for z in 0..NZ {
            for ab in 0..NTO * NTO {
                let (a, b) = (ab / NTO, ab % NTO);
                for m in -MAX_MARGIN + 1..=MAX_MARGIN {
                    let (lo, hi) = (at(0, m - 1, z, a, b), at(0, m, z, a, b));
                    if now[hi] < now[lo] {
                        now[hi] = now[lo];
                    }
                }
            }
        }
    }
    DriveTable::from_grid(v)
}

/// The solve sums each cell's outcomes in the same order as one cell at a
/// time: the same table bit for bit, on a league's shares (every late
/// mode) and on hand-made ones with timeouts used and drives longer than
/// the time left.
#[test]
fn solve_matches_one_cell_at_a_time_bit_for_bit() {
    let plays = testkit::league(300, 2, 23);
    let rows: Vec<u32> = (0..plays.len() as u32).collect();
    let league = DriveParams::estimate(&plays, &rows).expect("drives in every zone");
    let mut odd = uniform(&[o(3, false, 12, 0.3), o(-7, true, 70, 0.2), o(0, false, 2, 0.5)]);
    for (c, cell) in odd.cells.iter_mut().enumerate() {
        cell[0].off_used = (c % 3) as u8;
        cell[1].def_used = (c % 4) as u8;
        cell[2].zone = (c % NZ) as u8;
    }
    for p in [league, odd] {
        let (fast, slow) = (p.solve(), solve_one_cell_at_a_time(&p));
        assert_eq!(fast.v.len(), slow.v.len());
        let differ = fast.v.iter().zip(&slow.v).filter(|(a, b)| a.to_bits() != b.to_bits()).count();
        assert_eq!(differ, 0, "{differ} cells differ");
        assert!(fast.v.iter().any(|&x| x > 0.0 && x < 1.0));
    }
}

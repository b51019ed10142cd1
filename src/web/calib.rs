//! Words and table rows for the models' fit report and held-out
//! calibration (home and calibration pages). Formats numbers the models
//! computed; computes none.

use crate::models::strata::{Banded, EpGroup, StratumBin, StratumScore};
use crate::models::{CalibStatus, Calibration, CalibrationCell, FitReport, ModelReport, Plan};
use crate::numfmt::thousands as group;

/// One stratum as the page shows it.
pub struct StratumView {
    pub label: String,
    /// Brier scores and the gain over the baseline, in words.
    pub line: String,
    /// (WP range, snaps, predicted, observed, 90% band, baseline predicted,
    /// baseline observed) per equal-count bin.
    pub rows: Vec<Vec<String>>,
}

/// A titled EP table.
pub struct EpTable {
    pub title: String,
    pub rows: Vec<Vec<String>>,
}

pub struct CalibrationView {
    /// The opening sentence, from the late and close stratum.
    pub headline: String,
    /// What was held out, in one sentence.
    pub holdout: String,
    pub title: String,
    /// (mean predicted, observed, n) per reliability bin of the late and
    /// close stratum, for the chart.
    pub bins: Vec<(f64, f64, usize)>,
    pub strata: Vec<StratumView>,
    pub wp_rows: Vec<Vec<String>>,
    pub ep_rows: Vec<Vec<String>>,
    /// EP by down, by field zone, by clock situation.
    pub ep_groups: Vec<EpTable>,
    pub scores: Vec<Vec<String>>,
}

fn pct(x: f64) -> String {
    format!("{:.0}%", 100.0 * x)
}

fn band(b: &Banded, digits: usize) -> String {
    format!("{:.*}–{:.*}", digits, b.lo, digits, b.hi)
}

/// A band for a table cell: word joiners around the dash, so the cell
/// never wraps after it (a laptop's narrow column did).
fn band_cell(b: &Banded, digits: usize) -> String {
    format!("{:.*}\u{2060}–\u{2060}{:.*}", digits, b.lo, digits, b.hi)
}

/// The sentence a staff reads first: when the model said about 30% late in
/// close games, how often those teams won.
pub fn headline(c: &Calibration) -> String {
    let h: &StratumBin = &c.headline;
    if h.n == 0 {
        return "No held-out snap of the last 7:30 of a close game had a win probability near 30%, so there is nothing to check it against yet.".into();
    }
    format!(
        "In the last 7:30 of close games (within 8 points, overtime included), when the model said about {} ({}–{}), teams won about {} of the time (90% band {}–{}; {} held-out snaps).",
        pct(h.mean_predicted),
        pct(h.lo),
        pct(h.hi),
        pct(h.observed.value),
        pct(h.observed.lo),
        pct(h.observed.hi),
        group(h.n)
    )
}

/// One line for the home page: what was held out and how WP did, or how
/// long until that is known.
pub fn summary(cell: &CalibrationCell) -> String {
    let c = match cell.status() {
        CalibStatus::Ready(c) => c,
        other => return other.sentence(),
    };
    let what = if c.plan == Plan::LastGames { "Held out (one season in the file)" } else { "Held out" };
    format!(
        "{what} {} ({} snaps in {} games): win-probability Brier score {:.4} against {:.4} for a margin-and-time model and {:.4} for a coin flip.",
        c.holdout, group(c.test_snaps), group(c.test_games), c.wp.brier, c.baseline.brier, c.constant.brier
    )
}

fn model_line(name: &str, r: &ModelReport) -> String {
    format!(
        "{name}: {} rows × {} features, {} Newton step{}, {}, gradient norm {:.2e}, {:.1} s",
        group(r.rows),
        r.features,
        r.iterations,
        if r.iterations == 1 { "" } else { "s" },
        if r.converged { "converged" } else { "NOT converged" },
        r.grad_norm,
        r.seconds
    )
}

pub fn fit_lines(f: &FitReport) -> Vec<String> {
    let mut v = vec![model_line("Expected points", &f.ep), model_line("Win probability", &f.wp), model_line("Margin-and-time baseline", &f.baseline)];
    if let Some(cp) = &f.cp {
        v.push(model_line("Completion probability", cp));
    }
    v
}

fn stratum_view(s: &StratumScore) -> StratumView {
    let line = if s.wp.n == 0 {
        "No held-out snaps.".to_string()
    } else {
        format!(
            "{} held-out snaps in {} games. Brier score {:.4} (90% band {}) against {:.4} ({}) for margin and time only: {:.1}% lower (band {:.1}% to {:.1}%).",
            group(s.wp.n),
            group(s.games),
            s.wp_brier.value,
            band(&s.wp_brier, 4),
            s.baseline_brier.value,
            band(&s.baseline_brier, 4),
            100.0 * s.brier_gain.value,
            100.0 * s.brier_gain.lo,
            100.0 * s.brier_gain.hi
        )
    };
    let rows = s
        .bins
        .iter()
        .zip(&s.baseline_bins)
        .map(|(b, base)| {
            vec![
                format!("{:.2}–{:.2}", b.lo, b.hi),
                group(b.n),
                format!("{:.3}", b.mean_predicted),
                format!("{:.3}", b.observed.value),
                band_cell(&b.observed, 3),
                format!("{:.3}", base.mean_predicted),
                format!("{:.3}", base.observed.value),
            ]
        })
        .collect();
    StratumView { label: s.label.clone(), line, rows }
}

fn ep_group_rows(groups: &[EpGroup]) -> Vec<Vec<String>> {
    groups
        .iter()
        .map(|g| {
            vec![
                g.label.clone(),
                group(g.n),
                format!("{:+.2}", g.mean_predicted),
                format!("{:+.2}", g.mean_actual.value),
                format!("{:+.2}\u{a0}to\u{a0}{:+.2}", g.mean_actual.lo, g.mean_actual.hi),
            ]
        })
        .collect()
}

pub fn view(c: &Calibration) -> CalibrationView {
    let late = c.strata.first();
    let bins = late
        .map(|s| s.bins.iter().filter(|b| b.n > 0).map(|b| (b.mean_predicted, b.observed.value, b.n)).collect())
        .unwrap_or_default();
    let wp_rows = c
        .reliability
        .iter()
        .map(|b| vec![format!("{:.1}–{:.1}", b.lo, b.hi), group(b.n), format!("{:.3}", b.mean_predicted), format!("{:.3}", b.observed)])
        .collect();
    let ep_rows = c
        .ep_bins
        .iter()
        .map(|b| {
            let range = match (b.lo, b.hi) {
                (Some(lo), Some(hi)) => format!("{lo:.1} to {hi:.1}"),
                (None, Some(hi)) => format!("below {hi:.1}"),
                (Some(lo), None) => format!("{lo:.1} and up"),
                (None, None) => "all".into(),
            };
            vec![range, group(b.n), format!("{:.2}", b.mean_predicted), format!("{:.2}", b.mean_actual)]
        })
        .collect();
    let scores = vec![
        vec!["Win probability".into(), format!("{:.4}", c.wp.brier), format!("{:.4}", c.wp.log_loss)],
        vec!["Margin and time only".into(), format!("{:.4}", c.baseline.brier), format!("{:.4}", c.baseline.log_loss)],
        vec!["Constant 0.5".into(), format!("{:.4}", c.constant.brier), format!("{:.4}", c.constant.log_loss)],
    ];
    CalibrationView {
        headline: headline(c),
        holdout: format!("Every number below is out of sample: held out {}, {} snaps in {} games.", c.holdout, group(c.test_snaps), group(c.test_games)),
        title: "End of game (final 7:30 or overtime, one score), held out: predicted vs observed win share (five equal-count bins)".into(),
        bins,
        strata: c.strata.iter().map(stratum_view).collect(),
        wp_rows,
        ep_rows,
        ep_groups: vec![
            EpTable { title: "By down".into(), rows: ep_group_rows(&c.ep_by_down) },
            EpTable { title: "By field zone".into(), rows: ep_group_rows(&c.ep_by_zone) },
            EpTable { title: "By clock and score".into(), rows: ep_group_rows(&c.ep_by_clock) },
        ],
        scores,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::models::{calibrate, testkit};

    #[test]
    fn the_page_says_what_it_held_out_and_opens_with_a_plain_sentence() {
        let c = calibrate(&testkit::league(300, 3, 5)).expect("calibrate");
        let v = view(&c);
        assert!(v.headline.starts_with("In the last 7:30 of close games") || v.headline.starts_with("No held-out snap"), "{}", v.headline);
        assert!(v.holdout.contains("each of the 3 seasons in turn"), "{}", v.holdout);
        assert_eq!(v.strata.len(), 3);
        assert!(v.strata.iter().all(|s| s.rows.len() == 5));
        assert_eq!(v.ep_groups.len(), 3);
        // Band cells hold no place a line may break.
        for s in &v.strata {
            assert!(s.rows.iter().all(|r| !r[4].contains(' ') && r[4].contains("\u{2060}–\u{2060}")), "{:?}", s.rows);
        }
        assert!(v.ep_groups.iter().flat_map(|g| &g.rows).all(|r| !r[4].contains(' ')));
        // Snap counts grouped by thousands, as everywhere else on the page.
        for (rows, bins) in [(&v.wp_rows, c.reliability.iter().map(|b| b.n).collect::<Vec<_>>()), (&v.ep_rows, c.ep_bins.iter().map(|b| b.n).collect())] {
            assert_eq!(rows.len(), bins.len());
            for (r, n) in rows.iter().zip(bins) {
                assert_eq!(r[1].replace(',', "").parse::<usize>().ok(), Some(n));
                assert_eq!(r[1].contains(','), n >= 1000, "{}", r[1]);
            }
        }
        assert!(v.wp_rows.iter().any(|r| r[1].contains(',')), "{:?}", v.wp_rows);
        let one = calibrate(&testkit::league(60, 1, 5)).expect("one season");
        let v = view(&one);
        assert!(v.holdout.contains("the last 12 of the 60 games") && v.holdout.contains("no season can be held out"), "{}", v.holdout);
        assert!(!v.holdout.contains("in-sample") && !summary(&CalibrationCell::ready(one)).contains("in-sample"));
    }

    #[test]
    fn a_fit_line_groups_its_rows_and_counts_its_steps() {
        let mut r = crate::models::ModelReport { rows: 274_847, features: 4, iterations: 1, warm_iterations: 0, converged: true, grad_norm: 0.0923, log_lik: -1.0, seconds: 0.21 };
        assert_eq!(model_line("Baseline", &r), "Baseline: 274,847 rows × 4 features, 1 Newton step, converged, gradient norm 9.23e-2, 0.2 s");
        (r.iterations, r.converged) = (5, false);
        assert_eq!(model_line("Baseline", &r), "Baseline: 274,847 rows × 4 features, 5 Newton steps, NOT converged, gradient norm 9.23e-2, 0.2 s");
    }
}

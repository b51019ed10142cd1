//! Words and table rows for the models' fit report and held-out
//! calibration (home and calibration pages).

use crate::models::{Calibration, FitReport, ModelReport};

pub struct CalibrationView {
    pub title: String,
    /// (mean predicted, observed, n) per reliability bin.
    pub bins: Vec<(f64, f64, usize)>,
    pub wp_rows: Vec<Vec<String>>,
    pub ep_rows: Vec<Vec<String>>,
    pub scores: Vec<Vec<String>>,
}

pub fn summary(c: &Calibration) -> String {
    match c.holdout_season {
        Some(season) => format!(
            "Held out season {season} ({} snaps in {} games, fit on {} snaps of the other seasons): win-probability Brier score {:.4} against {:.4} for a margin-and-time model and {:.4} for a coin flip.",
            c.test_snaps, c.test_games, c.train_snaps, c.wp.brier, c.baseline.brier, c.constant.brier
        ),
        None => format!("No season could be held out ({}); the numbers below are in-sample.", c.holdout),
    }
}

fn model_line(name: &str, r: &ModelReport) -> String {
    format!(
        "{name}: {} rows × {} features, {} Newton steps, {}, gradient norm {:.2e}, {:.1} s",
        r.rows,
        r.features,
        r.iterations,
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

pub fn view(c: &Calibration) -> CalibrationView {
    let bins = c.reliability.iter().filter(|b| b.n > 0).map(|b| (b.mean_predicted, b.observed, b.n)).collect();
    let wp_rows = c
        .reliability
        .iter()
        .map(|b| vec![format!("{:.1}–{:.1}", b.lo, b.hi), b.n.to_string(), format!("{:.3}", b.mean_predicted), format!("{:.3}", b.observed)])
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
            vec![range, b.n.to_string(), format!("{:.2}", b.mean_predicted), format!("{:.2}", b.mean_actual)]
        })
        .collect();
    let scores = vec![
        vec!["Win probability".into(), format!("{:.4}", c.wp.brier), format!("{:.4}", c.wp.log_loss)],
        vec!["Margin and time only".into(), format!("{:.4}", c.baseline.brier), format!("{:.4}", c.baseline.log_loss)],
        vec!["Constant 0.5".into(), format!("{:.4}", c.constant.brier), format!("{:.4}", c.constant.log_loss)],
    ];
    CalibrationView {
        title: match c.holdout_season {
            Some(s) => format!("Win probability reliability, held-out season {s}: predicted vs observed win share"),
            None => "Win probability reliability (in-sample)".into(),
        },
        bins,
        wp_rows,
        ep_rows,
        scores,
    }
}

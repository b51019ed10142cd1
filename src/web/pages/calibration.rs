//! The calibration page: how far to trust the models, held out by season.

use super::*;

#[derive(Template)]
#[template(path = "calibration.html")]
pub(super) struct CalibrationPage {
    pub(super) chrome: Chrome,
    pub(super) fingerprint: String,
    pub(super) model_version: &'static str,
    /// `None` while the calibration is being computed (`pending` says how long).
    pub(super) view: Option<super::super::calib::CalibrationView>,
    pub(super) pending: String,
    pub(super) chart: String,
    pub(super) fit_lines: Vec<String>,
    /// Which overtime rules the WP model solved for which seasons.
    pub(super) overtime_lines: Vec<String>,
}

/// "2020-2025: touchdown-or-answer, 10:00, a level period is a tie (a
/// touchdown on the first possession wins, ...)", one line per run of
/// seasons with the same rules, and whether a config gave them.
pub(crate) fn overtime_lines(plays: &crate::plays::Plays) -> Vec<String> {
    let mut lines: Vec<String> = plays
        .overtime
        .spans(&plays.seasons())
        .iter()
        .map(|s| format!("{}: {} ({})", s.seasons, s.label, s.rules.rule.describe()))
        .collect();
    lines.push(if plays.overtime.is_default() {
        "No overtime config was given: every season is solved under the default rules (serve --overtime FILE names them by season).".to_string()
    } else {
        "From the overtime config given with --overtime; seasons it does not list play the default.".to_string()
    });
    lines
}

pub async fn calibration(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = Params::parse(q.as_deref()).ok();
    let lg = st.league();
    let status = lg.scored.calibration.status();
    let view = match &status {
        crate::models::CalibStatus::Ready(c) => Some(super::super::calib::view(c)),
        _ => None,
    };
    let chart = view.as_ref().map(|v| charts::reliability(&v.title, &v.bins, 420.0, 360.0).to_svg()).unwrap_or_default();
    let page = CalibrationPage {
        chrome: chrome(&st, &headers, params.as_ref(), "Model calibration".into(), "calibration", "/calibration"),
        fingerprint: lg.scored.fingerprint.clone(),
        model_version: crate::models::MODEL_VERSION,
        view,
        pending: status.sentence(),
        chart,
        fit_lines: super::super::calib::fit_lines(&lg.scored.models.report),
        overtime_lines: overtime_lines(lg.plays()),
    };
    html(&page)
}

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
    };
    html(&page)
}

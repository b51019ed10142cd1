//! The calibration page: how far to trust the models, held out by season.

use super::*;

#[derive(Template)]
#[template(path = "calibration.html")]
pub(super) struct CalibrationPage {
    pub(super) chrome: Chrome,
    pub(super) fingerprint: String,
    pub(super) model_version: &'static str,
    pub(super) view: super::super::calib::CalibrationView,
    pub(super) chart: String,
    pub(super) fit_lines: Vec<String>,
}

pub async fn calibration(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let params = Params::parse(q.as_deref()).ok();
    let lg = st.league();
    let view = super::super::calib::view(&lg.scored.calibration);
    let chart = charts::reliability(&view.title, &view.bins, 420.0, 360.0).to_svg();
    let page = CalibrationPage {
        chrome: chrome(&st, &headers, params.as_ref(), "Model calibration".into(), "calibration", "/calibration"),
        fingerprint: lg.scored.fingerprint.clone(),
        model_version: crate::models::MODEL_VERSION,
        view,
        chart,
        fit_lines: super::super::calib::fit_lines(&lg.scored.models.report),
    };
    html(&page)
}

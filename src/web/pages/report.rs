//! The one-page report as a page and as a PDF.

use super::*;

/// The report's data for a request: the situation, our passer (or
/// `passer=`), the paper size.
pub(super) fn report_data(st: &Shared, headers: &HeaderMap, q: Option<&str>) -> Result<(crate::report::ReportData, crate::report::Paper), Response> {
    let params = Params::parse_in(q, st.league().plays()).map_err(|e| bad_query(st, headers, &e, &format!("/report?preset={}", Preset::DEFAULT.key())))?;
    let (_, our_passer) = ours(st, headers);
    let Some(passer) = params.situation.passer.clone().or(our_passer) else {
        return Err(error_page(st, headers, StatusCode::BAD_REQUEST, "Which passer?", "passer=: name the report's passer, or choose our passer on the home page.".into(), "/"));
    };
    let mut situation = params.situation.clone();
    if !asks_situation(&params.raw.iter().filter(|(k, _)| k != "passer").cloned().collect::<Vec<_>>()) {
        situation = Situation { passer: situation.passer.clone(), ..Preset::DEFAULT.situation(situation.one_score) };
    }
    let paper = params.paper.as_deref().and_then(crate::report::Paper::parse).unwrap_or(crate::report::Paper::Letter);
    let loaded = st.loaded();
    match crate::report::ReportData::build_in(&loaded.league, &loaded.index, &situation, &passer, params.min_dropbacks) {
        Ok(d) => Ok((d, paper)),
        Err(e) => Err(error_page(st, headers, StatusCode::BAD_REQUEST, "No report for that", e.to_string(), "/")),
    }
}

pub async fn report_html(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::super::service::engine(&st, move || report_html_now(st2, headers, q)).await
}

fn report_html_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    match report_data(&st, &headers, q.as_deref()) {
        Ok((data, paper)) => Html(crate::report::html(&data, paper)).into_response(),
        Err(r) => r,
    }
}

pub async fn report_pdf(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::super::service::engine(&st, move || report_pdf_now(st2, headers, q)).await
}

fn report_pdf_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let (data, paper) = match report_data(&st, &headers, q.as_deref()) {
        Ok(x) => x,
        Err(r) => return r,
    };
    match crate::report::render_pdf(&data, paper) {
        Ok(bytes) => ([(header::CONTENT_TYPE, "application/pdf"), (header::CONTENT_DISPOSITION, "inline; filename=\"report.pdf\"")], bytes).into_response(),
        Err(e) => error_page(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, "The PDF could not be made", e.to_string(), "/"),
    }
}

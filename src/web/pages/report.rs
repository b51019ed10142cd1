//! The one-page report as a page and as a PDF.

use super::*;

/// The report's data for a request: the situation, our passer (or
/// `passer=`), the paper size, and the page's screen links.
pub(super) fn report_data(st: &Shared, headers: &HeaderMap, q: Option<&str>, path: &str) -> Result<(crate::report::ReportData, crate::report::Paper, crate::report::ReportScreen), Response> {
    let params = Params::parse_in(q, st.league().plays()).map_err(|e| refused(st, headers, &e, "/report", q))?;
    let (_, our_passer) = ours(st, headers);
    let Some(passer) = params.situation.passer.clone().or(our_passer) else {
        return Err(super::pick::pick_passer(st, headers, Some(&params), "report", path, "the report"));
    };
    let mut situation = params.situation.clone();
    if !asks_situation(&params.raw.iter().filter(|(k, _)| k != "passer").cloned().collect::<Vec<_>>()) {
        situation = Situation { passer: situation.passer.clone(), ..Preset::DEFAULT.situation(situation.one_score) };
    }
    let paper = params.paper.as_deref().and_then(crate::report::Paper::parse).unwrap_or(crate::report::Paper::Letter);
    let loaded = st.loaded();
    let screen = report_screen(&params, &situation, &passer);
    match crate::report::ReportData::build_in(&loaded.league, &loaded.index, &situation, &passer, params.min_dropbacks) {
        Ok(d) => Ok((d, paper, screen)),
        Err(e) => Err(error_page(st, headers, StatusCode::BAD_REQUEST, "No report for that", e.to_string(), "/")),
    }
}

/// Links from the report back to the pages it came from: the explorer in
/// the same situation and seasons, the passer's page, the PDF and the other
/// view, each keeping the situation, the seasons and the view.
pub fn report_screen(params: &Params, situation: &Situation, passer: &str) -> crate::report::ReportScreen {
    let view = |q: &mut Vec<(String, String)>| {
        if params.projector {
            q.push(("view".into(), "projector".into()));
        }
    };
    let mut explore = Situation { passer: None, ..situation.clone() }.to_query();
    view(&mut explore);
    let mut report = Situation { passer: Some(passer.to_string()), ..situation.clone() }.to_query();
    if let Some(paper) = &params.paper {
        report.push(("paper".into(), paper.clone()));
    }
    let pdf = report.clone();
    let mut toggle = report.clone();
    if !params.projector {
        toggle.push(("view".into(), "projector".into()));
    }
    crate::report::ReportScreen {
        projector: params.projector,
        links: vec![
            ("Back to the situations".into(), format!("/explore{}", to_query_string(&explore))),
            (format!("{passer}'s page"), format!("/passer{}", passer_query(passer, params))),
            ("PDF".into(), format!("/report.pdf{}", to_query_string(&pdf))),
            ((if params.projector { "Laptop view" } else { "Projector view" }).into(), format!("/report{}", to_query_string(&toggle))),
        ],
    }
}

pub async fn report_html(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::super::service::engine(&st, move || report_html_now(st2, headers, q)).await
}

fn report_html_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    match report_data(&st, &headers, q.as_deref(), "/report") {
        Ok((data, paper, screen)) => Html(crate::report::html_with(&data, paper, &screen)).into_response(),
        Err(r) => r,
    }
}

pub async fn report_pdf(State(st): State<Shared>, headers: HeaderMap, RawQuery(q): RawQuery) -> Response {
    let st2 = st.clone();
    super::super::service::engine(&st, move || report_pdf_now(st2, headers, q)).await
}

fn report_pdf_now(st: Shared, headers: HeaderMap, q: Option<String>) -> Response {
    let (data, paper, _) = match report_data(&st, &headers, q.as_deref(), "/report.pdf") {
        Ok(x) => x,
        Err(r) => return r,
    };
    let mut parts = vec![data.team.clone(), data.passer.clone()];
    parts.extend(data.query.iter().filter(|(k, _)| k == "preset").map(|(_, v)| v.clone()));
    parts.push(data.seasons_label.clone());
    let name = crate::export::file_name("report", &parts, "pdf");
    match crate::report::render_pdf(&data, paper) {
        Ok(bytes) => ([(header::CONTENT_TYPE, "application/pdf".to_string()), (header::CONTENT_DISPOSITION, format!("inline; filename=\"{name}\""))], bytes).into_response(),
        Err(e) => error_page(&st, &headers, StatusCode::INTERNAL_SERVER_ERROR, "The PDF could not be made", e.to_string(), "/"),
    }
}

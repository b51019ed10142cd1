//! The HTML view of the report: an askama page that embeds the charts as
//! SVG and leans on static/report.css to print on exactly one page. On
//! screen it may carry a row of links back to the pages (never printed) and
//! the projector view (the sheet drawn larger, in higher contrast).

use super::{Paper, ReportData, SnapLine, FOOTNOTES};
use askama::Template;

/// The print stylesheet the page links as `/static/report.css`.
pub const REPORT_CSS: &str = include_str!("../../static/report.css");

/// How the page is shown on screen: the projector view, and links (label,
/// address) back to the pages, to the PDF and to the other view.
#[derive(Debug, Clone, Default)]
pub struct ReportScreen {
    pub projector: bool,
    pub links: Vec<(String, String)>,
}

#[derive(Template)]
#[template(path = "report.html")]
struct ReportPage<'a> {
    d: &'a ReportData,
    paper: &'static str,
    screen: &'a ReportScreen,
    metric_svgs: Vec<String>,
    game_svg: String,
    footnotes: &'static [&'static str],
    snap_tables: Vec<(&'static str, &'a [SnapLine])>,
}

/// The report as a self-contained page (no scripts, no inline styles).
pub fn html(data: &ReportData, paper: Paper) -> String {
    html_with(data, paper, &ReportScreen::default())
}

/// The report page with its screen links and view.
pub fn html_with(data: &ReportData, paper: Paper, screen: &ReportScreen) -> String {
    let page = ReportPage {
        d: data,
        paper: paper.key(),
        screen,
        metric_svgs: data.metric_charts.iter().map(|f| f.to_svg()).collect(),
        game_svg: if data.games.is_empty() { String::new() } else { data.game_chart.to_svg() },
        footnotes: &FOOTNOTES,
        snap_tables: vec![("Biggest gains (WPA)", &data.best), ("Biggest losses (WPA)", &data.worst)],
    };
    page.render().unwrap_or_else(|e| format!("<!doctype html><title>Report</title><p>The report page could not be rendered: {}</p>", crate::charts::xml_escape(&e.to_string())))
}

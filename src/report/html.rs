//! The HTML view of the report: an askama page that embeds the charts as
//! SVG and leans on static/report.css to print on exactly one page.

use super::{Paper, ReportData, SnapLine, FOOTNOTES};
use askama::Template;

/// The print stylesheet the page links as `/static/report.css`.
pub const REPORT_CSS: &str = include_str!("../../static/report.css");

#[derive(Template)]
#[template(path = "report.html")]
struct ReportPage<'a> {
    d: &'a ReportData,
    paper: &'static str,
    metric_svgs: Vec<String>,
    game_svg: String,
    footnotes: &'static [&'static str],
    snap_tables: Vec<(&'static str, &'a [SnapLine])>,
}

/// The report as a self-contained page (no scripts, no inline styles).
pub fn html(data: &ReportData, paper: Paper) -> String {
    let page = ReportPage {
        d: data,
        paper: paper.key(),
        metric_svgs: data.metric_charts.iter().map(|f| f.to_svg()).collect(),
        game_svg: if data.games.is_empty() { String::new() } else { data.game_chart.to_svg() },
        footnotes: &FOOTNOTES,
        snap_tables: vec![("Biggest gains (WPA)", &data.best), ("Biggest losses (WPA)", &data.worst)],
    };
    page.render().unwrap_or_else(|e| format!("<!doctype html><title>Report</title><p>The report page could not be rendered: {}</p>", crate::charts::xml_escape(&e.to_string())))
}

//! The one-page situation report: one passer in one situation against the
//! league, built from a single split-engine call (`data.rs`), put in a
//! coach's words (`words.rs`), shown as print-ready HTML (askama, `html.rs`)
//! or as a one-page PDF drawn with krilla (`pdf.rs` on `pen.rs`); a cut-up
//! list as a one-page sheet (`list.rs`).

mod data;
mod date;
mod html;
mod list;
mod pdf;
mod pen;
mod words;

pub use data::{report_situation, GameWpa, KeyMetric, Provenance, ReportData, SnapLine};
pub use date::today;
pub use html::{html, html_with, ReportScreen, REPORT_CSS};
pub use list::{render_list_pdf, ListSheet, ListSheetRow, LIST_COLUMNS};
pub use pdf::render_pdf;
pub use words::{situation_words, verdict};

/// A number at a metric's display precision; "–" when absent (the one
/// formatter in `numfmt`, named here for the report's callers).
pub use crate::numfmt::fmt_metric;

use crate::league::League;
use crate::situation::Situation;

/// Page size; both are printed landscape.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Paper {
    #[default]
    Letter,
    A4,
}

impl Paper {
    /// `letter` or `a4` (case-insensitive; empty means letter).
    pub fn parse(s: &str) -> Option<Paper> {
        match s.trim().to_ascii_lowercase().as_str() {
            "" | "letter" | "us-letter" => Some(Paper::Letter),
            "a4" => Some(Paper::A4),
            _ => None,
        }
    }
    pub fn key(self) -> &'static str {
        match self {
            Paper::Letter => "letter",
            Paper::A4 => "a4",
        }
    }
    /// Landscape width and height in PDF points.
    pub fn size_pt(self) -> (f32, f32) {
        match self {
            Paper::Letter => (792.0, 612.0),
            Paper::A4 => (841.89, 595.28),
        }
    }
}

/// Why a report could not be made, in words a coach can act on.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    #[error("no passer named '{0}' in this league; check the spelling on the splits page")]
    UnknownPasser(String),
    #[error("{passer} has no dropbacks in {situation}; pick another situation or season")]
    NoDropbacks { passer: String, situation: String },
    #[error("could not write the PDF: {0}")]
    Pdf(String),
}

/// The metrics on the page, in order.
pub const KEY_METRICS: [&str; 8] = ["epa", "success", "cpoe", "rating", "anya", "sack_rate", "int_rate", "wpa"];

/// The decision values on the page (per throw with air yards, in WPA).
pub const DECISION_METRICS: [&str; 2] = ["choice", "execution"];

/// The glossary printed at the foot of the page (HTML and PDF), short
/// enough for three lines.
pub const FOOTNOTES: [&str; 3] = [
    "EPA: expected points added on the snap. CPOE: completion % over expected, caught % minus the model's chance of each throw. WPA: win probability added on the snap.",
    "ANY/A: adjusted net yards per attempt, (pass yards - sack yards + 20 per TD - 45 per INT) / (throws + sacks). Pct: percentile among qualified passers, 100 = best.",
    "Estimate: his number pulled toward his own level elsewhere plus the league's shift here, as far as luck could explain it (a two-level model); 90% range: where his true level likely sits; lift: here minus his normal.",
];

/// The one-page PDF for `passer` in `situation` (every season when it
/// names none), at the default qualifying minimum.
pub fn pdf(league: &League, situation: &Situation, passer: &str, paper: Paper) -> Result<Vec<u8>, ReportError> {
    let data = ReportData::build(league, situation, passer, crate::splits::DEFAULT_MIN_DROPBACKS)?;
    render_pdf(&data, paper)
}


#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn paper_names() {
        assert_eq!(Paper::parse("letter"), Some(Paper::Letter));
        assert_eq!(Paper::parse("A4"), Some(Paper::A4));
        assert_eq!(Paper::parse("legal"), None);
        assert_eq!(Paper::default(), Paper::Letter);
    }
}

//! A saved cut-up list as a one-page sheet for the video staff: the snaps in
//! the staff's order with what the operator needs to cue them and the notes,
//! drawn as a one-page PDF.

use super::pen::{one_page, Align, Pen, MARGIN, SNAP_ROW};
use super::{Paper, ReportError};
use crate::palette::{GREY, INK, RULE, STRIPE};
use krilla::metadata::Metadata;

/// The sheet's content, already in words.
#[derive(Debug, Clone)]
pub struct ListSheet {
    pub title: String,
    /// "12 snaps · written 2026-12-02 · file fingerprint ..."
    pub subtitle: String,
    pub rows: Vec<ListSheetRow>,
}

/// One snap of the list and the staff's notes on it.
#[derive(Debug, Clone)]
pub struct ListSheetRow {
    pub snap: crate::splits::Snap,
    pub note: String,
}

/// The column headings of the sheet, in order.
pub const LIST_COLUMNS: [&str; 9] = ["#", "Game", "Qtr", "Clock", "Down", "Spot", "Passer", "Result", "Note"];

/// A cut-up list as one page: as many rows as fit (a note may take up to
/// three lines), then a line that says how many more the CSV holds.
pub fn render_list_pdf(sheet: &ListSheet, paper: Paper) -> Result<Vec<u8>, ReportError> {
    one_page(paper, Metadata::new().title(format!("Cut-up list: {}", sheet.title)), |pen, pw, ph| draw_list(pen, sheet, pw, ph))
}

fn draw_list(pen: &mut Pen, sheet: &ListSheet, pw: f32, ph: f32) {
    let (x, w) = (MARGIN, pw - 2.0 * MARGIN);
    pen.text(x, MARGIN + 12.0, 14.0, true, INK, &sheet.title, w, Align::Left);
    pen.text(x, MARGIN + 27.0, 8.0, false, GREY, &sheet.subtitle, w, Align::Left);
    let fixed = [20.0, 70.0, 26.0, 34.0, 58.0, 30.0, 92.0, 150.0];
    let note_w = (w - fixed.iter().sum::<f32>()).max(80.0);
    let widths = [fixed[0], fixed[1], fixed[2], fixed[3], fixed[4], fixed[5], fixed[6], fixed[7], note_w];
    let aligns = [Align::Right, Align::Left, Align::Left, Align::Left, Align::Left, Align::Right, Align::Left, Align::Left, Align::Left];
    let size = 7.6;
    let mut y = MARGIN + 48.0;
    pen.row(x, y, &widths, &aligns, &LIST_COLUMNS, size, true, GREY);
    pen.line(x, y + 3.0, x + w, y + 3.0, RULE, 0.6);
    let bottom = ph - MARGIN - 14.0;
    let note_x = x + widths[..8].iter().sum::<f32>();
    let mut shown = 0;
    for (k, r) in sheet.rows.iter().enumerate() {
        let lines = pen.regular.wrap(size, &r.note, note_w - 6.0, 3);
        let h = SNAP_ROW * lines.len().max(1) as f32;
        if y + h > bottom {
            break;
        }
        y += SNAP_ROW;
        if k % 2 == 1 {
            pen.rect(x, y - SNAP_ROW + 3.0, w, h, STRIPE);
        }
        let num = (k + 1).to_string();
        let s = &r.snap;
        let game = format!("{} #{}", s.game, s.seq);
        let passer = s.passer.clone().unwrap_or_default();
        let cells = [num.as_str(), &game, &s.quarter, &s.clock, &s.down_distance, &s.spot, &passer, &s.result];
        pen.row(x, y, &widths[..8], &aligns[..8], &cells, size, false, INK);
        for (j, line) in lines.iter().enumerate() {
            pen.text(note_x + 3.0, y + SNAP_ROW * j as f32, size, false, INK, line, note_w - 6.0, Align::Left);
        }
        y += h - SNAP_ROW;
        shown += 1;
    }
    if sheet.rows.is_empty() {
        pen.text(x + 3.0, y + SNAP_ROW, size, false, GREY, "This list has no snaps in the loaded file.", w, Align::Left);
    } else if shown < sheet.rows.len() {
        let more = format!("First {shown} of {} snaps on this page; the list's CSV holds every snap and note.", sheet.rows.len());
        pen.text(x, ph - MARGIN, 8.0, true, INK, &more, w, Align::Left);
    }
}


//! A saved cut-up list as a one-page sheet for the video staff: the snaps in
//! the staff's order with what the operator needs to cue them and the notes.

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

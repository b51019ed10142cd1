//! The PDF view of the report: one landscape page drawn with krilla, text in
//! the embedded DejaVu Sans (extractable), charts drawn as vector paths from
//! the same `Figure` shapes the HTML embeds as SVG (class → colour, stroke).

use super::{ListSheet, Paper, ReportData, ReportError, SnapLine, FOOTNOTES, LIST_COLUMNS};
use crate::charts::{Anchor, Figure, Shape};
use crate::palette::{Rgb, AXIS, ESTIMATE, GAIN, GREY, GRID, INK, LEAGUE, LOSS, RANGE, RULE, STRIPE};
use krilla::color::rgb;
use krilla::geom::{Path, PathBuilder, Point, Rect};
use krilla::metadata::{DateTime, Metadata};
use krilla::num::NormalizedF32;
use krilla::page::PageSettings;
use krilla::paint::{Fill, LineCap, Stroke};
use krilla::surface::Surface;
use krilla::text::{Font, TextDirection};
use krilla::Document;
use skrifa::instance::{LocationRef, Size};
use skrifa::{FontRef, MetadataProvider};

static REGULAR: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");
static BOLD: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans-Bold.ttf");

/// The fill of the hollow raw-value dot.
const WHITE: Rgb = Rgb(0xff, 0xff, 0xff);

/// A font for drawing (krilla) and for measuring (skrifa).
struct Face {
    pdf: Font,
    metrics: FontRef<'static>,
}

impl Face {
    fn load(bytes: &'static [u8], name: &str) -> Result<Face, ReportError> {
        let pdf = Font::new(bytes.into(), 0).ok_or_else(|| ReportError::Pdf(format!("the bundled font {name} could not be read")))?;
        let metrics = FontRef::new(bytes).map_err(|e| ReportError::Pdf(format!("the bundled font {name}: {e}")))?;
        Ok(Face { pdf, metrics })
    }

    /// Advance width of `text` at `size` points (no kerning; shaping only
    /// ever narrows DejaVu text, so this is a safe bound).
    fn width(&self, size: f32, text: &str) -> f32 {
        let cmap = self.metrics.charmap();
        let gm = self.metrics.glyph_metrics(Size::new(size), LocationRef::default());
        text.chars().map(|c| cmap.map(c).and_then(|g| gm.advance_width(g)).unwrap_or(size * 0.6)).sum()
    }

    /// `text` cut to fit `max` points, with an ellipsis when cut.
    fn fit(&self, size: f32, text: &str, max: f32) -> String {
        if self.width(size, text) <= max {
            return text.to_string();
        }
        let mut chars: Vec<char> = text.chars().collect();
        while !chars.is_empty() {
            chars.pop();
            let cut: String = chars.iter().collect::<String>().trim_end().to_string() + "…";
            if self.width(size, &cut) <= max {
                return cut;
            }
        }
        String::new()
    }

    /// Greedy word wrap into at most `lines` lines of `max` points; the last
    /// line is cut with an ellipsis when text remains.
    fn wrap(&self, size: f32, text: &str, max: f32, lines: usize) -> Vec<String> {
        let mut out: Vec<String> = Vec::new();
        let mut cur = String::new();
        let words: Vec<&str> = text.split_whitespace().collect();
        let mut k = 0;
        while k < words.len() {
            let trial = if cur.is_empty() { words[k].to_string() } else { format!("{cur} {}", words[k]) };
            if self.width(size, &trial) <= max || cur.is_empty() {
                cur = trial;
                k += 1;
                continue;
            }
            if out.len() + 1 == lines {
                break;
            }
            out.push(std::mem::take(&mut cur));
        }
        if k < words.len() {
            let rest = format!("{cur} {}", words[k..].join(" "));
            cur = self.fit(size, &rest, max);
        } else {
            cur = self.fit(size, &cur, max);
        }
        if !cur.is_empty() {
            out.push(cur);
        }
        out
    }
}

#[derive(Clone, Copy, PartialEq)]
enum Align {
    Left,
    Right,
}

fn paint(c: Rgb) -> krilla::paint::Paint {
    rgb::Color::new(c.0, c.1, c.2).into()
}

fn fill(c: Rgb) -> Fill {
    Fill { paint: paint(c), opacity: NormalizedF32::ONE, rule: Default::default() }
}

fn stroke(c: Rgb, width: f32, round: bool) -> Stroke {
    Stroke { paint: paint(c), width, line_cap: if round { LineCap::Round } else { LineCap::Butt }, ..Stroke::default() }
}

fn line_path(x1: f32, y1: f32, x2: f32, y2: f32) -> Option<Path> {
    let mut pb = PathBuilder::new();
    pb.move_to(x1, y1);
    pb.line_to(x2, y2);
    pb.finish()
}

fn circle_path(cx: f32, cy: f32, r: f32) -> Option<Path> {
    // Four cubic arcs; 0.5523 is the usual control-point factor.
    let k = 0.552_284_8 * r;
    let mut pb = PathBuilder::new();
    pb.move_to(cx + r, cy);
    pb.cubic_to(cx + r, cy + k, cx + k, cy + r, cx, cy + r);
    pb.cubic_to(cx - k, cy + r, cx - r, cy + k, cx - r, cy);
    pb.cubic_to(cx - r, cy - k, cx - k, cy - r, cx, cy - r);
    pb.cubic_to(cx + k, cy - r, cx + r, cy - k, cx + r, cy);
    pb.close();
    pb.finish()
}

/// How a chart class looks: fill, stroke (colour and width in figure
/// units), round caps. Mirrors `svg.chart .class` in static/report.css.
fn look(class: &str) -> (Option<Rgb>, Option<(Rgb, f32)>, bool) {
    match class {
        "axis" => (None, Some((AXIS, 1.0)), false),
        "grid" => (None, Some((GRID, 1.0)), false),
        "league" => (None, Some((LEAGUE, 2.5)), false),
        "interval" => (None, Some((RANGE, 5.0)), true),
        "estimate" => (Some(ESTIMATE), None, false),
        "raw" => (Some(WHITE), Some((ESTIMATE, 1.5)), false),
        "pos" => (Some(GAIN), None, false),
        "neg" => (Some(LOSS), None, false),
        "passer" => (None, Some((ESTIMATE, 2.0)), false),
        _ => (None, Some((AXIS, 1.0)), false),
    }
}

/// Text classes: size in points (not scaled with the figure) and colour.
fn text_look(class: &str) -> (f32, Rgb) {
    match class {
        "label" => (7.2, INK),
        _ => (6.2, GREY),
    }
}

/// Draws on the page and remembers how far down it has drawn.
struct Pen<'a, 'b> {
    s: &'a mut Surface<'b>,
    regular: &'a Face,
    bold: &'a Face,
    lowest: f32,
}

impl Pen<'_, '_> {
    fn face(&self, bold: bool) -> &Face {
        if bold {
            self.bold
        } else {
            self.regular
        }
    }

    /// Text with its baseline at `y`, cut to `max` points wide; returns the
    /// width drawn.
    #[allow(clippy::too_many_arguments)]
    fn text(&mut self, x: f32, y: f32, size: f32, bold: bool, color: Rgb, text: &str, max: f32, align: Align) -> f32 {
        let face = self.face(bold);
        let t = face.fit(size, text, max);
        if t.is_empty() {
            return 0.0;
        }
        let w = face.width(size, &t);
        let font = face.pdf.clone();
        let x = if align == Align::Right { x - w } else { x };
        self.s.set_stroke(None);
        self.s.set_fill(Some(fill(color)));
        self.s.draw_text(Point::from_xy(x, y), font, size, &t, false, TextDirection::LeftToRight);
        self.lowest = self.lowest.max(y + size * 0.25);
        w
    }

    fn line(&mut self, x1: f32, y1: f32, x2: f32, y2: f32, color: Rgb, width: f32) {
        if let Some(p) = line_path(x1, y1, x2, y2) {
            self.s.set_fill(None);
            self.s.set_stroke(Some(stroke(color, width, false)));
            self.s.draw_path(&p);
            self.lowest = self.lowest.max(y1.max(y2));
        }
    }

    fn rect(&mut self, x: f32, y: f32, w: f32, h: f32, color: Rgb) {
        let Some(r) = Rect::from_xywh(x, y, w.max(0.01), h.max(0.01)) else { return };
        let mut pb = PathBuilder::new();
        pb.push_rect(r);
        if let Some(p) = pb.finish() {
            self.s.set_stroke(None);
            self.s.set_fill(Some(fill(color)));
            self.s.draw_path(&p);
            self.lowest = self.lowest.max(y + h);
        }
    }

    fn styled(&mut self, path: Option<Path>, class: &str, k: f32) {
        let Some(p) = path else { return };
        let (f, st, round) = look(class);
        self.s.set_fill(f.map(fill));
        self.s.set_stroke(st.map(|(c, w)| stroke(c, w * k, round)));
        self.s.draw_path(&p);
    }

    /// Draw `fig` with its top-left at (x0, y0), scaled to `w` points wide;
    /// returns the height used.
    fn figure(&mut self, fig: &Figure, x0: f32, y0: f32, w: f32) -> f32 {
        let k = if fig.width > 0.0 { w / fig.width as f32 } else { 1.0 };
        let at = |x: f64, y: f64| (x0 + k * x as f32, y0 + k * y as f32);
        for shape in &fig.shapes {
            match shape {
                Shape::Line { x1, y1, x2, y2, class } => {
                    let (a, b) = (at(*x1, *y1), at(*x2, *y2));
                    self.styled(line_path(a.0, a.1, b.0, b.1), class, k);
                }
                Shape::Path { points, class } => {
                    let mut pb = PathBuilder::new();
                    for (i, (x, y)) in points.iter().enumerate() {
                        let (px, py) = at(*x, *y);
                        if i == 0 {
                            pb.move_to(px, py);
                        } else {
                            pb.line_to(px, py);
                        }
                    }
                    let (f, st, round) = look(class);
                    let _ = f;
                    if let Some(p) = pb.finish() {
                        self.s.set_fill(None);
                        self.s.set_stroke(st.map(|(c, sw)| stroke(c, sw * k, round)));
                        self.s.draw_path(&p);
                    }
                }
                Shape::Rect { x, y, w: rw, h, class } => {
                    let (px, py) = at(*x, *y);
                    if let Some(r) = Rect::from_xywh(px, py, (k * rw.max(0.0) as f32).max(0.01), (k * h.max(0.0) as f32).max(0.01)) {
                        let mut pb = PathBuilder::new();
                        pb.push_rect(r);
                        self.styled(pb.finish(), class, k);
                    }
                }
                Shape::Circle { cx, cy, r, class, .. } => {
                    let (px, py) = at(*cx, *cy);
                    self.styled(circle_path(px, py, k * *r as f32), class, k);
                }
                Shape::Text { x, y, text, anchor, class } => {
                    let (px, py) = at(*x, *y);
                    let (size, color) = text_look(class);
                    let tw = self.regular.width(size, text);
                    let left = match anchor {
                        Anchor::Start => px,
                        Anchor::Middle => px - tw / 2.0,
                        Anchor::End => px - tw,
                    };
                    // Figure text sits a little above its baseline at small sizes.
                    self.text(left, py - 1.0, size, false, color, text, w.max(tw), Align::Left);
                }
            }
        }
        let h = k * fig.height as f32;
        self.lowest = self.lowest.max(y0 + h);
        h
    }

    /// One table row: `cells` in columns of `widths`, 3 pt inner padding.
    #[allow(clippy::too_many_arguments)]
    fn row(&mut self, x: f32, y: f32, widths: &[f32], aligns: &[Align], cells: &[&str], size: f32, bold: bool, color: Rgb) {
        let mut cx = x;
        for (k, w) in widths.iter().enumerate() {
            let Some(text) = cells.get(k) else { break };
            let align = aligns.get(k).copied().unwrap_or(Align::Left);
            let max = (w - 6.0).max(1.0);
            match align {
                Align::Left => self.text(cx + 3.0, y, size, bold, color, text, max, Align::Left),
                Align::Right => self.text(cx + w - 3.0, y, size, bold, color, text, max, Align::Right),
            };
            cx += w;
        }
    }

    fn heading(&mut self, x: f32, y: f32, text: &str, max: f32) {
        self.text(x, y, 8.6, true, INK, text, max, Align::Left);
    }
}

/// Page furniture measures (points).
const MARGIN: f32 = 28.0;
const GUTTER: f32 = 18.0;
const ROW: f32 = 13.6;
const SNAP_ROW: f32 = 11.6;

/// The report as a one-page PDF.
pub fn render_pdf(d: &ReportData, paper: Paper) -> Result<Vec<u8>, ReportError> {
    let regular = Face::load(REGULAR, "DejaVu Sans")?;
    let bold = Face::load(BOLD, "DejaVu Sans Bold")?;
    let (pw, ph) = paper.size_pt();
    let settings = PageSettings::from_wh(pw, ph).ok_or_else(|| ReportError::Pdf("bad page size".into()))?;
    let mut doc = Document::new();
    let mut meta = Metadata::new()
        .title(format!("Situation report: {} ({}), {}", d.passer, d.team, d.situation))
        .creator("lategame".to_string())
        .language("en".to_string());
    if let Some(dt) = date_time(&d.provenance.date) {
        meta = meta.creation_date(dt);
    }
    doc.set_metadata(meta);
    {
        let mut page = doc.start_page_with(settings);
        let mut surface = page.surface();
        let mut pen = Pen { s: &mut surface, regular: &regular, bold: &bold, lowest: 0.0 };
        draw(&mut pen, d, pw, ph);
        surface.finish();
        page.finish();
    }
    doc.finish().map_err(|e| ReportError::Pdf(e.to_string()))
}

/// A cut-up list as one page: as many rows as fit (a note may take up to
/// three lines), then a line that says how many more the CSV holds.
pub fn render_list_pdf(sheet: &ListSheet, paper: Paper) -> Result<Vec<u8>, ReportError> {
    let regular = Face::load(REGULAR, "DejaVu Sans")?;
    let bold = Face::load(BOLD, "DejaVu Sans Bold")?;
    let (pw, ph) = paper.size_pt();
    let settings = PageSettings::from_wh(pw, ph).ok_or_else(|| ReportError::Pdf("bad page size".into()))?;
    let mut doc = Document::new();
    doc.set_metadata(Metadata::new().title(format!("Cut-up list: {}", sheet.title)).creator("lategame".to_string()).language("en".to_string()));
    {
        let mut page = doc.start_page_with(settings);
        let mut surface = page.surface();
        let mut pen = Pen { s: &mut surface, regular: &regular, bold: &bold, lowest: 0.0 };
        draw_list(&mut pen, sheet, pw, ph);
        surface.finish();
        page.finish();
    }
    doc.finish().map_err(|e| ReportError::Pdf(e.to_string()))
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

fn date_time(date: &str) -> Option<DateTime> {
    let mut it = date.split('-');
    let y: u16 = it.next()?.parse().ok()?;
    let m: u8 = it.next()?.parse().ok()?;
    let dd: u8 = it.next()?.parse().ok()?;
    Some(DateTime::new(y).month(m).day(dd))
}

fn draw(pen: &mut Pen, d: &ReportData, pw: f32, ph: f32) {
    let x0 = MARGIN;
    let w = pw - 2.0 * MARGIN;
    let right = x0 + w;

    // ---- header ----
    let mut y = MARGIN + 8.0;
    pen.text(x0, y, 7.4, true, GREY, "SITUATION REPORT", w / 2.0, Align::Left);
    pen.text(right, y, 7.4, false, GREY, &d.provenance.date, w / 2.0, Align::Right);
    y += 21.0;
    let team_w = pen.bold.width(12.0, &d.team) + 12.0;
    let name_w = pen.text(x0, y, 18.0, true, INK, &d.passer, w - team_w, Align::Left);
    pen.text(x0 + name_w + 8.0, y, 12.0, false, GREY, &d.team, team_w, Align::Left);
    y += 16.0;
    pen.text(x0, y, 10.5, false, INK, &d.situation, w, Align::Left);
    y += 11.0;
    for line in pen.regular.wrap(7.4, &format!("Situation: {}", d.definition), w, 2) {
        pen.text(x0, y, 7.4, false, INK, &line, w, Align::Left);
        y += 9.5;
    }
    for line in pen.bold.wrap(7.8, &d.verdict, w, 2) {
        pen.text(x0, y, 7.8, true, INK, &line, w, Align::Left);
        y += 10.0;
    }
    y += 1.5;
    let meta = format!("{} · {}", d.counts_line(), d.provenance_line());
    pen.text(x0, y, 7.2, false, GREY, &meta, w, Align::Left);
    y += 7.0;
    pen.line(x0, y, right, y, RULE, 0.8);
    let top = y + 14.0;

    // ---- vertical budget ----
    let foot_lines: Vec<String> = FOOTNOTES.iter().flat_map(|note| pen.regular.wrap(6.3, note, w, 3)).collect();
    let foot_h = foot_lines.len() as f32 * 8.0 + 4.0;
    let plays_h = 14.0 + SNAP_ROW * 6.0 + 2.0;
    let body_bottom = ph - MARGIN - foot_h - plays_h - 12.0;
    let lw = (w - GUTTER) * 0.58;
    let rx = x0 + lw + GUTTER;
    let rw = w - lw - GUTTER;

    // ---- left: key numbers ----
    pen.heading(x0, top, "Key numbers", lw);
    let fixed = [24.0, 40.0, 44.0, 78.0, 40.0, 26.0, 34.0];
    let label_w = (lw - fixed.iter().sum::<f32>()).max(60.0);
    let mut widths = vec![label_w];
    widths.extend_from_slice(&fixed);
    let aligns = [Align::Left, Align::Right, Align::Right, Align::Right, Align::Right, Align::Right, Align::Right, Align::Right];
    let mut ty = top + 14.0;
    pen.row(x0, ty, &widths, &aligns, &["Metric", "n", "Ours", "Estimate", "90% range", "League", "Pct", "Signal"], 6.8, true, GREY);
    pen.line(x0, ty + 3.5, x0 + lw, ty + 3.5, RULE, 0.6);
    for (k, m) in d.metrics.iter().enumerate() {
        ty += ROW;
        if k % 2 == 1 {
            pen.rect(x0, ty - ROW + 4.5, lw, ROW, STRIPE);
        }
        pen.row(
            x0,
            ty,
            &widths,
            &aligns,
            &[m.label, &m.n, &m.value, &m.estimate, &m.interval, &m.league, &m.percentile, &m.signal],
            7.6,
            false,
            INK,
        );
    }
    ty += 14.0;
    for line in pen.regular.wrap(7.4, &d.sample_note, lw, 2).into_iter().chain(pen.regular.wrap(7.4, &d.lift_note, lw, 3)) {
        pen.text(x0, ty, 7.4, false, INK, &line, lw, Align::Left);
        ty += 9.5;
    }

    // ---- left: WPA per game ----
    let gy = ty + 10.0;
    pen.heading(x0, gy, "WPA per game in this situation", lw);
    let avail = (body_bottom - (gy + 6.0)).max(40.0);
    let fig = &d.game_chart;
    let gw = lw.min(avail * fig.width as f32 / fig.height.max(1.0) as f32);
    if d.games.is_empty() {
        pen.text(x0, gy + 14.0, 7.4, false, GREY, "No games.", lw, Align::Left);
    } else {
        pen.figure(fig, x0, gy + 6.0, gw);
    }

    // ---- right: ranges ----
    pen.heading(rx, top, "Estimate and 90% range against the league", rw);
    legend(pen, rx, top + 12.0, rw);
    let n = d.metric_charts.len().max(1) as f32;
    let unit_h = d.metric_charts.first().map(|f| f.height as f32 / f.width.max(1.0) as f32).unwrap_or(0.13);
    let avail = body_bottom - (top + 18.0);
    let cw = rw.min(avail / (n * unit_h));
    let mut cy = top + 18.0;
    for fig in &d.metric_charts {
        cy += pen.figure(fig, rx + (rw - cw), cy, cw);
    }

    // ---- bottom: biggest plays ----
    let by = pen.lowest.max(body_bottom) + 12.0;
    let bw = (w - GUTTER) / 2.0;
    snap_table(pen, x0, by, bw, "Biggest gains (WPA)", &d.best);
    snap_table(pen, x0 + bw + GUTTER, by, bw, "Biggest losses (WPA)", &d.worst);

    // ---- footer ----
    let fy = ph - MARGIN - foot_h + 8.0;
    pen.line(x0, fy - 9.0, right, fy - 9.0, RULE, 0.6);
    for (k, line) in foot_lines.iter().enumerate() {
        pen.text(x0, fy + 8.0 * k as f32, 6.3, false, GREY, line, w, Align::Left);
    }
}

fn legend(pen: &mut Pen, x: f32, y: f32, w: f32) {
    let mut cx = x;
    let size = 6.6;
    let items: [(&str, &str); 4] = [("estimate", "estimate"), ("interval", "90% range"), ("raw", "raw (ours)"), ("league", "league")];
    for (class, text) in items {
        match class {
            "estimate" => pen.styled(circle_path(cx + 3.0, y - 2.3, 2.8), "estimate", 1.0),
            "raw" => pen.styled(circle_path(cx + 3.0, y - 2.3, 2.0), "raw", 0.7),
            "interval" => pen.styled(line_path(cx, y - 2.3, cx + 10.0, y - 2.3), "interval", 0.6),
            _ => pen.styled(line_path(cx + 3.0, y - 7.0, cx + 3.0, y + 2.0), "league", 0.7),
        }
        let off = if class == "interval" { 13.0 } else { 8.5 };
        let tw = pen.text(cx + off, y, size, false, GREY, text, w, Align::Left);
        cx += off + tw + 12.0;
    }
}

fn snap_table(pen: &mut Pen, x: f32, y: f32, w: f32, title: &str, snaps: &[SnapLine]) {
    pen.heading(x, y, title, w);
    // Each short column as wide as its longest cell ("OT 10:00" too), the
    // result column takes the rest.
    let fit = |head: &str, cell: &dyn Fn(&SnapLine) -> &str, least: f32| -> f32 {
        let widest = snaps.iter().map(|s| pen.regular.width(7.0, cell(s))).fold(pen.bold.width(6.6, head), f32::max);
        (widest + 6.0).max(least)
    };
    let fixed = [
        fit("Game", &|s| &s.game, 40.0),
        fit("Clock", &|s| &s.when, 30.0),
        fit("Score", &|s| &s.score, 28.0),
        fit("Down", &|s| &s.down_distance, 40.0),
        fit("Spot", &|s| &s.spot, 22.0),
        fit("WPA", &|s| &s.wpa, 30.0),
    ];
    let result_w = (w - fixed.iter().sum::<f32>()).max(40.0);
    let widths = [fixed[0], fixed[1], fixed[2], fixed[3], fixed[4], result_w, fixed[5]];
    let aligns = [Align::Left, Align::Left, Align::Left, Align::Left, Align::Right, Align::Left, Align::Right];
    let mut ty = y + 13.0;
    pen.row(x, ty, &widths, &aligns, &["Game", "Clock", "Score", "Down", "Spot", "Result", "WPA"], 6.6, true, GREY);
    pen.line(x, ty + 3.0, x + w, ty + 3.0, RULE, 0.6);
    if snaps.is_empty() {
        pen.text(x + 3.0, ty + SNAP_ROW, 7.0, false, GREY, "None in this situation.", w, Align::Left);
        return;
    }
    for s in snaps {
        ty += SNAP_ROW;
        pen.row(x, ty, &widths, &aligns, &[&s.game, &s.when, &s.score, &s.down_distance, &s.spot, "", &s.wpa], 7.0, false, INK);
        // A long result is set smaller (down to 5.6 pt) rather than cut.
        let room = (result_w - 6.0).max(1.0);
        let size = (7.0 * room / pen.regular.width(7.0, &s.result).max(1.0)).clamp(5.6, 7.0);
        pen.text(x + widths[..5].iter().sum::<f32>() + 3.0, ty, size, false, INK, &s.result, room, Align::Left);
    }
}

//! Drawing a one-page PDF with krilla: the embedded DejaVu faces (drawn by
//! krilla, measured with skrifa, so text is fitted and wrapped, never run
//! over), colours from the palette, and `Pen`, which draws text, rules,
//! table rows and chart `Figure`s and remembers how far down it has drawn.

use super::{Paper, ReportError};
use crate::charts::{Anchor, Figure, Shape};
use crate::palette::{Rgb, AXIS, ESTIMATE, GAIN, GREY, GRID, INK, LEAGUE, LOSS, RANGE};
use krilla::color::rgb;
use krilla::geom::{Path, PathBuilder, Point, Rect};
use krilla::metadata::Metadata;
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
pub(super) struct Face {
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
    pub(super) fn width(&self, size: f32, text: &str) -> f32 {
        let cmap = self.metrics.charmap();
        let gm = self.metrics.glyph_metrics(Size::new(size), LocationRef::default());
        text.chars().map(|c| cmap.map(c).and_then(|g| gm.advance_width(g)).unwrap_or(size * 0.6)).sum()
    }

    /// `text` cut to fit `max` points, with an ellipsis when cut.
    pub(super) fn fit(&self, size: f32, text: &str, max: f32) -> String {
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
    pub(super) fn wrap(&self, size: f32, text: &str, max: f32, lines: usize) -> Vec<String> {
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
pub(super) enum Align {
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

pub(super) fn line_path(x1: f32, y1: f32, x2: f32, y2: f32) -> Option<Path> {
    let mut pb = PathBuilder::new();
    pb.move_to(x1, y1);
    pb.line_to(x2, y2);
    pb.finish()
}

pub(super) fn circle_path(cx: f32, cy: f32, r: f32) -> Option<Path> {
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
pub(super) struct Pen<'a, 'b> {
    s: &'a mut Surface<'b>,
    pub(super) regular: &'a Face,
    pub(super) bold: &'a Face,
    pub(super) lowest: f32,
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
    pub(super) fn text(&mut self, x: f32, y: f32, size: f32, bold: bool, color: Rgb, text: &str, max: f32, align: Align) -> f32 {
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

    pub(super) fn line(&mut self, x1: f32, y1: f32, x2: f32, y2: f32, color: Rgb, width: f32) {
        if let Some(p) = line_path(x1, y1, x2, y2) {
            self.s.set_fill(None);
            self.s.set_stroke(Some(stroke(color, width, false)));
            self.s.draw_path(&p);
            self.lowest = self.lowest.max(y1.max(y2));
        }
    }

    pub(super) fn rect(&mut self, x: f32, y: f32, w: f32, h: f32, color: Rgb) {
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

    pub(super) fn styled(&mut self, path: Option<Path>, class: &str, k: f32) {
        let Some(p) = path else { return };
        let (f, st, round) = look(class);
        self.s.set_fill(f.map(fill));
        self.s.set_stroke(st.map(|(c, w)| stroke(c, w * k, round)));
        self.s.draw_path(&p);
    }

    /// Draw `fig` with its top-left at (x0, y0), scaled to `w` points wide;
    /// returns the height used.
    pub(super) fn figure(&mut self, fig: &Figure, x0: f32, y0: f32, w: f32) -> f32 {
        let k = if fig.width > 0.0 { w / fig.width as f32 } else { 1.0 };
        let at = |x: f64, y: f64| (x0 + k * x as f32, y0 + k * y as f32);
        // Text sizes are fixed in points while the figure scales: a label that
        // would run into the one before it on the same line is left out.
        let mut last_text: Option<(f32, f32)> = None;
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
                    if last_text.is_some_and(|(ly, right)| (ly - py).abs() < 0.5 && left < right + 2.0) {
                        continue;
                    }
                    last_text = Some((py, left + tw));
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
    pub(super) fn row(&mut self, x: f32, y: f32, widths: &[f32], aligns: &[Align], cells: &[&str], size: f32, bold: bool, color: Rgb) {
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

    pub(super) fn heading(&mut self, x: f32, y: f32, text: &str, max: f32) {
        self.text(x, y, 8.6, true, INK, text, max, Align::Left);
    }
}

/// Page furniture measures (points).
pub(super) const MARGIN: f32 = 28.0;
pub(super) const GUTTER: f32 = 18.0;
pub(super) const ROW: f32 = 13.6;
pub(super) const SNAP_ROW: f32 = 11.6;


/// One page of `paper` drawn by `draw`, with the document's metadata.
pub(super) fn one_page(paper: Paper, meta: Metadata, draw: impl FnOnce(&mut Pen, f32, f32)) -> Result<Vec<u8>, ReportError> {
    let regular = Face::load(REGULAR, "DejaVu Sans")?;
    let bold = Face::load(BOLD, "DejaVu Sans Bold")?;
    let (pw, ph) = paper.size_pt();
    let settings = PageSettings::from_wh(pw, ph).ok_or_else(|| ReportError::Pdf("bad page size".into()))?;
    let mut doc = Document::new();
    doc.set_metadata(meta.creator("lategame".to_string()).language("en".to_string()));
    {
        let mut page = doc.start_page_with(settings);
        let mut surface = page.surface();
        let mut pen = Pen { s: &mut surface, regular: &regular, bold: &bold, lowest: 0.0 };
        draw(&mut pen, pw, ph);
        surface.finish();
        page.finish();
    }
    doc.finish().map_err(|e| ReportError::Pdf(e.to_string()))
}

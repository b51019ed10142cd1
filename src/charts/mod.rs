//! Chart geometry shared by the pages and the PDF report: linear scales with
//! nice ticks, and small figures built as plain shapes with CSS class names,
//! rendered to SVG here (the report draws the same shapes into its PDF).

mod figures;
mod scale;

pub use figures::{bars, depth_rows, dot_interval, histogram, lines, reliability, BarItem, DepthRow, DotRow, Marker, Series};
pub use scale::{nice_ticks, Scale};

/// Horizontal text anchor.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Anchor {
    Start,
    Middle,
    End,
}

/// One drawing primitive, in figure pixels (y grows downwards). `class`
/// names the role (axis, grid, league, passer, ...); CSS gives the look.
#[derive(Debug, Clone, PartialEq)]
pub enum Shape {
    Line { x1: f64, y1: f64, x2: f64, y2: f64, class: &'static str },
    Path { points: Vec<(f64, f64)>, class: &'static str },
    Rect { x: f64, y: f64, w: f64, h: f64, class: &'static str },
    Circle { cx: f64, cy: f64, r: f64, class: &'static str, title: Option<String> },
    Text { x: f64, y: f64, text: String, anchor: Anchor, class: &'static str },
}

/// A finished chart: size, a title and a text description for screen
/// readers and the print-out, and its shapes.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    pub width: f64,
    pub height: f64,
    pub title: String,
    pub desc: String,
    pub shapes: Vec<Shape>,
}

/// Escape text for XML (SVG) content and attributes.
pub fn xml_escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

fn f(v: f64) -> String {
    if v.is_finite() {
        format!("{:.1}", v)
    } else {
        "0".to_string()
    }
}

impl Figure {
    /// Inline SVG markup. All text is escaped; there are no scripts or
    /// inline styles (the page's stylesheet themes it through the classes).
    pub fn to_svg(&self) -> String {
        use std::fmt::Write;
        let mut s = String::new();
        let id = format!("fig{:x}", fxhash(&self.title));
        let _ = write!(
            s,
            r#"<svg class="chart" viewBox="0 0 {w} {h}" width="{w}" height="{h}" role="img" aria-labelledby="{id}-t {id}-d" xmlns="http://www.w3.org/2000/svg"><title id="{id}-t">{t}</title><desc id="{id}-d">{d}</desc>"#,
            w = f(self.width),
            h = f(self.height),
            t = xml_escape(&self.title),
            d = xml_escape(&self.desc),
        );
        for shape in &self.shapes {
            match shape {
                Shape::Line { x1, y1, x2, y2, class } => {
                    let _ = write!(s, r#"<line class="{class}" x1="{}" y1="{}" x2="{}" y2="{}"/>"#, f(*x1), f(*y1), f(*x2), f(*y2));
                }
                Shape::Path { points, class } => {
                    let pts: Vec<String> = points.iter().map(|(x, y)| format!("{},{}", f(*x), f(*y))).collect();
                    let _ = write!(s, r#"<polyline class="{class}" points="{}"/>"#, pts.join(" "));
                }
                Shape::Rect { x, y, w, h, class } => {
                    let _ = write!(s, r#"<rect class="{class}" x="{}" y="{}" width="{}" height="{}"/>"#, f(*x), f(*y), f(w.max(0.0)), f(h.max(0.0)));
                }
                Shape::Circle { cx, cy, r, class, title } => match title {
                    Some(t) => {
                        let _ = write!(s, r#"<circle class="{class}" cx="{}" cy="{}" r="{}"><title>{}</title></circle>"#, f(*cx), f(*cy), f(*r), xml_escape(t));
                    }
                    None => {
                        let _ = write!(s, r#"<circle class="{class}" cx="{}" cy="{}" r="{}"/>"#, f(*cx), f(*cy), f(*r));
                    }
                },
                Shape::Text { x, y, text, anchor, class } => {
                    let a = match anchor {
                        Anchor::Start => "start",
                        Anchor::Middle => "middle",
                        Anchor::End => "end",
                    };
                    let _ = write!(s, r#"<text class="{class}" x="{}" y="{}" text-anchor="{a}">{}</text>"#, f(*x), f(*y), xml_escape(text));
                }
            }
        }
        s.push_str("</svg>");
        s
    }
}

fn fxhash(s: &str) -> u64 {
    s.bytes().fold(0xcbf29ce484222325u64, |h, b| (h ^ b as u64).wrapping_mul(0x100000001b3))
}

//! The small figures: dot-and-interval rows against a league line, line
//! series (win probability, trends), paired histograms, bars, and the
//! reliability diagram. Each returns a `Figure` of shapes.

use super::{Anchor, Figure, Scale, Shape};

/// One row of a dot-and-interval chart.
#[derive(Debug, Clone)]
pub struct DotRow {
    pub label: String,
    pub estimate: Option<f64>,
    pub lo: Option<f64>,
    pub hi: Option<f64>,
    /// The raw value (small open mark), when shown.
    pub raw: Option<f64>,
    /// The league baseline for this row (a short vertical tick).
    pub league: Option<f64>,
}

fn fmt_tick(v: f64) -> String {
    if v == 0.0 {
        return "0".to_string();
    }
    let a = v.abs();
    if a >= 100.0 || v.fract() == 0.0 {
        format!("{v:.0}")
    } else if a >= 1.0 {
        format!("{v:.1}")
    } else if a >= 0.1 {
        format!("{v:.2}")
    } else {
        format!("{v:.3}")
    }
}

/// The decimals an axis's labels all share: the fewest (up to 3) that
/// write every tick exactly, so 0, 0.2, ... 1 read "0.0", "0.2", ... "1.0"
/// rather than "0", "0.20", "1".
fn tick_decimals(ticks: &[f64]) -> usize {
    (0..3)
        .find(|&d| {
            let k = 10f64.powi(d as i32);
            ticks.iter().all(|t| ((t * k).round() - t * k).abs() < 1e-6)
        })
        .unwrap_or(3)
}

fn x_axis(shapes: &mut Vec<Shape>, sx: &Scale, y: f64, top: f64, ticks: &[f64]) {
    shapes.push(Shape::Line { x1: sx.r0, y1: y, x2: sx.r1, y2: y, class: "axis" });
    let d = tick_decimals(ticks);
    for &t in ticks {
        let x = sx.at(t);
        shapes.push(Shape::Line { x1: x, y1: top, x2: x, y2: y, class: "grid" });
        // `+ 0.0` writes a negative zero as "0".
        let text = format!("{:.d$}", t + 0.0);
        shapes.push(Shape::Text { x, y: y + 16.0, text, anchor: Anchor::Middle, class: "tick" });
    }
}

fn y_axis(shapes: &mut Vec<Shape>, sy: &Scale, x: f64, right: f64, ticks: &[f64], fmt: &dyn Fn(f64) -> String) {
    shapes.push(Shape::Line { x1: x, y1: sy.r0, x2: x, y2: sy.r1, class: "axis" });
    for &t in ticks {
        let y = sy.at(t);
        shapes.push(Shape::Line { x1: x, y1: y, x2: right, y2: y, class: "grid" });
        shapes.push(Shape::Text { x: x - 6.0, y: y + 5.0, text: fmt(t), anchor: Anchor::End, class: "tick" });
    }
}

/// Rows of estimate with 90% interval, league tick per row.
pub fn dot_interval(title: &str, rows: &[DotRow], width: f64) -> Figure {
    let label_w = (width * 0.42).min(230.0);
    let row_h = 26.0;
    let top = 8.0;
    let height = top + row_h * rows.len().max(1) as f64 + 30.0;
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for r in rows {
        for v in [r.estimate, r.lo, r.hi, r.raw, r.league].into_iter().flatten() {
            lo = lo.min(v);
            hi = hi.max(v);
        }
    }
    if !lo.is_finite() {
        lo = 0.0;
        hi = 1.0;
    }
    let pad = (hi - lo).abs().max(1e-9) * 0.08;
    let sx = Scale::new((lo - pad, hi + pad), (label_w, width - 12.0)).nice(5);
    let axis_y = top + row_h * rows.len().max(1) as f64;
    let mut shapes = Vec::new();
    x_axis(&mut shapes, &sx, axis_y, top, &sx.ticks(5));
    let mut desc = Vec::new();
    for (k, r) in rows.iter().enumerate() {
        let y = top + row_h * (k as f64 + 0.5);
        shapes.push(Shape::Text { x: label_w - 8.0, y: y + 5.0, text: r.label.clone(), anchor: Anchor::End, class: "label" });
        if let Some(l) = r.league {
            let x = sx.at(l);
            shapes.push(Shape::Line { x1: x, y1: y - 10.0, x2: x, y2: y + 10.0, class: "league" });
        }
        if let (Some(a), Some(b)) = (r.lo, r.hi) {
            shapes.push(Shape::Line { x1: sx.at(a), y1: y, x2: sx.at(b), y2: y, class: "interval" });
        }
        if let Some(v) = r.raw {
            shapes.push(Shape::Circle { cx: sx.at(v), cy: y, r: 3.5, class: "raw", title: Some(format!("raw {}", fmt_tick(v))) });
        }
        if let Some(e) = r.estimate {
            shapes.push(Shape::Circle { cx: sx.at(e), cy: y, r: 5.5, class: "estimate", title: Some(format!("estimate {}", fmt_tick(e))) });
        }
        desc.push(format!(
            "{}: estimate {}, 90% interval {} to {}, league {}",
            r.label,
            r.estimate.map(fmt_tick).unwrap_or_else(|| "n/a".into()),
            r.lo.map(fmt_tick).unwrap_or_else(|| "n/a".into()),
            r.hi.map(fmt_tick).unwrap_or_else(|| "n/a".into()),
            r.league.map(fmt_tick).unwrap_or_else(|| "n/a".into()),
        ));
    }
    Figure { width, height, title: title.to_string(), desc: desc.join("; "), shapes }
}

/// One row of a depth chart: yards needed (a bar from 0), his depth (a
/// dot) and the league's depth in the same spots (a tick).
#[derive(Debug, Clone)]
pub struct DepthRow {
    pub label: String,
    pub needed: Option<f64>,
    pub his: Option<f64>,
    pub league: Option<f64>,
}

/// Rows of yards needed against depth chosen and the league's depth, on one
/// yard scale that starts at 0 (or at the shallowest value below it).
pub fn depth_rows(title: &str, rows: &[DepthRow], width: f64) -> Figure {
    let label_w = (width * 0.30).min(170.0);
    let row_h = 26.0;
    let top = 8.0;
    let height = top + row_h * rows.len().max(1) as f64 + 30.0;
    let values = || rows.iter().flat_map(|r| [r.needed, r.his, r.league]).flatten();
    let lo = values().fold(0.0f64, f64::min);
    let hi = values().fold(1.0f64, f64::max);
    let sx = Scale::new((lo, hi * 1.05), (label_w, width - 12.0)).nice(5);
    let axis_y = top + row_h * rows.len().max(1) as f64;
    let mut shapes = Vec::new();
    x_axis(&mut shapes, &sx, axis_y, top, &sx.ticks(5));
    let mut desc = Vec::new();
    let yards = |v: Option<f64>| v.map(|x| format!("{x:.1}")).unwrap_or_else(|| "n/a".into());
    for (k, r) in rows.iter().enumerate() {
        let y = top + row_h * (k as f64 + 0.5);
        shapes.push(Shape::Text { x: label_w - 8.0, y: y + 5.0, text: r.label.clone(), anchor: Anchor::End, class: "label" });
        if let Some(n) = r.needed {
            let (a, b) = (sx.at(0.0), sx.at(n));
            shapes.push(Shape::Rect { x: a.min(b), y: y - 6.0, w: (b - a).abs(), h: 12.0, class: "need" });
        }
        if let Some(l) = r.league {
            let x = sx.at(l);
            shapes.push(Shape::Line { x1: x, y1: y - 10.0, x2: x, y2: y + 10.0, class: "league" });
        }
        if let Some(h) = r.his {
            shapes.push(Shape::Circle { cx: sx.at(h), cy: y, r: 5.5, class: "estimate", title: Some(format!("his depth {h:.1} yards")) });
        }
        desc.push(format!("{}: yards needed {}, his depth {}, league's depth {}", r.label, yards(r.needed), yards(r.his), yards(r.league)));
    }
    Figure { width, height, title: title.to_string(), desc: desc.join("; "), shapes }
}

/// A line series for `lines`.
#[derive(Debug, Clone)]
pub struct Series {
    pub name: String,
    pub class: &'static str,
    pub points: Vec<(f64, f64)>,
}

/// A marked point on a line chart (e.g. a high-leverage snap).
#[derive(Debug, Clone)]
pub struct Marker {
    pub x: f64,
    pub y: f64,
    pub class: &'static str,
    pub title: String,
}

/// Line chart. `y_range` fixes the vertical domain (e.g. 0..1 for win
/// probability); `x_labels` replaces numeric x ticks by (position, text).
pub fn lines(
    title: &str,
    series: &[Series],
    markers: &[Marker],
    width: f64,
    height: f64,
    y_range: Option<(f64, f64)>,
    x_labels: Option<&[(f64, String)]>,
    y_fmt: &dyn Fn(f64) -> String,
) -> Figure {
    let (left, right, top, bottom) = (52.0, width - 12.0, 10.0, height - 28.0);
    let xs = series.iter().flat_map(|s| s.points.iter().map(|p| p.0));
    let (mut x0, mut x1) = (f64::INFINITY, f64::NEG_INFINITY);
    for x in xs {
        x0 = x0.min(x);
        x1 = x1.max(x);
    }
    let (y0, y1) = match y_range {
        Some(r) => r,
        None => {
            let mut lo = f64::INFINITY;
            let mut hi = f64::NEG_INFINITY;
            for s in series {
                for p in &s.points {
                    lo = lo.min(p.1);
                    hi = hi.max(p.1);
                }
            }
            if !lo.is_finite() {
                (0.0, 1.0)
            } else {
                let pad = (hi - lo).abs().max(1e-9) * 0.1;
                (lo - pad, hi + pad)
            }
        }
    };
    let sx = Scale::new((x0, x1), (left, right));
    let mut sy = Scale::new((y0, y1), (bottom, top));
    if y_range.is_none() {
        sy = sy.nice(5);
    }
    let mut shapes = Vec::new();
    y_axis(&mut shapes, &sy, left, right, &sy.ticks(5), y_fmt);
    shapes.push(Shape::Line { x1: left, y1: bottom, x2: right, y2: bottom, class: "axis" });
    match x_labels {
        Some(labels) => {
            for (x, t) in labels {
                let px = sx.at(*x);
                shapes.push(Shape::Line { x1: px, y1: top, x2: px, y2: bottom, class: "grid" });
                shapes.push(Shape::Text { x: px, y: bottom + 18.0, text: t.clone(), anchor: Anchor::Middle, class: "tick" });
            }
        }
        None => {
            for t in sx.ticks(6) {
                if t < sx.d0 || t > sx.d1 {
                    continue;
                }
                let px = sx.at(t);
                shapes.push(Shape::Text { x: px, y: bottom + 18.0, text: fmt_tick(t), anchor: Anchor::Middle, class: "tick" });
            }
        }
    }
    let mut desc = Vec::new();
    for s in series {
        let pts: Vec<(f64, f64)> = s.points.iter().map(|(x, y)| (sx.at(*x), sy.at(*y))).collect();
        shapes.push(Shape::Path { points: pts, class: s.class });
        if let (Some(a), Some(b)) = (s.points.first(), s.points.last()) {
            desc.push(format!("{}: {} points from {} to {}", s.name, s.points.len(), y_fmt(a.1), y_fmt(b.1)));
        }
    }
    for m in markers {
        shapes.push(Shape::Circle { cx: sx.at(m.x), cy: sy.at(m.y), r: 5.0, class: m.class, title: Some(m.title.clone()) });
    }
    if !markers.is_empty() {
        desc.push(format!("{} marked snaps", markers.len()));
    }
    Figure { width, height, title: title.to_string(), desc: desc.join("; "), shapes }
}

/// Two distributions over the same bins (shares), drawn as side-by-side bars.
pub fn histogram(title: &str, edges: &[f64], a: (&str, &[f64]), b: (&str, &[f64]), width: f64, height: f64) -> Figure {
    let (left, right, top, bottom) = (48.0, width - 12.0, 10.0, height - 28.0);
    let bins = edges.len().saturating_sub(1);
    let maxv = a.1.iter().chain(b.1.iter()).copied().fold(0.0f64, f64::max).max(1e-9);
    let sx = Scale::new((edges.first().copied().unwrap_or(0.0), edges.last().copied().unwrap_or(1.0)), (left, right));
    let sy = Scale::new((0.0, maxv), (bottom, top)).nice(4);
    let mut shapes = Vec::new();
    y_axis(&mut shapes, &sy, left, right, &sy.ticks(4), &|v| format!("{:.0}%", v * 100.0));
    x_axis(&mut shapes, &sx, bottom, bottom, &sx.ticks(8));
    for k in 0..bins {
        let (x0, x1) = (sx.at(edges[k]), sx.at(edges[k + 1]));
        let w = (x1 - x0) / 2.0 - 1.0;
        for (off, vals, class) in [(0.0, a.1, "league"), (w + 1.0, b.1, "passer")] {
            let v = vals.get(k).copied().unwrap_or(0.0);
            let y = sy.at(v);
            shapes.push(Shape::Rect { x: x0 + off + 0.5, y, w, h: bottom - y, class });
        }
    }
    let desc = format!("{} (left bars) and {} (right bars), share of dropbacks per EPA bin from {} to {}", a.0, b.0, fmt_tick(sx.d0), fmt_tick(sx.d1));
    Figure { width, height, title: title.to_string(), desc, shapes }
}

/// One bar for `bars`.
#[derive(Debug, Clone)]
pub struct BarItem {
    pub label: String,
    pub value: f64,
}

/// Vertical bars around zero (e.g. WPA per game), positive and negative
/// classes.
pub fn bars(title: &str, items: &[BarItem], width: f64, height: f64, y_fmt: &dyn Fn(f64) -> String) -> Figure {
    let (left, right, top, bottom) = (52.0, width - 8.0, 10.0, height - 30.0);
    let lo = items.iter().map(|b| b.value).fold(0.0f64, f64::min);
    let hi = items.iter().map(|b| b.value).fold(0.0f64, f64::max);
    let sy = Scale::new((lo, if hi == lo { lo + 0.1 } else { hi }), (bottom, top)).nice(4);
    let mut shapes = Vec::new();
    y_axis(&mut shapes, &sy, left, right, &sy.ticks(4), y_fmt);
    let n = items.len().max(1) as f64;
    let bw = (right - left) / n;
    let zero = sy.at(0.0);
    shapes.push(Shape::Line { x1: left, y1: zero, x2: right, y2: zero, class: "axis" });
    let step = (items.len() / 10).max(1);
    for (k, b) in items.iter().enumerate() {
        let x = left + bw * k as f64;
        let y = sy.at(b.value);
        let (y0, h) = if b.value >= 0.0 { (y, zero - y) } else { (zero, y - zero) };
        shapes.push(Shape::Rect { x: x + bw * 0.15, y: y0, w: bw * 0.7, h, class: if b.value >= 0.0 { "pos" } else { "neg" } });
        if k % step == 0 {
            shapes.push(Shape::Text { x: x + bw / 2.0, y: bottom + 18.0, text: b.label.clone(), anchor: Anchor::Middle, class: "tick" });
        }
    }
    let pos = items.iter().filter(|b| b.value > 0.0).count();
    let desc = format!("{} bars, {} positive and {} negative; total {}", items.len(), pos, items.len() - pos, y_fmt(items.iter().map(|b| b.value).sum()));
    Figure { width, height, title: title.to_string(), desc, shapes }
}

/// Reliability diagram: predicted (x) vs observed (y) share per bin, with
/// the diagonal; point size grows with the bin's count.
pub fn reliability(title: &str, bins: &[(f64, f64, usize)], width: f64, height: f64) -> Figure {
    let (left, right, top, bottom) = (52.0, width - 12.0, 10.0, height - 30.0);
    let sx = Scale::new((0.0, 1.0), (left, right));
    let sy = Scale::new((0.0, 1.0), (bottom, top));
    let mut shapes = Vec::new();
    let ticks = [0.0, 0.2, 0.4, 0.6, 0.8, 1.0];
    y_axis(&mut shapes, &sy, left, right, &ticks, &|v| format!("{v:.1}"));
    x_axis(&mut shapes, &sx, bottom, top, &ticks);
    shapes.push(Shape::Line { x1: sx.at(0.0), y1: sy.at(0.0), x2: sx.at(1.0), y2: sy.at(1.0), class: "league" });
    let maxn = bins.iter().map(|b| b.2).max().unwrap_or(1).max(1) as f64;
    let mut pts = Vec::new();
    for &(p, o, n) in bins {
        let r = 3.0 + 5.0 * (n as f64 / maxn).sqrt();
        pts.push((sx.at(p), sy.at(o)));
        shapes.push(Shape::Circle { cx: sx.at(p), cy: sy.at(o), r, class: "estimate", title: Some(format!("predicted {p:.3}, observed {o:.3}, n = {n}")) });
    }
    shapes.push(Shape::Path { points: pts, class: "passer" });
    let desc = bins.iter().map(|(p, o, n)| format!("predicted {p:.2} observed {o:.2} (n {n})")).collect::<Vec<_>>().join("; ");
    Figure { width, height, title: title.to_string(), desc, shapes }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn markup_in_labels_is_escaped() {
        let rows = vec![DotRow { label: "<script>alert(1)</script>".into(), estimate: Some(1.0), lo: Some(0.5), hi: Some(1.5), raw: None, league: Some(0.8) }];
        let svg = dot_interval("t & <b>", &rows, 400.0).to_svg();
        assert!(!svg.contains("<script>"));
        assert!(svg.contains("&lt;script&gt;"));
        assert!(svg.contains("<title id="));
        assert!(svg.contains("t &amp; &lt;b&gt;"));
    }

    #[test]
    fn depth_rows_put_marks_at_their_yards() {
        let rows = vec![
            DepthRow { label: "3-6".into(), needed: Some(4.0), his: Some(6.0), league: Some(7.5) },
            DepthRow { label: "11+".into(), needed: Some(14.0), his: None, league: Some(12.0) },
        ];
        let fig = depth_rows("depth", &rows, 400.0);
        let bars: Vec<(f64, f64)> = fig.shapes.iter().filter_map(|s| if let Shape::Rect { x, w, .. } = s { Some((*x, *w)) } else { None }).collect();
        assert_eq!(bars.len(), 2);
        // Both bars start at 0 yards, and the longer need draws the longer bar (14/4 as long).
        assert!((bars[0].0 - bars[1].0).abs() < 1e-9);
        assert!((bars[1].1 / bars[0].1 - 3.5).abs() < 1e-9);
        let dots = fig.shapes.iter().filter(|s| matches!(s, Shape::Circle { .. })).count();
        assert_eq!(dots, 1, "no dot where he has no throws");
        assert!(fig.desc.contains("11+: yards needed 14.0, his depth n/a, league's depth 12.0"), "{}", fig.desc);
    }

    #[test]
    fn an_axis_writes_its_ticks_with_one_number_of_decimals() {
        assert_eq!(tick_decimals(&[0.0, 0.2, 0.4, 0.6, 0.8, 1.0]), 1);
        assert_eq!(tick_decimals(&[-10.0, 0.0, 10.0, 20.0]), 0);
        assert_eq!(tick_decimals(&[0.0, 0.25, 0.5]), 2);
        let fig = reliability("wp", &[(0.3, 0.35, 10)], 400.0, 300.0);
        let labels: Vec<&str> = fig.shapes.iter().filter_map(|s| if let Shape::Text { text, anchor: Anchor::Middle, .. } = s { Some(text.as_str()) } else { None }).collect();
        assert_eq!(labels, ["0.0", "0.2", "0.4", "0.6", "0.8", "1.0"]);
    }

    #[test]
    fn points_land_inside_the_plot() {
        let s = Series { name: "wp".into(), class: "passer", points: vec![(0.0, 0.5), (3600.0, 1.0)] };
        let fig = lines("wp", &[s], &[], 600.0, 200.0, Some((0.0, 1.0)), None, &|v| format!("{v}"));
        for sh in &fig.shapes {
            if let Shape::Path { points, .. } = sh {
                for (x, y) in points {
                    assert!(*x >= 0.0 && *x <= 600.0 && *y >= 0.0 && *y <= 200.0);
                }
            }
        }
    }
}

//! The PDF view of the report: one landscape page laid out on `Pen`, text
//! in the embedded DejaVu Sans (extractable), charts drawn as vector paths
//! from the same `Figure` shapes the HTML embeds as SVG.

use super::pen::{circle_path, line_path, one_page, Align, Pen, GUTTER, MARGIN, ROW, SNAP_ROW};
use super::{Paper, ReportData, ReportError, SnapLine, FOOTNOTES};
use crate::palette::{GREY, INK, RULE, STRIPE};
use krilla::metadata::{DateTime, Metadata};

/// The report as a one-page PDF.
pub fn render_pdf(d: &ReportData, paper: Paper) -> Result<Vec<u8>, ReportError> {
    let mut meta = Metadata::new().title(format!("Situation report: {} ({}), {}", d.passer, d.team, d.situation));
    if let Some(dt) = date_time(&d.provenance.date) {
        meta = meta.creation_date(dt);
    }
    one_page(paper, meta, |pen, pw, ph| draw(pen, d, pw, ph))
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
    for line in pen.regular.wrap(10.5, &d.heading(), w, 2) {
        pen.text(x0, y, 10.5, false, INK, &line, w, Align::Left);
        y += 12.5;
    }
    y -= 1.5;
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

    // ---- left: decisions ----
    ty = decisions(pen, d, x0, ty + 8.0, lw);

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

/// Depth choice and execution per throw (estimate, 90% range, lift) under
/// a header row that names them, or the line saying why there are none;
/// returns the baseline of the last line.
fn decisions(pen: &mut Pen, d: &ReportData, x0: f32, y: f32, lw: f32) -> f32 {
    let mut ty = y;
    if d.decisions.is_empty() {
        pen.heading(x0, ty, "Decisions", lw);
    } else {
        let fixed = [30.0, 36.0, 44.0, 78.0, 118.0, 36.0];
        let mut widths = vec![(lw - fixed.iter().sum::<f32>()).max(50.0)];
        widths.extend_from_slice(&fixed);
        let mut aligns = vec![Align::Left];
        aligns.extend([Align::Right; 6]);
        pen.row(x0 - 3.0, ty, &widths[..1], &aligns, &["Decisions"], 8.6, true, INK);
        pen.row(x0, ty, &widths, &aligns, &["", "n", "Ours", "Estimate", "90% range", "Lift (90% range)", "League"], 6.8, true, GREY);
        pen.line(x0, ty + 3.5, x0 + lw, ty + 3.5, RULE, 0.6);
        for (k, m) in d.decisions.iter().enumerate() {
            ty += ROW;
            if k % 2 == 1 {
                pen.rect(x0, ty - ROW + 4.5, lw, ROW, STRIPE);
            }
            pen.row(x0, ty, &widths, &aligns, &[m.short, &m.n, &m.value, &m.estimate, &m.interval, &m.lift, &m.league], 7.6, false, INK);
        }
        ty += 1.0;
    }
    for line in pen.regular.wrap(6.8, &d.decisions_note, lw, 3) {
        ty += 8.6;
        pen.text(x0, ty, 6.8, false, INK, &line, lw, Align::Left);
    }
    ty
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

//! The project's colours, chosen once: the PDF report draws with these
//! constants and the stylesheets (static/app.css, static/report.css) declare
//! the same values as CSS variables; a test keeps the three in step.

/// A colour as red, green, blue bytes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Rgb(pub u8, pub u8, pub u8);

impl Rgb {
    /// `#rrggbb`, lower case.
    pub fn hex(self) -> String {
        format!("#{:02x}{:02x}{:02x}", self.0, self.1, self.2)
    }
}

/// A snap or game that raised the win probability (bars, swings).
pub const GAIN: Rgb = Rgb(0x2e, 0x7d, 0x4f);
/// One that lowered it.
pub const LOSS: Rgb = Rgb(0xb3, 0x36, 0x2f);
/// The league's value in every chart and table.
pub const LEAGUE: Rgb = Rgb(0x7a, 0x4f, 0xb3);
/// Links, buttons and the passer's line on the pages.
pub const ACCENT: Rgb = Rgb(0x1f, 0x5f, 0xa8);
/// The passer's estimate (dot) and lines on the printed report.
pub const ESTIMATE: Rgb = Rgb(0x1b, 0x3a, 0x5c);
/// The 90% range behind the estimate.
pub const RANGE: Rgb = Rgb(0x7a, 0x9c, 0xc6);
/// Text.
pub const INK: Rgb = Rgb(0x1f, 0x1f, 0x1f);
/// Secondary text and table headings on the report.
pub const GREY: Rgb = Rgb(0x5f, 0x5f, 0x5f);
/// Table rules.
pub const RULE: Rgb = Rgb(0xbb, 0xbb, 0xbb);
/// Every other table row.
pub const STRIPE: Rgb = Rgb(0xf1, 0xf3, 0xf6);
/// Chart axes.
pub const AXIS: Rgb = Rgb(0x44, 0x44, 0x44);
/// Chart grid lines.
pub const GRID: Rgb = Rgb(0xe0, 0xe0, 0xe0);

/// The meeting view's dark screen (static/meeting.css): background, text,
/// secondary text, cards, the estimate, its 90% range, the league mark and
/// the passer's own normal. Text on these passes 7:1 (the browser test
/// measures it).
pub const DECK_BG: Rgb = Rgb(0x10, 0x14, 0x18);
pub const DECK_INK: Rgb = Rgb(0xf3, 0xf5, 0xf7);
pub const DECK_MUTED: Rgb = Rgb(0xc9, 0xd1, 0xd9);
pub const DECK_CARD: Rgb = Rgb(0x1a, 0x20, 0x27);
pub const DECK_ESTIMATE: Rgb = Rgb(0xff, 0xd1, 0x66);
pub const DECK_RANGE: Rgb = Rgb(0x5b, 0x8d, 0xb8);
pub const DECK_NORMAL: Rgb = Rgb(0xff, 0x9f, 0x6e);

/// The CSS variables of static/meeting.css.
pub const MEETING_VARS: &[(&str, Rgb)] = &[
    ("--deck-bg", DECK_BG),
    ("--deck-ink", DECK_INK),
    ("--deck-muted", DECK_MUTED),
    ("--deck-card", DECK_CARD),
    ("--deck-accent", DECK_ESTIMATE),
    ("--deck-interval", DECK_RANGE),
    ("--deck-league", DECK_INK),
    ("--deck-normal", DECK_NORMAL),
];

/// The CSS variable that carries each colour in static/app.css (the pages).
pub const PAGE_VARS: &[(&str, Rgb)] =
    &[("--gain", GAIN), ("--loss", LOSS), ("--league", LEAGUE), ("--accent", ACCENT), ("--axis", AXIS), ("--grid", GRID)];

/// The CSS variable that carries each colour in static/report.css.
pub const REPORT_VARS: &[(&str, Rgb)] = &[
    ("--gain", GAIN),
    ("--loss", LOSS),
    ("--league", LEAGUE),
    ("--estimate", ESTIMATE),
    ("--range", RANGE),
    ("--ink", INK),
    ("--grey", GREY),
    ("--rule", RULE),
    ("--stripe", STRIPE),
    ("--axis", AXIS),
    ("--grid", GRID),
];

#[cfg(test)]
mod tests {
    use super::*;

    /// `--name: #rrggbb;` declarations of the first `:root { ... }` block.
    fn root_vars(css: &str) -> Vec<(String, String)> {
        let start = css.find(":root").and_then(|i| css[i..].find('{').map(|j| i + j + 1)).unwrap_or(0);
        let end = css[start..].find('}').map(|j| start + j).unwrap_or(css.len());
        css[start..end]
            .split(';')
            .filter_map(|decl| {
                let (k, v) = decl.split_once(':')?;
                let k = k.split("*/").last()?.trim();
                k.starts_with("--").then(|| (k.to_string(), v.trim().to_ascii_lowercase()))
            })
            .collect()
    }

    fn check(css: &str, file: &str, vars: &[(&str, Rgb)]) {
        let declared = root_vars(css);
        for (name, rgb) in vars {
            let found = declared.iter().find(|(k, _)| k == name).map(|(_, v)| v.as_str());
            assert_eq!(found, Some(rgb.hex().as_str()), "{file}: {name}");
        }
    }

    #[test]
    fn stylesheets_declare_the_palette() {
        check(include_str!("../static/app.css"), "static/app.css", PAGE_VARS);
        check(include_str!("../static/report.css"), "static/report.css", REPORT_VARS);
        check(include_str!("../static/meeting.css"), "static/meeting.css", MEETING_VARS);
    }

    #[test]
    fn no_stray_colours_in_the_stylesheets() {
        // Every palette colour appears in a stylesheet only as its variable's value.
        for (css, file) in [(include_str!("../static/app.css"), "app.css"), (include_str!("../static/report.css"), "report.css")] {
            let lower = css.to_ascii_lowercase();
            for c in [GAIN, LOSS, LEAGUE, ESTIMATE, RANGE, AXIS, GRID] {
                assert!(lower.matches(&c.hex()).count() <= 1, "{file} repeats {} outside its variable", c.hex());
            }
        }
    }

    #[test]
    fn hex_form() {
        assert_eq!(Rgb(0, 0x0a, 0xff).hex(), "#000aff");
        assert_eq!(root_vars(":root {\n  --a: #ABCDEF; /* c */ --b: 3px;\n}\nx { --c: #000; }"), vec![
            ("--a".to_string(), "#abcdef".to_string()),
            ("--b".to_string(), "3px".to_string())
        ]);
    }
}

//! The SVG document for a laid-out map: inline (for the page) or standalone
//! (for the command line's `render`, with title, legend and footer).
//!
//! All text (district names, title, legend labels, footer lines) is written as
//! text nodes or attribute values through the `svg` crate, which escapes `&`,
//! `<` and `>` in text and also `"` and `'` in attribute values; characters that
//! XML does not allow at all (most control characters) are removed first.

use super::projection::DEFAULT_WIDTH;
use super::MapLayout;
use svg::node::element::{Circle, Definitions, Group, Path, Pattern, Rectangle, Text, Title};
use svg::node::Node;
use svg::Document;

/// Id of the diagonal-hatch pattern for tied districts; use
/// `"url(#sm-tie)"` as a fill.
pub const TIE_PATTERN_ID: &str = "sm-tie";

/// Fill used for a tie: the hatch pattern.
pub const TIE_FILL: &str = "url(#sm-tie)";

/// Fill of a district that has no fill given.
pub const NEUTRAL_FILL: &str = "#d4d4d4";

const FONT: &str = "system-ui, -apple-system, 'Segoe UI', sans-serif";
const PAD: f64 = 16.0;
const TITLE_SIZE: f64 = 20.0;
const LEGEND_SIZE: f64 = 13.0;
const LEGEND_ROW: f64 = 22.0;
const SWATCH: f64 = 14.0;
const FOOTER_SIZE: f64 = 11.0;
const FOOTER_ROW: f64 = 16.0;
/// Rough advance of one character, as a fraction of the font size, used to
/// lay out legend entries and wrap footer lines without font metrics.
const CHAR_WIDTH: f64 = 0.6;

/// What to draw on top of a [`MapLayout`].
#[derive(Debug, Clone, Default)]
pub struct SvgOptions<'a> {
    /// District names, in layout order (shown as each path's `<title>`).
    pub names: &'a [String],
    /// Fill per district: a CSS colour or [`TIE_FILL`]; `None`, or a missing
    /// entry, gives [`NEUTRAL_FILL`].
    pub fills: Option<&'a [String]>,
    /// Map title (standalone: drawn at the top; always the `aria-label`).
    pub title: Option<&'a str>,
    /// Legend entries `(colour, label)`, drawn below a standalone map.
    pub legend: Vec<(String, String)>,
    /// Footer lines (source, caution, scenario), drawn below a standalone map.
    pub footer: Vec<String>,
    /// Index of a district to mark with a ring and dot (the tipping point).
    pub marker: Option<usize>,
    /// `true`: a complete picture with size, background, title, legend, footer
    /// and marker; `false`: the map alone with an empty `sm-overlay` group.
    pub standalone: bool,
}

/// Removes the characters XML 1.0 does not allow in a document (C0 controls
/// other than tab, line feed and carriage return, and U+FFFE/U+FFFF).
fn clean(text: &str) -> String {
    text.chars()
        .filter(|&c| {
            !matches!(c, '\u{0}'..='\u{8}' | '\u{b}' | '\u{c}' | '\u{e}'..='\u{1f}' | '\u{fffe}' | '\u{ffff}')
        })
        .collect()
}

/// A number for an attribute: rounded to 0.01, shortest form.
fn num(v: f64) -> String {
    let r = (v * 100.0).round() / 100.0 + 0.0;
    if r.is_finite() {
        r.to_string()
    } else {
        "0".to_string()
    }
}

fn text_width(text: &str, size: f64) -> f64 {
    text.chars().count() as f64 * size * CHAR_WIDTH
}

/// Greedy word wrap to at most `max_chars` characters a line (longer words are cut).
fn wrap(text: &str, max_chars: usize) -> Vec<String> {
    let max_chars = max_chars.max(1);
    let mut lines = Vec::new();
    let mut line = String::new();
    let mut line_len = 0;
    for word in text.split_whitespace() {
        let mut word: Vec<char> = word.chars().collect();
        while word.len() > max_chars {
            if line_len > 0 {
                lines.push(std::mem::take(&mut line));
                line_len = 0;
            }
            lines.push(word.drain(..max_chars).collect());
        }
        let wlen = word.len();
        if wlen == 0 {
            continue;
        }
        if line_len > 0 && line_len + 1 + wlen > max_chars {
            lines.push(std::mem::take(&mut line));
            line_len = 0;
        }
        if line_len > 0 {
            line.push(' ');
            line_len += 1;
        }
        line.extend(word);
        line_len += wlen;
    }
    if line_len > 0 {
        lines.push(line);
    }
    lines
}

fn label(x: f64, y: f64, size: f64, content: &str) -> Text {
    Text::new(clean(content))
        .set("x", num(x))
        .set("y", num(y))
        .set("font-size", num(size))
        .set("font-family", FONT)
        .set("fill", "#1a1a1a")
}

fn tie_pattern() -> Pattern {
    Pattern::new()
        .set("id", TIE_PATTERN_ID)
        .set("patternUnits", "userSpaceOnUse")
        .set("width", 6)
        .set("height", 6)
        .add(
            Rectangle::new()
                .set("width", 6)
                .set("height", 6)
                .set("fill", "#f4f4f4"),
        )
        .add(
            Path::new()
                .set("d", "M-1,1 L1,-1 M0,6 L6,0 M5,7 L7,5")
                .set("stroke", "#3a3a3a")
                .set("stroke-width", 1.3),
        )
}

fn marker_symbol(x: f64, y: f64) -> Group {
    Group::new()
        .set("class", "sm-marker")
        .add(
            Circle::new()
                .set("cx", num(x))
                .set("cy", num(y))
                .set("r", 7)
                .set("fill", "none")
                .set("stroke", "#ffffff")
                .set("stroke-width", 4),
        )
        .add(
            Circle::new()
                .set("cx", num(x))
                .set("cy", num(y))
                .set("r", 7)
                .set("fill", "none")
                .set("stroke", "#111111")
                .set("stroke-width", 2),
        )
        .add(
            Circle::new()
                .set("cx", num(x))
                .set("cy", num(y))
                .set("r", 2.5)
                .set("fill", "#111111"),
        )
}

fn district_name(opts: &SvgOptions, i: usize) -> String {
    match opts.names.get(i) {
        Some(name) if !name.trim().is_empty() => clean(name),
        _ => format!("District {}", i + 1),
    }
}

fn districts(layout: &MapLayout, opts: &SvgOptions) -> Group {
    let mut group = Group::new()
        .set("class", "sm-districts")
        .set("stroke", "#ffffff")
        .set("stroke-width", 0.6)
        .set("stroke-linejoin", "round");
    for (i, d) in layout.paths.iter().enumerate() {
        let fill = opts
            .fills
            .and_then(|f| f.get(i))
            .map(|f| clean(f))
            .filter(|f| !f.trim().is_empty())
            .unwrap_or_else(|| NEUTRAL_FILL.to_string());
        let path = Path::new()
            .set("class", "sm-district")
            .set("data-i", i)
            .set("d", clean(d))
            .set("fill-rule", "evenodd")
            .set("fill", fill)
            .add(Title::new(district_name(opts, i)));
        group.append(path);
    }
    group
}

/// Renders the map as an SVG document (a string starting with `<svg`).
///
/// ```
/// use stratamap::output::map::{layout, svg, SvgOptions};
/// use geo::{polygon, MultiPolygon};
/// let shapes = vec![MultiPolygon::new(vec![polygon![
///     (x: 10.0, y: 50.0), (x: 11.0, y: 50.0), (x: 11.0, y: 51.0), (x: 10.0, y: 51.0),
/// ]])];
/// let map = layout(&shapes, 400.0);
/// let names = vec!["North & South".to_string()];
/// let page = svg(&map, &SvgOptions { names: &names, ..SvgOptions::default() });
/// assert!(page.starts_with("<svg"));
/// assert!(page.contains(r#"<g class="sm-overlay"/>"#));
/// assert!(page.contains("<title>North &amp; South</title>"));
/// ```
pub fn svg(layout: &MapLayout, opts: &SvgOptions) -> String {
    let width = if layout.width.is_finite() && layout.width > 0.0 {
        layout.width
    } else {
        DEFAULT_WIDTH
    };
    let map_height = if layout.height.is_finite() && layout.height > 0.0 {
        layout.height
    } else {
        width / 2.0
    };
    let aria = opts
        .title
        .map(clean)
        .filter(|t| !t.trim().is_empty())
        .unwrap_or_else(|| "District map".to_string());
    let defs = Definitions::new().add(tie_pattern());

    if !opts.standalone {
        return Document::new()
            .set("viewBox", format!("0 0 {} {}", num(width), num(map_height)))
            .set("class", "sm-map")
            // The inline map holds focusable districts: a group, not a single image.
            .set("role", "group")
            .set("aria-label", aria)
            .add(defs)
            .add(districts(layout, opts))
            .add(Group::new().set("class", "sm-overlay"))
            .to_string();
    }

    let mut body = Group::new();
    let mut y = PAD;
    if let Some(title) = opts.title.map(clean).filter(|t| !t.trim().is_empty()) {
        let max_chars = ((width - 2.0 * PAD) / (TITLE_SIZE * CHAR_WIDTH)) as usize;
        for line in wrap(&title, max_chars) {
            y += TITLE_SIZE;
            body.append(label(PAD, y, TITLE_SIZE, &line).set("font-weight", "bold"));
            y += 6.0;
        }
        y += 4.0;
    }
    let map_top = y;
    let mut map = Group::new()
        .set("transform", format!("translate(0,{})", num(map_top)))
        .add(districts(layout, opts));
    let marked = opts.marker.and_then(|i| {
        let (x, y) = *layout.anchors.get(i)?;
        (i < layout.paths.len() && x.is_finite() && y.is_finite()).then_some((i, x, y))
    });
    if let Some((_, x, y)) = marked {
        map.append(marker_symbol(x, y));
    }
    body.append(map);
    y = map_top + map_height + 8.0;

    // Legend: swatch + label entries flowing left to right, wrapping.
    let mut entries: Vec<(Option<String>, String)> = opts
        .legend
        .iter()
        .map(|(colour, text)| (Some(clean(colour)), clean(text)))
        .collect();
    if let Some((i, _, _)) = marked {
        entries.push((None, format!("Tipping point: {}", district_name(opts, i))));
    }
    if !entries.is_empty() {
        let mut legend = Group::new().set("class", "sm-legend");
        let mut x = PAD;
        let mut row_y = y;
        for (colour, text) in entries {
            let w = SWATCH + 6.0 + text_width(&text, LEGEND_SIZE) + 18.0;
            if x > PAD && x + w > width - PAD {
                x = PAD;
                row_y += LEGEND_ROW;
            }
            match colour {
                Some(fill) => legend.append(
                    Rectangle::new()
                        .set("x", num(x))
                        .set("y", num(row_y + 2.0))
                        .set("width", SWATCH)
                        .set("height", SWATCH)
                        .set("fill", fill)
                        .set("stroke", "#555555")
                        .set("stroke-width", 0.5),
                ),
                None => legend.append(marker_symbol(x + SWATCH / 2.0, row_y + 2.0 + SWATCH / 2.0)),
            }
            legend.append(label(
                x + SWATCH + 6.0,
                row_y + 2.0 + SWATCH - 2.0,
                LEGEND_SIZE,
                &text,
            ));
            x += w;
        }
        body.append(legend);
        y = row_y + LEGEND_ROW + 4.0;
    }

    // Footer: source, caution, scenario, wrapped to the width.
    let max_chars = ((width - 2.0 * PAD) / (FOOTER_SIZE * CHAR_WIDTH)) as usize;
    let mut footer = Group::new().set("class", "sm-footer");
    let mut any = false;
    for line in opts.footer.iter().flat_map(|l| wrap(&clean(l), max_chars)) {
        y += FOOTER_ROW;
        footer.append(label(PAD, y - 4.0, FOOTER_SIZE, &line).set("fill", "#3d3d3d"));
        any = true;
    }
    if any {
        body.append(footer);
    }
    let height = y + PAD;

    Document::new()
        .set("viewBox", format!("0 0 {} {}", num(width), num(height)))
        .set("width", num(width))
        .set("height", num(height))
        .set("class", "sm-map")
        .set("role", "img")
        .set("aria-label", aria)
        .add(defs)
        .add(
            Rectangle::new()
                .set("width", "100%")
                .set("height", "100%")
                .set("fill", "#ffffff"),
        )
        .add(body)
        .to_string()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::output::map::layout;
    use geo::{polygon, MultiPolygon};

    fn two_districts() -> MapLayout {
        let a = polygon![(x: 0.0, y: 0.0), (x: 1.0, y: 0.0), (x: 1.0, y: 1.0), (x: 0.0, y: 1.0)];
        let b = polygon![(x: 1.0, y: 0.0), (x: 2.0, y: 0.0), (x: 2.0, y: 1.0), (x: 1.0, y: 1.0)];
        layout(
            &[MultiPolygon::new(vec![a]), MultiPolygon::new(vec![b])],
            600.0,
        )
    }

    /// Checks that the document is well-formed as far as the `svg` crate's
    /// reader can tell, and returns its element names in order.
    fn element_names(doc: &str) -> Vec<String> {
        use svg::parser::Event;
        let mut names = Vec::new();
        for event in svg::read(doc).unwrap() {
            match event {
                Event::Error(e) => panic!("unreadable SVG: {e:?}"),
                Event::Tag(name, kind, _) if kind != svg::node::element::tag::Type::End => {
                    names.push(name.to_string())
                }
                _ => {}
            }
        }
        names
    }

    #[test]
    fn untrusted_names_are_escaped() {
        let map = two_districts();
        let evil = r#"<script>alert(1)</script> & "x""#.to_string();
        let names = vec![evil.clone(), "ok\u{1}name".to_string()];
        let legend = vec![("#123456".to_string(), evil.clone())];
        let footer = vec![evil.clone()];
        for standalone in [false, true] {
            let out = svg(
                &map,
                &SvgOptions {
                    names: &names,
                    title: Some(&evil),
                    legend: legend.clone(),
                    footer: footer.clone(),
                    marker: Some(0),
                    standalone,
                    ..SvgOptions::default()
                },
            );
            assert!(out.contains("&lt;script&gt;"), "{out}");
            assert!(!out.contains("<script"), "{out}");
            assert!(out.contains("&amp;"));
            // In the aria-label attribute the quotes are escaped as well.
            assert!(
                out.contains(
                    r#"aria-label="&lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;x&quot;""#
                ),
                "{out}"
            );
            assert!(!out.contains('\u{1}'));
            assert!(out.contains("<title>okname</title>"));
            element_names(&out);
        }
    }

    #[test]
    fn inline_map_structure() {
        let map = two_districts();
        let names = vec!["Alpha".to_string(), "Beta".to_string()];
        let fills = vec!["#336699".to_string(), TIE_FILL.to_string()];
        let out = svg(
            &map,
            &SvgOptions {
                names: &names,
                fills: Some(&fills),
                marker: Some(1),
                ..SvgOptions::default()
            },
        );
        assert!(out.starts_with("<svg "));
        assert!(out.contains(r#"xmlns="http://www.w3.org/2000/svg""#));
        assert!(out.contains(r#"class="sm-map""#) && out.contains(r#"role="group""#));
        assert!(out.contains(&format!(r#"viewBox="0 0 600 {}""#, num(map.height))));
        assert!(
            !out.contains("width=\"600\""),
            "inline map has no fixed size"
        );
        assert!(out.contains(
            r#"<pattern height="6" id="sm-tie" patternUnits="userSpaceOnUse" width="6">"#
        ));
        assert!(out.contains(r#"data-i="0""#) && out.contains(r#"data-i="1""#));
        assert!(out.contains(r##"fill="#336699""##) && out.contains(r#"fill="url(#sm-tie)""#));
        assert_eq!(out.matches(r#"fill-rule="evenodd""#).count(), 2);
        assert!(out.contains(&format!(r#"d="{}""#, map.paths[0])));
        assert!(out.contains(r#"<g class="sm-overlay"/>"#));
        assert!(
            !out.contains("sm-marker"),
            "the page draws the marker itself"
        );
        let names = element_names(&out);
        assert_eq!(names.iter().filter(|n| *n == "path").count(), 2 + 1); // + hatch
        assert!(!names.iter().any(|n| n == "text"));
    }

    #[test]
    fn standalone_map_has_title_legend_footer_marker() {
        let map = two_districts();
        let names = vec!["Alpha".to_string(), "Beta".to_string()];
        let fills = vec!["#336699".to_string(), "#996633".to_string()];
        let footer = vec![
            "Source: invented figures".to_string(),
            "A scenario, not a forecast. ".repeat(12),
            "turnout=all:5".to_string(),
        ];
        let out = svg(
            &map,
            &SvgOptions {
                names: &names,
                fills: Some(&fills),
                title: Some("Example map"),
                legend: vec![
                    ("#336699".to_string(), "Party One".to_string()),
                    ("#996633".to_string(), "Party Two".to_string()),
                    (TIE_FILL.to_string(), "Tie".to_string()),
                ],
                footer: footer.clone(),
                marker: Some(1),
                standalone: true,
            },
        );
        assert!(out.contains(r#"width="600""#));
        assert!(out.contains(r##"fill="#ffffff" height="100%" width="100%""##));
        // The svg crate writes a text element's content on its own line; SVG
        // collapses that white space when it draws the text.
        assert!(out.contains(">\nExample map\n</text>"));
        for l in [
            "Party One",
            "Party Two",
            "Tie",
            "Tipping point: Beta",
            "Source: invented figures",
            "turnout=all:5",
        ] {
            assert!(out.contains(&format!(">\n{l}\n</text>")), "{l} missing");
        }
        assert_eq!(out.matches(r#"class="sm-marker""#).count(), 2); // map + legend
                                                                    // The marker is drawn at the marked district's anchor.
        let (ax, ay) = map.anchors[1];
        assert!(out.contains(&format!(r#"cx="{}" cy="{}""#, num(ax), num(ay))));
        // The long caution is wrapped onto several lines, none wider than the map.
        let max_chars = ((600.0 - 2.0 * PAD) / (FOOTER_SIZE * CHAR_WIDTH)) as usize;
        let wrapped = wrap(&footer[1], max_chars);
        assert!(wrapped.len() > 1);
        assert!(wrapped.iter().all(|l| l.chars().count() <= max_chars));
        // The picture is taller than the map alone to fit title, legend and footer.
        let vb = out.split("viewBox=\"0 0 600 ").nth(1).unwrap();
        let h: f64 = vb.split('"').next().unwrap().parse().unwrap();
        assert!(h > map.height + 100.0, "{h} vs {}", map.height);
        let names = element_names(&out);
        assert!(names.iter().filter(|n| *n == "text").count() >= 8);
    }

    #[test]
    fn empty_and_odd_inputs_give_valid_svg() {
        let empty = layout(&[], 800.0);
        for standalone in [false, true] {
            let out = svg(
                &empty,
                &SvgOptions {
                    marker: Some(3),
                    standalone,
                    ..SvgOptions::default()
                },
            );
            assert!(out.contains(r#"aria-label="District map""#));
            assert!(!out.contains("sm-district\""));
            element_names(&out);
        }
        // Broken layout numbers and a marker out of range do not leak into the output.
        let broken = MapLayout {
            width: f64::NAN,
            height: -1.0,
            paths: vec!["M0,0 L1,1 z".to_string()],
            anchors: vec![(f64::INFINITY, 0.0)],
        };
        let out = svg(
            &broken,
            &SvgOptions {
                marker: Some(0),
                standalone: true,
                ..SvgOptions::default()
            },
        );
        assert!(!out.contains("NaN") && !out.contains("inf"));
        assert!(out.contains("<title>District 1</title>"));
        assert!(!out.contains("sm-marker"));
    }

    #[test]
    fn wrap_cuts_long_words() {
        assert_eq!(wrap("aaaaaaa bb c", 3), vec!["aaa", "aaa", "a", "bb", "c"]);
        assert_eq!(wrap("one two three", 7), vec!["one two", "three"]);
        assert!(wrap("   ", 5).is_empty());
    }
}

//! Post-processing of the SVG text plotters writes: what its SVG backend
//! cannot express (subscripts, dash patterns, hatch fills) and the explicit
//! font family.
//!
//! Markup in labels: `_{cr}` becomes a subscript and `^{2}` a superscript,
//! set as `<tspan baseline-shift=...>` (renders in rsvg and typst).

use super::style::{self, FONT, GUIDE, GUIDE_DASH, HATCH_SENTINEL, HATCH_SPACING, HATCH_WIDTH};
use plotters::style::RGBColor;

/// Id of the hatch pattern in `<defs>`.
pub const HATCH_ID: &str = "ltb-hatch";

fn hex(c: RGBColor) -> String {
    format!("#{:02X}{:02X}{:02X}", c.0, c.1, c.2)
}

/// Turn `_{..}` and `^{..}` into tspans.
fn scripts(svg: &str) -> String {
    let mut out = String::with_capacity(svg.len() + 256);
    let mut rest = svg;
    loop {
        let next = [rest.find("_{"), rest.find("^{")]
            .into_iter()
            .flatten()
            .min();
        let Some(i) = next else {
            out.push_str(rest);
            break;
        };
        let Some(j) = rest[i..].find('}') else {
            out.push_str(rest);
            break;
        };
        let shift = if rest[i..].starts_with('_') {
            "sub"
        } else {
            "super"
        };
        out.push_str(&rest[..i]);
        out.push_str(&format!(
            "<tspan baseline-shift=\"{shift}\" font-size=\"75%\">{}</tspan>",
            &rest[i + 2..i + j]
        ));
        rest = &rest[i + j + 1..];
    }
    out
}

/// Add `stroke-dasharray` to every `<polyline>` and `<line>` stroked in
/// `colour`.
fn dash(svg: &str, colour: RGBColor, pattern: &str) -> String {
    if pattern.is_empty() {
        return svg.to_string();
    }
    let needle = format!("stroke=\"{}\"", hex(colour));
    let mut out = String::with_capacity(svg.len());
    for line in svg.split_inclusive('\n') {
        if (line.trim_start().starts_with("<polyline") || line.trim_start().starts_with("<line"))
            && line.contains(&needle)
        {
            out.push_str(&line.replacen(
                &needle,
                &format!(
                    "{needle} stroke-dasharray=\"{pattern}\" stroke-linecap=\"butt\" stroke-linejoin=\"round\""
                ),
                1,
            ));
        } else {
            out.push_str(line);
        }
    }
    out
}

/// The finished SVG: explicit font, scripts, series dashes, guide dashes,
/// hatch pattern.
pub fn finish(svg: &str) -> String {
    let mut s = svg.replace(
        "font-family=\"sans-serif\"",
        &format!("font-family=\"{FONT}\""),
    );
    s = scripts(&s);
    for st in style::SERIES {
        s = dash(&s, st.colour, st.dash);
    }
    s = dash(&s, GUIDE, GUIDE_DASH);
    // Filled cells edge to edge: crisp edges, so no seams show between them.
    s = s.replace("<rect ", "<rect shape-rendering=\"crispEdges\" ");
    let sentinel = format!("fill=\"{}\"", hex(HATCH_SENTINEL));
    if s.contains(&sentinel) {
        s = s.replace(&sentinel, &format!("fill=\"url(#{HATCH_ID})\""));
        let defs = format!(
            "<defs>\n<pattern id=\"{HATCH_ID}\" patternUnits=\"userSpaceOnUse\" width=\"{w}\" height=\"{w}\" patternTransform=\"rotate(45)\">\n<rect x=\"0\" y=\"0\" width=\"{w}\" height=\"{w}\" fill=\"#FFFFFF\" fill-opacity=\"0\"/>\n<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"{w}\" stroke=\"{ink}\" stroke-width=\"{HATCH_WIDTH}\"/>\n</pattern>\n</defs>\n",
            w = HATCH_SPACING,
            ink = hex(style::INK),
        );
        if let Some(i) = s.find("<svg")
            && let Some(j) = s[i..].find('>')
        {
            s.insert_str(i + j + 1, &format!("\n{defs}"));
        }
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn subscripts_become_tspans() {
        let s = scripts("<text>M_{cr} and EI_{z}, x^{2}</text>");
        assert_eq!(
            s,
            "<text>M<tspan baseline-shift=\"sub\" font-size=\"75%\">cr</tspan> and EI<tspan baseline-shift=\"sub\" font-size=\"75%\">z</tspan>, x<tspan baseline-shift=\"super\" font-size=\"75%\">2</tspan></text>"
        );
    }

    #[test]
    fn dashes_only_lines_of_the_colour() {
        let c = style::SERIES[1].colour;
        let svg = format!(
            "<polyline stroke=\"{}\" points=\"\"/>\n<circle fill=\"{}\"/>\n<polyline stroke=\"#000000\"/>\n",
            hex(c),
            hex(c)
        );
        let d = dash(&svg, c, "5 5");
        assert_eq!(d.matches("stroke-dasharray").count(), 1);
    }
}

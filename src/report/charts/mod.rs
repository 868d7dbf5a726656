//! Charts for the report, drawn as SVG strings in Rust (Typst Universe packages cannot be fetched
//! here, and SVG text stays extractable in the PDF).
//!
//! Owns the plane drawing ([`plane_svg`]), the velocity colour map ([`velocity_map_svg`]) and the
//! velocity profiles ([`profiles_svg`]). Must not compute results: charts draw the presentation
//! model. Text names the embedded family [`svg::FONT_FAMILY`]; the template inserts each chart with
//! `image(bytes(svg), format: "svg")`.

pub mod axis;
pub mod colour;
mod field;
mod plane;
mod profiles;
pub mod svg;

pub use field::{velocity_map_svg, ColourScale};
pub use plane::plane_svg;
pub use profiles::profiles_svg;

#[cfg(test)]
pub(crate) mod wellformed {
    //! A small XML well-formedness check for the charts (tags balance, attributes are quoted,
    //! entities are known). The real parser check happens when Typst renders the charts.

    /// `Ok(element count)` if `xml` is well formed.
    pub fn check(xml: &str) -> Result<usize, String> {
        let mut stack: Vec<String> = Vec::new();
        let mut count = 0;
        let b = xml.as_bytes();
        let mut i = 0;
        while i < b.len() {
            match b[i] {
                b'<' => {
                    let end = xml[i..].find('>').ok_or("unclosed tag")? + i;
                    let tag = &xml[i + 1..end];
                    if let Some(name) = tag.strip_prefix('/') {
                        let open = stack.pop().ok_or(format!("stray </{name}>"))?;
                        if open != name.trim() {
                            return Err(format!("</{name}> closes <{open}>"));
                        }
                    } else {
                        let self_closing = tag.ends_with('/');
                        let body = tag.trim_end_matches('/');
                        let name: String =
                            body.chars().take_while(|c| !c.is_whitespace()).collect();
                        if name.is_empty() {
                            return Err("empty tag name".into());
                        }
                        attributes(&body[name.len()..])?;
                        count += 1;
                        if !self_closing {
                            stack.push(name);
                        }
                    }
                    i = end + 1;
                }
                b'&' => {
                    let end = xml[i..].find(';').ok_or("unterminated entity")? + i;
                    let entity = &xml[i + 1..end];
                    if !["amp", "lt", "gt", "quot", "apos"].contains(&entity) {
                        return Err(format!("unknown entity &{entity};"));
                    }
                    i = end + 1;
                }
                b'>' => return Err("stray >".into()),
                _ => i += 1,
            }
        }
        match stack.pop() {
            Some(open) => Err(format!("<{open}> never closed")),
            None => Ok(count),
        }
    }

    fn attributes(mut s: &str) -> Result<(), String> {
        loop {
            s = s.trim_start();
            if s.is_empty() {
                return Ok(());
            }
            let eq = s.find('=').ok_or(format!("attribute without value: {s}"))?;
            let name = s[..eq].trim();
            if name.is_empty() || name.contains(char::is_whitespace) {
                return Err(format!("bad attribute name `{name}`"));
            }
            let rest = &s[eq + 1..];
            let quote = rest.chars().next().ok_or("missing attribute value")?;
            if quote != '"' && quote != '\'' {
                return Err(format!("unquoted attribute `{name}`"));
            }
            let close = rest[1..].find(quote).ok_or("unterminated attribute")? + 1;
            if rest[1..close].contains('<') {
                return Err(format!("`<` inside attribute `{name}`"));
            }
            s = &rest[close + 1..];
        }
    }

    #[test]
    fn the_checker_rejects_broken_markup() {
        assert_eq!(check("<svg><g a=\"1\"/></svg>"), Ok(2));
        assert!(check("<svg><g></svg>").is_err());
        assert!(check("<svg a=1></svg>").is_err());
        assert!(check("<svg>&nbsp;</svg>").is_err());
    }
}

#[cfg(test)]
mod tests {
    use super::wellformed::check;
    use super::*;
    use crate::report::model::ReportData;
    use crate::report::testkit::{field_sheet, report};

    fn samples() -> [ReportData; 2] {
        [report("stack"), report("hvac")]
    }

    fn count_points(svg: &str) -> usize {
        svg.matches("class=\"pt\"").count()
    }

    #[test]
    fn plane_drawings_are_well_formed_with_one_marker_per_point() {
        for data in samples() {
            let svg = plane_svg(&data.plane, &data.units);
            assert!(check(&svg).is_ok(), "{:?}", check(&svg));
            let points: usize = data.plane.lines.iter().map(|l| l.points.len()).sum();
            assert_eq!(count_points(&svg), points);
            assert!(svg.contains("font-family=\"DejaVu Sans\""));
        }
        let sheet = field_sheet("stack");
        assert_eq!(count_points(&plane_svg(&sheet.plane, &sheet.units)), 24);
    }

    #[test]
    fn round_drawing_labels_ports_and_diameter() {
        // sample-data/stack: 96 in = 2.438 m inside diameter, two ports
        let data = report("stack");
        let svg = plane_svg(&data.plane, &data.units);
        assert!(svg.contains(">A</text>") && svg.contains(">B</text>"));
        assert!(svg.contains("Ø 96.0 in (2.438 m)"), "{svg}");
        assert!(
            !svg.contains("moved by the wall rule"),
            "no point was moved"
        );
        let mut moved = data.plane.clone();
        moved.lines[0].points[0].adjusted = true;
        assert!(plane_svg(&moved, &data.units).contains("moved by the wall rule"));
    }

    #[test]
    fn velocity_maps_are_well_formed_with_one_marker_per_point() {
        for data in samples() {
            let scale = ColourScale::spanning(data.runs.iter().map(|r| r.field.as_slice()));
            for run in &data.runs {
                let svg = velocity_map_svg(&data.plane, &run.field, &data.units, scale);
                assert!(check(&svg).is_ok(), "{:?}", check(&svg));
                assert_eq!(count_points(&svg), run.field.len());
                assert!(svg.contains(&format!(">{}</text>", data.units.velocity)));
            }
        }
    }

    #[test]
    fn profiles_are_well_formed_with_one_marker_per_point_and_a_series_per_line() {
        for data in samples() {
            for run in &data.runs {
                let svg = profiles_svg(&data.plane, &run.field, &data.units);
                assert!(check(&svg).is_ok(), "{:?}", check(&svg));
                assert_eq!(count_points(&svg), run.field.len());
                let valid_lines = data
                    .plane
                    .lines
                    .iter()
                    .filter(|l| {
                        run.field
                            .iter()
                            .filter(|p| p.line == l.name && !p.excluded)
                            .count()
                            > 1
                    })
                    .count();
                assert_eq!(svg.matches("<polyline").count(), valid_lines);
                // Series are told apart by dash pattern, not only colour.
                if data.plane.lines.len() > 1 {
                    assert!(svg.contains("stroke-dasharray=\"6 3\""));
                }
            }
        }
    }

    #[test]
    fn charts_are_deterministic() {
        let data = report("stack");
        let scale = ColourScale::spanning(data.runs.iter().map(|r| r.field.as_slice()));
        let a = velocity_map_svg(&data.plane, &data.runs[0].field, &data.units, scale);
        let b = velocity_map_svg(&data.plane, &data.runs[0].field, &data.units, scale);
        assert_eq!(a, b);
    }
}

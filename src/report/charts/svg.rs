//! A minimal SVG writer for the report charts: number formatting, escaping and a few element
//! helpers.
//!
//! Owns only string building. Must not know about ducts or velocities. Output is deterministic:
//! every number is printed with at most two decimals, so the same input gives the same bytes.

use std::fmt::Write as _;

/// The font family named in every SVG text element. Typst resolves SVG fonts from its own font book
/// (the engine embeds DejaVu Sans); a generic family such as `sans-serif` would not resolve.
pub const FONT_FAMILY: &str = "DejaVu Sans";

/// A coordinate or length in SVG user units: two decimals, trailing zeros dropped, no `-0`.
pub fn num(value: f64) -> String {
    if !value.is_finite() {
        return "0".into();
    }
    let mut s = format!("{value:.2}");
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    if s == "-0" {
        s = "0".into();
    }
    s
}

/// Escapes text for SVG character data and attribute values.
pub fn esc(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            c if (c as u32) < 0x20 && c != '\n' && c != '\t' => {}
            c => out.push(c),
        }
    }
    out
}

/// Horizontal alignment of a text element.
#[derive(Debug, Clone, Copy)]
pub enum Anchor {
    Start,
    Middle,
    End,
}

impl Anchor {
    fn as_str(self) -> &'static str {
        match self {
            Anchor::Start => "start",
            Anchor::Middle => "middle",
            Anchor::End => "end",
        }
    }
}

/// An SVG document being written.
pub struct Svg {
    out: String,
}

impl Svg {
    /// Starts a document of `width` × `height` user units.
    pub fn new(width: f64, height: f64) -> Svg {
        let mut out = String::with_capacity(16 * 1024);
        let _ = write!(
            out,
            "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" \
             viewBox=\"0 0 {w} {h}\" font-family=\"{FONT_FAMILY}\">",
            w = num(width),
            h = num(height),
        );
        Svg { out }
    }

    /// Appends raw markup (the caller escapes any text in it).
    pub fn raw(&mut self, markup: &str) {
        self.out.push_str(markup);
    }

    /// Appends formatted raw markup.
    pub fn push(&mut self, args: std::fmt::Arguments<'_>) {
        let _ = self.out.write_fmt(args);
    }

    /// A text element; `text` is escaped here.
    pub fn text(&mut self, x: f64, y: f64, size: f64, anchor: Anchor, fill: &str, text: &str) {
        self.push(format_args!(
            "<text x=\"{}\" y=\"{}\" font-size=\"{}\" text-anchor=\"{}\" fill=\"{}\">{}</text>",
            num(x),
            num(y),
            num(size),
            anchor.as_str(),
            fill,
            esc(text)
        ));
    }

    /// A text element rotated by `degrees` about its anchor point.
    #[allow(clippy::too_many_arguments)]
    pub fn text_rotated(
        &mut self,
        x: f64,
        y: f64,
        size: f64,
        anchor: Anchor,
        fill: &str,
        degrees: f64,
        text: &str,
    ) {
        self.push(format_args!(
            "<text x=\"{x}\" y=\"{y}\" font-size=\"{}\" text-anchor=\"{}\" fill=\"{}\" \
             transform=\"rotate({} {x} {y})\">{}</text>",
            num(size),
            anchor.as_str(),
            fill,
            num(degrees),
            esc(text),
            x = num(x),
            y = num(y),
        ));
    }

    /// A straight line.
    pub fn line(&mut self, x1: f64, y1: f64, x2: f64, y2: f64, style: &str) {
        self.push(format_args!(
            "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" {style}/>",
            num(x1),
            num(y1),
            num(x2),
            num(y2)
        ));
    }

    /// Closes the document.
    pub fn finish(mut self) -> String {
        self.out.push_str("</svg>");
        self.out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_short_and_stable() {
        assert_eq!(num(12.0), "12");
        assert_eq!(num(12.345), "12.35");
        assert_eq!(num(-0.001), "0");
        assert_eq!(num(-3.10), "-3.1");
        assert_eq!(num(f64::NAN), "0");
    }

    #[test]
    fn text_is_escaped() {
        assert_eq!(esc("a<b & \"c\""), "a&lt;b &amp; &quot;c&quot;");
        let mut svg = Svg::new(10.0, 10.0);
        svg.text(1.0, 2.0, 5.0, Anchor::Middle, "#000", "Ø <40> in");
        let s = svg.finish();
        assert!(s.contains(">Ø &lt;40&gt; in</text>"));
        assert!(s.ends_with("</svg>"));
    }
}

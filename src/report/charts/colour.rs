//! Colours of the charts: the sequential map for velocities and the palette for traverse lines.
//!
//! Owns colour tables (data with their sources) and the lookup into them. Must not know about
//! ducts.
//!
//! - Velocity map: **viridis**, the perceptually uniform, colour-blind-friendly sequential map of
//!   matplotlib (N. J. Smith, S. van der Walt, E. Firing, 2015; released CC0). The stops below are
//!   its 256-entry `_viridis_data` table sampled at t = 0, 0.1, …, 1 and written as sRGB hex;
//!   between stops the map is interpolated linearly in sRGB, which stays within one or two levels
//!   of the full table.
//! - Line palette: the Okabe–Ito colour-universal-design palette (M. Okabe, K. Ito, "Color
//!   Universal Design (CUD): how to make figures and presentations that are friendly to colorblind
//!   people", 2008), used without its yellow, which is unreadable on white. Lines are told apart by
//!   dash pattern and marker shape as well, so the charts survive greyscale printing.

/// Viridis at t = 0, 0.1, …, 1 (matplotlib `_viridis_data`, entries 0, 26, 51, 77, 102, 128, 153,
/// 179, 204, 230, 255, as sRGB).
pub const VIRIDIS_STOPS: [[u8; 3]; 11] = [
    [0x44, 0x01, 0x54],
    [0x48, 0x24, 0x75],
    [0x41, 0x44, 0x87],
    [0x35, 0x5f, 0x8d],
    [0x2a, 0x78, 0x8e],
    [0x21, 0x91, 0x8c],
    [0x22, 0xa8, 0x84],
    [0x44, 0xbf, 0x70],
    [0x7a, 0xd1, 0x51],
    [0xbd, 0xdf, 0x26],
    [0xfd, 0xe7, 0x25],
];

/// Okabe–Ito blue, vermillion, bluish green, reddish purple, orange, sky blue, black.
pub const LINE_COLOURS: [&str; 7] = [
    "#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000",
];

/// SVG `stroke-dasharray` per line, paired with [`LINE_COLOURS`] (empty = solid).
pub const LINE_DASHES: [&str; 7] = ["", "6 3", "2 2", "8 3 2 3", "4 2 1 2", "10 4", "1 3"];

/// Viridis colour at `t` in [0, 1] (clamped), as `[r, g, b]`.
pub fn viridis(t: f64) -> [u8; 3] {
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let scaled = t * (VIRIDIS_STOPS.len() - 1) as f64;
    let i = (scaled.floor() as usize).min(VIRIDIS_STOPS.len() - 2);
    let f = scaled - i as f64;
    let (a, b) = (VIRIDIS_STOPS[i], VIRIDIS_STOPS[i + 1]);
    let mut out = [0u8; 3];
    for k in 0..3 {
        let v = a[k] as f64 + (b[k] as f64 - a[k] as f64) * f;
        out[k] = v.round().clamp(0.0, 255.0) as u8;
    }
    out
}

/// `#rrggbb` for a colour.
pub fn hex(rgb: [u8; 3]) -> String {
    format!("#{:02x}{:02x}{:02x}", rgb[0], rgb[1], rgb[2])
}

/// Black or white, whichever reads better on `rgb` (relative luminance per ITU-R BT.709 weights,
/// threshold 0.5: common practice).
pub fn text_on(rgb: [u8; 3]) -> &'static str {
    let l = (0.2126 * rgb[0] as f64 + 0.7152 * rgb[1] as f64 + 0.0722 * rgb[2] as f64) / 255.0;
    if l > 0.5 {
        "#000000"
    } else {
        "#ffffff"
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // matplotlib `_viridis_data` (CC0), entries 0, 128 and 255 transcribed from the published
    // table: [0.267004, 0.004874, 0.329415], [0.127568, 0.566949, 0.550556], [0.993248, 0.906157,
    // 0.143936]. One 8-bit level of rounding is allowed (stop at t = 0.5 is entry 127.5).
    #[test]
    fn viridis_stops_match_the_published_table() {
        const LEVEL_TOL: i32 = 1;
        let table = [
            (0.0, [0.267004, 0.004874, 0.329415]),
            (0.5, [0.127568, 0.566949, 0.550556]),
            (1.0, [0.993248, 0.906157, 0.143936]),
        ];
        for (t, rgb) in table {
            let got = viridis(t);
            for k in 0..3 {
                let want = (rgb[k] * 255.0_f64).round() as i32;
                assert!((got[k] as i32 - want).abs() <= LEVEL_TOL, "t={t}: {got:?}");
            }
        }
    }

    #[test]
    fn viridis_is_monotone_in_lightness_and_clamps() {
        let lum = |c: [u8; 3]| 0.2126 * c[0] as f64 + 0.7152 * c[1] as f64 + 0.0722 * c[2] as f64;
        let mut last = -1.0;
        for i in 0..=100 {
            let l = lum(viridis(i as f64 / 100.0));
            assert!(l >= last - 0.5, "lightness falls at {i}");
            last = l;
        }
        assert_eq!(viridis(-3.0), viridis(0.0));
        assert_eq!(viridis(f64::NAN), viridis(0.0));
        assert_eq!(hex(viridis(2.0)), "#fde725");
    }

    #[test]
    fn labels_contrast_with_the_map() {
        assert_eq!(text_on(viridis(0.0)), "#ffffff");
        assert_eq!(text_on(viridis(1.0)), "#000000");
    }
}

//! Axis ticks for the charts: "nice" steps of 1, 2 or 5 × 10ⁿ (common practice in chart layout).
//!
//! Owns tick placement and tick-label formatting. Must not know about ducts.

/// A step of 1, 2, 2.5 or 5 × 10ⁿ giving about `target` intervals over `span`.
pub fn nice_step(span: f64, target: usize) -> f64 {
    if !(span.is_finite() && span > 0.0) || target == 0 {
        return 1.0;
    }
    let raw = span / target as f64;
    let mag = 10f64.powf(raw.log10().floor());
    let f = raw / mag;
    let nice = if f <= 1.0 {
        1.0
    } else if f <= 2.0 {
        2.0
    } else if f <= 2.5 {
        2.5
    } else if f <= 5.0 {
        5.0
    } else {
        10.0
    };
    nice * mag
}

/// Ticks at multiples of a nice step covering [`lo`, `hi`] (the first at or below `lo`, the last
/// at or above `hi`), at most 50 of them.
pub fn ticks_covering(lo: f64, hi: f64, target: usize) -> Vec<f64> {
    let step = nice_step(hi - lo, target);
    let start = (lo / step).floor() * step;
    let mut out = Vec::new();
    let mut i = 0;
    loop {
        let v = start + step * i as f64;
        out.push(v);
        if v >= hi - step * 1e-9 || out.len() >= 50 {
            break;
        }
        i += 1;
    }
    out
}

/// Ticks at multiples of a nice step strictly within [`lo`, `hi`].
pub fn ticks_within(lo: f64, hi: f64, target: usize) -> Vec<f64> {
    let step = nice_step(hi - lo, target);
    let start = (lo / step).ceil() * step;
    let mut out = Vec::new();
    let mut v = start;
    while v <= hi + step * 1e-9 && out.len() < 50 {
        out.push(v);
        v += step;
    }
    out
}

/// Decimals needed to print multiples of `step` exactly.
pub fn decimals_for(step: f64) -> usize {
    if !(step.is_finite() && step > 0.0) {
        return 0;
    }
    let mut d = 0;
    while d < 6
        && ((step * 10f64.powi(d as i32)).round() - step * 10f64.powi(d as i32)).abs() > 1e-6
    {
        d += 1;
    }
    d
}

/// A tick label with a true minus sign.
pub fn label(value: f64, decimals: usize) -> String {
    crate::display::fixed(value, decimals)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn steps_are_one_two_or_five() {
        assert_eq!(nice_step(10.0, 5), 2.0);
        assert_eq!(nice_step(47.0, 5), 10.0);
        assert_eq!(nice_step(0.7, 5), 0.2);
        assert_eq!(nice_step(0.0, 5), 1.0);
    }

    #[test]
    fn ticks_cover_and_stay_within() {
        let t = ticks_covering(0.0, 47.0, 5);
        assert_eq!(t.first().copied(), Some(0.0));
        assert_eq!(t.last().copied(), Some(50.0));
        let w = ticks_within(31.2, 48.9, 4);
        assert!(w.iter().all(|v| (31.2..=48.9).contains(v)));
        assert_eq!(w, vec![35.0, 40.0, 45.0]);
        assert_eq!(decimals_for(0.25), 2);
        assert_eq!(decimals_for(5.0), 0);
    }
}

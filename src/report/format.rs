//! Number formatting for the presentation model: fixed decimals, thousands separators, a true
//! minus.
//!
//! Owns how a number becomes printed text in the report (Typst would print `12.50` as `12.5`, so
//! every number reaches the template as a string made here or by the caller). Must not round for
//! calculation purposes: these functions only print.

/// Fixed decimals, with a true minus sign and no negative zero.
pub fn fixed(value: f64, decimals: usize) -> String {
    let s = format!("{value:.decimals$}");
    if s.trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        return s.trim_start_matches('-').to_string();
    }
    match s.strip_prefix('-') {
        Some(rest) => format!("\u{2212}{rest}"),
        None => s,
    }
}

/// Fixed decimals with thousands separated by commas.
pub fn grouped(value: f64, decimals: usize) -> String {
    let s = fixed(value.abs(), decimals);
    let (int, frac) = match s.split_once('.') {
        Some((i, f)) => (i.to_string(), format!(".{f}")),
        None => (s.clone(), String::new()),
    };
    let mut out = String::new();
    for (i, c) in int.chars().enumerate() {
        if i > 0 && (int.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    let sign = if value < 0.0 && fixed(value, decimals).starts_with('\u{2212}') {
        "\u{2212}"
    } else {
        ""
    };
    format!("{sign}{out}{frac}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formatting_uses_a_true_minus_and_no_negative_zero() {
        assert_eq!(fixed(-0.85, 2), "\u{2212}0.85");
        assert_eq!(fixed(-0.0004, 3), "0.000");
        assert_eq!(grouped(1234567.891, 1), "1,234,567.9");
        assert_eq!(grouped(-5318.8, 0), "\u{2212}5,319");
        assert_eq!(grouped(999.0, 0), "999");
    }
}

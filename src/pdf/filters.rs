//! Stream filters verification needs: `FlateDecode` (zlib, RFC 1950/1951) with an output cap, and
//! the PNG predictors of ISO 32000-1 §7.4.4.4 (used by cross-reference streams).
//!
//! Owns decoding only; the caller decides the cap. An inflate that would exceed the cap stops
//! there: the bytes are never all held.

use std::fmt;

/// Why a stream could not be decoded.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum FilterError {
    /// The decoded data would be larger than the cap.
    TooLarge { cap: usize },
    /// Not valid compressed data.
    Corrupt(String),
    /// A filter this reader does not decode.
    Unsupported(String),
}

impl fmt::Display for FilterError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FilterError::TooLarge { cap } => {
                write!(
                    f,
                    "it inflates beyond the cap of {}",
                    super::bytes_text(*cap)
                )
            }
            FilterError::Corrupt(m) => write!(f, "its compressed data is damaged ({m})"),
            FilterError::Unsupported(n) => write!(f, "its filter `{n}` is not supported"),
        }
    }
}

/// Inflates zlib data, refusing to produce more than `cap` bytes.
pub fn inflate(data: &[u8], cap: usize) -> Result<Vec<u8>, FilterError> {
    use miniz_oxide::inflate::{decompress_to_vec_zlib_with_limit, TINFLStatus};
    match decompress_to_vec_zlib_with_limit(data, cap) {
        Ok(v) => Ok(v),
        Err(e) if e.status == TINFLStatus::HasMoreOutput => Err(FilterError::TooLarge { cap }),
        Err(e) => Err(FilterError::Corrupt(format!("{:?}", e.status))),
    }
}

/// Undoes a PNG predictor (`/Predictor` 10–15) on rows of `columns` × `colors` × `bpc` bits.
pub fn unpredict(
    data: &[u8],
    predictor: i64,
    colors: usize,
    bpc: usize,
    columns: usize,
) -> Result<Vec<u8>, FilterError> {
    if predictor == 1 {
        return Ok(data.to_vec());
    }
    if !(10..=15).contains(&predictor) {
        return Err(FilterError::Unsupported(format!("predictor {predictor}")));
    }
    let bpp = (colors * bpc).div_ceil(8).max(1);
    let row = (columns * colors * bpc).div_ceil(8);
    if row == 0 || colors == 0 || bpc == 0 || row > 1 << 24 {
        return Err(FilterError::Corrupt("predictor row size".into()));
    }
    let mut out = Vec::with_capacity(data.len());
    let mut prev = vec![0u8; row];
    for chunk in data.chunks(row + 1) {
        if chunk.len() < row + 1 {
            break; // a partial last row carries no whole entry
        }
        let kind = chunk[0];
        let mut cur = chunk[1..].to_vec();
        for i in 0..row {
            let left = if i >= bpp { cur[i - bpp] } else { 0 };
            let up = prev[i];
            let up_left = if i >= bpp { prev[i - bpp] } else { 0 };
            let add = match kind {
                0 => 0,
                1 => left,
                2 => up,
                3 => ((u16::from(left) + u16::from(up)) / 2) as u8,
                4 => paeth(left, up, up_left),
                _ => return Err(FilterError::Corrupt(format!("PNG row filter {kind}"))),
            };
            cur[i] = cur[i].wrapping_add(add);
        }
        out.extend_from_slice(&cur);
        prev = cur;
    }
    Ok(out)
}

fn paeth(a: u8, b: u8, c: u8) -> u8 {
    let p = i16::from(a) + i16::from(b) - i16::from(c);
    let (pa, pb, pc) = (
        (p - i16::from(a)).abs(),
        (p - i16::from(b)).abs(),
        (p - i16::from(c)).abs(),
    );
    if pa <= pb && pa <= pc {
        a
    } else if pb <= pc {
        b
    } else {
        c
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn zlib(data: &[u8]) -> Vec<u8> {
        miniz_oxide::deflate::compress_to_vec_zlib(data, 6)
    }

    #[test]
    fn inflates_within_the_cap_and_refuses_beyond_it() {
        let data = vec![b'a'; 100_000];
        let z = zlib(&data);
        assert_eq!(inflate(&z, 100_000).unwrap(), data);
        assert_eq!(
            inflate(&z, 99_999),
            Err(FilterError::TooLarge { cap: 99_999 })
        );
        assert!(matches!(
            inflate(b"not zlib", 1000),
            Err(FilterError::Corrupt(_))
        ));
    }

    #[test]
    fn png_up_predictor_rows() {
        // two rows of 3 bytes, filter 2 (Up): the second row adds the first
        let encoded = [2, 1, 2, 3, 2, 1, 1, 1];
        assert_eq!(
            unpredict(&encoded, 12, 1, 8, 3).unwrap(),
            [1, 2, 3, 2, 3, 4]
        );
        // Sub (1): each byte adds its left neighbour
        assert_eq!(unpredict(&[1, 5, 1, 1], 11, 1, 8, 3).unwrap(), [5, 6, 7]);
        assert!(unpredict(&[9, 0, 0, 0], 12, 1, 8, 3).is_err());
    }
}

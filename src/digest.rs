//! SHA-256 digests and hex text: what a report's attachments and an archive's manifest both
//! fingerprint with. Below `report` and `archive` so neither needs the other for it.

/// Lower-case hex of bytes.
pub fn hex(bytes: &[u8]) -> String {
    let mut s = String::with_capacity(bytes.len() * 2);
    for b in bytes {
        s.push_str(&format!("{b:02x}"));
    }
    s
}

/// SHA-256 of bytes as hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::{Digest, Sha256};
    hex(&Sha256::digest(bytes))
}

//! Who signed a document, in words, and whether that counts under the trust list in force.
//!
//! Four statuses: **trusted** (a valid signature by a key in the trust list, reported with the
//! list's name for it), **unknown-key** (a valid signature by a key outside the trust list, or
//! when no trust list is given), **unsigned**, **invalid** (a signature that does not verify, a
//! signature removed from a document whose sign-off block names a signer, a signature by another
//! key than the one the sign-off block names). With a trust list in force, only trusted counts.

use crate::archive::manifest::{Manifest, FORMAT_V1};
use crate::archive::seal::SealSignatureState;
use crate::archive::trust::TrustList;
use serde::Serialize;

/// The signature status of a verdict.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum SignatureStatus {
    Trusted,
    UnknownKey,
    Unsigned,
    Invalid,
}

impl SignatureStatus {
    pub fn name(self) -> &'static str {
        match self {
            SignatureStatus::Trusted => "trusted",
            SignatureStatus::UnknownKey => "unknown-key",
            SignatureStatus::Unsigned => "unsigned",
            SignatureStatus::Invalid => "invalid",
        }
    }
}

/// Whose signatures count.
#[derive(Debug, Clone, Copy)]
pub struct TrustPolicy<'a> {
    pub list: &'a TrustList,
    /// A trust list is in force (given, or set in the configuration): only its keys count.
    pub required: bool,
}

/// The signature part of a verdict.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct SignatureReport {
    pub status: SignatureStatus,
    /// The trust list's name for the signing key (trusted signatures only).
    pub signer: Option<String>,
    /// The signer's name as the document's sign-off block shows it.
    pub shown_name: Option<String>,
    /// Fingerprint of the key that made the signature (or that the document names).
    pub key_fingerprint: Option<String>,
    /// Whether the signature counts under the trust policy in force.
    pub accepted: bool,
    /// What was found, in words.
    pub detail: String,
}

impl SignatureReport {
    fn new(status: SignatureStatus, accepted: bool, detail: String) -> Self {
        SignatureReport {
            status,
            signer: None,
            shown_name: None,
            key_fingerprint: None,
            accepted,
            detail,
        }
    }

    /// A file that could not be read far enough to find a signature.
    pub fn unreadable(why: &str) -> Self {
        SignatureReport::new(
            SignatureStatus::Invalid,
            false,
            format!("cannot be checked: {why}"),
        )
    }

    /// `signed by dana-ferrow (trusted)`, `unknown key 3f2a …`, `unsigned`, `invalid signature`.
    pub fn short(&self) -> String {
        match self.status {
            SignatureStatus::Trusted => format!(
                "signed by {} (trusted)",
                self.signer.as_deref().unwrap_or("?")
            ),
            SignatureStatus::UnknownKey => format!(
                "unknown key {}",
                self.key_fingerprint.as_deref().unwrap_or("?")
            ),
            SignatureStatus::Unsigned => "unsigned".into(),
            SignatureStatus::Invalid => "invalid signature".into(),
        }
    }

    /// What a review's `signer` column shows: the trusted name, `unknown key`, `unsigned` or
    /// `invalid`.
    pub fn column(&self) -> String {
        match self.status {
            SignatureStatus::Trusted => self.signer.clone().unwrap_or_default(),
            SignatureStatus::UnknownKey => "unknown key".into(),
            SignatureStatus::Unsigned => "unsigned".into(),
            SignatureStatus::Invalid => "invalid".into(),
        }
    }
}

/// Judges the signature of a document from its manifest (who the sign-off block names) and the
/// state of its seal's signature (or, for a first-format report, of its manifest signature).
pub fn judge(
    manifest: Option<&Manifest>,
    state: SealSignatureState,
    policy: TrustPolicy<'_>,
) -> SignatureReport {
    let shown = manifest.and_then(|m| m.signer.as_ref());
    let first_format = manifest.is_some_and(|m| m.format == FORMAT_V1);
    let required_note = if policy.required {
        "; a trust list is in force, so only a signature by one of its keys counts"
    } else {
        ""
    };
    let mut r = match state {
        SealSignatureState::Invalid(reason) => {
            SignatureReport::new(SignatureStatus::Invalid, false, reason)
        }
        SealSignatureState::Unsigned => match shown {
            Some(s) => SignatureReport::new(
                SignatureStatus::Invalid,
                false,
                format!(
                    "the sign-off block names signer `{}` (key {}) but the document carries no signature: it was removed",
                    s.name,
                    s.key().map(|k| k.fingerprint()).unwrap_or_else(|| "damaged".into())
                ),
            ),
            None => SignatureReport::new(
                SignatureStatus::Unsigned,
                !policy.required,
                format!("no signature{required_note}"),
            ),
        },
        SealSignatureState::Valid(key) => {
            let fp = key.fingerprint();
            let r = match shown {
                Some(s) if s.key().as_ref() != Some(&key) => SignatureReport::new(
                    SignatureStatus::Invalid,
                    false,
                    format!(
                        "the signature is by key {fp}, but the sign-off block names `{}` with key {}",
                        s.name,
                        s.key().map(|k| k.fingerprint()).unwrap_or_else(|| "damaged".into())
                    ),
                ),
                None if !first_format => SignatureReport::new(
                    SignatureStatus::Invalid,
                    false,
                    format!(
                        "signed by key {fp}, but the document was made unsigned (its sign-off block names no signer)"
                    ),
                ),
                _ => match policy.list.name_of(&key) {
                    Some(name) => {
                        let mismatch = shown.filter(|s| s.name != name);
                        let mut r = match mismatch {
                            Some(s) => SignatureReport::new(
                                SignatureStatus::Trusted,
                                false,
                                format!(
                                    "signed by key {fp}, which the trust list knows as `{name}`, but the sign-off block shows the name `{}`",
                                    s.name
                                ),
                            ),
                            None => SignatureReport::new(
                                SignatureStatus::Trusted,
                                true,
                                format!("signed by {name} (key {fp}), a key in the trust list"),
                            ),
                        };
                        r.signer = Some(name.to_string());
                        r
                    }
                    None => SignatureReport::new(
                        SignatureStatus::UnknownKey,
                        !policy.required,
                        format!(
                            "signed by a key not in {}: key {fp}{}{}",
                            if policy.list.is_empty() {
                                "any trust list (none given: --trust or --key names the keys whose signatures count)"
                            } else {
                                "the trust list"
                            },
                            shown
                                .map(|s| format!(", which the document calls `{}`", s.name))
                                .unwrap_or_default(),
                            required_note
                        ),
                    ),
                },
            };
            r.with_key(fp)
        }
    };
    r.shown_name = shown.map(|s| s.name.clone());
    if r.key_fingerprint.is_none() {
        r.key_fingerprint = shown.and_then(|s| s.key()).map(|k| k.fingerprint());
    }
    r
}

impl SignatureReport {
    fn with_key(mut self, fp: String) -> Self {
        self.key_fingerprint = Some(fp);
        self
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::archive::manifest::SignerEntry;
    use crate::archive::SecretKey;

    fn manifest(signer: Option<(&str, &SecretKey)>) -> Manifest {
        let mut m = Manifest::new("annulus test", "epa-method-2", "2026-10-14", vec![]);
        m.signer = signer.map(|(n, k)| SignerEntry::new(n, &k.public()));
        m
    }

    #[test]
    fn every_status_in_words() {
        let dana = SecretKey::from_seed([1; 32]);
        let erin = SecretKey::from_seed([2; 32]);
        let mut list = TrustList::new();
        list.add("dana-ferrow", dana.public()).unwrap();
        let none = TrustList::new();
        let open = TrustPolicy {
            list: &none,
            required: false,
        };
        let strict = TrustPolicy {
            list: &list,
            required: true,
        };
        let signed = manifest(Some(("dana-ferrow", &dana)));
        let valid = SealSignatureState::Valid(dana.public());

        let r = judge(Some(&signed), valid.clone(), strict);
        assert_eq!(r.status, SignatureStatus::Trusted);
        assert!(r.accepted);
        assert_eq!(r.signer.as_deref(), Some("dana-ferrow"));
        assert_eq!(r.column(), "dana-ferrow");

        let r = judge(Some(&signed), valid.clone(), open);
        assert_eq!(r.status, SignatureStatus::UnknownKey);
        assert!(
            r.accepted,
            "no trust list: an unknown key is reported, not failed"
        );
        assert!(r.detail.contains("none given"), "{}", r.detail);
        assert_eq!(r.column(), "unknown key");

        let by_erin = manifest(Some(("erin", &erin)));
        let r = judge(
            Some(&by_erin),
            SealSignatureState::Valid(erin.public()),
            strict,
        );
        assert_eq!(r.status, SignatureStatus::UnknownKey);
        assert!(!r.accepted, "with a trust list, an outside signer fails");

        // signature removed, signature by another key, signature added to an unsigned report
        let r = judge(Some(&signed), SealSignatureState::Unsigned, open);
        assert_eq!(r.status, SignatureStatus::Invalid);
        assert!(r.detail.contains("it was removed"), "{}", r.detail);
        let r = judge(
            Some(&signed),
            SealSignatureState::Valid(erin.public()),
            open,
        );
        assert_eq!(r.status, SignatureStatus::Invalid);
        assert!(r.detail.contains("names `dana-ferrow`"), "{}", r.detail);
        let r = judge(Some(&manifest(None)), valid.clone(), open);
        assert_eq!(r.status, SignatureStatus::Invalid);

        // unsigned: fine without a trust list, not accepted with one
        let r = judge(Some(&manifest(None)), SealSignatureState::Unsigned, open);
        assert_eq!((r.status, r.accepted), (SignatureStatus::Unsigned, true));
        let r = judge(Some(&manifest(None)), SealSignatureState::Unsigned, strict);
        assert_eq!((r.status, r.accepted), (SignatureStatus::Unsigned, false));

        // the page shows another name than the trust list gives the key
        let renamed = manifest(Some(("D. Ferrow", &dana)));
        let r = judge(Some(&renamed), valid, strict);
        assert_eq!(r.status, SignatureStatus::Trusted);
        assert!(!r.accepted);
        assert!(r.detail.contains("`D. Ferrow`"), "{}", r.detail);
    }
}

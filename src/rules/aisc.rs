//! `aisc-cb`: AISC 360-16 Chapter F for doubly symmetric I-members: the
//! lateral-torsional buckling modification factor Cb of Eq. F1-1 from the
//! quarter-point moments of the unbraced segment, Cb = 1.0 for a cantilever
//! with an unbraced free end, and the elastic critical stress of Eq. F2-4.
//!
//! ```text
//! Cb  = 12.5·Mmax / (2.5·Mmax + 3·MA + 4·MB + 3·MC)                       (F1-1)
//! Fcr = Cb·π²E/(Lb/rts)² · √(1 + 0.078·(J·c/(Sx·ho))·(Lb/rts)²)            (F2-4)
//! ```
//!
//! With c = 1, Cw = Iy·ho²/4 and rts² = √(Iy·Cw)/Sx = Iy·ho/(2·Sx), Mcr = Fcr·Sx is
//!
//! ```text
//! Mcr = Cb·(π²·E·Iy·ho/(2·Lb²))·√(1 + 0.156·J·Lb²/(Iy·ho²))
//! ```
//!
//! and, reading the family's κ with the rule's own E = 29 000 ksi and
//! G = 11 200 ksi (κ² = π²·E·Cw/(G·J·L²), so J·L²/(Iy·ho²) = π²·E/(4·G·κ²)),
//! in the project's terms (Lb = L, μ = Mcr·L/√(E·Iy·G·J)):
//!
//! ```text
//! μ = Cb·π·√(κ² + a),     a = 0.078·(π²/2)·(E/G) = 0.99666
//! ```
//!
//! against the exact fork solution μ0 = π·√(1 + κ²) under uniform moment:
//! the rule is 0.17 % low at κ → 0 and within 0.1 % for κ ≥ 0.82 (the
//! rounded 0.078 corresponds to E/G = 2.6, not to the rule's own 2.589).
//! The rule has no load-height term (no published guidance for one was
//! read): it ignores ζ, which is what its ratio map shows. End restraints
//! beyond a fork (lateral rotation, warping) and in-plane fixity enter only
//! through the moment diagram; the rule's Lb = L ignores them.
//!
//! # References
//! - ANSI/AISC 360-16, *Specification for Structural Steel Buildings*, American Institute of
//!   Steel Construction, Chicago 2016: §F1 Eq. F1-1 (Cb), §F2.2 Eq. F2-4 (Fcr), §B / Table
//!   notation E = 29 000 ksi, G = 11 200 ksi; Cb = 1.0 for cantilevers with an unbraced free end
//!   (§F1 and its Commentary). Equations from memory, checked as arithmetic against the
//!   closed forms (tests/rules_aisc.rs) as the ltb-atlas reference list §4 describes.

use super::pattern::{Pattern, Span};
use super::{Outcome, RuleInfo};
use std::f64::consts::PI;

/// E of AISC 360-16, ksi.
pub const E_KSI: f64 = 29_000.0;
/// G of AISC 360-16, ksi.
pub const G_KSI: f64 = 11_200.0;

/// The constant a of μ = Cb·π·√(κ² + a) (see the module documentation).
pub fn a_term() -> f64 {
    0.078 * PI * PI / 2.0 * (E_KSI / G_KSI)
}

/// Cb of Eq. F1-1 from |M| at the quarter points and the largest |M|.
///
/// ```text
/// Cb = 12.5·Mmax / (2.5·Mmax + 3·MA + 4·MB + 3·MC)
/// ```
///
/// # References
/// - ANSI/AISC 360-16, §F1, Eq. F1-1.
pub fn cb(m_max: f64, ma: f64, mb: f64, mc: f64) -> f64 {
    12.5 * m_max / (2.5 * m_max + 3.0 * ma.abs() + 4.0 * mb.abs() + 3.0 * mc.abs())
}

/// μ of Eq. F2-4 with c = 1, Cw = Iy·ho²/4, Lb = L (see the module documentation).
///
/// ```text
/// μ = Cb·π·√(κ² + 0.078·(π²/2)·(E/G))
/// ```
///
/// # References
/// - ANSI/AISC 360-16, §F2.2, Eq. F2-4.
pub fn mu_f2_4(cb: f64, kappa: f64) -> f64 {
    cb * PI * (kappa * kappa + a_term()).sqrt()
}

/// Clause, edition, source and limits.
pub fn info() -> RuleInfo {
    RuleInfo {
        name: "aisc-cb".into(),
        clause: "Chapter F: Eq. F1-1 (Cb from quarter-point moments), Cb = 1.0 for cantilevers with an unbraced free end (F1), Eq. F2-4 (Fcr, c = 1, Cw = Iy*ho^2/4), E = 29000 ksi, G = 11200 ksi".into(),
        edition: "ANSI/AISC 360-16".into(),
        source: "ANSI/AISC 360-16 Specification for Structural Steel Buildings, AISC, Chicago 2016, sections F1 and F2 (equations from memory, checked as arithmetic against closed forms)".into(),
        limits: "doubly symmetric prismatic member, one unbraced segment: both ends held laterally and in twist (any other end restraint ignored, Lb = L), or a built-in cantilever with an unbraced free tip (Cb = 1.0); load height ignored (the rule has no load-height term)".into(),
        memory: "the equations F1-1 and F2-4, the constants 0.078, 29000 ksi and 11200 ksi, and the cantilever Cb = 1.0 were typed from memory; F2-4 is checked against the fork closed form (within 0.17 %) by tests/rules_aisc.rs".into(),
        interpretation: "mu = Cb*pi*sqrt(kappa^2 + 0.078*(pi^2/2)*E/G) with the family's kappa read with the rule's E and G; quarter-point moments from the exact in-plane analysis (indeterminate members included); zeta ignored".into(),
    }
}

/// μ by the rule.
pub fn evaluate(p: &Pattern) -> Outcome {
    let cb = match p.span {
        Span::Cantilever { .. } => 1.0,
        Span::Beam { .. } => cb(p.m_max, p.m_abs(0.25), p.m_abs(0.5), p.m_abs(0.75)),
    };
    let what = match p.span {
        Span::Cantilever { .. } => "Cb=1 (cantilever, unbraced free end)".to_string(),
        Span::Beam { .. } => format!("Cb={:.4} (F1-1)", cb),
    };
    Outcome::Applies {
        mu: mu_f2_4(cb, p.kappa),
        factors: what,
    }
}

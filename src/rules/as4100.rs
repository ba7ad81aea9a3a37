//! `as4100`: AS 4100 clause 5.6, the member moment capacity's elastic part
//! for doubly symmetric I-sections: the reference buckling moment Mo with
//! the effective length le = kt·kl·kr·L, and the moment modification factor
//! αm (AS 4100 calls the minor axis y).
//!
//! ```text
//! Mo  = √[(π²·E·Iy/le²)·(G·J + π²·E·Iw/le²)]                  (5.6.1.1(3))
//! Mcr = αm·Mo
//! αm  = 1.7·Mm/√(M2² + M3² + M4²) ≤ 2.5                        (5.6.1.1(2))
//! αm  = 1.75 + 1.05·βm + 0.3·βm² ≤ 2.5    end moments, βm = −ψ  (Table 5.6.1)
//! ```
//!
//! In the project's terms (λ = le/L; E and G appear only as E·Iy, G·J and
//! E·Iw, so the standard's own E = 200 000 MPa and G = 80 000 MPa need no
//! conversion when κ is read with them):
//!
//! ```text
//! μ = αm·(π/λ)·√(1 + κ²/λ²)
//! ```
//!
//! αm: the tabulated value where the pattern matches a row of Table 5.6.1
//! (segments restrained at both ends) or Table 5.6.2 (cantilevers), else the
//! formula for segments restrained at both ends; a cantilever pattern not in
//! Table 5.6.2 is not applicable. kt = 1 (ends fully restrained, F), kr from
//! the lateral rotation restraint of the ends, kl from the load height:
//! shear-centre loads (ζ = 0) and top-flange loads (ζ = κ, the flange
//! centroid of a doubly symmetric I-section) only; other heights are not
//! applicable. Warping restraint is not part of the clause and is ignored.
//!
//! # References
//! - AS 4100-1998, *Steel structures*, Standards Australia, clause 5.6.1.1 (Mo, αm formula),
//!   Tables 5.6.1 and 5.6.2 (αm), 5.6.3(1)–(3) (kt, kl, kr), clause 5.6.3 (effective length).
//!   Every tabulated value and the end-moment αm formula are from memory, kept in
//!   `data/rules/as4100.csv`, marked so in every output and checked against the engine by
//!   tests/rules_tables.rs.

use super::pattern::{InPlane, Pattern, Shape, Span};
use super::{Outcome, RuleInfo, data_rows};
use std::f64::consts::PI;

const DATA: &str = include_str!("../../data/rules/as4100.csv");

/// The rule with its (compiled-in) table values.
#[derive(Debug, Clone)]
pub struct As4100 {
    /// (factor, case) → value, as in `data/rules/as4100.csv`.
    pub values: Vec<(String, String, f64, String)>,
}

impl Default for As4100 {
    fn default() -> Self {
        As4100::new()
    }
}

/// αm by the formula of clause 5.6.1.1(2).
///
/// ```text
/// αm = 1.7·Mm/√(M2² + M3² + M4²) ≤ 2.5
/// ```
///
/// # References
/// - AS 4100-1998, clause 5.6.1.1, Eq. 5.6.1.1(2).
pub fn alpha_m_formula(mm: f64, m2: f64, m3: f64, m4: f64) -> f64 {
    (1.7 * mm / (m2 * m2 + m3 * m3 + m4 * m4).sqrt()).min(2.5)
}

/// αm for end moments (Table 5.6.1, from memory), βm = −ψ (βm positive in
/// double curvature; ψ of this project is +1 for uniform moment).
///
/// ```text
/// αm = 1.75 + 1.05·βm + 0.3·βm² ≤ 2.5
/// ```
///
/// # References
/// - AS 4100-1998, Table 5.6.1 (from memory).
pub fn alpha_m_end_moments(psi: f64) -> f64 {
    let b = -psi;
    (1.75 + 1.05 * b + 0.3 * b * b).min(2.5)
}

/// Reference moment in the project's terms, λ = le/L.
///
/// ```text
/// μo = (π/λ)·√(1 + κ²/λ²)
/// ```
///
/// # References
/// - AS 4100-1998, clause 5.6.1.1, Eq. 5.6.1.1(3).
pub fn mu_o(lambda: f64, kappa: f64) -> f64 {
    PI / lambda * (1.0 + kappa * kappa / (lambda * lambda)).sqrt()
}

impl As4100 {
    /// The rule with the values of `data/rules/as4100.csv`.
    pub fn new() -> As4100 {
        As4100 {
            values: data_rows(DATA)
                .iter()
                .map(|r| {
                    (
                        r[0].to_string(),
                        r[1].to_string(),
                        r[2].parse().expect("number"),
                        r[3].to_string(),
                    )
                })
                .collect(),
        }
    }

    /// A tabulated value.
    pub fn value(&self, factor: &str, case: &str) -> f64 {
        self.values
            .iter()
            .find(|(f, c, _, _)| f == factor && c == case)
            .map(|v| v.2)
            .expect("value in data/rules/as4100.csv")
    }

    /// Clause, edition, source and limits.
    pub fn info(&self) -> RuleInfo {
        let mem: Vec<String> = self
            .values
            .iter()
            .map(|(f, c, v, r)| format!("{f} {c} = {v} ({r})"))
            .collect();
        RuleInfo {
            name: "as4100".into(),
            clause: "clause 5.6.1.1 (Mo, alpha_m by Eq. 5.6.1.1(2) <= 2.5), Tables 5.6.1/5.6.2 (alpha_m), 5.6.3 (le = kt*kl*kr*L, Tables 5.6.3(1)-(3))".into(),
            edition: "AS 4100-1998".into(),
            source: "AS 4100-1998 Steel structures, Standards Australia, section 5.6 (from memory: no copy was read)".into(),
            limits: "doubly symmetric prismatic member; segment with both ends fully restrained (F: lateral displacement and twist held; kt = 1) or a built-in cantilever with an unrestrained tip (F-U); loads at the shear centre (zeta = 0) or on the top flange (zeta = kappa) only; alpha_m tabulated where the pattern matches, else the formula (segments restrained at both ends only); warping restraint ignored".into(),
            memory: format!("end-moment alpha_m = 1.75 + 1.05*beta_m + 0.3*beta_m^2 <= 2.5 (Table 5.6.1); {}", mem.join("; ")),
            interpretation: "mu = alpha_m*(pi/lambda)*sqrt(1 + kappa^2/lambda^2), lambda = le/L, with the family's kappa read with the standard's E and G (no conversion needed); quarter-point moments from the exact in-plane analysis".into(),
        }
    }

    /// μ by the rule.
    pub fn evaluate(&self, p: &Pattern) -> Outcome {
        let Some(zeta) = p.zeta else {
            return Outcome::NotApplicable(
                "loads at different heights or in different directions".into(),
            );
        };
        let has_transverse = !matches!(p.shape, Shape::EndMoments { .. });
        let top =
            has_transverse && p.kappa > 0.0 && (zeta - p.kappa).abs() <= 1e-9 * p.kappa.max(1.0);
        let centre = !has_transverse || zeta.abs() <= 1e-12;
        if !top && !centre {
            return Outcome::NotApplicable(
                "load height neither at the shear centre (zeta = 0) nor on the top flange (zeta = kappa): the clause gives no kl for it".into(),
            );
        }
        let (alpha, a_txt, kl, kr) = match p.span {
            Span::Cantilever { .. } => {
                let case = match p.shape {
                    Shape::PointTip => "cantilever-point-tip",
                    Shape::Uniform => "cantilever-uniform",
                    s => {
                        return Outcome::NotApplicable(format!(
                            "cantilever with {}: not in Table 5.6.2",
                            s.name()
                        ));
                    }
                };
                let kl = if top {
                    self.value("kl", "cantilever-top-flange")
                } else {
                    self.value("kl", "shear-centre")
                };
                (
                    self.value("alpha_m", case),
                    "Table 5.6.2, memory".to_string(),
                    kl,
                    self.value("kr", "none"),
                )
            }
            Span::Beam {
                lateral_rotation_fixed,
                in_plane,
                ..
            } => {
                let (alpha, txt) = match (p.shape, in_plane) {
                    (Shape::Uniform, InPlane::Simple) => (
                        self.value("alpha_m", "uniform-simple"),
                        "Table 5.6.1, memory".to_string(),
                    ),
                    (Shape::PointMid, InPlane::Simple) => (
                        self.value("alpha_m", "point-mid-simple"),
                        "Table 5.6.1, memory".to_string(),
                    ),
                    (Shape::EndMoments { psi }, _) => (
                        alpha_m_end_moments(psi),
                        "Table 5.6.1 end-moment formula, memory".to_string(),
                    ),
                    _ => (
                        alpha_m_formula(p.m_max, p.m_abs(0.25), p.m_abs(0.5), p.m_abs(0.75)),
                        "Eq. 5.6.1.1(2)".to_string(),
                    ),
                };
                let kl = if top {
                    self.value("kl", "restrained-both-ends-top-flange")
                } else {
                    self.value("kl", "shear-centre")
                };
                let kr = match lateral_rotation_fixed {
                    [true, true] => self.value("kr", "both-ends"),
                    [false, false] => self.value("kr", "none"),
                    _ => self.value("kr", "one-end"),
                };
                (alpha, txt, kl, kr)
            }
        };
        let kt = self.value("kt", "fully-restrained");
        let lambda = kt * kl * kr;
        Outcome::Applies {
            mu: alpha * mu_o(lambda, p.kappa),
            factors: format!(
                "alpha_m={alpha:.4} ({a_txt}) kt={kt} kl={kl} kr={kr} (memory) le/L={}",
                crate::sweep::fmt_num(lambda)
            ),
        }
    }
}

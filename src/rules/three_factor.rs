//! `three-factor` and `three-factor-env`: the three-factor formula with C1,
//! C2 from published tables, k = kw = 1 (forks laterally at both ends),
//! doubly symmetric prismatic members.
//!
//! ```text
//! μ = C1·π·[√(1 + κ² + (C2·ζ)²) − C2·ζ]       ζ destabilising positive
//! ```
//!
//! The tables are compiled-in data files (`data/rules/ncci-sn003.csv`,
//! `data/rules/env-1993-annex-f.csv`) that state their source and the
//! provenance of each value. A pattern is covered only when it matches a
//! table row exactly (ψ to 1e-9): the project does not interpolate between
//! ψ entries because no clause allowing it was read.
//!
//! # References
//! - NCCI SN003a-EN-EU, *Elastic critical moment for lateral torsional buckling*, Access Steel
//!   (SCI / CTICM), §3, Tables 3.1 and 3.2; values as listed in the ltb-atlas reference list
//!   (shared reference-values §3), ψ = −1 and C2 of the fixed-end uniform load from memory.
//! - ENV 1993-1-1:1992, *Eurocode 3: Design of steel structures, Part 1.1*, Annex F, Table F.1.2
//!   (C1 of the uniform and the central point load, k = 1), as listed in the same reference list.

use super::pattern::{InPlane, Pattern, Shape, Span};
use super::{Outcome, RuleInfo, data_rows, three_factor_mu};

const SN003: &str = include_str!("../../data/rules/ncci-sn003.csv");
const ENV: &str = include_str!("../../data/rules/env-1993-annex-f.csv");

/// One table row.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// Table number.
    pub table: String,
    /// Load pattern: "end-moments", "uniform", "point-mid".
    pub pattern: String,
    /// In-plane ends: "simple" or "fixed".
    pub in_plane: String,
    /// ψ (end moments only).
    pub psi: Option<f64>,
    /// C1.
    pub c1: f64,
    /// C2 (None: not tabulated or not citable).
    pub c2: Option<f64>,
    /// Provenance of C1 ("listed" or "memory").
    pub c1_provenance: String,
    /// Provenance of C2.
    pub c2_provenance: String,
}

/// A three-factor rule: its table and its description.
#[derive(Debug, Clone)]
pub struct ThreeFactor {
    /// Rule name.
    pub name: &'static str,
    /// The rows.
    pub entries: Vec<Entry>,
}

fn parse(text: &str) -> Vec<Entry> {
    let num = |s: &str| (!s.trim().is_empty()).then(|| s.trim().parse::<f64>().expect("number"));
    data_rows(text)
        .iter()
        .map(|r| Entry {
            table: r[0].to_string(),
            pattern: r[1].to_string(),
            in_plane: r[2].to_string(),
            psi: num(&r[3]),
            c1: num(&r[4]).expect("C1 given"),
            c2: num(&r[5]),
            c1_provenance: r[6].to_string(),
            c2_provenance: r[7].to_string(),
        })
        .collect()
}

impl ThreeFactor {
    /// NCCI SN003 Tables 3.1 and 3.2.
    pub fn sn003() -> ThreeFactor {
        ThreeFactor {
            name: "three-factor",
            entries: parse(SN003),
        }
    }
    /// ENV 1993-1-1 Annex F, only the values that could be cited.
    pub fn env() -> ThreeFactor {
        ThreeFactor {
            name: "three-factor-env",
            entries: parse(ENV),
        }
    }

    /// Clause, edition, source and limits.
    pub fn info(&self) -> RuleInfo {
        let memory: Vec<String> = self
            .entries
            .iter()
            .flat_map(|e| {
                let what = match e.psi {
                    Some(p) => format!("{} psi={}", e.pattern, p),
                    None => format!("{} ({} ends)", e.pattern, e.in_plane),
                };
                let mut v = Vec::new();
                if e.c1_provenance == "memory" {
                    v.push(format!("C1 of {what} (Table {})", e.table));
                }
                if e.c2_provenance == "memory" {
                    v.push(format!("C2 of {what} (Table {})", e.table));
                }
                v
            })
            .collect();
        let (clause, edition, source) = if self.name == "three-factor" {
            (
                "three-factor formula, section 3, Tables 3.1 (end moments) and 3.2 (transverse loads), k = kw = 1",
                "NCCI SN003a-EN-EU (Access Steel)",
                "NCCI SN003a-EN-EU, Elastic critical moment for lateral torsional buckling, Access Steel (SCI/CTICM); values as listed in the ltb-atlas reference list (reference-values section 3)",
            )
        } else {
            (
                "Annex F (informative), F.1.2, Table F.1.2 (transverse loads), k = 1: C1 of the uniform and the central point load only",
                "ENV 1993-1-1:1992",
                "ENV 1993-1-1:1992 Eurocode 3 Part 1.1, Annex F; C1 values as listed in the ltb-atlas reference list (reference-values section 3); no C2 and no end-moment entry could be cited, so cases needing them are not applicable",
            )
        };
        RuleInfo {
            name: self.name.to_string(),
            clause: clause.into(),
            edition: edition.into(),
            source: source.into(),
            limits: "doubly symmetric prismatic member, forks at both ends laterally (lateral rotation and warping free: k = kw = 1), no intermediate restraint, one tabulated load pattern (psi exactly a tabulated value; no interpolation), simple or (where tabulated) fixed in-plane ends; C2 needed when zeta != 0".into(),
            memory: memory.join("; "),
            interpretation: "mu = C1*pi*[sqrt(1 + kappa^2 + (C2*zeta)^2) - C2*zeta] with zeta positive on the destabilising side (above the shear centre for gravity loads); C1 and C2 independent of kappa as tabulated".into(),
        }
    }

    /// The table row covering a pattern, or why none does.
    pub fn entry(&self, p: &Pattern) -> Result<&Entry, String> {
        let Span::Beam {
            lateral_rotation_fixed,
            warping_fixed,
            in_plane,
        } = p.span
        else {
            return Err("cantilever: the tables are for members supported at both ends".into());
        };
        if lateral_rotation_fixed != [false, false] || warping_fixed != [false, false] {
            return Err("ends not forks (lateral rotation or warping held): the rule is read with k = kw = 1 only".into());
        }
        let ip = match in_plane {
            InPlane::Simple => "simple",
            InPlane::Fixed => "fixed",
            InPlane::Other => return Err("in-plane ends neither both simple nor both fixed".into()),
        };
        let (pat, psi) = match p.shape {
            Shape::EndMoments { psi } => ("end-moments", Some(psi)),
            Shape::Uniform => ("uniform", None),
            Shape::PointMid => ("point-mid", None),
            s => return Err(format!("{} not tabulated", s.name())),
        };
        self.entries
            .iter()
            .find(|e| {
                e.pattern == pat
                    && e.in_plane == ip
                    && match (e.psi, psi) {
                        (Some(a), Some(b)) => (a - b).abs() <= 1e-9,
                        (None, None) => true,
                        _ => false,
                    }
            })
            .ok_or_else(|| match psi {
                Some(v) => format!(
                    "psi = {} is not a tabulated value with {ip} in-plane ends (no interpolation)",
                    crate::sweep::fmt_num(v)
                ),
                None => format!(
                    "{} with {ip} in-plane ends is not tabulated",
                    p.shape.name()
                ),
            })
    }

    /// μ by the rule.
    pub fn evaluate(&self, p: &Pattern) -> Outcome {
        let e = match self.entry(p) {
            Ok(e) => e,
            Err(r) => return Outcome::NotApplicable(r),
        };
        let Some(zeta) = p.zeta else {
            return Outcome::NotApplicable(
                "loads at different heights or in different directions".into(),
            );
        };
        let c2 = match (e.c2, zeta != 0.0) {
            (Some(c2), _) => c2,
            (None, false) => 0.0,
            (None, true) => {
                return Outcome::NotApplicable(
                    "zeta != 0 needs C2, which this table does not give".into(),
                );
            }
        };
        let mark = |prov: &str| {
            if prov == "memory" {
                " (from memory)"
            } else {
                ""
            }
        };
        let factors = match e.c2 {
            Some(c2) => format!(
                "C1={}{} C2={}{} (Table {})",
                e.c1,
                mark(&e.c1_provenance),
                c2,
                mark(&e.c2_provenance),
                e.table
            ),
            None => format!("C1={}{} (Table {})", e.c1, mark(&e.c1_provenance), e.table),
        };
        Outcome::Applies {
            mu: three_factor_mu(e.c1, c2, p.kappa, zeta),
            factors,
        }
    }
}

//! Simplified code rules for the elastic critical moment, evaluated in the
//! project's dimensionless terms, and their comparison with the engine.
//!
//! Every rule returns μ = Mcr·L/√(E·Iz·G·It) with Mcr the largest |M| along
//! the member (domain notes), or `not-applicable` with the reason when the
//! member, its supports or its loads fall outside what the rule's clause
//! covers: a rule never extrapolates silently. Each rule carries its clause,
//! edition, source and limits ([`RuleInfo`]), and every output prints them.
//!
//! Built-in rules: [`three_factor`] (NCCI SN003 Tables 3.1–3.2, and the ENV
//! 1993-1-1 Annex F values that could be cited), [`aisc`] (AISC 360-16
//! Eq. F1-1 and F2-4), [`as4100`] (AS 4100 clause 5.6). Office rules
//! ([`office`]) come from the spec: an expression in κ, ζ and ψ or a
//! coefficient table. Numerics only: no I/O (data tables are compiled in;
//! office tables arrive as text).
//!
//! Load heights: rules see ζ on the destabilising side positive (a gravity
//! load above the shear centre, an uplift load below it), which is the sign
//! convention of the published three-factor formula's zg; the family's ζ
//! (geometric, up positive) is converted in [`pattern::classify`].

pub mod aisc;
pub mod as4100;
pub mod compare;
pub mod office;
pub mod pattern;
pub mod three_factor;

use pattern::Pattern;

/// Names of the built-in rules (the values a family's `rules` key accepts
/// besides the office rules of the spec).
pub const BUILT_IN: [&str; 4] = ["three-factor", "three-factor-env", "aisc-cb", "as4100"];

/// Clause, edition, source and limits of a rule, printed with every output.
#[derive(Debug, Clone, PartialEq)]
pub struct RuleInfo {
    /// Rule name (file names and the `rules` key).
    pub name: String,
    /// Clause, equation and table numbers.
    pub clause: String,
    /// Edition of the document.
    pub edition: String,
    /// Full citation of the document and of where its values were taken from.
    pub source: String,
    /// What the rule covers; everything else is not applicable.
    pub limits: String,
    /// Values typed from memory rather than read in the document ("" when none).
    pub memory: String,
    /// How the project reads the rule (conversions, interpretations).
    pub interpretation: String,
}

/// The outcome of a rule for one member.
#[derive(Debug, Clone, PartialEq)]
pub enum Outcome {
    /// The rule covers the member.
    Applies {
        /// μ by the rule.
        mu: f64,
        /// The factors used, for the output's extra column.
        factors: String,
    },
    /// The rule does not cover the member, with the reason.
    NotApplicable(String),
}

/// A rule ready to evaluate.
// A handful of rules per run: the size difference of the variants does not matter.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone)]
pub enum Rule {
    /// Three-factor formula with tabulated C1, C2 (NCCI SN003 or ENV Annex F).
    ThreeFactor(three_factor::ThreeFactor),
    /// AISC 360-16 Chapter F: Cb (F1-1) and Eq. F2-4.
    AiscCb,
    /// AS 4100 clause 5.6.
    As4100(as4100::As4100),
    /// An office rule declared in the spec.
    Office(office::OfficeRule),
}

impl Rule {
    /// A built-in rule by name.
    pub fn built_in(name: &str) -> Option<Rule> {
        match name {
            "three-factor" => Some(Rule::ThreeFactor(three_factor::ThreeFactor::sn003())),
            "three-factor-env" => Some(Rule::ThreeFactor(three_factor::ThreeFactor::env())),
            "aisc-cb" => Some(Rule::AiscCb),
            "as4100" => Some(Rule::As4100(as4100::As4100::new())),
            _ => None,
        }
    }

    /// Clause, edition, source and limits.
    pub fn info(&self) -> RuleInfo {
        match self {
            Rule::ThreeFactor(t) => t.info(),
            Rule::AiscCb => aisc::info(),
            Rule::As4100(a) => a.info(),
            Rule::Office(o) => o.info(),
        }
    }

    /// Evaluate the rule for a member.
    pub fn evaluate(&self, m: &crate::model::Member) -> Outcome {
        let p = match pattern::classify(m) {
            Ok(p) => p,
            Err(reason) => return Outcome::NotApplicable(reason),
        };
        self.evaluate_pattern(&p)
    }

    /// Evaluate the rule for a classified member.
    pub fn evaluate_pattern(&self, p: &Pattern) -> Outcome {
        match self {
            Rule::ThreeFactor(t) => t.evaluate(p),
            Rule::AiscCb => aisc::evaluate(p),
            Rule::As4100(a) => a.evaluate(p),
            Rule::Office(o) => o.evaluate(p),
        }
    }
}

/// The three-factor form with k = kw = 1 in the project's terms:
///
/// ```text
/// μ = C1·π·[√(1 + κ² + (C2·ζ)²) − C2·ζ]       (ζ destabilising positive)
/// ```
///
/// # References
/// - NCCI SN003a-EN-EU, *Elastic critical moment for lateral torsional buckling*, Access Steel,
///   §3 (Mcr = C1·π²EIz/(kL)²·{√[(k/kw)²·Iw/Iz + (kL)²GIt/(π²EIz) + (C2·zg)²] − C2·zg}).
/// - ltb-atlas domain notes, "Three-factor form" (conversion to κ, ζ).
pub fn three_factor_mu(c1: f64, c2: f64, kappa: f64, zeta: f64) -> f64 {
    let c = c2 * zeta;
    c1 * std::f64::consts::PI * ((1.0 + kappa * kappa + c * c).sqrt() - c)
}

/// Parse a data table compiled into the crate (`#` lines are comments).
pub(crate) fn data_rows(text: &str) -> Vec<csv::StringRecord> {
    let mut r = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .has_headers(true)
        .from_reader(text.as_bytes());
    r.records()
        .map(|x| x.expect("compiled-in table parses"))
        .collect()
}

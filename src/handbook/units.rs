//! Print units of a handbook: SI (kN, m, mm, MPa) or US customary (kip, ft,
//! in, ksi). Only printed tables and the front page convert; machine CSV
//! columns keep their contracted names and the dimensionless values.
//!
//! ```text
//! 1 in = 25.4 mm (exact)      1 ft = 0.3048 m (exact)
//! 1 kip = 4.4482216152605 kN  1 ksi = 6.894757293168 MPa
//! 1 kip·ft = 1.3558179483314 kN·m
//! ```
//!
//! # References
//! - NIST Special Publication 811, "Guide for the Use of the International System of Units (SI)",
//!   2008 edition, appendix B.8 (factors for units listed alphabetically): foot, inch, kip, ksi.

/// The unit system of a handbook's printed values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Units {
    /// kN, m, mm, MPa.
    Si,
    /// kip, ft, in, ksi.
    Us,
}

/// mm per inch (exact, NIST SP 811 B.8).
pub const MM_PER_IN: f64 = 25.4;
/// m per foot (exact, NIST SP 811 B.8).
pub const M_PER_FT: f64 = 0.3048;
/// kN per kip (NIST SP 811 B.8: 1 kip = 4.448 222 E+03 N; pound-force exact as 4.4482216152605 N).
pub const KN_PER_KIP: f64 = 4.448_221_615_260_5;
/// MPa per ksi (NIST SP 811 B.8: 1 ksi = 6.894 757 E+06 Pa).
pub const MPA_PER_KSI: f64 = 6.894_757_293_168;

impl Units {
    /// The spec's spelling: "SI" or "US".
    pub fn name(self) -> &'static str {
        match self {
            Units::Si => "SI",
            Units::Us => "US",
        }
    }
    /// Unit of member lengths.
    pub fn length(self) -> &'static str {
        match self {
            Units::Si => "m",
            Units::Us => "ft",
        }
    }
    /// Unit of section dimensions.
    pub fn dim(self) -> &'static str {
        match self {
            Units::Si => "mm",
            Units::Us => "in",
        }
    }
    /// Unit of stresses and moduli.
    pub fn stress(self) -> &'static str {
        match self {
            Units::Si => "MPa",
            Units::Us => "ksi",
        }
    }
    /// Unit of moments.
    pub fn moment(self) -> &'static str {
        match self {
            Units::Si => "kN·m",
            Units::Us => "kip·ft",
        }
    }
    /// A member length in print units → m.
    pub fn length_to_m(self, x: f64) -> f64 {
        match self {
            Units::Si => x,
            Units::Us => x * M_PER_FT,
        }
    }
    /// A section dimension in mm → print units.
    pub fn dim_from_mm(self, x: f64) -> f64 {
        match self {
            Units::Si => x,
            Units::Us => x / MM_PER_IN,
        }
    }
    /// A stress in print units → MPa.
    pub fn stress_to_mpa(self, x: f64) -> f64 {
        match self {
            Units::Si => x,
            Units::Us => x * MPA_PER_KSI,
        }
    }
    /// A stress in MPa → print units.
    pub fn stress_from_mpa(self, x: f64) -> f64 {
        match self {
            Units::Si => x,
            Units::Us => x / MPA_PER_KSI,
        }
    }
    /// A moment in kN·m → print units.
    pub fn moment_from_knm(self, x: f64) -> f64 {
        match self {
            Units::Si => x,
            Units::Us => x / (KN_PER_KIP * M_PER_FT),
        }
    }
}

/// `x` rounded down to `d` decimals (a safe-side value where a smaller
/// number is the cautious one: critical moments, factors).
pub fn down(x: f64, d: usize) -> String {
    let s = 10f64.powi(d as i32);
    clean(format!("{:.*}", d, (x * s * (1.0 + 1e-12)).floor() / s))
}

/// `x` rounded up to `d` decimals (a safe-side value where a larger number
/// is the cautious one: ratios, errors, destabilising load heights).
pub fn up(x: f64, d: usize) -> String {
    let s = 10f64.powi(d as i32);
    clean(format!("{:.*}", d, (x * s * (1.0 - 1e-12)).ceil() / s))
}

/// `x` to `d` decimals, nearest (dimensions quoted from a table).
pub fn near(x: f64, d: usize) -> String {
    clean(format!("{:.*}", d, x))
}

fn clean(s: String) -> String {
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn factors_match_nist_sp811() {
        // NIST SP 811 (2008) B.8: kip to newton 4.448 222 E+03; ksi to pascal
        // 6.894 757 E+06; foot-pound-force... kip·ft = 1.355 818 E+03 N·m.
        assert!((KN_PER_KIP - 4.448222).abs() < 1e-6);
        assert!((MPA_PER_KSI - 6.894757).abs() < 1e-6);
        assert!((KN_PER_KIP * M_PER_FT - 1.355818).abs() < 1e-6);
        // E = 29 000 ksi is 199 948 MPa (AISC's modulus; common practice).
        assert!((Units::Us.stress_to_mpa(29000.0) - 199_948.0).abs() < 1.0);
        assert_eq!(Units::Us.dim_from_mm(300.0), 300.0 / 25.4);
        assert_eq!(Units::Si.length_to_m(4.0), 4.0);
    }

    #[test]
    fn safe_side_rounding_goes_the_stated_way() {
        assert_eq!(down(1.23999, 2), "1.23");
        assert_eq!(up(1.23001, 2), "1.24");
        assert_eq!(up(1.23, 2), "1.23");
        assert_eq!(down(1.23, 2), "1.23");
        assert_eq!(down(-0.0001, 2), "-0.01");
        assert_eq!(up(-0.0001, 2), "0.00");
        assert_eq!(near(-0.0001, 2), "0.00");
    }
}

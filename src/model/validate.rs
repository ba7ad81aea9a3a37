//! Checks of a [`Member`] that need no mesh: finite numbers, positions on the
//! member, positive stiffness, something to buckle, no couple at a free end.
//! Mechanisms are found later, by the assembly (a singular stiffness).

use super::{Fixity, Load, Member, Support};

/// What is wrong with a model. `field` is a dotted path in the case schema
/// (for example `load[2].at`) so the case layer can point at file and line.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{field}: {message}")]
pub struct ModelError {
    /// Schema path of the offending value.
    pub field: String,
    /// What is wrong and how to fix it.
    pub message: String,
}

fn err(field: impl Into<String>, message: impl Into<String>) -> ModelError {
    ModelError {
        field: field.into(),
        message: message.into(),
    }
}

fn finite(field: &str, v: f64) -> Result<(), ModelError> {
    if v.is_finite() {
        Ok(())
    } else {
        Err(err(field, format!("must be a finite number, got {v}")))
    }
}

fn position(field: &str, v: f64) -> Result<(), ModelError> {
    finite(field, v)?;
    if !(0.0..=1.0).contains(&v) {
        return Err(err(
            field,
            format!(
                "position {v} lies outside the member; positions are in units of L, from 0 to 1"
            ),
        ));
    }
    Ok(())
}

fn fixity(field: &str, f: Fixity) -> Result<(), ModelError> {
    if let Fixity::Spring(k) = f {
        finite(field, k)?;
        if k < 0.0 {
            return Err(err(field, format!("spring stiffness must be ≥ 0, got {k}")));
        }
    }
    Ok(())
}

fn support(prefix: &str, s: &Support) -> Result<(), ModelError> {
    // Field names are built only for the error (validation runs per solve).
    let keys = [
        ("lateral", s.lateral),
        ("lateral_rotation", s.lateral_rotation),
        ("twist", s.twist),
        ("warping", s.warping),
        ("vertical", s.vertical),
        ("in_plane_rotation", s.in_plane_rotation),
    ];
    for (key, f) in keys {
        if let Fixity::Spring(_) = f {
            fixity(&format!("{prefix}.{key}"), f)?;
        }
    }
    Ok(())
}

impl Member {
    /// True when a couple applied at end position `x` (0 or 1, with end
    /// support `s`) has an unambiguous critical value: the boundary term
    /// M·v'·φ of the applied moment vanishes because twist φ or lateral
    /// rotation v' is held exactly there (by the end support, a support or a
    /// restraint at the end, or lateral restraints at two heights).
    pub fn couple_is_unambiguous(&self, x: f64, s: &Support) -> bool {
        let here = |a: f64| (a - x).abs() <= 1e-9;
        let mut twist = s.twist.is_fixed();
        let mut lat_rot = s.lateral_rotation.is_fixed();
        let mut heights: Vec<f64> = Vec::new();
        if s.lateral.is_fixed() {
            heights.push(0.0);
        }
        for p in self.supports.iter().filter(|p| here(p.at)) {
            twist |= p.support.twist.is_fixed();
            lat_rot |= p.support.lateral_rotation.is_fixed();
            if p.support.lateral.is_fixed() {
                heights.push(0.0);
            }
        }
        for r in self.restraints.iter().filter(|r| here(r.at)) {
            twist |= r.twist.is_fixed();
            if r.lateral.is_fixed() {
                heights.push(r.zeta);
            }
        }
        twist |= heights
            .iter()
            .any(|&a| heights.iter().any(|&b| (a - b).abs() > 1e-12));
        twist || lat_rot
    }

    /// Check everything that can be checked without a mesh.
    pub fn validate(&self) -> Result<(), ModelError> {
        finite("kappa", self.kappa)?;
        if self.kappa < 0.0 {
            return Err(err(
                "kappa",
                format!("torsion parameter must be ≥ 0, got {}", self.kappa),
            ));
        }
        finite("delta", self.delta)?;
        support("start", &self.start)?;
        support("end", &self.end)?;
        for (i, s) in self.supports.iter().enumerate() {
            position(&format!("support[{i}].at"), s.at)?;
            support(&format!("support[{i}]"), &s.support)?;
        }
        for (i, r) in self.restraints.iter().enumerate() {
            position(&format!("restraint[{i}].at"), r.at)?;
            finite(&format!("restraint[{i}].zeta"), r.zeta)?;
            fixity(&format!("restraint[{i}].lateral"), r.lateral)?;
            fixity(&format!("restraint[{i}].twist"), r.twist)?;
            if r.lateral.is_free() && r.twist.is_free() {
                return Err(err(
                    format!("restraint[{i}]"),
                    "restrains nothing; set `lateral` and/or `twist` to \"fixed\" or a spring stiffness",
                ));
            }
        }
        for (i, c) in self.continuous.iter().enumerate() {
            position(&format!("continuous[{i}].from"), c.from)?;
            position(&format!("continuous[{i}].to"), c.to)?;
            finite(&format!("continuous[{i}].zeta"), c.zeta)?;
            for (k, v) in [("lateral", c.lateral), ("twist", c.twist)] {
                finite(&format!("continuous[{i}].{k}"), v)?;
                if v < 0.0 {
                    return Err(err(format!("continuous[{i}].{k}"), "stiffness must be ≥ 0"));
                }
            }
            if c.to <= c.from {
                return Err(err(
                    format!("continuous[{i}].to"),
                    "`to` must be greater than `from`",
                ));
            }
        }
        let mut segs: Vec<_> = self.segments.iter().enumerate().collect();
        for (i, s) in &segs {
            position(&format!("segment[{i}].from"), s.from)?;
            position(&format!("segment[{i}].to"), s.to)?;
            if s.to <= s.from {
                return Err(err(
                    format!("segment[{i}].to"),
                    "`to` must be greater than `from`",
                ));
            }
            finite(&format!("segment[{i}].delta"), s.delta)?;
            for (k, v) in [("eiz", s.eiz), ("git", s.git), ("eiy", s.eiy)] {
                finite(&format!("segment[{i}].{k}"), v)?;
                if v <= 0.0 {
                    return Err(err(
                        format!("segment[{i}].{k}"),
                        format!("stiffness ratio must be > 0, got {v}"),
                    ));
                }
            }
            finite(&format!("segment[{i}].eiw"), s.eiw)?;
            if s.eiw < 0.0 {
                return Err(err(
                    format!("segment[{i}].eiw"),
                    format!("warping stiffness ratio must be ≥ 0, got {}", s.eiw),
                ));
            }
        }
        segs.sort_by(|a, b| a.1.from.total_cmp(&b.1.from));
        for w in segs.windows(2) {
            if w[1].1.from < w[0].1.to {
                return Err(err(
                    format!("segment[{}]", w[1].0),
                    format!("overlaps segment[{}]; segments must not overlap", w[0].0),
                ));
            }
        }
        if let Some(a) = &self.axial {
            finite("axial", a.n)?;
            finite("zeta_centroid", a.zeta_centroid)?;
            finite("rho", a.rho)?;
            if a.rho < 0.0 {
                return Err(err("rho", "polar radius of gyration must be ≥ 0"));
            }
            if a.n != 0.0 && a.rho == 0.0 && self.kappa > 0.0 {
                // Not fatal in theory, but a sign the user forgot it.
            }
        }
        let mut any = self.axial.map(|a| a.n != 0.0).unwrap_or(false);
        for (i, l) in self.loads.iter().enumerate() {
            match *l {
                Load::Point { at, fz, zeta } => {
                    position(&format!("load[{i}].at"), at)?;
                    finite(&format!("load[{i}].value"), fz)?;
                    finite(&format!("load[{i}].zeta"), zeta)?;
                    any |= fz != 0.0;
                }
                Load::Distributed {
                    from,
                    to,
                    fz_from,
                    fz_to,
                    zeta,
                } => {
                    position(&format!("load[{i}].from"), from)?;
                    position(&format!("load[{i}].to"), to)?;
                    if to <= from {
                        return Err(err(
                            format!("load[{i}].to"),
                            "`to` must be greater than `from`",
                        ));
                    }
                    finite(&format!("load[{i}].value"), fz_from)?;
                    finite(&format!("load[{i}].value_end"), fz_to)?;
                    finite(&format!("load[{i}].zeta"), zeta)?;
                    any |= fz_from != 0.0 || fz_to != 0.0;
                }
                Load::EndMoments { start, end } => {
                    finite(&format!("load[{i}].start"), start)?;
                    finite(&format!("load[{i}].end"), end)?;
                    for (name, m, x, s) in [
                        ("start", start, 0.0, &self.start),
                        ("end", end, 1.0, &self.end),
                    ] {
                        if m != 0.0 && !self.couple_is_unambiguous(x, s) {
                            return Err(err(
                                format!("load[{i}].{name}"),
                                format!(
                                    "a couple at an end that may twist and rotate sideways is refused: its critical \
                                     value depends on how the applied moment follows the rotating end (the boundary \
                                     term M·v'·φ), and no moment type is implemented; fix `twist` or \
                                     `lateral_rotation` at the {name} (preset \"fork\" fixes twist), or replace the \
                                     couple by a load pair"
                                ),
                            ));
                        }
                        if m != 0.0 && !s.in_plane_rotation.is_free() {
                            return Err(err(
                                format!("load[{i}].{name}"),
                                format!(
                                    "a couple applied at the {name}, whose in-plane rotation is restrained, goes \
                                     (partly) into the support, so M at the {name} would not be the value given; \
                                     free `in_plane_rotation` at the {name} or drop the couple"
                                ),
                            ));
                        }
                    }
                    any |= start != 0.0 || end != 0.0;
                }
            }
        }
        if !any {
            return Err(err(
                "load",
                "all loads are zero (or there are none): give at least one non-zero load",
            ));
        }
        Ok(())
    }
}

//! Axes over any numeric field of a case, addressed by a documented path
//! (`[[family.axis]]` with `path` and `values`). Values are in the model's
//! dimensionless units (heights in ζ units, positions in units of L, springs
//! in the units of the case schema's dimensionless springs).
//!
//! | path | field |
//! |---|---|
//! | `delta` | monosymmetry δ |
//! | `psi` | end-moment ratio: every end-moments load gets M(L) = ψ·M(0) |
//! | `load.<name>.value`, `.zeta`, `.at` | magnitude (direction and shape kept: the larger end of a distributed load or of end moments gets the value), height, position of a named load |
//! | `restraint.<name>.at`, `.zeta`, `.lateral`, `.twist` | position, height, spring stiffnesses of a named restraint |
//! | `continuous_restraint.<i>.lateral`, `.twist`, `.zeta` | the i-th continuous restraint (0-based) |
//! | `start.<dof>`, `end.<dof>` | a spring at an end support (`lateral`, `lateral_rotation`, `twist`, `warping`, `vertical`, `in_plane_rotation`) |

use crate::case::ResolvedCase;
use crate::model::{Component, Fixity, Load, Member};

/// A resolved path.
#[derive(Debug, Clone, PartialEq)]
pub enum FieldPath {
    /// δ.
    Delta,
    /// End-moment ratio ψ.
    Psi,
    /// Load `index`: value, height or position.
    Load(usize, LoadField),
    /// Restraint `index`: field.
    Restraint(usize, RestraintField),
    /// Continuous restraint `index`: field.
    Continuous(usize, ContinuousField),
    /// End support spring: (end is `end`, component).
    EndSpring(bool, Component),
}

/// Fields of a load.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LoadField {
    /// Magnitude.
    Value,
    /// Height.
    Zeta,
    /// Position of a point load.
    At,
}

/// Fields of a restraint.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RestraintField {
    /// Position.
    At,
    /// Height.
    Zeta,
    /// Lateral spring.
    Lateral,
    /// Twist spring.
    Twist,
}

/// Fields of a continuous restraint.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ContinuousField {
    /// Lateral stiffness per length.
    Lateral,
    /// Torsional stiffness per length.
    Twist,
    /// Height.
    Zeta,
}

/// Parse a path against the case it will change. The error says what is
/// accepted.
pub fn parse_path(p: &str, case: &ResolvedCase) -> Result<FieldPath, String> {
    let parts: Vec<&str> = p.split('.').collect();
    let loads: Vec<&str> = case
        .loads
        .iter()
        .filter_map(|l| l.name.as_deref())
        .collect();
    let restraints: Vec<&str> = case
        .restraint_names
        .iter()
        .filter_map(|n| n.as_deref())
        .collect();
    let list = |v: &[&str]| {
        if v.is_empty() {
            "none (give it a `name`)".to_string()
        } else {
            v.join(", ")
        }
    };
    match parts.as_slice() {
        ["delta"] => Ok(FieldPath::Delta),
        ["psi"] => {
            if case.member.loads.iter().any(|l| matches!(l, Load::EndMoments { .. })) {
                Ok(FieldPath::Psi)
            } else {
                Err("`psi` needs an end-moments load in the case".into())
            }
        }
        ["load", name, field] => {
            let i = case.loads.iter().position(|l| l.name.as_deref() == Some(*name)).ok_or_else(|| format!("no load is named \"{name}\"; named loads: {}", list(&loads)))?;
            let f = match *field {
                "value" => LoadField::Value,
                "zeta" => LoadField::Zeta,
                "at" => LoadField::At,
                other => return Err(format!("unknown load field `{other}`; accepted: value, zeta, at")),
            };
            match (&case.member.loads[i], f) {
                (Load::EndMoments { .. }, LoadField::Zeta | LoadField::At) => Err("end moments have no height or position".into()),
                (Load::Distributed { .. }, LoadField::At) => Err("a distributed load has `from`/`to`, not `at`".into()),
                _ => Ok(FieldPath::Load(i, f)),
            }
        }
        ["restraint", name, field] => {
            let i = case.restraint_names.iter().position(|n| n.as_deref() == Some(*name)).ok_or_else(|| format!("no restraint is named \"{name}\"; named restraints: {}", list(&restraints)))?;
            let f = match *field {
                "at" => RestraintField::At,
                "zeta" => RestraintField::Zeta,
                "lateral" => RestraintField::Lateral,
                "twist" => RestraintField::Twist,
                other => return Err(format!("unknown restraint field `{other}`; accepted: at, zeta, lateral, twist")),
            };
            Ok(FieldPath::Restraint(i, f))
        }
        ["continuous_restraint", idx, field] => {
            let i: usize = idx.parse().map_err(|_| format!("`{idx}` is not an index; write continuous_restraint.0.lateral"))?;
            if i >= case.member.continuous.len() {
                return Err(format!("the case has {} continuous restraints; index {i} is out of range", case.member.continuous.len()));
            }
            let f = match *field {
                "lateral" => ContinuousField::Lateral,
                "twist" => ContinuousField::Twist,
                "zeta" => ContinuousField::Zeta,
                other => return Err(format!("unknown field `{other}`; accepted: lateral, twist, zeta")),
            };
            Ok(FieldPath::Continuous(i, f))
        }
        [end @ ("start" | "end"), dof] => {
            let d = Component::from_key(dof).ok_or_else(|| {
                format!(
                    "unknown support component `{dof}`; accepted: {}",
                    Component::ALL.map(Component::key).join(", ")
                )
            })?;
            Ok(FieldPath::EndSpring(*end == "end", d))
        }
        _ => Err("accepted paths: delta, psi, load.<name>.value|zeta|at, restraint.<name>.at|zeta|lateral|twist, \
                  continuous_restraint.<i>.lateral|twist|zeta, start.<component>, end.<component>"
            .into()),
    }
}

/// Set the field at `path` of `m` to `x`.
pub fn apply(m: &mut Member, path: &FieldPath, x: f64) {
    match path {
        FieldPath::Delta => m.delta = x,
        FieldPath::Psi => {
            for l in m.loads.iter_mut() {
                if let Load::EndMoments { start, end } = l {
                    *end = x * *start;
                }
            }
        }
        FieldPath::Load(i, f) => match (&mut m.loads[*i], f) {
            (Load::Point { fz, .. }, LoadField::Value) => *fz = if *fz > 0.0 { x } else { -x },
            (Load::Point { zeta, .. } | Load::Distributed { zeta, .. }, LoadField::Zeta) => {
                *zeta = x
            }
            (Load::Point { at, .. }, LoadField::At) => *at = x,
            (Load::Distributed { fz_from, fz_to, .. }, LoadField::Value) => {
                // Keep the shape: scale so the larger end's magnitude becomes x.
                let peak = fz_from.abs().max(fz_to.abs());
                if peak > 0.0 {
                    let c = x / peak;
                    *fz_from *= c;
                    *fz_to *= c;
                } else {
                    *fz_from = -x;
                    *fz_to = -x;
                }
            }
            (Load::EndMoments { start, end }, LoadField::Value) => {
                // Keep the ratio: scale so the larger end moment's magnitude becomes x.
                let peak = start.abs().max(end.abs());
                if peak > 0.0 {
                    let c = x / peak;
                    *start *= c;
                    *end *= c;
                }
            }
            _ => {}
        },
        FieldPath::Restraint(i, f) => {
            let r = &mut m.restraints[*i];
            match f {
                RestraintField::At => r.at = x,
                RestraintField::Zeta => r.zeta = x,
                RestraintField::Lateral => r.lateral = Fixity::Spring(x),
                RestraintField::Twist => r.twist = Fixity::Spring(x),
            }
        }
        FieldPath::Continuous(i, f) => {
            let c = &mut m.continuous[*i];
            match f {
                ContinuousField::Lateral => c.lateral = x,
                ContinuousField::Twist => c.twist = x,
                ContinuousField::Zeta => c.zeta = x,
            }
        }
        FieldPath::EndSpring(end, d) => {
            let s = if *end { &mut m.end } else { &mut m.start };
            *s.component_mut(*d) = Fixity::Spring(x);
        }
    }
}

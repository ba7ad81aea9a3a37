//! The dimensionless member model: plain data, no I/O.
//!
//! Every quantity here is scaled as in the project's domain notes: the member
//! runs from x = 0 to x = 1 (L = 1), the reference section has E·Iz = G·It = 1,
//! so E·Iw = κ²/π², and heights are carried in ζ units
//! (ζ = π·a/L·√(E·Iz/(G·It))), i.e. the geometric height is a = ζ/π.
//! Loads are proportional: the solver finds the factor λ that scales *all*
//! of them to the critical state.
//!
//! Signs (domain notes): z is up, a transverse load has a vertical component
//! `fz` (positive up, so gravity loads are negative), moments are sagging
//! positive, twist is right-handed about +x, and a point at height z moves
//! laterally by v − z·φ.
//!
//! Physical cases are converted to this form by [`crate::case`]; the scale
//! factors needed to convert results back live in [`Scales`].

pub mod backspan;
mod validate;

pub use validate::ModelError;

/// How one degree of freedom is held at a support or restraint.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Fixity {
    /// Unrestrained.
    Free,
    /// Held exactly (eliminated from the system, never a stiff penalty).
    Fixed,
    /// An elastic spring of the given (dimensionless) stiffness, ≥ 0.
    Spring(f64),
}

impl Fixity {
    /// True when the degree of freedom is exactly held.
    pub fn is_fixed(self) -> bool {
        matches!(self, Fixity::Fixed)
    }
    /// Spring stiffness, if any (a zero spring counts as free).
    pub fn spring(self) -> Option<f64> {
        match self {
            Fixity::Spring(k) if k > 0.0 => Some(k),
            _ => None,
        }
    }
    /// True when nothing acts on the degree of freedom.
    pub fn is_free(self) -> bool {
        match self {
            Fixity::Free => true,
            Fixity::Fixed => false,
            Fixity::Spring(k) => k <= 0.0,
        }
    }
}

/// A support (end or intermediate). Out-of-plane keys act at the shear
/// centre; in-plane keys drive the pre-buckling analysis.
///
/// Spring units (dimensionless case): lateral E·Iz/L³, lateral rotation
/// E·Iz/L, twist G·It/L, warping G·It·L, vertical E·Iy/L³, in-plane rotation
/// E·Iy/L (E·Iy of the reference section).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Support {
    /// Lateral displacement v of the shear centre.
    pub lateral: Fixity,
    /// Lateral rotation v' (about the vertical axis).
    pub lateral_rotation: Fixity,
    /// Twist φ.
    pub twist: Fixity,
    /// Warping (φ').
    pub warping: Fixity,
    /// Vertical displacement (in plane).
    pub vertical: Fixity,
    /// In-plane rotation (about the lateral axis).
    pub in_plane_rotation: Fixity,
}

impl Support {
    /// `fork`: in plane vertical support with free rotation; out of plane
    /// lateral displacement and twist fixed, lateral rotation and warping free.
    pub const FORK: Support = Support {
        lateral: Fixity::Fixed,
        lateral_rotation: Fixity::Free,
        twist: Fixity::Fixed,
        warping: Fixity::Free,
        vertical: Fixity::Fixed,
        in_plane_rotation: Fixity::Free,
    };
    /// `built-in`: everything fixed.
    pub const BUILT_IN: Support = Support {
        lateral: Fixity::Fixed,
        lateral_rotation: Fixity::Fixed,
        twist: Fixity::Fixed,
        warping: Fixity::Fixed,
        vertical: Fixity::Fixed,
        in_plane_rotation: Fixity::Fixed,
    };
    /// `free`: nothing held.
    pub const FREE: Support = Support {
        lateral: Fixity::Free,
        lateral_rotation: Fixity::Free,
        twist: Fixity::Free,
        warping: Fixity::Free,
        vertical: Fixity::Free,
        in_plane_rotation: Fixity::Free,
    };

    /// True when neither lateral displacement nor twist is held (a free end
    /// out of plane).
    pub fn is_free_out_of_plane(&self) -> bool {
        self.lateral.is_free() && self.twist.is_free()
    }
}

/// One component a support can hold, with its case-file key.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Component {
    /// Lateral displacement (`lateral`).
    Lateral,
    /// Lateral rotation (`lateral_rotation`).
    LateralRotation,
    /// Twist (`twist`).
    Twist,
    /// Warping (`warping`).
    Warping,
    /// Vertical displacement (`vertical`).
    Vertical,
    /// In-plane rotation (`in_plane_rotation`).
    InPlaneRotation,
}

impl Component {
    /// All components, in schema order.
    pub const ALL: [Component; 6] = [
        Component::Lateral,
        Component::LateralRotation,
        Component::Twist,
        Component::Warping,
        Component::Vertical,
        Component::InPlaneRotation,
    ];
    /// The case-file key.
    pub fn key(self) -> &'static str {
        match self {
            Component::Lateral => "lateral",
            Component::LateralRotation => "lateral_rotation",
            Component::Twist => "twist",
            Component::Warping => "warping",
            Component::Vertical => "vertical",
            Component::InPlaneRotation => "in_plane_rotation",
        }
    }
    /// The component with case-file key `k`.
    pub fn from_key(k: &str) -> Option<Component> {
        Component::ALL.into_iter().find(|c| c.key() == k)
    }
}

impl Support {
    /// The fixity of one component.
    pub fn component_mut(&mut self, c: Component) -> &mut Fixity {
        match c {
            Component::Lateral => &mut self.lateral,
            Component::LateralRotation => &mut self.lateral_rotation,
            Component::Twist => &mut self.twist,
            Component::Warping => &mut self.warping,
            Component::Vertical => &mut self.vertical,
            Component::InPlaneRotation => &mut self.in_plane_rotation,
        }
    }
}

/// An intermediate support at `at` (0 < at < 1, or at an end it merges).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PointSupport {
    /// Position in units of L.
    pub at: f64,
    /// What it holds.
    pub support: Support,
}

/// A restraint at a point and a height (bracing member, purlin, cleat).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Restraint {
    /// Position in units of L.
    pub at: f64,
    /// Height of the lateral restraint above the shear centre, ζ units.
    pub zeta: f64,
    /// Lateral restraint of the point at `zeta`: v − a·φ held or sprung.
    pub lateral: Fixity,
    /// Twist restraint φ (held or sprung, units G·It/L).
    pub twist: Fixity,
}

/// A continuous restraint over a range (sheeting, decking): springs per unit
/// length, lateral at a height (units E·Iz/L⁴) and torsional (units G·It/L²).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ContinuousRestraint {
    /// Start of the range, units of L.
    pub from: f64,
    /// End of the range, units of L.
    pub to: f64,
    /// Height of the lateral spring above the shear centre, ζ units.
    pub zeta: f64,
    /// Lateral stiffness per unit length.
    pub lateral: f64,
    /// Torsional stiffness per unit length.
    pub twist: f64,
}

/// A proportional load. Transverse loads carry their height in ζ units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Load {
    /// A point load: vertical component `fz` (up positive), at `at`.
    Point {
        /// Position, units of L.
        at: f64,
        /// Vertical component, positive up; units √(E·Iz·G·It)/L².
        fz: f64,
        /// Height of application above the shear centre, ζ units.
        zeta: f64,
    },
    /// A distributed load varying linearly from `fz_from` at `from` to
    /// `fz_to` at `to` (per unit length, positive up).
    Distributed {
        /// Start, units of L.
        from: f64,
        /// End, units of L.
        to: f64,
        /// Intensity at `from`, positive up; units √(E·Iz·G·It)/L³.
        fz_from: f64,
        /// Intensity at `to`, positive up.
        fz_to: f64,
        /// Height of application above the shear centre, ζ units.
        zeta: f64,
    },
    /// Couples at the ends, given as the bending moment they produce at each
    /// end (sagging positive), units √(E·Iz·G·It)/L.
    EndMoments {
        /// M(0).
        start: f64,
        /// M(1).
        end: f64,
    },
}

/// Axial compression, constant along the member, proportional like the loads.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Axial {
    /// N·L²/(E·Iz), compression positive.
    pub n: f64,
    /// Height of the centroid above the shear centre, ζ units.
    pub zeta_centroid: f64,
    /// Polar radius of gyration about the centroid, √((Iy+Iz)/A), in ζ units.
    pub rho: f64,
}

/// Stiffness ratios over a range of the member (relative to the reference
/// section). Ranges must not overlap; elsewhere all ratios are 1.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Segment {
    /// Start, units of L.
    pub from: f64,
    /// End, units of L.
    pub to: f64,
    /// E·Iz ratio.
    pub eiz: f64,
    /// G·It ratio.
    pub git: f64,
    /// E·Iw ratio.
    pub eiw: f64,
    /// E·Iy ratio (in-plane analysis).
    pub eiy: f64,
    /// Monosymmetry δ of this segment (absolute, not a ratio).
    pub delta: f64,
}

/// Section stiffness at a point, dimensionless.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stiffness {
    /// E·Iz.
    pub eiz: f64,
    /// G·It.
    pub git: f64,
    /// E·Iw.
    pub eiw: f64,
    /// E·Iy (in-plane).
    pub eiy: f64,
    /// βy in units of L·√(G·It/E·Iz) (that is, δ).
    pub beta: f64,
}

/// The whole dimensionless member.
#[derive(Debug, Clone, PartialEq)]
pub struct Member {
    /// Torsion parameter of the reference section.
    pub kappa: f64,
    /// Monosymmetry parameter of the reference section.
    pub delta: f64,
    /// Support at x = 0.
    pub start: Support,
    /// Support at x = 1.
    pub end: Support,
    /// Intermediate supports.
    pub supports: Vec<PointSupport>,
    /// Point restraints.
    pub restraints: Vec<Restraint>,
    /// Continuous restraints.
    pub continuous: Vec<ContinuousRestraint>,
    /// Loads.
    pub loads: Vec<Load>,
    /// Axial compression, if any.
    pub axial: Option<Axial>,
    /// Segments with other stiffness.
    pub segments: Vec<Segment>,
}

impl Member {
    /// A member with the given κ, the given end supports, and nothing else.
    pub fn new(kappa: f64, start: Support, end: Support) -> Member {
        Member {
            kappa,
            delta: 0.0,
            start,
            end,
            supports: Vec::new(),
            restraints: Vec::new(),
            continuous: Vec::new(),
            loads: Vec::new(),
            axial: None,
            segments: Vec::new(),
        }
    }

    /// Builder: add a load.
    pub fn with_load(mut self, load: Load) -> Member {
        self.loads.push(load);
        self
    }

    /// Builder: add a restraint.
    pub fn with_restraint(mut self, r: Restraint) -> Member {
        self.restraints.push(r);
        self
    }

    /// Section stiffness of the segment containing the open interval around
    /// `x` (callers pass element mid-points).
    pub fn stiffness_at(&self, x: f64) -> Stiffness {
        let ew = self.kappa * self.kappa / (std::f64::consts::PI * std::f64::consts::PI);
        for s in &self.segments {
            if x > s.from && x < s.to {
                return Stiffness {
                    eiz: s.eiz,
                    git: s.git,
                    eiw: ew * s.eiw,
                    eiy: s.eiy,
                    beta: s.delta,
                };
            }
        }
        Stiffness {
            eiz: 1.0,
            git: 1.0,
            eiw: ew,
            eiy: 1.0,
            beta: self.delta,
        }
    }

    /// True when every part of the member has no warping stiffness (κ = 0
    /// everywhere): warping restraints then mean nothing.
    pub fn warping_free_section(&self) -> bool {
        self.kappa == 0.0
    }
}

/// Conversion factors from the dimensionless model back to a physical case
/// (kN, m, kN·m), or identity factors for a dimensionless case.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Scales {
    /// Length L, m.
    pub length: f64,
    /// Moment unit √(E·Iz·G·It)/L, kN·m.
    pub moment: f64,
    /// Force unit √(E·Iz·G·It)/L², kN.
    pub force: f64,
    /// Lateral displacement unit L·√(G·It/E·Iz), m.
    pub lateral: f64,
    /// Height unit (a = ζ·height), m: L/π·√(G·It/E·Iz).
    pub height: f64,
    /// Axial unit E·Iz/L², kN.
    pub axial: f64,
}

impl Scales {
    /// Identity scales for a dimensionless case.
    pub const UNIT: Scales = Scales {
        length: 1.0,
        moment: 1.0,
        force: 1.0,
        lateral: 1.0,
        height: 1.0 / std::f64::consts::PI,
        axial: 1.0,
    };
}

//! The solve driver: mesh, assemble, find the lowest critical factor, refine
//! until the error estimate meets the tolerance, and recover the mode.
//!
//! Error estimate. Meshes are nested (level ℓ + 1 halves every element of
//! level ℓ) and the Hermite element is conforming, so the discrete critical
//! factors decrease monotonically toward the exact one: λ₀ ≥ λ₁ ≥ … ≥ λ.
//! The reported value is the finest mesh's λ_ℓ, with the estimate
//!
//! ```text
//! e_ℓ = (λ_{ℓ−1} − λ_ℓ) / λ_ℓ
//! ```
//!
//! which bounds the true relative error (λ_ℓ − λ)/λ_ℓ whenever halving the
//! mesh at least halves the error — convergence of order ≥ 1, against the h⁴
//! of a smooth mode and the ≥ h of a boundary layer. Refinement continues
//! until e_ℓ ≤ tolerance. No extrapolation is applied to the value.
//!
//! "No buckling" is reported when no positive critical factor exists below
//! [`NO_BUCKLING_RATIO`] times the reference (μcr > 1000·μ0 with
//! μ0 = π·√(1 + κ²), or, without bending, N > 1000·π²·E·Iz/L²), proven by an
//! inertia count of zero at that factor.

use crate::eigen::{self, Inertia, Outcome};
use crate::fe::assembly::{self, System};
use crate::fe::inplane::{self, MomentField};
use crate::fe::mesh::{self, MeshControls};
use crate::model::{Load, Member, ModelError, Support};
use std::f64::consts::PI;

/// Factors more than this many times the reference critical value count as
/// "no buckling" (dimensionless: μcr/μ0 > 1000).
pub const NO_BUCKLING_RATIO: f64 = 1000.0;

/// Floor of the error estimate: the relative accuracy to which a critical
/// factor can be computed on the finest graded meshes (measured against the
/// dense path; Rayleigh quotients of stiff small elements lose digits).
pub const ROUND_OFF: f64 = 1e-14;

/// Solver settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settings {
    /// Relative error target of the critical factor.
    pub tolerance: f64,
    /// Finest refinement level tried.
    pub max_level: u32,
    /// Mesh controls.
    pub mesh: MeshControls,
    /// Also solve for the reversed load.
    pub reversed: bool,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            tolerance: 1e-4,
            max_level: 6,
            mesh: MeshControls::default(),
            reversed: false,
        }
    }
}

/// Outcome class.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Status {
    /// Converged to the tolerance.
    Ok,
    /// No positive critical factor below the no-buckling limit.
    NoBuckling,
    /// Finest mesh reached with the estimate above the tolerance.
    NotConverged,
}

impl Status {
    /// The contract's spelling.
    pub fn as_str(self) -> &'static str {
        match self {
            Status::Ok => "ok",
            Status::NoBuckling => "no-buckling",
            Status::NotConverged => "not-converged",
        }
    }
}

/// Mode shape at the nodes of the final mesh (dimensionless, sign normalised
/// so that the largest |φ| is +1, or the largest |v| when there is no twist).
#[derive(Debug, Clone, PartialEq)]
pub struct Mode {
    /// Node positions.
    pub x: Vec<f64>,
    /// Lateral displacement of the shear centre.
    pub v: Vec<f64>,
    /// Twist.
    pub phi: Vec<f64>,
}

/// Result for one load direction.
#[derive(Debug, Clone, PartialEq)]
pub struct Direction {
    /// Outcome.
    pub status: Status,
    /// Critical load factor (None for no buckling).
    pub load_factor: Option<f64>,
    /// μcr = λ·max|M| (None without buckling or without bending moment).
    pub mu_cr: Option<f64>,
    /// Relative error estimate of the factor.
    pub error_estimate: f64,
    /// Elements of the finest mesh.
    pub elements: usize,
    /// Inertia counts on the finest mesh that prove the factor lowest.
    pub inertia: Vec<Inertia>,
    /// Critical factor on each refinement level used.
    pub history: Vec<(usize, f64)>,
    /// Mode shape (for status ok / not-converged).
    pub mode: Option<Mode>,
}

/// Result of a solve.
#[derive(Debug, Clone, PartialEq)]
pub struct Solution {
    /// The loads as given.
    pub forward: Direction,
    /// The loads reversed (when asked).
    pub reversed: Option<Direction>,
    /// Largest |M(x)| under the unit loads, and where.
    pub m_max: (f64, f64),
    /// μ0 = π·√(1 + κ²).
    pub mu0: f64,
    /// The pre-buckling moment field under the unit loads.
    pub moments: MomentField,
    /// Notes for the report.
    pub notes: Vec<String>,
}

/// Why a solve failed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SolveError {
    /// Bad model data.
    #[error(transparent)]
    Model(#[from] ModelError),
    /// A mechanism in one of the planes.
    #[error("{0}")]
    Mechanism(String),
    /// The eigen-solver failed.
    #[error("the eigenvalue search failed: {0}")]
    Eigen(String),
}

/// Solve a member.
pub fn solve(m: &Member, s: &Settings) -> Result<Solution, SolveError> {
    solve_in(&mut Workspace::new(), m, s)
}

/// [`solve`] with a caller's workspace (see [`Workspace`]).
pub fn solve_in(wsp: &mut Workspace, m: &Member, s: &Settings) -> Result<Solution, SolveError> {
    m.validate()?;
    let mut notes = Vec::new();
    // Below KAPPA_NEGLIGIBLE the warping stiffness is dropped: its twist
    // layers would be thinner than round-off allows to resolve, and dropping
    // a stiffness can only lower the critical factor (safe side).
    let analysed;
    let m = if m.kappa > 0.0 && m.kappa < KAPPA_NEGLIGIBLE {
        notes.push(format!(
            "κ = {:.2e} < {KAPPA_NEGLIGIBLE}: the warping stiffness is neglected (κ taken as 0), which can only \
             lower Mcr; warping restraints are ignored",
            m.kappa
        ));
        analysed = Member {
            kappa: 0.0,
            ..m.clone()
        };
        &analysed
    } else {
        if m.kappa == 0.0 && warping_restrained(m) {
            notes.push(
                "κ = 0: the section has no warping stiffness, so warping restraints are ignored"
                    .into(),
            );
        }
        m
    };
    let keys = mesh::key_points(m);
    let mf = inplane::moments(m, &keys).map_err(|e| SolveError::Mechanism(e.0))?;
    let m_max = mf.max_abs();
    let mu0 = PI * (1.0 + m.kappa * m.kappa).sqrt();
    let n_ax = m.axial.map(|a| a.n).unwrap_or(0.0);
    // The no-buckling limit: 1000 × a reference factor of the load pattern.
    let height_terms: f64 = m
        .loads
        .iter()
        .map(|l| match *l {
            Load::Point { fz, zeta, .. } => (fz * zeta / PI).abs(),
            Load::Distributed {
                from,
                to,
                fz_from,
                fz_to,
                zeta,
            } => 0.5 * (fz_from.abs() + fz_to.abs()) * (to - from) * (zeta / PI).abs(),
            Load::EndMoments { .. } => 0.0,
        })
        .sum();
    let limit = if m_max.0 > 0.0 {
        NO_BUCKLING_RATIO * mu0 / m_max.0
    } else if n_ax != 0.0 {
        NO_BUCKLING_RATIO * PI * PI / n_ax.abs()
    } else if height_terms > 0.0 {
        // Only load-height terms (loads over supports): against the
        // member's own torsional stiffness G·It/L = 1.
        NO_BUCKLING_RATIO / height_terms
    } else {
        // The loads produce no bending moment, no axial force and no
        // load-height term: Kg = 0, nothing can buckle.
        notes.push("the loads produce neither bending moment nor axial force (for example loads directly over supports)".into());
        let nb = Direction {
            status: Status::NoBuckling,
            load_factor: None,
            mu_cr: None,
            error_estimate: 0.0,
            elements: 0,
            inertia: Vec::new(),
            history: Vec::new(),
            mode: None,
        };
        return Ok(Solution {
            forward: nb.clone(),
            reversed: s.reversed.then_some(nb),
            m_max,
            mu0,
            moments: mf,
            notes,
        });
    };
    let base = mesh::member_base_nodes(m, &s.mesh);
    let forward = direction(m, &mf, &base, s, limit, 1.0, wsp)?;
    let reversed = if s.reversed {
        Some(direction(m, &mf, &base, s, limit, -1.0, wsp)?)
    } else {
        None
    };
    Ok(Solution {
        forward,
        reversed,
        m_max,
        mu0,
        moments: mf,
        notes,
    })
}

/// Torsion parameters below this are analysed as κ = 0 (with a note).
pub const KAPPA_NEGLIGIBLE: f64 = 1e-3;

fn warping_restrained(m: &Member) -> bool {
    let w = |s: &Support| !s.warping.is_free();
    w(&m.start) || w(&m.end) || m.supports.iter().any(|s| w(&s.support))
}

/// Reusable storage of a solve: the eigen-solver's workspace and two
/// assembled systems that alternate over the mesh levels. A caller that
/// solves many cases on one thread (a sweep worker, a benchmark) keeps one
/// and passes it to [`solve_in`], so that the band matrices, the factor and
/// the work vectors are allocated once per thread instead of per level and
/// per case. Only storage is reused: every entry is written before it is
/// read, so results do not depend on what the workspace held (tested).
#[derive(Debug, Clone, Default)]
pub struct Workspace {
    eig: eigen::Workspace,
    sys: [System; 2],
}

impl Workspace {
    /// An empty workspace.
    pub fn new() -> Workspace {
        Workspace::default()
    }
}

/// The system being assembled (slot `cur`) and the previous level's (the other slot).
fn slots(sys: &mut [System; 2], cur: usize) -> (&mut System, &System) {
    let (a, b) = sys.split_at_mut(1);
    if cur == 0 {
        (&mut a[0], &b[0])
    } else {
        (&mut b[0], &a[0])
    }
}

fn direction(
    m: &Member,
    mf: &MomentField,
    base: &[f64],
    s: &Settings,
    limit: f64,
    sign: f64,
    wsp: &mut Workspace,
) -> Result<Direction, SolveError> {
    let mut history: Vec<(usize, f64)> = Vec::new();
    // (factor, relative round-off, mode) of the previous level, whose
    // system sits in the slot other than `cur`
    let mut prev: Option<(f64, f64, Vec<f64>)> = None;
    let mut cur = 0;
    let mut no_buckling_levels = 0;
    let eigen_err = |e: eigen::EigenError, sys: &System| match e {
        eigen::EigenError::Mechanism { row } => {
            SolveError::Mechanism(mechanism_message(m, sys, row))
        }
        other => SolveError::Eigen(other.to_string()),
    };
    let no_buckling = |inertia: Vec<Inertia>, sys: &System, history: Vec<(usize, f64)>| Direction {
        status: Status::NoBuckling,
        load_factor: None,
        mu_cr: None,
        error_estimate: 0.0,
        elements: sys.elements(),
        inertia,
        history,
        mode: None,
    };
    let mut level = 0;
    let mut level_inertia: Vec<Inertia>;
    let Workspace { eig: ws, sys: slot } = wsp;
    while level <= s.max_level {
        let x = mesh::refine(base, level);
        let (sys, ps) = slots(slot, cur);
        assembly::assemble_into(sys, m, &x, mf);
        if sign < 0.0 {
            sys.g.scale(-1.0);
        }
        let start = prev.as_ref().map(|(l, _, v)| (*l, sys.prolong(ps, v)));
        let sys: &System = sys;
        // Intermediate levels only feed the estimate; the reported level is
        // proven afterwards.
        let opt = eigen::Options {
            limit,
            prove: false,
            check_k: level == 0,
            ..Default::default()
        };
        let out = eigen::lowest_positive_in(ws, &sys.k, &sys.g, start, &opt)
            .map_err(|e| eigen_err(e, sys))?;
        let (lambda, mode, round_off) = match out {
            Outcome::NoBuckling { inertia, .. } => {
                no_buckling_levels += 1;
                if no_buckling_levels >= 2 || level == s.max_level {
                    return Ok(no_buckling(inertia, sys, history));
                }
                prev = None;
                cur = 1 - cur;
                level += 1;
                continue;
            }
            Outcome::Critical {
                lambda,
                mode,
                round_off,
                inertia,
            } => {
                level_inertia = inertia;
                (lambda, mode, round_off)
            }
        };
        history.push((sys.elements(), lambda));
        // Estimate against the previous level (none on the first: unknown).
        let (est, stuck) = match &prev {
            Some((lp, prev_ro, _)) => {
                let ro = round_off.max(*prev_ro).max(ROUND_OFF);
                let diff = ((lp - lambda) / lambda).abs();
                // Refining further cannot help once round-off dominates.
                (diff.max(ro), diff < 2.0 * ro && ro > s.tolerance)
            }
            None => (1.0, false),
        };
        let last = level == s.max_level;
        if (prev.is_some() && est <= s.tolerance) || stuck || last {
            // Prove the reported factor lowest on this mesh.
            let popt = eigen::Options {
                limit,
                prove: true,
                check_k: false,
                ..Default::default()
            };
            if let Some(inertia) =
                eigen::prove_in(ws, &sys.k, &sys.g, lambda, round_off, &level_inertia, &popt)
            {
                return Ok(finish(
                    est,
                    s.tolerance,
                    lambda,
                    mf,
                    sys,
                    &mode,
                    inertia,
                    history,
                ));
            }
            // The counts do not bracket it: search this mesh properly.
            match eigen::lowest_positive_in(ws, &sys.k, &sys.g, Some((lambda, mode)), &popt)
                .map_err(|e| eigen_err(e, sys))?
            {
                Outcome::NoBuckling { inertia, .. } => {
                    return Ok(no_buckling(inertia, sys, history));
                }
                Outcome::Critical {
                    lambda: l2,
                    mode: m2,
                    inertia: i2,
                    round_off: r2,
                } => {
                    history.pop();
                    history.push((sys.elements(), l2));
                    let same = (l2 - lambda).abs() <= (1e-6_f64).max(4.0 * r2) * lambda;
                    if same || last {
                        let est = match (&prev, same) {
                            (Some((lp, pr, _)), true) => {
                                ((lp - l2) / l2).abs().max(r2.max(*pr)).max(ROUND_OFF)
                            }
                            _ => 1.0,
                        };
                        return Ok(finish(est, s.tolerance, l2, mf, sys, &m2, i2, history));
                    }
                    // A lower factor than the estimate was built on: refine
                    // further from the proven mode.
                    prev = Some((l2, r2, m2));
                    cur = 1 - cur;
                    level += 1;
                    continue;
                }
            }
        }
        prev = Some((lambda, round_off, mode));
        cur = 1 - cur;
        level += 1;
    }
    Err(SolveError::Eigen(
        "refinement ended without a result".into(),
    ))
}

#[allow(clippy::too_many_arguments)]
fn finish(
    est: f64,
    tol: f64,
    lambda: f64,
    mf: &MomentField,
    sys: &System,
    mode: &[f64],
    inertia: Vec<Inertia>,
    history: Vec<(usize, f64)>,
) -> Direction {
    let status = if est <= tol {
        Status::Ok
    } else {
        Status::NotConverged
    };
    let mmax = mf.max_abs().0;
    Direction {
        status,
        load_factor: Some(lambda),
        mu_cr: if mmax > 0.0 {
            Some(lambda * mmax)
        } else {
            None
        },
        error_estimate: est,
        elements: sys.elements(),
        inertia,
        history,
        mode: Some(mode_shape(sys, mode)),
    }
}

fn mode_shape(sys: &System, red: &[f64]) -> Mode {
    let full = sys.expand(red);
    let mut v: Vec<f64> = full.iter().map(|f| f[0]).collect();
    let mut phi: Vec<f64> = full.iter().map(|f| f[2]).collect();
    let pick = |a: &[f64]| {
        a.iter()
            .copied()
            .fold(0.0_f64, |m, x| if x.abs() > m.abs() { x } else { m })
    };
    let pmax = pick(&phi);
    let vmax = pick(&v);
    let norm = if pmax.abs() > 1e-9 * vmax.abs() {
        pmax
    } else {
        vmax
    };
    if norm != 0.0 {
        v.iter_mut().for_each(|x| *x /= norm);
        phi.iter_mut().for_each(|x| *x /= norm);
    }
    let clean = |x: &mut f64| {
        if *x == 0.0 {
            *x = 0.0
        }
    };
    v.iter_mut().for_each(clean);
    phi.iter_mut().for_each(clean);
    Mode {
        x: sys.x.clone(),
        v,
        phi,
    }
}

/// Describe an out-of-plane mechanism from the null vector of K.
fn mechanism_message(m: &Member, sys: &System, _row: usize) -> String {
    let kd = crate::linalg::dense::to_dense(&sys.k);
    let eig = kd.symmetric_eigen();
    let (imin, _) = eig
        .eigenvalues
        .iter()
        .enumerate()
        .fold(
            (0, f64::INFINITY),
            |b, (i, &v)| if v < b.1 { (i, v) } else { b },
        );
    let vec: Vec<f64> = eig.eigenvectors.column(imin).iter().copied().collect();
    let full = sys.expand(&vec);
    let vmax = full.iter().fold(0.0_f64, |a, f| a.max(f[0].abs()));
    let pmax = full.iter().fold(0.0_f64, |a, f| a.max(f[2].abs()));
    let lateral_support = [m.start, m.end]
        .iter()
        .chain(m.supports.iter().map(|s| &s.support))
        .any(|s| !s.lateral.is_free())
        || m.restraints.iter().any(|r| !r.lateral.is_free());
    let what = if pmax > vmax {
        "it can twist about its own axis without resistance: hold `twist` at a support (preset \"fork\" or \"built-in\"), \
         add a twist restraint, or lateral restraints at two different heights"
    } else if lateral_support {
        "it can rotate sideways (about the vertical axis) about its lateral support: add a second lateral support \
         or fix `lateral_rotation` at the support (preset \"built-in\" for a cantilever root)"
    } else {
        "it can move sideways without resistance: hold `lateral` at a support (preset \"fork\" or \"built-in\") \
         or add a lateral restraint"
    };
    // A spring below the mechanism pivot (about 1e-13 of the member's own
    // stiffness, eigen::MECHANISM_PIVOT) holds nothing the analysis can
    // resolve: name the springs, so that a very soft one is not mistaken
    // for a missing restraint.
    let mut springs = Vec::new();
    let ends = [("start", m.start), ("end", m.end)];
    let sup = ends.iter().map(|(n, s)| (n.to_string(), *s)).chain(
        m.supports
            .iter()
            .map(|s| (format!("support at x = {:.3} L", s.at), s.support)),
    );
    for (name, s) in sup {
        for (key, f) in [
            ("lateral", s.lateral),
            ("lateral_rotation", s.lateral_rotation),
            ("twist", s.twist),
            ("warping", s.warping),
        ] {
            if let crate::model::Fixity::Spring(k) = f {
                springs.push(format!("{name} `{key}` = {k:e}"));
            }
        }
    }
    for r in &m.restraints {
        for (key, f) in [("lateral", r.lateral), ("twist", r.twist)] {
            if let crate::model::Fixity::Spring(k) = f {
                springs.push(format!("restraint at x = {:.3} L `{key}` = {k:e}", r.at));
            }
        }
    }
    let soft = if springs.is_empty() {
        String::new()
    } else {
        format!(
            " (springs softer than about 1e-13 of the member's own stiffness count as absent; this member has {})",
            springs.join(", ")
        )
    };
    format!("the member is a mechanism out of plane: {what}{soft}")
}

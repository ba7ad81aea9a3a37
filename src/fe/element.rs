//! Out-of-plane thin-walled beam element: Hermite cubics for the lateral
//! displacement v and the twist φ, four nodal DOFs per node.
//!
//! Local DOF order: `[v₁, v₁', φ₁, φ₁', v₂, v₂', φ₂, φ₂']`.
//!
//! Elastic stiffness K is the Hessian of
//!
//! ```text
//! U = ½∫ (E·Iz·v''² + G·It·φ'² + E·Iw·φ''²) dx
//!   + ½∫ (k_l·(v − z_k·φ)² + k_t·φ²) dx            continuous restraint
//! ```
//!
//! and the geometric matrix Kg is the Hessian of the load-proportional terms
//! of the domain notes' functional, exactly as printed (signs included):
//!
//! ```text
//! W = − ∫ M·v''·φ dx − ½∫ M·βy·φ'² dx + ½∫ (fz·a)·φ² dx
//!     − ½∫ N·[(v' − z_c·φ')² + ρ²·φ'²] dx
//! ```
//!
//! with M(x) the cubic pre-buckling moment of the element, fz·a the linear
//! product of distributed load and its height, z_c the centroid's height
//! above the shear centre and ρ² = (Iy+Iz)/A. (The domain notes write the
//! axial term with (v' + zs·φ')² where zs is the shear centre above the
//! centroid, i.e. zs = −z_c.) The −∫M·v''·φ term is kept in this form, never
//! integrated by parts (domain notes).
//!
//! Point loads at a height and point springs act on nodes and are added in
//! the assembly.
//!
//! # References
//! - Trahair, N. S. (1993). *Flexural-Torsional Buckling of Structures*. E & FN Spon, ch. 3 and 6
//!   (energy equation and finite-element formulation for thin-walled beams).
//! - Przemieniecki, J. S. (1968). *Theory of Matrix Structural Analysis*. McGraw-Hill
//!   (Hermite cubic beam stiffness).

/// 4-point Gauss–Legendre rule on [0, 1]: abscissae and weights. Exact for
/// polynomials up to degree 7, which covers every integrand here (cubic M
/// times a linear v'' times a cubic φ).
pub const GAUSS4: [(f64, f64); 4] = [
    (0.069_431_844_202_973_71, 0.173_927_422_568_726_93),
    (0.330_009_478_207_571_87, 0.326_072_577_431_273_07),
    (0.669_990_521_792_428_1, 0.326_072_577_431_273_07),
    (0.930_568_155_797_026_3, 0.173_927_422_568_726_93),
];

/// Hermite cubic shape functions and their x-derivatives at ξ ∈ [0, 1] on an
/// element of length h. Returns (N, N', N'') for DOFs [w₁, w₁', w₂, w₂'].
#[inline]
pub fn hermite(xi: f64, h: f64) -> ([f64; 4], [f64; 4], [f64; 4]) {
    let x2 = xi * xi;
    let x3 = x2 * xi;
    let ih = 1.0 / h;
    let ih2 = ih * ih;
    let n = [
        1.0 - 3.0 * x2 + 2.0 * x3,
        h * (xi - 2.0 * x2 + x3),
        3.0 * x2 - 2.0 * x3,
        h * (x3 - x2),
    ];
    let d = [
        (-6.0 * xi + 6.0 * x2) * ih,
        1.0 - 4.0 * xi + 3.0 * x2,
        (6.0 * xi - 6.0 * x2) * ih,
        3.0 * x2 - 2.0 * xi,
    ];
    let dd = [
        (-6.0 + 12.0 * xi) * ih2,
        (-4.0 + 6.0 * xi) * ih,
        (6.0 - 12.0 * xi) * ih2,
        (6.0 * xi - 2.0) * ih,
    ];
    (n, d, dd)
}

/// Everything an element needs, dimensionless (see [`crate::model`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ElementData {
    /// Length.
    pub h: f64,
    /// E·Iz.
    pub eiz: f64,
    /// G·It.
    pub git: f64,
    /// E·Iw.
    pub eiw: f64,
    /// βy (δ units).
    pub beta: f64,
    /// Pre-buckling moment M(s) = m[0] + m[1]·s + m[2]·s² + m[3]·s³, s ∈ [0, h].
    pub m: [f64; 4],
    /// Σ fz·a at the start and end of the element (linear between).
    pub qa: [f64; 2],
    /// Axial compression N (dimensionless), centroid height z_c and ρ².
    pub axial: [f64; 3],
    /// Continuous restraint as a quadratic form in (v, φ): [k_vv, k_vφ, k_φφ]
    /// meaning ½∫(k_vv·v² + 2·k_vφ·v·φ + k_φφ·φ²).
    pub spring: [f64; 3],
}

/// Symmetric 8×8 element matrix, row-major.
pub type Mat8 = [[f64; 8]; 8];

const VD: [usize; 4] = [0, 1, 4, 5];
const PD: [usize; 4] = [2, 3, 6, 7];

/// Elastic stiffness matrix K (closed forms for the three rigidities, Gauss
/// for the continuous restraint).
///
/// ```text
/// bending  E·Iz/h³ · [12 6h −12 6h; 6h 4h² −6h 2h²; −12 −6h 12 −6h; 6h 2h² −6h 4h²]
/// torsion  G·It/(30h) · [36 3h −36 3h; 3h 4h² −3h −h²; −36 −3h 36 −3h; 3h −h² −3h 4h²]
/// warping  E·Iw/h³ · (bending pattern)
/// ```
pub fn stiffness(e: &ElementData) -> Mat8 {
    let mut k = [[0.0; 8]; 8];
    let h = e.h;
    let b = [
        [12.0, 6.0 * h, -12.0, 6.0 * h],
        [6.0 * h, 4.0 * h * h, -6.0 * h, 2.0 * h * h],
        [-12.0, -6.0 * h, 12.0, -6.0 * h],
        [6.0 * h, 2.0 * h * h, -6.0 * h, 4.0 * h * h],
    ];
    let t = [
        [36.0, 3.0 * h, -36.0, 3.0 * h],
        [3.0 * h, 4.0 * h * h, -3.0 * h, -h * h],
        [-36.0, -3.0 * h, 36.0, -3.0 * h],
        [3.0 * h, -h * h, -3.0 * h, 4.0 * h * h],
    ];
    let cb = e.eiz / (h * h * h);
    let cw = e.eiw / (h * h * h);
    let ct = e.git / (30.0 * h);
    for i in 0..4 {
        for j in 0..4 {
            k[VD[i]][VD[j]] = cb * b[i][j];
            k[PD[i]][PD[j]] = cw * b[i][j] + ct * t[i][j];
        }
    }
    if e.spring != [0.0; 3] {
        for &(xi, w) in &GAUSS4 {
            let (n, _, _) = hermite(xi, h);
            let wh = w * h;
            for i in 0..4 {
                for j in 0..4 {
                    let nn = wh * n[i] * n[j];
                    k[VD[i]][VD[j]] += e.spring[0] * nn;
                    k[VD[i]][PD[j]] += e.spring[1] * nn;
                    k[PD[i]][VD[j]] += e.spring[1] * nn;
                    k[PD[i]][PD[j]] += e.spring[2] * nn;
                }
            }
        }
    }
    k
}

/// Shape-function products at the Gauss points of the unit element, times
/// the Gauss weights: the element-independent part of [`geometric`].
///
/// With sc = [1, h, 1, h] (the h carried by the slope DOFs) the Hermite
/// functions of an element of length h at ξ are N = N₀(ξ)·sc,
/// N' = N₀'(ξ)·sc/h and N'' = N₀''(ξ)·sc/h², so every integrand below is a
/// unit-element product scaled by sc_i·sc_j and a power of h.
struct GaussTables {
    /// w_q · N₀''_i(ξ_q) · N₀_j(ξ_q)   (the −∫M·v''·φ coupling)
    dd_n: [[[f64; 4]; 4]; 4],
    /// w_q · N₀'_i(ξ_q) · N₀'_j(ξ_q)
    d_d: [[[f64; 4]; 4]; 4],
    /// w_q · N₀_i(ξ_q) · N₀_j(ξ_q)
    n_n: [[[f64; 4]; 4]; 4],
}

const fn unit_hermite(xi: f64) -> ([f64; 4], [f64; 4], [f64; 4]) {
    let x2 = xi * xi;
    let x3 = x2 * xi;
    (
        [
            1.0 - 3.0 * x2 + 2.0 * x3,
            xi - 2.0 * x2 + x3,
            3.0 * x2 - 2.0 * x3,
            x3 - x2,
        ],
        [
            -6.0 * xi + 6.0 * x2,
            1.0 - 4.0 * xi + 3.0 * x2,
            6.0 * xi - 6.0 * x2,
            3.0 * x2 - 2.0 * xi,
        ],
        [
            -6.0 + 12.0 * xi,
            -4.0 + 6.0 * xi,
            6.0 - 12.0 * xi,
            6.0 * xi - 2.0,
        ],
    )
}

const fn gauss_tables() -> GaussTables {
    let mut t = GaussTables {
        dd_n: [[[0.0; 4]; 4]; 4],
        d_d: [[[0.0; 4]; 4]; 4],
        n_n: [[[0.0; 4]; 4]; 4],
    };
    let mut q = 0;
    while q < 4 {
        let (xi, w) = GAUSS4[q];
        let (n, d, dd) = unit_hermite(xi);
        let mut i = 0;
        while i < 4 {
            let mut j = 0;
            while j < 4 {
                t.dd_n[q][i][j] = w * dd[i] * n[j];
                t.d_d[q][i][j] = w * d[i] * d[j];
                t.n_n[q][i][j] = w * n[i] * n[j];
                j += 1;
            }
            i += 1;
        }
        q += 1;
    }
    t
}

const TABLES: GaussTables = gauss_tables();

/// Geometric (load-proportional) matrix Kg, by 4-point Gauss (exact),
/// from the unit-element tables:
///
/// ```text
/// K_vφ[i][j] = −(sc_i·sc_j/h) · Σ_q M(ξ_q·h) · w_q·N₀''_i·N₀_j
/// K_φφ[i][j] =  sc_i·sc_j · [ (1/h)·Σ_q c_q·w_q·N₀'_i·N₀'_j + h·Σ_q (fz·a)_q·w_q·N₀_i·N₀_j ]
///   c_q = −M(ξ_q·h)·βy − N·(z_c² + ρ²)
/// K_vv[i][j] = −N·(sc_i·sc_j/h)·Σ_q w_q·N₀'_i·N₀'_j,   K_vφ += N·z_c·(same sum)
/// ```
pub fn geometric(e: &ElementData) -> Mat8 {
    let h = e.h;
    let ih = 1.0 / h;
    let sc = [1.0, h, 1.0, h];
    let [n_ax, zc, rho2] = e.axial;
    let wagner = e.beta != 0.0;
    let height = e.qa != [0.0, 0.0];
    let axial = n_ax != 0.0;
    // moments at the Gauss points
    let mut mq = [0.0; 4];
    for (q, &(xi, _)) in GAUSS4.iter().enumerate() {
        let s = xi * h;
        mq[q] = e.m[0] + s * (e.m[1] + s * (e.m[2] + s * e.m[3]));
    }
    let mut vp = [[0.0; 4]; 4];
    for q in 0..4 {
        let t = &TABLES.dd_n[q];
        for i in 0..4 {
            for j in 0..4 {
                vp[i][j] += mq[q] * t[i][j];
            }
        }
    }
    let mut pp = [[0.0; 4]; 4];
    let mut dsum = [[0.0; 4]; 4];
    if wagner || axial {
        let shift = n_ax * (zc * zc + rho2);
        for q in 0..4 {
            let c = -mq[q] * e.beta - shift;
            let t = &TABLES.d_d[q];
            for i in 0..4 {
                for j in 0..4 {
                    pp[i][j] += c * t[i][j];
                    dsum[i][j] += t[i][j];
                }
            }
        }
        for row in pp.iter_mut() {
            for v in row.iter_mut() {
                *v *= ih;
            }
        }
    }
    if height {
        for (q, &(xi, _)) in GAUSS4.iter().enumerate() {
            let c = h * (e.qa[0] + xi * (e.qa[1] - e.qa[0]));
            let t = &TABLES.n_n[q];
            for i in 0..4 {
                for j in 0..4 {
                    pp[i][j] += c * t[i][j];
                }
            }
        }
    }
    let mut g = [[0.0; 8]; 8];
    for i in 0..4 {
        for j in 0..4 {
            let s = sc[i] * sc[j];
            let mut cross = -ih * vp[i][j];
            if axial {
                let dd = ih * dsum[i][j];
                cross += n_ax * zc * dd;
                g[VD[i]][VD[j]] = -n_ax * dd * s;
            }
            let cross = s * cross;
            g[VD[i]][PD[j]] = cross;
            g[PD[j]][VD[i]] = cross;
            g[PD[i]][PD[j]] = s * pp[i][j];
        }
    }
    g
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    fn data(h: f64) -> ElementData {
        ElementData {
            h,
            eiz: 1.3,
            git: 0.7,
            eiw: 0.05,
            beta: 0.2,
            m: [0.4, -0.3, 0.8, 0.25],
            qa: [-0.2, 0.1],
            axial: [0.3, 0.05, 0.02],
            spring: [0.5, -0.1, 0.2],
        }
    }

    /// Energy of a DOF vector by numerical quadrature of the functional with
    /// many midpoint samples (independent of the Gauss rule used above).
    fn energies(e: &ElementData, u: &[f64; 8]) -> (f64, f64) {
        let nq = 4000;
        let (mut uk, mut ug) = (0.0, 0.0);
        for q in 0..nq {
            let xi = (q as f64 + 0.5) / nq as f64;
            let (n, d, dd) = hermite(xi, e.h);
            let f = |a: [f64; 4], off: [usize; 4]| (0..4).map(|i| a[i] * u[off[i]]).sum::<f64>();
            let (v, v1, v2) = (f(n, VD), f(d, VD), f(dd, VD));
            let (p, p1, p2) = (f(n, PD), f(d, PD), f(dd, PD));
            let s = xi * e.h;
            let m = e.m[0] + s * (e.m[1] + s * (e.m[2] + s * e.m[3]));
            let qa = e.qa[0] + xi * (e.qa[1] - e.qa[0]);
            let dx = e.h / nq as f64;
            uk += 0.5
                * dx
                * (e.eiz * v2 * v2
                    + e.git * p1 * p1
                    + e.eiw * p2 * p2
                    + e.spring[0] * v * v
                    + 2.0 * e.spring[1] * v * p
                    + e.spring[2] * p * p);
            let [na, zc, r2] = e.axial;
            ug += dx
                * (-m * v2 * p - 0.5 * m * e.beta * p1 * p1 + 0.5 * qa * p * p
                    - 0.5 * na * ((v1 - zc * p1).powi(2) + r2 * p1 * p1));
        }
        (uk, ug)
    }

    #[test]
    fn matrices_are_hessians_of_the_functional() {
        // The quadratic form ½uᵀKu must equal the energy integral (source:
        // the functional in the domain notes; independent midpoint quadrature).
        let e = data(0.37);
        let k = stiffness(&e);
        let g = geometric(&e);
        let u = [0.3, -1.1, 0.7, 0.2, -0.4, 0.9, 1.3, -0.6];
        let quad = |a: &Mat8| {
            0.5 * (0..8)
                .map(|i| (0..8).map(|j| u[i] * a[i][j] * u[j]).sum::<f64>())
                .sum::<f64>()
        };
        let (uk, ug) = energies(&e, &u);
        assert!(
            (quad(&k) - uk).abs() < 1e-6 * uk.abs().max(1.0),
            "{} vs {}",
            quad(&k),
            uk
        );
        assert!(
            (quad(&g) - ug).abs() < 1e-6 * ug.abs().max(1.0),
            "{} vs {}",
            quad(&g),
            ug
        );
    }

    #[test]
    fn matrices_are_symmetric_and_rigid_modes_cost_nothing() {
        let mut e = data(0.5);
        e.spring = [0.0; 3];
        let k = stiffness(&e);
        let g = geometric(&e);
        for i in 0..8 {
            for j in 0..8 {
                assert!((k[i][j] - k[j][i]).abs() < 1e-12);
                assert!((g[i][j] - g[j][i]).abs() < 1e-12);
            }
        }
        // Rigid lateral translation, rigid rotation about z and rigid twist:
        // zero strain energy (common practice, no source).
        let modes = [
            [1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0],
            [0.0, 1.0, 0.0, 0.0, 0.5, 1.0, 0.0, 0.0],
            [0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0],
        ];
        for u in modes {
            for i in 0..8 {
                let r: f64 = (0..8).map(|j| k[i][j] * u[j]).sum();
                assert!(r.abs() < 1e-10, "row {i}: {r}");
            }
        }
    }
}

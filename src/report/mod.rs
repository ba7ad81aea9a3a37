//! Reports of a solve: the readable text, the JSON object of the `solve`
//! contract, and the mode-shape CSV. Writers are generic over `io::Write`
//! and do no file handling; the CLI writes through a temporary file.

use crate::CAUTION;
use crate::case::{CaseKind, ResolvedCase};
use crate::solve::{Direction, Solution, Status};
use serde_json::{Value, json};
use std::f64::consts::PI;
use std::io::{self, Write};

/// Effective-length ratio k = Le/L that gives μ in the uniform-moment fork
/// formula μ = (π/k)·√(1 + κ²/k²) (Timoshenko & Gere 1961, §6.2, with L → Le
/// in both the span and the warping term):
///
/// ```text
/// k² = [π² + √(π⁴ + 4·μ²·π²·κ²)] / (2·μ²)
/// ```
pub fn le_over_l(mu: f64, kappa: f64) -> f64 {
    let p2 = PI * PI;
    ((p2 + (p2 * p2 + 4.0 * mu * mu * p2 * kappa * kappa).sqrt()) / (2.0 * mu * mu)).sqrt()
}

/// A float for JSON: −0 becomes 0; non-finite becomes null.
fn num(x: f64) -> Value {
    if x.is_finite() {
        json!(if x == 0.0 { 0.0 } else { x })
    } else {
        Value::Null
    }
}

fn opt(x: Option<f64>) -> Value {
    x.map(num).unwrap_or(Value::Null)
}

fn direction_json(d: &Direction, case: &ResolvedCase, sol: &Solution, kappa: f64) -> Value {
    let mut o = json!({
        "status": d.status.as_str(),
        "mu_cr": opt(d.mu_cr),
        "load_factor": opt(d.load_factor),
        "error_estimate": num(d.error_estimate),
        "elements": d.elements,
        "inertia": d.inertia.iter().map(|i| json!({"shift": num(i.shift), "negative_pivots": i.negative})).collect::<Vec<_>>(),
        "mu_0": num(sol.mu0),
        "mu_ratio": opt(d.mu_cr.map(|m| m / sol.mu0)),
        "le_over_l": opt(d.mu_cr.map(|m| le_over_l(m, kappa))),
    });
    if let CaseKind::Physical(_) = case.kind {
        let map = o.as_object_mut().expect("object");
        map.insert("mcr".into(), opt(d.mu_cr.map(|m| m * case.scales.moment)));
        let lf = d.load_factor;
        let loads: Vec<Value> = case
            .loads
            .iter()
            .map(|l| {
                json!({
                    "name": l.name,
                    "kind": l.kind,
                    "position": l.position,
                    "unit": l.unit,
                    "values": l.values.iter().map(|v| opt(lf.map(|f| f * v))).collect::<Vec<_>>(),
                })
            })
            .collect();
        map.insert("loads_at_critical".into(), Value::Array(loads));
        if let Some(a) = case.member.axial {
            map.insert(
                "axial_at_critical".into(),
                opt(lf.map(|f| f * a.n * case.scales.axial)),
            );
        }
    }
    o
}

/// The JSON object of the `solve` contract.
pub fn to_json(case: &ResolvedCase, sol: &Solution, tolerance: f64) -> Value {
    let m = &case.member;
    let mut o = direction_json(&sol.forward, case, sol, m.kappa);
    let map = o.as_object_mut().expect("object");
    map.insert("caution".into(), json!(CAUTION));
    map.insert("kappa".into(), num(m.kappa));
    map.insert("delta".into(), num(m.delta));
    map.insert("tolerance".into(), num(tolerance));
    map.insert("m_max_at".into(), num(sol.m_max.1));
    map.insert(
        "notes".into(),
        json!(
            case.notes
                .iter()
                .chain(sol.notes.iter())
                .collect::<Vec<_>>()
        ),
    );
    map.insert(
        "loads".into(),
        json!(case.loads.iter().map(|l| json!({"name": l.name, "kind": l.kind, "zeta": opt(l.zeta), "position": l.position})).collect::<Vec<_>>()),
    );
    if let CaseKind::Physical(p) = &case.kind {
        map.insert("length_m".into(), num(p.length));
        map.insert("section".into(), json!(p.section_label));
        map.insert("moment_unit_knm".into(), num(case.scales.moment));
    }
    if let Some(r) = &sol.reversed {
        map.insert("reversed".into(), direction_json(r, case, sol, m.kappa));
    }
    o
}

fn fmt_opt(x: Option<f64>, digits: usize) -> String {
    match x {
        Some(v) => format!("{:.*}", digits, if v == 0.0 { 0.0 } else { v }),
        None => "—".into(),
    }
}

fn write_direction(
    w: &mut dyn Write,
    title: &str,
    d: &Direction,
    case: &ResolvedCase,
    sol: &Solution,
) -> io::Result<()> {
    writeln!(w, "{title}")?;
    match d.status {
        Status::NoBuckling => {
            writeln!(
                w,
                "  no buckling under this load pattern: no critical factor below {:.0} × the reference value \
                 (proven by an inertia count of zero). Lateral–torsional buckling does not govern in this \
                 direction; this is not an unlimited resistance.",
                crate::solve::NO_BUCKLING_RATIO
            )?;
            return Ok(());
        }
        Status::NotConverged => writeln!(
            w,
            "  NOT CONVERGED: the error estimate {:.1e} is above the tolerance; treat the value as indicative only.",
            d.error_estimate
        )?,
        Status::Ok => {}
    }
    writeln!(
        w,
        "  critical load factor λcr   {}",
        fmt_opt(d.load_factor, 5)
    )?;
    writeln!(w, "  μcr = Mcr·L/√(EIz·GIt)     {}", fmt_opt(d.mu_cr, 5))?;
    writeln!(
        w,
        "  μcr/μ0                     {}   (μ0 = π√(1+κ²) = {:.5}; equals C1 only with forks and ζ = 0)",
        fmt_opt(d.mu_cr.map(|m| m / sol.mu0), 4),
        sol.mu0
    )?;
    writeln!(
        w,
        "  Le/L (uniform-moment fork) {}",
        fmt_opt(d.mu_cr.map(|m| le_over_l(m, case.member.kappa)), 4)
    )?;
    if let CaseKind::Physical(_) = case.kind {
        writeln!(
            w,
            "  Mcr                        {} kN·m",
            fmt_opt(d.mu_cr.map(|m| m * case.scales.moment), 2)
        )?;
        for l in &case.loads {
            let vals: Vec<String> = l
                .values
                .iter()
                .map(|v| fmt_opt(d.load_factor.map(|f| f * v), 3))
                .collect();
            let name = l.name.clone().unwrap_or_else(|| l.kind.clone());
            writeln!(
                w,
                "    {name:<14} {} {} at {}",
                vals.join(" / "),
                l.unit,
                l.position
            )?;
        }
    }
    writeln!(
        w,
        "  relative error estimate    {:.1e}   ({} elements)",
        d.error_estimate, d.elements
    )?;
    let counts: Vec<String> = d
        .inertia
        .iter()
        .map(|i| format!("{} below {:.6}", i.negative, i.shift))
        .collect();
    writeln!(w, "  lowest-factor proof        {}", counts.join("; "))?;
    Ok(())
}

/// The readable report.
pub fn write_text(
    w: &mut dyn Write,
    case: &ResolvedCase,
    sol: &Solution,
    origin: &str,
) -> io::Result<()> {
    let m = &case.member;
    writeln!(w, "ltb-atlas solve: {origin}")?;
    match &case.kind {
        CaseKind::Dimensionless => writeln!(w, "dimensionless case (E·Iz = G·It = L = 1)")?,
        CaseKind::Physical(p) => {
            writeln!(
                w,
                "section {}; L = {:.3} m; E = {:.0} MPa, G = {:.0} MPa",
                p.section_label, p.length, p.e, p.g
            )?;
            writeln!(
                w,
                "moment unit √(EIz·GIt)/L = {:.4} kN·m",
                case.scales.moment
            )?;
        }
    }
    writeln!(
        w,
        "κ = {:.4}   δ = {:.4}   largest |M| at x = {:.4} L",
        m.kappa, m.delta, sol.m_max.1
    )?;
    for l in &case.loads {
        let z = l.zeta.map(|z| format!(", ζ = {z:.4}")).unwrap_or_default();
        writeln!(
            w,
            "  load {}: {}{}",
            l.name.clone().unwrap_or_else(|| l.kind.clone()),
            l.position,
            z
        )?;
    }
    write_direction(w, "Loads as given", &sol.forward, case, sol)?;
    if let Some(r) = &sol.reversed {
        write_direction(w, "Loads reversed", r, case, sol)?;
    }
    for n in case.notes.iter().chain(sol.notes.iter()) {
        writeln!(w, "note: {n}")?;
    }
    writeln!(
        w,
        "Elastic critical values: pre-buckling deflections ignored (conservative); web distortion ignored"
    )?;
    writeln!(
        w,
        "(unconservative for slender webs and for restraints on the tension flange only)."
    )?;
    writeln!(w, "CAUTION: {CAUTION}")?;
    Ok(())
}

/// Mode shape CSV: `#` lines (caution, units), then
/// `x,v,phi,v_top_flange,v_bottom_flange`.
pub fn write_mode_csv(w: &mut dyn Write, case: &ResolvedCase, d: &Direction) -> io::Result<()> {
    let Some(mode) = &d.mode else {
        writeln!(w, "# no mode: {}", d.status.as_str())?;
        return Ok(());
    };
    writeln!(w, "# {CAUTION}")?;
    let (xs, vs, top, bot, xunit, vunit) = match &case.kind {
        CaseKind::Dimensionless => {
            let a = case.member.kappa / PI;
            (1.0, 1.0, a, -a, "units of L", "units of L·√(GIt/EIz)")
        }
        CaseKind::Physical(p) => {
            let lat = case.scales.lateral;
            (
                p.length,
                lat * 1000.0,
                p.section.top_flange / 1000.0 / lat,
                p.section.bottom_flange / 1000.0 / lat,
                "m",
                "mm",
            )
        }
    };
    writeln!(
        w,
        "# mode shape, normalised so that the largest |phi| is 1 rad; x in {xunit}; v and flange displacements in {vunit}; phi in rad"
    )?;
    writeln!(
        w,
        "# flanges: top and bottom flange centroids{}",
        if matches!(case.kind, CaseKind::Dimensionless) {
            " taken at zeta = +kappa and -kappa (doubly symmetric I-section)"
        } else {
            ""
        }
    )?;
    writeln!(w, "x,v,phi,v_top_flange,v_bottom_flange")?;
    let f = |x: f64| {
        let x = if x == 0.0 || x.abs() < 1e-15 { 0.0 } else { x };
        format!("{x:.6e}")
    };
    for i in 0..mode.x.len() {
        let (v, p) = (mode.v[i], mode.phi[i]);
        writeln!(
            w,
            "{},{},{},{},{}",
            f(mode.x[i] * xs),
            f(v * vs),
            f(p),
            f((v - top * p) * vs),
            f((v - bot * p) * vs)
        )?;
    }
    Ok(())
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn le_over_l_inverts_the_fork_formula() {
        // μ = (π/k)√(1 + κ²/k²) (Timoshenko & Gere 1961, §6.2 with L → kL).
        for (k, kappa) in [(1.0, 0.5), (0.7, 1.3), (2.0, 0.1), (0.5, 0.0)] {
            let mu = PI / k * (1.0 + kappa * kappa / (k * k)).sqrt();
            assert!((le_over_l(mu, kappa) - k).abs() < 1e-12);
        }
    }
}

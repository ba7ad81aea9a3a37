//! Reports of a solve: the readable text, the JSON object of the `solve`
//! contract, and the mode-shape CSV. Writers are generic over `io::Write`
//! and do no file handling; the CLI writes through a temporary file.

use crate::CAUTION;
use crate::case::{CaseKind, ResolvedCase};
use crate::model::{Fixity, Member, Support};
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
///
/// A comparison value only: it is not a code's effective-length factor.
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

/// Fixed-point text with −0 printed as 0.
fn fx(x: f64, digits: usize) -> String {
    let s = format!("{:.*}", digits, x);
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

fn fixity_text(f: Fixity) -> String {
    match f {
        Fixity::Free => "free".into(),
        Fixity::Fixed => "fixed".into(),
        Fixity::Spring(k) => format!("spring {k}"),
    }
}

fn fixity_json(f: Fixity) -> Value {
    match f {
        Fixity::Free => json!("free"),
        Fixity::Fixed => json!("fixed"),
        Fixity::Spring(k) => json!({ "spring": num(k) }),
    }
}

fn support_json(s: &Support) -> Value {
    json!({
        "lateral": fixity_json(s.lateral),
        "lateral_rotation": fixity_json(s.lateral_rotation),
        "twist": fixity_json(s.twist),
        "warping": fixity_json(s.warping),
        "vertical": fixity_json(s.vertical),
        "in_plane_rotation": fixity_json(s.in_plane_rotation),
    })
}

/// A one-line description of a support's components.
pub fn support_summary(s: &Support) -> String {
    support_text(s)
}

fn support_text(s: &Support) -> String {
    format!(
        "lateral {}, lateral rotation {}, twist {}, warping {}; vertical {}, in-plane rotation {}",
        fixity_text(s.lateral),
        fixity_text(s.lateral_rotation),
        fixity_text(s.twist),
        fixity_text(s.warping),
        fixity_text(s.vertical),
        fixity_text(s.in_plane_rotation)
    )
}

/// A one-line description of a member's supports, restraints and loads
/// (dimensionless), with a cantilever's root warping condition first.
pub fn case_summary(m: &Member) -> String {
    let mut parts = Vec::new();
    if let Some((end, w)) = root_warping(m) {
        parts.push(format!(
            "cantilever root ({end}) warping {}",
            fixity_text(w)
        ));
    }
    parts.push(format!("start: {}", support_text(&m.start)));
    parts.push(format!("end: {}", support_text(&m.end)));
    for p in &m.supports {
        parts.push(format!(
            "support at x = {} L: {}",
            fx(p.at, 4),
            support_text(&p.support)
        ));
    }
    for r in &m.restraints {
        parts.push(format!(
            "restraint at x = {} L, zeta {}: lateral {}, twist {}",
            fx(r.at, 4),
            fx(r.zeta, 4),
            fixity_text(r.lateral),
            fixity_text(r.twist)
        ));
    }
    for c in &m.continuous {
        parts.push(format!(
            "continuous restraint {}..{} L at zeta {}: lateral {}, twist {}",
            fx(c.from, 4),
            fx(c.to, 4),
            fx(c.zeta, 4),
            c.lateral,
            c.twist
        ));
    }
    for l in &m.loads {
        parts.push(match *l {
            crate::model::Load::Point { at, fz, .. } => format!(
                "point load at x = {} L, {}",
                fx(at, 4),
                if fz < 0.0 { "down" } else { "up" }
            ),
            crate::model::Load::Distributed {
                from,
                to,
                fz_from,
                fz_to,
                ..
            } => format!(
                "distributed load {}..{} L, {} to {} (up positive)",
                fx(from, 4),
                fx(to, 4),
                fx(fz_from, 4),
                fx(fz_to, 4)
            ),
            crate::model::Load::EndMoments { start, end } => {
                format!("end moments M(0) = {}, M(L) = {}", fx(start, 4), fx(end, 4))
            }
        });
    }
    parts.join("; ")
}

/// For a cantilever (one end free out of plane), the warping condition at
/// its root, which every cantilever result must state (domain notes).
pub fn root_warping(m: &Member) -> Option<(&'static str, Fixity)> {
    match (m.start.is_free_out_of_plane(), m.end.is_free_out_of_plane()) {
        (false, true) if m.supports.is_empty() => Some(("start", m.start.warping)),
        (true, false) if m.supports.is_empty() => Some(("end", m.end.warping)),
        _ => None,
    }
}

fn notes(case: &ResolvedCase, sol: &Solution) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for n in case.notes.iter().chain(sol.notes.iter()) {
        if !out.contains(n) {
            out.push(n.clone());
        }
    }
    out
}

fn flip(d: Option<&'static str>, reversed: bool) -> Option<&'static str> {
    match (d, reversed) {
        (Some("down"), true) => Some("up"),
        (Some("up"), true) => Some("down"),
        (d, _) => d,
    }
}

fn direction_json(
    d: &Direction,
    case: &ResolvedCase,
    sol: &Solution,
    kappa: f64,
    reversed: bool,
) -> Value {
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
        "loads_reversed": reversed,
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
                    "direction": flip(l.direction, reversed),
                    "unit": l.unit,
                    "values": l.values.iter().map(|v| opt(lf.map(|f| f * v.abs()))).collect::<Vec<_>>(),
                })
            })
            .collect();
        map.insert("loads_at_critical".into(), Value::Array(loads));
        if let Some(a) = case.member.axial {
            // Compression positive; reversing the loads turns it into tension.
            let sign = if reversed { -1.0 } else { 1.0 };
            map.insert(
                "axial_at_critical".into(),
                opt(lf.map(|f| sign * f * a.n * case.scales.axial)),
            );
        }
    }
    o
}

/// The JSON object of the `solve` contract.
pub fn to_json(case: &ResolvedCase, sol: &Solution, tolerance: f64) -> Value {
    let m = &case.member;
    let mut o = direction_json(&sol.forward, case, sol, m.kappa, false);
    let map = o.as_object_mut().expect("object");
    map.insert("caution".into(), json!(CAUTION));
    map.insert("kappa".into(), num(m.kappa));
    map.insert("delta".into(), num(m.delta));
    map.insert("tolerance".into(), num(tolerance));
    map.insert("m_max_at_over_l".into(), num(sol.m_max.1));
    map.insert("notes".into(), json!(notes(case, sol)));
    let physical = matches!(case.kind, CaseKind::Physical(_));
    map.insert(
        "loads".into(),
        json!(case
            .loads
            .iter()
            .map(|l| {
                let mut j = json!({"name": l.name, "kind": l.kind, "zeta": opt(l.zeta), "direction": l.direction, "position": l.position});
                if physical {
                    j["height_mm"] = opt(l.zeta.map(|z| z * case.scales.height * 1000.0));
                }
                j
            })
            .collect::<Vec<_>>()),
    );
    map.insert(
        "supports".into(),
        json!({
            "start": support_json(&m.start),
            "end": support_json(&m.end),
            "intermediate": m.supports.iter().map(|p| { let mut j = support_json(&p.support); j["at"] = num(p.at); j }).collect::<Vec<_>>(),
        }),
    );
    map.insert(
        "restraints".into(),
        json!(m
            .restraints
            .iter()
            .map(|r| json!({"at": num(r.at), "zeta": num(r.zeta), "lateral": fixity_json(r.lateral), "twist": fixity_json(r.twist)}))
            .collect::<Vec<_>>()),
    );
    if let Some((end, w)) = root_warping(m) {
        map.insert("cantilever_root".into(), json!(end));
        map.insert("root_warping".into(), fixity_json(w));
    }
    if let CaseKind::Physical(p) = &case.kind {
        map.insert("length_m".into(), num(p.length));
        map.insert("section".into(), json!(p.section_label));
        map.insert("moment_unit_knm".into(), num(case.scales.moment));
    }
    if let Some(r) = &sol.reversed {
        map.insert(
            "reversed".into(),
            direction_json(r, case, sol, m.kappa, true),
        );
    }
    o
}

fn fmt_opt(x: Option<f64>, digits: usize) -> String {
    match x {
        Some(v) => fx(v, digits),
        None => "—".into(),
    }
}

fn write_direction(
    w: &mut dyn Write,
    title: &str,
    d: &Direction,
    case: &ResolvedCase,
    sol: &Solution,
    reversed: bool,
) -> io::Result<()> {
    writeln!(w, "{title}")?;
    match d.status {
        Status::NoBuckling => {
            if d.inertia.is_empty() {
                writeln!(
                    w,
                    "  no buckling: the loads produce neither bending moment nor axial force."
                )?;
            } else {
                writeln!(
                    w,
                    "  no buckling under this load pattern: no critical factor below {:.0} × the reference value \
                     (proven by an inertia count of zero). Lateral–torsional buckling does not govern in this \
                     direction; this is not an unlimited resistance.",
                    crate::solve::NO_BUCKLING_RATIO
                )?;
            }
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
    writeln!(
        w,
        "  μcr = Mcr·L/√(EIz·GIt)     {}   (L the whole member, x = 0 to L)",
        fmt_opt(d.mu_cr, 5)
    )?;
    writeln!(
        w,
        "  μcr/μ0                     {}   (μ0 = π√(1+κ²) = {:.5}; equals C1 only with forks and ζ = 0)",
        fmt_opt(d.mu_cr.map(|m| m / sol.mu0), 4),
        sol.mu0
    )?;
    writeln!(
        w,
        "  Le/L                       {}   (length giving the same Mcr in the uniform-moment fork formula; a comparison value, not a code factor)",
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
                .map(|v| fmt_opt(d.load_factor.map(|f| f * v.abs()), 3))
                .collect();
            let name = l.name.clone().unwrap_or_else(|| l.kind.clone());
            let dir = flip(l.direction, reversed)
                .map(|d| format!(" {d}"))
                .unwrap_or_default();
            writeln!(
                w,
                "    {name:<14} {} {}{dir} at {}",
                vals.join(" / "),
                l.unit,
                l.position
            )?;
        }
        if let Some(a) = case.member.axial {
            let n = d.load_factor.map(|f| f * a.n * case.scales.axial);
            writeln!(
                w,
                "    axial          {} kN {}",
                fmt_opt(n, 3),
                if reversed { "tension" } else { "compression" }
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
        .map(|i| format!("{} below {}", i.negative, fx(i.shift, 6)))
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
        "κ = {}   δ = {}   largest |M| at x = {} L",
        fx(m.kappa, 4),
        fx(m.delta, 4),
        fx(sol.m_max.1, 4)
    )?;
    writeln!(w, "  start (x = 0): {}", support_text(&m.start))?;
    writeln!(w, "  end (x = L):   {}", support_text(&m.end))?;
    for p in &m.supports {
        writeln!(
            w,
            "  support at x = {} L: {}",
            fx(p.at, 4),
            support_text(&p.support)
        )?;
    }
    for r in &m.restraints {
        writeln!(
            w,
            "  restraint at x = {} L, ζ = {}: lateral {}, twist {}",
            fx(r.at, 4),
            fx(r.zeta, 4),
            fixity_text(r.lateral),
            fixity_text(r.twist)
        )?;
    }
    if let Some((end, wf)) = root_warping(m) {
        // Below KAPPA_NEGLIGIBLE the solver drops the warping stiffness, so
        // a warping restraint acts on nothing (the solve's note says so too).
        let ignored = if !wf.is_free() && m.kappa < crate::solve::KAPPA_NEGLIGIBLE {
            " (ignored: no warping stiffness at this κ)"
        } else {
            ""
        };
        writeln!(
            w,
            "  cantilever root ({end}): warping {}{ignored}",
            fixity_text(wf)
        )?;
    }
    for l in &case.loads {
        let z = l
            .zeta
            .map(|z| format!(", ζ = {}", fx(z, 4)))
            .unwrap_or_default();
        let d = l.direction.map(|d| format!(", {d}")).unwrap_or_default();
        writeln!(
            w,
            "  load {}: {}{}{}",
            l.name.clone().unwrap_or_else(|| l.kind.clone()),
            l.position,
            z,
            d
        )?;
    }
    write_direction(w, "Loads as given", &sol.forward, case, sol, false)?;
    if let Some(r) = &sol.reversed {
        write_direction(
            w,
            "Loads reversed (every load and the axial force change sign)",
            r,
            case,
            sol,
            true,
        )?;
    }
    for n in notes(case, sol) {
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
/// `x,v,phi,v_top_flange,v_bottom_flange` (flange columns empty when the
/// section's flange heights are unknown).
pub fn write_mode_csv(w: &mut dyn Write, case: &ResolvedCase, d: &Direction) -> io::Result<()> {
    writeln!(w, "# {CAUTION}")?;
    let Some(mode) = &d.mode else {
        writeln!(w, "# no mode: {}", d.status.as_str())?;
        return Ok(());
    };
    let (xs, vs, top, bot, xunit, vunit) = match &case.kind {
        // Doubly symmetric: the flange centroids sit at ζ = ±κ. A monosymmetric
        // dimensionless case (δ ≠ 0) does not fix them (they depend on the
        // flanges' share of Iz, which κ and δ do not give): columns left empty.
        CaseKind::Dimensionless if case.member.delta == 0.0 => {
            let a = case.member.kappa / PI;
            (1.0, 1.0, a, -a, "units of L", "units of L·√(GIt/EIz)")
        }
        CaseKind::Dimensionless => (
            1.0,
            1.0,
            f64::NAN,
            f64::NAN,
            "units of L",
            "units of L·√(GIt/EIz)",
        ),
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
        "# buckling mode for the loads as given, normalised so that the largest |phi| is 1 rad"
    )?;
    writeln!(
        w,
        "# x in {xunit}; v (shear centre) and flange lateral displacements in {vunit}; phi in rad"
    )?;
    writeln!(
        w,
        "# flanges: top and bottom flange centroids{}",
        match case.kind {
            CaseKind::Dimensionless if case.member.delta != 0.0 =>
                " unknown for a monosymmetric dimensionless case (delta given, flange heights not): columns left empty",
            CaseKind::Dimensionless =>
                " taken at zeta = +kappa and -kappa (doubly symmetric I-section)",
            _ if !(top.is_finite() && bot.is_finite()) =>
                " unknown for this section: columns left empty",
            _ => "",
        }
    )?;
    writeln!(w, "x,v,phi,v_top_flange,v_bottom_flange")?;
    let f = |x: f64| {
        if !x.is_finite() {
            return String::new();
        }
        let x = if x.abs() < 1e-300 { 0.0 } else { x };
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

//! Unit tests of the case module: the dimensionless contract example, one
//! test per class of bad input (checking line, column and key), and the
//! physical conversion against hand computation of the domain-notes formulas.

use super::*;
use crate::model::{
    Axial, ContinuousRestraint, Fixity, Load, PointSupport, Restraint, Segment, Support,
};
use crate::section::SectionError;

/// Parse and expect an error.
fn err(text: &str) -> CaseError {
    match parse_case(text, "case.toml") {
        Ok(c) => panic!("expected an error, got {c:?}"),
        Err(e) => e,
    }
}

/// Parse and expect success.
fn ok(text: &str) -> ResolvedCase {
    parse_case(text, "case.toml").unwrap_or_else(|e| panic!("{e}"))
}

/// 1-based line and column of the `nth` (0-based) occurrence of `needle`.
fn at(text: &str, needle: &str, nth: usize) -> (usize, usize) {
    let off = text
        .match_indices(needle)
        .nth(nth)
        .unwrap_or_else(|| panic!("`{needle}` not in text"))
        .0;
    let before = &text[..off];
    let line = before.matches('\n').count() + 1;
    let col = before.rsplit('\n').next().unwrap().chars().count() + 1;
    (line, col)
}

fn assert_at(e: &CaseError, text: &str, needle: &str, nth: usize, key: &str) {
    assert_eq!((e.line, e.column), at(text, needle, nth), "position of {e}");
    assert_eq!(e.key, key, "key of {e}");
    assert_eq!(e.file, "case.toml");
}

const FORKS: &str = "[start]\npreset = \"fork\"\n[end]\npreset = \"fork\"\n";

// ----- the dimensionless contract -------------------------------------------

/// The dimensionless schema example (every table), mapped to the model by
/// hand: presets then overrides, `direction = "down"` → fz = −value,
/// uniform → Distributed over 0..1 (schema as specified for this module).
#[test]
fn case_dimensionless_contract_example() {
    let text = r#"
kappa = 0.5              # ≥ 0
delta = -0.1
axial = 0.3
zeta_centroid = 0.2
rho = 1.5
[solver]
tolerance = 1e-4
[start]
preset = "built-in"
warping = "free"
[end]
lateral = "fixed"
twist = 4
[[support]]
at = 0.5
preset = "fork"
lateral_rotation = 2.5
[[load]]
kind = "point"
name = "tip"
at = 1.0
value = 1.0
direction = "down"
zeta = 0.6
[[load]]
kind = "uniform"
value = 2
direction = "up"
zeta = -0.3
[[load]]
kind = "distributed"
from = 0.2
to = 0.6
value = 1.0
value_end = 3.0
[[restraint]]
name = "tip-brace"
at = 1.0
lateral = "fixed"
zeta = 0.6
[[continuous_restraint]]
to = 0.5
zeta = 0.4
lateral = 10.0
[[segment]]
from = 0.0
to = 0.25
eiz = 2.0
eiw = 0.0
"#;
    let c = ok(text);
    let mut start = Support::BUILT_IN;
    start.warping = Fixity::Free;
    let mut end = Support::FREE;
    end.lateral = Fixity::Fixed;
    end.twist = Fixity::Spring(4.0);
    let mut mid = Support::FORK;
    mid.lateral_rotation = Fixity::Spring(2.5);
    let expected = Member {
        kappa: 0.5,
        delta: -0.1,
        start,
        end,
        supports: vec![PointSupport {
            at: 0.5,
            support: mid,
        }],
        restraints: vec![Restraint {
            at: 1.0,
            zeta: 0.6,
            lateral: Fixity::Fixed,
            twist: Fixity::Free,
        }],
        continuous: vec![ContinuousRestraint {
            from: 0.0,
            to: 0.5,
            zeta: 0.4,
            lateral: 10.0,
            twist: 0.0,
        }],
        loads: vec![
            Load::Point {
                at: 1.0,
                fz: -1.0,
                zeta: 0.6,
            },
            Load::Distributed {
                from: 0.0,
                to: 1.0,
                fz_from: 2.0,
                fz_to: 2.0,
                zeta: -0.3,
            },
            Load::Distributed {
                from: 0.2,
                to: 0.6,
                fz_from: -1.0,
                fz_to: -3.0,
                zeta: 0.0,
            },
        ],
        axial: Some(Axial {
            n: 0.3,
            zeta_centroid: 0.2,
            rho: 1.5,
        }),
        segments: vec![Segment {
            from: 0.0,
            to: 0.25,
            eiz: 2.0,
            git: 1.0,
            eiw: 0.0,
            eiy: 1.0,
            delta: -0.1,
        }],
    };
    assert_eq!(c.member, expected);
    assert_eq!(c.scales, Scales::UNIT);
    assert!(matches!(c.kind, CaseKind::Dimensionless));
    assert_eq!(c.tolerance, Some(1e-4));
    assert!(c.notes.is_empty(), "{:?}", c.notes);
    assert_eq!(c.loads.len(), 3);
    assert_eq!(c.loads[0].name.as_deref(), Some("tip"));
    assert_eq!(c.loads[0].kind, "point");
    assert_eq!(c.loads[0].values, vec![1.0]);
    assert_eq!(c.loads[0].unit, "");
    assert_eq!(c.loads[0].zeta, Some(0.6));
    assert_eq!(c.loads[0].position, "x = 1 L");
    assert_eq!(c.loads[2].values, vec![1.0, 3.0]);
    assert_eq!(c.loads[2].position, "x = 0.2 L to 0.6 L");
}

#[test]
fn case_dimensionless_defaults_and_end_moments() {
    let text = format!(
        "kappa = 1\n{FORKS}[[load]]\nkind = \"end-moments\"\nstart = 1.0\nend = -0.5\n[[load]]\nkind = \"point\"\nat = 0.5\n"
    );
    let c = ok(&text);
    assert_eq!(c.member.start, Support::FORK);
    assert_eq!(
        c.member.loads[0],
        Load::EndMoments {
            start: 1.0,
            end: -0.5
        }
    );
    // value defaults to 1, direction to down, zeta to 0.
    assert_eq!(
        c.member.loads[1],
        Load::Point {
            at: 0.5,
            fz: -1.0,
            zeta: 0.0
        }
    );
    assert_eq!(c.member.axial, None);
    assert_eq!(c.loads[0].zeta, None);
    assert_eq!(c.tolerance, None);
}

#[test]
fn case_kappa_zero_notes_ignored_warping() {
    let text =
        "kappa = 0\n[start]\npreset = \"built-in\"\n[end]\n[[load]]\nkind = \"point\"\nat = 1\n";
    // The note is the solver's (it applies however a member reaches it); a
    // case read from a file must carry it through to the report.
    let notes = |text: &str| {
        let c = ok(text);
        let s = crate::solve::solve(&c.member, &Default::default()).unwrap();
        c.notes.into_iter().chain(s.notes).collect::<Vec<_>>()
    };
    assert_eq!(
        notes(text),
        vec!["κ = 0: the section has no warping stiffness, so warping restraints are ignored"]
    );
    let text = "kappa = 0\n[start]\npreset = \"built-in\"\nwarping = \"free\"\n[end]\n[[load]]\nkind = \"point\"\nat = 1\n";
    assert!(notes(text).is_empty());
}

// ----- bad input: each class points at the right key ------------------------

#[test]
fn case_error_unknown_top_level_key_lists_accepted() {
    let text = format!("kappa = 1\nkapa = 2\n{FORKS}");
    let e = err(&text);
    assert_at(&e, &text, "kapa", 0, "kapa");
    assert!(
        e.message.contains("accepted keys") && e.message.contains("`delta`"),
        "{e}"
    );
    assert!(e.to_string().starts_with("case.toml:2:1: kapa: "), "{e}");
}

#[test]
fn case_error_unknown_key_in_table_suggests() {
    let text = "kappa = 1\n[start]\npreset = \"fork\"\nwarpin = \"fixed\"\n[end]\n";
    let e = err(text);
    assert_at(&e, text, "warpin", 0, "start.warpin");
    assert!(e.message.contains("did you mean `warping`"), "{e}");
    assert!(e.message.contains("`in_plane_rotation`"), "{e}");
}

#[test]
fn case_error_unknown_preset_lists_presets() {
    let text = "kappa = 1\n[start]\npreset = \"pinned\"\n[end]\n";
    let e = err(text);
    assert_at(&e, text, "\"pinned\"", 0, "start.preset");
    assert!(
        e.message.contains("\"fork\", \"built-in\", \"free\""),
        "{e}"
    );
}

#[test]
fn case_error_wrong_type_says_expected() {
    let text = format!("kappa = \"big\"\n{FORKS}");
    let e = err(&text);
    assert_at(&e, &text, "\"big\"", 0, "kappa");
    assert!(e.message.contains("expected a number"), "{e}");
    let text = format!("kappa = 1\n{FORKS}[[load]]\nkind = \"point\"\nat = 0.5\nzeta = true\n");
    let e = err(&text);
    assert_at(&e, &text, "true", 0, "load[0].zeta");
    assert!(e.message.contains("expected a number"), "{e}");
}

#[test]
fn case_error_nan_and_inf_rejected() {
    for lit in ["nan", "inf", "-inf", "+nan"] {
        let text =
            format!("kappa = 1\n{FORKS}[[load]]\nkind = \"point\"\nat = 0.5\nvalue = {lit}\n");
        let e = err(&text);
        assert_at(&e, &text, lit, 0, "load[0].value");
        assert!(e.message.contains("finite"), "{e}");
    }
    let text = format!("kappa = nan\n{FORKS}");
    assert_at(&err(&text), &text, "nan", 0, "kappa");
}

#[test]
fn case_error_negative_kappa_and_spring() {
    let text = format!("kappa = -0.5\n{FORKS}");
    let e = err(&text);
    assert_at(&e, &text, "-0.5", 0, "kappa");
    let text = "kappa = 1\n[start]\npreset = \"fork\"\ntwist = -3\n[end]\n";
    let e = err(text);
    assert_at(&e, text, "-3", 0, "start.twist");
    assert!(e.message.contains("0 or more"), "{e}");
}

#[test]
fn case_error_load_outside_member() {
    let text = format!("kappa = 1\n{FORKS}[[load]]\nkind = \"point\"\nat = 1.5\n");
    let e = err(&text);
    assert_at(&e, &text, "1.5", 0, "load[0].at");
    assert!(e.message.contains("outside the member"), "{e}");
    let text = format!(
        "kappa = 1\n{FORKS}[[load]]\nkind = \"point\"\nat = 0.5\n[[load]]\nkind = \"distributed\"\nfrom = 0.6\nto = 0.2\n"
    );
    let e = err(&text);
    assert_at(&e, &text, "0.2", 0, "load[1].to");
}

#[test]
fn case_error_all_loads_zero_and_no_loads() {
    let text = format!(
        "kappa = 1\n{FORKS}[[load]]\nkind = \"uniform\"\nvalue = 0\n[[load]]\nkind = \"point\"\nat = 0.5\nvalue = 0.0\n"
    );
    let e = err(&text);
    assert_at(&e, &text, "0\n[[load]]", 0, "load[0].value");
    assert!(e.message.contains("all loads are zero"), "{e}");
    let text = format!("kappa = 1\n{FORKS}");
    let e = err(&text);
    assert_eq!((e.line, e.column, e.key.as_str()), (1, 1, "load"));
    // An axial force alone is a load.
    let text = format!("kappa = 1\naxial = 1.0\n{FORKS}");
    assert!(ok(&text).member.loads.is_empty());
}

#[test]
fn case_error_duplicated_end_table() {
    let text = "kappa = 1\n[start]\npreset = \"fork\"\n[end]\npreset = \"fork\"\n[start]\ntwist = \"free\"\n";
    let e = err(text);
    assert_at(&e, text, "start", 1, "start");
    assert!(e.message.contains("more than once"), "{e}");
    let text = "kappa = 1\nkappa = 2\n";
    let e = err(text);
    assert_at(&e, text, "kappa", 1, "kappa");
}

#[test]
fn case_error_missing_end_tables() {
    let e = err("kappa = 1\n[end]\n");
    assert_eq!((e.line, e.column, e.key.as_str()), (1, 1, "start"));
    assert!(e.message.contains("[start]"), "{e}");
    let e = err("kappa = 1\n[start]\n");
    assert_eq!(e.key, "end");
}

#[test]
fn case_error_kind_both_or_neither() {
    let text = "kappa = 1\nlength = 6\n";
    let e = err(text);
    assert_at(&e, text, "length", 0, "length");
    assert!(e.message.contains("not both"), "{e}");
    let e = err("[start]\n[end]\n");
    assert_eq!((e.line, e.column), (1, 1));
    assert!(
        e.message.contains("`kappa`") && e.message.contains("`length`"),
        "{e}"
    );
    // A kappa written after a table header lands in that table: say so.
    let text = "[start]\npreset = \"fork\"\nkappa = 1\n[end]\n";
    let e = err(text);
    assert_at(&e, text, "kappa", 0, "start.kappa");
    assert!(e.message.contains("before the first"), "{e}");
}

#[test]
fn case_error_end_moments_reject_value_and_zeta() {
    let text =
        format!("kappa = 1\n{FORKS}[[load]]\nkind = \"end-moments\"\nstart = 1\nzeta = 0.5\n");
    let e = err(&text);
    assert_at(&e, &text, "zeta", 0, "load[0].zeta");
    assert!(e.message.contains("only `start` and `end`"), "{e}");
    let text = format!("kappa = 1\n{FORKS}[[load]]\nkind = \"moment\"\n");
    let e = err(&text);
    assert_at(&e, &text, "\"moment\"", 0, "load[0].kind");
    assert!(e.message.contains("\"end-moments\""), "{e}");
}

#[test]
fn case_error_model_validation_is_placed() {
    // A restraint that holds nothing: reported by Member::validate as
    // `restraint[0]`, placed at the [[restraint]] header.
    let text = format!("kappa = 1\n{FORKS}[[load]]\nkind = \"uniform\"\n[[restraint]]\nat = 0.5\n");
    let e = err(&text);
    assert_at(&e, &text, "[[restraint]]", 0, "restraint[0]");
    assert!(e.message.contains("restrains nothing"), "{e}");
    // A couple at a free end: `load[0].end`.
    let text = "kappa = 1\n[start]\npreset = \"built-in\"\nin_plane_rotation = \"free\"\n[end]\n[[load]]\nkind = \"end-moments\"\nend = 1.0\n";
    let e = err(text);
    assert_at(&e, text, "1.0", 0, "load[0].end");
    // Overlapping segments: `segment[1]`.
    let text = format!(
        "kappa = 1\n{FORKS}[[load]]\nkind = \"uniform\"\n[[segment]]\nfrom = 0\nto = 0.5\n[[segment]]\nfrom = 0.4\nto = 1\n"
    );
    let e = err(&text);
    assert_at(&e, &text, "[[segment]]", 1, "segment[1]");
}

#[test]
fn case_error_syntax_and_wrong_shape() {
    let text = "kappa = 1\n[start\n";
    let e = err(text);
    assert_eq!(e.line, 2, "{e}");
    assert!(e.message.contains("TOML syntax error"), "{e}");
    let text = "kappa = 1\n[[start]]\n[end]\n";
    let e = err(text);
    assert_at(&e, text, "[[start]]", 0, "start");
    assert!(e.message.contains("not an array of tables"), "{e}");
    let text = "kappa = 1\n[start]\n[end]\n[load]\nkind = \"point\"\n";
    let e = err(text);
    assert_at(&e, text, "[load]", 0, "load");
    assert!(e.message.contains("[[load]]"), "{e}");
}

// ----- physical cases ---------------------------------------------------------

/// An IPE 300-like section given by its properties (Iz = 603.8 cm⁴,
/// It = 20.12 cm⁴, Iw = 125.9·10³ cm⁶, Iy = 8356 cm⁴, A = 53.81 cm²: section
/// tables for IPE 300, from memory), with heights for the named positions.
const PROPS: &str = r#"[section]
kind = "properties"
iy = 8.356e7
iz = 6.038e6
it = 2.012e5
iw = 1.259e11
top_flange = 144.65
"#;

/// κ and ζ of a physical case against hand computation of the domain-notes
/// formulas (κ = (π/L)·√(EIw/GIt), ζ = (π·a/L)·√(EIz/GIt), Mu = √(EIz·GIt)/L;
/// EIz = E·Iz·1e-9 kN·m², EIw = E·Iw·1e-15 kN·m⁴). Hand values (E = 210000,
/// G = 81000 MPa, L = 6 m): EIz = 1267.98 kN·m², GIt = 16.2972 kN·m²,
/// EIw = 26.439 kN·m⁴, κ = 0.666906, ζ(a = 150 mm) = 0.692771,
/// Mu = 23.95860 kN·m, a 10 kN point load → fz = −10·L/Mu = −2.504320,
/// 5 kN/m → −5·L²/Mu = −7.512960.
#[test]
fn case_physical_conversion_matches_hand_computation() {
    let text = format!(
        "length = \"6000 mm\"\n{PROPS}[start]\npreset = \"fork\"\n[end]\npreset = \"fork\"\nlateral = 100.0\n\
         warping = 2.0\n[[load]]\nkind = \"point\"\nname = \"purlin\"\nat = \"3 m\"\nvalue = 10\nheight = \"150 mm\"\n\
         [[load]]\nkind = \"uniform\"\nvalue = 5\nheight = \"0.15 m\"\ndirection = \"up\"\n\
         [[continuous_restraint]]\ntwist = 3.0\n"
    );
    let c = ok(&text);
    let m = &c.member;
    let close = |a: f64, b: f64, what: &str| {
        assert!(
            (a - b).abs() <= 1e-6 * b.abs().max(1.0),
            "{what}: {a} vs {b}"
        )
    };
    close(m.kappa, 0.666906019, "kappa");
    close(m.delta, 0.0, "delta");
    let Load::Point { at, fz, zeta } = m.loads[0] else {
        panic!()
    };
    close(at, 0.5, "at");
    close(fz, -2.504319882, "fz");
    close(zeta, 0.692770818, "zeta");
    let Load::Distributed { fz_from, zeta, .. } = m.loads[1] else {
        panic!()
    };
    close(fz_from, 7.512959646, "q");
    close(zeta, 0.692770818, "zeta q");
    // Springs: lateral 100 kN/m → k·L³/EIz = 17.034969; warping 2 kN·m³/rad →
    // k/(GIt·L) = 0.020453411; continuous twist 3 → k·L²/GIt = 6.626905 (hand values).
    let Fixity::Spring(k) = m.end.lateral else {
        panic!()
    };
    close(k, 17.03496901, "lateral spring");
    let Fixity::Spring(k) = m.end.warping else {
        panic!()
    };
    close(k, 0.02045341122, "warping spring");
    close(m.continuous[0].twist, 6.626905235, "continuous twist");
    // Scales: moment Mu, force Mu/L, height L/π·√(GIt/EIz) (so a = ζ·height).
    close(c.scales.length, 6.0, "L");
    close(c.scales.moment, 23.95860067, "Mu");
    close(c.scales.force, 23.95860067 / 6.0, "force");
    close(zeta * c.scales.height, 0.15, "height scale");
    close(c.scales.axial, 1267.98 / 36.0, "axial scale");
    assert_eq!(c.loads[0].unit, "kN");
    assert_eq!(c.loads[0].values, vec![10.0]);
    assert_eq!(c.loads[0].position, "x = 3.000 m");
    assert_eq!(c.loads[1].unit, "kN/m");
    let CaseKind::Physical(info) = &c.kind else {
        panic!()
    };
    close(info.length, 6.0, "length");
    assert_eq!((info.e, info.g), (210000.0, 81000.0));
}

/// Domain notes: for a doubly symmetric I-section Iw = Iz·hs²/4, so a load at
/// the top-flange centroid (a = hs/2) has ζ = κ.
#[test]
fn case_physical_top_flange_load_has_zeta_equal_kappa() {
    let (iz, hs): (f64, f64) = (6.038e6, 289.3);
    let text = format!(
        "length = 6\n[section]\nkind = \"properties\"\niy = 8.356e7\niz = {iz}\nit = 2.012e5\niw = {}\n\
         top_flange = {}\n{FORKS}[[load]]\nkind = \"uniform\"\nvalue = 1\nheight = \"top-flange\"\n",
        iz * hs * hs / 4.0,
        hs / 2.0
    );
    let c = ok(&text);
    let Load::Distributed { zeta, .. } = c.member.loads[0] else {
        panic!()
    };
    assert!(
        (zeta - c.member.kappa).abs() < 1e-12,
        "{zeta} vs {}",
        c.member.kappa
    );
    assert!((zeta - 0.668061992).abs() < 1e-8, "{zeta}");
}

/// δ = (βy/L)·√(EIz/GIt), n = N·L²/EIz, centroid ζ = π(−zs)/L·√(EIz/GIt),
/// ρ = π·√((Iy+Iz)/A)/L·√(EIz/GIt) (domain notes). Hand values for βy = −120 mm,
/// zs = 20 mm, A = 5381 mm², N = 50 kN: δ = −0.1764126, n = 1.4195808,
/// ζc = −0.0923694, ρ = 0.5959585.
#[test]
fn case_physical_monosymmetry_and_axial() {
    let text = format!(
        "length = \"6 m\"\naxial = 50\n{PROPS}beta_y = -120\nzs = 20\narea = 5381\n{FORKS}"
    );
    let c = ok(&text);
    let a = c.member.axial.unwrap();
    assert!(
        (c.member.delta + 0.1764126402).abs() < 1e-8,
        "{}",
        c.member.delta
    );
    assert!((a.n - 1.41958075).abs() < 1e-7, "{}", a.n);
    assert!(
        (a.zeta_centroid + 0.09236944242).abs() < 1e-9,
        "{}",
        a.zeta_centroid
    );
    assert!((a.rho - 0.5959584585).abs() < 1e-8, "{}", a.rho);
    // Without `area` an axial force is refused at `axial`.
    let text = format!("length = \"6 m\"\naxial = 50\n{PROPS}{FORKS}");
    let e = err(&text);
    assert_at(&e, &text, "50", 0, "axial");
}

#[test]
fn case_physical_positions_and_lengths() {
    let base = format!("{PROPS}{FORKS}");
    // 19.7 ft = 6.00456 m (1 ft = 0.3048 m exactly).
    let text =
        format!("length = \"19.7 ft\"\n{base}[[load]]\nkind = \"point\"\nat = 0.25\nvalue = 1\n");
    let c = ok(&text);
    assert!((c.scales.length - 6.00456).abs() < 1e-12);
    assert_eq!(c.loads[0].position, "x = 1.501 m");
    // A distance beyond the end.
    let text = format!("length = 6\n{base}[[load]]\nkind = \"point\"\nat = \"7 m\"\nvalue = 1\n");
    let e = err(&text);
    assert_at(&e, &text, "\"7 m\"", 0, "load[0].at");
    assert!(e.message.contains("outside the member"), "{e}");
    // A plain number above 1 is not a distance.
    let text = format!("length = 6\n{base}[[load]]\nkind = \"point\"\nat = 3\nvalue = 1\n");
    let e = err(&text);
    assert!(
        e.message.contains("fraction of L") && e.message.contains("\"2.5 m\""),
        "{e}"
    );
    // Unknown unit.
    let text = format!("length = \"6 yd\"\n{base}");
    let e = err(&text);
    assert_at(&e, &text, "\"6 yd\"", 0, "length");
    assert!(e.message.contains("m, mm, cm, ft, in"), "{e}");
    // Zero and negative lengths.
    for l in ["0", "\"-6 m\""] {
        let text = format!("length = {l}\n{base}");
        let e = err(&text);
        assert_at(&e, &text, l, 0, "length");
        assert!(e.message.contains("greater than 0"), "{e}");
    }
    let text = format!("length = inf\n{base}");
    assert!(err(&text).message.contains("finite"));
}

#[test]
fn case_physical_height_errors() {
    let base =
        format!("length = 6\n{PROPS}{FORKS}[[load]]\nkind = \"point\"\nat = 0.5\nvalue = 1\n");
    let text = format!("{base}height = \"top flange\"\n");
    let e = err(&text);
    assert_at(&e, &text, "\"top flange\"", 0, "load[0].height");
    assert!(
        e.message.contains("did you mean \"top-flange\"")
            && e.message.contains("\"bottom-surface\""),
        "{e}"
    );
    let text = format!("{base}zeta = 0.5\n");
    let e = err(&text);
    assert_at(&e, &text, "zeta", 0, "load[0].zeta");
    assert!(e.message.contains("use `height`"), "{e}");
    let text = format!("{base}height = \"top-surface\"\n");
    let e = err(&text);
    assert!(e.message.contains("`top_surface`"), "{e}");
    let text = format!("{base}height = 120\n");
    assert!(err(&text).message.contains("unit"));
    let text = format!("{base}height = \"4 in\"\n");
    let Load::Point { zeta, .. } = ok(&text).member.loads[0] else {
        panic!()
    };
    // a = 4 in = 0.1016 m → ζ = 0.6927708·(0.1016/0.15) (hand value scaled).
    assert!((zeta - 0.6927708182 * 0.1016 / 0.15).abs() < 1e-8);
    // Physical loads need a value.
    let text = format!("length = 6\n{PROPS}{FORKS}[[load]]\nkind = \"point\"\nat = 0.5\n");
    let e = err(&text);
    assert_at(&e, &text, "[[load]]", 0, "load[0].value");
    assert!(e.message.contains("missing `value`"), "{e}");
}

#[test]
fn case_physical_section_errors() {
    let text = format!(
        "length = 6\n[section]\nkind = \"i\"\nh = 300\nb = 150\ntf = 0\ntw = 7.1\n{FORKS}[[load]]\nkind = \"uniform\"\nvalue = 1\n"
    );
    let e = err(&text);
    assert_at(&e, &text, "0\ntw", 0, "section.tf");
    assert!(e.message.contains("greater than 0"), "{e}");
    let text = format!("length = 6\n[section]\nkind = \"i\"\nh = 300\nb_top = 150\n{FORKS}");
    let e = err(&text);
    assert_at(&e, &text, "b_top", 0, "section.b_top");
    assert!(e.message.contains("\"mono-i\""), "{e}");
    let text = format!("length = 6\n[section]\nkind = \"channel\"\n{FORKS}");
    let e = err(&text);
    assert!(e.message.contains("\"rectangle\""), "{e}");
    let text = format!(
        "length = 6\n[section]\nkind = \"properties\"\niz = 1e6\nit = 1e5\niw = 1e9\n{FORKS}"
    );
    let e = err(&text);
    assert_at(&e, &text, "[section]", 0, "section.iy");
    let text = format!("length = 6\n{FORKS}");
    let e = err(&text);
    assert_eq!((e.line, e.column, e.key.as_str()), (1, 1, "section"));
    let text = format!("length = 6\ndelta = 0.1\n{PROPS}{FORKS}");
    let e = err(&text);
    assert_at(&e, &text, "delta", 0, "delta");
    assert!(e.message.contains("βy"), "{e}");
}

/// A [`SectionError`] is placed at its key in [section] (or at the header
/// when the key is not written there).
#[test]
fn case_section_error_is_placed_at_its_key() {
    let text = "[section]\nkind = \"i\"\nh = 300\ntf = 160\n";
    let root = toml::de::DeTable::parse(text).unwrap();
    let src = span::Source {
        text,
        origin: "case.toml",
    };
    let loc = schema::Tab {
        src: &src,
        path: "",
        span: &(0..0),
        t: root.get_ref(),
    }
    .table("section")
    .unwrap()
    .unwrap();
    let t = loc.tab(&src);
    let e = resolve::section_error(
        &t,
        &["kind", "h", "tf"],
        SectionError {
            field: "tf".into(),
            message: "too thick".into(),
        },
    );
    assert_at(&e, text, "160", 0, "section.tf");
    assert_eq!(e.message, "too thick");
    let e = resolve::section_error(
        &t,
        &["kind", "h", "tf"],
        SectionError {
            field: String::new(),
            message: "bad".into(),
        },
    );
    assert_at(&e, text, "[section]", 0, "section");
}

/// Physical segments: ratios against the reference section; δ from βy.
#[test]
fn case_physical_segment_ratios() {
    let text = format!(
        "length = 6\n{PROPS}{FORKS}[[load]]\nkind = \"uniform\"\nvalue = 1\n[[segment]]\nfrom = \"0 m\"\nto = \"1.5 m\"\n\
         [segment.section]\nkind = \"properties\"\niy = 1.6712e8\niz = 1.2076e7\nit = 4.024e5\niw = 1.259e11\nbeta_y = -120\n"
    );
    let c = ok(&text);
    let s = c.member.segments[0];
    assert_eq!((s.from, s.to), (0.0, 0.25));
    assert!(
        (s.eiz - 2.0).abs() < 1e-12 && (s.git - 2.0).abs() < 1e-12 && (s.eiy - 2.0).abs() < 1e-12
    );
    assert!((s.eiw - 1.0).abs() < 1e-12);
    assert!((s.delta + 0.1764126402).abs() < 1e-8, "{}", s.delta);
}

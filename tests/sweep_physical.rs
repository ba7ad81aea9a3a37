//! Physical sweeps: sections × lengths × load heights, with κ and ζ derived
//! by the case reader and Mcr written in kN·m.

use ltb_atlas::section::{Shape, properties};
use ltb_atlas::stage;
use ltb_atlas::sweep::spec::parse_spec;
use ltb_atlas::sweep::{Row, header};
use std::f64::consts::PI;
use std::path::Path;

// Section dimensions: IPE 300 and IPE 400 (h, b, tf, tw, r in mm) as in the
// ArcelorMittal sections catalogue, IPE table — the same rows the section
// tests check (tests/section_tables.rs).
const SPEC: &str = r#"
[[family]]
name = "roof-beams"
section = [
  { label = "ipe-300", kind = "i", h = 300.0, b = 150.0, tf = 10.7, tw = 7.1, r = 15.0 },
  { label = "ipe-400", kind = "i", h = 400.0, b = 180.0, tf = 13.5, tw = 8.6, r = 21.0 },
]
length = ["4 m", "6.5 m"]
[family.case]
length = "5 m"
[family.case.section]
kind = "i"
h = 300.0
b = 150.0
tf = 10.7
tw = 7.1
r = 15.0
[family.case.start]
preset = "fork"
[family.case.end]
preset = "fork"
[[family.case.load]]
kind = "end-moments"
start = 100.0
end = 100.0
"#;

fn rows(text: &str) -> (ltb_atlas::sweep::Family, Vec<Row>) {
    let spec = parse_spec(text, "t.toml", Path::new(".")).expect("spec parses");
    let opts = stage::Options {
        cache: stage::CacheChoice::Off,
        jobs: Some(1),
        tolerance: 1e-6,
        ..Default::default()
    };
    let pool = opts.pool().unwrap();
    let mut cache = opts.open_cache().unwrap();
    let f = spec.families[0].clone();
    let rows = stage::family_rows(&f, &opts.settings(), &pool, &mut cache).unwrap();
    (f, rows)
}

#[test]
fn uniform_moment_matches_the_closed_form_for_every_section_and_length() {
    // Forks and equal end moments: Mcr = (π/L)·√(E·Iz·G·It)·√(1 + κ²),
    // κ = (π/L)·√(E·Iw/(G·It)) (Timoshenko & Gere, Theory of Elastic
    // Stability, 1961, §6.2), with E = 210 000 MPa, G = 81 000 MPa (the case
    // reader's defaults).
    let (f, rows) = rows(SPEC);
    let h = header(&f);
    assert_eq!(&h[..3], &["section", "length", "kappa"]);
    assert!(h.contains(&"mcr_knm".to_string()));
    let shapes = [
        Shape::I {
            h: 300.0,
            b: 150.0,
            tf: 10.7,
            tw: 7.1,
            r: 15.0,
        },
        Shape::I {
            h: 400.0,
            b: 180.0,
            tf: 13.5,
            tw: 8.6,
            r: 21.0,
        },
    ];
    let lengths = [4.0, 6.5];
    assert_eq!(rows.len(), 4);
    for (i, r) in rows.iter().enumerate() {
        let p = properties(&shapes[i / 2]).unwrap();
        let l = lengths[i % 2];
        let (e, g) = (210e3 * 1e-3, 81e3 * 1e-3); // kN/mm²
        // Stiffnesses in kN·m² (mm⁴ → m⁴ with 1e-12, kN/mm² → kN/m² with 1e6).
        let eiz = e * 1e6 * p.iz * 1e-12;
        let git = g * 1e6 * p.it * 1e-12;
        let eiw = e * 1e6 * p.iw * 1e-18;
        let kappa = PI / l * (eiw / git).sqrt();
        assert!(
            (r.point.kappa / kappa - 1.0).abs() < 1e-9,
            "κ {} vs {kappa}",
            r.point.kappa
        );
        let mcr = PI / l * (eiz * git).sqrt() * (1.0 + kappa * kappa).sqrt();
        let got = r.mu_cr.unwrap() * r.point.mcr_scale.unwrap();
        assert!((got / mcr - 1.0).abs() < 2e-6, "Mcr {got} vs {mcr} kN·m");
        assert_eq!(
            r.point.case_labels,
            vec![
                ("section", ["ipe-300", "ipe-400"][i / 2].to_string()),
                ("length", ["4 m", "6.5 m"][i % 2].to_string())
            ]
        );
    }
}

#[test]
fn a_height_axis_moves_the_loads_to_the_named_heights() {
    // A top-flange load on a doubly symmetric I-section sits at ζ = κ and a
    // bottom-flange load at ζ = −κ (domain notes: Iw = Iz·hs²/4).
    let text = SPEC
        .replace(
            "[[family.case.load]]\nkind = \"end-moments\"\nstart = 100.0\nend = 100.0",
            "[[family.case.load]]\nkind = \"uniform\"\nvalue = 10.0\nheight = \"shear-centre\"",
        )
        .replace(
            "length = [\"4 m\", \"6.5 m\"]",
            "length = [\"4 m\"]\nheight = [\"top-flange\", \"shear-centre\", \"bottom-flange\"]",
        );
    let (_, rows) = rows(&text);
    assert_eq!(rows.len(), 6);
    for (i, r) in rows.iter().enumerate() {
        let z = r.point.zeta.unwrap();
        let k = r.point.kappa;
        let want = [k, 0.0, -k][i % 3];
        assert!(
            (z - want).abs() < 1e-12 * k.max(1.0),
            "row {i}: ζ {z} vs {want}"
        );
    }
    // Top-flange loads destabilise: lower Mcr than at the shear centre.
    assert!(rows[0].mu_cr.unwrap() < rows[1].mu_cr.unwrap());
    assert!(rows[1].mu_cr.unwrap() < rows[2].mu_cr.unwrap());
}

#[test]
fn physical_axes_refuse_kappa_and_report_bad_values_where_they_are() {
    let text = SPEC.replace(
        "length = [\"4 m\", \"6.5 m\"]",
        "length = [\"4 m\", \"6.5 m\"]\nkappa = [1.0]",
    );
    let e = parse_spec(&text, "t.toml", Path::new(".")).unwrap_err();
    assert!(e.to_string().contains("κ and ζ"), "{e}");
    let text = SPEC.replace("\"6.5 m\"", "\"6.5 parsecs\"");
    let e = parse_spec(&text, "t.toml", Path::new(".")).unwrap_err();
    // The error points at the axis value's own line in the spec.
    assert_eq!((e.line, e.column), (8, 18), "{e}");
}

#[test]
fn sharded_physical_sweeps_merge_into_the_unsharded_files() {
    // Sharding must not change a byte (issue contract), print tables included.
    let dir = tempfile::tempdir().unwrap();
    let spec_path = dir.path().join("spec.toml");
    let text = SPEC
        .replace(
            "[[family.case.load]]\nkind = \"end-moments\"\nstart = 100.0\nend = 100.0",
            "[[family.case.load]]\nkind = \"uniform\"\nvalue = 10.0\nheight = \"shear-centre\"",
        )
        .replace(
            "length = [\"4 m\", \"6.5 m\"]",
            "length = [\"4 m\", \"6.5 m\"]\nheight = [\"top-flange\", \"bottom-flange\"]",
        );
    std::fs::write(&spec_path, text).unwrap();
    let ls = stage::load_spec(&spec_path).unwrap();
    let opts = stage::Options {
        cache: stage::CacheChoice::Off,
        quiet: true,
        ..Default::default()
    };
    let whole = dir.path().join("whole");
    stage::sweep(&ls, &whole, &opts, None).unwrap();
    let parts = dir.path().join("parts");
    for k in 1..=3 {
        stage::sweep(
            &ls,
            &parts,
            &opts,
            Some(ltb_atlas::sweep::run::Shard { k, n: 3 }),
        )
        .unwrap();
    }
    ltb_atlas::sweep::run::merge(&ls.spec, &ls.hash, &parts).unwrap();
    for name in [
        "roof-beams.csv",
        "roof-beams.ipe-300.table.csv",
        "roof-beams.ipe-400.table.csv",
    ] {
        let a = std::fs::read(whole.join(name)).unwrap();
        let b = std::fs::read(parts.join(name)).unwrap();
        assert_eq!(a, b, "{name}");
    }
    let table = std::fs::read_to_string(whole.join("roof-beams.ipe-300.table.csv")).unwrap();
    assert!(
        table.contains("length,height=top-flange,height=bottom-flange\n"),
        "{table}"
    );
}

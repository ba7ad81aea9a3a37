//! The `c-curves` form across a monosymmetry axis δ (C3): on engine sweeps
//! of a fork-supported span under uniform moment, C1 = 1 and C3 = ±1 at
//! every κ (the closed form of the domain notes); on a monosymmetric span
//! with a uniform load the printed fit reproduces fresh engine solves
//! within its reported bound; `eval --delta` follows the contract.

use ltb_atlas::stage::{self, CacheChoice, Options};
use serde_json::Value;
use std::f64::consts::PI;
use std::path::Path;
use std::process::Command;

fn opts() -> Options {
    Options {
        quiet: true,
        cache: CacheChoice::Off,
        ..Default::default()
    }
}

fn fit_spec(dir: &Path, spec: &str) -> stage::LoadedSpec {
    let p = dir.join("spec.toml");
    std::fs::write(&p, spec).unwrap();
    let ls = stage::load_spec(&p).unwrap();
    stage::fit::run(&ls, &dir.join("fit"), &opts()).unwrap();
    ls
}

fn json(p: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
}

/// Uniform moment with forks, monosymmetric: μcr = π·[√(1 + κ² + (π·δ/2)²)
/// − π·δ/2] under sagging moment (domain notes; Trahair, Flexural-Torsional
/// Buckling of Structures, 1993, with the opposite sign convention), δ's
/// sign flipped under hogging.
fn closed_form(kappa: f64, delta: f64, sagging: bool) -> f64 {
    let w = PI * delta / 2.0 * if sagging { 1.0 } else { -1.0 };
    PI * ((1.0 + kappa * kappa + w * w).sqrt() - w)
}

const UNIFORM_MOMENT: &str = r#"[[family]]
name = "mono-moment"
kappa = [0.3, 0.6, 1.0, 2.0]
direction = ["down", "up"]
fit = ["c-curves"]
[[family.axis]]
path = "delta"
values = [-0.4, -0.2, 0.0, 0.2, 0.4]
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "end-moments"
start = 1.0
end = 1.0
"#;

#[test]
fn uniform_moment_gives_c1_one_and_c3_one_sagging_minus_one_hogging() {
    let d = tempfile::tempdir().unwrap();
    fit_spec(d.path(), UNIFORM_MOMENT);
    let out = d.path().join("fit");
    // "down" keeps the end moments as given (sagging); "up" reverses them
    // (hogging), which flips the sign of δ in the closed form: C3 = −1.
    for (combo, c3) in [("down", 1.0), ("up", -1.0)] {
        let v = json(&out.join(format!("mono-moment.c-curves.{combo}.fit.json")));
        assert_eq!(v["combination"], combo);
        assert_eq!(v["validity"]["delta_min"], -0.4);
        assert_eq!(v["validity"]["delta_max"], 0.4);
        assert_eq!(v["validity"]["zeta_min"], 0.0);
        assert!(v["fit"]["c2_degree"].is_null(), "C2 not determined: {v}");
        assert!(v["typst"].as_str().unwrap().contains("C_3"));
        // Per κ: the engine's values carry relative errors of about 1e-4
        // (its estimate), so C1 and C3 from least squares are held to 5e-4
        // (measured: both equal 1 to 4 decimals).
        for p in v["fit"]["per_kappa"].as_array().unwrap() {
            let (c1, c3v) = (p["c1"].as_f64().unwrap(), p["c3"].as_f64().unwrap());
            assert!((c1 - 1.0).abs() < 5e-4, "{combo}: {p}");
            assert!((c3v - c3).abs() < 5e-4, "{combo}: {p}");
            assert!(p["c2"].is_null());
        }
        // The printed formula against the closed form off the grid.
        let f = out.join(format!("mono-moment.c-curves.{combo}.fit.json"));
        for (k, dl) in [(0.45, -0.3), (1.4, 0.1), (0.8, 0.35)] {
            let e = stage::fit::eval_delta(&f, k, 0.0, dl, false).unwrap();
            let exact = closed_form(k, dl, combo == "down");
            assert!(
                (e.mu_cr / exact - 1.0).abs() < 1e-3,
                "{combo} κ {k} δ {dl}: fit {} closed form {exact}",
                e.mu_cr
            );
        }
        // The measured bound is small (the form is exact here).
        assert!(v["max_rel_error"].as_f64().unwrap() < 5e-3, "{v}");
    }
}

const MONO_UNIFORM_LOAD: &str = r#"[[family]]
name = "mono-udl"
kappa = [0.3, 0.6, 1.0, 1.7, 3.0]
zeta = [-0.6, -0.3, 0.0, 0.3, 0.6]
fit = ["c-curves"]
[[family.axis]]
path = "delta"
values = [-0.4, -0.2, 0.0, 0.2, 0.4]
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "uniform"
"#;

#[test]
fn monosymmetric_uniform_load_fit_reproduces_the_engine_within_its_bound() {
    let d = tempfile::tempdir().unwrap();
    let ls = fit_spec(d.path(), MONO_UNIFORM_LOAD);
    let file = d.path().join("fit/mono-udl.c-curves.fit.json");
    let v = json(&file);
    let bound = v["max_rel_error"].as_f64().unwrap();
    let c3: Vec<f64> = v["fit"]["per_kappa"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["c3"].as_f64().unwrap())
        .collect();
    eprintln!(
        "mono-udl: per-kappa C3 {c3:?}, bound {bound}, typst {}",
        v["typst"]
    );
    // Uniform sagging load on a fork span: the Wagner term acts with the
    // same sign as under uniform sagging moment, so C3 > 0 (ENV 1993-1-1
    // Annex F lists a positive C3 for this case; its value is not asserted:
    // reference-values §3 warns against recalled ENV C3 values).
    assert!(c3.iter().all(|c| *c > 0.0), "{c3:?}");
    assert!(v["fit"]["c2_degree"].is_number());
    // Fresh engine solves at points on no grid of the fit (neither the fit
    // grid nor the validation sub-cell centres): the printed formula is
    // within the reported bound (common practice, no source: an honest
    // bound holds where it was not measured).
    let f = &ls.spec.families[0];
    let idx = vec![0; f.axes.len()];
    let da = f.axes.iter().position(|a| a.column() == "delta").unwrap();
    let pts = [
        (0.37, -0.51, 0.33),
        (0.83, 0.17, -0.27),
        (1.31, 0.44, 0.07),
        (2.4, -0.12, -0.36),
        (0.52, 0.58, -0.05),
    ];
    let points = pts
        .iter()
        .map(|&(k, z, dl)| f.point_with(&idx, Some(k), Some(z), &[(da, dl)]))
        .collect();
    let o = opts();
    let rows = stage::solve_points(
        points,
        &o.settings(),
        &o.pool().unwrap(),
        &mut o.open_cache().unwrap(),
    )
    .unwrap();
    for (&(k, z, dl), r) in pts.iter().zip(rows) {
        assert_eq!(r.point.member.delta, dl);
        let fe = r.mu_cr.unwrap();
        let e = stage::fit::eval_delta(&file, k, z, dl, false).unwrap();
        assert!(
            (e.mu_cr / fe - 1.0).abs() <= bound,
            "κ {k} ζ {z} δ {dl}: fit {} engine {fe}, bound {bound}",
            e.mu_cr
        );
    }
}

#[test]
fn eval_delta_is_refused_outside_the_range_and_on_fits_without_delta() {
    let d = tempfile::tempdir().unwrap();
    fit_spec(d.path(), UNIFORM_MOMENT);
    let f = d.path().join("fit/mono-moment.c-curves.down.fit.json");
    let run = |args: &[&str]| {
        Command::new(env!("CARGO_BIN_EXE_ltb-atlas"))
            .args(args)
            .output()
            .unwrap()
    };
    let fs = f.to_str().unwrap();
    let o = run(&[
        "eval", fs, "--kappa", "1", "--zeta", "0", "--delta", "-0.3", "--json",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let e: Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(e["delta"], -0.3);
    let o = run(&["eval", fs, "--kappa", "1", "--zeta", "0", "--delta", "0.6"]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("delta = 0.6") && err.contains("--extrapolate"),
        "{err}"
    );
    let o = run(&[
        "eval",
        fs,
        "--kappa",
        "1",
        "--zeta",
        "0",
        "--delta",
        "0.6",
        "--extrapolate",
    ]);
    assert!(o.status.success());
    assert!(String::from_utf8_lossy(&o.stdout).contains("EXTRAPOLATED"));

    // A fit without δ refuses --delta ≠ 0 (even with --extrapolate).
    let plain = r#"[[family]]
name = "plain"
kappa = [0.3, 0.6, 1.0]
zeta = [-0.3, 0.0, 0.3]
fit = ["c-curves"]
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "uniform"
"#;
    let d2 = tempfile::tempdir().unwrap();
    fit_spec(d2.path(), plain);
    let p = d2.path().join("fit/plain.c-curves.fit.json");
    let ps = p.to_str().unwrap();
    let o = run(&[
        "eval",
        ps,
        "--kappa",
        "0.5",
        "--zeta",
        "0",
        "--delta",
        "0.1",
        "--extrapolate",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("delta"));
    let o = run(&["eval", ps, "--kappa", "0.5", "--zeta", "0", "--json"]);
    assert!(o.status.success());
    let e: Value = serde_json::from_slice(&o.stdout).unwrap();
    assert!(
        e.get("delta").is_none(),
        "no delta key for fits without delta"
    );
    let v = json(&p);
    assert!(v["validity"].get("delta_min").is_none());
}

#[test]
fn eval_takes_the_delta_of_a_fit_made_per_delta_value() {
    // A surface fitted per δ value holds at its combination's δ: eval takes
    // that δ (or the default 0, meaning the same) with the same result and
    // refuses any other, naming the fit's own δ. Common practice, no source.
    let spec = r#"[[family]]
name = "per-delta"
kappa = [0.4, 0.7, 1.0, 1.5]
zeta = [-0.3, 0.0, 0.3]
fit = [{ form = "surface", max_degree = 2 }]
[[family.axis]]
path = "delta"
values = [0.0, 0.2]
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "uniform"
"#;
    let d = tempfile::tempdir().unwrap();
    fit_spec(d.path(), spec);
    let f = d.path().join("fit/per-delta.surface.0.2.fit.json");
    assert!(
        f.is_file(),
        "{:?}",
        std::fs::read_dir(d.path().join("fit"))
            .unwrap()
            .collect::<Vec<_>>()
    );
    let fs = f.to_str().unwrap();
    let run = |args: &[&str]| {
        Command::new(env!("CARGO_BIN_EXE_ltb-atlas"))
            .args(args)
            .output()
            .unwrap()
    };
    let mu = |extra: &[&str]| -> f64 {
        let mut a = vec!["eval", fs, "--kappa", "0.8", "--zeta", "0.1", "--json"];
        a.extend_from_slice(extra);
        let o = run(&a);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        serde_json::from_slice::<Value>(&o.stdout).unwrap()["mu_cr"]
            .as_f64()
            .unwrap()
    };
    assert_eq!(mu(&["--delta", "0.2"]), mu(&[]));
    let o = run(&[
        "eval", fs, "--kappa", "0.8", "--zeta", "0.1", "--delta", "0.1",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("delta = 0.2"), "{err}");
}

#[test]
fn per_kappa_table_of_a_delta_only_family_reports_its_zeta_zero_points() {
    // End moments sweep no ζ: every point used sits at ζ = 0 (δ ≠ 0), so the
    // by-side columns alone would say nothing; the ζ = 0 column carries
    // them (common practice, no source).
    let d = tempfile::tempdir().unwrap();
    fit_spec(d.path(), UNIFORM_MOMENT);
    let t =
        std::fs::read_to_string(d.path().join("fit/mono-moment.c-curves.per-kappa.csv")).unwrap();
    let mut rows = t.lines().filter(|l| !l.starts_with('#'));
    let header: Vec<&str> = rows.next().unwrap().split(',').collect();
    let col = header
        .iter()
        .position(|h| *h == "unconservative_zeta_zero")
        .expect("a zeta = 0 column");
    let cells: Vec<String> = rows
        .map(|r| r.split(',').nth(col).unwrap().to_string())
        .collect();
    assert_eq!(cells.len(), 8);
    assert!(
        cells.iter().any(|c| c.parse::<f64>().unwrap() > 0.0),
        "{cells:?}"
    );
    let v = json(&d.path().join("fit/mono-moment.c-curves.down.fit.json"));
    assert!(v["fit"]["per_kappa"][0]["unconservative_zeta_zero"].is_number());
}

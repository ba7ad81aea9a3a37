//! The `fit` and `eval` commands (issue 4 interface contract): C1 and C2
//! extracted from engine sweeps of fork-supported spans match published
//! values at the κ they hold for; the files of the contract are written,
//! byte-identical whatever the thread count or cache state; `eval` uses the
//! printed coefficients and refuses outside the validity domain; bad fit
//! options get located errors.

use serde_json::Value;
use std::path::Path;
use std::process::{Command, Output};

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_ltb-atlas"))
        .args(args)
        .output()
        .expect("binary runs")
}

const SPEC: &str = r#"[[family]]
name = "fork-uniform"
kappa = [0.05, 0.07, 0.1]
zeta = [-0.3, -0.2, -0.1, 0.0, 0.1, 0.2, 0.3]
fit = ["c-curves", "surface"]
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "uniform"

[[family]]
name = "fork-central-point"
kappa = [0.05, 0.07, 0.1]
zeta = [-0.3, -0.2, -0.1, 0.0, 0.1, 0.2, 0.3]
direction = ["down"]
fit = ["c-curves", { form = "surface", conservative = true, digits = 3 }]
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "point"
at = 0.5
"#;

fn fit(dir: &Path, spec: &str, out: &str, extra: &[&str]) -> Output {
    let p = dir.join("spec.toml");
    std::fs::write(&p, spec).unwrap();
    let o = dir.join(out);
    let mut args = vec![
        "fit",
        p.to_str().unwrap(),
        "--out",
        o.to_str().unwrap(),
        "--quiet",
    ];
    args.extend_from_slice(extra);
    run(&args)
}

fn json(p: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
}

#[test]
fn c1_c2_of_fork_spans_match_published_values_and_outputs_follow_the_contract() {
    let d = tempfile::tempdir().unwrap();
    let cache = d.path().join("cache");
    let o = fit(d.path(), SPEC, "a", &["--cache", cache.to_str().unwrap()]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let a = d.path().join("a");

    // NCCI SN003 Table 3.2 (k = 1), κ → 0 values, asserted at κ = 0.05 with
    // the tolerances of reference-values §3: uniform load C1 1.127 (0.3 %),
    // C2 0.454 (1 %); central point load C1 1.348 (0.3 %). C1 by its
    // definition μcr(κ, 0)/μ0 (domain notes, three-factor form) within
    // 0.3 %; the least-squares C1 across ζ absorbs the form's misfit, so it
    // is held to 0.3 % plus the per-κ fit's own reported largest error. The
    // point-load C2 (0.630) holds only for large ζ: not asserted.
    let u = json(&a.join("fork-uniform.c-curves.fit.json"));
    let p = json(&a.join("fork-central-point.c-curves.down.fit.json"));
    let first = |v: &Value| v["fit"]["per_kappa"][0].clone();
    let (pu, pp) = (first(&u), first(&p));
    assert_eq!(pu["kappa"], 0.05);
    let f = |v: &Value, k: &str| v[k].as_f64().unwrap();
    assert!((f(&pu, "c1_at_zeta0") / 1.127 - 1.0).abs() < 0.003, "{pu}");
    assert!(
        (f(&pu, "c1") / 1.127 - 1.0).abs() < 0.003 + f(&pu, "max_rel_error"),
        "{pu}"
    );
    assert!((f(&pu, "c2") / 0.454 - 1.0).abs() < 0.01, "{pu}");
    assert!((f(&pp, "c1_at_zeta0") / 1.348 - 1.0).abs() < 0.003, "{pp}");
    assert!(
        (f(&pp, "c1") / 1.348 - 1.0).abs() < 0.003 + f(&pp, "max_rel_error"),
        "{pp}"
    );

    // Contract fields.
    for v in [&u, &p] {
        for k in [
            "form",
            "family",
            "combination",
            "validity",
            "coefficients",
            "typst",
            "max_rel_error",
            "max_unconservative_error",
            "rms_error",
            "conservative",
            "design_formula",
            "threshold",
            "caution",
        ] {
            assert!(v.get(k).is_some(), "missing {k}");
        }
        assert_eq!(v["validity"]["kappa_min"], 0.05);
        assert_eq!(v["validity"]["zeta_max"], 0.3);
        assert!(v["points_checked"]["validation"].as_u64().unwrap() > 21);
        assert!(v["points_checked"]["search"].as_u64().unwrap() > 0);
    }
    assert_eq!(p["combination"], "down");
    assert_eq!(p["validity"]["combination_labels"]["direction"], "down");
    let s = json(&a.join("fork-central-point.surface.down.fit.json"));
    assert!(s["conservative"]["factor"].is_string());
    assert_eq!(s["max_unconservative_error"], 0.0);
    assert_eq!(s["design_formula"], true);
    let csv = std::fs::read_to_string(a.join("fork-uniform.c-curves.coefficients.csv")).unwrap();
    assert!(csv.starts_with(&format!("# {}", ltb_atlas::CAUTION)));
    assert!(csv.contains("\ncombination,name,value\n"));
    let sum = json(&a.join("fits-summary.json"));
    assert_eq!(sum["entries"].as_array().unwrap().len(), 4);

    // Same bytes with one thread and without the cache (determinism rule).
    let o = fit(d.path(), SPEC, "b", &["--no-cache", "--jobs", "1"]);
    assert!(o.status.success());
    let mut names: Vec<_> = std::fs::read_dir(&a)
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    names.sort();
    assert_eq!(names.len(), 11);
    for n in names {
        assert_eq!(
            std::fs::read(a.join(&n)).unwrap(),
            std::fs::read(d.path().join("b").join(&n)).unwrap(),
            "{n:?}"
        );
    }

    // eval: the printed coefficients, evaluated here by hand with the
    // three-factor form (NCCI SN003), give what eval prints.
    let file = a.join("fork-uniform.c-curves.fit.json");
    let o = run(&[
        "eval",
        file.to_str().unwrap(),
        "--kappa",
        "0.08",
        "--zeta",
        "-0.25",
        "--json",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let e: Value = serde_json::from_slice(&o.stdout).unwrap();
    let coef = |name: &str| -> f64 {
        let line = csv
            .lines()
            .find(|l| l.starts_with(&format!("all,{name},")))
            .unwrap();
        line.rsplit(',').next().unwrap().parse().unwrap()
    };
    let uu = ((0.08f64).ln() - coef("u_shift")) / coef("u_scale");
    let poly = |p: &str| -> f64 {
        (0..6)
            .filter(|i| csv.contains(&format!("all,{p}_{i},")))
            .map(|i| coef(&format!("{p}_{i}")) * uu.powi(i))
            .sum()
    };
    let (c1, c2) = (poly("a"), poly("b"));
    let pi = std::f64::consts::PI;
    let z = -0.25f64;
    let mu = c1 * pi * ((1.0 + 0.08f64.powi(2) + (c2 * z).powi(2)).sqrt() - c2 * z);
    assert!((e["mu_cr"].as_f64().unwrap() - mu).abs() < 1e-12 * mu);
    assert_eq!(e["extrapolated"], false);
    let mu0 = pi * (1.0 + 0.08f64.powi(2)).sqrt();
    assert!((e["mu_ratio"].as_f64().unwrap() - mu / mu0).abs() < 1e-12);

    // Outside the domain: refused with exit 2, unless --extrapolate.
    let o = run(&[
        "eval",
        file.to_str().unwrap(),
        "--kappa",
        "0.5",
        "--zeta",
        "0.1",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("kappa = 0.5") && err.contains("--extrapolate"),
        "{err}"
    );
    let o = run(&[
        "eval",
        file.to_str().unwrap(),
        "--kappa",
        "0.08",
        "--zeta",
        "0.4",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let o = run(&[
        "eval",
        file.to_str().unwrap(),
        "--kappa",
        "0.5",
        "--zeta",
        "0.1",
        "--extrapolate",
    ]);
    assert!(o.status.success());
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(
        text.contains("EXTRAPOLATED") && text.contains(ltb_atlas::CAUTION),
        "{text}"
    );
}

#[test]
fn bad_fit_options_get_located_errors_and_no_output() {
    let d = tempfile::tempdir().unwrap();
    let bad = SPEC.replace(
        "fit = [\"c-curves\", \"surface\"]",
        "fit = [\"c-curves\", \"surfce\"]",
    );
    let o = fit(d.path(), &bad, "x", &["--no-cache"]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("spec.toml:5:") && err.contains("did you mean \"surface\""),
        "{err}"
    );
    assert!(!d.path().join("x").exists());
    let bad = SPEC.replace("digits = 3", "digits = 30");
    let o = fit(d.path(), &bad, "x", &["--no-cache"]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("digits") && err.contains("2 to 8"), "{err}");
    // A family whose grid lacks a zeta axis: named, with what to add.
    let bad = SPEC.replace(
        "zeta = [-0.3, -0.2, -0.1, 0.0, 0.1, 0.2, 0.3]\nfit = [\"c-curves\", \"surface\"]",
        "fit = [\"surface\"]",
    );
    let o = fit(d.path(), &bad, "x", &["--no-cache"]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("fork-uniform") && err.contains("zeta = [...]"),
        "{err}"
    );
    assert!(!d.path().join("x").exists());
}

#[test]
fn a_rerun_removes_fit_outputs_its_spec_no_longer_declares() {
    // A fit dropped from the spec since an earlier run into the same folder
    // must not survive there (charts and pages read the folder); files of
    // other families and foreign files stay. Common practice, no source.
    let dir = tempfile::tempdir().unwrap();
    let spec = r#"[[family]]
name = "span"
kappa = [0.5, 1.0, 2.0]
zeta = [-0.5, 0.0, 0.5]
fit = ["c-curves", "surface"]
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "uniform"
"#;
    let o = fit(dir.path(), spec, "fit", &[]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let out = dir.path().join("fit");
    assert!(out.join("span.surface.fit.json").is_file());
    assert!(out.join("span.c-curves.fit.json").is_file());
    std::fs::write(out.join("other.surface.fit.json"), "{}").unwrap();
    std::fs::write(out.join("notes.txt"), "kept").unwrap();
    let o = fit(
        dir.path(),
        &spec.replace(r#"fit = ["c-curves", "surface"]"#, r#"fit = ["c-curves"]"#),
        "fit",
        &[],
    );
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    assert!(out.join("span.c-curves.fit.json").is_file());
    assert!(
        !out.join("span.surface.fit.json").exists(),
        "stale surface fit left behind"
    );
    assert!(!out.join("span.surface.coefficients.csv").exists());
    assert!(out.join("other.surface.fit.json").is_file());
    assert!(out.join("notes.txt").is_file());
}

#[test]
fn zeta_rows_add_engine_rows_between_the_familys_load_heights() {
    // A surface fitted on five load-height rows of a three-row family:
    // the two rows between are solved by the engine (two per κ), the grid
    // check counts all five, and the option is refused on other forms with
    // its place in the file. Common practice, no source.
    let dir = tempfile::tempdir().unwrap();
    let spec = r#"[[family]]
name = "tip"
kappa = [0.5, 0.8, 1.2, 2.0]
zeta = ["-kappa", 0.0, "kappa"]
fit = [{ form = "surface", zeta_rows = 5 }]
[family.case]
start = { preset = "built-in" }
end = { preset = "free" }
[[family.case.load]]
kind = "point"
at = 1.0
"#;
    let o = fit(dir.path(), spec, "fit", &[]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let v = json(&dir.path().join("fit/tip.surface.fit.json"));
    assert_eq!(v["fit"]["zeta_rows"], 5);
    assert_eq!(v["fit"]["engine_rows_added"], 8);
    assert_eq!(v["points_checked"]["grid"], 20);
    let bad = spec.replace(
        r#"fit = [{ form = "surface", zeta_rows = 5 }]"#,
        r#"fit = [{ form = "c-curves", zeta_rows = 5 }]"#,
    );
    let o = fit(dir.path(), &bad, "fit2", &[]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("zeta_rows") && err.contains("spec.toml:5"),
        "{err}"
    );
    assert!(!dir.path().join("fit2").exists());
}

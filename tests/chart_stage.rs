//! The chart stage end to end on a small spec: sweep → (hand-made check
//! CSV, clearly test data) → charts; index.json lists exactly the files
//! written, every SVG is well-formed, two runs give identical bytes, and a
//! bad `charts` key is reported with its line and column.

use ltb_atlas::stage::{self, CacheChoice, Options, chart};
use std::path::Path;

const SPEC: &str = r#"
# Test spec (invented): a fork-supported span under a uniform load.
[[family]]
name = "test-span"
kappa = [0.3, 1.0, 3.0]
zeta = ["-kappa", 0.0, "kappa"]
direction = ["down", "up"]
charts = ["family-chart", "family-chart-ratio", "ratio-map", "schematic", "mode-shape"]

[family.case]
[family.case.start]
preset = "fork"
[family.case.end]
preset = "fork"
[[family.case.load]]
kind = "uniform"
"#;

fn opts() -> Options {
    Options {
        jobs: Some(1),
        quiet: true,
        cache: CacheChoice::Off,
        ..Default::default()
    }
}

fn write_check(dir: &Path) {
    // TEST DATA, not a rule: ratios chosen by hand, r > 1 for ζ = κ.
    std::fs::create_dir_all(dir).unwrap();
    let mut s =
        String::from("# TEST DATA: hand-made rule check\nkappa,zeta,direction,mcr_ratio,verdict\n");
    for d in ["down", "up"] {
        for k in [0.3, 1.0, 3.0] {
            for (z, r, v) in [
                (-k, 0.9, "conservative"),
                (0.0, 1.0, "indeterminate"),
                (k, 1.1, "unconservative"),
            ] {
                s.push_str(&format!("{k},{z},{d},{r},{v}\n"));
            }
        }
    }
    std::fs::write(dir.join("test-span.hand-rule.csv"), s).unwrap();
    std::fs::write(
        dir.join("test-span.hand-rule.frontier.csv"),
        "# TEST DATA\nbranch,kappa,zeta,combination\na,0.3,0.15,down\na,3.0,1.5,down\n",
    )
    .unwrap();
}

#[test]
fn charts_from_stage_outputs() {
    let tmp = tempfile::tempdir().unwrap();
    let spec = tmp.path().join("spec.toml");
    std::fs::write(&spec, SPEC).unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let sweep = tmp.path().join("sweep");
    stage::sweep(&ls, &sweep, &opts(), None).unwrap();
    let check = tmp.path().join("check");
    write_check(&check);
    let src = chart::Sources {
        sweep: sweep.clone(),
        fit: None,
        check: Some(check),
        resistance: None,
    };
    let out1 = tmp.path().join("c1");
    let out2 = tmp.path().join("c2");
    chart::run(&ls, &src, &out1, &opts()).unwrap();
    chart::run(&ls, &src, &out2, &opts()).unwrap();
    let index: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out1.join("index.json")).unwrap()).unwrap();
    let charts = index["charts"].as_array().unwrap();
    // Per combination (down, up): two family charts, a ratio map and a mode
    // shape; one schematic drawing both load directions.
    assert_eq!(charts.len(), 2 * 4 + 1);
    let mut listed: Vec<String> = charts
        .iter()
        .map(|c| c["file"].as_str().unwrap().to_string())
        .collect();
    for c in charts {
        let f = c["file"].as_str().unwrap();
        let kind = c["kind"].as_str().unwrap();
        assert!(f.starts_with("test-span."), "{f}");
        assert!(f.ends_with(".svg"));
        if kind == "ratio-map" {
            assert_eq!(c["rule"], "hand-rule");
            assert!(f.ends_with(".hand-rule.svg"));
        }
        let svg = std::fs::read_to_string(out1.join(f)).unwrap();
        roxmltree::Document::parse(&svg).expect("well-formed SVG");
        assert_eq!(
            svg,
            std::fs::read_to_string(out2.join(f)).unwrap(),
            "{f} differs between runs"
        );
    }
    assert!(listed.contains(&"test-span.ratio-map.down.hand-rule.svg".to_string()));
    assert!(listed.contains(&"test-span.family-chart.up.svg".to_string()));
    // index.json lists exactly the SVGs written.
    let mut written: Vec<String> = std::fs::read_dir(&out1)
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .filter(|n| n.ends_with(".svg"))
        .collect();
    written.sort();
    listed.sort();
    assert_eq!(written, listed);
    assert_eq!(
        std::fs::read(out1.join("index.json")).unwrap(),
        std::fs::read(out2.join("index.json")).unwrap()
    );
    // The hand-made check marks ζ = κ unconservative: its map is hatched.
    let map = std::fs::read_to_string(out1.join("test-span.ratio-map.down.hand-rule.svg")).unwrap();
    assert_eq!(map.matches("fill=\"url(#ltb-hatch)\"").count(), 3 + 2);
}

#[test]
fn unknown_chart_kind_is_located() {
    let tmp = tempfile::tempdir().unwrap();
    let spec = tmp.path().join("spec.toml");
    std::fs::write(&spec, SPEC.replace("\"mode-shape\"]", "\"mode-shap\"]")).unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let src = chart::Sources {
        sweep: tmp.path().join("none"),
        fit: None,
        check: None,
        resistance: None,
    };
    let e = chart::run(&ls, &src, &tmp.path().join("out"), &opts()).unwrap_err();
    let msg = format!("{e:#}");
    // Line 8 of SPEC (it opens with a newline), column 75: the bad entry.
    assert!(msg.contains("spec.toml:8:75:"), "{msg}");
    assert!(msg.contains("charts[4]"), "{msg}");
    assert!(msg.contains("\"mode-shape\""), "{msg}");
    assert!(!tmp.path().join("out").exists(), "no partial output");
}

#[test]
fn stale_sweep_output_is_refused() {
    let tmp = tempfile::tempdir().unwrap();
    let spec = tmp.path().join("spec.toml");
    std::fs::write(&spec, SPEC).unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let sweep = tmp.path().join("sweep");
    stage::sweep(&ls, &sweep, &opts(), None).unwrap();
    // The spec changes its κ grid after the sweep ran.
    std::fs::write(&spec, SPEC.replace("3.0]", "2.5]")).unwrap();
    let ls2 = stage::load_spec(&spec).unwrap();
    let src = chart::Sources {
        sweep,
        fit: None,
        check: None,
        resistance: None,
    };
    let e = chart::run(&ls2, &src, &tmp.path().join("out"), &opts()).unwrap_err();
    assert!(
        format!("{e:#}").contains("rerun `ltb-atlas sweep`"),
        "{e:#}"
    );
}

#[test]
fn fitted_curves_and_validity_from_a_fit_output() {
    let tmp = tempfile::tempdir().unwrap();
    let spec = tmp.path().join("spec.toml");
    std::fs::write(&spec, SPEC.replace("\"ratio-map\", ", "")).unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let sweep = tmp.path().join("sweep");
    stage::sweep(&ls, &sweep, &opts(), None).unwrap();
    // TEST DATA: a hand-made fit output for the "down" combination with a
    // sampled curve for the first ζ value only.
    let fit = tmp.path().join("fit");
    std::fs::create_dir_all(&fit).unwrap();
    let ks: Vec<f64> = (0..30).map(|i| 0.3 * 10f64.powf(i as f64 / 29.0)).collect();
    let mu: Vec<f64> = ks.iter().map(|k| 4.0 * (1.0 + k * k).sqrt()).collect();
    let json = serde_json::json!({
        "form": "hand-form", "family": "test-span", "combination": "down",
        "validity": { "kappa_min": 0.5, "kappa_max": 2.0 },
        "curves": [ { "zeta_index": 0, "kappa": ks, "mu_cr": mu } ],
    });
    std::fs::write(
        fit.join("test-span.hand-form.down.fit.json"),
        json.to_string(),
    )
    .unwrap();
    let src = chart::Sources {
        sweep,
        fit: Some(fit),
        check: None,
        resistance: None,
    };
    let out = tmp.path().join("out");
    chart::run(&ls, &src, &out, &opts()).unwrap();
    let down = std::fs::read_to_string(out.join("test-span.family-chart.down.svg")).unwrap();
    let up = std::fs::read_to_string(out.join("test-span.family-chart.up.svg")).unwrap();
    let wide = |svg: &str| {
        let doc = roxmltree::Document::parse(svg).unwrap();
        doc.descendants()
            .filter(|n| {
                n.tag_name().name() == "polyline" && n.attribute("stroke-width") == Some("5")
            })
            .map(|n| n.attribute("points").unwrap().split_whitespace().count())
            .collect::<Vec<_>>()
    };
    // The fitted curve: a full-weight line with the 30 samples (plus the
    // legend sample); the "up" chart has no fit and no full-weight curve
    // other than legend-free thin joins.
    assert!(wide(&down).contains(&30), "{:?}", wide(&down));
    assert!(wide(&up).iter().all(|&n| n < 30));
    assert!(down.contains("lines: the fitted formula"));
    assert!(up.contains("no fit output given"));
    // Outside the fit's validity range (κ < 0.5 and κ > 2) the plot is
    // shaded; the legend explains the shade.
    assert!(down.contains("fill=\"#E6E6E6\""));
    assert!(!up.contains("fill=\"#E6E6E6\""));
    assert!(down.contains("outside the fitted"));
}

#[test]
fn resistance_tables_become_resistance_charts() {
    // One chart per print table of the resistance stage, one curve per
    // section (common practice for a chart driver, no source).
    let tmp = tempfile::tempdir().unwrap();
    let spec = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("templates/resistance/floor-beams.toml");
    let ls = ltb_atlas::stage::resistance::load(&spec).unwrap();
    let res = tmp.path().join("res");
    ltb_atlas::stage::resistance::run(&ls, &res, &opts()).unwrap();
    let tables: Vec<String> = std::fs::read_dir(&res)
        .unwrap()
        .filter_map(|e| e.ok()?.file_name().into_string().ok())
        .filter(|n| n.ends_with(".table.csv"))
        .collect();
    let src = chart::Sources {
        sweep: std::path::PathBuf::new(),
        fit: None,
        check: None,
        resistance: Some(res.clone()),
    };
    let out = tmp.path().join("charts");
    chart::run(&ls, &src, &out, &opts()).unwrap();
    let index: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("index.json")).unwrap()).unwrap();
    let charts = index["charts"].as_array().unwrap();
    assert_eq!(charts.len(), tables.len());
    for c in charts {
        assert_eq!(c["kind"], "resistance");
        let svg = std::fs::read_to_string(out.join(c["file"].as_str().unwrap())).unwrap();
        roxmltree::Document::parse(&svg).expect("well-formed SVG");
        // Five sections in the template: five legend entries.
        for s in ["IPE 240", "IPE 300", "IPE 360", "HE 240 A", "HE 240 B"] {
            assert!(svg.contains(s), "{s}");
        }
    }
}

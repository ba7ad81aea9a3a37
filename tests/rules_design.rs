//! The design consequence of simplified rules in `check`: a family with a
//! `resistance` table gets Mb,Rd(rule Mcr)/Mb,Rd(FE Mcr) per row.
//!
//! Checks: where the rule's Mcr equals the engine's (uniform moment, forks:
//! the three-factor formula with C1 = 1 is exact, Timoshenko & Gere 1961
//! §6.2) the design ratio is 1; χLT of EN 1993-1-1:2005 6.3.2.3 rises
//! monotonically with Mcr and never faster than in proportion, so an
//! unconservative rule (r > 1) gives 1 ≤ design ratio ≤ r.

use ltb_atlas::stage;

const SPEC: &str = r#"
[[family]]
name = "span"
kappa = [0.3, 0.8, 1.5, 3.0]
zeta = ["-kappa", 0.0, "kappa"]
rules = ["three-factor", "aisc-cb"]
[family.resistance]
section = "IPE 300"
code = "EN 1993-1-1:2005"
grade = "S355"
[family.case]
start = { preset = "fork" }
end = { preset = "fork" }
[[family.case.load]]
kind = "uniform"
"#;

fn run(text: &str) -> (tempfile::TempDir, String, serde_json::Value) {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("s.toml");
    std::fs::write(&spec, text).unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let opts = stage::Options {
        cache: stage::CacheChoice::Off,
        quiet: true,
        ..Default::default()
    };
    stage::check::run(&ls, &dir.path().join("out"), &opts).unwrap();
    let csv = std::fs::read_to_string(dir.path().join("out/span.aisc-cb.csv")).unwrap();
    let summary: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(dir.path().join("out/rules-summary.json")).unwrap(),
    )
    .unwrap();
    (dir, csv, summary)
}

fn column(csv: &str, name: &str) -> Vec<Option<f64>> {
    let mut lines = csv.lines().filter(|l| !l.starts_with('#'));
    let header: Vec<String> = lines.next().unwrap().split(',').map(String::from).collect();
    let i = header.iter().position(|h| h == name).unwrap();
    let body = lines.collect::<Vec<_>>().join("\n");
    let mut rdr = csv::ReaderBuilder::new()
        .has_headers(false)
        .from_reader(body.as_bytes());
    rdr.records()
        .map(|r| r.unwrap().get(i).unwrap().parse().ok())
        .collect()
}

#[test]
fn design_ratios_lie_between_one_and_the_mcr_ratio() {
    let (_d, csv, summary) = run(SPEC);
    assert!(csv.contains("# design consequence: design_ratio = Mb,Rd"));
    let r = column(&csv, "mcr_ratio");
    let d = column(&csv, "design_ratio");
    let l = column(&csv, "length_m");
    assert_eq!(r.len(), 12);
    let mut seen_above = false;
    for ((r, d), l) in r.iter().zip(&d).zip(&l) {
        let (r, d, l) = (r.unwrap(), d.unwrap(), l.unwrap());
        assert!(l > 0.0);
        if r > 1.0 {
            seen_above = true;
            assert!(d >= 1.0 - 1e-12 && d <= r + 1e-12, "r {r}, design {d}");
        } else {
            assert!(d <= 1.0 + 1e-12 && d >= r - 1e-12, "r {r}, design {d}");
        }
    }
    // AISC's Cb ignores load height: top-flange rows are unconservative.
    assert!(seen_above);
    let e = summary["entries"]
        .as_array()
        .unwrap()
        .iter()
        .find(|e| e["rule"] == "aisc-cb")
        .unwrap();
    assert_eq!(e["design"]["section"], "IPE 300");
    assert!(e["design"]["max_design_ratio"].as_f64().unwrap() > 1.0);
}

#[test]
fn an_exact_rule_has_a_design_ratio_of_one() {
    let text = SPEC
        .replace("zeta = [\"-kappa\", 0.0, \"kappa\"]\n", "")
        .replace(
            "[[family.case.load]]\nkind = \"uniform\"",
            "[[family.case.load]]\nkind = \"end-moments\"\nstart = 1.0\nend = 1.0",
        );
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("s.toml");
    std::fs::write(&spec, text).unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let opts = stage::Options {
        cache: stage::CacheChoice::Off,
        quiet: true,
        ..Default::default()
    };
    stage::check::run(&ls, &dir.path().join("out"), &opts).unwrap();
    let csv = std::fs::read_to_string(dir.path().join("out/span.three-factor.csv")).unwrap();
    for d in column(&csv, "design_ratio") {
        // Within the solver tolerance (1e-4) of the engine's Mcr.
        assert!((d.unwrap() - 1.0).abs() < 1e-4, "{d:?}");
    }
}

#[test]
fn an_unknown_section_is_located() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("s.toml");
    std::fs::write(&spec, SPEC.replace("IPE 300", "IPE 301")).unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let opts = stage::Options {
        cache: stage::CacheChoice::Off,
        quiet: true,
        ..Default::default()
    };
    let e = stage::check::run(&ls, &dir.path().join("out"), &opts).unwrap_err();
    let t = format!("{e:#}");
    assert!(t.contains("s.toml:8:") && t.contains("IPE 301"), "{t}");
    assert!(!dir.path().join("out").exists());
}

//! `ltb-atlas chart` on the command line: charts and index written on
//! success (exit 0), a clear error and exit 2 with nothing written when the
//! sweep output is missing.

use std::process::Command;

const SPEC: &str = r#"
# Test spec (invented).
[[family]]
name = "cli-span"
kappa = [0.5, 2.0]
zeta = [0.0]
charts = ["family-chart", "schematic"]

[family.case]
[family.case.start]
preset = "fork"
[family.case.end]
preset = "fork"
[[family.case.load]]
kind = "uniform"
"#;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_ltb-atlas"))
}

#[test]
fn chart_command_writes_charts_and_refuses_missing_input() {
    let tmp = tempfile::tempdir().unwrap();
    let spec = tmp.path().join("spec.toml");
    std::fs::write(&spec, SPEC).unwrap();
    let sweep = tmp.path().join("sweep");
    let out = tmp.path().join("charts");
    // Missing sweep output: exit 2, the file named, nothing written.
    let o = bin()
        .args(["chart", spec.to_str().unwrap(), "--sweep"])
        .arg(&sweep)
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("cli-span.csv") && err.contains("ltb-atlas sweep"),
        "{err}"
    );
    assert!(!out.exists());
    let s = bin()
        .args([
            "sweep",
            spec.to_str().unwrap(),
            "--quiet",
            "--no-cache",
            "--out",
        ])
        .arg(&sweep)
        .status()
        .unwrap();
    assert!(s.success());
    let o = bin()
        .args([
            "chart",
            spec.to_str().unwrap(),
            "--quiet",
            "--no-cache",
            "--sweep",
        ])
        .arg(&sweep)
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    for f in [
        "cli-span.family-chart.all.svg",
        "cli-span.schematic.all.svg",
        "index.json",
    ] {
        assert!(out.join(f).exists(), "{f}");
    }
    let index: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("index.json")).unwrap()).unwrap();
    assert_eq!(index["charts"][0]["quantity"], "mu_cr");
    assert_eq!(index["charts"][1]["kind"], "schematic");
}

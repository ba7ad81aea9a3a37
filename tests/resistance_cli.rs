//! The resistance interface contract (issue 8): `solve` on a physical case
//! with `[design]` adds mcr, lambda_lt, chi_lt and mb_rd; `ltb-atlas
//! resistance SPEC --out DIR` writes the machine and print tables with their
//! assumptions, byte-identical whatever the thread count; bad input gets
//! located errors and no output. Values are compared with the library
//! itself (the CLI is a driver: common practice, no source).

use std::path::Path;
use std::process::{Command, Output};

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_ltb-atlas"))
        .args(args)
        .output()
        .expect("binary runs")
}

const CASE: &str = r#"length = "6 m"
[section]
name = "IPE 300"
[start]
preset = "fork"
[end]
preset = "fork"
[[load]]
kind = "uniform"
value = 10
height = "top-flange"
[design]
code = "EN 1993-1-1:2005"
grade = "S355"
"#;

#[test]
fn solve_with_design_adds_the_contract_fields() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("beam.toml");
    std::fs::write(&p, CASE).unwrap();
    let o = run(&["solve", p.to_str().unwrap(), "--json"]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let mcr = j["mcr"].as_f64().unwrap();
    let (lam, chi, mb) = (
        j["lambda_lt"].as_f64().unwrap(),
        j["chi_lt"].as_f64().unwrap(),
        j["mb_rd"].as_f64().unwrap(),
    );
    // λ̄ = √(Wpl·fy/Mcr) and Mb,Rd = χ·Wpl·fy/γM1 (EN 1993-1-1:2005 6.3.2).
    let wpl = j["design"]["wpl_y_mm3"].as_f64().unwrap();
    assert!((lam - (wpl * 355.0 / (mcr * 1e6)).sqrt()).abs() < 1e-9);
    assert!((mb - chi * wpl * 355.0 / 1e6).abs() < 1e-9);
    assert!(
        j["design"]["assumptions"][0]
            .as_str()
            .unwrap()
            .contains("2005")
    );
    // The text report carries the block and the caution.
    let t = run(&["solve", p.to_str().unwrap()]);
    let s = String::from_utf8_lossy(&t.stdout);
    assert!(
        s.contains("Design resistance") && s.contains("Mb,Rd") && s.matches("CAUTION").count() >= 2,
        "{s}"
    );
}

#[test]
fn bad_design_tables_are_located() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("beam.toml");
    for (bad, needle) in [
        (
            CASE.replace("grade = \"S355\"", "grade = \"S355\"\ncolour = 1"),
            ":15:1: design.colour: unknown key",
        ),
        (
            CASE.replace("EN 1993-1-1:2005", "EN 1993-1-1:2022"),
            ":13:8: design.code: the 2022 edition",
        ),
        (CASE.replace("grade = \"S355\"", "grade = \"S460\""), "S460"),
        (
            CASE.replace("name = \"IPE 300\"", "name = \"IPE 310\""),
            ":3:8: section.name: no section `IPE 310`",
        ),
        (
            CASE.replace("grade = \"S355\"", "grade = \"S355\"\nphi = 0.9"),
            ":15:7: design.phi: `phi` belongs to AISC",
        ),
    ] {
        std::fs::write(&p, &bad).unwrap();
        let o = run(&["solve", p.to_str().unwrap()]);
        let e = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{e}");
        assert!(e.contains(needle), "expected `{needle}` in: {e}");
        assert!(o.stdout.is_empty());
    }
}

const SPEC: &str = r#"[design]
name = "demo"
code = "AISC 360-16"
method = "LRFD"
sections = ["W18X50", "W21X44", "mine 1"]
catalogue = "mine.csv"
grades = ["A992"]
lengths = { from = 2, to = 10, count = 5 }
load_heights = ["top-flange", "shear-centre"]
[[design.case]]
name = "udl"
start = { preset = "fork" }
end = { preset = "fork" }
load = [{ kind = "uniform", value = 10 }]
"#;

const MINE: &str = "name,kind,unit,h,b,tf,tw,r,fabrication,source\nmine 1,i,mm,450,200,14,9,0,welded,own plate girder\n";

fn files(d: &Path) -> Vec<(String, Vec<u8>)> {
    let mut v: Vec<(String, Vec<u8>)> = std::fs::read_dir(d)
        .unwrap()
        .map(|e| {
            let e = e.unwrap();
            (
                e.file_name().to_string_lossy().to_string(),
                std::fs::read(e.path()).unwrap(),
            )
        })
        .collect();
    v.sort();
    v
}

#[test]
fn resistance_tables_are_complete_and_deterministic() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("r.toml");
    std::fs::write(&spec, SPEC).unwrap();
    std::fs::write(dir.path().join("mine.csv"), MINE).unwrap();
    let a = dir.path().join("a");
    let b = dir.path().join("b");
    let cache = dir.path().join("cache");
    let o = run(&[
        "resistance",
        spec.to_str().unwrap(),
        "--out",
        a.to_str().unwrap(),
        "--jobs",
        "1",
        "--no-cache",
        "--quiet",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let o = run(&[
        "resistance",
        spec.to_str().unwrap(),
        "--out",
        b.to_str().unwrap(),
        "--jobs",
        "2",
        "--cache",
        cache.to_str().unwrap(),
        "--quiet",
    ]);
    assert!(o.status.success());
    let (fa, fb) = (files(&a), files(&b));
    assert_eq!(fa, fb, "outputs differ with thread count / cache");
    let names: Vec<&str> = fa.iter().map(|(n, _)| n.as_str()).collect();
    assert_eq!(
        names,
        [
            "demo.csv",
            "demo.udl.a992.shear-centre.table.csv",
            "demo.udl.a992.top-flange.table.csv"
        ]
    );
    let m = String::from_utf8(fa[0].1.clone()).unwrap();
    for needle in [
        "CAUTION",
        "AISC 360-16",
        "LRFD, φb = 0.9",
        "equivalent Cb",
        "load case udl",
        "load heights: top-flange, shear-centre",
        "A992",
        "own plate girder",
    ] {
        assert!(m.contains(needle), "missing `{needle}` in preamble:\n{m}");
    }
    let data: Vec<&str> = m.lines().filter(|l| !l.starts_with('#')).collect();
    assert!(data[0].starts_with("case,grade,load_height,section,length,lb,mcr,"));
    assert_eq!(data.len(), 1 + 3 * 5 * 2);
    assert!(!m.contains("NaN") && !m.contains("inf"));
    // Top-flange loading lowers the resistance of the same member (domain
    // notes: a gravity load above the shear centre destabilises).
    let t = String::from_utf8(fa[2].1.clone()).unwrap();
    let s = String::from_utf8(fa[1].1.clone()).unwrap();
    let last = |x: &str| -> Vec<f64> {
        x.lines()
            .find(|l| l.starts_with("10,"))
            .unwrap()
            .split(',')
            .skip(1)
            .map(|v| v.parse().unwrap())
            .collect()
    };
    for (top, sc) in last(&t).iter().zip(last(&s)) {
        assert!(top < &sc, "{top} vs {sc}");
    }
}

#[test]
fn resistance_spec_errors_are_located_and_write_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("r.toml");
    let out = dir.path().join("o");
    for (k, (bad, needle)) in [
        (SPEC.to_string(), "r.toml:6:13: design.catalogue: "),
        (
            SPEC.replace("\"W21X44\"", "\"W21X45\""),
            "r.toml:5:23: design.sections: no section `W21X45`",
        ),
        (
            SPEC.replace("load_heights = [\"top-flange\"", "load_heights = [\"roof\""),
            "unknown load height \"roof\"",
        ),
        (
            SPEC.replace("name = \"udl\"", "name = \"udl\"\nlength = \"5 m\""),
            "`length` is set by the resistance table",
        ),
    ]
    .into_iter()
    .enumerate()
    {
        // The first spec meets a catalogue with a bad number (its own file:line:column quoted).
        let cat = if k == 0 {
            MINE.replace("450,200", "450,abc")
        } else {
            MINE.to_string()
        };
        std::fs::write(dir.path().join("mine.csv"), cat).unwrap();
        std::fs::write(&spec, &bad).unwrap();
        let o = run(&[
            "resistance",
            spec.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--no-cache",
        ]);
        let e = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{e}");
        assert!(e.contains(needle), "expected `{needle}` in: {e}");
        if k == 0 {
            assert!(
                e.contains("mine.csv:2:17: `b` = `abc` is not a number"),
                "{e}"
            );
        }
        assert!(!out.exists());
    }
}

//! Pages render the fit, check and chart sections from files in those
//! stages' contract formats: hand-made TEST DATA in
//! tests/data/handbook-contract/ (invented numbers, see its README) is
//! placed in a build folder, the pages are rewritten and typeset end to end
//! with typst 0.15.1 (required: `TYPST_BIN` or `scripts/install-typst`).
//! Driver behaviour, checked against the generated sources (common
//! practice, no source).

mod common;
use common::typst;
use ltb_atlas::stage::build::{BuildOptions, TypstMissing, run, typeset};
use ltb_atlas::stage::{CacheChoice, Options};
use std::path::Path;

const SPEC: &str = r#"
[handbook]
title = "Contract pages"
office = "An invented test office"
units = "US"
edition = "1"
date = "2026-02-01"

[[family]]
name = "tip"
kappa = [0.5, 1.0, 1.5]
zeta = ["-kappa", "kappa"]
direction = ["down", "up"]
fit = ["surface"]
rules = ["three-factor"]
[family.case]
start = { preset = "built-in" }
end = { preset = "free" }
[[family.case.load]]
kind = "point"
at = 1.0
[[family.variant]]
name = "fixed"
[[family.variant]]
name = "free"
[family.variant.start]
warping = "free"
"#;

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap().flatten() {
        std::fs::copy(e.path(), to.join(e.file_name())).unwrap();
    }
}

#[test]
fn contract_files_reach_the_typeset_pages() {
    let tmp = tempfile::tempdir().unwrap();
    let spec = tmp.path().join("h.toml");
    std::fs::write(&spec, SPEC).unwrap();
    let out = tmp.path().join("o");
    let opts = Options {
        quiet: true,
        cache: CacheChoice::Off,
        ..Default::default()
    };
    let none = BuildOptions {
        typst: Some(tmp.path().join("no-typst")),
        date: None,
    };
    let e = run(&spec, &out, &opts, &none).unwrap_err();
    assert!(e.downcast_ref::<TypstMissing>().is_some(), "{e:#}");
    let data = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/handbook-contract");
    for d in ["fit", "check", "charts"] {
        copy_dir(&data.join(d), &out.join(d));
    }
    let b = BuildOptions {
        typst: Some(typst()),
        date: None,
    };
    let pdf = typeset(&spec, &out, &opts, &b).unwrap_or_else(|e| panic!("{e:#}"));
    assert!(std::fs::read(&pdf).unwrap().starts_with(b"%PDF"));
    // To look at the pages: LTB_KEEP_PDF=FILE keeps a copy.
    if let Some(k) = std::env::var_os("LTB_KEEP_PDF") {
        std::fs::copy(&pdf, k).unwrap();
    }
    let page = std::fs::read_to_string(out.join("pages/family-tip.typ")).unwrap();
    // The design formula typeset from its typst source; the other only as "not a design formula".
    assert!(
        page.contains("eval(\"mu_\\\"cr\\\" &= \\\"3.41\\\""),
        "{page}"
    );
    assert!(!page.contains("\\\"2.10\\\" sqrt"), "{page}");
    assert!(page.contains("NOT A DESIGN FORMULA"));
    // Validity and errors (rounded up) beside the formula.
    assert!(
        page.contains("0.5 ≤ κ ≤ 1.5; -1.5 ≤ ζ ≤ 1.5; |ζ| ≤ 1·κ"),
        "{page}"
    );
    assert!(
        page.contains("largest relative error 3.12 % (at κ = 1.5, ζ = -1.5)"),
        "{page}"
    );
    // The rule summary with its ratio rounded up, and the maps and charts.
    assert!(page.contains("1.318\\nat κ = 0.5, ζ = 0.5"), "{page}");
    for f in [
        "tip.schematic.svg",
        "tip.down_fixed.svg",
        "tip.three-factor.down_fixed.map.svg",
    ] {
        assert!(page.contains(&format!("/charts/{f}")), "{f}");
    }
    // US units on the front page.
    let front = std::fs::read_to_string(out.join("pages/front.typ")).unwrap();
    assert!(front.contains("kip·ft") && front.contains("ksi"), "{front}");
    assert!(front.contains("kappa-band(\"/tables/kappa-length.csv\", \"ft\")"));
}

//! Overhangs continued over a support into a backspan: the `backspan_ratio`
//! axis of a sweep family.

use ltb_atlas::model::backspan::{BackspanLoads, overhang_fraction, with_backspan};
use ltb_atlas::model::{Fixity, Support};
use ltb_atlas::solve::{Settings, solve};
use ltb_atlas::stage;
use ltb_atlas::sweep::spec::parse_spec;
use std::f64::consts::PI;
use std::path::Path;

const SPEC: &str = r#"
[[family]]
name = "overhang"
kappa = [0.5, 1.0]
zeta = ["kappa", 0.0]
backspan_ratio = [1.0, 2.5]
[family.backspan]
far_end = "fork"
[family.case]
[family.case.start]
preset = "fork"
vertical = "free"
[family.case.end]
preset = "fork"
[[family.case.load]]
kind = "uniform"
"#;

fn rows(text: &str) -> Vec<ltb_atlas::sweep::Row> {
    let spec = parse_spec(text, "t.toml", Path::new(".")).expect("spec parses");
    let opts = stage::Options {
        cache: stage::CacheChoice::Off,
        jobs: Some(1),
        ..Default::default()
    };
    let pool = opts.pool().unwrap();
    let mut cache = opts.open_cache().unwrap();
    stage::family_rows(&spec.families[0], &opts.settings(), &pool, &mut cache).unwrap()
}

#[test]
fn rows_are_the_whole_beams_solve_in_overhang_units() {
    let rows = rows(SPEC);
    assert_eq!(rows.len(), 8);
    for r in &rows {
        let p = &r.point;
        let ratio = p.backspan.expect("a backspan ratio");
        // The point reports the overhang's κ and ζ, the member is the whole beam.
        assert!((p.member.kappa - p.kappa * overhang_fraction(ratio)).abs() < 1e-15);
        assert!((p.member.supports[0].at - ratio / (1.0 + ratio)).abs() < 1e-15);
        let whole = solve(&p.member, &Settings::default()).unwrap();
        let expect = whole.forward.mu_cr.unwrap() * overhang_fraction(ratio);
        assert_eq!(r.mu_cr, Some(expect));
    }
}

#[test]
fn equal_spans_with_forks_under_uniform_moment_match_the_closed_form() {
    // Forks at the far end, the root (vertical free, so the end couples give
    // a uniform moment) and the tip; equal spans: each span buckles as a
    // fork-supported span, μ = π·√(1 + κ²) on the overhang length
    // (Timoshenko & Gere, Theory of Elastic Stability, 1961, §6.2).
    let text = SPEC
        .replace("zeta = [\"kappa\", 0.0]\n", "")
        .replace("backspan_ratio = [1.0, 2.5]", "backspan_ratio = [1.0]")
        .replace(
            "[[family.case.load]]\nkind = \"uniform\"",
            "[[family.case.load]]\nkind = \"end-moments\"\nstart = 1.0\nend = 1.0",
        );
    for r in rows(&text) {
        let exact = PI * (1.0 + r.point.kappa.powi(2)).sqrt();
        let mu = r.mu_cr.unwrap();
        assert!(
            (mu / exact - 1.0).abs() < 2e-4,
            "κ = {}: {mu} vs {exact}",
            r.point.kappa
        );
    }
}

#[test]
fn a_longer_backspan_is_built_from_the_same_overhang() {
    // The transformation keeps physical quantities: the whole beam built for
    // ratio r has its root at r/(1 + r) and its far-end support as given.
    let spec = parse_spec(SPEC, "t.toml", Path::new(".")).unwrap();
    let f = &spec.families[0];
    let p = f.point(1);
    let b = f.backspan.unwrap();
    assert_eq!(b.far, Support::FORK);
    let again = with_backspan(&f.case.member.clone(), 2.5, b.far, BackspanLoads::None);
    assert_eq!(again.start, Support::FORK);
    assert_eq!(p.member.supports[0].support.vertical, Fixity::Free);
}

#[test]
fn a_backspan_table_without_the_axis_is_refused() {
    let text = SPEC.replace("backspan_ratio = [1.0, 2.5]\n", "");
    let e = parse_spec(&text, "t.toml", Path::new(".")).unwrap_err();
    assert!(e.to_string().contains("backspan_ratio"), "{e}");
    let text = SPEC.replace("backspan_ratio = [1.0, 2.5]", "backspan_ratio = [0.0]");
    let e = parse_spec(&text, "t.toml", Path::new(".")).unwrap_err();
    assert!(e.to_string().contains("must be > 0"), "{e}");
}

#[test]
fn rule_checks_of_a_backspan_family_name_the_ratio_of_every_row() {
    // The check writes the sweep's point columns (common practice, no
    // source): every row must say which backspan it belongs to.
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("s.toml");
    std::fs::write(
        &spec,
        SPEC.replace(
            "backspan_ratio = [1.0, 2.5]",
            "backspan_ratio = [1.0, 2.5]\nrules = [\"aisc-cb\"]",
        ),
    )
    .unwrap();
    let ls = stage::load_spec(&spec).unwrap();
    let opts = stage::Options {
        cache: stage::CacheChoice::Off,
        quiet: true,
        ..Default::default()
    };
    stage::check::run(&ls, &dir.path().join("out"), &opts).unwrap();
    let text = std::fs::read_to_string(dir.path().join("out/overhang.aisc-cb.csv")).unwrap();
    let mut lines = text.lines().filter(|l| !l.starts_with('#'));
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = header.iter().position(|h| *h == "backspan_ratio").unwrap();
    let values: Vec<String> = lines
        .map(|l| l.split(',').nth(col).unwrap().to_string())
        .collect();
    assert_eq!(values.len(), 8);
    assert!(values.iter().all(|v| v == "1" || v == "2.5"), "{values:?}");
}

//! The demo handbook's print tables and charts are committed in `tables/`
//! and `charts/`; this test rebuilds the demo (examples/handbook.toml) and
//! fails when a committed file is stale, naming the first differing file
//! and cell. Regenerate with `scripts/update-demo`. (A regeneration check,
//! common practice for committed generated files, no source.)

use ltb_atlas::stage::build::{BuildOptions, TypstMissing, run, walk};
use ltb_atlas::stage::{CacheChoice, Options};
use std::path::Path;

/// The first difference between two texts: line, and for CSV the column
/// (by header name) and the row's first cell.
fn first_difference(file: &str, old: &str, new: &str) -> Option<String> {
    let (ol, nl): (Vec<&str>, Vec<&str>) = (old.lines().collect(), new.lines().collect());
    let header = nl
        .iter()
        .find(|l| !l.starts_with('#'))
        .copied()
        .unwrap_or("");
    for i in 0..ol.len().max(nl.len()) {
        let (a, b) = (
            ol.get(i).copied().unwrap_or("<none>"),
            nl.get(i).copied().unwrap_or("<none>"),
        );
        if a == b {
            continue;
        }
        if file.ends_with(".csv") && !a.starts_with('#') {
            let (ac, bc): (Vec<&str>, Vec<&str>) = (a.split(',').collect(), b.split(',').collect());
            let cols: Vec<&str> = header.split(',').collect();
            for j in 0..ac.len().max(bc.len()) {
                if ac.get(j) != bc.get(j) {
                    return Some(format!(
                        "{file} line {}: cell row {} column {}: committed {:?}, rebuilt {:?}",
                        i + 1,
                        bc.first().or(ac.first()).unwrap_or(&""),
                        cols.get(j).unwrap_or(&"?"),
                        ac.get(j).unwrap_or(&"<none>"),
                        bc.get(j).unwrap_or(&"<none>")
                    ));
                }
            }
        }
        return Some(format!(
            "{file} line {}: committed {a:?}, rebuilt {b:?}",
            i + 1
        ));
    }
    None
}

#[test]
fn committed_demo_tables_and_charts_match_a_rebuild() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("demo");
    let opts = Options {
        quiet: true,
        cache: CacheChoice::Off,
        ..Default::default()
    };
    // The PDF is not committed: a missing typst does not matter here (the
    // end-to-end PDF tests in cli_build.rs require it).
    let b = BuildOptions {
        typst: Some(root.join("target/no-typst-needed-here")),
        date: None,
    };
    match run(&root.join("examples/handbook.toml"), &out, &opts, &b) {
        Ok(_) => {}
        Err(e) if e.downcast_ref::<TypstMissing>().is_some() => {}
        Err(e) => panic!("the demo does not build: {e:#}"),
    }
    for d in ["tables", "charts"] {
        let committed: Vec<String> = walk(&root.join(d))
            .unwrap()
            .into_iter()
            .filter(|f| f != "README.md")
            .collect();
        let built = walk(&out.join(d)).unwrap();
        for f in &built {
            assert!(
                committed.contains(f),
                "{d}/{f} is built but not committed: run scripts/update-demo"
            );
        }
        for f in &committed {
            assert!(
                built.contains(f),
                "{d}/{f} is committed but no longer built: run scripts/update-demo"
            );
            let (a, b) = (
                std::fs::read(root.join(d).join(f)).unwrap(),
                std::fs::read(out.join(d).join(f)).unwrap(),
            );
            if a != b {
                let why = first_difference(
                    &format!("{d}/{f}"),
                    &String::from_utf8_lossy(&a),
                    &String::from_utf8_lossy(&b),
                )
                .unwrap_or_else(|| format!("{d}/{f}: bytes differ"));
                panic!("stale committed demo file: {why}; run scripts/update-demo");
            }
        }
    }
}

#[test]
fn the_first_difference_is_named_by_file_line_and_cell() {
    let d = first_difference(
        "tables/t.csv",
        "# c\nkappa,zeta=0\n0.5,3.1\n",
        "# c\nkappa,zeta=0\n0.5,3.0\n",
    );
    assert_eq!(
        d.unwrap(),
        "tables/t.csv line 3: cell row 0.5 column zeta=0: committed \"3.1\", rebuilt \"3.0\""
    );
}

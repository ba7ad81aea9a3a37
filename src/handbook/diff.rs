//! Cell-by-cell comparison of two handbook builds: print-table cells that
//! moved, fit results that changed, rule verdicts that flipped. Works on
//! file contents (the build stage reads the folders); no I/O here.
//!
//! Two numbers differ when
//!
//! ```text
//! |new − old| > tolerance · max(|old|, |new|)
//! ```
//!
//! (tolerance 0: any change of the printed value); text cells differ when
//! their text does.

use serde_json::Value;
use std::collections::BTreeMap;

/// One difference between two builds.
#[derive(Debug, Clone, PartialEq)]
pub struct Change {
    /// `table-cell`, `fit`, `verdict`, `ratio`, `row`, `file`.
    pub kind: &'static str,
    /// File, relative to the build folder.
    pub file: String,
    /// Row key (κ of a table row; the axis values of a check row; the JSON path of a fit value).
    pub row: String,
    /// Column (or field).
    pub column: String,
    /// Old text ("" when absent).
    pub old: String,
    /// New text ("" when absent).
    pub new: String,
    /// What it means (for example "conservative → unconservative").
    pub note: String,
}

/// The CSV columns of the diff report.
pub const CSV_HEADER: [&str; 7] = ["kind", "file", "row", "column", "old", "new", "note"];

fn moved(old: &str, new: &str, tol: f64) -> bool {
    match (old.trim().parse::<f64>(), new.trim().parse::<f64>()) {
        (Ok(a), Ok(b)) => (b - a).abs() > tol * a.abs().max(b.abs()),
        _ => old.trim() != new.trim(),
    }
}

/// Rows of a CSV text without its `#` lines: (header, rows).
pub fn read_csv(text: &str) -> Result<(Vec<String>, Vec<Vec<String>>), String> {
    let body: String = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .map(|l| format!("{l}\n"))
        .collect();
    let mut r = csv::ReaderBuilder::new()
        .has_headers(true)
        .flexible(false)
        .from_reader(body.as_bytes());
    let head: Vec<String> = r
        .headers()
        .map_err(|e| e.to_string())?
        .iter()
        .map(String::from)
        .collect();
    let mut rows = Vec::new();
    for rec in r.records() {
        rows.push(
            rec.map_err(|e| e.to_string())?
                .iter()
                .map(String::from)
                .collect(),
        );
    }
    Ok((head, rows))
}

/// Compare two print tables (first column the row key).
pub fn diff_table(file: &str, old: &str, new: &str, tol: f64) -> Result<Vec<Change>, String> {
    let (ho, ro) = read_csv(old).map_err(|e| format!("{file} (old): {e}"))?;
    let (hn, rn) = read_csv(new).map_err(|e| format!("{file} (new): {e}"))?;
    let mut out = Vec::new();
    let ch = |kind, row: &str, col: &str, o: &str, n: &str, note: &str| Change {
        kind,
        file: file.to_string(),
        row: row.to_string(),
        column: col.to_string(),
        old: o.to_string(),
        new: n.to_string(),
        note: note.to_string(),
    };
    let key = |r: &Vec<String>| r.first().cloned().unwrap_or_default();
    let om: BTreeMap<String, &Vec<String>> = ro.iter().map(|r| (key(r), r)).collect();
    let nm: BTreeMap<String, &Vec<String>> = rn.iter().map(|r| (key(r), r)).collect();
    for c in ho.iter().skip(1).filter(|c| !hn.contains(c)) {
        out.push(ch("column", "", c, c, "", "column removed"));
    }
    for c in hn.iter().skip(1).filter(|c| !ho.contains(c)) {
        out.push(ch("column", "", c, "", c, "column added"));
    }
    for r in &ro {
        let k = key(r);
        let Some(n) = nm.get(&k) else {
            out.push(ch("row", &k, "", &r.join(" "), "", "row removed"));
            continue;
        };
        for (ci, c) in ho.iter().enumerate().skip(1) {
            let Some(nj) = hn.iter().position(|x| x == c) else {
                continue;
            };
            let (a, b) = (r.get(ci).map_or("", |s| s), n.get(nj).map_or("", |s| s));
            if moved(a, b, tol) {
                let note = match (a.parse::<f64>(), b.parse::<f64>()) {
                    (Ok(x), Ok(y)) if y < x => "lower",
                    (Ok(_), Ok(_)) => "higher",
                    _ => "changed",
                };
                out.push(ch("table-cell", &k, c, a, b, note));
            }
        }
    }
    for r in &rn {
        if !om.contains_key(&key(r)) {
            out.push(ch("row", &key(r), "", "", &r.join(" "), "row added"));
        }
    }
    Ok(out)
}

fn flatten(prefix: &str, v: &Value, out: &mut BTreeMap<String, String>) {
    match v {
        Value::Object(m) => {
            for (k, x) in m {
                let p = if prefix.is_empty() {
                    k.clone()
                } else {
                    format!("{prefix}.{k}")
                };
                flatten(&p, x, out);
            }
        }
        Value::Array(a) => {
            for (i, x) in a.iter().enumerate() {
                flatten(&format!("{prefix}[{i}]"), x, out);
            }
        }
        Value::String(s) => {
            out.insert(prefix.to_string(), s.clone());
        }
        other => {
            out.insert(prefix.to_string(), other.to_string());
        }
    }
}

/// Compare two fit JSON documents field by field (the caution text aside).
pub fn diff_fit(file: &str, old: &Value, new: &Value, tol: f64) -> Vec<Change> {
    let (mut a, mut b) = (BTreeMap::new(), BTreeMap::new());
    flatten("", old, &mut a);
    flatten("", new, &mut b);
    let keys: std::collections::BTreeSet<&String> = a.keys().chain(b.keys()).collect();
    let mut out = Vec::new();
    for k in keys {
        if k == "caution" {
            continue;
        }
        let (o, n) = (a.get(k).map_or("", |s| s), b.get(k).map_or("", |s| s));
        if moved(o, n, tol) {
            let note = if k == "design_formula" && n == "false" {
                "no longer a design formula".to_string()
            } else if k.starts_with("coefficients") {
                "coefficient changed".into()
            } else if k.contains("error") {
                "error bound changed".into()
            } else {
                "changed".into()
            };
            out.push(Change {
                kind: "fit",
                file: file.to_string(),
                row: String::new(),
                column: k.clone(),
                old: o.to_string(),
                new: n.to_string(),
                note,
            });
        }
    }
    out
}

/// Compare two rule-check CSVs (contract: axis columns, then kappa, zeta,
/// direction, then `mcr_ratio`, `verdict`, extras): rows keyed by every
/// column before `mcr_ratio`.
pub fn diff_check(file: &str, old: &str, new: &str, tol: f64) -> Result<Vec<Change>, String> {
    let (ho, ro) = read_csv(old).map_err(|e| format!("{file} (old): {e}"))?;
    let (hn, rn) = read_csv(new).map_err(|e| format!("{file} (new): {e}"))?;
    let cols = |h: &[String]| -> Result<(usize, usize, usize), String> {
        let r = h
            .iter()
            .position(|c| c == "mcr_ratio")
            .ok_or_else(|| format!("{file}: no mcr_ratio column"))?;
        let v = h
            .iter()
            .position(|c| c == "verdict")
            .ok_or_else(|| format!("{file}: no verdict column"))?;
        Ok((r, r, v))
    };
    let (ko, rco, vo) = cols(&ho)?;
    let (kn, rcn, vn) = cols(&hn)?;
    let key = |r: &Vec<String>, k: usize, h: &[String]| -> String {
        h.iter()
            .zip(r)
            .take(k)
            .map(|(c, v)| format!("{c}={v}"))
            .collect::<Vec<_>>()
            .join(" ")
    };
    let nm: BTreeMap<String, &Vec<String>> = rn.iter().map(|r| (key(r, kn, &hn), r)).collect();
    let mut out = Vec::new();
    let mut seen = std::collections::BTreeSet::new();
    for r in &ro {
        let k = key(r, ko, &ho);
        seen.insert(k.clone());
        let Some(n) = nm.get(&k) else {
            out.push(Change {
                kind: "row",
                file: file.into(),
                row: k,
                column: String::new(),
                old: r.join(" "),
                new: String::new(),
                note: "row removed".into(),
            });
            continue;
        };
        let (a, b) = (r[vo].as_str(), n[vn].as_str());
        if a != b {
            let note = if a == "conservative" && b == "unconservative" {
                "FLIPPED: conservative → unconservative".to_string()
            } else {
                format!("{a} → {b}")
            };
            out.push(Change {
                kind: "verdict",
                file: file.into(),
                row: k.clone(),
                column: "verdict".into(),
                old: a.into(),
                new: b.into(),
                note,
            });
        }
        let (a, b) = (r[rco].as_str(), n[rcn].as_str());
        if moved(a, b, tol) {
            out.push(Change {
                kind: "ratio",
                file: file.into(),
                row: k,
                column: "mcr_ratio".into(),
                old: a.into(),
                new: b.into(),
                note: "ratio moved".into(),
            });
        }
    }
    for (k, r) in &nm {
        if !seen.contains(k) {
            out.push(Change {
                kind: "row",
                file: file.into(),
                row: k.clone(),
                column: String::new(),
                old: String::new(),
                new: r.join(" "),
                note: "row added".into(),
            });
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    // TEST DATA: small hand-made tables in the print-table and rule-check CSV
    // formats (brief, "Cross-helper contracts"); values invented for the test.
    const T_OLD: &str = "# caution\nkappa,zeta=0,zeta=kappa\n0.5,3.10,2.50\n1,4.00,no-buckling\n";
    const T_NEW: &str = "# caution\nkappa,zeta=0,zeta=kappa\n0.5,3.10,2.40\n1,4.00,no-buckling\n";

    #[test]
    fn a_moved_cell_is_found_and_a_tolerance_hides_small_moves() {
        let c = diff_table("tables/t.csv", T_OLD, T_NEW, 0.0).unwrap();
        assert_eq!(c.len(), 1);
        assert_eq!(
            (
                c[0].row.as_str(),
                c[0].column.as_str(),
                c[0].old.as_str(),
                c[0].new.as_str()
            ),
            ("0.5", "zeta=kappa", "2.50", "2.40")
        );
        assert_eq!(c[0].note, "lower");
        // 0.1/2.5 = 4 %: hidden by a 5 % tolerance, shown by 3 %.
        assert!(diff_table("t", T_OLD, T_NEW, 0.05).unwrap().is_empty());
        assert_eq!(diff_table("t", T_OLD, T_NEW, 0.03).unwrap().len(), 1);
        assert!(diff_table("t", T_OLD, T_OLD, 0.0).unwrap().is_empty());
    }

    #[test]
    fn a_flipped_verdict_is_named() {
        let old = "# c\nvariant,kappa,zeta,direction,mcr_ratio,verdict\nfixed,0.5,0,down,0.98,conservative\nfixed,1,0,down,0.9,conservative\n";
        let new = "# c\nvariant,kappa,zeta,direction,mcr_ratio,verdict\nfixed,0.5,0,down,1.04,unconservative\nfixed,1,0,down,0.9,conservative\n";
        let c = diff_check("check/f.r.csv", old, new, 0.0).unwrap();
        let v: Vec<&Change> = c.iter().filter(|c| c.kind == "verdict").collect();
        assert_eq!(v.len(), 1);
        assert!(v[0].note.contains("conservative → unconservative"));
        assert_eq!(v[0].row, "variant=fixed kappa=0.5 zeta=0 direction=down");
        assert_eq!(c.iter().filter(|c| c.kind == "ratio").count(), 1);
    }

    #[test]
    fn fit_fields_are_compared_by_path() {
        let a = serde_json::json!({"coefficients": {"C1": {"value": 1.1, "printed": "1.10"}}, "max_rel_error": 0.01, "caution": "x"});
        let b = serde_json::json!({"coefficients": {"C1": {"value": 1.2, "printed": "1.20"}}, "max_rel_error": 0.01, "caution": "y"});
        let c = diff_fit("fit/f.json", &a, &b, 0.0);
        let cols: Vec<&str> = c.iter().map(|c| c.column.as_str()).collect();
        assert_eq!(cols, ["coefficients.C1.printed", "coefficients.C1.value"]);
    }
}

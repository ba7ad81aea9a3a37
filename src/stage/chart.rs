//! The chart stage: reads the sweep, fit and check outputs (by the file
//! contracts of the stages, never their internals), draws every chart the
//! spec asks for with [`crate::chart`] and writes
//! `out/<family>.<kind>[.<combination>][.<rule>].svg` plus `out/index.json`.
//!
//! A family chooses its charts with `charts = [...]` (kinds
//! `"family-chart"` (μcr against κ), `"family-chart-ratio"` (μcr/μ0 against
//! κ), `"ratio-map"`, `"schematic"`, `"mode-shape"`); without the key it
//! gets a family chart, a schematic and a mode shape per combination, and a
//! ratio map per rule when the check folder holds that family's results.
//! Mode shapes come from solving the family's representative case (κ = 1,
//! ζ at the top flange when the family's ζ axis has it) with the solver.

use super::{LoadedSpec, Options, write_atomic};
use crate::case::schema::{Tab, type_name};
use crate::case::span::Source;
use crate::case::{CaseKind, ResolvedCase};
use crate::chart::mode::{self, ModeShape};
use crate::chart::ratio_map::{self, Cell, RatioMap, Verdict};
use crate::chart::schematic::{self, Schematic};
use crate::chart::xy::{self, Series, XyChart};
use crate::model::Fixity;
use crate::sweep::{self, Axis, AxisValue, Combination, Direction, Family};
use anyhow::{Context, Result, anyhow, bail};
use serde_json::{Value, json};
use std::collections::BTreeMap;
use std::f64::consts::PI;
use std::path::{Path, PathBuf};
use toml::de::{DeTable, DeValue};

/// The folders holding the other stages' outputs.
#[derive(Debug, Clone, PartialEq)]
pub struct Sources {
    /// The sweep output (`<family>.csv`).
    pub sweep: PathBuf,
    /// The fit output (`*.fit.json`), if any.
    pub fit: Option<PathBuf>,
    /// The check output (`<family>.<rule>.csv`, `.frontier.csv`), if any.
    pub check: Option<PathBuf>,
    /// The resistance output (`<name>.<case>.<grade>.<height>.table.csv`),
    /// if any: one resistance chart per table.
    pub resistance: Option<PathBuf>,
}

/// Chart settings the caller chooses.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settings {
    /// Print the caution and the model's caveats under each chart (off in
    /// the handbook, whose pages print them).
    pub caution: bool,
}

impl Default for Settings {
    fn default() -> Self {
        Settings { caution: true }
    }
}

/// Chart kinds a family may ask for, with the `kind` written to index.json.
pub const KINDS: &[(&str, &str)] = &[
    ("family-chart", "family-chart"),
    ("family-chart-ratio", "family-chart"),
    ("ratio-map", "ratio-map"),
    ("schematic", "schematic"),
    ("mode-shape", "mode-shape"),
];

/// One entry of index.json.
#[derive(Debug, Clone, PartialEq)]
struct Entry {
    file: String,
    family: String,
    kind: &'static str,
    /// The plotted quantity of a family chart ("mu_cr" or "mu_ratio").
    quantity: Option<&'static str>,
    combination: Option<String>,
    rule: Option<String>,
    title: String,
    caption: String,
}

/// Draw every chart of the spec with the caution under each.
pub fn run(ls: &LoadedSpec, src: &Sources, out: &Path, opts: &Options) -> Result<()> {
    run_with(ls, src, out, opts, &Settings::default())
}

/// Draw every chart of the spec with the given settings.
pub fn run_with(
    ls: &LoadedSpec,
    src: &Sources,
    out: &Path,
    opts: &Options,
    settings: &Settings,
) -> Result<()> {
    let asked = parse_charts(ls)?;
    let mut files: Vec<(String, String)> = Vec::new();
    let mut index: Vec<Entry> = Vec::new();
    for (f, asked) in ls.spec.families.iter().zip(asked) {
        let explicit = asked.is_some();
        let kinds: Vec<String> = asked.unwrap_or_else(|| {
            ["family-chart", "ratio-map", "schematic", "mode-shape"]
                .map(String::from)
                .to_vec()
        });
        let has_kappa = f.axes.iter().any(|a| matches!(a, Axis::Kappa(_)));
        let needs_sweep = kinds.iter().any(|k| k.starts_with("family-chart"));
        let table = if needs_sweep {
            Some(read_sweep(f, &src.sweep)?)
        } else {
            None
        };
        for k in &kinds {
            match k.as_str() {
                "family-chart" | "family-chart-ratio" => {
                    if !has_kappa {
                        if explicit {
                            bail!(
                                "{}: family {} has no kappa axis, so it has no {k} (a chart against κ); remove \"{k}\" from its `charts`",
                                ls.origin(),
                                f.name
                            );
                        }
                        continue;
                    }
                    let t = table.as_ref().expect("read above");
                    family_charts(
                        f,
                        t,
                        k == "family-chart-ratio",
                        src,
                        settings,
                        &mut files,
                        &mut index,
                    )?;
                }
                "ratio-map" => {
                    let n = ratio_maps(f, src, settings, &mut files, &mut index)?;
                    if n == 0 && explicit {
                        let why = match &src.check {
                            None => "no --check folder was given".to_string(),
                            Some(d) => format!("{} holds no check results for it", d.display()),
                        };
                        bail!(
                            "{}: family {} asks for a ratio map but {why} (run `ltb-atlas check` and pass its --out folder with --check)",
                            ls.origin(),
                            f.name
                        );
                    }
                }
                "schematic" => schematics(f, settings, &mut files, &mut index)?,
                "mode-shape" => mode_shapes(f, opts, settings, &mut files, &mut index)?,
                _ => unreachable!("kinds are checked when parsed"),
            }
        }
    }
    if let Some(dir) = &src.resistance {
        resistance_charts(dir, settings, &mut files, &mut index)?;
    }
    // Everything drawn before anything is written: no partial output.
    for (name, svg) in &files {
        write_atomic(&out.join(name), svg.as_bytes())?;
    }
    let charts: Vec<Value> = index
        .iter()
        .map(|e| {
            json!({
                "file": e.file,
                "family": e.family,
                "kind": e.kind,
                "quantity": e.quantity,
                "combination": e.combination,
                "rule": e.rule,
                "title": e.title,
                "caption": e.caption,
            })
        })
        .collect();
    let idx = json!({ "caution": crate::CAUTION, "charts": charts });
    let mut text = serde_json::to_string_pretty(&idx).expect("serialisable");
    text.push('\n');
    write_atomic(&out.join("index.json"), text.as_bytes())?;
    if !opts.quiet {
        eprintln!("{} charts written to {}", files.len(), out.display());
    }
    Ok(())
}

/// Each family's `charts` list (None when absent), with located errors.
fn parse_charts(ls: &LoadedSpec) -> Result<Vec<Option<Vec<String>>>> {
    let origin = ls.origin();
    let src = Source {
        text: &ls.text,
        origin: &origin,
    };
    let root = DeTable::parse(&ls.text).map_err(|e| anyhow!("{origin}: {}", e.message()))?;
    let span = 0..0;
    let top = Tab {
        src: &src,
        path: "",
        span: &span,
        t: root.get_ref(),
    };
    let fams = top.tables("family").map_err(anyhow::Error::new)?;
    let mut out = Vec::new();
    for loc in &fams {
        let t = loc.tab(&src);
        let Some(v) = t.get("charts") else {
            out.push(None);
            continue;
        };
        let names: Vec<&str> = KINDS.iter().map(|k| k.0).collect();
        let DeValue::Array(items) = v.v else {
            return Err(anyhow::Error::new(src.error(
                &v.span,
                &v.key,
                format!(
                    "expected a list of chart kinds such as [\"family-chart\", \"schematic\"], found {}",
                    type_name(v.v)
                ),
            )));
        };
        let mut kinds = Vec::new();
        for (i, item) in items.iter().enumerate() {
            let key = format!("{}[{i}]", v.key);
            match item.get_ref() {
                DeValue::String(s) if names.contains(&s.as_ref()) => {
                    if kinds.iter().any(|k: &String| k == s.as_ref()) {
                        return Err(anyhow::Error::new(src.error(
                            &item.span(),
                            &key,
                            format!("\"{s}\" is listed twice"),
                        )));
                    }
                    kinds.push(s.to_string());
                }
                other => {
                    let found = match other {
                        DeValue::String(s) => format!("\"{s}\""),
                        o => type_name(o),
                    };
                    return Err(anyhow::Error::new(src.error(
                        &item.span(),
                        &key,
                        format!(
                            "unknown chart kind {found}; write one of {}",
                            names
                                .iter()
                                .map(|n| format!("\"{n}\""))
                                .collect::<Vec<_>>()
                                .join(", ")
                        ),
                    )));
                }
            }
        }
        out.push(Some(kinds));
    }
    Ok(out)
}

fn unravel(f: &Family, i: usize) -> Vec<usize> {
    let mut idx = vec![0; f.axes.len()];
    let mut r = i;
    for (a, ix) in f.axes.iter().zip(idx.iter_mut()).rev() {
        let n = a.len();
        *ix = r % n;
        r /= n;
    }
    idx
}

/// A family's sweep table: header and rows.
struct SweepTable {
    path: PathBuf,
    header: Vec<String>,
    rows: Vec<csv::StringRecord>,
}

impl SweepTable {
    fn col(&self, name: &str) -> Result<usize> {
        self.header.iter().position(|h| h == name).ok_or_else(|| {
            anyhow!(
                "{}: no `{name}` column (is this a sweep output? rerun `ltb-atlas sweep`)",
                self.path.display()
            )
        })
    }
}

fn read_csv(path: &Path) -> Result<(Vec<String>, Vec<csv::StringRecord>)> {
    let mut rd = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .from_path(path)
        .with_context(|| format!("cannot read {}", path.display()))?;
    let header: Vec<String> = rd
        .headers()
        .with_context(|| format!("{}: no header line", path.display()))?
        .iter()
        .map(String::from)
        .collect();
    let mut rows = Vec::new();
    for (i, r) in rd.records().enumerate() {
        rows.push(r.with_context(|| format!("{}: data row {}", path.display(), i + 1))?);
    }
    Ok((header, rows))
}

fn read_sweep(f: &Family, dir: &Path) -> Result<SweepTable> {
    let path = dir.join(format!("{}.csv", f.name));
    let (header, rows) = read_csv(&path).map_err(|e| {
        anyhow!("{e:#} (run `ltb-atlas sweep` with this spec and pass its --out folder as --sweep)")
    })?;
    let t = SweepTable { path, header, rows };
    if t.rows.len() != f.size() {
        bail!(
            "{}: {} rows, but family {} has {} grid points; the sweep output is from another spec: rerun `ltb-atlas sweep`",
            t.path.display(),
            t.rows.len(),
            f.name,
            f.size()
        );
    }
    // The κ of every row must be the grid's.
    if let (Some(ka), Ok(kc)) = (
        f.axes.iter().position(|a| matches!(a, Axis::Kappa(_))),
        t.col("kappa"),
    ) {
        let Axis::Kappa(ks) = &f.axes[ka] else {
            unreachable!()
        };
        for (i, r) in t.rows.iter().enumerate() {
            let want = ks[unravel(f, i)[ka]];
            let got: f64 = r.get(kc).unwrap_or("").parse().unwrap_or(f64::NAN);
            if !((got - want).abs() <= 1e-9 * want.abs().max(1e-12)) {
                bail!(
                    "{}: data row {} has kappa {} where the spec's grid has {}; the sweep output is from another spec: rerun `ltb-atlas sweep`",
                    t.path.display(),
                    i + 1,
                    r.get(kc).unwrap_or(""),
                    sweep::fmt_num(want)
                );
            }
        }
    }
    Ok(t)
}

/// Legend text of a ζ axis value.
#[allow(clippy::redundant_guards)] // comparisons read clearer than float patterns
fn zeta_label(v: AxisValue) -> String {
    match v {
        AxisValue::Num(x) if x == 0.0 => "ζ = 0 (shear centre)".into(),
        AxisValue::Num(x) => format!("ζ = {}", crate::chart::fmt_tick(x, 4)),
        AxisValue::KappaTimes(c) if c == 1.0 => "ζ = κ (top flange)".into(),
        AxisValue::KappaTimes(c) if c == -1.0 => "ζ = −κ (bottom flange)".into(),
        AxisValue::KappaTimes(c) if c == 0.0 => "ζ = 0 (shear centre)".into(),
        AxisValue::KappaTimes(c) => format!("ζ = {}κ", crate::chart::fmt_tick(c, 4)),
    }
}

/// Short height label for the section sketch.
#[allow(clippy::redundant_guards)]
fn zeta_short(v: AxisValue) -> String {
    match v {
        AxisValue::Num(x) => format!("load ζ = {}", crate::chart::fmt_tick(x, 3)),
        AxisValue::KappaTimes(c) if c == 1.0 => "load ζ = κ".into(),
        AxisValue::KappaTimes(c) if c == -1.0 => "load ζ = −κ".into(),
        AxisValue::KappaTimes(c) => format!("load ζ = {}κ", crate::chart::fmt_tick(c, 3)),
    }
}

fn combo_text(c: &Combination) -> String {
    if c.labels.is_empty() {
        String::new()
    } else {
        c.labels
            .iter()
            .map(|(k, v)| format!("{k} {v}"))
            .collect::<Vec<_>>()
            .join(", ")
    }
}

fn is_log(ks: &[f64]) -> bool {
    if ks.len() < 3 || ks.iter().any(|k| *k <= 0.0) {
        return false;
    }
    let r0 = ks[1] / ks[0];
    let d0 = ks[1] - ks[0];
    let geometric = ks
        .windows(2)
        .all(|w| ((w[1] / w[0]) / r0 - 1.0).abs() < 0.02);
    let arithmetic = ks
        .windows(2)
        .all(|w| ((w[1] - w[0]) / d0 - 1.0).abs() < 0.02);
    geometric && !arithmetic
}

fn kappa_values(f: &Family) -> Vec<f64> {
    f.axes
        .iter()
        .find_map(|a| match a {
            Axis::Kappa(v) => Some(v.clone()),
            _ => None,
        })
        .unwrap_or_default()
}

fn zeta_values(f: &Family) -> Vec<AxisValue> {
    f.axes
        .iter()
        .find_map(|a| match a {
            Axis::Zeta(v) => Some(v.clone()),
            _ => None,
        })
        .unwrap_or_default()
}

/// The case a combination stands for (its variant's, else the family's).
fn case_of<'a>(f: &'a Family, c: &Combination) -> &'a ResolvedCase {
    for (a, &ix) in f.axes.iter().zip(&c.index) {
        if let Axis::Variant(v) = a {
            return &f.variants[v[ix]].case;
        }
    }
    &f.case
}

fn root_text(m: &crate::model::Member) -> Option<String> {
    crate::report::root_warping(m).map(|(end, w)| {
        let s = match w {
            Fixity::Fixed => "fixed".to_string(),
            Fixity::Free => "free".to_string(),
            Fixity::Spring(k) => format!("elastic (k = {})", sweep::fmt_num(k)),
        };
        format!("cantilever root ({end}) warping {s}")
    })
}

fn caveat_notes(settings: &Settings) -> Vec<String> {
    if settings.caution {
        // The sweep's caveats; on a chart the root condition is in the title lines.
        let c = sweep::CAVEATS.replace("stated with its case below", "stated with the case above");
        vec![format!("Model: {c}.")]
    } else {
        Vec::new()
    }
}

/// The fit outputs of a family and combination (sorted by file name).
fn fits(dir: Option<&Path>, family: &str, combination: &str) -> Result<Vec<(String, Value)>> {
    let Some(dir) = dir else {
        return Ok(Vec::new());
    };
    let mut names: Vec<String> = std::fs::read_dir(dir)
        .with_context(|| format!("cannot read the fit folder {}", dir.display()))?
        .filter_map(|e| e.ok()?.file_name().into_string().ok())
        .filter(|n| n.starts_with(&format!("{family}.")) && n.ends_with(".fit.json"))
        .collect();
    names.sort();
    let mut out = Vec::new();
    for n in names {
        let p = dir.join(&n);
        let text =
            std::fs::read_to_string(&p).with_context(|| format!("cannot read {}", p.display()))?;
        let v: Value = serde_json::from_str(&text)
            .with_context(|| format!("{}: not valid JSON", p.display()))?;
        let fam = v.get("family").and_then(Value::as_str);
        let comb = v
            .get("combination")
            .and_then(Value::as_str)
            .unwrap_or("all");
        if fam == Some(family) && comb == combination {
            out.push((n, v));
        }
    }
    Ok(out)
}

/// The sampled curve for ζ index `j` from a fit JSON's `curves` field
/// (`[{"zeta_index": j, "kappa": [..], "<quantity>": [..]}]`), if present.
fn fit_curve(v: &Value, j: usize, quantity: &str) -> Option<Vec<(f64, f64)>> {
    let curves = v.get("curves")?.as_array()?;
    let c = curves
        .iter()
        .find(|c| c.get("zeta_index").and_then(Value::as_u64) == Some(j as u64))?;
    let ks = c.get("kappa")?.as_array()?;
    let ys = c.get(quantity)?.as_array()?;
    let pts: Vec<(f64, f64)> = ks
        .iter()
        .zip(ys)
        .filter_map(|(k, y)| Some((k.as_f64()?, y.as_f64()?)))
        .collect();
    (pts.len() >= 2).then_some(pts)
}

#[allow(clippy::too_many_arguments)]
fn family_charts(
    f: &Family,
    t: &SweepTable,
    ratio: bool,
    src: &Sources,
    settings: &Settings,
    files: &mut Vec<(String, String)>,
    index: &mut Vec<Entry>,
) -> Result<()> {
    let (qcol, quantity) = if ratio {
        ("mu_ratio", "mu_ratio")
    } else {
        ("mu_cr", "mu_cr")
    };
    let yc = t.col(qcol)?;
    let kc = t.col("kappa")?;
    let sc = t.col("status")?;
    let za = f.axes.iter().position(|a| matches!(a, Axis::Zeta(_)));
    let zvals = zeta_values(f);
    let combos = sweep::combinations(f);
    let by_name: BTreeMap<String, usize> = combos
        .iter()
        .enumerate()
        .map(|(i, c)| (c.name.clone(), i))
        .collect();
    let nz = zvals.len().max(1);
    // points[combination][ζ index]
    let mut pts: Vec<Vec<Vec<(f64, f64)>>> = vec![vec![Vec::new(); nz]; combos.len()];
    let mut failed = vec![0usize; combos.len()];
    for (i, r) in t.rows.iter().enumerate() {
        let ci = by_name[&sweep::combination_of(f, i)];
        let j = za.map_or(0, |a| unravel(f, i)[a]);
        let k: f64 = r.get(kc).unwrap_or("").parse().unwrap_or(f64::NAN);
        let y: Option<f64> = r.get(yc).and_then(|s| s.parse().ok());
        match (r.get(sc) == Some("ok"), y) {
            (true, Some(y)) if k.is_finite() && y.is_finite() => pts[ci][j].push((k, y)),
            _ => failed[ci] += 1,
        }
    }
    let x_log = is_log(&kappa_values(f));
    let kind = if ratio {
        "family-chart-ratio"
    } else {
        "family-chart"
    };
    for (ci, c) in combos.iter().enumerate() {
        let fit = fits(src.fit.as_deref(), &f.name, &c.name)?;
        let chosen = fit
            .iter()
            .find(|(_, v)| v.get("curves").is_some())
            .or(fit.first());
        let mut notes = Vec::new();
        let mut any_curve = false;
        let series: Vec<Series> = (0..nz)
            .map(|j| {
                let curve = chosen.and_then(|(_, v)| fit_curve(v, j, quantity));
                any_curve |= curve.is_some();
                Series {
                    label: zvals
                        .get(j)
                        .map_or("loads as given".to_string(), |z| zeta_label(*z)),
                    points: pts[ci][j].clone(),
                    curve,
                }
            })
            .filter(|s| !s.points.is_empty() || s.curve.is_some())
            .collect();
        if series.is_empty() {
            continue;
        }
        let valid = chosen.and_then(|(_, v)| {
            let val = v.get("validity")?;
            Some((
                val.get("kappa_min")?.as_f64()?,
                val.get("kappa_max")?.as_f64()?,
            ))
        });
        match (chosen, any_curve) {
            (Some((n, v)), true) => notes.push(format!(
                "Markers: finite-element values; lines: the fitted formula ({}, form {}).",
                n,
                v.get("form").and_then(Value::as_str).unwrap_or("?")
            )),
            (Some((n, _)), false) => notes.push(format!(
                "Markers: finite-element values joined by straight lines; the fit output {n} carries no sampled curve, so the fitted formula is not drawn (its validity range is shaded)."
            )),
            (None, _) => notes.push(
                "Markers: finite-element values joined by straight lines (no fit output given).".into(),
            ),
        }
        if failed[ci] > 0 {
            notes.push(format!(
                "{} grid points without a converged value are not drawn (see the sweep CSV's status column).",
                failed[ci]
            ));
        }
        notes.extend(caveat_notes(settings));
        let case = case_of(f, c);
        let mut sub = combo_text(c);
        if let Some(r) = root_text(&case.member) {
            sub = if sub.is_empty() {
                r
            } else {
                format!("{sub}; {r}")
            };
        }
        let title = if ratio {
            format!("{}: μ_{{cr}}/μ_{{0}} against κ", f.name)
        } else {
            format!("{}: μ_{{cr}} against κ", f.name)
        };
        let chart = XyChart {
            title: title.clone(),
            subtitle: sub.clone(),
            x_label: "κ = (π/L)·√(EI_{w}/GI_{t})  (dimensionless)".into(),
            y_label: if ratio {
                "μ_{cr}/μ_{0},  μ_{0} = π·√(1 + κ^{2})  (dimensionless)".into()
            } else {
                "μ_{cr} = M_{cr}·L/√(EI_{z}·GI_{t})  (dimensionless)".into()
            },
            x_log,
            y_from_zero: true,
            series,
            legend_title: "Load height".into(),
            valid_x: valid,
            notes,
            caution: settings.caution,
            style_offset: 0,
        };
        let svg = xy::render(&chart).map_err(|e| anyhow!("family {}, {}: {e}", f.name, c.name))?;
        let file = format!("{}.{kind}.{}.svg", f.name, c.name);
        index.push(Entry {
            file: file.clone(),
            family: f.name.clone(),
            kind: "family-chart",
            quantity: Some(quantity),
            combination: Some(c.name.clone()),
            rule: None,
            title: plain(&title),
            caption: format!(
                "{} of family {} against κ, one curve per load height{}{}.",
                if ratio { "μcr/μ0" } else { "μcr" },
                f.name,
                if sub.is_empty() {
                    String::new()
                } else {
                    format!(" ({})", plain(&sub))
                },
                if x_log {
                    ", κ on a logarithmic axis"
                } else {
                    ""
                }
            ),
        });
        files.push((file, svg));
    }
    Ok(())
}

/// Label text without subscript markup (for captions and titles in JSON).
fn plain(s: &str) -> String {
    s.replace("_{", "").replace("^{", "^").replace('}', "")
}

/// Which combination a check row belongs to, from its axis columns.
fn match_combination(
    combos: &[Combination],
    header: &[String],
    r: &csv::StringRecord,
) -> Option<usize> {
    combos.iter().position(|c| {
        c.labels.iter().all(|(col, label)| {
            let Some(i) = header.iter().position(|h| h == col) else {
                return false;
            };
            let v = r.get(i).unwrap_or("");
            v == label
                || matches!((v.parse::<f64>(), label.parse::<f64>()), (Ok(a), Ok(b)) if (a - b).abs() <= 1e-12 * a.abs().max(b.abs()))
        })
    })
}

fn ratio_maps(
    f: &Family,
    src: &Sources,
    settings: &Settings,
    files: &mut Vec<(String, String)>,
    index: &mut Vec<Entry>,
) -> Result<usize> {
    let Some(dir) = &src.check else {
        return Ok(0);
    };
    let prefix = format!("{}.", f.name);
    let mut rules: Vec<String> = std::fs::read_dir(dir)
        .with_context(|| format!("cannot read the check folder {}", dir.display()))?
        .filter_map(|e| e.ok()?.file_name().into_string().ok())
        .filter_map(|n| {
            let rule = n.strip_prefix(&prefix)?.strip_suffix(".csv")?;
            (!rule.contains('.') && !rule.is_empty()).then(|| rule.to_string())
        })
        .collect();
    rules.sort();
    let combos = sweep::combinations(f);
    let x_log = is_log(&kappa_values(f));
    let mut n = 0;
    for rule in rules {
        let path = dir.join(format!("{}.{rule}.csv", f.name));
        let (header, rows) = read_csv(&path)?;
        let col = |name: &str| {
            header.iter().position(|h| h == name).ok_or_else(|| {
                anyhow!(
                    "{}: no `{name}` column (expected a rule-check output)",
                    path.display()
                )
            })
        };
        let (kc, zc, rc, vc) = (
            col("kappa")?,
            col("zeta")?,
            col("mcr_ratio")?,
            col("verdict")?,
        );
        let mut cells: Vec<Vec<Cell>> = vec![Vec::new(); combos.len()];
        for (i, r) in rows.iter().enumerate() {
            let at = || format!("{}: data row {}", path.display(), i + 1);
            let ci = match_combination(&combos, &header, r).ok_or_else(|| {
                anyhow!("{}: its axis values match no combination of family {} (is the check output from another spec?)", at(), f.name)
            })?;
            let kappa: f64 = r
                .get(kc)
                .unwrap_or("")
                .parse()
                .map_err(|_| anyhow!("{}: kappa is not a number", at()))?;
            let zeta: f64 = r
                .get(zc)
                .unwrap_or("")
                .parse()
                .map_err(|_| anyhow!("{}: zeta is not a number", at()))?;
            let verdict_text = r.get(vc).unwrap_or("");
            let verdict = Verdict::parse(verdict_text).ok_or_else(|| {
                anyhow!("{}: verdict \"{verdict_text}\" is not one of conservative, unconservative, indeterminate, not-applicable", at())
            })?;
            let ratio = r
                .get(rc)
                .and_then(|s| s.parse::<f64>().ok())
                .filter(|x| x.is_finite());
            cells[ci].push(Cell {
                kappa,
                zeta,
                ratio,
                verdict,
            });
        }
        // Frontier branches per combination, in file order.
        let fpath = dir.join(format!("{}.{rule}.frontier.csv", f.name));
        let mut frontier: Vec<BTreeMap<String, Vec<(f64, f64)>>> =
            vec![BTreeMap::new(); combos.len()];
        let have_frontier = fpath.exists();
        if have_frontier {
            let (fh, frows) = read_csv(&fpath)?;
            let fcol = |name: &str| fh.iter().position(|h| h == name);
            let (Some(bc), Some(fk), Some(fz)) = (fcol("branch"), fcol("kappa"), fcol("zeta"))
            else {
                bail!("{}: expected columns branch, kappa, zeta", fpath.display());
            };
            let cc = fcol("combination");
            for (i, r) in frows.iter().enumerate() {
                let ci = match cc {
                    Some(c) => combos
                        .iter()
                        .position(|x| Some(x.name.as_str()) == r.get(c)),
                    None => Some(0),
                }
                .ok_or_else(|| {
                    anyhow!(
                        "{}: data row {}: unknown combination",
                        fpath.display(),
                        i + 1
                    )
                })?;
                let (Ok(k), Ok(z)) = (
                    r.get(fk).unwrap_or("").parse::<f64>(),
                    r.get(fz).unwrap_or("").parse::<f64>(),
                ) else {
                    bail!(
                        "{}: data row {}: kappa and zeta must be numbers",
                        fpath.display(),
                        i + 1
                    );
                };
                frontier[ci]
                    .entry(r.get(bc).unwrap_or("").to_string())
                    .or_default()
                    .push((k, z));
            }
        }
        for (ci, c) in combos.iter().enumerate() {
            if cells[ci].is_empty() {
                continue;
            }
            let mut notes = vec![format!(
                "r = Mcr by rule {rule} over the finite-element Mcr at the same point; r > 1 overestimates Mcr (unconservative). Rule clause, edition and tolerance: see {}.",
                path.file_name().and_then(|s| s.to_str()).unwrap_or("")
            )];
            if !have_frontier {
                notes.push("No frontier file given: the r = 1 frontier is not drawn.".into());
            }
            notes.extend(caveat_notes(settings));
            let title = format!("{}: rule {rule} against finite elements", f.name);
            let sub = combo_text(c);
            let map = RatioMap {
                title: title.clone(),
                subtitle: sub.clone(),
                kappa_log: x_log,
                cells: cells[ci].clone(),
                frontier: frontier[ci].values().cloned().collect(),
                notes,
                caution: settings.caution,
            };
            let svg = ratio_map::render(&map)
                .map_err(|e| anyhow!("family {}, rule {rule}: {e}", f.name))?;
            let file = format!("{}.ratio-map.{}.{rule}.svg", f.name, c.name);
            index.push(Entry {
                file: file.clone(),
                family: f.name.clone(),
                kind: "ratio-map",
            quantity: None,
                combination: Some(c.name.clone()),
                rule: Some(rule.clone()),
                title,
                caption: format!(
                    "Mcr by rule {rule} over the finite-element Mcr for family {} over κ and ζ{}; unconservative cells hatched, r = 1 frontier and flange lines ζ = ±κ drawn.",
                    f.name,
                    if sub.is_empty() { String::new() } else { format!(" ({sub})") }
                ),
            });
            files.push((file, svg));
            n += 1;
        }
    }
    Ok(n)
}

/// The representative point of a combination: κ = 1 when the family has a
/// κ axis, ζ at the top flange (ζ = κ) when the ζ axis has it, else its
/// first value. Returns the point and the ζ text.
fn representative(f: &Family, c: &Combination) -> (sweep::Point, Option<String>) {
    let has_kappa = f.axes.iter().any(|a| matches!(a, Axis::Kappa(_)));
    let kappa = has_kappa.then_some(1.0);
    let zvals = zeta_values(f);
    let mut idx = c.index.clone();
    let mut ztext = None;
    if let Some(za) = f.axes.iter().position(|a| matches!(a, Axis::Zeta(_))) {
        let j = zvals
            .iter()
            .position(|z| *z == AxisValue::KappaTimes(1.0))
            .unwrap_or(0);
        idx[za] = j;
        ztext = Some(zeta_label(zvals[j]));
    }
    (f.point_at(&idx, kappa, None), ztext)
}

fn schematics(
    f: &Family,
    settings: &Settings,
    files: &mut Vec<(String, String)>,
    index: &mut Vec<Entry>,
) -> Result<()> {
    // With a direction axis holding both directions the case is drawn once
    // per other combination, with loads shown both ways.
    let both = f.axes.iter().any(|a| {
        matches!(a, Axis::Direction(d) if d.contains(&sweep::Direction::Down) && d.contains(&sweep::Direction::Up))
    });
    for c in sweep::combinations(f) {
        if both && c.labels.iter().any(|(k, v)| k == "direction" && v == "up") {
            continue;
        }
        let (p, ztext) = representative(f, &c);
        let kappa = p.member.kappa;
        let zvals = zeta_values(f);
        let load_heights: Vec<(String, f64)> = zvals
            .iter()
            .map(|z| {
                let v = match *z {
                    AxisValue::Num(x) => x,
                    AxisValue::KappaTimes(k) => k * kappa,
                };
                (zeta_short(*z), v)
            })
            .collect();
        let mut shown = c.clone();
        if both {
            shown.labels.retain(|(k, _)| k != "direction");
        }
        let mut sub = combo_text(&shown);
        if both {
            sub = if sub.is_empty() {
                "loads down (gravity) and up (uplift)".to_string()
            } else {
                format!("{sub}; loads down (gravity) and up (uplift)")
            };
        }
        let drawn = format!(
            "drawn at κ = {}{}",
            crate::chart::fmt_tick(kappa, 3),
            ztext
                .as_ref()
                .map_or(String::new(), |z| format!(", load at {z}"))
        );
        sub = if sub.is_empty() {
            drawn
        } else {
            format!("{sub}; {drawn}")
        };
        let mut notes = Vec::new();
        if !zvals.is_empty() {
            notes.push(
                "The family varies the load height: every ζ of its axis is marked on the section."
                    .into(),
            );
        }
        if let Some(r) = root_text(&p.member) {
            notes.push(format!("{}{}.", r[..1].to_uppercase(), &r[1..]));
        }
        notes.extend(caveat_notes(settings));
        let title = format!("{}: case", f.name);
        let s = Schematic {
            title: title.clone(),
            subtitle: sub.clone(),
            member: p.member,
            load_heights,
            both_directions: both,
            notes,
            caution: settings.caution,
        };
        let svg = schematic::render(&s).map_err(|e| anyhow!("family {}: {e}", f.name))?;
        let file = format!("{}.schematic.{}.svg", f.name, c.name);
        index.push(Entry {
            file: file.clone(),
            family: f.name.clone(),
            kind: "schematic",
            quantity: None,
            combination: Some(c.name.clone()),
            rule: None,
            title,
            caption: format!(
                "The case of family {} ({}): supports and what they hold, loads at their height, restraints.",
                f.name,
                plain(&sub)
            ),
        });
        files.push((file, svg));
    }
    Ok(())
}

fn mode_shapes(
    f: &Family,
    opts: &Options,
    settings: &Settings,
    files: &mut Vec<(String, String)>,
    index: &mut Vec<Entry>,
) -> Result<()> {
    for c in sweep::combinations(f) {
        let (p, ztext) = representative(f, &c);
        let sol = crate::solve::solve(&p.member, &opts.settings()).map_err(|e| {
            anyhow!(
                "family {}, {}: the representative case failed: {e}",
                f.name,
                c.name
            )
        })?;
        let d = &sol.forward;
        let Some(m) = &d.mode else {
            if !opts.quiet {
                eprintln!(
                    "family {}, {}: no mode shape ({}), none drawn",
                    f.name,
                    c.name,
                    d.status.as_str()
                );
            }
            continue;
        };
        let case = case_of(f, &c);
        let kappa = p.member.kappa;
        let mut notes = Vec::new();
        let flanges = match &case.kind {
            CaseKind::Physical(ph) => {
                let lat = case.scales.lateral;
                let (t, b) = (
                    ph.section.top_flange / 1000.0 / lat,
                    ph.section.bottom_flange / 1000.0 / lat,
                );
                if t.is_finite() && b.is_finite() {
                    Some((t, b))
                } else {
                    notes.push(
                        "Flange heights unknown for this section: only the shear centre is drawn."
                            .into(),
                    );
                    None
                }
            }
            CaseKind::Dimensionless => {
                notes.push("Flanges at ζ = ±κ (doubly symmetric I-section).".into());
                Some((kappa / PI, -kappa / PI))
            }
        };
        let dir = if p.direction == Direction::Up {
            "up"
        } else {
            "down"
        };
        let mcr = d.mu_cr.map_or(String::new(), |m| {
            format!(", μ_{{cr}} = {}", sweep::round_down(m, d.error_estimate))
        });
        let sub = format!(
            "{}κ = {}{}, loads {dir}{mcr}",
            if c.labels.is_empty() {
                String::new()
            } else {
                format!("{}; ", combo_text(&c))
            },
            crate::chart::fmt_tick(kappa, 3),
            ztext.as_ref().map_or(String::new(), |z| format!(", {z}")),
        );
        if let Some(r) = root_text(&p.member) {
            notes.push(format!("{}{}.", r[..1].to_uppercase(), &r[1..]));
        }
        notes.extend(caveat_notes(settings));
        let title = format!("{}: buckling mode", f.name);
        let shape = ModeShape {
            title: title.clone(),
            subtitle: sub.clone(),
            x: m.x.clone(),
            v: m.v.clone(),
            phi: m.phi.clone(),
            flanges,
            notes,
            caution: settings.caution,
        };
        let svg = mode::render(&shape).map_err(|e| anyhow!("family {}: {e}", f.name))?;
        let file = format!("{}.mode-shape.{}.svg", f.name, c.name);
        index.push(Entry {
            file: file.clone(),
            family: f.name.clone(),
            kind: "mode-shape",
            quantity: None,
            combination: Some(c.name.clone()),
            rule: None,
            title,
            caption: format!(
                "Lateral displacement of both flanges and twist along the member at the critical load, family {} ({}).",
                f.name,
                plain(&sub)
            ),
        });
        files.push((file, svg));
    }
    Ok(())
}

/// One resistance chart per print table of the resistance stage: Mb,Rd
/// against the member length, one curve per section (the table's values,
/// rounded down as printed), with the table's code lines as notes. The
/// index names the resistance table in `family`.
fn resistance_charts(
    dir: &Path,
    settings: &Settings,
    files: &mut Vec<(String, String)>,
    index: &mut Vec<Entry>,
) -> Result<()> {
    if !dir.is_dir() {
        return Ok(());
    }
    let mut names: Vec<String> = std::fs::read_dir(dir)
        .with_context(|| format!("cannot read the resistance folder {}", dir.display()))?
        .filter_map(|e| e.ok()?.file_name().into_string().ok())
        .filter(|n| n.ends_with(".table.csv"))
        .collect();
    names.sort();
    for n in names {
        let p = dir.join(&n);
        let text =
            std::fs::read_to_string(&p).with_context(|| format!("cannot read {}", p.display()))?;
        // The table's own code lines, and of the grade and load-case lines
        // only those of this table (<name>.<case>.<grade>.<height>).
        let parts: Vec<&str> = n.trim_end_matches(".table.csv").split('.').collect();
        let (case, grade) = (parts.get(1).copied(), parts.get(2).copied());
        let notes: Vec<String> = text
            .lines()
            .filter_map(|l| l.strip_prefix("# "))
            .filter(|l| {
                l.starts_with("code:")
                    || l.starts_with("method:")
                    || l.starts_with("γM1")
                    || l.starts_with("φ")
                    || case.is_some_and(|c| l.starts_with(&format!("load case {c}:")))
                    || grade.is_some_and(|g| l.to_lowercase().starts_with(&format!("grade {g} /")))
            })
            .map(String::from)
            .collect();
        let body: String = text
            .lines()
            .filter(|l| !l.starts_with('#'))
            .collect::<Vec<_>>()
            .join("\n");
        let mut rdr = csv::ReaderBuilder::new().from_reader(body.as_bytes());
        let header: Vec<String> = rdr
            .headers()
            .with_context(|| format!("{}: no header", p.display()))?
            .iter()
            .map(String::from)
            .collect();
        let mut series: Vec<(String, Vec<(f64, f64)>)> = header
            .iter()
            .skip(1)
            .map(|h| (h.clone(), Vec::new()))
            .collect();
        for rec in rdr.records() {
            let rec = rec.with_context(|| format!("{}: unreadable row", p.display()))?;
            let Some(l) = rec.get(0).and_then(|x| x.parse::<f64>().ok()) else {
                continue;
            };
            for (k, s) in series.iter_mut().enumerate() {
                if let Some(v) = rec.get(k + 1).and_then(|x| x.parse::<f64>().ok()) {
                    s.1.push((l, v));
                }
            }
        }
        series.retain(|s| s.1.len() >= 2);
        if series.is_empty() {
            continue;
        }
        let stem = n.trim_end_matches(".table.csv").to_string();
        let (table, rest) = stem.split_once('.').unwrap_or((stem.as_str(), ""));
        let title = format!("{table}: design resistance");
        let subtitle = rest.replace('.', ", ");
        let units = crate::chart::xy::ResistanceUnits {
            length: "m".into(),
            resistance: "kN·m".into(),
        };
        // A design resistance carries the design caution, not the elastic one.
        let mut notes = notes;
        if settings.caution {
            notes.push(crate::DESIGN_CAUTION.to_string());
        }
        let chart =
            crate::chart::xy::resistance_chart(&title, &subtitle, series, &units, notes, false);
        let svg = crate::chart::xy::render(&chart).map_err(|e| anyhow!("{}: {e}", p.display()))?;
        let file = format!("{stem}.resistance.svg");
        index.push(Entry {
            file: file.clone(),
            family: table.to_string(),
            kind: "resistance",
            quantity: None,
            combination: Some(rest.to_string()),
            rule: None,
            title,
            caption: format!(
                "Design buckling resistance moment against member length, one curve per section ({subtitle}); values as printed in {n}, rounded down."
            ),
        });
        files.push((file, svg));
    }
    Ok(())
}

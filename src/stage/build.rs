//! The handbook build: one handbook spec to sweep tables, print tables,
//! typst page sources and a typeset PDF, reproducibly; the manifest last.
//! Also `diff` (compare two builds) and `init` (a starter spec).
//!
//! Layout of a build folder (each stage owns its folder):
//!
//! ```text
//! DIR/sweep/    the sweep stage's files (CSV, print tables, its manifest)
//! DIR/fit/      fit stage (when wired)        DIR/check/   rule checks (when wired)
//! DIR/charts/   chart stage (when wired)      DIR/resistance/  resistance tables (when wired)
//! DIR/tables/   print tables in the handbook's units, rounded to the safe side
//! DIR/fonts/    the embedded DejaVu Sans files typst uses
//! DIR/pages/    typst sources (lib.typ, main.typ, front.typ, family-*.typ)
//! DIR/handbook.pdf
//! DIR/manifest.json   every file above with its SHA-256; written last
//! ```

use super::{LoadedSpec, Options, write_atomic};
use crate::handbook::diff::{self, Change};
use crate::handbook::pages::{self, Inputs};
use crate::handbook::{Date, Handbook, convert, parse_handbook};
use crate::sweep::{Axis, Family, combinations};
use anyhow::{Context, Result, anyhow, bail};
use sha2::{Digest, Sha256};
use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::process::Command;

/// The typst version every build uses (output changes between versions).
pub const TYPST_VERSION: &str = "0.15.1";

/// Folders a build owns inside its output folder.
pub const OWNED_DIRS: &[&str] = &[
    "sweep",
    "fit",
    "check",
    "charts",
    "resistance",
    "tables",
    "fonts",
    "pages",
];

/// The manifest's marker of a handbook build folder.
const MANIFEST_TOOL: &str = "ltb-atlas build";

/// Fonts embedded in the binary and written to `DIR/fonts/`.
const FONTS: &[(&str, &[u8])] = &[
    (
        "DejaVuSans.ttf",
        include_bytes!("../../assets/fonts/DejaVuSans.ttf"),
    ),
    (
        "DejaVuSans-Bold.ttf",
        include_bytes!("../../assets/fonts/DejaVuSans-Bold.ttf"),
    ),
    (
        "DejaVuSans-Oblique.ttf",
        include_bytes!("../../assets/fonts/DejaVuSans-Oblique.ttf"),
    ),
    (
        "LICENSE-DejaVu.txt",
        include_bytes!("../../assets/fonts/LICENSE-DejaVu.txt"),
    ),
];

/// Options of the build beyond the shared stage options.
#[derive(Debug, Clone, Default)]
pub struct BuildOptions {
    /// typst binary (else `TYPST_BIN`, else `typst` on PATH).
    pub typst: Option<PathBuf>,
    /// Edition date YYYY-MM-DD (overrides the spec's).
    pub date: Option<String>,
}

/// What a build did.
#[derive(Debug, Clone)]
pub struct BuildSummary {
    /// Cases solved by the sweep.
    pub cases: usize,
    /// Cases that did not end "ok" (no-buckling counts as ok).
    pub failed: usize,
    /// Files written (manifest included).
    pub files: usize,
    /// The PDF, when typst ran.
    pub pdf: Option<PathBuf>,
}

/// The error a build returns when typst is missing or the wrong version:
/// every other output has been written.
#[derive(Debug, thiserror::Error)]
#[error("{0}")]
pub struct TypstMissing(pub String);

/// State shared by the steps of a build.
pub struct Ctx<'a> {
    /// The spec.
    pub ls: &'a LoadedSpec,
    /// Its `[handbook]` table.
    pub hb: &'a Handbook,
    /// The build folder.
    pub out: &'a Path,
    /// Shared stage options.
    pub opts: &'a Options,
    /// Edition date.
    pub date: Date,
    /// Cases solved and failed by the sweep.
    pub cases: (usize, usize),
}

type Step = fn(&mut Ctx<'_>) -> Result<()>;

/// The steps of a build, in order. Each writes into its own folder of the
/// build (see [`OWNED_DIRS`]); pages read only those files.
const STEPS: &[(&str, Step)] = &[
    ("sweep", step_sweep),
    ("fit", step_fit),
    ("check", step_check),
    ("resistance", step_resistance),
    ("charts", step_charts),
    ("tables", step_tables),
    ("fonts", step_fonts),
    ("pages", step_pages),
];

/// The handbook date: `--date`, else the spec's `date`, else
/// `SOURCE_DATE_EPOCH`; never the clock.
pub fn resolve_date(flag: Option<&str>, hb: &Handbook) -> Result<Date> {
    if let Some(s) = flag {
        return Date::parse(s)
            .ok_or_else(|| anyhow!("--date {s}: write YYYY-MM-DD, for example --date 2026-03-02"));
    }
    if let Some(d) = hb.date {
        return Ok(d);
    }
    if let Ok(s) = std::env::var("SOURCE_DATE_EPOCH") {
        let secs: i64 = s.trim().parse().map_err(|_| {
            anyhow!("SOURCE_DATE_EPOCH={s} is not a whole number of seconds since 1970")
        })?;
        return Ok(Date::from_epoch(secs));
    }
    bail!(
        "the handbook has no date: add date = \"YYYY-MM-DD\" to [handbook], pass --date YYYY-MM-DD or set SOURCE_DATE_EPOCH (a fixed date keeps rebuilds byte-identical)"
    )
}

/// Build a handbook from the spec at `spec_path` into `out`.
pub fn run(spec_path: &Path, out: &Path, opts: &Options, b: &BuildOptions) -> Result<BuildSummary> {
    let ls = super::load_spec(spec_path)?;
    let hb = parse_handbook(&ls.text, &ls.origin(), &ls.spec).map_err(anyhow::Error::new)?;
    let date = resolve_date(b.date.as_deref(), &hb)?;
    opts.pool()?; // check --jobs and --tolerance before touching the folder
    prepare(out)?;
    let mut cx = Ctx {
        ls: &ls,
        hb: &hb,
        out,
        opts,
        date,
        cases: (0, 0),
    };
    for (name, step) in STEPS {
        step(&mut cx).with_context(|| format!("build step `{name}`"))?;
    }
    // The PDF (the one step that needs an outside tool).
    let pdf = out.join("handbook.pdf");
    let typst = find_typst(b.typst.as_deref());
    let typst_result = match &typst {
        Ok(t) => Some(compile(t, out, &pdf, date)),
        Err(_) => None,
    };
    if let Some(Err(e)) = &typst_result {
        // No manifest for a failed typeset: the folder is not a finished build.
        return Err(anyhow!("{e:#}"));
    }
    let owned = owned_files(out)?;
    remove_unowned(out, &owned)?;
    let files = write_manifest(&cx, &owned, typst.is_ok())?;
    let (cases, failed) = cx.cases;
    match typst {
        Ok(_) => Ok(BuildSummary {
            cases,
            failed,
            files,
            pdf: Some(pdf),
        }),
        Err(e) => Err(anyhow::Error::new(TypstMissing(e))),
    }
}

/// Rewrite the typst pages of an existing build folder from the files it
/// holds now and typeset them into `DIR/handbook.pdf` (no stage runs, the
/// manifest is left alone): for template work and for tests that place
/// other stages' contract files by hand.
pub fn typeset(spec_path: &Path, out: &Path, opts: &Options, b: &BuildOptions) -> Result<PathBuf> {
    let ls = super::load_spec(spec_path)?;
    let hb = parse_handbook(&ls.text, &ls.origin(), &ls.spec).map_err(anyhow::Error::new)?;
    let date = resolve_date(b.date.as_deref(), &hb)?;
    let mut cx = Ctx {
        ls: &ls,
        hb: &hb,
        out,
        opts,
        date,
        cases: (0, 0),
    };
    step_fonts(&mut cx)?;
    step_pages(&mut cx)?;
    let typst = find_typst(b.typst.as_deref()).map_err(|e| anyhow::Error::new(TypstMissing(e)))?;
    let pdf = out.join("handbook.pdf");
    compile(&typst, out, &pdf, date)?;
    Ok(pdf)
}

/// Check that `out` is empty or an earlier build (its manifest says so),
/// then clear what the build owns so that nothing stale survives.
fn prepare(out: &Path) -> Result<()> {
    if out.exists() {
        let entries: Vec<_> = std::fs::read_dir(out)
            .with_context(|| format!("cannot read {}", out.display()))?
            .flatten()
            .collect();
        if !entries.is_empty() {
            let m = out.join("manifest.json");
            let ours = std::fs::read_to_string(&m)
                .ok()
                .and_then(|t| serde_json::from_str::<serde_json::Value>(&t).ok())
                .is_some_and(|v| v.get("tool").and_then(|t| t.as_str()) == Some(MANIFEST_TOOL));
            if !ours {
                bail!(
                    "{} is not empty and holds no handbook build (no manifest.json from `ltb-atlas build`): choose an empty or new folder, so that no file of yours is removed",
                    out.display()
                );
            }
            // From here on the folder is not a finished build.
            std::fs::remove_file(&m).with_context(|| format!("cannot remove {}", m.display()))?;
        }
    }
    let old_pdf = out.join("handbook.pdf");
    if old_pdf.exists() {
        std::fs::remove_file(&old_pdf)
            .with_context(|| format!("cannot remove {}", old_pdf.display()))?;
    }
    for d in OWNED_DIRS {
        let p = out.join(d);
        if p.exists() {
            std::fs::remove_dir_all(&p).with_context(|| format!("cannot clear {}", p.display()))?;
        }
    }
    std::fs::create_dir_all(out).with_context(|| format!("cannot create {}", out.display()))?;
    Ok(())
}

fn step_sweep(cx: &mut Ctx<'_>) -> Result<()> {
    let s = super::sweep(cx.ls, &cx.out.join("sweep"), cx.opts, None)?;
    cx.cases = (s.cases, s.failed);
    Ok(())
}

fn step_fit(cx: &mut Ctx<'_>) -> Result<()> {
    super::fit::run(cx.ls, &cx.out.join("fit"), cx.opts)
}

fn step_check(cx: &mut Ctx<'_>) -> Result<()> {
    super::check::run(cx.ls, &cx.out.join("check"), cx.opts)
}

fn step_charts(cx: &mut Ctx<'_>) -> Result<()> {
    let src = super::chart::Sources {
        sweep: cx.out.join("sweep"),
        fit: Some(cx.out.join("fit")),
        check: Some(cx.out.join("check")),
        resistance: Some(cx.out.join("resistance")),
    };
    // The pages print the caution and caveats on every page.
    super::chart::run_with(
        cx.ls,
        &src,
        &cx.out.join("charts"),
        cx.opts,
        &super::chart::Settings { caution: false },
    )
}

/// Resistance tables when the handbook spec has a top-level `[design]`.
fn step_resistance(cx: &mut Ctx<'_>) -> Result<()> {
    let has_design = toml::from_str::<toml::Table>(&cx.ls.text)
        .map(|t| t.contains_key("design"))
        .unwrap_or(false);
    if has_design {
        super::resistance::run(cx.ls, &cx.out.join("resistance"), cx.opts)?;
    }
    Ok(())
}

/// Print tables of one family: the sweep's print tables (values already
/// rounded down) with every "not-ok" cell replaced by the case's status
/// from the family CSV (no-buckling, not-converged, error).
pub fn family_tables(
    f: &Family,
    sweep_dir: &Path,
    hb: &Handbook,
    spec_hash: &str,
) -> Result<Vec<PrintTable>> {
    let ka = f.axes.iter().position(|a| matches!(a, Axis::Kappa(_)));
    let za = f.axes.iter().position(|a| matches!(a, Axis::Zeta(_)));
    let (Some(ka), Some(za)) = (ka, za) else {
        return Ok(Vec::new());
    };
    let csv_path = sweep_dir.join(format!("{}.csv", f.name));
    let text = std::fs::read_to_string(&csv_path)
        .with_context(|| format!("cannot read {}", csv_path.display()))?;
    let (head, rows) = diff::read_csv(&text).map_err(|e| anyhow!("{}: {e}", csv_path.display()))?;
    let sc = head
        .iter()
        .position(|c| c == "status")
        .ok_or_else(|| anyhow!("{}: no status column", csv_path.display()))?;
    anyhow::ensure!(
        rows.len() == f.size(),
        "{}: {} rows for {} grid points",
        csv_path.display(),
        rows.len(),
        f.size()
    );
    let lens: Vec<usize> = f.axes.iter().map(Axis::len).collect();
    let mut out = Vec::new();
    for combo in combinations(f) {
        let name = format!("{}.{}.table.csv", f.name, combo.name);
        let p = sweep_dir.join(&name);
        let t =
            std::fs::read_to_string(&p).with_context(|| format!("cannot read {}", p.display()))?;
        let (th, trows) = diff::read_csv(&t).map_err(|e| anyhow!("{}: {e}", p.display()))?;
        let mut b = String::new();
        b.push_str(&format!("# {}\n", crate::CAUTION));
        for c in pages::PAGE_CAUTIONS {
            b.push_str(&format!("# {c}\n"));
        }
        b.push_str(&format!(
            "# {} — family {} ({}); ltb-atlas {}; spec sha256 {spec_hash}\n",
            hb.title,
            f.name,
            if combo.labels.is_empty() {
                "all cases".to_string()
            } else {
                combo
                    .labels
                    .iter()
                    .map(|(c, v)| format!("{c} = {v}"))
                    .collect::<Vec<_>>()
                    .join(", ")
            },
            env!("CARGO_PKG_VERSION")
        ));
        b.push_str(&format!(
            "# mu_cr = Mcr*L/sqrt(E*Iz*G*It), dimensionless (the same in SI and US units; Mcr = mu_cr*sqrt(E*Iz*G*It)/L in {} with E, G in {}, Iz, It in {}^4 and L in {}, converted consistently); kappa down, zeta across; values rounded down to the digits the error estimate supports; no-buckling = LTB does not govern in this load direction (never unlimited resistance); not-converged / error = no reliable value\n",
            hb.units.moment(),
            hb.units.stress(),
            hb.units.dim(),
            hb.units.length()
        ));
        b.push_str(&th.join(","));
        b.push('\n');
        for (ki, r) in trows.iter().enumerate() {
            let mut line = vec![r[0].clone()];
            for (zi, cell) in r.iter().enumerate().skip(1) {
                if cell != "not-ok" {
                    line.push(cell.clone());
                    continue;
                }
                let mut idx = combo.index.clone();
                idx[ka] = ki;
                idx[za] = zi - 1;
                let i = idx.iter().zip(&lens).fold(0, |acc, (i, n)| acc * n + i);
                let st = rows[i][sc].as_str();
                line.push(if st.starts_with("error") {
                    "error".into()
                } else {
                    st.to_string()
                });
            }
            b.push_str(&line.join(","));
            b.push('\n');
        }
        out.push(PrintTable {
            labels: combo.labels.clone(),
            name: format!("{}.{}.csv", f.name, combo.name),
            bytes: b.into_bytes(),
        });
    }
    Ok(out)
}

/// One print table of a family.
#[derive(Debug, Clone)]
pub struct PrintTable {
    /// The combination's labels (column, value as written).
    pub labels: Vec<(String, String)>,
    /// File name under `DIR/tables/`.
    pub name: String,
    /// Contents.
    pub bytes: Vec<u8>,
}

/// The κ band: κ of each band section at lengths from `from` to `to` (print units).
pub fn band_csv(hb: &Handbook) -> String {
    let u = hb.units;
    let mut s = format!("# {}\n", crate::CAUTION);
    s.push_str(&format!(
        "# kappa = (pi/L)*sqrt(E*Iw/(G*It)) with E = {} MPa, G = {} MPa, section properties from the dimensions (fillets included); kappa rounded down to 3 decimals; length in {}\n",
        crate::handbook::E_MPA,
        crate::handbook::G_MPA,
        u.length()
    ));
    for c in &hb.band.sections {
        s.push_str(&format!("# {}: {}\n", c.name, c.source));
    }
    let mut head = vec![format!("length_{}", u.length())];
    head.extend(hb.band.sections.iter().map(|c| c.name.to_string()));
    s.push_str(&head.join(","));
    s.push('\n');
    let n = 45;
    let props: Vec<_> = hb.band.sections.iter().map(|c| c.properties()).collect();
    for i in 0..=n {
        // Geometric spacing: κ varies as 1/L.
        let l = hb.band.from * (hb.band.to / hb.band.from).powf(i as f64 / n as f64);
        let l = if i == n { hb.band.to } else { l };
        let mut row = vec![crate::handbook::units::near(l, 3)];
        let l_print: f64 = row[0].parse().expect("formatted");
        for p in &props {
            let c = convert(
                p,
                u.length_to_m(l_print) * 1000.0,
                crate::handbook::E_MPA,
                crate::handbook::G_MPA,
            );
            row.push(crate::handbook::units::down(c.kappa, 3));
        }
        s.push_str(&row.join(","));
        s.push('\n');
    }
    s
}

/// Families the handbook prints tables of, with their page.
fn table_families<'a>(cx: &'a Ctx<'_>) -> Vec<&'a Family> {
    cx.hb
        .families
        .iter()
        .filter(|p| p.tables)
        .filter_map(|p| cx.ls.spec.families.iter().find(|f| f.name == p.name))
        .collect()
}

fn step_tables(cx: &mut Ctx<'_>) -> Result<()> {
    let dir = cx.out.join("tables");
    for f in table_families(cx) {
        for t in family_tables(f, &cx.out.join("sweep"), cx.hb, &cx.ls.hash)? {
            write_atomic(&dir.join(t.name), &t.bytes)?;
        }
    }
    write_atomic(&dir.join("kappa-length.csv"), band_csv(cx.hb).as_bytes())
}

fn step_fonts(cx: &mut Ctx<'_>) -> Result<()> {
    for (name, bytes) in FONTS {
        write_atomic(&cx.out.join("fonts").join(name), bytes)?;
    }
    Ok(())
}

fn read_json(p: &Path) -> Result<serde_json::Value> {
    let t = std::fs::read_to_string(p).with_context(|| format!("cannot read {}", p.display()))?;
    serde_json::from_str(&t).with_context(|| format!("{} is not valid JSON", p.display()))
}

/// Sorted file names in `dir` ending with `suffix` (none when it is absent).
fn files_ending(dir: &Path, suffix: &str) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .map(|rd| {
            rd.flatten()
                .filter_map(|e| e.file_name().to_str().map(String::from))
                .filter(|n| n.ends_with(suffix) && !n.starts_with('.'))
                .collect()
        })
        .unwrap_or_default();
    v.sort();
    v
}

/// Everything the pages need, read from the build folder by the stages'
/// file contracts.
pub fn page_inputs<'a>(cx: &'a Ctx<'_>) -> Result<Inputs<'a>> {
    let mut tables = Vec::new();
    for f in table_families(cx) {
        for t in family_tables(f, &cx.out.join("sweep"), cx.hb, &cx.ls.hash)? {
            tables.push(pages::TableRef {
                family: f.name.clone(),
                labels: t.labels,
                path: format!("/tables/{}", t.name),
            });
        }
    }
    let mut fits = Vec::new();
    for n in files_ending(&cx.out.join("fit"), ".fit.json") {
        fits.push((
            format!("/fit/{n}"),
            read_json(&cx.out.join("fit").join(&n))?,
        ));
    }
    let rp = cx.out.join("check").join("rules-summary.json");
    let rules = if rp.exists() {
        Some(read_json(&rp)?)
    } else {
        None
    };
    let ip = cx.out.join("charts").join("index.json");
    let charts = if ip.exists() {
        Some(read_json(&ip)?)
    } else {
        None
    };
    let rdir = cx.out.join("resistance");
    let mut resistance = Vec::new();
    if rdir.is_dir() {
        let mut names: Vec<String> = std::fs::read_dir(&rdir)?
            .filter_map(|e| e.ok()?.file_name().into_string().ok())
            .filter(|n| n.ends_with(".table.csv"))
            .collect();
        names.sort();
        for n in names {
            let text = std::fs::read_to_string(rdir.join(&n))?;
            resistance.push((n, text));
        }
    }
    Ok(Inputs {
        handbook: cx.hb,
        spec: &cx.ls.spec,
        version: env!("CARGO_PKG_VERSION"),
        spec_hash: &cx.ls.hash,
        tolerance: cx.opts.tolerance,
        date: cx.date.to_string(),
        tables,
        band_csv: "/tables/kappa-length.csv".into(),
        fits,
        rules,
        charts,
        resistance,
    })
}

fn step_pages(cx: &mut Ctx<'_>) -> Result<()> {
    let inp = page_inputs(cx)?;
    for (name, text) in pages::sources(&inp) {
        write_atomic(&cx.out.join("pages").join(name), text.as_bytes())?;
    }
    Ok(())
}

fn on_path(name: &str) -> Option<PathBuf> {
    let path = std::env::var_os("PATH")?;
    std::env::split_paths(&path)
        .map(|d| d.join(name))
        .find(|p| p.is_file())
}

/// The typst binary: `--typst`, else `TYPST_BIN`, else `typst` on PATH,
/// reporting version 0.15.1. The error says how to get it.
pub fn find_typst(flag: Option<&Path>) -> std::result::Result<PathBuf, String> {
    let fix = format!(
        "install typst {TYPST_VERSION} with `scripts/install-typst` (it puts the binary in ~/.cache/ltb-atlas-tools/bin) and pass --typst PATH or set TYPST_BIN=PATH; every other output (CSV, typst sources) is written"
    );
    let (bin, from) = match (flag, std::env::var_os("TYPST_BIN")) {
        (Some(p), _) => (p.to_path_buf(), "--typst"),
        (None, Some(p)) if !p.is_empty() => (PathBuf::from(p), "TYPST_BIN"),
        _ => match on_path("typst") {
            Some(p) => (p, "PATH"),
            None => {
                return Err(format!(
                    "typst not found (no --typst, no TYPST_BIN, no typst on PATH): {fix}"
                ));
            }
        },
    };
    let out = Command::new(&bin).arg("--version").output().map_err(|e| {
        format!(
            "typst from {from} ({}) does not run: {e}; {fix}",
            bin.display()
        )
    })?;
    let v = String::from_utf8_lossy(&out.stdout);
    let version = v.split_whitespace().nth(1).unwrap_or("");
    if !out.status.success() || version != TYPST_VERSION {
        return Err(format!(
            "typst from {from} ({}) reports \"{}\", not {TYPST_VERSION} (the pinned version: output changes between versions); {fix}",
            bin.display(),
            v.trim()
        ));
    }
    Ok(bin)
}

/// Typeset `DIR/pages/main.typ` into `pdf`: no system fonts, the embedded
/// fonts, root at the build folder, the edition date as creation time.
fn compile(typst: &Path, out: &Path, pdf: &Path, date: Date) -> Result<()> {
    let tmp = out.join(format!("{}handbook.pdf", crate::sweep::run::TMP_PREFIX));
    let o = Command::new(typst)
        .arg("compile")
        .arg("--root")
        .arg(out)
        .arg("--font-path")
        .arg(out.join("fonts"))
        .arg("--ignore-system-fonts")
        .arg("--creation-timestamp")
        .arg(date.epoch().to_string())
        .arg("--diagnostic-format")
        .arg("short")
        .arg(out.join("pages").join("main.typ"))
        .arg(&tmp)
        .env_remove("SOURCE_DATE_EPOCH")
        .output()
        .with_context(|| format!("cannot run {}", typst.display()))?;
    if !o.status.success() {
        let _ = std::fs::remove_file(&tmp);
        bail!(
            "typst could not typeset {}:\n{}",
            out.join("pages/main.typ").display(),
            String::from_utf8_lossy(&o.stderr).trim()
        );
    }
    std::fs::rename(&tmp, pdf).with_context(|| format!("cannot write {}", pdf.display()))?;
    Ok(())
}

/// Every file under `dir`, as '/'-separated relative paths, sorted.
pub fn walk(dir: &Path) -> Result<Vec<String>> {
    fn go(base: &Path, d: &Path, out: &mut Vec<String>) -> Result<()> {
        for e in std::fs::read_dir(d).with_context(|| format!("cannot read {}", d.display()))? {
            let e = e?;
            let p = e.path();
            if e.file_type()?.is_dir() {
                go(base, &p, out)?;
            } else {
                let rel = p.strip_prefix(base).expect("under base");
                out.push(
                    rel.components()
                        .map(|c| c.as_os_str().to_string_lossy().into_owned())
                        .collect::<Vec<_>>()
                        .join("/"),
                );
            }
        }
        Ok(())
    }
    let mut out = Vec::new();
    if dir.exists() {
        go(dir, dir, &mut out)?;
    }
    out.sort();
    Ok(out)
}

/// The files this build wrote: everything in its folders plus the PDF.
fn owned_files(out: &Path) -> Result<BTreeSet<String>> {
    let mut s = BTreeSet::new();
    for d in OWNED_DIRS {
        for f in walk(&out.join(d))? {
            s.insert(format!("{d}/{f}"));
        }
    }
    if out.join("handbook.pdf").exists() {
        s.insert("handbook.pdf".into());
    }
    Ok(s)
}

/// Remove files in `out` this build does not own (an older spec's PDF, a
/// stray file); the folder was checked to be a build folder first.
fn remove_unowned(out: &Path, owned: &BTreeSet<String>) -> Result<()> {
    for f in walk(out)? {
        if !owned.contains(&f) && f != "manifest.json" {
            let p = out.join(&f);
            std::fs::remove_file(&p)
                .with_context(|| format!("cannot remove the stale {}", p.display()))?;
        }
    }
    // Empty folders left behind.
    if let Ok(rd) = std::fs::read_dir(out) {
        for e in rd.flatten() {
            let p = e.path();
            if p.is_dir()
                && std::fs::read_dir(&p)
                    .map(|mut r| r.next().is_none())
                    .unwrap_or(false)
            {
                let _ = std::fs::remove_dir(&p);
            }
        }
    }
    Ok(())
}

fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

fn write_manifest(cx: &Ctx<'_>, owned: &BTreeSet<String>, pdf: bool) -> Result<usize> {
    let mut files = Vec::new();
    for f in owned {
        let bytes = std::fs::read(cx.out.join(f)).with_context(|| format!("cannot read {f}"))?;
        files.push(serde_json::json!({"path": f, "sha256": sha256_hex(&bytes)}));
    }
    let m = serde_json::json!({
        "tool": MANIFEST_TOOL,
        "version": env!("CARGO_PKG_VERSION"),
        "caution": crate::CAUTION,
        "spec_sha256": cx.ls.hash,
        "solver_tolerance": cx.opts.tolerance,
        "date": cx.date.to_string(),
        "units": cx.hb.units.name(),
        "typst": TYPST_VERSION,
        "pdf": pdf,
        "files": files,
    });
    let mut b = serde_json::to_vec_pretty(&m)?;
    b.push(b'\n');
    write_atomic(&cx.out.join("manifest.json"), &b)?;
    Ok(owned.len() + 1)
}

/// Compare two build folders: print tables, fits and rule checks. Returns
/// the changes in a deterministic order (files sorted, then rows).
pub fn diff_builds(old: &Path, new: &Path, tol: f64) -> Result<Vec<Change>> {
    anyhow::ensure!(
        tol >= 0.0 && tol.is_finite(),
        "--tolerance must be 0 or more, got {tol}"
    );
    for d in [old, new] {
        anyhow::ensure!(
            d.join("manifest.json").exists() || d.join("tables").exists(),
            "{} is not a handbook build folder (no manifest.json, no tables/)",
            d.display()
        );
    }
    let mut out = Vec::new();
    let pick = |dir: &Path, sub: &str, suffix: &str, skip: &str| -> Vec<String> {
        files_ending(&dir.join(sub), suffix)
            .into_iter()
            .filter(|n| skip.is_empty() || !n.ends_with(skip))
            .collect()
    };
    for (sub, suffix, skip) in [
        ("tables", ".csv", ""),
        ("fit", ".fit.json", ""),
        ("check", ".csv", ".frontier.csv"),
    ] {
        let a: BTreeSet<String> = pick(old, sub, suffix, skip).into_iter().collect();
        let b: BTreeSet<String> = pick(new, sub, suffix, skip).into_iter().collect();
        for n in a.union(&b) {
            let rel = format!("{sub}/{n}");
            let (pa, pb) = (old.join(sub).join(n), new.join(sub).join(n));
            match (a.contains(n), b.contains(n)) {
                (true, false) => out.push(file_change(&rel, "file removed")),
                (false, true) => out.push(file_change(&rel, "file added")),
                _ => {
                    let (ta, tb) = (
                        std::fs::read_to_string(&pa)
                            .with_context(|| format!("cannot read {}", pa.display()))?,
                        std::fs::read_to_string(&pb)
                            .with_context(|| format!("cannot read {}", pb.display()))?,
                    );
                    let ch = match sub {
                        "tables" => {
                            diff::diff_table(&rel, &ta, &tb, tol).map_err(|e| anyhow!(e))?
                        }
                        "fit" => diff::diff_fit(
                            &rel,
                            &serde_json::from_str(&ta)
                                .with_context(|| format!("{} is not JSON", pa.display()))?,
                            &serde_json::from_str(&tb)
                                .with_context(|| format!("{} is not JSON", pb.display()))?,
                            tol,
                        ),
                        _ => diff::diff_check(&rel, &ta, &tb, tol).map_err(|e| anyhow!(e))?,
                    };
                    out.extend(ch);
                }
            }
        }
    }
    Ok(out)
}

fn file_change(rel: &str, note: &str) -> Change {
    Change {
        kind: "file",
        file: rel.to_string(),
        row: String::new(),
        column: String::new(),
        old: String::new(),
        new: String::new(),
        note: note.to_string(),
    }
}

/// The readable diff report.
pub fn diff_report(old: &Path, new: &Path, changes: &[Change], tol: f64) -> String {
    let mut s = format!(
        "ltb-atlas diff {} → {} (tolerance {})\n{}\n\n",
        old.display(),
        new.display(),
        crate::sweep::fmt_num(tol),
        crate::CAUTION
    );
    let flips: Vec<&Change> = changes
        .iter()
        .filter(|c| c.kind == "verdict" && c.note.starts_with("FLIPPED"))
        .collect();
    let count = |k: &str| changes.iter().filter(|c| c.kind == k).count();
    s.push_str(&format!(
        "{} table cells moved, {} fit values changed, {} rule verdicts changed ({} conservative → unconservative), {} ratios moved, {} rows and {} files added or removed\n",
        count("table-cell"),
        count("fit"),
        count("verdict"),
        flips.len(),
        count("ratio"),
        count("row"),
        count("file")
    ));
    if !flips.is_empty() {
        s.push_str("\nVERDICTS NOW UNCONSERVATIVE:\n");
        for c in &flips {
            s.push_str(&format!("  {}  {}\n", c.file, c.row));
        }
    }
    let mut last = String::new();
    for c in changes {
        if c.file != last {
            s.push_str(&format!("\n{}\n", c.file));
            last = c.file.clone();
        }
        let place = match (c.row.is_empty(), c.column.is_empty()) {
            (false, false) => format!("{} / {}", c.row, c.column),
            (false, true) => c.row.clone(),
            (true, false) => c.column.clone(),
            _ => String::new(),
        };
        s.push_str(&format!(
            "  [{}] {place}: {} → {} ({})\n",
            c.kind,
            show(&c.old),
            show(&c.new),
            c.note
        ));
    }
    if changes.is_empty() {
        s.push_str("no differences\n");
    }
    s
}

fn show(t: &str) -> &str {
    if t.is_empty() { "(none)" } else { t }
}

/// The diff as CSV (header [`diff::CSV_HEADER`]).
pub fn diff_csv(changes: &[Change]) -> Result<Vec<u8>> {
    let mut b = Vec::new();
    b.extend_from_slice(format!("# {}\n", crate::CAUTION).as_bytes());
    {
        let mut w = csv::Writer::from_writer(&mut b);
        w.write_record(diff::CSV_HEADER)?;
        for c in changes {
            w.write_record([c.kind, &c.file, &c.row, &c.column, &c.old, &c.new, &c.note])?;
        }
        w.flush()?;
    }
    Ok(b)
}

/// The starter handbook spec `init` writes.
pub const STARTER: &str = include_str!("../../templates/handbook/starter.toml");

/// Write the starter spec into `dir/handbook.toml` (never over an existing file).
pub fn init(dir: &Path) -> Result<PathBuf> {
    let p = dir.join("handbook.toml");
    anyhow::ensure!(
        !p.exists(),
        "{} exists already: choose another folder or move the file away",
        p.display()
    );
    write_atomic(&p, STARTER.as_bytes())?;
    Ok(p)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::handbook::parse_handbook;
    use crate::sweep::spec::parse_spec;

    #[test]
    fn not_ok_cells_of_print_tables_name_the_case_status() {
        // TEST DATA: a hand-made sweep folder in the sweep stage's formats
        // (family CSV with a status column in grid order, print table with
        // "not-ok" cells); values invented.
        let text = "[[family]]\nname = \"f\"\nkappa = [0.5, 1.0]\nzeta = [0.0, 1.0]\n[family.case]\nstart = { preset = \"fork\" }\nend = { preset = \"fork\" }\n[[family.case.load]]\nkind = \"uniform\"\n[handbook]\ntitle = \"T\"\noffice = \"O\"\nedition = \"1\"\n";
        let spec = parse_spec(text, "t.toml", Path::new(".")).unwrap();
        let hb = parse_handbook(text, "t.toml", &spec).unwrap();
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(
            dir.path().join("f.csv"),
            "# c\nkappa,zeta,direction,mu_cr,mu_ratio,le_over_l,load_factor,error_estimate,elements,status\n\
             0.5,0,down,3.5,1,1,1,1e-5,8,ok\n0.5,1,down,,,,,,8,no-buckling\n1,0,down,4.4,1,1,1,1e-5,8,ok\n1,1,down,,,,,,8,error: singular\n",
        )
        .unwrap();
        std::fs::write(
            dir.path().join("f.all.table.csv"),
            "# c\nkappa,zeta=0,zeta=1\n0.5,3.49,not-ok\n1,4.39,not-ok\n",
        )
        .unwrap();
        let t = family_tables(&spec.families[0], dir.path(), &hb, "h").unwrap();
        assert_eq!(t.len(), 1);
        assert_eq!(t[0].name, "f.all.csv");
        let s = String::from_utf8(t[0].bytes.clone()).unwrap();
        assert!(
            s.ends_with("kappa,zeta=0,zeta=1\n0.5,3.49,no-buckling\n1,4.39,error\n"),
            "{s}"
        );
        assert!(s.starts_with(&format!("# {}", crate::CAUTION)));
    }

    #[test]
    fn the_band_lists_kappa_falling_with_length() {
        let text = "[[family]]\nname = \"f\"\nkappa = [0.5]\n[family.case]\nstart = { preset = \"fork\" }\nend = { preset = \"fork\" }\n[[family.case.load]]\nkind = \"uniform\"\n[handbook]\ntitle = \"T\"\noffice = \"O\"\nedition = \"1\"\nunits = \"US\"\n[handbook.band]\nsections = [\"IPE 300\"]\nfrom = 5.0\nto = 20.0\n";
        let spec = parse_spec(text, "t.toml", Path::new(".")).unwrap();
        let hb = parse_handbook(text, "t.toml", &spec).unwrap();
        let b = band_csv(&hb);
        let rows: Vec<Vec<f64>> = b
            .lines()
            .filter(|l| !l.starts_with('#') && !l.starts_with("length"))
            .map(|l| l.split(',').map(|x| x.parse().unwrap()).collect())
            .collect();
        assert!(b.contains("length_ft,IPE 300"));
        assert_eq!(rows.first().unwrap()[0], 5.0);
        assert_eq!(rows.last().unwrap()[0], 20.0);
        // κ·L is a section constant: π·√(E·Iw/(G·It)) = π·1281 mm for IPE 300
        // with the [OB-UK] table's Iw = 0.126 dm⁶ and It = 19.9 cm⁴ (hand
        // calculation; 1 % for the table's 3 figures); 5 ft = 1524 mm.
        let k = rows[0][1];
        assert!(
            (k * 1524.0 - std::f64::consts::PI * 1281.2).abs() / (std::f64::consts::PI * 1281.2)
                < 0.01,
            "{k}"
        );
        assert!(rows.windows(2).all(|w| w[1][1] <= w[0][1]));
    }
}

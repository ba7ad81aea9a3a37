//! The resistance stage: design buckling resistance moment against unbraced
//! length per section, load case, load height and grade, from the engine's
//! Mcr. Reads the top-level `[design]` table of a spec (a resistance spec of
//! its own, or a sweep/handbook spec holding one), solves through the cache
//! in parallel, and writes `DIR/<name>.csv` (machine table) and
//! `DIR/<name>.<case>.<grade>.<height>.table.csv` (print tables, rounded
//! down), every file with the caution and its assumptions.

use super::{LoadedSpec, Options, progress_bar, solve_points, write_atomic};
use crate::DESIGN_CAUTION;
use crate::case::schema::Tab;
use crate::case::span::Source;
use crate::case::units::{HEIGHT_NAMES, parse_length, unit_list};
use crate::case::{CaseKind, ResolvedCase, parse_case};
use crate::report::case_summary;
use crate::resistance::catalogue::{self, Entry};
use crate::resistance::spec::{DesignTable, SPEC_KEYS, parse_design, string_list};
use crate::resistance::{
    self, Design, DesignSection, Detail, Outcome, assumptions, yield_strength,
};
use crate::sweep::spec::{Spec, TOP_KEYS};
use crate::sweep::{CAVEATS, Point, fmt_num, safe_name};
use anyhow::{Context, Result, anyhow, bail};
use std::fmt::Write as _;
use std::path::Path;
use toml::de::{DeTable, DeValue};

/// Load a resistance spec that may hold no `[[family]]` (a `[design]` table
/// only); a spec with families is loaded as a sweep spec.
pub fn load(path: &Path) -> Result<LoadedSpec> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read the spec {}", path.display()))?;
    if text
        .lines()
        .any(|l| l.trim_start().starts_with("[[family]]"))
    {
        return super::load_spec(path);
    }
    use sha2::{Digest, Sha256};
    let hash: String = Sha256::digest(text.as_bytes())
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    Ok(LoadedSpec {
        path: path.to_path_buf(),
        text,
        spec: Spec {
            families: Vec::new(),
        },
        hash,
    })
}

/// One load case of the spec: its name, its table (owned, for generating
/// the solved cases) and where it is.
struct CaseTemplate {
    name: String,
    table: toml::Table,
    at: String,
}

/// The parsed resistance request.
struct Request {
    name: String,
    table: DesignTable,
    sections: Vec<Entry>,
    catalogue: Option<String>,
    grades: Vec<Option<String>>,
    lengths: Vec<f64>,
    heights: Vec<Option<String>>,
    cases: Vec<CaseTemplate>,
}

fn parse_request(ls: &LoadedSpec) -> Result<Request> {
    let origin = ls.origin();
    let src = Source {
        text: &ls.text,
        origin: &origin,
    };
    let root = DeTable::parse(&ls.text)
        .map_err(|e| anyhow!(src.error(&e.span().unwrap_or(0..0), "", e.message().to_string())))?;
    let span = 0..ls.text.len();
    let top = Tab {
        src: &src,
        path: "",
        span: &span,
        t: root.get_ref(),
    };
    top.check_keys(TOP_KEYS, &|_| None)?;
    let Some(dloc) = top.table("design")? else {
        bail!(
            "{origin}: the spec has no [design] table; a resistance spec gives [design] with code, sections, grades, lengths and [[design.case]] tables (see README)"
        );
    };
    let t = dloc.tab(&src);
    let table = parse_design(&t, SPEC_KEYS)?;
    let name = match t.string("name")? {
        Some((n, _)) => {
            if n.is_empty()
                || !n
                    .chars()
                    .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
            {
                return Err(t
                    .err_at(
                        "name",
                        "use lower-case letters, digits and '-' (it becomes the file name)",
                    )
                    .into());
            }
            n
        }
        None => "resistance".to_owned(),
    };
    let catalogue = t.string("catalogue")?.map(|(c, _)| c);
    let user = match &catalogue {
        Some(c) => {
            catalogue::load(&ls.dir().join(c)).map_err(|e| t.err_at("catalogue", e.to_string()))?
        }
        None => Vec::new(),
    };
    let Some(names) = string_list(&t, "sections")? else {
        return Err(t.err_here("missing `sections`: a list of catalogue names, for example [\"IPE 300\", \"HEA 300\"]").into());
    };
    let mut sections = Vec::new();
    for (n, sp) in names {
        let e = catalogue::lookup(&n, &user).map_err(|m| src.error(&sp, &t.key("sections"), m))?;
        sections.push(e);
    }
    let grades: Vec<Option<String>> = match string_list(&t, "grades")? {
        Some(g) => {
            if table.design.grade.is_some() || table.design.fy.is_some() {
                return Err(t
                    .err_at("grades", "give either `grades` or `grade`/`fy`, not both")
                    .into());
            }
            // Check each grade against each section now (located).
            for (g, sp) in &g {
                for e in &sections {
                    let ds =
                        DesignSection::from_entry(e).map_err(|m| anyhow!("{}: {m}", e.origin))?;
                    let d = Design {
                        grade: Some(g.clone()),
                        ..table.design.clone()
                    };
                    yield_strength(&d, &ds)
                        .map_err(|m| src.error(sp, &t.key("grades"), format!("{}: {m}", e.name)))?;
                }
            }
            g.into_iter().map(|(g, _)| Some(g)).collect()
        }
        None => {
            if table.design.grade.is_none() && table.design.fy.is_none() {
                return Err(t.err_here("give `grades` (a list such as [\"S235\", \"S355\"]), `grade` or `fy` in MPa").into());
            }
            vec![None]
        }
    };
    let lengths = parse_lengths(&t)?;
    let heights: Vec<Option<String>> = match string_list(&t, "load_heights")? {
        Some(h) => {
            for (x, sp) in &h {
                if !HEIGHT_NAMES.contains(&x.as_str()) && parse_length(x).is_err() {
                    return Err(src
                        .error(sp, &t.key("load_heights"), format!(
                            "unknown load height \"{x}\"; use {} or a length such as \"120 mm\" ({})",
                            HEIGHT_NAMES.join(", "),
                            unit_list()
                        ))
                        .into());
                }
            }
            h.into_iter().map(|(x, _)| Some(x)).collect()
        }
        None => vec![None],
    };
    // Load cases.
    let locs = t.tables("case")?;
    if locs.is_empty() {
        return Err(t.err_here("missing [[design.case]]: at least one load case (loads, supports, restraints; no length or section)").into());
    }
    let owned: toml::Table =
        toml::from_str(&ls.text).with_context(|| format!("{origin}: cannot read the spec"))?;
    let arr = owned
        .get("design")
        .and_then(|d| d.get("case"))
        .and_then(|c| c.as_array())
        .ok_or_else(|| anyhow!("{origin}: [[design.case]] must be an array of tables"))?;
    let mut cases = Vec::new();
    for (i, loc) in locs.iter().enumerate() {
        let ct = loc.tab(&src);
        let Some((cname, _)) = ct.string("name")? else {
            return Err(ct
                .err_here("missing `name` for this load case (lower-case letters, digits, '-')")
                .into());
        };
        if cname.is_empty()
            || !cname
                .chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
        {
            return Err(ct
                .err_at(
                    "name",
                    "use lower-case letters, digits and '-' (it becomes part of file names)",
                )
                .into());
        }
        if cases.iter().any(|c: &CaseTemplate| c.name == cname) {
            return Err(ct
                .err_at("name", format!("load case \"{cname}\" appears twice"))
                .into());
        }
        for k in ["length", "section", "kappa", "design"] {
            if ct.get(k).is_some() {
                return Err(ct
                    .err_at(k, format!("`{k}` is set by the resistance table (sections × lengths); remove it from the load case"))
                    .into());
            }
        }
        let mut table = arr[i]
            .as_table()
            .cloned()
            .ok_or_else(|| anyhow!("{origin}: design.case[{i}] must be a table"))?;
        table.remove("name");
        let (line, col) = src.line_col(loc.span.start);
        cases.push(CaseTemplate {
            name: cname,
            table,
            at: format!("{origin}:{line}:{col}: design.case[{i}]"),
        });
    }
    Ok(Request {
        name,
        table,
        sections,
        catalogue,
        grades,
        lengths,
        heights,
        cases,
    })
}

/// `lengths`: a list of numbers (m) or strings with units, or a range
/// `{ from, to, count }` in m.
fn parse_lengths(t: &Tab<'_>) -> Result<Vec<f64>> {
    let Some(v) = t.get("lengths") else {
        return Err(t.err_here("missing `lengths`: a list such as [2, 4, 6] (m) or [\"6 m\", \"20 ft\"], or { from = 1, to = 12, count = 12 } (m)").into());
    };
    let mut out = Vec::new();
    match v.v {
        DeValue::Array(a) => {
            for x in a.iter() {
                let l = match x.get_ref() {
                    DeValue::Integer(_) | DeValue::Float(_) => {
                        crate::case::schema::number(
                            t.src,
                            &crate::case::schema::Val {
                                name: "lengths".into(),
                                key: v.key.clone(),
                                key_span: v.key_span.clone(),
                                span: x.span(),
                                v: x.get_ref(),
                            },
                            " (m)",
                        )?
                        .value
                    }
                    DeValue::String(s) => {
                        parse_length(s).map_err(|m| t.src.error(&x.span(), &v.key, m))?
                    }
                    _ => {
                        return Err(t
                            .src
                            .error(
                                &x.span(),
                                &v.key,
                                "a length is a number (m) or a string with a unit",
                            )
                            .into());
                    }
                };
                if !(l > 0.0) {
                    return Err(t
                        .src
                        .error(&x.span(), &v.key, "lengths must be greater than 0")
                        .into());
                }
                out.push(l);
            }
        }
        DeValue::Table(_) => {
            let r = t.table("lengths")?.expect("a table");
            let rt = r.tab(t.src);
            rt.check_keys(&["from", "to", "count"], &|_| None)?;
            let from = rt
                .num_min("from", None, true, "from (m)")?
                .ok_or_else(|| rt.err_here("missing `from` (m)"))?
                .value;
            let to = rt
                .num_min("to", None, true, "to (m)")?
                .ok_or_else(|| rt.err_here("missing `to` (m)"))?
                .value;
            let count = rt
                .num_min("count", None, true, "count")?
                .ok_or_else(|| rt.err_here("missing `count`"))?;
            let n = count.value as usize;
            if count.value.fract() != 0.0 || n < 2 || to <= from {
                return Err(rt
                    .err_here("give from < to and an integer count ≥ 2")
                    .into());
            }
            for k in 0..n {
                out.push(from + (to - from) * k as f64 / (n - 1) as f64);
            }
        }
        _ => {
            return Err(t
                .err_at("lengths", "expected a list or a { from, to, count } table")
                .into());
        }
    }
    if out.is_empty() {
        return Err(t.err_at("lengths", "give at least one length").into());
    }
    for w in out.windows(2) {
        if w[1] <= w[0] {
            return Err(t.err_at("lengths", "lengths must increase").into());
        }
    }
    Ok(out)
}

/// The case solved for one section, length and load height.
fn build_case(
    rq: &Request,
    c: &CaseTemplate,
    sec: &Entry,
    length: f64,
    height: &Option<String>,
    origin: &str,
) -> Result<ResolvedCase> {
    let mut t = c.table.clone();
    t.insert(
        "length".into(),
        toml::Value::String(format!("{} m", fmt_num(length))),
    );
    let mut s = toml::Table::new();
    s.insert("name".into(), toml::Value::String(sec.name.clone()));
    if let Some(cat) = &rq.catalogue {
        s.insert("catalogue".into(), toml::Value::String(cat.clone()));
    }
    t.insert("section".into(), toml::Value::Table(s));
    if let Some(h) = height
        && let Some(toml::Value::Array(loads)) = t.get_mut("load")
    {
        for l in loads.iter_mut() {
            if let Some(lt) = l.as_table_mut()
                && lt.get("kind").and_then(|k| k.as_str()) != Some("end-moments")
            {
                lt.insert("height".into(), toml::Value::String(h.clone()));
            }
        }
    }
    let text = toml::to_string(&t).context("cannot build the case")?;
    parse_case(&text, origin).map_err(|e| {
        anyhow!(
            "{} (section {}, L = {} m, load height {}): {}{}",
            c.at,
            sec.name,
            fmt_num(length),
            height.as_deref().unwrap_or("as given"),
            if e.key.is_empty() {
                String::new()
            } else {
                format!("{}: ", e.key)
            },
            e.message
        )
    })
}

/// Floor to three significant figures (whole kN·m from 100 up), never NaN.
fn floor_sig(x: f64) -> String {
    if !(x > 0.0) || !x.is_finite() {
        return String::new();
    }
    let mag = x.log10().floor() as i32;
    let dec = (2 - mag).max(0);
    let step = 10f64.powi(-dec);
    let v = (x / step).floor() * step;
    format!("{:.*}", dec as usize, v)
}

/// A length in m for tables: at most 4 decimals, trailing zeros dropped
/// (lengths given in ft or in are not exact in m).
fn len_str(l: f64) -> String {
    let s = format!("{l:.4}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

fn num(x: f64, digits: usize) -> String {
    if !x.is_finite() {
        return String::new();
    }
    let s = format!("{x:.digits$}");
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// One computed cell.
struct Cell {
    case: usize,
    grade: usize,
    height: usize,
    section: usize,
    length: usize,
    lb: f64,
    status: String,
    outcome: Option<Outcome>,
    low: Option<Outcome>,
    error_estimate: Option<f64>,
    note: String,
}

/// Run the resistance stage (see the module doc).
pub fn run(ls: &LoadedSpec, out: &Path, opts: &Options) -> Result<()> {
    let rq = parse_request(ls)?;
    let origin = ls.origin();
    // Build every case (all errors before any solve).
    let mut cases: Vec<(usize, usize, usize, usize, ResolvedCase)> = Vec::new();
    for (ci, c) in rq.cases.iter().enumerate() {
        for (hi, h) in rq.heights.iter().enumerate() {
            for (si, s) in rq.sections.iter().enumerate() {
                for (li, l) in rq.lengths.iter().enumerate() {
                    cases.push((ci, hi, si, li, build_case(&rq, c, s, *l, h, &origin)?));
                }
            }
        }
    }
    let dsecs: Vec<DesignSection> = rq
        .sections
        .iter()
        .map(|e| DesignSection::from_entry(e).map_err(|m| anyhow!("{}: {m}", e.origin)))
        .collect::<Result<_>>()?;
    let pool = opts.pool()?;
    let settings = opts.settings();
    let mut cache = opts.open_cache()?;
    let bar = progress_bar(cases.len() as u64, opts.quiet);
    let points: Vec<Point> = cases
        .iter()
        .map(|(_, _, _, _, rc)| Point::of_member(rc.member.clone()))
        .collect();
    // In chunks, for the progress bar; every point is solved on its own, so
    // the rows do not depend on the chunking.
    let mut rows = Vec::with_capacity(points.len());
    let mut rest = points;
    while !rest.is_empty() {
        let tail = rest.split_off(rest.len().min(64));
        let n = rest.len() as u64;
        rows.extend(solve_points(rest, &settings, &pool, &mut cache)?);
        bar.inc(n);
        rest = tail;
    }
    bar.finish_and_clear();
    let mut cells = Vec::new();
    for ((ci, hi, si, li, rc), row) in cases.iter().zip(rows.iter()) {
        let CaseKind::Physical(p) = &rc.kind else {
            bail!("internal: a resistance case is not physical");
        };
        for (gi, g) in rq.grades.iter().enumerate() {
            let d = Design {
                grade: g.clone().or(rq.table.design.grade.clone()),
                ..rq.table.design.clone()
            };
            let lb = p.length * rq.table.lb_over_l;
            let mut cell = Cell {
                case: *ci,
                grade: gi,
                height: *hi,
                section: *si,
                length: *li,
                lb,
                status: row.status.clone(),
                outcome: None,
                low: None,
                error_estimate: row.error_estimate,
                note: String::new(),
            };
            let mcr = match (row.status.as_str(), row.mu_cr) {
                ("ok", Some(mu)) => Some(mu * rc.scales.moment),
                ("no-buckling", _) => {
                    cell.note =
                        "no lateral–torsional buckling for these loads: plateau value".into();
                    Some(f64::INFINITY)
                }
                _ => None,
            };
            if let Some(mcr) = mcr {
                let e_est = row.error_estimate.unwrap_or(0.0);
                match resistance::evaluate(&d, &dsecs[*si], lb, mcr, p.e) {
                    Ok(o) => {
                        cell.low =
                            resistance::evaluate(&d, &dsecs[*si], lb, mcr * (1.0 - e_est), p.e)
                                .ok();
                        cell.outcome = Some(o);
                    }
                    Err(m) => {
                        cell.status = "outside-scope".into();
                        cell.note = m;
                    }
                }
            }
            cells.push(cell);
        }
    }
    // Order: case, grade, height, section, length.
    cells.sort_by_key(|c| (c.case, c.grade, c.height, c.section, c.length));
    // E and G of each load case (from its [material]; the same for every section and length).
    let materials: Vec<(f64, f64)> = (0..rq.cases.len())
        .map(|ci| {
            cases
                .iter()
                .find(|x| x.0 == ci)
                .and_then(|x| match &x.4.kind {
                    CaseKind::Physical(p) => Some((p.e, p.g)),
                    CaseKind::Dimensionless => None,
                })
                .unwrap_or((f64::NAN, f64::NAN))
        })
        .collect();
    // A cantilever's root warping condition (domain notes: stated with every result).
    let roots: Vec<String> = (0..rq.cases.len())
        .map(|ci| {
            cases
                .iter()
                .find(|x| x.0 == ci)
                .and_then(|x| crate::report::root_warping(&x.4.member))
                .map(|(end, w)| {
                    let state = if w.is_fixed() {
                        "fixed"
                    } else if w.is_free() {
                        "free"
                    } else {
                        "sprung"
                    };
                    format!("; cantilever root ({end}) warping {state}")
                })
                .unwrap_or_default()
        })
        .collect();
    let files = write_tables(&rq, &dsecs, &cells, ls, &materials, &roots)?;
    for (name, bytes) in &files {
        write_atomic(&out.join(name), bytes)?;
    }
    if !opts.quiet {
        eprintln!(
            "{} resistance values ({} sections × {} lengths × {} load cases × {} heights × {} grades) in {}",
            cells.len(),
            rq.sections.len(),
            rq.lengths.len(),
            rq.cases.len(),
            rq.heights.len(),
            rq.grades.len(),
            out.display()
        );
    }
    Ok(())
}

fn grade_label(rq: &Request, g: &Option<String>) -> String {
    g.clone()
        .or(rq.table.design.grade.clone())
        .unwrap_or_else(|| format!("fy{}", fmt_num(rq.table.design.fy.unwrap_or(0.0))))
}

fn write_tables(
    rq: &Request,
    dsecs: &[DesignSection],
    cells: &[Cell],
    ls: &LoadedSpec,
    materials: &[(f64, f64)],
    roots: &[String],
) -> Result<Vec<(String, Vec<u8>)>> {
    let mut files = Vec::new();
    // Preamble shared by every file.
    let mut pre = String::new();
    let d0 = &rq.table.design;
    writeln!(
        pre,
        "# ltb-atlas resistance table \"{}\": design buckling resistance moment against member length",
        rq.name
    )?;
    writeln!(pre, "# CAUTION: {DESIGN_CAUTION}")?;
    writeln!(
        pre,
        "# Mcr from the finite-element engine for each load case, section, length and load height (never from a formula); {CAVEATS}"
    )?;
    for a in assumptions(d0, &dsecs[0]) {
        if !a.starts_with("buckling curve") {
            writeln!(pre, "# {a}")?;
        }
    }
    for (k, s) in dsecs.iter().enumerate() {
        let d = Design {
            grade: rq.grades[0].clone().or(d0.grade.clone()),
            ..d0.clone()
        };
        let curve = assumptions(&d, s)
            .into_iter()
            .find(|a| a.starts_with("buckling curve"));
        writeln!(
            pre,
            "# section {}: {}{}",
            s.name,
            rq.sections[k].source,
            curve.map(|c| format!("; {c}")).unwrap_or_default()
        )?;
    }
    for g in &rq.grades {
        for s in dsecs {
            let d = Design {
                grade: g.clone().or(d0.grade.clone()),
                ..d0.clone()
            };
            if let Ok((_, how)) = yield_strength(&d, s) {
                writeln!(pre, "# grade {} / {}: {how}", grade_label(rq, g), s.name)?;
            }
        }
    }
    writeln!(
        pre,
        "# unbraced length Lb = {} × L (AISC F2 only; EN 1993-1-1 uses Mcr alone)",
        fmt_num(rq.table.lb_over_l)
    )?;
    for (k, c) in rq.cases.iter().enumerate() {
        let (e, g) = materials.get(k).copied().unwrap_or((f64::NAN, f64::NAN));
        writeln!(
            pre,
            "# load case {}: {}{}; E = {} MPa, G = {} MPa (Mcr and, for AISC, Lp, Lr and Eq. F2-4)",
            c.name,
            template_summary(c),
            roots.get(k).cloned().unwrap_or_default(),
            num(e, 0),
            num(g, 0)
        )?;
    }
    writeln!(
        pre,
        "# load heights: {}",
        rq.heights
            .iter()
            .map(|h| h.clone().unwrap_or_else(|| "as given in the case".into()))
            .collect::<Vec<_>>()
            .join(", ")
    )?;
    writeln!(
        pre,
        "# units: length, lb m; mcr, mb_rd, m_plateau kN·m; fy MPa; source spec {} (sha256 {})",
        ls.path
            .file_name()
            .map(|f| f.to_string_lossy().to_string())
            .unwrap_or_default(),
        &ls.hash[..16.min(ls.hash.len())]
    )?;
    // Machine CSV.
    let mut m = pre.clone();
    let aisc = matches!(d0.code, resistance::Code::Aisc(_));
    writeln!(
        m,
        "case,grade,load_height,section,length,lb,mcr,error_estimate,lambda_lt,chi_lt,mb_rd,m_plateau,fy,{},status,note",
        if aisc {
            "clause,cb_equivalent"
        } else {
            "class,curve,f"
        }
    )?;
    for c in cells {
        let (mut row, extra) = match &c.outcome {
            Some(o) => {
                let extra = match &o.detail {
                    Detail::Ec3(r) => format!(
                        "{},{},{}",
                        r.class.class as u8,
                        r.curve.letter(),
                        num(r.f, 4)
                    ),
                    Detail::Aisc(r) => format!("{},{}", r.section_clause, num(r.cb, 4)),
                };
                (
                    format!(
                        "{},{},{},{},{},{},{}",
                        if o.mcr.is_finite() {
                            num(o.mcr, 3)
                        } else {
                            String::new()
                        },
                        c.error_estimate
                            .map(|e| format!("{e:.1e}"))
                            .unwrap_or_default(),
                        num(o.lambda_lt, 4),
                        num(o.chi_lt, 4),
                        num(o.mb_rd, 3),
                        num(o.m_plateau, 3),
                        num(o.fy, 1)
                    ),
                    extra,
                )
            }
            None => (",,,,,,".into(), if aisc { ",".into() } else { ",,".into() }),
        };
        row = format!(
            "{},{},{},\"{}\",{},{},{row},{extra},{},\"{}\"",
            rq.cases[c.case].name,
            grade_label(rq, &rq.grades[c.grade]),
            rq.heights[c.height]
                .clone()
                .unwrap_or_else(|| "as-given".into()),
            rq.sections[c.section].name,
            len_str(rq.lengths[c.length]),
            num(c.lb, 4),
            c.status,
            c.note.replace('"', "'")
        );
        writeln!(m, "{row}")?;
    }
    files.push((format!("{}.csv", rq.name), m.into_bytes()));
    // Print tables: lengths down, sections across, Mb,Rd at Mcr·(1 − e) floored.
    for (ci, c) in rq.cases.iter().enumerate() {
        for (gi, g) in rq.grades.iter().enumerate() {
            for (hi, h) in rq.heights.iter().enumerate() {
                let mut p = pre.clone();
                writeln!(
                    p,
                    "# print table: load case {}, grade {}, load height {}; values Mb,Rd (kN·m) from Mcr·(1 − error estimate), rounded down to 3 significant figures; empty where outside scope or not converged (see {}.csv)",
                    c.name,
                    grade_label(rq, g),
                    h.clone().unwrap_or_else(|| "as given".into()),
                    rq.name
                )?;
                write!(p, "length_m")?;
                for s in &rq.sections {
                    write!(p, ",\"{}\"", s.name)?;
                }
                writeln!(p)?;
                for (li, l) in rq.lengths.iter().enumerate() {
                    write!(p, "{}", len_str(*l))?;
                    for si in 0..rq.sections.len() {
                        let v = cells
                            .iter()
                            .find(|x| {
                                x.case == ci
                                    && x.grade == gi
                                    && x.height == hi
                                    && x.section == si
                                    && x.length == li
                            })
                            .and_then(|x| x.low.as_ref())
                            .map(|o| floor_sig(o.mb_rd))
                            .unwrap_or_default();
                        write!(p, ",{v}")?;
                    }
                    writeln!(p)?;
                }
                let hname = safe_name(h.as_deref().unwrap_or("as-given"));
                files.push((
                    format!(
                        "{}.{}.{}.{}.table.csv",
                        rq.name,
                        c.name,
                        safe_name(&grade_label(rq, g)),
                        hname
                    ),
                    p.into_bytes(),
                ));
            }
        }
    }
    Ok(files)
}

/// A short description of a load case template (supports, restraints, loads).
fn template_summary(c: &CaseTemplate) -> String {
    let mut parts = Vec::new();
    for end in ["start", "end"] {
        if let Some(t) = c.table.get(end).and_then(|v| v.as_table()) {
            parts.push(format!("{end} {}", compact(t)));
        }
    }
    for (k, label) in [
        ("support", "support"),
        ("restraint", "restraint"),
        ("continuous_restraint", "continuous restraint"),
        ("load", "load"),
    ] {
        if let Some(a) = c.table.get(k).and_then(|v| v.as_array()) {
            for x in a {
                if let Some(t) = x.as_table() {
                    parts.push(format!("{label} {}", compact(t)));
                }
            }
        }
    }
    parts.join("; ")
}

fn compact(t: &toml::Table) -> String {
    let v: Vec<String> = t
        .iter()
        .map(|(k, v)| match v {
            toml::Value::String(s) => format!("{k}={s}"),
            other => format!("{k}={other}"),
        })
        .collect();
    format!("({})", v.join(" "))
}

/// JSON fields (added to `solve --json`) and report lines of a `[design]` table.
pub type SolveDesign = (serde_json::Map<String, serde_json::Value>, Vec<String>);

/// For `solve`: the `[design]` result of a physical case, as JSON fields and
/// report lines; None when the case has no `[design]` table.
///
/// # Errors
///
/// A located error for a bad `[design]` table; a message when the section
/// is outside the code's scope.
pub fn solve_design(
    path: &Path,
    rc: &ResolvedCase,
    sol: &crate::solve::Solution,
) -> Result<Option<SolveDesign>> {
    let text =
        std::fs::read_to_string(path).with_context(|| format!("cannot read {}", path.display()))?;
    let origin = path.display().to_string();
    let Some(cd) = resistance::spec::case_design(&text, &origin)? else {
        return Ok(None);
    };
    let CaseKind::Physical(p) = &rc.kind else {
        bail!("{origin}: [design] belongs to physical cases");
    };
    let d = &sol.forward;
    let lb = p.length * cd.table.lb_over_l;
    let mcr = match (d.status, d.mu_cr) {
        (crate::solve::Status::Ok, Some(mu)) | (crate::solve::Status::NotConverged, Some(mu)) => {
            mu * rc.scales.moment
        }
        (crate::solve::Status::NoBuckling, _) => f64::INFINITY,
        _ => bail!("{origin}: no critical moment to design with (the loads produce no bending)"),
    };
    let o = resistance::evaluate(&cd.table.design, &cd.section, lb, mcr, p.e)
        .map_err(|m| anyhow!("{origin}: [design]: {m}"))?;
    let (_, fy_how) = yield_strength(&cd.table.design, &cd.section)
        .map_err(|m| anyhow!("{origin}: [design]: {m}"))?;
    let mut a = assumptions(&cd.table.design, &cd.section);
    a.push(fy_how);
    a.push(format!(
        "load pattern, supports, restraints and load height as in the case: {}",
        case_summary(&rc.member)
    ));
    let mut j = serde_json::Map::new();
    let n = |x: f64| {
        if x.is_finite() {
            serde_json::json!(x)
        } else {
            serde_json::Value::Null
        }
    };
    j.insert("lambda_lt".into(), n(o.lambda_lt));
    j.insert("chi_lt".into(), n(o.chi_lt));
    j.insert("mb_rd".into(), n(o.mb_rd));
    let mut det = serde_json::Map::new();
    det.insert("mcr".into(), n(o.mcr));
    det.insert("lambda_lt".into(), n(o.lambda_lt));
    det.insert("chi_lt".into(), n(o.chi_lt));
    det.insert("mb_rd".into(), n(o.mb_rd));
    det.insert("m_plateau".into(), n(o.m_plateau));
    det.insert("fy".into(), n(o.fy));
    det.insert("section".into(), serde_json::json!(cd.section.name));
    det.insert("wel_y_mm3".into(), n(cd.section.moduli.wel_y));
    det.insert("wpl_y_mm3".into(), n(cd.section.moduli.wpl_y));
    det.insert("lb_m".into(), n(lb));
    match &o.detail {
        Detail::Ec3(r) => {
            det.insert("class".into(), serde_json::json!(r.class.class as u8));
            det.insert("curve".into(), serde_json::json!(r.curve.letter()));
            det.insert("alpha_lt".into(), n(r.curve.alpha()));
            det.insert("chi_lt_unmodified".into(), n(r.chi_lt));
            det.insert("f".into(), n(r.f));
            det.insert("wy_mm3".into(), n(r.wy));
        }
        Detail::Aisc(r) => {
            det.insert("clause".into(), serde_json::json!(r.section_clause));
            det.insert("cb_equivalent".into(), n(r.cb));
            det.insert("mcr_f2_4_cb1".into(), n(r.mcr_f24));
            det.insert("lp_m".into(), n(r.lp / 1000.0));
            det.insert("lr_m".into(), n(r.lr / 1000.0));
            det.insert("mn".into(), n(r.mn));
            det.insert("mp".into(), n(r.mp));
        }
    }
    det.insert("assumptions".into(), serde_json::json!(a));
    det.insert("caution".into(), serde_json::json!(DESIGN_CAUTION));
    j.insert("design".into(), serde_json::Value::Object(det));
    let mut lines = vec![
        String::new(),
        "Design resistance (lateral–torsional buckling)".to_string(),
    ];
    lines.push(format!(
        "  Mcr = {} kN·m (engine)   λ̄LT = {}   χLT = {}   Mb,Rd = {} kN·m   (plateau {} kN·m, fy = {} MPa)",
        if o.mcr.is_finite() { num(o.mcr, 2) } else { "— (no buckling)".into() },
        num(o.lambda_lt, 3),
        num(o.chi_lt, 3),
        num(o.mb_rd, 2),
        num(o.m_plateau, 2),
        num(o.fy, 1)
    ));
    if let Detail::Aisc(r) = &o.detail {
        lines.push(format!(
            "  {}: Lp = {} m, Lr = {} m, Lb = {} m, equivalent Cb = {}, Mn = {} kN·m",
            r.section_clause,
            num(r.lp / 1000.0, 3),
            num(r.lr / 1000.0, 3),
            num(lb, 3),
            num(r.cb, 3),
            num(r.mn, 2)
        ));
    }
    if let Detail::Ec3(r) = &o.detail {
        lines.push(format!(
            "  class {}, curve {} (αLT = {}), f = {}, Wy = {} mm³",
            r.class.class as u8,
            r.curve.letter(),
            r.curve.alpha(),
            num(r.f, 3),
            num(r.wy, 0)
        ));
    }
    for x in a {
        lines.push(format!("  {x}"));
    }
    lines.push(format!("CAUTION: {DESIGN_CAUTION}"));
    Ok(Some((j, lines)))
}

//! The rule-check stage: every family that lists `rules` is solved over its
//! grid (through the cache), each rule is evaluated at every case and
//! compared with the engine, the frontier r = 1 is refined with the engine
//! between grid points, and the files of the contract are written:
//!
//! - `out/<family>.<rule>.csv`: `#` preamble (caution, caveats, the rule's
//!   clause, edition, source, limits, values from memory, tolerances), then
//!   the axis columns, kappa, zeta, direction (if not an axis), mcr_ratio,
//!   verdict, and the extras mu_rule, mu_cr, error_estimate, factors, reason;
//! - `out/<family>.<rule>.frontier.csv`: (combination,) branch, kappa, zeta,
//!   mcr_ratio of the refined crossings, one polyline per branch;
//! - `out/rules-summary.json`.

use super::{LoadedSpec, Options, family_rows, progress_bar, solve_points, write_atomic};
use crate::rules::compare::{self, Bracket, Edge, Verdict};
use crate::rules::office::{parse_family_rules, parse_office_rules};
use crate::rules::{Outcome, Rule, RuleInfo};
use crate::sweep::{self, Axis, Family, Row, fmt_num};
use anyhow::{Context, Result};
use serde_json::json;
use std::collections::BTreeMap;
use std::io::Write;
use std::path::Path;

/// Frontier points are accepted when |r − 1| is at most this (the contract
/// asks |r − 1| ≤ 1e-3 when re-solved; the margin covers nothing but
/// printing, since re-solving is deterministic).
pub const FRONTIER_TARGET: f64 = 3e-4;
/// Iterations of the root refinement per crossing.
pub const FRONTIER_ITERATIONS: usize = 40;

/// The largest ratio and where (κ, ζ).
type MaxAt = Option<(f64, f64, Option<f64>)>;

/// What the stage did.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CheckSummary {
    /// (family, rule) pairs checked.
    pub checks: usize,
    /// Cases whose FE solve did not end ok (not compared).
    pub failed: usize,
    /// Crossings whose refinement failed (FE failure or rule not applicable inside).
    pub unrefined: usize,
}

/// The rule-check stage with the default rule tolerance (0.001).
pub fn run(ls: &LoadedSpec, out: &Path, opts: &Options) -> Result<()> {
    run_with_tolerance(ls, out, opts, compare::DEFAULT_TOLERANCE).map(|_| ())
}

fn fam_rules(ls: &LoadedSpec) -> Result<(Vec<Rule>, Vec<Vec<String>>)> {
    let dir = ls.dir().to_path_buf();
    let read = |p: &str| std::fs::read_to_string(dir.join(p)).map_err(|e| e.to_string());
    let office = parse_office_rules(&ls.text, &ls.origin(), &read).map_err(anyhow::Error::new)?;
    let lists = parse_family_rules(&ls.text, &ls.origin(), &office).map_err(anyhow::Error::new)?;
    Ok((office.into_iter().map(Rule::Office).collect(), lists))
}

/// A family's `resistance` table: the section, grade and code whose design
/// resistance weighs each rule's Mcr against the engine's.
struct FamilyDesign {
    design: crate::resistance::Design,
    section: crate::resistance::DesignSection,
    e: f64,
    g: f64,
    lines: Vec<String>,
}

/// Read every family's optional `resistance` table (the `[design]` keys plus
/// `section`, an optional `catalogue` file and `e`, `g` in MPa, default
/// 210 000 and 81 000), with located errors.
fn fam_designs(ls: &LoadedSpec) -> Result<Vec<Option<FamilyDesign>>> {
    use crate::case::schema::Tab;
    use crate::case::span::Source;
    use crate::resistance::{DesignSection, catalogue, spec::parse_design, yield_strength};
    let origin = ls.origin();
    let src = Source {
        text: &ls.text,
        origin: &origin,
    };
    let root = src.parse()?;
    let top = Tab::top(&src, root.get_ref());
    let mut out = Vec::new();
    for loc in top.tables("family")? {
        let t = loc.tab(&src);
        let Some(dloc) = t.table("resistance")? else {
            out.push(None);
            continue;
        };
        let dt = dloc.tab(&src);
        let table = parse_design(&dt, &["section", "catalogue", "e", "g"])?;
        let user = match dt.string("catalogue")? {
            Some((c, v)) => catalogue::load(&ls.dir().join(&c))
                .map_err(|e| src.error(&v.span, &v.key, e.to_string()))?,
            None => Vec::new(),
        };
        let Some((name, nv)) = dt.string("section")? else {
            return Err(dt
                .err_here("missing `section`: a catalogue name such as \"IPE 300\" (the design ratio needs a section)")
                .into());
        };
        let entry = catalogue::lookup(&name, &user).map_err(|m| src.error(&nv.span, &nv.key, m))?;
        let section =
            DesignSection::from_entry(&entry).map_err(|m| src.error(&nv.span, &nv.key, m))?;
        let (fy, fy_text) = yield_strength(&table.design, &section).map_err(|m| dt.err_here(m))?;
        let e = dt.num("e")?.map_or(210_000.0, |n| n.value);
        let g = dt.num("g")?.map_or(81_000.0, |n| n.value);
        let mut lines = vec![format!(
            "design consequence: design_ratio = Mb,Rd(Mcr by the rule)/Mb,Rd(Mcr by the engine) for section {} ({}), fy = {fy} MPa ({fy_text}), E = {e} MPa, G = {g} MPa, at the length L = (pi/kappa)*sqrt(E*Iw/(G*It)) that gives the section each row's kappa; above 1 the rule overstates the design resistance",
            section.name, section.source
        )];
        lines.extend(crate::resistance::assumptions(&table.design, &section));
        out.push(Some(FamilyDesign {
            design: table.design,
            section,
            e,
            g,
            lines,
        }));
    }
    Ok(out)
}

/// The rule-check stage with a given rule tolerance.
pub fn run_with_tolerance(
    ls: &LoadedSpec,
    out: &Path,
    opts: &Options,
    rule_tol: f64,
) -> Result<CheckSummary> {
    if !(0.0..0.5).contains(&rule_tol) {
        anyhow::bail!(
            "--rule-tolerance must lie between 0 and 0.5 (a relative margin), got {rule_tol}"
        );
    }
    let (office, lists) = fam_rules(ls)?;
    let designs = fam_designs(ls)?;
    let pool = opts.pool()?;
    let settings = opts.settings();
    let mut cache = opts.open_cache()?;
    let mut files: Vec<(String, Vec<u8>)> = Vec::new();
    let mut entries = Vec::new();
    let mut summary = CheckSummary::default();
    let total: usize = ls
        .spec
        .families
        .iter()
        .zip(&lists)
        .filter(|(_, l)| !l.is_empty())
        .map(|(f, _)| f.size())
        .sum();
    if total > super::CONFIRM && !opts.yes {
        anyhow::bail!(
            "{}: the families with `rules` hold {total} cases (above {}); rerun with --yes to go ahead",
            ls.origin(),
            super::CONFIRM
        );
    }
    let bar = progress_bar(total as u64, opts.quiet);
    let plain = !opts.quiet && bar.is_hidden();
    for ((f, names), design) in ls.spec.families.iter().zip(&lists).zip(&designs) {
        if names.is_empty() {
            continue;
        }
        if design.is_some() && !f.axes.iter().any(|a| matches!(a, Axis::Kappa(_))) {
            anyhow::bail!(
                "{}: family {}: a `resistance` table weighs dimensionless rows by a section; give the family a kappa axis",
                ls.origin(),
                f.name
            );
        }
        let rows = family_rows(f, &settings, &pool, &mut cache)?;
        bar.inc(rows.len() as u64);
        summary.failed += rows.iter().filter(|r| r.status != "ok").count();
        for name in names {
            let rule = match Rule::built_in(name) {
                Some(r) => r,
                None => office
                    .iter()
                    .find(|r| r.info().name == *name)
                    .cloned()
                    .expect("names checked at parse"),
            };
            let info = rule.info();
            let outcomes: Vec<Outcome> = pool.install(|| {
                use rayon::prelude::*;
                rows.par_iter()
                    .map(|r| rule.evaluate(&r.point.member))
                    .collect()
            });
            let cases: Vec<Case> = rows
                .iter()
                .zip(&outcomes)
                .map(|(r, o)| Case::of(r, o, rule_tol))
                .collect();
            // The design consequence per compared row: (ratio, length in m).
            let dratios: Vec<Option<(f64, f64)>> = rows
                .iter()
                .zip(&cases)
                .map(|(r, c)| {
                    let d = design.as_ref()?;
                    if c.verdict == Verdict::NotApplicable {
                        return None;
                    }
                    let (mr, mf) = (c.mu_rule?, r.mu_cr?);
                    crate::resistance::design_ratio_at_kappa(
                        &d.design,
                        &d.section,
                        d.e,
                        d.g,
                        r.point.kappa,
                        mr,
                        mf,
                    )
                    .ok()
                })
                .collect();
            files.push((
                format!("{}.{}.csv", f.name, name),
                rule_csv(
                    f,
                    &info,
                    &rows,
                    &cases,
                    ls,
                    opts,
                    rule_tol,
                    design
                        .as_ref()
                        .map(|d| (d.lines.as_slice(), dratios.as_slice())),
                )?,
            ));
            let mut frontier_rows: Vec<(String, usize, f64, Option<f64>, f64)> = Vec::new();
            let combos = sweep::combinations(f);
            for combo in &combos {
                let fr = frontier(f, combo, &rule, &rows, &cases, &settings, &pool, &mut cache)?;
                summary.unrefined += fr.unrefined;
                let mut counts: BTreeMap<&str, usize> = BTreeMap::new();
                let mut max: MaxAt = None;
                for v in [
                    "conservative",
                    "unconservative",
                    "indeterminate",
                    "not-applicable",
                ] {
                    counts.insert(v, 0);
                }
                for (i, c) in cases.iter().enumerate() {
                    if sweep::combination_of(f, i) != combo.name {
                        continue;
                    }
                    *counts.get_mut(c.verdict.as_str()).expect("verdict") += 1;
                    if let Some(r) = c.ratio
                        && max.is_none_or(|m| r > m.0)
                    {
                        max = Some((r, rows[i].point.kappa, rows[i].point.zeta));
                    }
                }
                let mut dmax: MaxAt = None;
                for (i, d) in dratios.iter().enumerate() {
                    if let Some((r, _)) = d
                        && sweep::combination_of(f, i) == combo.name
                        && dmax.is_none_or(|m| *r > m.0)
                    {
                        dmax = Some((*r, rows[i].point.kappa, rows[i].point.zeta));
                    }
                }
                let compared =
                    counts["conservative"] + counts["unconservative"] + counts["indeterminate"];
                let share = if compared > 0 {
                    counts["unconservative"] as f64 / compared as f64
                } else {
                    0.0
                };
                let branches = fr.lines.len();
                for (b, line) in fr.lines.iter().enumerate() {
                    for p in line {
                        frontier_rows.push((combo.name.clone(), b + 1, p.0, p.1, p.2));
                    }
                }
                if plain {
                    eprintln!(
                        "{} / {} / {}: {} compared, {} unconservative, {} not applicable, largest ratio {}, frontier {} branch(es){}",
                        f.name,
                        name,
                        combo.name,
                        compared,
                        counts["unconservative"],
                        counts["not-applicable"],
                        max.map(|m| format!("{:.4}", m.0))
                            .unwrap_or_else(|| "-".into()),
                        branches,
                        match (fr.unrefined, fr.gaps) {
                            (0, 0) => String::new(),
                            (u, 0) => format!(" ({u} crossing(s) not refined)"),
                            (0, g) =>
                                format!(" ({g} sign change(s) across a gap of the rule's domain)"),
                            (u, g) => format!(
                                " ({u} crossing(s) not refined, {g} sign change(s) across a gap of the rule's domain)"
                            ),
                        }
                    );
                }
                entries.push(json!({
                    "family": f.name,
                    "rule": name,
                    "combination": combo.name,
                    "clause": info.clause,
                    "edition": info.edition,
                    "source": info.source,
                    "limits": info.limits,
                    "from_memory": info.memory,
                    "max_ratio": max.map(|m| m.0),
                    "at": max.map(|m| json!({"kappa": m.1, "zeta": m.2})),
                    "unconservative_share": share,
                    "compared": compared,
                    "counts": counts,
                    "frontier_branches": branches,
                    "frontier_unrefined": fr.unrefined,
                    "frontier_gaps": fr.gaps,
                    "design": design.as_ref().map(|d| json!({
                        "section": d.section.name,
                        "assumptions": d.lines,
                        "max_design_ratio": dmax.map(|m| m.0),
                        "at": dmax.map(|m| json!({"kappa": m.1, "zeta": m.2})),
                    })),
                }));
            }
            files.push((
                format!("{}.{}.frontier.csv", f.name, name),
                frontier_csv(f, &info, &combos, &frontier_rows, rule_tol)?,
            ));
            summary.checks += 1;
        }
    }
    bar.finish_and_clear();
    if summary.checks == 0 && !opts.quiet {
        eprintln!(
            "{}: no family lists `rules` (for example rules = [\"three-factor\", \"aisc-cb\"]): nothing to check",
            ls.origin()
        );
    }
    let doc = json!({
        "caution": crate::CAUTION,
        "tolerance": rule_tol,
        "solver_tolerance": opts.tolerance,
        "comparison": COMPARISON,
        "spec_sha256": ls.hash,
        "ltb_atlas": env!("CARGO_PKG_VERSION"),
        "entries": entries,
    });
    let mut b = serde_json::to_vec_pretty(&doc)?;
    b.push(b'\n');
    for (name, bytes) in &files {
        write_atomic(&out.join(name), bytes)?;
    }
    write_atomic(&out.join("rules-summary.json"), &b)
        .with_context(|| format!("cannot write the summary in {}", out.display()))?;
    Ok(summary)
}

const COMPARISON: &str = "mcr_ratio = Mcr(rule)/Mcr(FE), both at the largest |M| along the member; indeterminate where |mcr_ratio - 1| <= the FE relative error estimate; unconservative where mcr_ratio > 1 + tolerance; conservative otherwise; not-applicable cases (outside the rule's clause or limits, or without an FE result) are never compared";

/// One compared case.
#[derive(Debug, Clone)]
struct Case {
    ratio: Option<f64>,
    verdict: Verdict,
    mu_rule: Option<f64>,
    factors: String,
    reason: String,
}

impl Case {
    fn of(r: &Row, o: &Outcome, tol: f64) -> Case {
        match o {
            Outcome::NotApplicable(reason) => Case {
                ratio: None,
                verdict: Verdict::NotApplicable,
                mu_rule: None,
                factors: String::new(),
                reason: reason.clone(),
            },
            Outcome::Applies { mu, factors } => {
                match (r.status.as_str(), r.mu_cr, r.error_estimate) {
                    ("ok", Some(fe), Some(e)) if fe > 0.0 => {
                        let ratio = mu / fe;
                        Case {
                            ratio: Some(ratio),
                            verdict: compare::verdict(ratio, e, tol),
                            mu_rule: Some(*mu),
                            factors: factors.clone(),
                            reason: String::new(),
                        }
                    }
                    _ => Case {
                        ratio: None,
                        verdict: Verdict::NotApplicable,
                        mu_rule: Some(*mu),
                        factors: factors.clone(),
                        reason: format!("no FE result to compare with (status {})", r.status),
                    },
                }
            }
        }
    }
}

fn preamble(
    w: &mut Vec<u8>,
    f: &Family,
    info: &RuleInfo,
    ls: &LoadedSpec,
    opts_tol: f64,
    rule_tol: f64,
) -> std::io::Result<()> {
    writeln!(w, "# {}", crate::CAUTION)?;
    writeln!(w, "# {}", sweep::CAVEATS)?;
    writeln!(
        w,
        "# rule {}: {}; edition {}",
        info.name, info.clause, info.edition
    )?;
    writeln!(w, "# source: {}", info.source)?;
    writeln!(w, "# limits (not-applicable outside): {}", info.limits)?;
    writeln!(
        w,
        "# values from memory (not read in the document; checked against the engine before use): {}",
        if info.memory.is_empty() {
            "none"
        } else {
            &info.memory
        }
    )?;
    writeln!(w, "# reading of the rule: {}", info.interpretation)?;
    writeln!(
        w,
        "# comparison: {COMPARISON}; rule tolerance {}; solver tolerance {}",
        fmt_num(rule_tol),
        fmt_num(opts_tol)
    )?;
    writeln!(
        w,
        "# family {}: {} cases; base case: {}; ltb-atlas {}; spec sha256 {}",
        f.name,
        f.size(),
        crate::report::case_summary(&f.case.member),
        env!("CARGO_PKG_VERSION"),
        ls.hash
    )?;
    writeln!(
        w,
        "# units: kappa = (pi/L)*sqrt(E*Iw/(G*It)); zeta = (pi*a/L)*sqrt(E*Iz/(G*It)), a above the shear centre (geometric; the rules read it on the destabilising side); mu = Mcr*L/sqrt(E*Iz*G*It)"
    )
}

/// Lines stating a family's design assumptions and each row's (design
/// ratio, length in m), when the family has a `resistance` table.
type DesignColumns<'a> = (&'a [String], &'a [Option<(f64, f64)>]);

#[allow(clippy::too_many_arguments)]
fn rule_csv(
    f: &Family,
    info: &RuleInfo,
    rows: &[Row],
    cases: &[Case],
    ls: &LoadedSpec,
    opts: &Options,
    rule_tol: f64,
    design: Option<DesignColumns<'_>>,
) -> Result<Vec<u8>> {
    let mut b = Vec::new();
    preamble(&mut b, f, info, ls, opts.tolerance, rule_tol)?;
    if let Some((lines, _)) = design {
        for l in lines {
            writeln!(b, "# {l}")?;
        }
    }
    {
        let mut w = csv::Writer::from_writer(&mut b);
        let mut h = sweep::point_columns(f);
        h.extend(
            [
                "mcr_ratio",
                "verdict",
                "mu_rule",
                "mu_cr",
                "error_estimate",
                "factors",
                "reason",
            ]
            .map(String::from),
        );
        if design.is_some() {
            h.extend(["design_ratio", "length_m"].map(String::from));
        }
        w.write_record(&h)?;
        let opt = |x: Option<f64>| x.filter(|v| v.is_finite()).map(fmt_num).unwrap_or_default();
        for (i, (r, c)) in rows.iter().zip(cases).enumerate() {
            let mut rec = sweep::point_values(f, &r.point);
            rec.extend([
                opt(c.ratio),
                c.verdict.as_str().to_string(),
                opt(c.mu_rule),
                opt(r.mu_cr),
                opt(r.error_estimate),
                c.factors.clone(),
                c.reason.clone(),
            ]);
            if let Some((_, d)) = design {
                let (ratio, len) = d[i].unzip();
                rec.extend([opt(ratio), opt(len)]);
            }
            w.write_record(&rec)?;
        }
        w.flush()?;
    }
    Ok(b)
}

fn frontier_csv(
    f: &Family,
    info: &RuleInfo,
    combos: &[sweep::Combination],
    rows: &[(String, usize, f64, Option<f64>, f64)],
    rule_tol: f64,
) -> Result<Vec<u8>> {
    let mut b = Vec::new();
    writeln!(b, "# {}", crate::CAUTION)?;
    writeln!(
        b,
        "# rule {}: {}; edition {}; source: {}",
        info.name, info.clause, info.edition, info.source
    )?;
    writeln!(b, "# limits (not-applicable outside): {}", info.limits)?;
    writeln!(
        b,
        "# values from memory: {}",
        if info.memory.is_empty() {
            "none"
        } else {
            &info.memory
        }
    )?;
    writeln!(
        b,
        "# frontier of family {} where Mcr(rule)/Mcr(FE) = 1, each point found by solving with the engine between grid points (|mcr_ratio - 1| <= {} when re-solved), never interpolated; points of one branch form a polyline in order; sign changes across a gap of the rule's domain (no value between the grid points) are no crossing and left out; rule tolerance {}",
        f.name,
        fmt_num(FRONTIER_TARGET),
        fmt_num(rule_tol)
    )?;
    let with_combo = !(combos.len() == 1 && combos[0].labels.is_empty());
    {
        let mut w = csv::Writer::from_writer(&mut b);
        let mut h: Vec<&str> = Vec::new();
        if with_combo {
            h.push("combination");
        }
        h.extend(["branch", "kappa", "zeta", "mcr_ratio"]);
        w.write_record(&h)?;
        for (c, br, k, z, r) in rows {
            let mut rec = Vec::new();
            if with_combo {
                rec.push(c.clone());
            }
            rec.extend([
                br.to_string(),
                fmt_num(*k),
                z.map(fmt_num).unwrap_or_default(),
                fmt_num(*r),
            ]);
            w.write_record(&rec)?;
        }
        w.flush()?;
    }
    Ok(b)
}

struct Frontier {
    /// Polylines of (kappa, zeta, ratio).
    lines: Vec<Vec<(f64, Option<f64>, f64)>>,
    unrefined: usize,
    /// Sign changes across a gap of the rule's domain (no crossing).
    gaps: usize,
}

#[allow(clippy::too_many_arguments)]
fn frontier(
    f: &Family,
    combo: &sweep::Combination,
    rule: &Rule,
    rows: &[Row],
    cases: &[Case],
    settings: &crate::solve::Settings,
    pool: &rayon::ThreadPool,
    cache: &mut crate::sweep::cache::Cache,
) -> Result<Frontier> {
    let ka = f.axes.iter().position(|a| matches!(a, Axis::Kappa(_)));
    let za = f.axes.iter().position(|a| matches!(a, Axis::Zeta(_)));
    let len = |a: Option<usize>| {
        a.map_or(1, |a| match &f.axes[a] {
            Axis::Kappa(v) => v.len(),
            Axis::Zeta(v) => v.len(),
            _ => 1,
        })
    };
    let (ni, nj) = (len(ka), len(za));
    let lens: Vec<usize> = f.axes.iter().map(Axis::len).collect();
    let idx_of = |i: usize, j: usize| {
        let mut idx = combo.index.clone();
        if let Some(a) = ka {
            idx[a] = i;
        }
        if let Some(a) = za {
            idx[a] = j;
        }
        idx
    };
    let flat = |idx: &[usize]| idx.iter().zip(&lens).fold(0, |acc, (i, n)| acc * n + i);
    let g = |i: usize, j: usize| cases[flat(&idx_of(i, j))].ratio.map(|r| r - 1.0);
    // A sign change across a gap of the rule's domain (for example AS 4100
    // between the shear centre and the top flange, where it defines no kl) is
    // no crossing of r = 1: edges whose midpoint the rule does not cover are
    // left out (counted as gaps). The rule alone decides; no solve needed.
    let mid = |e: &Edge| {
        let idx = idx_of(e.i, e.j);
        let (i2, j2) = if e.dir == 0 {
            (e.i + 1, e.j)
        } else {
            (e.i, e.j + 1)
        };
        let (a, b) = (&rows[flat(&idx)], &rows[flat(&idx_of(i2, j2))]);
        if e.dir == 0 {
            f.point_at(&idx, Some(0.5 * (a.point.kappa + b.point.kappa)), None)
        } else {
            let z = 0.5 * (a.point.zeta.unwrap_or(0.0) + b.point.zeta.unwrap_or(0.0));
            f.point_at(&idx, None, Some(z))
        }
    };
    let (edges, gaps): (Vec<Edge>, Vec<Edge>) = compare::sign_changes(ni, nj, &g)
        .into_iter()
        .partition(|e| matches!(rule.evaluate(&mid(e).member), Outcome::Applies { .. }));
    // Brackets in lockstep: one engine solve per open crossing per iteration.
    let param = |e: &Edge, end: usize| {
        let (i, j) = if e.dir == 0 {
            (e.i + end, e.j)
        } else {
            (e.i, e.j + end)
        };
        let r = &rows[flat(&idx_of(i, j))];
        if e.dir == 0 {
            r.point.kappa
        } else {
            r.point.zeta.unwrap_or(0.0)
        }
    };
    let mut open: Vec<(Edge, Bracket)> = edges
        .iter()
        .map(|e| {
            let (ga, gb) = if e.dir == 0 {
                (g(e.i, e.j), g(e.i + 1, e.j))
            } else {
                (g(e.i, e.j), g(e.i, e.j + 1))
            };
            (
                *e,
                Bracket {
                    a: (param(e, 0), ga.expect("compared")),
                    b: (param(e, 1), gb.expect("compared")),
                    kept: 0,
                },
            )
        })
        .collect();
    let mut found: BTreeMap<Edge, (f64, Option<f64>, f64)> = BTreeMap::new();
    let mut unrefined = 0;
    for _ in 0..FRONTIER_ITERATIONS {
        if open.is_empty() {
            break;
        }
        let xs: Vec<f64> = open.iter().map(|(_, b)| compare::illinois(b)).collect();
        let pts = open
            .iter()
            .zip(&xs)
            .map(|((e, _), &x)| {
                let idx = idx_of(e.i, e.j);
                if e.dir == 0 {
                    f.point_at(&idx, Some(x), None)
                } else {
                    f.point_at(&idx, None, Some(x))
                }
            })
            .collect();
        let solved = solve_points(pts, settings, pool, cache)?;
        let mut next = Vec::new();
        for (((e, mut br), x), row) in open.into_iter().zip(xs).zip(solved) {
            let gx = match (
                rule.evaluate(&row.point.member),
                row.status.as_str(),
                row.mu_cr,
            ) {
                (Outcome::Applies { mu, .. }, "ok", Some(fe)) if fe > 0.0 => mu / fe - 1.0,
                _ => {
                    unrefined += 1;
                    continue;
                }
            };
            if gx.abs() <= FRONTIER_TARGET {
                found.insert(e, (row.point.kappa, row.point.zeta, gx + 1.0));
            } else if (br.a.0 - br.b.0).abs() <= 1e-12 * br.a.0.abs().max(1.0) {
                unrefined += 1;
            } else {
                compare::update(&mut br, x, gx);
                next.push((e, br));
            }
        }
        open = next;
    }
    unrefined += open.len();
    let keys: BTreeMap<Edge, (f64, f64)> = found.keys().map(|e| (*e, (0.0, 0.0))).collect();
    let lines = compare::polylines(ni, nj, &g, &keys)
        .into_iter()
        .map(|l| l.iter().map(|e| found[e]).collect())
        .collect();
    Ok(Frontier {
        lines,
        unrefined,
        gaps: gaps.len(),
    })
}

//! The sweep spec (TOML): families, each a base case plus axes, read with
//! located errors (file, line, column, key) like case files.
//!
//! ```toml
//! [[family]]
//! name = "cantilever-tip-load"      # [a-z0-9][a-z0-9-]*, unique
//! kappa = [0.1, 0.5, 1.0]           # or { from = 0.1, to = 3.0, count = 12, spacing = "log" }
//! zeta = [-0.5, 0.0, "kappa", "-kappa", "1.05*kappa"]   # or a range table
//! zeta_load = "tip"                 # optional: ζ applies to this named load only
//! direction = ["down", "up"]        # optional axis
//! [family.case]                     # inline case, or case = "cases/x.toml" (relative to the spec)
//! ```
//!
//! Axes keep the order in which they appear in the family; the last varies
//! fastest.

use super::{Axis, AxisValue, Direction, Family};
use crate::case::schema::{Tab, TabLoc, did_you_mean_value, number, type_name};
use crate::case::span::Source;
use crate::case::{CaseError, Step, load_case, parse_case_in_with};
use std::path::Path;
use toml::de::{DeTable, DeValue};

/// Keys of a `[[family]]` table.
const FAMILY_KEYS: &[&str] = &[
    "name",
    "kappa",
    "zeta",
    "zeta_load",
    "direction",
    "case",
    "variant",
    "axis",
    "backspan_ratio",
    "backspan",
    "section",
    "length",
    "height",
    // Read by later stages from the same spec text (each parses its own
    // key with located errors): fits, rule checks, charts, resistance.
    "fit",
    "rules",
    "charts",
    "resistance",
];
/// Top-level keys of a spec: `family`, plus tables read by later stages
/// (office rules, the handbook, chart and design settings).
pub const TOP_KEYS: &[&str] = &["family", "rule", "handbook", "chart", "design"];
/// Keys of a range table.
const RANGE_KEYS: &[&str] = &["from", "to", "count", "spacing"];

/// A parsed spec.
#[derive(Debug, Clone)]
pub struct Spec {
    /// The families, in file order.
    pub families: Vec<Family>,
}

/// Parse a spec. `origin` names the file in errors; `dir` is where relative
/// case paths start.
pub fn parse_spec(text: &str, origin: &str, dir: &Path) -> Result<Spec, CaseError> {
    let src = Source { text, origin };
    let root = src.parse()?;
    let top = Tab::top(&src, root.get_ref());
    top.check_keys(TOP_KEYS, &|_| None)?;
    let fams = top.tables("family")?;
    if fams.is_empty() {
        return Err(src.error(
            &(0..0),
            "family",
            "the spec holds no family: add at least one [[family]] table",
        ));
    }
    let mut families: Vec<Family> = Vec::new();
    for (i, loc) in fams.iter().enumerate() {
        let f = parse_family(&src, loc, i, dir)?;
        if let Some(prev) = families.iter().find(|p| p.name == f.name) {
            let t = loc.tab(&src);
            return Err(t.err_at(
                "name",
                format!(
                    "family name \"{}\" is used twice; names become file names and must be unique",
                    prev.name
                ),
            ));
        }
        families.push(f);
    }
    Ok(Spec { families })
}

pub(crate) fn valid_name(s: &str) -> bool {
    let mut c = s.chars();
    matches!(c.next(), Some(ch) if ch.is_ascii_lowercase() || ch.is_ascii_digit())
        && s.chars()
            .all(|ch| ch.is_ascii_lowercase() || ch.is_ascii_digit() || ch == '-')
}

fn parse_family(
    src: &Source<'_>,
    loc: &TabLoc<'_>,
    index: usize,
    dir: &Path,
) -> Result<Family, CaseError> {
    let t = loc.tab(src);
    t.check_keys(FAMILY_KEYS, &|_| None)?;
    let Some((name, nv)) = t.string("name")? else {
        return Err(t.err_here(
            "missing `name`: every family needs a name such as \"cantilever-tip-load\"",
        ));
    };
    if !valid_name(&name) {
        return Err(src.error(
            &nv.span,
            &nv.key,
            format!("invalid family name \"{name}\": use lower-case letters, digits and '-', starting with a letter or digit (it becomes a file name)"),
        ));
    }
    // The base case.
    let case = match (t.get("case"), t.table("case")) {
        (Some(v), _) if matches!(v.v, DeValue::String(_)) => {
            let DeValue::String(p) = v.v else {
                unreachable!("matched above")
            };
            let path = dir.join(p.as_ref());
            load_case(&path).map_err(|mut e| {
                if e.line == 0 {
                    let (line, column) = src.line_col(v.span.start);
                    e = CaseError {
                        file: src.origin.to_string(),
                        line,
                        column,
                        key: v.key.clone(),
                        message: e.message,
                    };
                }
                e
            })?
        }
        (Some(_), Ok(Some(_))) => {
            // κ may come from the family's axis alone.
            let kappa_axis = t.get("kappa").is_some();
            parse_case_in_with(
                src.text,
                src.origin,
                &[Step::Key("family"), Step::Index(index), Step::Key("case")],
                kappa_axis.then_some(1.0),
            )?
        }
        (Some(v), _) => {
            return Err(src.error(
                &v.span,
                &v.key,
                format!(
                    "expected a [family.case] table or a file name, found {}",
                    type_name(v.v)
                ),
            ));
        }
        (None, _) => {
            return Err(t.err_here(
                "missing the base case: add a [family.case] table or `case = \"file.toml\"`",
            ));
        }
    };
    // Axes in file order.
    let mut entries = t.entries();
    entries.sort_by_key(|e| e.key_span.start);
    let mut axes = Vec::new();
    for e in &entries {
        match e.name.as_str() {
            "kappa" => axes.push(Axis::Kappa(numbers(src, &t, "kappa")?)),
            "zeta" => axes.push(Axis::Zeta(zetas(src, &t)?)),
            "direction" => axes.push(Axis::Direction(directions(src, &t)?)),
            "variant" => axes.push(Axis::Variant((0..t.tables("variant")?.len()).collect())),
            k @ ("section" | "length" | "height") => axes.push(super::physical::axis(src, &t, k)?),
            "backspan_ratio" => {
                let v = numbers(src, &t, "backspan_ratio")?;
                if let Some(bad) = v.iter().find(|r| !(**r > 0.0)) {
                    return Err(t.err_at(
                        "backspan_ratio",
                        format!("a backspan-to-overhang ratio must be > 0, found {bad}; for an overhang alone drop the axis"),
                    ));
                }
                axes.push(Axis::Backspan(v));
            }
            "axis" => {
                for loc in t.tables("axis")? {
                    let at = loc.tab(src);
                    at.check_keys(&["path", "values"], &|_| None)?;
                    let Some((p, pv)) = at.string("path")? else {
                        return Err(at.err_here("missing `path`: for example path = \"restraint.tip.lateral\" (see the sweep documentation)"));
                    };
                    let field = super::path::parse_path(&p, &case)
                        .map_err(|m| src.error(&pv.span, &pv.key, format!("`{p}`: {m}")))?;
                    if at.get("values").is_none() {
                        return Err(at.err_here(
                            "missing `values`: a list, or a range { from, to, count, spacing }",
                        ));
                    }
                    let values = numbers(src, &at, "values")?;
                    let taken = |c: &str| {
                        c == "variant"
                            || super::POINT_COLUMNS.contains(&c)
                            || super::RESULT_COLUMNS.contains(&c)
                    };
                    if taken(&p) || axes.iter().any(|a: &Axis| a.column() == p) {
                        return Err(src.error(
                            &pv.span,
                            &pv.key,
                            format!(
                                "`{p}` is already a column of this family; give each axis once"
                            ),
                        ));
                    }
                    if !matches!(case.kind, crate::case::CaseKind::Dimensionless) {
                        return Err(src.error(&pv.span, &pv.key, "path axes take dimensionless values and need a dimensionless base case"));
                    }
                    axes.push(Axis::Path {
                        name: p,
                        field,
                        values,
                    });
                }
            }
            _ => {}
        }
    }
    let zeta_load = match t.string("zeta_load")? {
        Some((n, v)) => {
            if !case
                .loads
                .iter()
                .any(|l| l.name.as_deref() == Some(n.as_str()))
            {
                let names: Vec<&str> = case
                    .loads
                    .iter()
                    .filter_map(|l| l.name.as_deref())
                    .collect();
                return Err(src.error(
                    &v.span,
                    &v.key,
                    format!(
                        "no load of the case is named \"{n}\"{}; named loads: {}",
                        did_you_mean_value(&n, &names),
                        if names.is_empty() {
                            "none (give a load `name = ...`)".into()
                        } else {
                            names.join(", ")
                        }
                    ),
                ));
            }
            Some(n)
        }
        None => None,
    };
    if axes.iter().any(|a| matches!(a, Axis::Kappa(_)))
        && !matches!(case.kind, crate::case::CaseKind::Dimensionless)
    {
        return Err(t.err_at("kappa", "a κ axis needs a dimensionless base case (top-level `kappa`); a physical family derives κ and ζ from its `section`, `length` and `height` axes"));
    }
    let has_case_axes = axes.iter().any(|a| matches!(a, Axis::Case { .. }));
    let mut patched = Vec::new();
    let base_loc = match t.get("case") {
        Some(v) if matches!(v.v, DeValue::Table(_)) => t.table("case")?,
        _ => None,
    };
    if has_case_axes {
        if base_loc.is_none() {
            return Err(t.err_at(
                "case",
                "physical axes (section, length, height) need the base case inline as [family.case], not as a file",
            ));
        }
        for k in ["kappa", "zeta"] {
            if t.get(k).is_some() {
                return Err(t.err_at(
                    k,
                    format!("a family with physical axes derives κ and ζ from sections, lengths and heights; drop `{k}` (heights go on the `height` axis)"),
                ));
            }
        }
    }
    let (case_path, case_span) = base_loc
        .as_ref()
        .map(|l| (l.path.clone(), l.span.clone()))
        .unwrap_or_default();
    let zl = zeta_load.clone();
    let mut patch = |table: &DeTable<'_>| -> Result<(), CaseError> {
        if has_case_axes {
            super::physical::patched(
                src,
                &t,
                table,
                &axes,
                zl.as_deref(),
                &case_path,
                case_span.clone(),
                &mut patched,
            )?;
        }
        Ok(())
    };
    let variants = super::variant::variants(src, &t, &case, &mut patch)?;
    if variants.is_empty()
        && let Some(l) = &base_loc
    {
        patch(l.t)?;
    }
    // Checks that need the whole family.
    for e in &entries {
        match e.name.as_str() {
            "kappa" => {
                if let Some(Axis::Kappa(v)) = axes.iter().find(|a| matches!(a, Axis::Kappa(_)))
                    && let Some(bad) = v.iter().find(|k| **k < 0.0)
                {
                    return Err(src.error(&e.span, &e.key, format!("κ must be ≥ 0, found {bad}")));
                }
            }
            "zeta" => {
                let targets = |c: &crate::case::ResolvedCase| {
                    c.member.loads.iter().zip(&c.loads).any(|(l, info)| {
                        !matches!(l, crate::model::Load::EndMoments { .. })
                            && zeta_load
                                .as_deref()
                                .is_none_or(|n| info.name.as_deref() == Some(n))
                    })
                };
                if !targets(&case) || variants.iter().any(|v| !targets(&v.case)) {
                    return Err(src.error(
                        &e.key_span,
                        &e.key,
                        "a ζ axis needs a point or distributed load to act on (end moments have no height); add one or drop the axis",
                    ));
                }
            }
            _ => {}
        }
    }
    if case.tolerance.is_some() || variants.iter().any(|v| v.case.tolerance.is_some()) {
        return Err(t.err_at(
            "case",
            "a [solver] tolerance inside a family's case would be ignored: a sweep solves every case with --tolerance (default 1e-4)",
        ));
    }
    let backspan = backspan(src, &t, &axes)?;
    let probe = Family {
        name: name.clone(),
        case: case.clone(),
        axes: axes.clone(),
        zeta_load: zeta_load.clone(),
        variants: Vec::new(),
        backspan,
        patched: Vec::new(),
    };
    if probe.checked_size().is_none() {
        return Err(t.err_here("the grid of this family is too large to count: reduce the axes"));
    }
    Ok(Family {
        name,
        case,
        axes,
        zeta_load,
        variants,
        backspan,
        patched,
    })
}

/// `[family.backspan]`: the far-end support (`far_end`, a preset name, or a
/// table with `preset` and component overrides "fixed" / "free") and
/// `loads` ("none" or "continue"). Needed by, and only with, a
/// `backspan_ratio` axis.
fn backspan(
    src: &Source<'_>,
    t: &Tab<'_>,
    axes: &[Axis],
) -> Result<Option<super::Backspan>, CaseError> {
    use crate::model::backspan::BackspanLoads;
    use crate::model::{Component, Fixity, Support};
    let has_axis = axes.iter().any(|a| matches!(a, Axis::Backspan(_)));
    let table = t.table("backspan")?;
    let Some(loc) = table else {
        return Ok(has_axis.then_some(super::Backspan {
            far: Support::FORK,
            loads: BackspanLoads::None,
        }));
    };
    let bt = loc.tab(src);
    if !has_axis {
        return Err(bt.err_here(
            "a [family.backspan] table needs a `backspan_ratio` axis (backspan length / overhang length), for example backspan_ratio = [0.5, 1.0, 2.0]",
        ));
    }
    bt.check_keys(&["far_end", "loads"], &|_| None)?;
    const PRESETS: &[&str] = &["fork", "built-in", "free"];
    let preset = |p: &str| match p {
        "fork" => Support::FORK,
        "built-in" => Support::BUILT_IN,
        _ => Support::FREE,
    };
    let far = match bt.get("far_end") {
        None => Support::FORK,
        Some(v) if matches!(v.v, DeValue::String(_)) => preset(
            bt.choice("far_end", PRESETS, "support preset")?
                .expect("present")
                .0,
        ),
        Some(_) => {
            let floc = bt.table("far_end")?.expect("a table");
            let ft = floc.tab(src);
            let mut keys = vec!["preset"];
            keys.extend(Component::ALL.map(Component::key));
            ft.check_keys(&keys, &|_| None)?;
            let mut s = ft
                .choice("preset", PRESETS, "support preset")?
                .map_or(Support::FORK, |(p, _)| preset(p));
            for c in Component::ALL {
                if let Some((f, _)) = ft.choice(c.key(), &["fixed", "free"], "fixity")? {
                    *s.component_mut(c) = if f == "fixed" {
                        Fixity::Fixed
                    } else {
                        Fixity::Free
                    };
                }
            }
            s
        }
    };
    let loads = match bt.choice("loads", &["none", "continue"], "backspan load option")? {
        Some(("continue", _)) => BackspanLoads::Continue,
        _ => BackspanLoads::None,
    };
    Ok(Some(super::Backspan { far, loads }))
}

/// A list of numbers, or a range table { from, to, count, spacing }.
fn numbers(src: &Source<'_>, t: &Tab<'_>, k: &str) -> Result<Vec<f64>, CaseError> {
    let v = t.get(k).expect("key present");
    match v.v {
        DeValue::Array(items) => {
            if items.is_empty() {
                return Err(src.error(&v.span, &v.key, format!("`{k}` is an empty list: give at least one value")));
            }
            items
                .iter()
                .enumerate()
                .map(|(i, item)| {
                    let val = crate::case::schema::Val {
                        name: k.into(),
                        key: format!("{}[{i}]", v.key),
                        key_span: v.key_span.clone(),
                        span: item.span(),
                        v: item.get_ref(),
                    };
                    number(src, &val, "").map(|n| n.value)
                })
                .collect()
        }
        DeValue::Table(_) => {
            let loc = t.table(k)?.expect("table");
            range(src, &loc)
        }
        other => Err(src.error(&v.span, &v.key, format!("expected a list of numbers or a range table {{ from, to, count, spacing }}, found {}", type_name(other)))),
    }
}

fn range(src: &Source<'_>, loc: &TabLoc<'_>) -> Result<Vec<f64>, CaseError> {
    let r = loc.tab(src);
    r.check_keys(RANGE_KEYS, &|_| None)?;
    let need = |k: &str| -> Result<crate::case::schema::Num, CaseError> {
        r.num(k)?.ok_or_else(|| {
            r.err_here(format!(
                "a range needs `{k}`: {{ from, to, count, spacing = \"linear\" | \"log\" }}"
            ))
        })
    };
    let (from, to, count) = (need("from")?, need("to")?, need("count")?);
    let log = matches!(
        r.choice("spacing", &["linear", "log"], "spacing")?,
        Some(("log", _))
    );
    if count.value < 1.0 || count.value.fract() != 0.0 || count.value > 1e7 {
        return Err(src.error(
            &count.span,
            &count.key,
            format!("`count` must be a whole number ≥ 1, got {}", count.value),
        ));
    }
    if to.value < from.value {
        return Err(src.error(
            &to.span,
            &to.key,
            format!(
                "the range is inverted: `to` = {} is below `from` = {}",
                to.value, from.value
            ),
        ));
    }
    let n = count.value as usize;
    if n > 1 && to.value == from.value {
        return Err(src.error(
            &to.span,
            &to.key,
            "the range is empty: `to` equals `from` with more than one value",
        ));
    }
    if log && from.value <= 0.0 {
        return Err(src.error(
            &from.span,
            &from.key,
            "a logarithmic range needs `from` > 0",
        ));
    }
    Ok((0..n)
        .map(|i| {
            let s = if n == 1 {
                0.0
            } else {
                i as f64 / (n - 1) as f64
            };
            if i + 1 == n && n > 1 {
                to.value
            } else if log {
                // Twelve significant digits: 0.01 rather than 0.010000000000000004.
                let x = (from.value.ln() + s * (to.value.ln() - from.value.ln())).exp();
                format!("{x:.11e}")
                    .parse()
                    .expect("a formatted float parses")
            } else {
                // Twelve significant digits: 0.2 rather than 0.19999999999999996.
                let x = from.value + s * (to.value - from.value);
                if i == 0 {
                    x
                } else {
                    format!("{x:.11e}")
                        .parse()
                        .expect("a formatted float parses")
                }
            }
        })
        .collect())
}

/// ζ values: numbers, or multiples of κ written "kappa", "-kappa", "1.05*kappa".
fn zetas(src: &Source<'_>, t: &Tab<'_>) -> Result<Vec<AxisValue>, CaseError> {
    let v = t.get("zeta").expect("key present");
    let DeValue::Array(items) = v.v else {
        return Ok(numbers(src, t, "zeta")?
            .into_iter()
            .map(AxisValue::Num)
            .collect());
    };
    if items.is_empty() {
        return Err(src.error(
            &v.span,
            &v.key,
            "`zeta` is an empty list: give at least one value",
        ));
    }
    let mut out = Vec::new();
    for (i, item) in items.iter().enumerate() {
        let key = format!("{}[{i}]", v.key);
        match item.get_ref() {
            DeValue::String(s) => match parse_kappa_multiple(s) {
                Some(c) => out.push(AxisValue::KappaTimes(c)),
                None => {
                    return Err(src.error(&item.span(), &key, format!("\"{s}\" is neither a number nor a multiple of κ; write for example 0.5, \"kappa\", \"-kappa\" or \"1.05*kappa\"")));
                }
            },
            _ => {
                let val = crate::case::schema::Val {
                    name: "zeta".into(),
                    key,
                    key_span: v.key_span.clone(),
                    span: item.span(),
                    v: item.get_ref(),
                };
                out.push(AxisValue::Num(
                    number(src, &val, " or a multiple of κ such as \"kappa\"")?.value,
                ));
            }
        }
    }
    Ok(out)
}

/// "kappa" → 1, "-kappa" → −1, "1.05*kappa" → 1.05, "-0.5*kappa" → −0.5.
pub fn parse_kappa_multiple(s: &str) -> Option<f64> {
    let s = s.trim();
    let (sign, rest) = match s.strip_prefix('-') {
        Some(r) => (-1.0, r.trim()),
        None => (1.0, s.strip_prefix('+').unwrap_or(s).trim()),
    };
    if rest == "kappa" {
        return Some(sign);
    }
    let (c, k) = rest.split_once('*')?;
    if k.trim() != "kappa" {
        return None;
    }
    let c: f64 = c.trim().parse().ok()?;
    c.is_finite().then_some(sign * c)
}

fn directions(src: &Source<'_>, t: &Tab<'_>) -> Result<Vec<Direction>, CaseError> {
    let v = t.get("direction").expect("key present");
    let DeValue::Array(items) = v.v else {
        return Err(src.error(
            &v.span,
            &v.key,
            format!(
                "expected a list such as [\"down\", \"up\"], found {}",
                type_name(v.v)
            ),
        ));
    };
    if items.is_empty() {
        return Err(src.error(
            &v.span,
            &v.key,
            "`direction` is an empty list: give [\"down\"], [\"up\"] or both",
        ));
    }
    items
        .iter()
        .enumerate()
        .map(|(i, item)| match item.get_ref() {
            DeValue::String(s) if s.as_ref() == "down" => Ok(Direction::Down),
            DeValue::String(s) if s.as_ref() == "up" => Ok(Direction::Up),
            other => Err(src.error(
                &item.span(),
                &format!("{}[{i}]", v.key),
                format!("expected \"down\" or \"up\", found {}", type_name(other)),
            )),
        })
        .collect()
}

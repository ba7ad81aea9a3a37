//! End-condition variants of a family: `[[family.variant]]` tables, each a
//! named patch merged onto the inline base case and resolved like a case.
//!
//! Merge rules: `start`/`end` keys override the base's (a `preset` in the
//! variant replaces the whole support); items of `restraint`, `support`,
//! `load`, `continuous_restraint` and `segment` are appended after the
//! base's; any other key replaces the base's. A restraint's `zeta` may be a
//! multiple of κ (`"kappa"`, `"-kappa"`, `"0.5*kappa"`), so that a restraint
//! at a flange follows the κ axis. Because the merged table keeps the spans
//! of the spec, every error points at the spec's own lines.

use super::Variant;
use super::spec::{parse_kappa_multiple, valid_name};
use crate::case::schema::Tab;
use crate::case::span::Source;
use crate::case::{CaseError, ResolvedCase};
use serde_spanned::Spanned;
use toml::de::{DeArray, DeTable, DeValue};

/// Case keys holding arrays of tables: a variant's items are appended.
const ARRAY_KEYS: &[&str] = &[
    "load",
    "restraint",
    "support",
    "continuous_restraint",
    "segment",
];

fn find<'a>(t: &DeTable<'a>, key: &str) -> Option<Spanned<std::borrow::Cow<'a, str>>> {
    t.iter()
        .find(|(k, _)| k.get_ref().as_ref() == key)
        .map(|(k, _)| k.clone())
}

/// Read and resolve the variants of family table `t` whose base case is
/// `base`; `each` sees every variant's merged case table, in order (for
/// axes that patch it further).
pub(crate) fn variants(
    src: &Source<'_>,
    t: &Tab<'_>,
    base: &ResolvedCase,
    each: &mut dyn FnMut(&DeTable<'_>) -> Result<(), CaseError>,
) -> Result<Vec<Variant>, CaseError> {
    let locs = t.tables("variant")?;
    if locs.is_empty() {
        return Ok(Vec::new());
    }
    let Some(base_loc) = t.table("case")? else {
        let v = t.get("variant").expect("present");
        return Err(src.error(
            &v.key_span,
            &v.key,
            "variants need the base case inline as [family.case], not as a file",
        ));
    };
    let kappa_default = t.get("kappa").is_some().then_some(1.0);
    let mut out: Vec<Variant> = Vec::new();
    for loc in &locs {
        let vt = loc.tab(src);
        let Some((name, nv)) = vt.string("name")? else {
            return Err(vt.err_here(
                "missing `name`: every variant needs a name such as \"root-warping-free\"",
            ));
        };
        if !valid_name(&name) {
            return Err(src.error(
                &nv.span,
                &nv.key,
                format!("invalid variant name \"{name}\": use lower-case letters, digits and '-'"),
            ));
        }
        if out.iter().any(|o| o.name == name) {
            return Err(src.error(
                &nv.span,
                &nv.key,
                format!("variant name \"{name}\" is used twice in this family"),
            ));
        }
        let mut merged: DeTable<'_> = base_loc.t.clone();
        let mut kappa_zetas = Vec::new();
        let mut entries: Vec<_> = vt.t.iter().collect();
        entries.sort_by_key(|(k, _)| k.span().start);
        for (k, v) in entries {
            let key: &str = k.get_ref();
            if key == "name" {
                continue;
            }
            let existing = find(&merged, key);
            let new_value = match (key, v.get_ref()) {
                ("start" | "end", DeValue::Table(over)) => {
                    let replace = find(over, "preset").is_some();
                    let mut table = match existing
                        .as_ref()
                        .and_then(|ek| merged.get(ek))
                        .map(|x| x.get_ref())
                    {
                        Some(DeValue::Table(bt)) if !replace => bt.clone(),
                        _ => DeTable::default(),
                    };
                    for (ok, ov) in over.iter() {
                        if let Some(f) = find(&table, ok.get_ref()) {
                            table.remove(&f);
                        }
                        table.insert(ok.clone(), ov.clone());
                    }
                    DeValue::Table(table)
                }
                (a, DeValue::Array(items)) if ARRAY_KEYS.contains(&a) => {
                    let mut arr = match existing
                        .as_ref()
                        .and_then(|ek| merged.get(ek))
                        .map(|x| x.get_ref())
                    {
                        Some(DeValue::Array(b)) => b.clone(),
                        _ => DeArray::new(),
                    };
                    let base_count = if a == "restraint" {
                        base.member.restraints.len()
                    } else {
                        0
                    };
                    for (i, item) in items.iter().enumerate() {
                        let mut item = item.clone();
                        if a == "restraint"
                            && let DeValue::Table(rt) = item.get_mut()
                            && let Some(zk) = find(rt, "zeta")
                        {
                            let zv = rt.get(&zk).expect("found").clone();
                            if let DeValue::String(zs) = zv.get_ref() {
                                let Some(c) = parse_kappa_multiple(zs) else {
                                    return Err(src.error(
                                        &zv.span(),
                                        &format!("{}.restraint[{i}].zeta", loc.path),
                                        format!("\"{zs}\" is neither a number nor a multiple of κ such as \"kappa\" or \"-kappa\""),
                                    ));
                                };
                                kappa_zetas.push((base_count + i, c));
                                rt.remove(&zk);
                                rt.insert(
                                    zk,
                                    Spanned::new(zv.span(), DeValue::Float(Default::default())),
                                );
                            }
                        }
                        arr.push(item);
                    }
                    DeValue::Array(arr)
                }
                _ => v.get_ref().clone(),
            };
            if let Some(ek) = existing {
                merged.remove(&ek);
            }
            merged.insert(k.clone(), Spanned::new(v.span(), new_value));
        }
        let case =
            crate::case::resolve_table(src, &merged, &loc.path, loc.span.clone(), kappa_default)?;
        each(&merged)?;
        out.push(Variant {
            name,
            case,
            kappa_zetas,
        });
    }
    Ok(out)
}

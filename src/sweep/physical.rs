//! Physical axes of a family: `section`, `length` and `height`, each a list
//! of values written exactly as the physical case schema takes them (a
//! `[section]` table, a length such as "2.4 m", a height name such as
//! "top-flange" or a length such as "80 mm"). Every combination patches the
//! inline base case (or each variant's merged case) and is resolved like a
//! case file, so κ and ζ are derived by the case reader and every error
//! points at the spec's own lines.
//!
//! `section` items may carry a `label` (the CSV value; default "section-N");
//! `height` applies to every transverse load, or to the load named by the
//! family's `zeta_load`.

use super::Axis;
use crate::case::schema::{Tab, type_name};
use crate::case::span::Source;
use crate::case::{CaseError, ResolvedCase};
use serde_spanned::Spanned;
use toml::de::{DeTable, DeValue};

fn find<'a>(t: &DeTable<'a>, key: &str) -> Option<Spanned<std::borrow::Cow<'a, str>>> {
    t.iter()
        .find(|(k, _)| k.get_ref().as_ref() == key)
        .map(|(k, _)| k.clone())
}

fn items<'a>(
    src: &Source<'a>,
    t: &Tab<'a>,
    key: &str,
) -> Result<Vec<Spanned<DeValue<'a>>>, CaseError> {
    let v = t.get(key).expect("key present");
    match v.v {
        DeValue::Array(a) if !a.is_empty() => Ok(a.iter().cloned().collect()),
        DeValue::Array(_) => Err(src.error(&v.span, &v.key, format!("`{key}` is an empty list: give at least one value"))),
        other => Err(src.error(
            &v.span,
            &v.key,
            format!(
                "expected a list for the `{key}` axis, found {}; for example {}",
                type_name(other),
                match key {
                    "section" => "section = [{ label = \"ipe-300\", kind = \"i\", h = 300.0, b = 150.0, tf = 10.7, tw = 7.1, r = 15.0 }]",
                    "length" => "length = [\"2.0 m\", \"3.0 m\"]",
                    _ => "height = [\"top-flange\", \"shear-centre\", \"bottom-flange\"]",
                }
            ),
        )),
    }
}

/// The axis of physical key `key` of family table `t`: its labels.
pub(crate) fn axis(src: &Source<'_>, t: &Tab<'_>, key: &str) -> Result<Axis, CaseError> {
    let vals = items(src, t, key)?;
    let mut labels = Vec::new();
    for (i, v) in vals.iter().enumerate() {
        let label = match (key, v.get_ref()) {
            ("section", DeValue::Table(st)) => {
                match find(st, "label").and_then(|k| st.get(&k).cloned()) {
                    Some(l) => match l.get_ref() {
                        DeValue::String(s) if super::spec::valid_name(s) => s.to_string(),
                        _ => {
                            return Err(src.error(
                            &l.span(),
                            &format!("{}.section[{i}].label", t.path),
                            "a section label is a name of lower-case letters, digits and '-' (it appears in tables and file names)",
                        ));
                        }
                    },
                    None => format!("section-{}", i + 1),
                }
            }
            ("section", DeValue::String(s)) => s.to_string(),
            (_, DeValue::String(s)) => s.to_string(),
            (_, DeValue::Integer(n)) => n.as_str().to_string(),
            (_, DeValue::Float(f)) => f.as_str().to_string(),
            (_, other) => {
                return Err(src.error(
                    &v.span(),
                    &format!("{}.{key}[{i}]", t.path),
                    format!(
                        "expected a value as the case's `{key}` takes it, found {}",
                        type_name(other)
                    ),
                ));
            }
        };
        if labels.contains(&label) {
            return Err(src.error(
                &v.span(),
                &format!("{}.{key}[{i}]", t.path),
                format!("\"{label}\" appears twice on the `{key}` axis"),
            ));
        }
        labels.push(label);
    }
    Ok(Axis::Case {
        column: match key {
            "section" => "section",
            "length" => "length",
            _ => "height",
        },
        labels,
    })
}

/// Resolve every combination of the physical axes over case table `base`
/// (the base case, or one variant's merged case), appending to `out` in
/// combination order (axis order, last fastest).
#[allow(clippy::too_many_arguments)]
pub(crate) fn patched(
    src: &Source<'_>,
    t: &Tab<'_>,
    base: &DeTable<'_>,
    axes: &[Axis],
    zeta_load: Option<&str>,
    case_path: &str,
    case_span: std::ops::Range<usize>,
    out: &mut Vec<ResolvedCase>,
) -> Result<(), CaseError> {
    let keys: Vec<&str> = axes
        .iter()
        .filter_map(|a| match a {
            Axis::Case { column, .. } => Some(*column),
            _ => None,
        })
        .collect();
    if keys.is_empty() {
        return Ok(());
    }
    let values: Vec<Vec<Spanned<DeValue<'_>>>> = keys
        .iter()
        .map(|k| items(src, t, k))
        .collect::<Result<_, _>>()?;
    let count: usize = values.iter().map(Vec::len).product();
    {
        for c in 0..count {
            let mut idx = vec![0; keys.len()];
            let mut r = c;
            for (a, ix) in idx.iter_mut().enumerate().rev() {
                *ix = r % values[a].len();
                r /= values[a].len();
            }
            let mut merged = base.clone();
            for (a, key) in keys.iter().enumerate() {
                let v = values[a][idx[a]].clone();
                match *key {
                    "height" => set_heights(&mut merged, v, zeta_load),
                    "section" => {
                        let mut v = v;
                        if let DeValue::Table(st) = v.get_mut()
                            && let Some(k) = find(st, "label")
                        {
                            st.remove(&k);
                        }
                        replace(&mut merged, key, v);
                    }
                    _ => replace(&mut merged, key, v),
                }
            }
            let case =
                crate::case::resolve_table(src, &merged, case_path, case_span.clone(), None)?;
            if !matches!(case.kind, crate::case::CaseKind::Physical(_)) {
                return Err(t.err_at(
                    keys[0],
                    "physical axes (section, length, height) need a physical base case (top-level `length` and a [section])",
                ));
            }
            out.push(case);
        }
    }
    Ok(())
}

fn replace<'a>(t: &mut DeTable<'a>, key: &str, v: Spanned<DeValue<'a>>) {
    let k = match find(t, key) {
        Some(k) => {
            t.remove(&k);
            k
        }
        None => Spanned::new(v.span(), std::borrow::Cow::Owned(key.to_string())),
    };
    t.insert(k, v);
}

/// Set `height` on every transverse load (or the one named `only`).
fn set_heights<'a>(t: &mut DeTable<'a>, v: Spanned<DeValue<'a>>, only: Option<&str>) {
    let Some(lk) = find(t, "load") else { return };
    let Some(loads) = t.get_mut(&lk) else { return };
    let DeValue::Array(arr) = loads.get_mut() else {
        return;
    };
    for item in arr.iter_mut() {
        let DeValue::Table(lt) = item.get_mut() else {
            continue;
        };
        let kind = find(lt, "kind")
            .and_then(|k| lt.get(&k).cloned())
            .and_then(|k| match k.get_ref() {
                DeValue::String(s) => Some(s.to_string()),
                _ => None,
            });
        if kind.as_deref().is_some_and(|k| k.contains("moment")) {
            continue;
        }
        if let Some(name) = only {
            let named = find(lt, "name")
                .and_then(|k| lt.get(&k).cloned())
                .is_some_and(|n| matches!(n.get_ref(), DeValue::String(s) if s.as_ref() == name));
            if !named {
                continue;
            }
        }
        for k in ["height", "zeta"] {
            if let Some(old) = find(lt, k) {
                lt.remove(&old);
            }
        }
        lt.insert(
            Spanned::new(v.span(), std::borrow::Cow::Borrowed("height")),
            v.clone(),
        );
    }
}

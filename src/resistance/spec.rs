//! The `[design]` table (of a physical case, or of a resistance spec), read
//! with located errors (file:line:column and key).

use super::catalogue::{self, Fabrication};
use super::{Code, Design, DesignSection, aisc, ec3};
use crate::case::CaseError;
use crate::case::schema::{Tab, TabLoc};
use crate::case::span::Source;
use crate::section::Shape;
use toml::de::{DeTable, DeValue};

/// Keys of the `[design]` table of a case.
pub const DESIGN_KEYS: &[&str] = &[
    "code",
    "method",
    "gamma_m1",
    "lambda_lt0",
    "beta",
    "curve",
    "kc",
    "phi",
    "omega",
    "grade",
    "fy",
    "fabrication",
    "lb_over_l",
];

/// Extra keys of the top-level `[design]` table of a resistance spec.
pub const SPEC_KEYS: &[&str] = &[
    "name",
    "sections",
    "grades",
    "lengths",
    "load_heights",
    "catalogue",
    "case",
];

const EC3_CODES: &[&str] = &["EN 1993-1-1:2005", "EN 1993-1-1"];
const AISC_CODES: &[&str] = &["AISC 360-16"];

/// A parsed `[design]` table.
#[derive(Debug, Clone, PartialEq)]
pub struct DesignTable {
    /// The design (grade as given by `grade`; a spec's `grades` list is separate).
    pub design: Design,
    /// Lb/L (default 1): the unbraced length used by AISC's F2 as a share of the member length.
    pub lb_over_l: f64,
}

/// Read a `[design]` table; `extra` lists further accepted keys.
pub(crate) fn parse_design(t: &Tab<'_>, extra: &[&str]) -> Result<DesignTable, CaseError> {
    let mut keys: Vec<&str> = DESIGN_KEYS.to_vec();
    keys.extend_from_slice(extra);
    t.check_keys(&keys, &|_| None)?;
    let Some((code, _)) = t.string("code")? else {
        return Err(t.err_at(
            "code",
            "missing `code`: \"EN 1993-1-1:2005\" or \"AISC 360-16\"",
        ));
    };
    let num_pos = |k: &str, def: f64, what: &str| -> Result<f64, CaseError> {
        Ok(t.num_min(k, Some(def), true, what)?
            .map_or(def, |n| n.value))
    };
    let reject = |k: &str, for_code: &str| -> Result<(), CaseError> {
        if t.get(k).is_some() {
            Err(t.err_at(
                k,
                format!("`{k}` belongs to {for_code}; remove it for code \"{code}\""),
            ))
        } else {
            Ok(())
        }
    };
    let code_v = if EC3_CODES.contains(&code.as_str()) {
        for k in ["phi", "omega"] {
            reject(k, "AISC 360-16")?;
        }
        let method = match t.choice("method", &["rolled", "general"], "EN 1993-1-1 method")? {
            Some(("general", _)) => ec3::Method::General,
            _ => ec3::Method::Rolled,
        };
        let curve = match t.choice("curve", &["a", "b", "c", "d"], "buckling curve")? {
            Some((c, _)) => ec3::Curve::from_letter(c),
            None => None,
        };
        let kc = match t.num("kc")? {
            Some(n) if !(n.value > 0.0 && n.value <= 1.0) => {
                return Err(t.err_at(
                    "kc",
                    format!(
                        "kc must lie in (0, 1] (EN 1993-1-1:2005 Table 6.6), got {}",
                        n.value
                    ),
                ));
            }
            Some(_) if method == ec3::Method::General => {
                return Err(t.err_at("kc", "kc (the modification factor f) belongs to method \"rolled\" (6.3.2.3); remove it or set method = \"rolled\""));
            }
            Some(n) => Some(n.value),
            None => None,
        };
        Code::Ec3(ec3::Options {
            method,
            gamma_m1: num_pos("gamma_m1", 1.0, "γM1")?,
            lambda_lt0: t
                .num_min("lambda_lt0", Some(0.4), false, "λ̄LT,0")?
                .map_or(0.4, |n| n.value),
            beta: num_pos("beta", 0.75, "β")?,
            curve,
            kc,
        })
    } else if AISC_CODES.contains(&code.as_str()) {
        for k in ["gamma_m1", "lambda_lt0", "beta", "curve", "kc"] {
            reject(k, "EN 1993-1-1")?;
        }
        match t.choice("method", &["LRFD", "ASD"], "AISC method")? {
            Some(("ASD", _)) => {
                if t.get("phi").is_some() {
                    return Err(t.err_at(
                        "phi",
                        "φb belongs to LRFD; this table has method = \"ASD\" (give `omega`)",
                    ));
                }
                Code::Aisc(aisc::Method::Asd {
                    omega: num_pos("omega", 1.67, "Ωb")?,
                })
            }
            _ => {
                if t.get("omega").is_some() {
                    return Err(t.err_at(
                        "omega",
                        "Ωb belongs to ASD; set method = \"ASD\" or give `phi`",
                    ));
                }
                Code::Aisc(aisc::Method::Lrfd {
                    phi: num_pos("phi", 0.9, "φb")?,
                })
            }
        }
    } else if code.starts_with("EN 1993-1-1:2022") {
        return Err(t.err_at(
            "code",
            "the 2022 edition's rules are not implemented (2005 edition only); use \"EN 1993-1-1:2005\"",
        ));
    } else {
        return Err(t.err_at(
            "code",
            format!("unknown code \"{code}\"; accepted: \"EN 1993-1-1:2005\" (or \"EN 1993-1-1\"), \"AISC 360-16\""),
        ));
    };
    let grade = t.string("grade")?.map(|(g, _)| g);
    let fy = t.num_min("fy", None, true, "fy (MPa)")?.map(|n| n.value);
    let fabrication = match t.choice("fabrication", &["rolled", "welded"], "fabrication")? {
        Some(("welded", _)) => Some(Fabrication::Welded),
        Some(_) => Some(Fabrication::Rolled),
        None => None,
    };
    let lb_over_l = t
        .num_min("lb_over_l", Some(1.0), true, "Lb/L")?
        .map_or(1.0, |n| n.value);
    if lb_over_l > 1.0 {
        return Err(t.err_at(
            "lb_over_l",
            format!("Lb/L must lie in (0, 1], got {lb_over_l}"),
        ));
    }
    Ok(DesignTable {
        design: Design {
            code: code_v,
            grade,
            fy,
            fabrication,
        },
        lb_over_l,
    })
}

/// What a physical case's `[design]` asks for, with its section; None when
/// the case has no `[design]` table.
#[derive(Debug, Clone, PartialEq)]
pub struct CaseDesign {
    /// The parsed table.
    pub table: DesignTable,
    /// The case's section.
    pub section: DesignSection,
}

/// Read the `[design]` table of a case file and the case's `[section]` as
/// the design needs it. Call after the case itself parsed.
///
/// # Errors
///
/// [`CaseError`] at the key: a bad `[design]`, no grade or fy, a section
/// that is not an I-section.
pub fn case_design(text: &str, origin: &str) -> Result<Option<CaseDesign>, CaseError> {
    let src = Source { text, origin };
    let root = DeTable::parse(text)
        .map_err(|e| src.error(&e.span().unwrap_or(0..0), "", e.message().to_string()))?;
    let span = 0..text.len();
    let top = Tab {
        src: &src,
        path: "",
        span: &span,
        t: root.get_ref(),
    };
    let Some(dloc) = top.table("design")? else {
        return Ok(None);
    };
    let dt = dloc.tab(&src);
    let table = parse_design(&dt, &[])?;
    if table.design.grade.is_none() && table.design.fy.is_none() {
        return Err(dt.err_here(
            "the [design] table needs `grade` (for example \"S355\", \"A992\") or `fy` in MPa",
        ));
    }
    let Some(sloc) = top.table("section")? else {
        return Err(dt.err_here("[design] needs the case's [section]"));
    };
    let section = section_of(&src, &sloc)?;
    Ok(Some(CaseDesign { table, section }))
}

/// The section of a `[section]` table as the design needs it.
fn section_of(src: &Source<'_>, sloc: &TabLoc<'_>) -> Result<DesignSection, CaseError> {
    let st = sloc.tab(src);
    if let Some((e, _)) = catalogue::case_lookup(src, &st)? {
        return DesignSection::from_entry(&e).map_err(|m| st.err_at("name", m));
    }
    let kind = st.string("kind")?.map(|(k, _)| k).unwrap_or_default();
    let n = |k: &str| -> Result<f64, CaseError> { Ok(st.num(k)?.map_or(0.0, |x| x.value)) };
    let shape = match kind.as_str() {
        "i" => Shape::I {
            h: n("h")?,
            b: n("b")?,
            tf: n("tf")?,
            tw: n("tw")?,
            r: n("r")?,
        },
        "mono-i" => Shape::MonoI {
            h: n("h")?,
            b_top: n("b_top")?,
            tf_top: n("tf_top")?,
            b_bottom: n("b_bottom")?,
            tf_bottom: n("tf_bottom")?,
            tw: n("tw")?,
            r: n("r")?,
        },
        other => {
            return Err(st.err_at(
                "kind",
                format!("a design resistance needs an I-section: kind \"i\" or \"mono-i\", or a catalogue `name`; this section has kind \"{other}\""),
            ));
        }
    };
    let fab = match shape {
        Shape::I { r, .. } | Shape::MonoI { r, .. } if r > 0.0 => Fabrication::Rolled,
        _ => Fabrication::Welded,
    };
    DesignSection::new(
        "section as given",
        shape,
        fab,
        "dimensions given in the case",
    )
    .map_err(|m| st.err_here(m))
}

/// A string with the byte span it came from.
pub(crate) type Spanned = (String, std::ops::Range<usize>);

/// A value that may be a list of strings: the strings with their spans.
pub(crate) fn string_list(t: &Tab<'_>, k: &str) -> Result<Option<Vec<Spanned>>, CaseError> {
    let Some(v) = t.get(k) else {
        return Ok(None);
    };
    let DeValue::Array(a) = v.v else {
        return Err(t.err_at(
            k,
            format!("`{k}` must be a list of strings, for example [\"IPE 300\", \"HEA 300\"]"),
        ));
    };
    let mut out = Vec::new();
    for x in a.iter() {
        match x.get_ref() {
            DeValue::String(s) => out.push((s.to_string(), x.span())),
            _ => {
                return Err(t.src.error(
                    &x.span(),
                    &t.key(k),
                    format!("every item of `{k}` must be a string"),
                ));
            }
        }
    }
    if out.is_empty() {
        return Err(t.err_at(k, format!("`{k}` is empty; give at least one item")));
    }
    Ok(Some(out))
}

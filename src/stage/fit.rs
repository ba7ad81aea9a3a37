//! The fit stage: for every family that declares fits, fit each form per
//! combination of its other axes from the (cached) sweep results, measure
//! the error bound with fresh engine solves, and write the fit JSON files,
//! the coefficient tables and `fits-summary.json`. Also `eval`: a fit file
//! evaluated at one (κ, ζ).
//!
//! Spec syntax (family key `fit`):
//!
//! ```toml
//! fit = ["surface", "c-curves"]          # defaults
//! [[family.fit]]                          # or tables with options
//! form = "expression"                     # surface | c-curves | expression
//! name = "my-form"                        # file-name part (default: the form)
//! target = 0.01                           # surface/c-curves: target largest relative error
//! threshold = 0.01                        # largest unconservative error of a design formula
//! conservative = false                    # scale the fit down to the safe side
//! digits = 4                              # significant digits printed (2..=8)
//! validation = 2                          # validation points per cell and direction
//! max_degree = 6                          # surface: highest degree in u and in v
//! basis = "polynomial"                    # surface: "polynomial" (default), "rational" or "auto"
//! zeta_rows = 11                          # surface: fit on 11 load-height rows (engine fills the rows between)
//! expression = "a*pi*sqrt(1 + kappa^2) + b*zeta"
//! quantity = "mu_cr"                      # or "mu_ratio" (μcr/μ0)
//! parameters = { a = 1.0, b = -0.5 }      # start values
//! ```

use super::{LoadedSpec, Options, family_rows, solve_points, write_atomic};
use crate::case::CaseError;
use crate::case::schema::{Tab, TabLoc, type_name};
use crate::case::span::Source;
use crate::fit::{
    self, Bounds, Check, Coef, Domain, Formula, Model, Sample, ValidationSettings, ccurves,
    expr::{self, Quantity},
    surface,
};
use crate::sweep::{Axis, AxisValue, CAVEATS, Family, combinations, fmt_num};
use anyhow::{Context, Result, bail};
use serde_json::{Value, json};
use std::collections::BTreeMap;
use std::io::Write;
use std::path::Path;
use toml::de::DeValue;

/// Fit forms.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Form {
    /// Correction surface μcr/μ0.
    Surface,
    /// C1(κ), C2(κ) of the three-factor form.
    CCurves,
    /// A user-written closed form.
    Expression,
}

impl Form {
    /// The spec and file-name word.
    pub fn as_str(self) -> &'static str {
        match self {
            Form::Surface => "surface",
            Form::CCurves => "c-curves",
            Form::Expression => "expression",
        }
    }
}

const FORMS: [&str; 3] = ["surface", "c-curves", "expression"];
const FIT_KEYS: &[&str] = &[
    "form",
    "name",
    "target",
    "threshold",
    "conservative",
    "digits",
    "validation",
    "max_degree",
    "basis",
    "zeta_rows",
    "expression",
    "quantity",
    "parameters",
];

/// One declared fit with its options.
#[derive(Debug, Clone, PartialEq)]
pub struct FitSpec {
    /// The form.
    pub form: Form,
    /// File-name part (default: the form's word).
    pub name: String,
    /// Target largest relative error of the fit itself (surface, c-curves).
    pub target: f64,
    /// Largest unconservative error a design formula may have.
    pub threshold: f64,
    /// Scale the fit to the safe side.
    pub conservative: bool,
    /// Significant digits printed.
    pub digits: usize,
    /// Validation density (points per cell and direction).
    pub validation: usize,
    /// Highest degree of the surface in u and v.
    pub max_degree: usize,
    /// Basis family of the surface.
    pub basis: surface::Basis,
    /// Load-height rows the surface is fitted on (None: the family's own):
    /// evenly spaced across the family's ζ (or ζ/κ) range at every κ of
    /// the grid, the rows between the family's solved by the engine.
    pub zeta_rows: Option<usize>,
    /// Expression source (expression form).
    pub expression: Option<String>,
    /// What the expression gives.
    pub quantity: Quantity,
    /// Parameter names and start values, in file order.
    pub parameters: Vec<(String, f64)>,
}

impl FitSpec {
    /// Defaults for a form.
    pub fn new(form: Form) -> FitSpec {
        FitSpec {
            form,
            name: form.as_str().into(),
            target: 0.01,
            threshold: 0.01,
            conservative: false,
            digits: 4,
            validation: 2,
            max_degree: 6,
            basis: surface::Basis::Polynomial,
            zeta_rows: None,
            expression: None,
            quantity: Quantity::MuCr,
            parameters: Vec::new(),
        }
    }
}

/// The fits declared by each family of the spec (same order as
/// `ls.spec.families`), read with located errors.
pub fn parse_fits(ls: &LoadedSpec) -> Result<Vec<Vec<FitSpec>>, CaseError> {
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
        let mut fits: Vec<FitSpec> = Vec::new();
        if let Some(v) = t.get("fit") {
            let DeValue::Array(items) = v.v else {
                return Err(src.error(
                    &v.span,
                    &v.key,
                    format!(
                        "expected a list such as [\"surface\", \"c-curves\"] or [[{}]] tables, found {}",
                        v.key,
                        type_name(v.v)
                    ),
                ));
            };
            for (j, item) in items.iter().enumerate() {
                let key = format!("{}[{j}]", v.key);
                let spec = match item.get_ref() {
                    DeValue::String(s) => match form_of(s) {
                        Some(Form::Expression) => {
                            return Err(src.error(
                                &item.span(),
                                &key,
                                "the expression form needs its formula: write a [[family.fit]] table with form = \"expression\", expression = \"...\" and parameters = { name = start }",
                            ));
                        }
                        Some(f) => FitSpec::new(f),
                        None => {
                            return Err(src.error(
                                &item.span(),
                                &key,
                                format!(
                                    "unknown fit form \"{s}\"{}; accepted: \"surface\", \"c-curves\", \"expression\"",
                                    crate::case::schema::did_you_mean_value(s, &FORMS)
                                ),
                            ));
                        }
                    },
                    DeValue::Table(tt) => {
                        let tl = TabLoc {
                            path: key.clone(),
                            span: item.span(),
                            t: tt,
                        };
                        fit_table(&src, &tl.tab(&src))?
                    }
                    other => {
                        return Err(src.error(
                            &item.span(),
                            &key,
                            format!(
                                "expected a form name or a table, found {}",
                                type_name(other)
                            ),
                        ));
                    }
                };
                if let Some(prev) = fits.iter().find(|p| p.name == spec.name) {
                    return Err(src.error(
                        &item.span(),
                        &key,
                        format!(
                            "two fits of this family are named \"{}\"; names become file names: give one a `name`",
                            prev.name
                        ),
                    ));
                }
                fits.push(spec);
            }
        }
        out.push(fits);
    }
    Ok(out)
}

fn form_of(s: &str) -> Option<Form> {
    match s {
        "surface" => Some(Form::Surface),
        "c-curves" => Some(Form::CCurves),
        "expression" => Some(Form::Expression),
        _ => None,
    }
}

fn fit_table(src: &Source<'_>, t: &Tab<'_>) -> Result<FitSpec, CaseError> {
    t.check_keys(FIT_KEYS, &|_| None)?;
    let Some((form, _)) = t.choice("form", &FORMS, "fit form")? else {
        return Err(t.err_here("missing `form`: one of \"surface\", \"c-curves\", \"expression\""));
    };
    let mut s = FitSpec::new(form_of(form).expect("listed"));
    if let Some((n, v)) = t.string("name")? {
        if !crate::sweep::spec::valid_name(&n) {
            return Err(src.error(
                &v.span,
                &v.key,
                format!("invalid fit name \"{n}\": use lower-case letters, digits and '-' (it becomes a file name)"),
            ));
        }
        s.name = n;
    }
    let frac = |k: &str, d: f64| -> Result<f64, CaseError> {
        match t.num(k)? {
            None => Ok(d),
            Some(n) if n.value > 0.0 && n.value < 0.5 => Ok(n.value),
            Some(n) => Err(src.error(
                &n.span,
                &n.key,
                format!(
                    "`{k}` is a relative error between 0 and 0.5 (0.01 = 1 %), got {}",
                    n.value
                ),
            )),
        }
    };
    s.target = frac("target", s.target)?;
    s.threshold = frac("threshold", s.threshold)?;
    let int = |k: &str, lo: usize, hi: usize, d: usize| -> Result<usize, CaseError> {
        match t.num(k)? {
            None => Ok(d),
            Some(n) if n.value.fract() == 0.0 && n.value >= lo as f64 && n.value <= hi as f64 => {
                Ok(n.value as usize)
            }
            Some(n) => Err(src.error(
                &n.span,
                &n.key,
                format!(
                    "`{k}` must be a whole number from {lo} to {hi}, got {}",
                    n.value
                ),
            )),
        }
    };
    s.digits = int("digits", 2, 8, s.digits)?;
    s.validation = int("validation", 1, 8, s.validation)?;
    s.max_degree = int("max_degree", 0, 10, s.max_degree)?;
    if t.get("zeta_rows").is_some() {
        if s.form != Form::Surface {
            return Err(t.err_at(
                "zeta_rows",
                "`zeta_rows` belongs to form = \"surface\" only",
            ));
        }
        s.zeta_rows = Some(int("zeta_rows", 2, 41, 0)?);
    }
    if let Some(v) = t.get("conservative") {
        match v.v {
            DeValue::Boolean(b) => s.conservative = *b,
            other => {
                return Err(src.error(
                    &v.span,
                    &v.key,
                    format!("expected true or false, found {}", type_name(other)),
                ));
            }
        }
    }
    if let Some((b, _)) = t.choice(
        "basis",
        &["polynomial", "rational", "auto"],
        "surface basis",
    )? {
        if s.form != Form::Surface {
            return Err(t.err_at("basis", "`basis` belongs to form = \"surface\" only"));
        }
        s.basis = match b {
            "rational" => surface::Basis::Rational,
            "auto" => surface::Basis::Auto,
            _ => surface::Basis::Polynomial,
        };
    }
    if let Some((q, _)) = t.choice("quantity", &["mu_cr", "mu_ratio"], "quantity")? {
        s.quantity = if q == "mu_cr" {
            Quantity::MuCr
        } else {
            Quantity::MuRatio
        };
    }
    let expression = t.string("expression")?;
    let params = t.table("parameters")?;
    if s.form != Form::Expression {
        for k in ["expression", "parameters", "quantity"] {
            if t.get(k).is_some() {
                return Err(t.err_at(k, format!("`{k}` belongs to form = \"expression\" only")));
            }
        }
        return Ok(s);
    }
    let Some((e, ev)) = expression else {
        return Err(t.err_here(
            "missing `expression`: for example expression = \"a*pi*sqrt(1 + kappa^2)\"",
        ));
    };
    let Some(pl) = params else {
        return Err(t.err_here(
            "missing `parameters`: a table of start values such as parameters = { a = 1.0 }",
        ));
    };
    let pt = pl.tab(src);
    for pv in pt.entries() {
        let n = crate::case::schema::number(src, &pv, "")?;
        if matches!(pv.name.as_str(), "kappa" | "zeta" | "pi")
            || !pv
                .name
                .chars()
                .all(|c| c.is_ascii_alphanumeric() || c == '_')
            || pv.name.starts_with(|c: char| c.is_ascii_digit())
        {
            return Err(src.error(
                &pv.key_span,
                &pv.key,
                format!(
                    "parameter name `{}` is not accepted: use letters, digits and '_', not kappa, zeta or pi",
                    pv.name
                ),
            ));
        }
        s.parameters.push((pv.name.clone(), n.value));
    }
    if s.parameters.is_empty() {
        return Err(t.err_at("parameters", "give at least one parameter to fit"));
    }
    let names: Vec<String> = s.parameters.iter().map(|p| p.0.clone()).collect();
    if let Err(err) = expr::parse(&e, &names) {
        return Err(src.error(&ev.span, &ev.key, err.to_string()));
    }
    s.expression = Some(e);
    Ok(s)
}

/// The domain and the κ/ζ axes a family's grid offers, or what to add.
/// The family's monosymmetry path axis: (index in `f.axes`, position among
/// the path axes, values).
fn delta_axis(f: &Family) -> Option<(usize, usize, Vec<f64>)> {
    let mut pos = 0;
    for (i, a) in f.axes.iter().enumerate() {
        if let Axis::Path { field, values, .. } = a {
            if *field == crate::sweep::path::FieldPath::Delta {
                return Some((i, pos, values.clone()));
            }
            pos += 1;
        }
    }
    None
}

/// True when the fit spans the family's δ axis (c-curves with C3) instead
/// of making one fit per δ.
fn spans_delta(f: &Family, spec: &FitSpec) -> bool {
    spec.form == Form::CCurves && delta_axis(f).is_some()
}

/// The domain of one declared fit: the family's (κ, ζ) domain, and for a
/// c-curves fit across δ the δ range too (a ζ axis is then optional: without
/// it the fit holds at ζ = 0).
fn spec_domain(f: &Family, spec: &FitSpec, spec_origin: &str) -> Result<Domain> {
    if !spans_delta(f, spec) {
        return family_domain(f, spec_origin);
    }
    let (_, _, ds) = delta_axis(f).expect("checked");
    let has_zeta = f.axes.iter().any(|a| matches!(a, Axis::Zeta(_)));
    let d = if has_zeta {
        family_domain(f, spec_origin)?
    } else {
        let base = family_domain_kappa(f, spec_origin)?;
        Domain::rectangle([base.0, base.1], [0.0, 0.0])
    };
    let (d0, d1) = (
        ds.iter().copied().fold(f64::INFINITY, f64::min),
        ds.iter().copied().fold(f64::NEG_INFINITY, f64::max),
    );
    if !ds.iter().any(|x| *x != 0.0) || d0 == d1 {
        bail!(
            "{spec_origin}: family {}: a c-curves fit across delta needs at least 2 distinct delta values, some non-zero (C3 is determined by delta != 0); add values to the delta axis",
            f.name
        );
    }
    Ok(d.with_delta([d0, d1]))
}

/// κ range of a family's grid, checked for fits (also the κ part of [`family_domain`]).
fn family_domain_kappa(f: &Family, spec_origin: &str) -> Result<(f64, f64)> {
    let Some(ks) = f.axes.iter().find_map(|a| match a {
        Axis::Kappa(v) => Some(v.clone()),
        _ => None,
    }) else {
        bail!(
            "{spec_origin}: family {}: fits need a kappa axis; add `kappa = [...]` to the family (or drop `fit`)",
            f.name
        );
    };
    let (k0, k1) = (
        ks.iter().copied().fold(f64::INFINITY, f64::min),
        ks.iter().copied().fold(f64::NEG_INFINITY, f64::max),
    );
    let mut distinct = ks.clone();
    distinct.sort_by(f64::total_cmp);
    distinct.dedup();
    if distinct.len() < 3 {
        bail!(
            "{spec_origin}: family {}: a fit needs at least 3 kappa values; add values to the kappa axis",
            f.name
        );
    }
    if k0 <= 0.0 {
        bail!(
            "{spec_origin}: family {}: fits work in ln kappa, so kappa = 0 is not allowed; start the kappa axis at a small positive value such as 0.05",
            f.name
        );
    }
    Ok((k0, k1))
}

fn family_domain(f: &Family, spec_origin: &str) -> Result<Domain> {
    let has_kappa = f.axes.iter().any(|a| matches!(a, Axis::Kappa(_)));
    let zs = f.axes.iter().find_map(|a| match a {
        Axis::Zeta(v) => Some(v.clone()),
        _ => None,
    });
    let (true, Some(zs)) = (has_kappa, zs) else {
        bail!(
            "{spec_origin}: family {}: fits need a kappa axis and a zeta axis; add `kappa = [...]` and `zeta = [...]` to the family (or drop `fit`)",
            f.name
        );
    };
    let (k0, k1) = family_domain_kappa(f, spec_origin)?;
    // ζ = 0 lies on every band (0·κ) as well as in every rectangle.
    let band = zs.iter().any(|z| matches!(z, AxisValue::KappaTimes(_)));
    let nums: Vec<f64> = zs
        .iter()
        .filter_map(|z| match z {
            AxisValue::Num(x) if !(band && *x == 0.0) => Some(*x),
            _ => None,
        })
        .collect();
    let mults: Vec<f64> = zs
        .iter()
        .filter_map(|z| match z {
            AxisValue::KappaTimes(c) => Some(*c),
            AxisValue::Num(x) if band && *x == 0.0 => Some(0.0),
            _ => None,
        })
        .collect();
    let range = |v: &[f64]| {
        [
            v.iter().copied().fold(f64::INFINITY, f64::min),
            v.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        ]
    };
    if !nums.is_empty() && !mults.is_empty() {
        bail!(
            "{spec_origin}: family {}: the zeta axis mixes numbers and multiples of kappa; a fit needs one kind (all numbers for a rectangle, all multiples such as \"kappa\", \"-kappa\" for a band)",
            f.name
        );
    }
    let d = if mults.is_empty() {
        Domain::rectangle([k0, k1], range(&nums))
    } else {
        Domain::band([k0, k1], range(&mults))
    };
    let zr = d.z_range();
    if zs.len() < 2 || zr[0] == zr[1] {
        bail!(
            "{spec_origin}: family {}: a fit needs at least 2 distinct zeta values; add values to the zeta axis",
            f.name
        );
    }
    Ok(d)
}

/// JSON number: −0 as 0, NaN and infinities as null.
fn num(x: f64) -> Value {
    if !x.is_finite() {
        Value::Null
    } else if x == 0.0 {
        json!(0.0)
    } else {
        json!(x)
    }
}

fn at(a: &fit::At) -> Value {
    json!({"value": num(a.value), "kappa": num(a.kappa), "zeta": num(a.zeta)})
}

/// [`at`] with δ when the fit spans δ.
fn at_d(a: &fit::At, mono: bool) -> Value {
    let mut v = at(a);
    if mono {
        v["delta"] = num(a.delta);
    }
    v
}

/// One fit's result.
struct Done {
    file: String,
    json: Value,
    coef_rows: Vec<Vec<String>>,
    extra_rows: Vec<Vec<String>>,
    summary: Value,
}

#[allow(clippy::too_many_arguments)]
fn fit_one(
    f: &Family,
    combo: &crate::sweep::Combination,
    single: bool,
    spec: &FitSpec,
    domain: &Domain,
    samples: &[Sample],
    excluded: usize,
    engine: &mut fit::EngineDelta<'_, anyhow::Error>,
) -> Result<Done> {
    let mono = domain.delta_range().is_some();
    let ctx = || {
        format!(
            "family {}, fit {}, combination {}",
            f.name, spec.name, combo.name
        )
    };
    let mut details = serde_json::Map::new();
    let mut extra_rows: Vec<Vec<String>> = Vec::new();
    // Engine solves of this fit, remembered by point: the validation grid
    // is solved once for choosing a surface's terms and for its bound.
    let mut memo: BTreeMap<[u64; 3], Option<(f64, f64)>> = BTreeMap::new();
    let key = |p: &[f64; 3]| [p[0].to_bits(), p[1].to_bits(), p[2].to_bits()];
    let mut solved = |pts: &[[f64; 3]]| -> Result<Vec<Option<(f64, f64)>>> {
        let mut missing: Vec<[f64; 3]> = Vec::new();
        for p in pts {
            if !memo.contains_key(&key(p)) && !missing.iter().any(|q| key(q) == key(p)) {
                missing.push(*p);
            }
        }
        if !missing.is_empty() {
            for (p, r) in missing.iter().zip(engine(&missing)?) {
                memo.insert(key(p), r);
            }
        }
        Ok(pts.iter().map(|p| memo[&key(p)]).collect())
    };
    let vs = ValidationSettings {
        density: spec.validation,
        ..Default::default()
    };
    // The fit's own grid: the family's, plus engine rows when asked.
    let mut fit_samples: Vec<Sample> = samples.to_vec();
    if let (Form::Surface, Some(n)) = (spec.form, spec.zeta_rows) {
        let pts = added_rows(domain, &fit_samples, n);
        details.insert("zeta_rows".into(), json!(n));
        details.insert("engine_rows_added".into(), json!(pts.len()));
        for (p, r) in pts.iter().zip(solved(&pts)?) {
            match r {
                Some((m, e)) => fit_samples.push(Sample {
                    kappa: p[0],
                    zeta: p[1],
                    delta: p[2],
                    mu_cr: m,
                    error_estimate: e,
                }),
                None => bail!(
                    "{}: the engine did not converge at the added load-height row kappa = {}, zeta = {}",
                    ctx(),
                    p[0],
                    p[1]
                ),
            }
        }
    }
    let samples: &[Sample] = &fit_samples;
    let model = match spec.form {
        Form::Surface => {
            let o = surface::SurfaceOptions {
                target: spec.target,
                max_degree: spec.max_degree,
                folds: 5,
                basis: spec.basis,
            };
            let vpts = fit::validation_points_delta(domain, samples, vs.density);
            let vsamples: Vec<Sample> = vpts
                .iter()
                .zip(solved(&vpts)?)
                .filter_map(|(p, r)| {
                    r.map(|(m, e)| Sample {
                        kappa: p[0],
                        zeta: p[1],
                        delta: p[2],
                        mu_cr: m,
                        error_estimate: e,
                    })
                })
                .collect();
            let s =
                surface::fit_with_validation(samples, &vsamples, domain, o).with_context(ctx)?;
            details.insert("degree_u".into(), json!(s.p));
            details.insert("degree_v".into(), json!(s.q));
            details.insert("terms".into(), json!(s.powers.len()));
            details.insert(
                "basis".into(),
                json!(if s.tensor {
                    "tensor-product"
                } else {
                    "total-degree"
                }),
            );
            details.insert("train_max_rel_error".into(), num(s.train_max_rel));
            details.insert("cross_validation_max_rel_error".into(), num(s.cv_max_rel));
            details.insert("cross_validation_folds".into(), json!(o.folds));
            details.insert(
                "validation_max_rel_error_unrounded".into(),
                num(s.validation_max_rel),
            );
            details.insert("target_met".into(), json!(s.target_met));
            if spec.basis != surface::Basis::Polynomial {
                details.insert("basis_option".into(), json!(spec.basis.as_str()));
                details.insert(
                    "basis_family".into(),
                    json!(if s.is_rational() {
                        "rational"
                    } else {
                        "polynomial"
                    }),
                );
                details.insert("denominator_terms".into(), json!(s.den_powers.len()));
            }
            let m = s.printed(spec.digits);
            let qmin = m.q_min(domain);
            if s.is_rational() {
                if !(qmin > 0.0) {
                    bail!(
                        "{}: the rational surface's denominator, with its coefficients printed to {} digits, reaches {qmin} inside the domain; print more digits (`digits`) or use basis = \"polynomial\"",
                        ctx(),
                        spec.digits
                    );
                }
                details.insert("denominator_min".into(), num(qmin));
            }
            Model::Surface(m)
        }
        Form::CCurves => {
            let c = ccurves::fit(samples, domain, spec.target).with_context(ctx)?;
            details.insert("c1_degree".into(), json!(c.c1.len() - 1));
            if c.c2.is_empty() {
                details.insert("c2_degree".into(), Value::Null);
                details.insert(
                    "c2".into(),
                    json!("not determined: zeta is not swept (every point at zeta = 0); the formula holds at zeta = 0 only"),
                );
            } else {
                details.insert("c2_degree".into(), json!(c.c2.len() - 1));
            }
            details.insert("c1_smoothing_deviation".into(), num(c.c1_smoothing));
            details.insert("c2_smoothing_deviation".into(), num(c.c2_smoothing));
            if mono {
                details.insert("c3_degree".into(), json!(c.c3.len() - 1));
                details.insert("c3_smoothing_deviation".into(), num(c.c3_smoothing));
                details.insert(
                    "c3_sign".into(),
                    json!("C3 multiplies pi*delta/2 with the geometric delta (beta_y with z up, negative when the larger flange is on top): uniform sagging moment gives C3 = +1, uniform hogging moment C3 = -1"),
                );
            } else {
                details.insert(
                    "c3".into(),
                    json!("not fitted: the family does not sweep monosymmetry"),
                );
            }
            let per: Vec<Value> = c
                .per_kappa
                .iter()
                .map(|p| {
                    let mut v = json!({"kappa": num(p.kappa), "c1": num(p.c1), "c2": num(p.c2), "points": p.points,
                    "c1_at_zeta0": p.c1_at_zeta0.map_or(Value::Null, num),
                    "max_rel_error": num(p.max_rel),
                    "unconservative_zeta_positive": num(p.unconservative_zeta_positive),
                    "unconservative_zeta_negative": num(p.unconservative_zeta_negative)});
                    if mono {
                        if !p.c2_determined {
                            v["c2"] = Value::Null;
                        }
                        v["c3"] = p.c3.map_or(Value::Null, num);
                        v["unconservative_zeta_zero"] = num(p.unconservative_zeta_zero);
                    }
                    v
                })
                .collect();
            for p in &c.per_kappa {
                let c2 = if p.c2_determined {
                    fit::print_sig(p.c2, 6)
                } else {
                    String::new()
                };
                let mut row = vec![
                    combo.name.clone(),
                    fmt_num(p.kappa),
                    fit::print_sig(p.c1, 6),
                    c2,
                ];
                if mono {
                    row.push(p.c3.map(|c| fit::print_sig(c, 6)).unwrap_or_default());
                }
                extra_rows.push(row);
                let row = extra_rows.last_mut().expect("pushed");
                row.extend([
                    p.points.to_string(),
                    p.c1_at_zeta0
                        .map(|c| fit::print_sig(c, 6))
                        .unwrap_or_default(),
                    fit::print_sig(p.max_rel, 3),
                    fit::print_sig(p.unconservative_zeta_positive.max(0.0), 3),
                    fit::print_sig(p.unconservative_zeta_negative.max(0.0), 3),
                ]);
                if mono {
                    row.push(fit::print_sig(p.unconservative_zeta_zero.max(0.0), 3));
                }
            }
            details.insert("per_kappa".into(), Value::Array(per));
            let notes: Vec<String> = c
                .per_kappa
                .iter()
                .flat_map(|p| {
                    p.search_notes
                        .iter()
                        .map(move |n| format!("kappa = {}: {n}", fmt_num(p.kappa)))
                })
                .collect();
            if !notes.is_empty() {
                details.insert("search_notes".into(), json!(notes));
            }
            details.insert("zeta_excluded_below".into(), num(ccurves::ZETA_MIN));
            Model::CCurves(c.printed(spec.digits))
        }
        Form::Expression => {
            let src = spec.expression.clone().expect("parsed");
            let names: Vec<String> = spec.parameters.iter().map(|p| p.0.clone()).collect();
            let start: Vec<f64> = spec.parameters.iter().map(|p| p.1).collect();
            let e = expr::fit(&src, &names, &start, spec.quantity, samples).with_context(ctx)?;
            details.insert("train_max_rel_error".into(), num(e.train_max_rel));
            Model::Expression(expr::ExpressionModel {
                source: src,
                quantity: spec.quantity,
                parameters: names
                    .iter()
                    .zip(&e.values)
                    .map(|(n, v)| Coef::new(n, *v, spec.digits))
                    .collect(),
            })
        }
    };
    let mut formula = Formula {
        model,
        factor: None,
    };
    // Cases the engine could not solve are left out of the bound: count them.
    let mut failed = 0usize;
    let mut checks: Vec<Check> = {
        let compiled = formula.compile().with_context(ctx)?;
        let mut counting = |pts: &[[f64; 3]]| -> Result<Vec<Option<(f64, f64)>>> {
            let r = solved(pts)?;
            failed += r.iter().filter(|x| x.is_none()).count();
            Ok(r)
        };
        fit::validate_delta(&compiled, domain, samples, vs, &mut counting)?
    };
    let mut conservative = Value::Null;
    if spec.conservative {
        let s = fit::safe_factor(&checks, spec.digits);
        checks = fit::scale_checks(&checks, s.value);
        conservative = json!({"factor": s.text, "value": num(s.value)});
        if s.value != 1.0 {
            formula.factor = Some(s);
        }
    }
    let b: Bounds = fit::bounds(&checks);
    let design = b.max_unconservative_error.value <= spec.threshold;
    let typst = formula.typst().with_context(ctx)?;
    let coefs = formula.coefficients();
    let labels: serde_json::Map<String, Value> = combo
        .labels
        .iter()
        .map(|(k, v)| (k.clone(), json!(v)))
        .collect();
    let axes: Vec<String> = f.axes.iter().map(|a| a.column().to_string()).collect();
    // The case of this combination's variant, if the family has variants.
    let member = f
        .axes
        .iter()
        .zip(&combo.index)
        .find_map(|(a, &ix)| match a {
            Axis::Variant(v) => Some(&f.variants[v[ix]].case.member),
            _ => None,
        })
        .unwrap_or(&f.case.member);
    let mut definition = format!(
        "family {}: {}; axes {}; ζ {}",
        f.name,
        crate::report::case_summary(member),
        axes.join(", "),
        if domain.band.is_some() {
            "as multiples of κ (band)"
        } else {
            "as plain heights (rectangle)"
        }
    );
    if let Some([d0, d1]) = domain.delta_range() {
        definition.push_str(&format!(
            "; δ from {} to {} inside the fit (C3), not a combination",
            fmt_num(d0),
            fmt_num(d1)
        ));
    }
    let mut note = if design {
        "design formula: the largest unconservative error found is within the threshold".to_string()
    } else {
        format!(
            "NOT A DESIGN FORMULA: the fit lies up to {:.2} % above the engine (threshold {:.2} %); use the tables, or refit with conservative = true",
            100.0 * b.max_unconservative_error.value,
            100.0 * spec.threshold
        )
    };
    if failed > 0 || excluded > 0 {
        note.push_str(&format!(
            "; {excluded} grid cases and {failed} check cases did not solve and are not covered by the bound"
        ));
    }
    let file = if single {
        format!("{}.{}.fit.json", f.name, spec.name)
    } else {
        format!("{}.{}.{}.fit.json", f.name, spec.name, combo.name)
    };
    // A surface met its target when chosen (grid, held-out and validation
    // points, unrounded); it meets it only if the final bound (printed
    // coefficients, search included) does too.
    let target_met = match details.get("target_met") {
        Some(Value::Bool(chosen)) => {
            let met = *chosen && b.max_rel_error.value <= spec.target;
            details.insert("target_met_when_chosen".into(), json!(chosen));
            json!(met)
        }
        other => other.cloned().unwrap_or(Value::Null),
    };
    let curves = sampled_curves(f, domain, &formula).with_context(ctx)?;
    let mut json = json!({
        "caution": crate::CAUTION,
        "caveats": CAVEATS,
        "form": spec.form.as_str(),
        "name": spec.name,
        "family": f.name,
        "combination": combo.name,
        "design_formula": design,
        "note": note,
        "validity": {
            "kappa_min": num(domain.kappa_min),
            "kappa_max": num(domain.kappa_max),
            "zeta_min": num(domain.zeta_min),
            "zeta_max": num(domain.zeta_max),
            "band": domain.band.map_or(Value::Null, num),
            "zeta_over_kappa": domain.zeta_over_kappa.map_or(Value::Null, |t| json!([num(t[0]), num(t[1])])),
            "family_definition": definition,
            "combination_labels": labels,
        },
        "typst": typst,
        "coefficients": coefs.iter().map(|c| json!({"name": c.name, "text": c.text, "value": num(c.value)})).collect::<Vec<_>>(),
        "digits": spec.digits,
        "max_rel_error": num(b.max_rel_error.value),
        "max_unconservative_error": num(b.max_unconservative_error.value),
        "rms_error": num(b.rms_error),
        "where": {
            "max_rel_error": at_d(&b.max_rel_error, mono),
            "max_unconservative_error": at_d(&b.max_unconservative_error, mono),
            "rms_error": "over the validation grid",
        },
        "unconservative_by_side": {
            "zeta_positive": b.unconservative_zeta_positive.as_ref().map_or(Value::Null, |a| at_d(a, mono)),
            "zeta_negative": b.unconservative_zeta_negative.as_ref().map_or(Value::Null, |a| at_d(a, mono)),
        },
        "error_bound_method": "coefficients as printed; fit grid, a validation grid of sub-cell centres offset from it, and a pattern search with the engine around the worst points; each point's finite-element error estimate included (the exact value lies in [fe*(1-e), fe])",
        "points_checked": {"grid": b.points[0], "validation": b.points[1], "search": b.points[2]},
        "cases_excluded": excluded,
        "check_cases_not_solved": failed,
        "target": num(spec.target),
        "threshold": num(spec.threshold),
        "conservative": conservative,
        "fit": Value::Object(details),
        "formula": serde_json::to_value(&formula).context("cannot encode the formula")?,
        "curves": curves,
    });
    if let Some([d0, d1]) = domain.delta_range() {
        json["validity"]["delta_min"] = num(d0);
        json["validity"]["delta_max"] = num(d1);
        json["error_bound_method"] = json!(
            "coefficients as printed; fit grid, a validation grid of sub-cell centres offset from it in kappa, zeta and delta, and a pattern search with the engine around the worst points; each point's finite-element error estimate included (the exact value lies in [fe*(1-e), fe])"
        );
    }
    let coef_rows = coefs
        .iter()
        .map(|c| vec![combo.name.clone(), c.name.clone(), c.text.clone()])
        .collect();
    let summary = json!({
        "family": f.name,
        "form": spec.form.as_str(),
        "name": spec.name,
        "combination": combo.name,
        "file": file,
        "max_rel_error": num(b.max_rel_error.value),
        "max_unconservative_error": num(b.max_unconservative_error.value),
        "rms_error": num(b.rms_error),
        "design_formula": design,
        "target_met": target_met,
        "conservative": conservative.get("factor").cloned().unwrap_or(Value::Null),
        "threshold": num(spec.threshold),
    });
    Ok(Done {
        file,
        json,
        coef_rows,
        extra_rows,
        summary,
    })
}

fn pretty(v: &Value) -> Result<Vec<u8>> {
    let mut b = serde_json::to_vec_pretty(v)?;
    b.push(b'\n');
    Ok(b)
}

/// The fit stage: every declared fit of every family, one per combination.
pub fn run(ls: &LoadedSpec, out: &Path, opts: &Options) -> Result<()> {
    let fits = parse_fits(ls).map_err(anyhow::Error::new)?;
    let origin = ls.origin();
    // Check every family's grid before solving anything.
    let mut plan: Vec<(&Family, &Vec<FitSpec>, Vec<Domain>)> = Vec::new();
    for (f, specs) in ls.spec.families.iter().zip(&fits) {
        if specs.is_empty() {
            continue;
        }
        let doms = specs
            .iter()
            .map(|s| spec_domain(f, s, &origin))
            .collect::<Result<Vec<_>>>()?;
        plan.push((f, specs, doms));
    }
    let pool = opts.pool()?;
    let settings = opts.settings();
    let mut cache = opts.open_cache()?;
    let mut files: Vec<(String, Vec<u8>)> = Vec::new();
    let mut summary: Vec<Value> = Vec::new();
    for (f, specs, domains) in plan {
        let rows = family_rows(f, &settings, &pool, &mut cache)?;
        let lens: Vec<usize> = f.axes.iter().map(Axis::len).collect();
        let axis_index = |i: usize| -> Vec<usize> {
            let mut idx = vec![0; lens.len()];
            let mut r = i;
            for (a, ix) in idx.iter_mut().enumerate().rev() {
                *ix = r % lens[a];
                r /= lens[a];
            }
            idx
        };
        let dax = delta_axis(f);
        let has_zeta = f.axes.iter().any(|a| matches!(a, Axis::Zeta(_)));
        let mut coef_rows: Vec<Vec<Vec<String>>> = vec![Vec::new(); specs.len()];
        let mut extra_rows: Vec<Vec<Vec<String>>> = vec![Vec::new(); specs.len()];
        let mut flags: Vec<Vec<String>> = vec![Vec::new(); specs.len()];
        // Fits per combination of the axes other than κ and ζ first; then
        // the c-curves fits that span δ, per combination of the axes other
        // than κ, ζ and δ.
        let (plain, spanning): (Vec<usize>, Vec<usize>) =
            (0..specs.len()).partition(|&k| !spans_delta(f, &specs[k]));
        let mut groups: Vec<(Vec<crate::sweep::Combination>, Vec<usize>, Option<usize>)> =
            vec![(combinations(f), plain, None)];
        if let (Some((da, _, _)), false) = (&dax, spanning.is_empty()) {
            let skip: Vec<usize> = f
                .axes
                .iter()
                .enumerate()
                .filter(|(i, a)| matches!(a, Axis::Kappa(_) | Axis::Zeta(_)) || i == da)
                .map(|(i, _)| i)
                .collect();
            groups.push((
                crate::sweep::combinations_without(f, &skip),
                spanning,
                Some(*da),
            ));
        }
        for (combos, members, span) in groups {
            if members.is_empty() {
                continue;
            }
            let single = combos.len() == 1 && combos[0].labels.is_empty();
            for combo in &combos {
                let mut samples = Vec::new();
                let mut excluded = 0;
                for (i, r) in rows.iter().enumerate() {
                    let idx = axis_index(i);
                    if combo.axes.iter().any(|&a| idx[a] != combo.index[a]) {
                        continue;
                    }
                    let delta = dax.as_ref().map_or(0.0, |(_, p, _)| r.point.paths[*p]);
                    let zeta = match (r.point.zeta, span.is_some() && !has_zeta) {
                        (Some(z), true) if z != 0.0 => bail!(
                            "{origin}: family {}: without a zeta axis a c-curves fit across delta holds at zeta = 0, but the case's loads act at zeta = {z}; put them at the shear centre or add a zeta axis",
                            f.name
                        ),
                        (_, true) => Some(0.0),
                        (z, false) => z,
                    };
                    match (r.status.as_str(), r.mu_cr, r.error_estimate, zeta) {
                        ("ok", Some(m), Some(e), Some(z)) => samples.push(Sample {
                            kappa: r.point.kappa,
                            zeta: z,
                            delta,
                            mu_cr: m,
                            error_estimate: e,
                        }),
                        _ => excluded += 1,
                    }
                }
                let idx = combo.index.clone();
                let mut engine = |pts: &[[f64; 3]]| -> Result<Vec<Option<(f64, f64)>>> {
                    let points = pts
                        .iter()
                        .map(|p| match span {
                            Some(a) => f.point_with(&idx, Some(p[0]), Some(p[1]), &[(a, p[2])]),
                            None => f.point_at(&idx, Some(p[0]), Some(p[1])),
                        })
                        .collect();
                    let rows = solve_points(points, &settings, &pool, &mut cache)?;
                    Ok(rows
                        .into_iter()
                        .map(|r| match (r.status.as_str(), r.mu_cr, r.error_estimate) {
                            ("ok", Some(m), Some(e)) => Some((m, e)),
                            _ => None,
                        })
                        .collect())
                };
                for &k in &members {
                    let spec = &specs[k];
                    let d = fit_one(
                        f,
                        combo,
                        single,
                        spec,
                        &domains[k],
                        &samples,
                        excluded,
                        &mut engine,
                    )?;
                    if !opts.quiet {
                        eprintln!(
                            "{}: max relative error {:.3} %, max unconservative {:.3} %, rms {:.3} %{}{}",
                            d.file,
                            100.0 * d.summary["max_rel_error"].as_f64().unwrap_or(0.0),
                            100.0
                                * d.summary["max_unconservative_error"]
                                    .as_f64()
                                    .unwrap_or(0.0),
                            100.0 * d.summary["rms_error"].as_f64().unwrap_or(0.0),
                            if d.summary["design_formula"] == json!(true) {
                                ""
                            } else {
                                " (NOT a design formula)"
                            },
                            if d.summary["target_met"] == json!(false) {
                                " (fit target not met)"
                            } else {
                                ""
                            }
                        );
                    }
                    if d.summary["design_formula"] != json!(true) {
                        flags[k].push(combo.name.clone());
                    }
                    coef_rows[k].extend(d.coef_rows);
                    extra_rows[k].extend(d.extra_rows);
                    files.push((d.file, pretty(&d.json)?));
                    summary.push(d.summary);
                }
            }
        }
        for (k, spec) in specs.iter().enumerate() {
            let mut b: Vec<u8> = Vec::new();
            writeln!(b, "# {}", crate::CAUTION)?;
            writeln!(b, "# {CAVEATS}")?;
            writeln!(
                b,
                "# family {}, fit {} (form {}); coefficients as printed, the values every error bound and `ltb-atlas eval` use; formula and error bounds in the .fit.json files",
                f.name,
                spec.name,
                spec.form.as_str()
            )?;
            writeln!(
                b,
                "# base case: {}",
                crate::report::case_summary(&f.case.member)
            )?;
            let domain = &domains[k];
            let mono = domain.delta_range().is_some();
            let z = if domain.band.is_some() {
                "zeta/kappa"
            } else {
                "zeta"
            };
            let formula = match spec.form {
                Form::Surface if spec.basis != surface::Basis::Polynomial => format!(
                    "mu_cr/mu0 = P/Q, P = sum of c<i><j>*u^i*v^j, Q = 1 + sum of q<i><j>*u^i*v^j (Q = 1 where no q<i><j> is listed: a polynomial), with mu0 = pi*sqrt(1 + kappa^2), u = (ln(kappa) - u_shift)/u_scale, v = ({z} - v_shift)/v_scale"
                ),
                Form::Surface => format!(
                    "mu_cr/mu0 = sum of c<i><j>*u^i*v^j with mu0 = pi*sqrt(1 + kappa^2), u = (ln(kappa) - u_shift)/u_scale, v = ({z} - v_shift)/v_scale"
                ),
                Form::CCurves if mono => "mu_cr = C1*pi*(sqrt(1 + kappa^2 + w^2) - w), w = C2*zeta + C3*pi*delta/2, with C1 = sum of a_i*u^i, C2 = sum of b_i*u^i (none listed: not determined, zeta not swept, the formula holds at zeta = 0), C3 = sum of c_i*u^i, u = (ln(kappa) - u_shift)/u_scale; delta = (beta_y/L)*sqrt(E*Iz/(G*It)), negative when the larger flange is on top".to_string(),
                Form::CCurves => "mu_cr = C1*pi*(sqrt(1 + kappa^2 + (C2*zeta)^2) - C2*zeta) with C1 = sum of a_i*u^i, C2 = sum of b_i*u^i, u = (ln(kappa) - u_shift)/u_scale".to_string(),
                Form::Expression => format!(
                    "{} = {}",
                    if spec.quantity == Quantity::MuCr {
                        "mu_cr"
                    } else {
                        "mu_cr/(pi*sqrt(1 + kappa^2))"
                    },
                    spec.expression.as_deref().unwrap_or("")
                ),
            };
            writeln!(
                b,
                "# formula: {formula}{}",
                if spec.conservative {
                    "; times `factor` where listed (the safe-side factor)"
                } else {
                    ""
                }
            )?;
            if flags[k].is_empty() {
                writeln!(
                    b,
                    "# every combination is within the unconservative threshold"
                )?;
            } else {
                writeln!(
                    b,
                    "# NOT A DESIGN FORMULA for combination(s) {}: unconservative error above the threshold",
                    flags[k].join(", ")
                )?;
            }
            writeln!(b, "combination,name,value")?;
            for r in &coef_rows[k] {
                writeln!(b, "{}", r.join(","))?;
            }
            files.push((format!("{}.{}.coefficients.csv", f.name, spec.name), b));
            if spec.form == Form::CCurves {
                let mut b: Vec<u8> = Vec::new();
                writeln!(b, "# {}", crate::CAUTION)?;
                writeln!(b, "# {CAVEATS}")?;
                if mono {
                    writeln!(
                        b,
                        "# family {}: per-kappa least-squares C1, C2, C3 of mu_cr = C1*pi*(sqrt(1 + kappa^2 + w^2) - w), w = C2*zeta + C3*pi*delta/2, across zeta and delta; points with |zeta| < {} and delta = 0 left out; c2 empty where not determined (zeta not swept); c1_at_zeta0 = mu_cr(kappa, 0, 0)/(pi*sqrt(1 + kappa^2)) where the grid holds zeta = delta = 0; errors relative, fit above the engine counted as unconservative, by side of zeta = 0 and at zeta = 0 (points with delta != 0)",
                        f.name,
                        ccurves::ZETA_MIN
                    )?;
                    writeln!(
                        b,
                        "combination,kappa,c1,c2,c3,points,c1_at_zeta0,max_rel_error,unconservative_zeta_positive,unconservative_zeta_negative,unconservative_zeta_zero"
                    )?;
                } else {
                    writeln!(
                        b,
                        "# family {}: per-kappa least-squares C1, C2 of mu_cr = C1*pi*(sqrt(1 + kappa^2 + (C2*zeta)^2) - C2*zeta), |zeta| < {} left out; c1_at_zeta0 = mu_cr(kappa, 0)/(pi*sqrt(1 + kappa^2)) where the grid holds zeta = 0; errors relative, fit above the engine counted as unconservative, by side of zeta = 0",
                        f.name,
                        ccurves::ZETA_MIN
                    )?;
                    writeln!(
                        b,
                        "combination,kappa,c1,c2,points,c1_at_zeta0,max_rel_error,unconservative_zeta_positive,unconservative_zeta_negative"
                    )?;
                }
                for r in &extra_rows[k] {
                    writeln!(b, "{}", r.join(","))?;
                }
                files.push((format!("{}.{}.per-kappa.csv", f.name, spec.name), b));
            }
        }
    }
    let s = json!({"caution": crate::CAUTION, "entries": summary});
    files.push(("fits-summary.json".into(), pretty(&s)?));
    for (name, bytes) in &files {
        write_atomic(&out.join(name), bytes)?;
    }
    let families: Vec<&str> = ls.spec.families.iter().map(|f| f.name.as_str()).collect();
    let written: Vec<&str> = files.iter().map(|(n, _)| n.as_str()).collect();
    remove_stale(out, &families, &written)?;
    Ok(())
}

/// Points of the `n` load-height rows of a surface fit that the family's
/// grid lacks: at every κ of the samples, n values of the fit variable z
/// (ζ, or ζ/κ on a band) evenly spaced over the samples' z range; a row
/// within 1e-9 of one the samples hold is theirs.
fn added_rows(domain: &Domain, samples: &[Sample], n: usize) -> Vec<[f64; 3]> {
    let mut ks: Vec<f64> = samples.iter().map(|s| s.kappa).collect();
    ks.sort_by(f64::total_cmp);
    ks.dedup_by(|a, b| (*a - *b).abs() <= 1e-12 * b.abs());
    let zs: Vec<f64> = samples.iter().map(|s| domain.z(s.kappa, s.zeta)).collect();
    let (z0, z1) = zs
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &z| {
            (a.min(z), b.max(z))
        });
    let delta = samples.first().map_or(0.0, |s| s.delta);
    let mut out = Vec::new();
    for &k in &ks {
        for r in 0..n {
            let z = if n > 1 {
                z0 + (z1 - z0) * r as f64 / (n - 1) as f64
            } else {
                z0
            };
            let held = samples
                .iter()
                .any(|s| s.kappa == k && (domain.z(s.kappa, s.zeta) - z).abs() <= 1e-9);
            if !held {
                out.push([k, domain.zeta(k, z), delta]);
            }
        }
    }
    out
}

/// An error bound for reading: three significant digits, rounded up (so
/// that a bound never prints smaller than measured; 0.00312 → 0.00313).
fn up3(x: f64) -> String {
    if !(x > 0.0) || !x.is_finite() {
        return "0".into();
    }
    let e = x.log10().floor() as i32 - 2;
    let q = 10f64.powi(e);
    let r = (x / q * (1.0 - 1e-12)).ceil() * q;
    fit::print_sig(r, 3)
}

/// Remove fit outputs of this spec's families that this run did not write
/// (a fit or combination dropped from the spec since an earlier run into
/// the same folder), so that charts and pages reading the folder never pick
/// up a stale fit. Only files named by the fit stage's own patterns
/// (`<family>.….fit.json`, `.coefficients.csv`, `.per-kappa.csv`) of a
/// family in `families` are touched; other files in the folder stay.
fn remove_stale(out: &Path, families: &[&str], written: &[&str]) -> Result<()> {
    const OURS: [&str; 3] = [".fit.json", ".coefficients.csv", ".per-kappa.csv"];
    let Ok(rd) = std::fs::read_dir(out) else {
        return Ok(());
    };
    let mut names: Vec<String> = rd
        .flatten()
        .filter_map(|e| e.file_name().into_string().ok())
        .filter(|n| OURS.iter().any(|s| n.ends_with(s)))
        .collect();
    names.sort();
    for n in names {
        if written.contains(&n.as_str()) {
            continue;
        }
        if families.iter().any(|f| n.starts_with(&format!("{f}."))) {
            let p = out.join(&n);
            std::fs::remove_file(&p)
                .with_context(|| format!("cannot remove the stale fit output {}", p.display()))?;
        }
    }
    Ok(())
}

/// One evaluation of a fit file.
#[derive(Debug, Clone, PartialEq)]
pub struct Evaluation {
    /// κ.
    pub kappa: f64,
    /// ζ.
    pub zeta: f64,
    /// δ (0 unless given).
    pub delta: f64,
    /// μcr from the fit.
    pub mu_cr: f64,
    /// μcr/μ0.
    pub mu_ratio: f64,
    /// Outside the validity domain (only with `extrapolate`).
    pub extrapolated: Option<String>,
    /// The fit file's JSON.
    pub fit: Value,
}

/// Evaluate a fit file at (κ, ζ), with exactly its printed coefficients.
/// Outside the validity domain it refuses unless `extrapolate`.
pub fn eval(path: &Path, kappa: f64, zeta: f64, extrapolate: bool) -> Result<Evaluation> {
    eval_delta(path, kappa, zeta, 0.0, extrapolate)
}

/// [`eval`] at (κ, ζ, δ): a fit made across δ (c-curves with C3) takes
/// any δ in its fitted range (outside it only with `extrapolate`); a fit
/// made per δ value takes its combination's δ (or the default 0, meaning
/// the same), and a fit without δ only δ = 0.
pub fn eval_delta(
    path: &Path,
    kappa: f64,
    zeta: f64,
    delta: f64,
    extrapolate: bool,
) -> Result<Evaluation> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read the fit file {}", path.display()))?;
    let v: Value = serde_json::from_str(&text)
        .with_context(|| format!("{} is not a fit file (JSON)", path.display()))?;
    let formula: Formula = serde_json::from_value(v["formula"].clone()).with_context(|| {
        format!(
            "{}: no readable `formula`; write it again with `ltb-atlas fit`",
            path.display()
        )
    })?;
    let domain: Domain = serde_json::from_value(v["validity"].clone())
        .with_context(|| format!("{}: no readable `validity`", path.display()))?;
    if !(kappa.is_finite() && zeta.is_finite() && delta.is_finite()) || kappa < 0.0 {
        bail!("--kappa must be a number ≥ 0, --zeta and --delta numbers");
    }
    // A fit not made across δ holds at one δ: its combination's (a fit per
    // δ value) or 0. Either spelling of that δ is accepted; the formula does
    // not take δ then.
    let mut delta_in_formula = delta;
    if domain.delta_range().is_none() {
        let own: Option<f64> = v["validity"]["combination_labels"]["delta"]
            .as_str()
            .and_then(|t| t.trim().parse().ok());
        let at = own.unwrap_or(0.0);
        if delta != 0.0 && (delta - at).abs() > 1e-12 * at.abs().max(1.0) {
            match own {
                Some(d) => bail!(
                    "{}: --delta {delta}: this fit is for delta = {d} (its combination), not made across a monosymmetry axis; pass --delta {d} or drop --delta",
                    path.display()
                ),
                None => bail!(
                    "{}: --delta {delta}: this fit was not made across a monosymmetry axis, so it holds for delta = 0 only; drop --delta",
                    path.display()
                ),
            }
        }
        delta_in_formula = 0.0;
    }
    let outside = domain.outside_delta(kappa, zeta, delta_in_formula);
    if let (Some(why), false) = (&outside, extrapolate) {
        bail!(
            "{}: {why}; the fit holds only inside its validity domain (pass --extrapolate to evaluate anyway, marked as extrapolated)",
            path.display()
        );
    }
    let compiled = formula
        .compile()
        .map_err(|e| anyhow::anyhow!("{}: {e}", path.display()))?;
    let mu_cr = compiled.mu_cr_delta(kappa, zeta, delta_in_formula);
    Ok(Evaluation {
        kappa,
        zeta,
        delta,
        mu_cr,
        mu_ratio: mu_cr / fit::mu0(kappa),
        extrapolated: outside,
        fit: v,
    })
}

impl Evaluation {
    /// The JSON object `eval --json` prints.
    pub fn to_json(&self) -> Value {
        let mut v = self.to_json_plain();
        if !self.fit["validity"]["delta_min"].is_null() {
            v["delta"] = num(self.delta);
        }
        v
    }

    fn to_json_plain(&self) -> Value {
        json!({
            "kappa": num(self.kappa),
            "zeta": num(self.zeta),
            "mu_cr": num(self.mu_cr),
            "mu_ratio": num(self.mu_ratio),
            "extrapolated": self.extrapolated.is_some(),
            "extrapolation_note": self.extrapolated.clone().map_or(Value::Null, Value::String),
            "family": self.fit["family"],
            "form": self.fit["form"],
            "combination": self.fit["combination"],
            "design_formula": self.fit["design_formula"],
            "max_rel_error": self.fit["max_rel_error"],
            "max_unconservative_error": self.fit["max_unconservative_error"],
            "caution": crate::CAUTION,
        })
    }

    /// The readable text `eval` prints.
    pub fn to_text(&self) -> String {
        let mut s = String::new();
        let pct = |k: &str| 100.0 * self.fit[k].as_f64().unwrap_or(f64::NAN);
        s.push_str(&format!(
            "fit {} ({}), family {}, combination {}\n",
            self.fit["name"].as_str().unwrap_or("?"),
            self.fit["form"].as_str().unwrap_or("?"),
            self.fit["family"].as_str().unwrap_or("?"),
            self.fit["combination"].as_str().unwrap_or("?")
        ));
        if let Some(d) = self.fit["validity"]["family_definition"].as_str() {
            s.push_str(&format!("{d}\n"));
        }
        let d = if self.fit["validity"]["delta_min"].is_null() {
            String::new()
        } else {
            format!(", delta = {}", fmt_num(self.delta))
        };
        s.push_str(&format!(
            "kappa = {}, zeta = {}{d}\nmu_cr = {}\nmu_cr/mu0 = {}\n",
            fmt_num(self.kappa),
            fmt_num(self.zeta),
            fit::print_sig(self.mu_cr, 6),
            fit::print_sig(self.mu_ratio, 6)
        ));
        s.push_str(&format!(
            "measured error bound of the fit: {} % (largest unconservative {} %)\n",
            up3(pct("max_rel_error")),
            up3(pct("max_unconservative_error"))
        ));
        if self.fit["design_formula"] != json!(true) {
            s.push_str("NOT A DESIGN FORMULA: its unconservative error exceeds the threshold\n");
        }
        if let Some(w) = &self.extrapolated {
            s.push_str(&format!(
                "EXTRAPOLATED: {w}; the error bound does not apply\n"
            ));
        }
        s.push_str(&format!("{}\n", crate::CAUTION));
        s
    }
}

/// Points per sampled curve of a fit (for charts).
const CURVE_POINTS: usize = 61;

/// The printed formula sampled along each ζ value of the family's ζ axis
/// (a multiple of κ stays a multiple), over the κ validity range (log-spaced
/// when the range allows): `[{zeta_index, zeta_label, kappa, mu_cr,
/// mu_ratio}]`, for charts that draw the fitted curves through the engine's
/// points. Points outside the formula's ζ domain are left out.
fn sampled_curves(f: &Family, domain: &Domain, formula: &Formula) -> Result<Value> {
    use crate::sweep::AxisValue;
    let compiled = formula.compile()?;
    let Some(Axis::Zeta(zs)) = f.axes.iter().find(|a| matches!(a, Axis::Zeta(_))) else {
        return Ok(json!([]));
    };
    let (k0, k1) = (domain.kappa_min, domain.kappa_max);
    let log = k0 > 0.0 && k1 / k0 > 3.0;
    let kappa_at = |i: usize| {
        let t = i as f64 / (CURVE_POINTS - 1) as f64;
        if log {
            (k0.ln() + t * (k1.ln() - k0.ln())).exp()
        } else {
            k0 + t * (k1 - k0)
        }
    };
    // A fit across δ: one curve per ζ and per δ of the family's δ axis.
    let deltas: Vec<Option<f64>> = match (domain.delta_range(), delta_axis(f)) {
        (Some(_), Some((_, _, ds))) => ds.into_iter().map(Some).collect(),
        _ => vec![None],
    };
    let mut out = Vec::new();
    for (j, z) in zs.iter().enumerate() {
        for &delta in &deltas {
            let (mut ks, mut mus, mut ratios) = (Vec::new(), Vec::new(), Vec::new());
            for i in 0..CURVE_POINTS {
                let k = kappa_at(i);
                let zeta = match *z {
                    AxisValue::Num(x) => x,
                    AxisValue::KappaTimes(c) => c * k,
                };
                if domain.outside(k, zeta).is_some() {
                    continue;
                }
                let mu = compiled.mu_cr_delta(k, zeta, delta.unwrap_or(0.0));
                if !mu.is_finite() {
                    continue;
                }
                ks.push(num(k));
                mus.push(num(mu));
                ratios.push(num(mu / fit::mu0(k)));
            }
            let mut c = json!({"zeta_index": j, "kappa": ks, "mu_cr": mus, "mu_ratio": ratios});
            if let Some(d) = delta {
                c["delta"] = num(d);
            }
            out.push(c);
        }
    }
    Ok(Value::Array(out))
}

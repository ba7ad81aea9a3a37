//! Office rules: coefficients an office uses every day, declared in the spec
//! so that they can be checked like the built-in rules without touching code.
//!
//! ```toml
//! [[rule]]
//! name = "office-udl"                  # [a-z0-9][a-z0-9-]*, not a built-in name
//! form = "three-factor"                # C1/C2 for mu = C1*pi*[sqrt(1+kappa^2+(C2*zeta)^2) - C2*zeta]; or "mu"
//! c1 = "1.13 + 0.02*kappa"             # expressions in kappa, zeta, psi ...
//! c2 = "0.45"
//! # mu = "..."                         # ... or mu directly (form = "mu")
//! # table = "office-c1.csv"            # ... or a CSV table (relative to the spec): a key column
//! #                                    #     `kappa` or `psi`, then c1[,c2] or mu; linear between rows
//! member = "beam"                      # "beam" (held laterally and in twist at both ends), "cantilever", "any"
//! source = "Office design guide 4, table 2 (2019)"   # required
//! clause = "table 2"
//! edition = "2019"
//! [rule.limits]                        # outside these the rule is not applicable
//! kappa = [0.1, 3.0]
//! zeta = [-1.0, 1.0]
//! psi = [-1.0, 1.0]
//! ```
//!
//! Expressions are those of fitted formulas (`crate::fit::expr`): numbers,
//! `kappa`, `zeta`, `psi`, `pi`, `+ - * / ^`, parentheses and `sqrt`, `ln`,
//! `exp`, `abs`; any other name is refused with its location.
//!
//! ζ in an office rule is the load height on the destabilising side positive
//! (the three-factor formula's convention); ψ is the ratio of the smaller to
//! the larger end moment (+1 uniform moment) and exists only for end-moment
//! patterns: a rule that uses ψ does not apply to other patterns. Outside the
//! table's key range or the limits the rule is not applicable.
//!
//! # References
//! - evalexpr 13 (the parser behind `crate::fit::expr`), <https://docs.rs/evalexpr/13>.
//! - NCCI SN003a-EN-EU, §3 (the three-factor form the C1/C2 expressions feed).

use super::pattern::{Pattern, Span};
use super::{Outcome, RuleInfo, three_factor_mu};
use crate::case::CaseError;
use crate::case::schema::{Tab, number_of, type_name};
use crate::case::span::Source;
use toml::de::DeValue;

/// Which members an office rule covers.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MemberKind {
    /// Held laterally and in twist at both ends.
    Beam,
    /// Built-in cantilever with a free tip.
    Cantilever,
    /// Both.
    Any,
}

/// A parsed expression with its text: the expression language of fitted
/// formulas ([`crate::fit::expr`]), with ψ as its one named parameter.
#[derive(Debug, Clone)]
pub struct Expr {
    /// As written.
    pub text: String,
    tree: crate::fit::expr::Expr,
}

/// True when `e` contains a node for which `hit` holds.
fn mentions(e: &crate::fit::expr::Expr, hit: &dyn Fn(&crate::fit::expr::Expr) -> bool) -> bool {
    use crate::fit::expr::Expr as E;
    hit(e)
        || match e {
            E::Neg(a) | E::Call(_, a) => mentions(a, hit),
            E::Add(a, b) | E::Sub(a, b) | E::Mul(a, b) | E::Div(a, b) | E::Pow(a, b) => {
                mentions(a, hit) || mentions(b, hit)
            }
            _ => false,
        }
}

impl Expr {
    fn parse(text: &str) -> Result<Expr, String> {
        let tree = crate::fit::expr::parse(text, &["psi".to_string()]).map_err(|e| match e {
            crate::fit::FitError::UnknownName(n) => format!(
                "unknown variable `{n}` in \"{text}\": the expression may use kappa, zeta, psi and pi{}",
                if n == "PI" { " (write pi for π)" } else { "" }
            ),
            other => format!("cannot read the expression \"{text}\": {other}"),
        })?;
        Ok(Expr {
            text: text.to_string(),
            tree,
        })
    }
    fn uses(&self, v: &str) -> bool {
        use crate::fit::expr::{Expr as E, Var};
        mentions(&self.tree, &|e| {
            matches!(
                (v, e),
                ("psi", E::Param(0)) | ("kappa", E::Var(Var::Kappa)) | ("zeta", E::Var(Var::Zeta))
            )
        })
    }
    fn eval(&self, kappa: f64, zeta: f64, psi: Option<f64>) -> Result<f64, String> {
        let psi = if self.uses("psi") {
            psi.ok_or("psi is defined only for end-moment patterns")?
        } else {
            0.0
        };
        let x = crate::fit::expr::eval(&self.tree, kappa, zeta, &[psi]);
        if x.is_finite() {
            Ok(x)
        } else {
            Err(format!("\"{}\" is not finite here", self.text))
        }
    }
}

/// Where the values come from.
// A handful of rules per spec: the size difference of the variants does not matter.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone)]
pub enum Body {
    /// Three-factor form with C1 and (optionally) C2 expressions.
    Factors {
        /// C1.
        c1: Expr,
        /// C2 (absent: the rule covers ζ = 0 only).
        c2: Option<Expr>,
    },
    /// μ directly.
    Mu(Expr),
    /// A table: key column, then rows of values (c1[, c2] or mu).
    Table {
        /// "kappa" or "psi".
        key: String,
        /// Value columns: ["c1"], ["c1", "c2"] or ["mu"].
        columns: Vec<String>,
        /// (key, values) in increasing key order.
        rows: Vec<(f64, Vec<f64>)>,
        /// The file as named in the spec.
        file: String,
    },
}

/// An office rule.
#[derive(Debug, Clone)]
pub struct OfficeRule {
    /// Name.
    pub name: String,
    /// Clause (as the office states it).
    pub clause: String,
    /// Edition.
    pub edition: String,
    /// Source.
    pub source: String,
    /// Members covered.
    pub member: MemberKind,
    /// The values.
    pub body: Body,
    /// Limits on κ, ζ, ψ (inclusive).
    pub limits: [Option<(f64, f64)>; 3],
}

impl OfficeRule {
    /// Clause, edition, source and limits.
    pub fn info(&self) -> RuleInfo {
        let lim: Vec<String> = ["kappa", "zeta", "psi"]
            .iter()
            .zip(&self.limits)
            .filter_map(|(n, l)| {
                l.map(|(a, b)| {
                    format!(
                        "{} <= {n} <= {}",
                        crate::sweep::fmt_num(a),
                        crate::sweep::fmt_num(b)
                    )
                })
            })
            .collect();
        let body = match &self.body {
            Body::Factors { c1, c2 } => format!(
                "three-factor form, C1 = {}{}",
                c1.text,
                c2.as_ref()
                    .map(|c| format!(", C2 = {}", c.text))
                    .unwrap_or_else(|| " (no C2: zeta = 0 only)".into())
            ),
            Body::Mu(e) => format!("mu = {}", e.text),
            Body::Table {
                key, columns, file, ..
            } => format!(
                "table {file}: {} against {key}, linear between rows, not applicable outside its range",
                columns.join(", ")
            ),
        };
        RuleInfo {
            name: self.name.clone(),
            clause: if self.clause.is_empty() {
                "office rule (no clause stated)".into()
            } else {
                self.clause.clone()
            },
            edition: if self.edition.is_empty() {
                "not stated".into()
            } else {
                self.edition.clone()
            },
            source: self.source.clone(),
            limits: format!(
                "members: {}; {}",
                match self.member {
                    MemberKind::Beam => "beams held laterally and in twist at both ends",
                    MemberKind::Cantilever => "built-in cantilevers with a free tip",
                    MemberKind::Any => "beams and cantilevers",
                },
                if lim.is_empty() {
                    "no limits on kappa, zeta, psi stated".to_string()
                } else {
                    lim.join(", ")
                }
            ),
            memory: String::new(),
            interpretation: format!(
                "{body}; zeta positive on the destabilising side; psi = smaller/larger end moment"
            ),
        }
    }

    fn uses_psi(&self) -> bool {
        match &self.body {
            Body::Factors { c1, c2 } => {
                c1.uses("psi") || c2.as_ref().is_some_and(|c| c.uses("psi"))
            }
            Body::Mu(e) => e.uses("psi"),
            Body::Table { key, .. } => key == "psi",
        }
    }

    /// μ by the rule.
    pub fn evaluate(&self, p: &Pattern) -> Outcome {
        let na = |s: String| Outcome::NotApplicable(s);
        match (self.member, p.span) {
            (MemberKind::Beam, Span::Cantilever { .. }) => {
                return na("cantilever: the rule covers beams".into());
            }
            (MemberKind::Cantilever, Span::Beam { .. }) => {
                return na("beam: the rule covers cantilevers".into());
            }
            _ => {}
        }
        let Some(zeta) = p.zeta else {
            return na("loads at different heights or in different directions".into());
        };
        let psi = p.psi();
        if psi.is_none() && (self.uses_psi() || self.limits[2].is_some()) {
            return na("psi is defined only for end-moment patterns".into());
        }
        for ((n, l), v) in
            ["kappa", "zeta", "psi"]
                .iter()
                .zip(&self.limits)
                .zip([Some(p.kappa), Some(zeta), psi])
        {
            if let (Some((a, b)), Some(v)) = (l, v)
                && !(v >= *a && v <= *b)
            {
                return na(format!(
                    "{n} = {} outside the rule's limits",
                    crate::sweep::fmt_num(v)
                ));
            }
        }
        let res: Result<(f64, String), String> = match &self.body {
            Body::Factors { c1, c2 } => (|| {
                let c1v = c1.eval(p.kappa, zeta, psi)?;
                let c2v = match c2 {
                    Some(c) => c.eval(p.kappa, zeta, psi)?,
                    None if zeta != 0.0 => {
                        return Err("zeta != 0 needs C2, which the rule does not give".into());
                    }
                    None => 0.0,
                };
                Ok((
                    three_factor_mu(c1v, c2v, p.kappa, zeta),
                    format!("C1={c1v:.4} C2={c2v:.4}"),
                ))
            })(),
            Body::Mu(e) => e
                .eval(p.kappa, zeta, psi)
                .map(|m| (m, "mu by expression".to_string())),
            Body::Table {
                key, columns, rows, ..
            } => (|| {
                let x = if key == "kappa" {
                    p.kappa
                } else {
                    psi.expect("checked")
                };
                let (lo, hi) = (rows[0].0, rows[rows.len() - 1].0);
                if !(x >= lo && x <= hi) {
                    return Err(format!(
                        "{key} = {} outside the table ({}..{})",
                        crate::sweep::fmt_num(x),
                        crate::sweep::fmt_num(lo),
                        crate::sweep::fmt_num(hi)
                    ));
                }
                let i = rows
                    .iter()
                    .rposition(|r| r.0 <= x)
                    .expect("inside")
                    .min(rows.len().saturating_sub(2));
                let vals: Vec<f64> = if rows.len() == 1 {
                    rows[0].1.clone()
                } else {
                    let (a, b) = (&rows[i], &rows[i + 1]);
                    let t = (x - a.0) / (b.0 - a.0);
                    a.1.iter().zip(&b.1).map(|(u, v)| u + t * (v - u)).collect()
                };
                if columns[0] == "mu" {
                    Ok((vals[0], "mu from table".to_string()))
                } else {
                    let c2 = vals.get(1).copied();
                    if c2.is_none() && zeta != 0.0 {
                        return Err("zeta != 0 needs C2, which the table does not give".into());
                    }
                    let c2 = c2.unwrap_or(0.0);
                    Ok((
                        three_factor_mu(vals[0], c2, p.kappa, zeta),
                        format!("C1={:.4} C2={c2:.4} (table)", vals[0]),
                    ))
                }
            })(),
        };
        match res {
            Ok((mu, f)) if mu > 0.0 && mu.is_finite() => Outcome::Applies { mu, factors: f },
            Ok((mu, _)) => na(format!("the rule gives mu = {mu}, not a positive number")),
            Err(e) => na(e),
        }
    }
}

const RULE_KEYS: &[&str] = &[
    "name", "form", "c1", "c2", "mu", "table", "member", "source", "clause", "edition", "limits",
];

/// Parse the office rules (`[[rule]]` tables) of a spec. `read` returns the
/// text of a table file named relative to the spec (the caller does the I/O).
pub fn parse_office_rules(
    text: &str,
    origin: &str,
    read: &dyn Fn(&str) -> Result<String, String>,
) -> Result<Vec<OfficeRule>, CaseError> {
    let src = Source { text, origin };
    let root = src.parse()?;
    let top = Tab::top(&src, root.get_ref());
    let mut out: Vec<OfficeRule> = Vec::new();
    for loc in top.tables("rule")? {
        let t = loc.tab(&src);
        t.check_keys(RULE_KEYS, &|_| None)?;
        let Some((name, nv)) = t.string("name")? else {
            return Err(t.err_here("missing `name`: every rule needs a name such as \"office-udl\" (families list it in `rules`)"));
        };
        if !crate::sweep::spec::valid_name(&name) {
            return Err(src.error(&nv.span, &nv.key, format!("invalid rule name \"{name}\": use lower-case letters, digits and '-' (it becomes a file name)")));
        }
        if super::BUILT_IN.contains(&name.as_str()) {
            return Err(src.error(
                &nv.span,
                &nv.key,
                format!("\"{name}\" is a built-in rule; give the office rule another name"),
            ));
        }
        if out.iter().any(|r| r.name == name) {
            return Err(src.error(
                &nv.span,
                &nv.key,
                format!("rule name \"{name}\" is used twice"),
            ));
        }
        let form = t
            .choice("form", &["three-factor", "mu"], "form")?
            .map(|c| c.0)
            .unwrap_or("three-factor");
        let member = match t
            .choice("member", &["beam", "cantilever", "any"], "member kind")?
            .map(|c| c.0)
        {
            Some("beam") => MemberKind::Beam,
            Some("cantilever") => MemberKind::Cantilever,
            _ => MemberKind::Any,
        };
        let Some((source, _)) = t.string("source")? else {
            return Err(t.err_here("missing `source`: state the document (and table or clause) the rule comes from; it is printed with every output"));
        };
        let clause = t.string("clause")?.map(|s| s.0).unwrap_or_default();
        let edition = t.string("edition")?.map(|s| s.0).unwrap_or_default();
        let expr = |k: &str| -> Result<Option<Expr>, CaseError> {
            match t.string(k)? {
                None => Ok(None),
                Some((s, v)) => Expr::parse(&s)
                    .map(Some)
                    .map_err(|m| src.error(&v.span, &v.key, m)),
            }
        };
        let (c1, c2, mu) = (expr("c1")?, expr("c2")?, expr("mu")?);
        let table = t.string("table")?;
        let body = match (form, table) {
            (_, Some((file, v))) => {
                if c1.is_some() || c2.is_some() || mu.is_some() {
                    return Err(src.error(
                        &v.span,
                        &v.key,
                        "give either `table` or expressions (`c1`/`c2` or `mu`), not both",
                    ));
                }
                let body = read(&file).map_err(|m| {
                    src.error(
                        &v.span,
                        &v.key,
                        format!("cannot read the table \"{file}\": {m}"),
                    )
                })?;
                parse_table(&body, &file, form)
                    .map_err(|m| src.error(&v.span, &v.key, format!("table \"{file}\": {m}")))?
            }
            ("mu", None) => {
                if c1.is_some() || c2.is_some() {
                    return Err(t.err_at("c1", "form = \"mu\" takes `mu`, not `c1`/`c2`"));
                }
                Body::Mu(mu.ok_or_else(|| {
                    t.err_here("missing `mu`: an expression in kappa, zeta and psi, or a `table`")
                })?)
            }
            (_, None) => {
                if mu.is_some() {
                    return Err(t.err_at(
                        "mu",
                        "`mu` needs form = \"mu\"; the three-factor form takes `c1` and `c2`",
                    ));
                }
                Body::Factors {
                    c1: c1.ok_or_else(|| t.err_here("missing `c1`: an expression in kappa, zeta and psi (and `c2` for loads off the shear centre), or a `table`"))?,
                    c2,
                }
            }
        };
        let mut limits = [None, None, None];
        if let Some(l) = t.table("limits")? {
            let lt = l.tab(&src);
            lt.check_keys(&["kappa", "zeta", "psi"], &|_| None)?;
            for (i, k) in ["kappa", "zeta", "psi"].iter().enumerate() {
                let Some(v) = lt.get(k) else { continue };
                let pair = match v.v {
                    DeValue::Array(a) if a.len() == 2 => {
                        let x: Vec<Option<f64>> = a
                            .iter()
                            .map(|e| number_of(e.get_ref()).filter(|x| x.is_finite()))
                            .collect();
                        match (x[0], x[1]) {
                            (Some(a), Some(b)) if a <= b => Some((a, b)),
                            _ => None,
                        }
                    }
                    _ => None,
                };
                match pair {
                    Some(p) => limits[i] = Some(p),
                    None => {
                        return Err(src.error(
                            &v.span,
                            &v.key,
                            format!(
                                "expected [min, max] with min <= max, found {}",
                                type_name(v.v)
                            ),
                        ));
                    }
                }
            }
        }
        out.push(OfficeRule {
            name,
            clause,
            edition,
            source,
            member,
            body,
            limits,
        });
    }
    Ok(out)
}

fn parse_table(text: &str, file: &str, form: &str) -> Result<Body, String> {
    let mut r = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let header: Vec<String> = r
        .headers()
        .map_err(|e| e.to_string())?
        .iter()
        .map(|s| s.to_lowercase())
        .collect();
    let key = header.first().cloned().unwrap_or_default();
    if key != "kappa" && key != "psi" {
        return Err(format!(
            "the first column must be `kappa` or `psi`, found `{key}`"
        ));
    }
    let columns: Vec<String> = header[1..].to_vec();
    let ok = match form {
        "mu" => columns == ["mu"],
        _ => columns == ["c1"] || columns == ["c1", "c2"],
    };
    if !ok {
        return Err(format!(
            "after `{key}` the columns must be {} (found {})",
            if form == "mu" {
                "`mu`"
            } else {
                "`c1` or `c1,c2`"
            },
            columns.join(",")
        ));
    }
    let mut rows: Vec<(f64, Vec<f64>)> = Vec::new();
    for rec in r.records() {
        let rec = rec.map_err(|e| e.to_string())?;
        let line = rec.position().map(|p| p.line()).unwrap_or(0);
        let nums: Result<Vec<f64>, String> = rec
            .iter()
            .map(|s| {
                s.parse::<f64>()
                    .ok()
                    .filter(|x| x.is_finite())
                    .ok_or_else(|| format!("{file}:{line}: \"{s}\" is not a finite number"))
            })
            .collect();
        let nums = nums?;
        if nums.len() != header.len() {
            return Err(format!("{file}:{line}: expected {} values", header.len()));
        }
        if let Some(last) = rows.last()
            && !(nums[0] > last.0)
        {
            return Err(format!(
                "{file}:{line}: `{key}` values must increase row by row"
            ));
        }
        rows.push((nums[0], nums[1..].to_vec()));
    }
    if rows.is_empty() {
        return Err("the table has no rows".into());
    }
    Ok(Body::Table {
        key,
        columns,
        rows,
        file: file.to_string(),
    })
}

/// The `rules` list of every family, in family order, with located errors:
/// each name must be a built-in rule or an office rule of the spec.
pub fn parse_family_rules(
    text: &str,
    origin: &str,
    office: &[OfficeRule],
) -> Result<Vec<Vec<String>>, CaseError> {
    let src = Source { text, origin };
    let root = src.parse()?;
    let top = Tab::top(&src, root.get_ref());
    let mut known: Vec<&str> = super::BUILT_IN.to_vec();
    known.extend(office.iter().map(|o| o.name.as_str()));
    let mut out = Vec::new();
    for loc in top.tables("family")? {
        let t = loc.tab(&src);
        let mut names: Vec<String> = Vec::new();
        if let Some(v) = t.get("rules") {
            let DeValue::Array(items) = v.v else {
                return Err(src.error(&v.span, &v.key, format!("expected a list of rule names such as [\"three-factor\", \"aisc-cb\"], found {}", type_name(v.v))));
            };
            for (i, item) in items.iter().enumerate() {
                let key = format!("{}[{i}]", v.key);
                let DeValue::String(s) = item.get_ref() else {
                    return Err(src.error(
                        &item.span(),
                        &key,
                        format!("expected a rule name, found {}", type_name(item.get_ref())),
                    ));
                };
                if !known.contains(&s.as_ref()) {
                    return Err(src.error(
                        &item.span(),
                        &key,
                        format!(
                            "unknown rule \"{s}\"{}; built-in rules: {}; office rules are declared in [[rule]] tables{}",
                            crate::case::schema::did_you_mean_value(s, &known),
                            crate::case::schema::string_list(&super::BUILT_IN),
                            if office.is_empty() { String::new() } else { format!(" (this spec declares {})", office.iter().map(|o| format!("\"{}\"", o.name)).collect::<Vec<_>>().join(", ")) }
                        ),
                    ));
                }
                if names.iter().any(|n| n == s.as_ref()) {
                    return Err(src.error(
                        &item.span(),
                        &key,
                        format!("rule \"{s}\" is listed twice"),
                    ));
                }
                names.push(s.to_string());
            }
        }
        out.push(names);
    }
    Ok(out)
}

//! Case files (TOML) → the dimensionless [`Member`] model, with errors that
//! name the file, line, column and key.
//!
//! INTERFACE FIXED BY THE ENGINE (keep these names): [`ResolvedCase`],
//! [`CaseKind`], [`PhysicalInfo`], [`LoadInfo`], [`CaseError`],
//! [`parse_case`], [`load_case`].

mod resolve;
pub(crate) mod schema;
pub(crate) mod span;
#[cfg(test)]
mod tests;
pub(crate) mod units;

use crate::model::{Member, Scales};
use crate::section::Properties;
use std::path::Path;

/// A case ready for the solver, with what is needed to report it.
#[derive(Debug, Clone)]
pub struct ResolvedCase {
    /// The dimensionless model.
    pub member: Member,
    /// Factors back to physical units (identity for dimensionless cases).
    pub scales: Scales,
    /// Dimensionless or physical, with details for the report.
    pub kind: CaseKind,
    /// One entry per `[[load]]`, in file order (for "loads at the critical factor").
    pub loads: Vec<LoadInfo>,
    /// Solver tolerance from `[solver] tolerance` if given.
    pub tolerance: Option<f64>,
    /// Notes the report must print (for example "κ = 0: warping restraints ignored").
    pub notes: Vec<String>,
    /// The `name` of each `[[restraint]]`, in file order (sweep axes address them).
    pub restraint_names: Vec<Option<String>>,
    /// Key, line and column of `[start]`, `[end]`, every `[[support]]` and
    /// `[[restraint]]`, in that order (for errors about the supports as a whole).
    pub supports_at: Vec<(String, usize, usize)>,
}

/// Which kind of case.
#[derive(Debug, Clone)]
pub enum CaseKind {
    /// E·Iz = G·It = L = 1.
    Dimensionless,
    /// A real section, length and material.
    Physical(PhysicalInfo),
}

/// Physical details for the report.
#[derive(Debug, Clone)]
pub struct PhysicalInfo {
    /// Length, m.
    pub length: f64,
    /// E, MPa.
    pub e: f64,
    /// G, MPa.
    pub g: f64,
    /// Reference section properties. For `kind = "properties"`, values the
    /// file does not give (`area`, the named heights) are NaN.
    pub section: Properties,
    /// A one-line description of the section (for example "I 300×150×10.7×7.1, r 15 mm").
    pub section_label: String,
}

/// A load as the user gave it, for reporting its critical value.
#[derive(Debug, Clone)]
pub struct LoadInfo {
    /// Optional `name` from the file.
    pub name: Option<String>,
    /// `kind` as given (point, uniform, distributed, end-moments).
    pub kind: String,
    /// Magnitudes as given (value; or value and value_end; or start and end), in
    /// the file's units (kN, kN/m, kN·m; dimensionless for dimensionless cases).
    pub values: Vec<f64>,
    /// Unit label of `values` ("kN", "kN/m", "kN·m" or "" for dimensionless).
    pub unit: String,
    /// Height above the shear centre in ζ units (None for end moments).
    pub zeta: Option<f64>,
    /// Position text for the report (for example "x = 0.5 L").
    pub position: String,
    /// "down" or "up" as the load acts (after the sign of `value`); None for
    /// end moments.
    pub direction: Option<&'static str>,
}

/// A case-file error: where and what.
#[derive(Debug, Clone, thiserror::Error)]
#[error("{}", self.render())]
pub struct CaseError {
    /// File path as given (or "<input>").
    pub file: String,
    /// 1-based line (0 when unknown).
    pub line: usize,
    /// 1-based column (0 when unknown).
    pub column: usize,
    /// The key path, for example `load[1].at` (empty when the file as a whole is wrong).
    pub key: String,
    /// What is wrong and how to fix it.
    pub message: String,
}

impl CaseError {
    /// `file:line:column: key: message`; without a position (line 0, for
    /// example an unreadable file) only `file: message`.
    fn render(&self) -> String {
        let key = if self.key.is_empty() {
            String::new()
        } else {
            format!("{}: ", self.key)
        };
        if self.line == 0 {
            format!("{}: {key}{}", self.file, self.message)
        } else {
            format!(
                "{}:{}:{}: {key}{}",
                self.file, self.line, self.column, self.message
            )
        }
    }
}

/// Parse a case from text. `origin` names the file in errors.
///
/// The TOML is read into a span-preserving tree ([`toml::de::DeTable`]) and
/// walked by hand, so that every error names the line, column and key path,
/// unknown keys are rejected with the accepted keys listed, and `nan`/`inf`
/// literals are refused. The resulting [`Member`] is checked with
/// [`Member::validate`], whose field paths are mapped back to the file.
///
/// Physical cases are scaled with the project's conventions:
///
/// ```text
/// κ = (π/L)·√(E·Iw/(G·It))    ζ = (π·a/L)·√(E·Iz/(G·It))    δ = (βy/L)·√(E·Iz/(G·It))
/// Mu = √(E·Iz·G·It)/L         point load unit Mu/L, distributed Mu/L², axial n = N·L²/(E·Iz)
/// ```
///
/// # References
/// - ltb-atlas project, *Domain notes: elastic lateral–torsional buckling, conventions for this
///   project* (`shared/domain-notes.md`), section "Dimensionless parameters".
/// - TOML v1.0.0 specification, <https://toml.io/en/v1.0.0> (float literals `nan`, `inf`).
pub fn parse_case(text: &str, origin: &str) -> Result<ResolvedCase, CaseError> {
    let src = span::Source { text, origin };
    let root = toml::de::DeTable::parse(text).map_err(|e| syntax_error(&src, &e))?;
    resolve::resolve(&src, root.get_ref())
}

/// One step of the way to a case table inside a larger TOML document.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Step<'a> {
    /// A key of a table.
    Key(&'a str),
    /// An element of an array of tables (0-based).
    Index(usize),
}

/// Parse a case held in a table of a larger document, for example
/// `[Step::Key("family"), Step::Index(0), Step::Key("case")]` for the inline
/// `[family.case]` of a sweep spec's first family. Errors carry the
/// document's own lines and columns and keys prefixed with the path
/// (`family[0].case.load[1].at`).
pub fn parse_case_in(
    text: &str,
    origin: &str,
    steps: &[Step<'_>],
) -> Result<ResolvedCase, CaseError> {
    parse_case_in_with(text, origin, steps, None)
}

/// As [`parse_case_in`], with a κ to use when the table gives neither
/// `kappa` nor `length` (a sweep family whose κ comes from its axis).
pub fn parse_case_in_with(
    text: &str,
    origin: &str,
    steps: &[Step<'_>],
    kappa_default: Option<f64>,
) -> Result<ResolvedCase, CaseError> {
    use toml::de::DeValue;
    let src = span::Source { text, origin };
    let root = toml::de::DeTable::parse(text).map_err(|e| syntax_error(&src, &e))?;
    let mut table = root.get_ref();
    let mut span = 0..0;
    let mut path = String::new();
    let missing = |path: &str, span: &std::ops::Range<usize>| {
        src.error(
            span,
            path,
            format!("no table `{path}` here: give the case inline or as a file"),
        )
    };
    let mut i = 0;
    while i < steps.len() {
        let Step::Key(k) = steps[i] else {
            return Err(missing(&path, &span));
        };
        let Some((key, value)) = table.iter().find(|(kk, _)| kk.get_ref() == k) else {
            let p = if path.is_empty() {
                k.to_string()
            } else {
                format!("{path}.{k}")
            };
            return Err(missing(&p, &span));
        };
        path = if path.is_empty() {
            k.to_string()
        } else {
            format!("{path}.{k}")
        };
        span = key.span();
        let mut v = value.get_ref();
        if let Some(Step::Index(n)) = steps.get(i + 1) {
            match v {
                DeValue::Array(items) if *n < items.len() => {
                    span = items[*n].span();
                    v = items[*n].get_ref();
                    path = format!("{path}[{n}]");
                }
                _ => return Err(missing(&format!("{path}[{n}]"), &span)),
            }
            i += 1;
        }
        match v {
            DeValue::Table(t) => table = t,
            _ => return Err(src.error(&span, &path, format!("`{path}` must be a table"))),
        }
        i += 1;
    }
    resolve::resolve_in(&src, table, &path, span, kappa_default)
}

/// Resolve a case from a table of an already parsed document (crate use:
/// sweep variants merge tables before resolving them).
pub(crate) fn resolve_table(
    src: &span::Source<'_>,
    table: &toml::de::DeTable<'_>,
    path: &str,
    span: std::ops::Range<usize>,
    kappa_default: Option<f64>,
) -> Result<ResolvedCase, CaseError> {
    resolve::resolve_in(src, table, path, span, kappa_default)
}

/// A TOML syntax error as a [`CaseError`].
fn syntax_error(src: &span::Source<'_>, e: &toml::de::Error) -> CaseError {
    let span = e.span().unwrap_or(0..0);
    let message = e.message().trim().to_string();
    if message == "duplicate key" {
        let start = span.start.min(src.text.len());
        let line_start = src.text[..start].rfind('\n').map_or(0, |i| i + 1);
        let line = src.text[line_start..].lines().next().unwrap_or("").trim();
        let header = line.starts_with('[');
        let name = if header {
            line.split(']')
                .next()
                .unwrap_or("")
                .trim_start_matches('[')
                .trim()
                .to_string()
        } else {
            src.slice(&span).trim().trim_matches('"').to_string()
        };
        let message = if header {
            format!(
                "table [{name}] is defined more than once; merge the two into one [{name}] table \
                 (repeated items such as loads are written [[load]])"
            )
        } else {
            format!("key `{name}` is given more than once in the same table; keep one")
        };
        return src.error(&span, &name, message);
    }
    src.error(&span, "", format!("TOML syntax error: {message}"))
}

/// Read and parse a case file.
pub fn load_case(path: &Path) -> Result<ResolvedCase, CaseError> {
    let origin = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|e| CaseError {
        file: origin.clone(),
        line: 0,
        column: 0,
        key: String::new(),
        message: format!("cannot read the case file: {e}"),
    })?;
    parse_case(&text, &origin)
}

//! Section catalogues: the built-in rows (`data/sections/*.csv`, compiled in)
//! and users' own CSV files, with errors that name the file, line and column.
//!
//! # Format
//!
//! ```text
//! # comment lines start with '#'; blank lines are skipped
//! name,kind,unit,h,b,tf,tw,r,b_top,tf_top,b_bottom,tf_bottom,fabrication,source,a,iy,iz,it,iw,wel_y,wpl_y
//! IPE 300,i,mm,300,150,10.7,7.1,15,,,,,rolled,<where the row was read>,53.8,8360,604,19.9,0.126,557,628
//! GIRDER 1,mono-i,mm,800,,,10,0,300,25,200,20,welded,own design,,,,,,,
//! ```
//!
//! * `name` (required, unique after normalisation: case, spaces and `-`
//!   ignored, `HEA 300` = `HE 300 A`), `kind` `i` or `mono-i`, `unit` `mm` or
//!   `in`; dimensions `h, b, tf, tw, r` (kind `i`) or `h, b_top, tf_top,
//!   b_bottom, tf_bottom, tw, r` (kind `mono-i`) in that unit; `r` the root
//!   radius (0 for welded plates); `fabrication` `rolled` or `welded`
//!   (selects the code's buckling curve); `source` (required): where the
//!   dimensions were read.
//! * Published properties (optional, may be empty; used only to check the
//!   computed ones): `a` (cm² or in²), `iy`, `iz`, `it` (cm⁴ or in⁴), `iw` (dm⁶
//!   or in⁶), `wel_y`, `wpl_y` (cm³ or in³). y is the major axis.
//! * Columns may come in any order; unknown columns are an error.

use crate::case::CaseError;
use crate::case::schema::Tab;
use crate::case::span::Source;
use crate::section::{SectionError, Shape, properties};
use std::path::Path;

/// How a section was made (selects the buckling curve of EN 1993-1-1).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Fabrication {
    /// Hot-rolled.
    Rolled,
    /// Welded from plates.
    Welded,
}

impl Fabrication {
    /// The CSV / TOML spelling.
    pub fn as_str(self) -> &'static str {
        match self {
            Fabrication::Rolled => "rolled",
            Fabrication::Welded => "welded",
        }
    }
}

/// Properties as a table prints them (SI rows: cm², cm⁴, dm⁶, cm³; inch rows:
/// in², in⁴, in⁶, in³), each optional.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Published {
    /// Area.
    pub a: Option<f64>,
    /// Major-axis second moment.
    pub iy: Option<f64>,
    /// Minor-axis second moment.
    pub iz: Option<f64>,
    /// Torsion constant.
    pub it: Option<f64>,
    /// Warping constant.
    pub iw: Option<f64>,
    /// Major-axis elastic modulus.
    pub wel_y: Option<f64>,
    /// Major-axis plastic modulus.
    pub wpl_y: Option<f64>,
}

/// Length unit of a catalogue row.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Unit {
    /// Millimetres (published properties in cm-based table units).
    Mm,
    /// Inches (published properties in inch units).
    In,
}

impl Unit {
    /// Millimetres per unit.
    pub fn mm(self) -> f64 {
        match self {
            Unit::Mm => 1.0,
            Unit::In => 25.4,
        }
    }
}

/// One catalogue row.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// The name as written in the catalogue.
    pub name: String,
    /// The shape in mm.
    pub shape: Shape,
    /// Rolled or welded.
    pub fabrication: Fabrication,
    /// Where the row's dimensions were read.
    pub source: String,
    /// The row's unit.
    pub unit: Unit,
    /// Published properties in table units.
    pub published: Published,
    /// File and line of the row (for messages).
    pub origin: String,
}

/// A catalogue error: file, line, column and what to do.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{}", if *line == 0 { format!("{file}: {message}") } else { format!("{file}:{line}:{column}: {message}") })]
pub struct CatalogueError {
    /// The file as given.
    pub file: String,
    /// 1-based line (0 when the file as a whole is wrong).
    pub line: usize,
    /// 1-based column of the field (0 when the whole row is meant).
    pub column: usize,
    /// What is wrong and how to fix it.
    pub message: String,
}

/// The built-in catalogue files: (file name, text).
pub const BUILT_IN: &[(&str, &str)] = &[
    (
        "data/sections/eu-ipe.csv",
        include_str!("../../data/sections/eu-ipe.csv"),
    ),
    (
        "data/sections/eu-he.csv",
        include_str!("../../data/sections/eu-he.csv"),
    ),
    (
        "data/sections/us-w.csv",
        include_str!("../../data/sections/us-w.csv"),
    ),
];

const COLUMNS: &[&str] = &[
    "name",
    "kind",
    "unit",
    "h",
    "b",
    "tf",
    "tw",
    "r",
    "b_top",
    "tf_top",
    "b_bottom",
    "tf_bottom",
    "fabrication",
    "source",
    "a",
    "iy",
    "iz",
    "it",
    "iw",
    "wel_y",
    "wpl_y",
];

/// The key names are compared by: upper case, without spaces, `-`, `_`;
/// `HEA300` is written `HE300A` (European H series, both spellings in use).
pub fn normalise(name: &str) -> String {
    let mut k: String = name
        .chars()
        .filter(|c| !c.is_whitespace() && *c != '-' && *c != '_')
        .flat_map(|c| c.to_uppercase())
        .collect();
    let b = k.as_bytes();
    if b.len() > 3 && k.starts_with("HE") && b[2].is_ascii_alphabetic() && b[3].is_ascii_digit() {
        let series = k[2..3].to_string();
        k = format!("HE{}{}", &k[3..], series);
    }
    k
}

/// Parse catalogue text. `file` names it in errors.
///
/// # Errors
///
/// [`CatalogueError`] at the line and column of the first bad field: unknown
/// or missing columns, a bad number, an unknown kind/unit/fabrication, a
/// missing source, dimensions the section module rejects, duplicate names.
pub fn parse(text: &str, file: &str) -> Result<Vec<Entry>, CatalogueError> {
    let err = |line: usize, column: usize, message: String| CatalogueError {
        file: file.to_owned(),
        line,
        column,
        message,
    };
    let mut header: Option<Vec<String>> = None;
    let mut entries: Vec<Entry> = Vec::new();
    let mut seen: Vec<(String, usize)> = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line_no = i + 1;
        let line = raw.trim_end_matches('\r');
        if line.trim().is_empty() || line.trim_start().starts_with('#') {
            continue;
        }
        let fields = split_row(line);
        let Some(h) = &header else {
            for (f, col) in &fields {
                if !COLUMNS.contains(&f.as_str()) {
                    return Err(err(
                        line_no,
                        *col,
                        format!(
                            "unknown column `{f}`; the columns are {}",
                            COLUMNS.join(", ")
                        ),
                    ));
                }
            }
            for req in ["name", "kind", "unit", "h", "tw", "fabrication", "source"] {
                if !fields.iter().any(|(f, _)| f == req) {
                    return Err(err(
                        line_no,
                        0,
                        format!(
                            "the header has no `{req}` column; a catalogue needs at least name, kind, unit, h, tw, fabrication, source and the flange columns of its kinds"
                        ),
                    ));
                }
            }
            header = Some(fields.into_iter().map(|(f, _)| f).collect());
            continue;
        };
        if fields.len() != h.len() {
            return Err(err(
                line_no,
                0,
                format!(
                    "this row has {} fields but the header has {}; give every column (leave unused ones empty)",
                    fields.len(),
                    h.len()
                ),
            ));
        }
        let get = |c: &str| -> Option<(&str, usize)> {
            h.iter()
                .position(|x| x == c)
                .map(|j| (fields[j].0.as_str(), fields[j].1))
        };
        let text_of = |c: &str| -> Result<(String, usize), CatalogueError> {
            match get(c) {
                Some((v, col)) if !v.trim().is_empty() => Ok((v.trim().to_owned(), col)),
                Some((_, col)) => Err(err(line_no, col, format!("`{c}` is empty; give a value"))),
                None => Err(err(line_no, 0, format!("the header has no `{c}` column"))),
            }
        };
        let opt_num = |c: &str| -> Result<Option<f64>, CatalogueError> {
            match get(c) {
                Some((v, col)) if !v.trim().is_empty() => {
                    let x: f64 = v
                        .trim()
                        .parse()
                        .map_err(|_| err(line_no, col, format!("`{c}` = `{v}` is not a number")))?;
                    if !x.is_finite() {
                        return Err(err(line_no, col, format!("`{c}` must be finite, got {v}")));
                    }
                    Ok(Some(x))
                }
                _ => Ok(None),
            }
        };
        let (name, name_col) = text_of("name")?;
        let (kind, kind_col) = text_of("kind")?;
        let (unit_s, unit_col) = text_of("unit")?;
        let unit = match unit_s.as_str() {
            "mm" => Unit::Mm,
            "in" => Unit::In,
            other => {
                return Err(err(
                    line_no,
                    unit_col,
                    format!("unit `{other}` is not known; use \"mm\" or \"in\""),
                ));
            }
        };
        let (fab_s, fab_col) = text_of("fabrication")?;
        let fabrication = match fab_s.as_str() {
            "rolled" => Fabrication::Rolled,
            "welded" => Fabrication::Welded,
            other => {
                return Err(err(
                    line_no,
                    fab_col,
                    format!("fabrication `{other}` is not known; use \"rolled\" or \"welded\""),
                ));
            }
        };
        let (source, _) = text_of("source")?;
        let u = unit.mm();
        let dim = |c: &str| -> Result<(f64, usize), CatalogueError> {
            let col = get(c).map_or(0, |x| x.1);
            match opt_num(c)? {
                Some(x) => Ok((x * u, col)),
                None => Err(err(
                    line_no,
                    col,
                    format!("`{c}` is missing; kind `{kind}` needs it (in {unit_s})"),
                )),
            }
        };
        let r = opt_num("r")?.map_or(0.0, |x| x * u);
        let (shape, cols): (Shape, Vec<(&str, usize)>) = match kind.as_str() {
            "i" => {
                let (h_, ch) = dim("h")?;
                let (b, cb) = dim("b")?;
                let (tf, ctf) = dim("tf")?;
                let (tw, ctw) = dim("tw")?;
                (
                    Shape::I {
                        h: h_,
                        b,
                        tf,
                        tw,
                        r,
                    },
                    vec![("h", ch), ("b", cb), ("tf", ctf), ("tw", ctw)],
                )
            }
            "mono-i" => {
                let (h_, ch) = dim("h")?;
                let (b_top, c1) = dim("b_top")?;
                let (tf_top, c2) = dim("tf_top")?;
                let (b_bottom, c3) = dim("b_bottom")?;
                let (tf_bottom, c4) = dim("tf_bottom")?;
                let (tw, ctw) = dim("tw")?;
                (
                    Shape::MonoI {
                        h: h_,
                        b_top,
                        tf_top,
                        b_bottom,
                        tf_bottom,
                        tw,
                        r,
                    },
                    vec![
                        ("h", ch),
                        ("b_top", c1),
                        ("tf_top", c2),
                        ("b_bottom", c3),
                        ("tf_bottom", c4),
                        ("tw", ctw),
                    ],
                )
            }
            other => {
                return Err(err(
                    line_no,
                    kind_col,
                    format!("kind `{other}` is not known; use \"i\" or \"mono-i\""),
                ));
            }
        };
        if let Err(SectionError { field, message }) = properties(&shape) {
            let col = cols
                .iter()
                .find(|(k, _)| *k == field)
                .map(|x| x.1)
                .or_else(|| get(&field).map(|x| x.1))
                .unwrap_or(0);
            return Err(err(
                line_no,
                col,
                format!("{field}: {message} (values in mm)"),
            ));
        }
        let key = normalise(&name);
        if let Some((_, first)) = seen.iter().find(|(k, _)| *k == key) {
            return Err(err(
                line_no,
                name_col,
                format!(
                    "`{name}` repeats the section of line {first} (names are compared without case, spaces and '-'); give each section once"
                ),
            ));
        }
        seen.push((key, line_no));
        let published = Published {
            a: opt_num("a")?,
            iy: opt_num("iy")?,
            iz: opt_num("iz")?,
            it: opt_num("it")?,
            iw: opt_num("iw")?,
            wel_y: opt_num("wel_y")?,
            wpl_y: opt_num("wpl_y")?,
        };
        entries.push(Entry {
            name,
            shape,
            fabrication,
            source,
            unit,
            published,
            origin: format!("{file}:{line_no}"),
        });
    }
    if header.is_none() {
        return Err(err(
            0,
            0,
            "the catalogue has no header line; the first non-comment line names the columns".into(),
        ));
    }
    Ok(entries)
}

/// Split a CSV line on commas (fields may be quoted with `"`), returning each
/// field with its 1-based column.
fn split_row(line: &str) -> Vec<(String, usize)> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut start = 1;
    let mut quoted = false;
    for (i, c) in line.char_indices() {
        match c {
            '"' => quoted = !quoted,
            ',' if !quoted => {
                out.push((cur.trim().to_owned(), start));
                cur.clear();
                start = line[..i].chars().count() + 2;
            }
            _ => cur.push(c),
        }
    }
    out.push((cur.trim().to_owned(), start));
    out
}

/// Every built-in entry, in file order.
pub fn built_in() -> Vec<Entry> {
    BUILT_IN
        .iter()
        .flat_map(|(f, t)| parse(t, f).expect("the built-in catalogue parses (tested)"))
        .collect()
}

/// Find a section by name: first in the user's entries, then built in.
///
/// # Errors
///
/// A message naming the closest known names when nothing matches.
pub fn lookup(name: &str, user: &[Entry]) -> Result<Entry, String> {
    let key = normalise(name);
    if let Some(e) = user.iter().find(|e| normalise(&e.name) == key) {
        return Ok(e.clone());
    }
    let all = built_in();
    if let Some(e) = all.iter().find(|e| normalise(&e.name) == key) {
        return Ok(e.clone());
    }
    // Suggest names sharing the leading letters.
    let prefix: String = key
        .chars()
        .take_while(|c| c.is_ascii_alphabetic())
        .collect();
    let mut near: Vec<&str> = user
        .iter()
        .chain(all.iter())
        .filter(|e| !prefix.is_empty() && normalise(&e.name).starts_with(&prefix))
        .map(|e| e.name.as_str())
        .collect();
    near.truncate(12);
    Err(if near.is_empty() {
        format!(
            "no section `{name}` in the catalogue; the built-in series are IPE 80–600, HE 100–400 A and B (HEA/HEB) and W12, W14, W18 and W21 shapes; add your own with `catalogue = \"file.csv\"`"
        )
    } else {
        format!(
            "no section `{name}` in the catalogue; similar names: {}",
            near.join(", ")
        )
    })
}

/// Read a user catalogue file.
///
/// # Errors
///
/// [`CatalogueError`] when the file cannot be read or a row is bad.
pub fn load(path: &Path) -> Result<Vec<Entry>, CatalogueError> {
    let file = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|e| CatalogueError {
        file: file.clone(),
        line: 0,
        column: 0,
        message: format!("cannot read the catalogue: {e}"),
    })?;
    parse(&text, &file)
}

/// The `[section]` table of a case when it names a catalogue section
/// (`name = "IPE 300"`, optional `catalogue = "file.csv"` relative to the
/// case file): the shape and a label, or None when the table has no `name`.
///
/// # Errors
///
/// [`CaseError`] at the key: other keys beside `name`/`catalogue`, an unknown
/// name, an unreadable or bad catalogue (its own file:line:column quoted).
pub(crate) fn case_lookup(
    src: &Source<'_>,
    t: &Tab<'_>,
) -> Result<Option<(Entry, String)>, CaseError> {
    let Some((name, _)) = t.string("name")? else {
        return Ok(None);
    };
    t.check_keys(&["name", "catalogue"], &|k| {
        Some(format!(
            "a catalogue section is given by `name` (and optionally `catalogue`) alone; remove `{k}`, or describe the section with `kind` and its dimensions instead of `name`"
        ))
    })?;
    let user = match t.string("catalogue")? {
        Some((p, _)) => {
            let base = Path::new(src.origin)
                .parent()
                .filter(|d| !d.as_os_str().is_empty())
                .unwrap_or(Path::new("."));
            load(&base.join(&p)).map_err(|e| t.err_at("catalogue", e.to_string()))?
        }
        None => Vec::new(),
    };
    let e = lookup(&name, &user).map_err(|m| t.err_at("name", m))?;
    let label = format!("{} ({}; {})", e.name, e.fabrication.as_str(), e.source);
    Ok(Some((e, label)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_normalise() {
        assert_eq!(normalise("HEA 300"), normalise("HE 300 A"));
        assert_eq!(normalise("he-300-b"), normalise("HE 300 B"));
        assert_eq!(normalise("ipe300"), normalise("IPE 300"));
        assert_eq!(normalise("W18x50"), normalise("W18X50"));
        assert_ne!(normalise("HE 300 A"), normalise("HE 300 B"));
    }

    #[test]
    fn built_in_parses_and_finds() {
        let all = built_in();
        assert!(all.len() > 50);
        let e = lookup("HEA 300", &[]).unwrap();
        assert_eq!(e.name, "HE 300 A");
        assert!(lookup("IPE 301", &[]).unwrap_err().contains("IPE 300"));
    }
}

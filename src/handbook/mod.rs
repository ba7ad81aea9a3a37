//! The handbook: the `[handbook]` table of a handbook spec (a sweep spec
//! plus `[handbook]`), read with located errors; print units; the worked
//! conversion from a real section and length to κ and ζ; and the typst page
//! sources ([`pages`]). No I/O here: the build stage (`stage::build`) reads
//! and writes the files.
//!
//! ```toml
//! [handbook]
//! title = "Cantilevers and overhangs"
//! office = "An invented office"
//! units = "SI"                 # or "US"
//! edition = "1"
//! date = "2026-03-02"          # fixed: printed and used as the PDF timestamp
//! foreword = "..."             # optional: scope in the office's words
//! [handbook.worked]            # the front page's worked conversion
//! section = "IPE 300"          # from the built-in table (sources cited)
//! length = 3.0                 # m (SI) or ft (US)
//! [handbook.band]              # κ against length, for a few sections
//! sections = ["IPE 200", "IPE 300", "HE 300 B"]
//! from = 1.0
//! to = 12.0
//! [[handbook.family]]          # optional: which families, in which order
//! name = "canopy-tip"
//! title = "Canopy cantilever, tip load"
//! tables = true
//! charts = ["schematic", "family-chart", "ratio-map"]   # or true / false
//! fits = true
//! rules = true
//! notes = ["..."]
//! ```

pub mod diff;
pub mod pages;
pub mod units;

use crate::case::CaseError;
use crate::case::schema::{Tab, TabLoc};
use crate::case::span::Source;
use crate::section::{Properties, Shape, properties};
use crate::sweep::spec::Spec;
use std::f64::consts::PI;
use toml::de::DeValue;
pub use units::Units;

/// Keys of `[handbook]`.
const HANDBOOK_KEYS: &[&str] = &[
    "title", "office", "units", "edition", "date", "foreword", "worked", "band", "family",
];
/// Keys of `[[handbook.family]]`.
const PAGE_KEYS: &[&str] = &[
    "name", "title", "tables", "charts", "fits", "rules", "notes",
];
/// Chart kinds of the chart stage's index (the cross-stage contract).
pub const CHART_KINDS: &[&str] = &[
    "schematic",
    "family-chart",
    "ratio-map",
    "mode-shape",
    "resistance",
];

/// A calendar date (the handbook's edition date; no time of day).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct Date {
    /// Year.
    pub y: i32,
    /// Month 1–12.
    pub m: u32,
    /// Day 1–31.
    pub d: u32,
}

impl Date {
    /// Parse `YYYY-MM-DD` (a real calendar date, years 1970–9999).
    pub fn parse(s: &str) -> Option<Date> {
        let b = s.as_bytes();
        if b.len() != 10 || b[4] != b'-' || b[7] != b'-' {
            return None;
        }
        let y: i32 = s[0..4].parse().ok()?;
        let m: u32 = s[5..7].parse().ok()?;
        let d: u32 = s[8..10].parse().ok()?;
        let leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
        let days = [
            31,
            if leap { 29 } else { 28 },
            31,
            30,
            31,
            30,
            31,
            31,
            30,
            31,
            30,
            31,
        ];
        (y >= 1970 && (1..=12).contains(&m) && d >= 1 && d <= days[m as usize - 1])
            .then_some(Date { y, m, d })
    }

    /// Seconds since 1970-01-01T00:00:00Z at midnight UTC of this date.
    ///
    /// ```text
    /// days = days_from_civil(y, m, d)   (proleptic Gregorian calendar)
    /// ```
    ///
    /// # References
    /// - H. Hinnant, "chrono-Compatible Low-Level Date Algorithms", section
    ///   days_from_civil (howardhinnant.github.io/date_algorithms.html), 2013.
    pub fn epoch(self) -> i64 {
        let y = i64::from(self.y) - i64::from(self.m <= 2);
        let era = y.div_euclid(400);
        let yoe = y - era * 400;
        let m = i64::from(self.m);
        let doy = (153 * (if m > 2 { m - 3 } else { m + 9 }) + 2) / 5 + i64::from(self.d) - 1;
        let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
        (era * 146_097 + doe - 719_468) * 86_400
    }

    /// The date of a Unix time (for `SOURCE_DATE_EPOCH`).
    ///
    /// # References
    /// - H. Hinnant (2013), section civil_from_days (see [`Date::epoch`]).
    pub fn from_epoch(secs: i64) -> Date {
        let z = secs.div_euclid(86_400) + 719_468;
        let era = z.div_euclid(146_097);
        let doe = z - era * 146_097;
        let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
        let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
        let mp = (5 * doy + 2) / 153;
        let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
        let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
        let y = (yoe + era * 400 + i64::from(m <= 2)) as i32;
        Date { y, m, d }
    }
}

impl std::fmt::Display for Date {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{:04}-{:02}-{:02}", self.y, self.m, self.d)
    }
}

/// A rolled section of the built-in table, with the source of its dimensions.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Catalogued {
    /// Designation as printed.
    pub name: &'static str,
    /// Depth h, width b, web tw, flange tf, root radius r, mm.
    pub h: f64,
    /// Flange width, mm.
    pub b: f64,
    /// Web thickness, mm.
    pub tw: f64,
    /// Flange thickness, mm.
    pub tf: f64,
    /// Root radius, mm.
    pub r: f64,
    /// Where the dimensions come from.
    pub source: &'static str,
}

/// The source of the IPE and HE rows (the same rows tests/section_tables.rs checks).
const OB_UK: &str = "ArcelorMittal/SCI \"Orange Book\" (Eurocode 3 UK NA), Parallel flange I sections IPE and HE, dimensions";
/// The source of the UB rows.
const BB: &str = "SCI P363 \"Blue Book\", Universal Beams, dimensions";

/// Sections a handbook may name on its front page: dimensions as printed in
/// the cited tables (checked against their published properties in
/// tests/section_tables.rs).
#[rustfmt::skip]
pub const CATALOGUE: &[Catalogued] = &[
    Catalogued { name: "IPE 200", h: 200.0, b: 100.0, tw: 5.6, tf: 8.5, r: 12.0, source: OB_UK },
    Catalogued { name: "IPE 300", h: 300.0, b: 150.0, tw: 7.1, tf: 10.7, r: 15.0, source: OB_UK },
    Catalogued { name: "IPE 400", h: 400.0, b: 180.0, tw: 8.6, tf: 13.5, r: 21.0, source: OB_UK },
    Catalogued { name: "HE 200 A", h: 190.0, b: 200.0, tw: 6.5, tf: 10.0, r: 18.0, source: OB_UK },
    Catalogued { name: "HE 300 B", h: 300.0, b: 300.0, tw: 11.0, tf: 19.0, r: 27.0, source: OB_UK },
    Catalogued { name: "UB 305x165x40", h: 303.4, b: 165.0, tw: 6.0, tf: 10.2, r: 8.9, source: BB },
    Catalogued { name: "UB 457x191x67", h: 453.4, b: 189.9, tw: 8.5, tf: 12.7, r: 10.2, source: BB },
];

impl Catalogued {
    /// Section properties of the row.
    pub fn properties(&self) -> Properties {
        properties(&Shape::I {
            h: self.h,
            b: self.b,
            tf: self.tf,
            tw: self.tw,
            r: self.r,
        })
        .expect("catalogued dimensions are valid")
    }
}

/// A catalogued section by name.
pub fn catalogued(name: &str) -> Option<&'static Catalogued> {
    CATALOGUE.iter().find(|c| c.name == name)
}

/// E and G of the conversions (the project's material defaults), MPa.
pub const E_MPA: f64 = 210_000.0;
/// Shear modulus, MPa.
pub const G_MPA: f64 = 81_000.0;

/// The conversion of a real section and length to the chart parameters.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Conversion {
    /// Section properties (mm units).
    pub props: Properties,
    /// Length, mm.
    pub length_mm: f64,
    /// κ = (π/L)·√(E·Iw/(G·It)).
    pub kappa: f64,
    /// ζ of a load at the top-flange centroid.
    pub zeta_flange: f64,
    /// ζ of a load on the top surface.
    pub zeta_surface: f64,
    /// hs, distance between flange centroids, mm.
    pub hs: f64,
    /// Mcr per unit μcr: √(E·Iz·G·It)/L, kN·m.
    pub moment_scale_knm: f64,
}

/// Convert a doubly symmetric I-section and a length to κ and ζ.
///
/// ```text
/// κ  = (π/L)·√(E·Iw/(G·It))
/// ζ  = (π·a/L)·√(E·Iz/(G·It))        a = height of the load above the shear centre
/// ζ/κ = 2·a/hs                        (Iw = Iz·hs²/4 for a doubly symmetric I-section)
/// Mcr = μcr·√(E·Iz·G·It)/L
/// ```
///
/// # References
/// - S. P. Timoshenko, J. M. Gere, "Theory of Elastic Stability", 2nd ed., McGraw-Hill, 1961,
///   §6.2 (uniform bending, the parameter L²·G·It/(E·Iw)) and §6.5 (Iw = Iz·h²/4 of an I-beam).
/// - N. S. Trahair, "Flexural-Torsional Buckling of Structures", E & FN Spon, 1993, ch. 6 (K = √(π²EIw/(GJL²)),
///   ε = (π·a/L)·√(EIy/GJ) for load height).
pub fn convert(props: &Properties, length_mm: f64, e_mpa: f64, g_mpa: f64) -> Conversion {
    let gt = g_mpa * props.it;
    let kappa = PI / length_mm * (e_mpa * props.iw / gt).sqrt();
    let z = PI / length_mm * (e_mpa * props.iz / gt).sqrt();
    Conversion {
        props: *props,
        length_mm,
        kappa,
        zeta_flange: z * props.top_flange,
        zeta_surface: z * props.top_surface,
        hs: props.top_flange - props.bottom_flange,
        // N·mm → kN·m.
        moment_scale_knm: (e_mpa * props.iz * gt).sqrt() / length_mm / 1e6,
    }
}

/// What to show of one family.
#[derive(Debug, Clone, PartialEq)]
pub struct FamilyPage {
    /// The family's name (a `[[family]]` of the spec).
    pub name: String,
    /// Page title (default: the name).
    pub title: String,
    /// Show the coefficient tables.
    pub tables: bool,
    /// Chart kinds to show (of [`CHART_KINDS`]).
    pub charts: Vec<String>,
    /// Show fitted formulas.
    pub fits: bool,
    /// Show rule-check summaries.
    pub rules: bool,
    /// Notes printed on the page.
    pub notes: Vec<String>,
}

/// The front page's worked conversion.
#[derive(Debug, Clone, PartialEq)]
pub struct Worked {
    /// Catalogued section.
    pub section: &'static Catalogued,
    /// Length in print units (m or ft).
    pub length: f64,
}

/// The κ-against-length band.
#[derive(Debug, Clone, PartialEq)]
pub struct Band {
    /// Sections.
    pub sections: Vec<&'static Catalogued>,
    /// Shortest length (print units).
    pub from: f64,
    /// Longest length (print units).
    pub to: f64,
}

/// The `[handbook]` table.
#[derive(Debug, Clone, PartialEq)]
pub struct Handbook {
    /// Title.
    pub title: String,
    /// The office publishing it.
    pub office: String,
    /// Print units.
    pub units: Units,
    /// Edition label.
    pub edition: String,
    /// Fixed edition date (None: must come from `--date` or `SOURCE_DATE_EPOCH`).
    pub date: Option<Date>,
    /// Scope in the office's words (optional).
    pub foreword: Option<String>,
    /// Worked conversion.
    pub worked: Worked,
    /// κ-length band.
    pub band: Band,
    /// Family pages in print order.
    pub families: Vec<FamilyPage>,
}

/// Read the `[handbook]` table of a handbook spec whose families are `spec`.
/// Errors name file, line, column and key.
pub fn parse_handbook(text: &str, origin: &str, spec: &Spec) -> Result<Handbook, CaseError> {
    let src = Source { text, origin };
    let root = src.parse()?;
    let top = Tab::top(&src, root.get_ref());
    let Some(loc) = top.table("handbook")? else {
        return Err(src.error(
            &(0..0),
            "handbook",
            "this spec has no [handbook] table: add one with title, office, units, edition and date (`ltb-atlas init DIR` writes a commented example)",
        ));
    };
    let h = loc.tab(&src);
    h.check_keys(HANDBOOK_KEYS, &|_| None)?;
    let need = |k: &str, example: &str| -> Result<String, CaseError> {
        match h.string(k)? {
            Some((s, v)) if s.trim().is_empty() => Err(src.error(
                &v.span,
                &v.key,
                format!("`{k}` is empty: write for example {k} = {example}"),
            )),
            Some((s, _)) => Ok(s),
            None => Err(h.err_here(format!(
                "missing `{k}` in [handbook]: write for example {k} = {example}"
            ))),
        }
    };
    let title = need("title", "\"Cantilevers and overhangs\"")?;
    let office = need("office", "\"Structural group, an invented office\"")?;
    let edition = need("edition", "\"1\"")?;
    let units = match h.choice("units", &["SI", "US"], "unit system")? {
        Some(("US", _)) => Units::Us,
        _ => Units::Si,
    };
    let date = match h.string("date")? {
        Some((s, v)) => Some(Date::parse(&s).ok_or_else(|| {
            src.error(
                &v.span,
                &v.key,
                format!("\"{s}\" is not a date: write YYYY-MM-DD, for example \"2026-03-02\" (a fixed date keeps rebuilds identical)"),
            )
        })?),
        None => None,
    };
    let foreword = h.string("foreword")?.map(|(s, _)| s);
    let section = |t: &Tab<'_>, k: &str, s: &str, v: &crate::case::schema::Val<'_>| {
        catalogued(s).ok_or_else(|| {
            let names: Vec<&str> = CATALOGUE.iter().map(|c| c.name).collect();
            src.error(
                &v.span,
                &v.key,
                format!(
                    "unknown section \"{s}\" in `{}`; the built-in table (dimensions from cited section tables) holds: {}",
                    t.key(k),
                    names.join(", ")
                ),
            )
        })
    };
    let positive = |t: &Tab<'_>, k: &str, default: f64, what: &str| -> Result<f64, CaseError> {
        Ok(t.num_min(k, Some(default), true, what)?
            .map_or(default, |n| n.value))
    };
    // Worked conversion.
    let (w_section, w_length) = match h.table("worked")? {
        Some(wl) => {
            let w = wl.tab(&src);
            w.check_keys(&["section", "length"], &|_| None)?;
            let sec = match w.string("section")? {
                Some((s, v)) => section(&w, "section", &s, &v)?,
                None => &CATALOGUE[1],
            };
            let len = positive(&w, "length", default_length(units), "the length")?;
            (sec, len)
        }
        None => (&CATALOGUE[1], default_length(units)),
    };
    // Band.
    let band = match h.table("band")? {
        Some(bl) => {
            let b = bl.tab(&src);
            b.check_keys(&["sections", "from", "to"], &|_| None)?;
            let mut secs = Vec::new();
            if let Some(v) = b.get("sections") {
                let DeValue::Array(items) = v.v else {
                    return Err(src.error(
                        &v.span,
                        &v.key,
                        "expected a list of section names such as [\"IPE 200\", \"HE 300 B\"]",
                    ));
                };
                for (i, item) in items.iter().enumerate() {
                    let key = format!("{}[{i}]", v.key);
                    let DeValue::String(s) = item.get_ref() else {
                        return Err(src.error(
                            &item.span(),
                            &key,
                            "expected a section name (a string)",
                        ));
                    };
                    let val = crate::case::schema::Val {
                        name: "sections".into(),
                        key,
                        key_span: v.key_span.clone(),
                        span: item.span(),
                        v: item.get_ref(),
                    };
                    secs.push(section(&b, "sections", s, &val)?);
                }
                if secs.is_empty() || secs.len() > 6 {
                    return Err(src.error(
                        &v.span,
                        &v.key,
                        "give one to six sections (more make the band unreadable)",
                    ));
                }
            } else {
                secs = default_band();
            }
            let (f0, t0) = default_range(units);
            let from = positive(&b, "from", f0, "`from`")?;
            let to = positive(&b, "to", t0, "`to`")?;
            if to <= from {
                return Err(b.err_at("to", format!("`to` = {to} must exceed `from` = {from}")));
            }
            Band {
                sections: secs,
                from,
                to,
            }
        }
        None => {
            let (from, to) = default_range(units);
            Band {
                sections: default_band(),
                from,
                to,
            }
        }
    };
    // Family pages.
    let locs = h.tables("family")?;
    let families = if locs.is_empty() {
        spec.families
            .iter()
            .map(|f| FamilyPage {
                name: f.name.clone(),
                title: f.name.clone(),
                tables: true,
                charts: CHART_KINDS.iter().map(|s| s.to_string()).collect(),
                fits: true,
                rules: true,
                notes: Vec::new(),
            })
            .collect()
    } else {
        let mut out: Vec<FamilyPage> = Vec::new();
        for l in &locs {
            let p = page(&src, l, spec)?;
            if out.iter().any(|q| q.name == p.name) {
                return Err(l.tab(&src).err_at(
                    "name",
                    format!("family \"{}\" has two pages: list it once", p.name),
                ));
            }
            out.push(p);
        }
        out
    };
    Ok(Handbook {
        title,
        office,
        units,
        edition,
        date,
        foreword,
        worked: Worked {
            section: w_section,
            length: w_length,
        },
        band,
        families,
    })
}

fn default_length(u: Units) -> f64 {
    match u {
        Units::Si => 3.0,
        Units::Us => 10.0,
    }
}

fn default_range(u: Units) -> (f64, f64) {
    match u {
        Units::Si => (1.0, 12.0),
        Units::Us => (3.0, 40.0),
    }
}

fn default_band() -> Vec<&'static Catalogued> {
    ["IPE 200", "IPE 400", "HE 300 B"]
        .iter()
        .map(|n| catalogued(n).expect("in the catalogue"))
        .collect()
}

fn page(src: &Source<'_>, loc: &TabLoc<'_>, spec: &Spec) -> Result<FamilyPage, CaseError> {
    let t = loc.tab(src);
    t.check_keys(PAGE_KEYS, &|_| None)?;
    let Some((name, nv)) = t.string("name")? else {
        return Err(t.err_here("missing `name`: the name of a [[family]] of this spec"));
    };
    if !spec.families.iter().any(|f| f.name == name) {
        let names: Vec<&str> = spec.families.iter().map(|f| f.name.as_str()).collect();
        return Err(src.error(
            &nv.span,
            &nv.key,
            format!(
                "no [[family]] is named \"{name}\"{}; families: {}",
                crate::case::schema::did_you_mean_value(&name, &names),
                names.join(", ")
            ),
        ));
    }
    let flag = |k: &str| -> Result<bool, CaseError> {
        match t.get(k) {
            None => Ok(true),
            Some(v) => match v.v {
                DeValue::Boolean(b) => Ok(*b),
                _ => Err(src.error(&v.span, &v.key, format!("`{k}` takes true or false"))),
            },
        }
    };
    let charts = match t.get("charts") {
        None => CHART_KINDS.iter().map(|s| s.to_string()).collect(),
        Some(v) => match v.v {
            DeValue::Boolean(true) => CHART_KINDS.iter().map(|s| s.to_string()).collect(),
            DeValue::Boolean(false) => Vec::new(),
            DeValue::Array(items) => {
                let mut out = Vec::new();
                for (i, item) in items.iter().enumerate() {
                    match item.get_ref() {
                        DeValue::String(s) if CHART_KINDS.contains(&s.as_ref()) => {
                            out.push(s.to_string())
                        }
                        _ => {
                            return Err(src.error(
                                &item.span(),
                                &format!("{}[{i}]", v.key),
                                format!("expected a chart kind, one of {}", CHART_KINDS.join(", ")),
                            ));
                        }
                    }
                }
                out
            }
            _ => {
                return Err(src.error(
                    &v.span,
                    &v.key,
                    format!(
                        "`charts` takes true, false or a list of kinds ({})",
                        CHART_KINDS.join(", ")
                    ),
                ));
            }
        },
    };
    let mut notes = Vec::new();
    if let Some(v) = t.get("notes") {
        let DeValue::Array(items) = v.v else {
            return Err(src.error(&v.span, &v.key, "`notes` takes a list of strings"));
        };
        for (i, item) in items.iter().enumerate() {
            let DeValue::String(s) = item.get_ref() else {
                return Err(src.error(
                    &item.span(),
                    &format!("{}[{i}]", v.key),
                    "expected a string",
                ));
            };
            notes.push(s.to_string());
        }
    }
    Ok(FamilyPage {
        title: t.string("title")?.map_or_else(|| name.clone(), |(s, _)| s),
        name,
        tables: flag("tables")?,
        charts,
        fits: flag("fits")?,
        rules: flag("rules")?,
        notes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sweep::spec::parse_spec;
    use std::path::Path;

    const FAMILY: &str = r#"
[[family]]
name = "tip"
kappa = [0.5, 1.0]
zeta = ["kappa", 0.0]
[family.case]
start = { preset = "built-in" }
end = { preset = "free" }
[[family.case.load]]
kind = "point"
at = 1.0
"#;

    fn parse(extra: &str) -> Result<Handbook, CaseError> {
        let text = format!("{FAMILY}\n{extra}");
        let spec = parse_spec(&text, "h.toml", Path::new(".")).unwrap();
        parse_handbook(&text, "h.toml", &spec)
    }

    #[test]
    fn dates_convert_both_ways() {
        // 2000-03-01 is day 11 017 since 1970-01-01 (Hinnant's tables, from memory;
        // checked below by the round trip and the 1970 origin).
        assert_eq!(Date::parse("1970-01-01").unwrap().epoch(), 0);
        assert_eq!(Date::parse("2000-03-01").unwrap().epoch(), 11_017 * 86_400);
        // SOURCE_DATE_EPOCH 1700000000 is 2023-11-14T22:13:20Z (GNU date -d @1700000000).
        assert_eq!(Date::from_epoch(1_700_000_000).to_string(), "2023-11-14");
        for s in ["2024-02-29", "2026-12-31", "1999-01-01"] {
            let d = Date::parse(s).unwrap();
            assert_eq!(Date::from_epoch(d.epoch()), d);
        }
        assert!(Date::parse("2023-02-29").is_none());
        assert!(Date::parse("2023-2-28").is_none());
    }

    #[test]
    fn handbook_table_reads_and_errors_are_located() {
        let h = parse(
            "[handbook]\ntitle = \"T\"\noffice = \"O\"\nedition = \"2\"\nunits = \"US\"\ndate = \"2026-01-05\"\n[handbook.worked]\nsection = \"IPE 400\"\nlength = 12.0\n",
        )
        .unwrap();
        assert_eq!(h.units, Units::Us);
        assert_eq!(h.worked.section.name, "IPE 400");
        assert_eq!(h.families.len(), 1);
        assert_eq!(h.date.unwrap().to_string(), "2026-01-05");
        let e = parse(
            "[handbook]\ntitle = \"T\"\noffice = \"O\"\nedition = \"2\"\nunits = \"metric\"\n",
        )
        .unwrap_err();
        assert_eq!((e.line, e.key.as_str()), (17, "handbook.units"), "{e}");
        assert!(e.message.contains("\"SI\""), "{e}");
        let e = parse("[handbook]\ntitle = \"T\"\noffice = \"O\"\nedition = \"2\"\n[[handbook.family]]\nname = \"tipp\"\n").unwrap_err();
        assert_eq!(e.line, 18, "{e}");
        assert!(e.message.contains("did you mean \"tip\""), "{e}");
        let e = parse("[handbook]\ntitle = \"T\"\noffice = \"O\"\nedition = \"2\"\n[handbook.worked]\nsection = \"IPE 330\"\n").unwrap_err();
        assert!(e.message.contains("IPE 300"), "{e}");
        let e = parse("[handbook]\ntitle = \"T\"\noffice = \"O\"\n").unwrap_err();
        assert!(e.message.contains("missing `edition`"), "{e}");
        let e = parse(
            "[handbook]\ntitle = \"T\"\noffice = \"O\"\nedition = \"1\"\ndate = \"2026-13-01\"\n",
        )
        .unwrap_err();
        assert_eq!(e.key, "handbook.date");
    }

    #[test]
    fn conversion_of_ipe_300_agrees_with_the_table_values() {
        // IPE 300 [OB-UK]: Iz = 604 cm⁴, It = 19.9 cm⁴, Iw = 0.126 dm⁶; with
        // E = 210 000 and G = 81 000 MPa and L = 3 m the hand calculation
        // from the table's properties gives
        // κ = (π/3000)·√(210000·0.126e12/(81000·19.9e4)) = 1.3417 and
        // √(E·Iz·G·It)/L = √(210000·604e4·81000·19.9e4)/3000 N·mm = 47.66 kN·m.
        // The table rounds to 3 figures, so agreement within 1 %.
        let c = convert(
            &catalogued("IPE 300").unwrap().properties(),
            3000.0,
            E_MPA,
            G_MPA,
        );
        assert!((c.kappa - 1.3417).abs() / 1.3417 < 0.01, "{}", c.kappa);
        assert!(
            (c.moment_scale_knm - 47.66).abs() / 47.66 < 0.01,
            "{}",
            c.moment_scale_knm
        );
        // Domain notes: ζ/κ = 2·a/hs, so the top-flange centroid gives ζ = κ
        // and the top surface ζ = κ·h/hs (h = 300, hs = 300 − 10.7).
        assert!((c.zeta_flange / c.kappa - 1.0).abs() < 1e-9);
        assert!((c.zeta_surface / c.kappa - 300.0 / 289.3).abs() < 1e-6);
        assert!((c.hs - 289.3).abs() < 1e-9);
    }
}

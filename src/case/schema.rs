//! A thin, span-aware reader over the parsed TOML document: typed getters that
//! reject wrong types, NaN and infinities, and a key check that rejects
//! unknown keys with the list of accepted ones.

use super::CaseError;
use super::span::Source;
use std::ops::Range;
use toml::de::{DeTable, DeValue};

/// A value found in a table, with its key path and spans.
#[derive(Clone)]
pub(crate) struct Val<'a> {
    /// The key itself.
    pub name: String,
    /// Full key path, for example `load[1].at`.
    pub key: String,
    /// Span of the key.
    pub key_span: Range<usize>,
    /// Span of the value.
    pub span: Range<usize>,
    /// The value.
    pub v: &'a DeValue<'a>,
}

/// A number read from the file, with where it came from.
#[derive(Debug, Clone)]
pub(crate) struct Num {
    pub value: f64,
    pub key: String,
    pub span: Range<usize>,
}

/// A table of the case file.
#[derive(Clone, Copy)]
pub(crate) struct Tab<'a> {
    pub src: &'a Source<'a>,
    /// Key path of the table ("" for the top level).
    pub path: &'a str,
    /// Span of the table header (or of the inline table / dotted key).
    pub span: &'a Range<usize>,
    pub t: &'a DeTable<'a>,
}

impl<'a> Tab<'a> {
    /// The top-level table of a parsed document.
    pub fn top(src: &'a Source<'a>, root: &'a DeTable<'a>) -> Tab<'a> {
        Tab {
            src,
            path: "",
            span: &(0..0),
            t: root,
        }
    }
}

/// An owned version of a table's location, to build sub-tables from.
pub(crate) struct TabLoc<'a> {
    pub path: String,
    pub span: Range<usize>,
    pub t: &'a DeTable<'a>,
}

impl<'a> TabLoc<'a> {
    pub fn tab(&'a self, src: &'a Source<'a>) -> Tab<'a> {
        Tab {
            src,
            path: &self.path,
            span: &self.span,
            t: self.t,
        }
    }
}

/// A short description of a TOML value's type for messages.
pub(crate) fn type_name(v: &DeValue<'_>) -> String {
    match v {
        DeValue::String(s) => format!("the string \"{s}\""),
        DeValue::Integer(_) => "an integer".into(),
        DeValue::Float(_) => "a number".into(),
        DeValue::Boolean(b) => format!("the boolean {b}"),
        DeValue::Datetime(_) => "a date/time".into(),
        DeValue::Array(_) => "an array".into(),
        DeValue::Table(_) => "a table".into(),
    }
}

/// Levenshtein distance, for "did you mean" hints.
fn distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1];
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur.push(sub.min(prev[j + 1] + 1).min(cur[j] + 1));
        }
        prev = cur;
    }
    prev[b.len()]
}

/// The closest candidate to `word`, if close enough to be a typo.
fn closest<'c>(word: &str, candidates: &[&'c str]) -> Option<&'c str> {
    let w = word.to_lowercase().replace('_', "-");
    candidates
        .iter()
        .map(|c| (distance(&w, &c.to_lowercase().replace('_', "-")), *c))
        .filter(|(d, c)| *d <= 2.max(c.len() / 4) && *d < c.len())
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

/// " (did you mean `x`?)" for a key, when a close candidate exists.
pub(crate) fn did_you_mean(word: &str, candidates: &[&str]) -> String {
    closest(word, candidates)
        .map(|c| format!(" (did you mean `{c}`?)"))
        .unwrap_or_default()
}

/// " (did you mean \"x\"?)" for a string value, when a close candidate exists.
pub(crate) fn did_you_mean_value(word: &str, candidates: &[&str]) -> String {
    closest(word, candidates)
        .map(|c| format!(" (did you mean \"{c}\"?)"))
        .unwrap_or_default()
}

/// "`a`, `b`, `c`" for messages.
pub(crate) fn quoted_list(items: &[&str]) -> String {
    items
        .iter()
        .map(|k| format!("`{k}`"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// "\"a\", \"b\"" for messages about string choices.
pub(crate) fn string_list(items: &[&str]) -> String {
    items
        .iter()
        .map(|k| format!("\"{k}\""))
        .collect::<Vec<_>>()
        .join(", ")
}

/// Parse a TOML number (integer or float) to f64; None for other types.
pub(crate) fn number_of(v: &DeValue<'_>) -> Option<f64> {
    match v {
        DeValue::Integer(i) => i64::from_str_radix(i.as_str(), i.radix())
            .ok()
            .map(|n| n as f64),
        DeValue::Float(f) => f.as_str().parse::<f64>().ok().or(Some(f64::NAN)),
        _ => None,
    }
}

impl<'a> Tab<'a> {
    /// Full key path of `k` in this table.
    pub fn key(&self, k: &str) -> String {
        if self.path.is_empty() {
            k.to_string()
        } else {
            format!("{}.{k}", self.path)
        }
    }

    /// An error at the table header, about the table itself.
    pub fn err_here(&self, message: impl Into<String>) -> CaseError {
        self.src.error(self.span, self.path, message)
    }

    /// An error about `k`: at its value if present, else at the header.
    pub fn err_at(&self, k: &str, message: impl Into<String>) -> CaseError {
        match self.get(k) {
            Some(v) => self.src.error(&v.span, &v.key, message),
            None => self.src.error(self.span, &self.key(k), message),
        }
    }

    /// Entries in file order.
    pub fn entries(&self) -> Vec<Val<'a>> {
        let mut out: Vec<Val<'a>> = self
            .t
            .iter()
            .map(|(k, v)| Val {
                name: k.get_ref().to_string(),
                key: self.key(k.get_ref()),
                key_span: k.span(),
                span: v.span(),
                v: v.get_ref(),
            })
            .collect();
        out.sort_by_key(|v| v.key_span.start);
        out
    }

    /// Look a key up.
    pub fn get(&self, k: &str) -> Option<Val<'a>> {
        self.t
            .iter()
            .find(|(kk, _)| kk.get_ref() == k)
            .map(|(kk, v)| Val {
                name: k.to_string(),
                key: self.key(k),
                key_span: kk.span(),
                span: v.span(),
                v: v.get_ref(),
            })
    }

    /// Reject any key not in `allowed`. `hint` may give a specific message for
    /// a key (for example "use `height`"); otherwise the accepted keys are listed.
    pub fn check_keys(
        &self,
        allowed: &[&str],
        hint: &dyn Fn(&str) -> Option<String>,
    ) -> Result<(), CaseError> {
        for e in self.entries() {
            let name = e.name.clone();
            if allowed.contains(&name.as_str()) {
                continue;
            }
            let where_ = if self.path.is_empty() {
                "at the top level".to_string()
            } else {
                format!("in `{}`", self.path)
            };
            let message = match hint(&name) {
                Some(h) => format!("key `{name}` is not accepted {where_}: {h}"),
                None => format!(
                    "unknown key `{name}` {where_}{}; accepted keys: {}",
                    did_you_mean(&name, allowed),
                    quoted_list(allowed)
                ),
            };
            return Err(self.src.error(&e.key_span, &e.key, message));
        }
        Ok(())
    }

    /// A sub-table (a `[x]` table, an inline table or dotted keys).
    pub fn table(&self, k: &str) -> Result<Option<TabLoc<'a>>, CaseError> {
        let Some(v) = self.get(k) else {
            return Ok(None);
        };
        match v.v {
            DeValue::Table(t) => Ok(Some(TabLoc {
                path: v.key,
                span: v.span,
                t,
            })),
            DeValue::Array(a) if !a.is_empty() && a.iter().all(|x| x.get_ref().is_table()) => {
                Err(self.src.error(
                    &v.span,
                    &v.key,
                    format!(
                        "`{k}` must be a single table `[{}]`, not an array of tables `[[{}]]`",
                        v.key, v.key
                    ),
                ))
            }
            other => Err(self.src.error(
                &v.span,
                &v.key,
                format!(
                    "expected a table (write `[{}]` and its keys below it), found {}",
                    v.key,
                    type_name(other)
                ),
            )),
        }
    }

    /// An array of tables (`[[x]]` or an array of inline tables); empty when absent.
    pub fn tables(&self, k: &str) -> Result<Vec<TabLoc<'a>>, CaseError> {
        let Some(v) = self.get(k) else {
            return Ok(Vec::new());
        };
        let DeValue::Array(a) = v.v else {
            let found = type_name(v.v);
            let hint = if matches!(v.v, DeValue::Table(_)) {
                format!("write `[[{}]]` (double brackets), once per item", v.key)
            } else {
                format!("write `[[{}]]` tables", v.key)
            };
            return Err(self.src.error(
                &v.span,
                &v.key,
                format!("expected an array of tables, found {found}; {hint}"),
            ));
        };
        let mut out = Vec::new();
        for (i, item) in a.iter().enumerate() {
            match item.get_ref() {
                DeValue::Table(t) => out.push(TabLoc {
                    path: format!("{}[{i}]", v.key),
                    span: item.span(),
                    t,
                }),
                other => {
                    return Err(self.src.error(
                        &item.span(),
                        &format!("{}[{i}]", v.key),
                        format!(
                            "expected a table, found {}; write `[[{}]]` tables",
                            type_name(other),
                            v.key
                        ),
                    ));
                }
            }
        }
        Ok(out)
    }

    /// A finite number.
    pub fn num(&self, k: &str) -> Result<Option<Num>, CaseError> {
        self.num_with(k, "")
    }

    /// A finite number; `alt` adds to "expected a number" (for example " in kN").
    pub fn num_with(&self, k: &str, alt: &str) -> Result<Option<Num>, CaseError> {
        let Some(v) = self.get(k) else {
            return Ok(None);
        };
        Ok(Some(number(self.src, &v, alt)?))
    }

    /// A finite number ≥ 0 (or > 0 when `strict`), with a default.
    pub fn num_min(
        &self,
        k: &str,
        default: Option<f64>,
        strict: bool,
        what: &str,
    ) -> Result<Option<Num>, CaseError> {
        let n = match self.num(k)? {
            Some(n) => n,
            None => {
                return Ok(default.map(|value| Num {
                    value,
                    key: self.key(k),
                    span: self.span.clone(),
                }));
            }
        };
        if strict && n.value <= 0.0 {
            return Err(self.src.error(
                &n.span,
                &n.key,
                format!("{what} must be greater than 0, got {}", n.value),
            ));
        }
        if !strict && n.value < 0.0 {
            return Err(self.src.error(
                &n.span,
                &n.key,
                format!("{what} must be 0 or more, got {}", n.value),
            ));
        }
        Ok(Some(n))
    }

    /// A string.
    pub fn string(&self, k: &str) -> Result<Option<(String, Val<'a>)>, CaseError> {
        let Some(v) = self.get(k) else {
            return Ok(None);
        };
        match v.v {
            DeValue::String(s) => Ok(Some((s.to_string(), v))),
            other => Err(self.src.error(
                &v.span,
                &v.key,
                format!("expected a string, found {}", type_name(other)),
            )),
        }
    }

    /// One of a fixed set of strings.
    pub fn choice(
        &self,
        k: &str,
        accepted: &[&'static str],
        what: &str,
    ) -> Result<Option<(&'static str, Val<'a>)>, CaseError> {
        let Some(v) = self.get(k) else {
            return Ok(None);
        };
        let DeValue::String(s) = v.v else {
            return Err(self.src.error(
                &v.span,
                &v.key,
                format!(
                    "expected a string, one of {}, found {}",
                    string_list(accepted),
                    type_name(v.v)
                ),
            ));
        };
        match accepted.iter().find(|a| **a == s.as_ref()) {
            Some(a) => Ok(Some((*a, v))),
            None => Err(self.src.error(
                &v.span,
                &v.key,
                format!(
                    "unknown {what} \"{s}\"{}; accepted: {}",
                    did_you_mean_value(s, accepted),
                    string_list(accepted)
                ),
            )),
        }
    }
}

/// Read a value as a finite number. `alt` adds to the "expected" text (for
/// keys that also take strings).
pub(crate) fn number(src: &Source<'_>, v: &Val<'_>, alt: &str) -> Result<Num, CaseError> {
    let Some(x) = number_of(v.v) else {
        return Err(src.error(
            &v.span,
            &v.key,
            format!("expected a number{alt}, found {}", type_name(v.v)),
        ));
    };
    if !x.is_finite() {
        return Err(src.error(
            &v.span,
            &v.key,
            format!(
                "`{}` is not accepted: give a finite number",
                src.slice(&v.span).trim()
            ),
        ));
    }
    Ok(Num {
        value: x,
        key: v.key.clone(),
        span: v.span.clone(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn case_did_you_mean_suggests_close_keys() {
        assert_eq!(
            did_you_mean("warpin", &["lateral", "warping"]),
            " (did you mean `warping`?)"
        );
        assert_eq!(
            did_you_mean_value("builtin", &["fork", "built-in", "free"]),
            " (did you mean \"built-in\"?)"
        );
        assert_eq!(did_you_mean("zzzzzz", &["fork", "built-in", "free"]), "");
    }
}

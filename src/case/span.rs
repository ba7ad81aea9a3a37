//! Byte offsets → 1-based line and column, and the error constructor that
//! every other part of the case module uses.

use super::CaseError;
use std::ops::Range;

/// The text being parsed and the name it goes by in errors.
pub(crate) struct Source<'s> {
    /// The whole case file.
    pub text: &'s str,
    /// File path as given (or "<input>").
    pub origin: &'s str,
}

impl<'s> Source<'s> {
    /// Parse the whole document; a syntax error is located like any other.
    pub fn parse(&self) -> Result<serde_spanned::Spanned<toml::de::DeTable<'s>>, CaseError> {
        toml::de::DeTable::parse(self.text).map_err(|e| {
            self.error(
                &e.span().unwrap_or(0..0),
                "",
                format!("TOML syntax error: {}", e.message().trim()),
            )
        })
    }

    /// 1-based line and column (in characters) of a byte offset. Offsets past
    /// the end are clamped; an offset inside a multi-byte character counts as
    /// that character.
    pub fn line_col(&self, offset: usize) -> (usize, usize) {
        let mut offset = offset.min(self.text.len());
        while !self.text.is_char_boundary(offset) {
            offset -= 1;
        }
        let before = &self.text[..offset];
        let line = before.matches('\n').count() + 1;
        let line_start = before.rfind('\n').map(|i| i + 1).unwrap_or(0);
        let column = before[line_start..].chars().count() + 1;
        (line, column)
    }

    /// An error at the start of `span`, about `key`.
    pub fn error(&self, span: &Range<usize>, key: &str, message: impl Into<String>) -> CaseError {
        let (line, column) = self.line_col(span.start);
        CaseError {
            file: self.origin.to_string(),
            line,
            column,
            key: key.to_string(),
            message: message.into(),
        }
    }

    /// The source text covered by `span` (empty when out of range).
    pub fn slice(&self, span: &Range<usize>) -> &str {
        self.text.get(span.clone()).unwrap_or("")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn case_line_col_counts_characters() {
        let s = Source {
            text: "a = 1\n# κζ\nb = 2\n",
            origin: "x",
        };
        assert_eq!(s.line_col(0), (1, 1));
        assert_eq!(s.line_col(4), (1, 5));
        assert_eq!(s.line_col(6), (2, 1));
        // "# κζ\n" is 7 bytes (κ and ζ are 2 bytes each); "b" starts line 3.
        assert_eq!(s.line_col(13), (3, 1));
        assert_eq!(s.line_col(17), (3, 5));
        // Inside a multi-byte character: that character's column.
        assert_eq!(s.line_col(9), (2, 3));
        assert_eq!(s.line_col(1000), (4, 1));
    }
}

//! Lengths with units ("6 m", "300 mm", "19.7 ft", "236 in") and the named
//! heights of a section.

/// Accepted length units and their size in metres (1 ft = 0.3048 m and
/// 1 in = 0.0254 m exactly, by the international yard and pound agreement of 1959).
pub(crate) const LENGTH_UNITS: &[(&str, f64)] = &[
    ("m", 1.0),
    ("mm", 1e-3),
    ("cm", 1e-2),
    ("ft", 0.3048),
    ("in", 0.0254),
];

/// Named heights accepted for `height` in a physical case.
pub(crate) const HEIGHT_NAMES: &[&str] = &[
    "top-flange",
    "top-surface",
    "shear-centre",
    "bottom-flange",
    "bottom-surface",
];

/// The accepted units as a list for messages: "m, mm, cm, ft, in".
pub(crate) fn unit_list() -> String {
    LENGTH_UNITS
        .iter()
        .map(|(u, _)| *u)
        .collect::<Vec<_>>()
        .join(", ")
}

/// Parse "<number> <unit>" (the space is optional) into metres.
///
/// The error text says what is wrong and lists the accepted units.
pub(crate) fn parse_length(text: &str) -> Result<f64, String> {
    let t = text.trim();
    let split = t.trim_end_matches(|c: char| c.is_alphabetic()).len();
    let (num, unit) = t.split_at(split);
    let num = num.trim();
    if unit.is_empty() {
        return Err(format!(
            "\"{text}\" has no unit; write a number and a unit, for example \"6 m\" or \"300 mm\" \
             (accepted units: {})",
            unit_list()
        ));
    }
    let Some((_, factor)) = LENGTH_UNITS.iter().find(|(u, _)| *u == unit) else {
        return Err(format!(
            "unknown length unit `{unit}` in \"{text}\"; accepted units: {} (for example \"6 m\" or \"300 mm\")",
            unit_list()
        ));
    };
    let value: f64 = num.parse().map_err(|_| {
        format!(
            "\"{text}\" does not start with a number; write for example \"2.5 m\" or \"300 mm\""
        )
    })?;
    if !value.is_finite() {
        return Err(format!(
            "\"{text}\" is not a finite length; give a finite number with a unit"
        ));
    }
    Ok(value * factor)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn case_units_parse_lengths() {
        // Unit sizes: 1 ft = 0.3048 m, 1 in = 0.0254 m (international yard and pound, 1959).
        assert_eq!(parse_length("6 m"), Ok(6.0));
        assert!((parse_length("6000 mm").unwrap() - 6.0).abs() < 1e-12);
        assert!((parse_length("19.7 ft").unwrap() - 6.00456).abs() < 1e-12);
        assert!((parse_length("236in").unwrap() - 5.9944).abs() < 1e-12);
        assert!((parse_length(" -120 mm ").unwrap() + 0.12).abs() < 1e-15);
        assert!(parse_length("6").unwrap_err().contains("no unit"));
        let e = parse_length("6 yd").unwrap_err();
        assert!(e.contains("`yd`") && e.contains("m, mm, cm, ft, in"), "{e}");
        assert!(parse_length("abc m").unwrap_err().contains("number"));
        assert!(parse_length("inf m").unwrap_err().contains("finite"));
    }
}

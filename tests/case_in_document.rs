//! A case held inside a larger TOML document (the inline `[family.case]` of
//! a sweep spec): the same model as the stand-alone file, and errors located
//! in the larger document with the path prefixed to the key.

use ltb_atlas::case::{Step, parse_case, parse_case_in};

const SPEC: &str = r#"[[family]]
name = "first"
[family.case]
kappa = 0.5
[family.case.start]
preset = "fork"
[family.case.end]
preset = "fork"
[[family.case.load]]
kind = "uniform"

[[family]]
name = "second"
[family.case]
kappa = 1.0
[family.case.start]
preset = "built-in"
[family.case.end]
preset = "free"
[[family.case.load]]
kind = "point"
at = 1.0
zeta = 1.0
"#;

const STANDALONE: &str = r#"kappa = 1.0
[start]
preset = "built-in"
[end]
preset = "free"
[[load]]
kind = "point"
at = 1.0
zeta = 1.0
"#;

#[test]
fn inline_case_equals_the_standalone_file() {
    let inline = parse_case_in(
        SPEC,
        "spec.toml",
        &[Step::Key("family"), Step::Index(1), Step::Key("case")],
    )
    .unwrap();
    let alone = parse_case(STANDALONE, "case.toml").unwrap();
    assert_eq!(inline.member, alone.member);
    let first = parse_case_in(
        SPEC,
        "spec.toml",
        &[Step::Key("family"), Step::Index(0), Step::Key("case")],
    )
    .unwrap();
    assert_eq!(first.member.kappa, 0.5);
}

#[test]
fn errors_point_into_the_larger_document() {
    let bad = SPEC.replace("at = 1.0", "at = 1.5");
    let e = parse_case_in(
        &bad,
        "spec.toml",
        &[Step::Key("family"), Step::Index(1), Step::Key("case")],
    )
    .unwrap_err();
    assert_eq!(e.file, "spec.toml");
    assert_eq!(e.line, 22, "{e}");
    assert_eq!(e.key, "family[1].case.load[0].at", "{e}");
    let bad = SPEC.replace("preset = \"free\"", "preset = \"fre\"");
    let e = parse_case_in(
        &bad,
        "spec.toml",
        &[Step::Key("family"), Step::Index(1), Step::Key("case")],
    )
    .unwrap_err();
    assert_eq!(e.line, 19, "{e}");
    assert!(e.key.starts_with("family[1].case.end"), "{e}");
    let e = parse_case_in(
        SPEC,
        "spec.toml",
        &[Step::Key("family"), Step::Index(5), Step::Key("case")],
    )
    .unwrap_err();
    assert!(e.message.contains("family[5]"), "{e}");
}

//! The `expression` form: the parsed tree prints back to text that parses
//! to the same tree, evaluates like the `evalexpr` crate's own evaluator
//! (an outside reference) with the printed coefficients, prints to the
//! expected typst maths, and Levenberg–Marquardt recovers known parameters.

use evalexpr::{ContextWithMutableVariables, HashMapContext, Value};
use ltb_atlas::fit::expr::{self, Expr, ExpressionModel, Quantity};
use ltb_atlas::fit::{Coef, Formula, Model, Sample, ccurves::three_factor};

const SOURCES: [&str; 5] = [
    "c1*pi*(sqrt(1 + kappa^2 + (c2*zeta)^2) - c2*zeta)",
    "a - b*zeta/(1 + kappa) + c*ln(kappa)^2",
    "-a^2 + exp(-b*kappa) * abs(zeta - c)",
    "a / b / c - (a - b) - c",
    "2^a^0.5 * (kappa - -b) + c*1.5e-3",
];

fn names() -> Vec<String> {
    ["a", "b", "c", "c1", "c2"].map(String::from).to_vec()
}

/// Evaluate text with the `evalexpr` crate itself (functions under its
/// `math::` names), parameters substituted by their printed values.
fn reference(text: &str, kappa: f64, zeta: f64) -> f64 {
    let mut t = text.to_string();
    for f in ["sqrt", "ln", "exp", "abs"] {
        t = t.replace(&format!("{f}("), &format!("math::{f}("));
    }
    let mut ctx = HashMapContext::<evalexpr::DefaultNumericTypes>::new();
    ctx.set_value("kappa".into(), Value::Float(kappa)).unwrap();
    ctx.set_value("zeta".into(), Value::Float(zeta)).unwrap();
    ctx.set_value("pi".into(), Value::Float(std::f64::consts::PI))
        .unwrap();
    match evalexpr::eval_with_context(&t, &ctx).unwrap() {
        Value::Float(x) => x,
        Value::Int(i) => i as f64,
        v => panic!("{v:?}"),
    }
}

#[test]
fn expressions_round_trip_through_text_and_evaluate_like_evalexpr() {
    // Reference: the evalexpr crate's evaluator (a general-purpose library).
    let values = ["1.127", "0.4540", "-0.02500", "1.3", "0.45"].map(String::from);
    let p: Vec<f64> = values.iter().map(|v| v.parse().unwrap()).collect();
    for src in SOURCES {
        let tree = expr::parse(src, &names()).unwrap();
        let text = expr::to_text(&tree, &names());
        assert_eq!(
            expr::parse(&text, &names()).unwrap(),
            tree,
            "{src} -> {text}"
        );
        // With the printed values substituted the text is a closed formula.
        let closed = expr::to_text(&tree, &values);
        for (k, z) in [(0.3, 0.2), (1.0, -0.5), (2.5, 0.8)] {
            let ours = expr::eval(&tree, k, z, &p);
            let theirs = reference(&closed, k, z);
            assert!(
                (ours - theirs).abs() <= 1e-13 * ours.abs().max(1.0),
                "{src}: {ours} vs {theirs} ({closed})"
            );
        }
    }
}

#[test]
fn typst_rendering_follows_the_tree() {
    // Expected typst source written by hand from the typst math syntax
    // (typst documentation, math module: frac, sqrt, attachments).
    let tree = expr::parse(SOURCES[0], &names()).unwrap();
    let values = ["0", "0", "0", "1.127", "0.4540"].map(String::from);
    assert_eq!(
        expr::to_typst(&tree, &values),
        "1.127 dot pi dot (sqrt(1 + kappa^(2) + (0.4540 dot zeta)^(2)) - 0.4540 dot zeta)"
    );
    let tree = expr::parse("a/(1 + b*zeta)", &names()).unwrap();
    let values = ["2.5", "-0.3", "0", "0", "0"].map(String::from);
    assert_eq!(
        expr::to_typst(&tree, &values),
        "frac(2.5, 1 + (-0.3) dot zeta)"
    );
    let tree = expr::parse("-a^2", &names()).unwrap();
    assert!(
        matches!(tree, Expr::Neg(_)),
        "unary minus binds looser than ^"
    );
}

#[test]
fn unknown_names_are_refused() {
    let e = expr::parse("a*kapa", &names()).unwrap_err().to_string();
    assert!(e.contains("kapa") && e.contains("parameters"), "{e}");
    let e = expr::parse("a*cos(kappa)", &names())
        .unwrap_err()
        .to_string();
    assert!(e.contains("cos"), "{e}");
}

#[test]
fn levenberg_marquardt_recovers_three_factor_coefficients() {
    // Data made by the three-factor form itself (NCCI SN003, the form with
    // k = kw = 1) with C1 = 1.13, C2 = 0.45: the fit must return them.
    let mut s = Vec::new();
    for k in [0.2, 0.5, 1.0, 2.0] {
        for z in [-0.6, -0.2, 0.2, 0.6] {
            s.push(Sample {
                kappa: k,
                zeta: z,
                delta: 0.0,
                mu_cr: three_factor(1.13, 0.45, k, z),
                error_estimate: 0.0,
            });
        }
    }
    let n = vec!["c1".to_string(), "c2".to_string()];
    let f = expr::fit(SOURCES[0], &n, &[1.0, 0.3], Quantity::MuCr, &s).unwrap();
    assert!((f.values[0] - 1.13).abs() < 1e-8, "{:?}", f.values);
    assert!((f.values[1] - 0.45).abs() < 1e-8, "{:?}", f.values);
    // The formula as printed evaluates with the printed coefficients.
    let m = ExpressionModel {
        source: SOURCES[0].into(),
        quantity: Quantity::MuCr,
        parameters: n
            .iter()
            .zip(&f.values)
            .map(|(n, v)| Coef::new(n, *v, 4))
            .collect(),
    };
    assert_eq!(m.parameters[0].text, "1.130");
    let formula = Formula {
        model: Model::Expression(m),
        factor: None,
    };
    let c = formula.compile().unwrap();
    assert_eq!(c.mu_cr(0.7, 0.3), three_factor(1.13, 0.45, 0.7, 0.3));
    assert!(
        formula
            .typst()
            .unwrap()
            .starts_with("mu_\"cr\" = 1.130 dot pi")
    );
}

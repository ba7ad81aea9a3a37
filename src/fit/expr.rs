//! The `expression` form: a closed form written by the user with named
//! parameters, parsed by the `evalexpr` crate into its operator tree, read
//! into a small tree of our own (numbers, κ, ζ, π, parameters, + − × ÷ ^,
//! sqrt, ln, exp, abs) and fitted by Levenberg–Marquardt (the
//! `levenberg-marquardt` crate) on the relative error:
//!
//! ```text
//! minimise Σ_i ( f(κ_i, ζ_i; p) / y_i − 1 )²,   y = μcr or μcr/μ0
//! ```
//!
//! The same tree is evaluated, printed back as text (which re-parses to the
//! same tree) and printed as typst maths, so the printed formula and `eval`
//! cannot disagree.
//!
//! # References
//! - Moré, "The Levenberg–Marquardt algorithm: implementation and theory",
//!   in *Numerical Analysis* (ed. G. A. Watson), Springer LNM 630
//!   1978, 105–116 (the algorithm of the crate).

use super::{Coef, FitError, Sample, mu0, typst_num};
use evalexpr::{DefaultNumericTypes, Node, Operator, Value};
use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::{DMatrix, DVector, Dyn, Owned};
use serde::{Deserialize, Serialize};

/// What an expression gives.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Quantity {
    /// μcr itself.
    MuCr,
    /// μcr/μ0.
    MuRatio,
}

/// A variable.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Var {
    /// κ (`kappa`).
    Kappa,
    /// ζ (`zeta`).
    Zeta,
    /// π (`pi`).
    Pi,
}

/// A function.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Func {
    /// √x.
    Sqrt,
    /// ln x.
    Ln,
    /// eˣ.
    Exp,
    /// |x|.
    Abs,
}

const FUNCS: [(&str, Func); 4] = [
    ("sqrt", Func::Sqrt),
    ("ln", Func::Ln),
    ("exp", Func::Exp),
    ("abs", Func::Abs),
];

/// The expression tree.
#[derive(Debug, Clone, PartialEq)]
pub enum Expr {
    /// A literal number.
    Num(f64),
    /// κ, ζ or π.
    Var(Var),
    /// Parameter by index.
    Param(usize),
    /// −a.
    Neg(Box<Expr>),
    /// a + b.
    Add(Box<Expr>, Box<Expr>),
    /// a − b.
    Sub(Box<Expr>, Box<Expr>),
    /// a · b.
    Mul(Box<Expr>, Box<Expr>),
    /// a / b.
    Div(Box<Expr>, Box<Expr>),
    /// a ^ b.
    Pow(Box<Expr>, Box<Expr>),
    /// f(a).
    Call(Func, Box<Expr>),
}

/// Parse `source` (evalexpr syntax: + - * / ^, parentheses, `sqrt(x)`,
/// `ln(x)`, `exp(x)`, `abs(x)`; variables `kappa`, `zeta`, `pi`; every other
/// name must be one of `params`).
pub fn parse(source: &str, params: &[String]) -> Result<Expr, FitError> {
    let node: Node<DefaultNumericTypes> = evalexpr::build_operator_tree(source)
        .map_err(|e| FitError::Expression(format!("cannot parse \"{source}\": {e}")))?;
    convert(&node, params)
}

fn convert(n: &Node<DefaultNumericTypes>, params: &[String]) -> Result<Expr, FitError> {
    let ch = n.children();
    let kid = |i: usize| -> Result<Box<Expr>, FitError> {
        ch.get(i)
            .ok_or_else(|| FitError::Expression("an operator lacks an operand".into()))
            .and_then(|c| convert(c, params))
            .map(Box::new)
    };
    let bad = |what: &str| {
        FitError::Expression(format!(
            "{what} is not accepted; use numbers, kappa, zeta, pi, the parameters, + - * / ^, parentheses and sqrt, ln, exp, abs"
        ))
    };
    Ok(match n.operator() {
        Operator::RootNode => {
            if ch.len() != 1 {
                return Err(FitError::Expression(
                    "empty or multi-part expression; write one formula".into(),
                ));
            }
            *kid(0)?
        }
        Operator::Add => Expr::Add(kid(0)?, kid(1)?),
        Operator::Sub => Expr::Sub(kid(0)?, kid(1)?),
        Operator::Neg => Expr::Neg(kid(0)?),
        Operator::Mul => Expr::Mul(kid(0)?, kid(1)?),
        Operator::Div => Expr::Div(kid(0)?, kid(1)?),
        Operator::Exp => Expr::Pow(kid(0)?, kid(1)?),
        Operator::Const { value } => match value {
            Value::Float(x) => Expr::Num(*x),
            Value::Int(i) => Expr::Num(*i as f64),
            _ => return Err(bad("a non-numeric constant")),
        },
        Operator::VariableIdentifierRead { identifier } => match identifier.as_str() {
            "kappa" => Expr::Var(Var::Kappa),
            "zeta" => Expr::Var(Var::Zeta),
            "pi" => Expr::Var(Var::Pi),
            name => match params.iter().position(|p| p == name) {
                Some(i) => Expr::Param(i),
                None => return Err(FitError::UnknownName(name.to_string())),
            },
        },
        Operator::FunctionIdentifier { identifier } => {
            let name = identifier.strip_prefix("math::").unwrap_or(identifier);
            let Some((_, f)) = FUNCS.iter().find(|(n, _)| *n == name) else {
                return Err(FitError::Expression(format!(
                    "unknown function `{identifier}`; accepted: sqrt, ln, exp, abs"
                )));
            };
            Expr::Call(*f, kid(0)?)
        }
        Operator::Mod => return Err(bad("`%`")),
        _ => return Err(bad("this operator")),
    })
}

/// Evaluate at (κ, ζ) with parameter values `p`.
pub fn eval(e: &Expr, kappa: f64, zeta: f64, p: &[f64]) -> f64 {
    let r = |x: &Expr| eval(x, kappa, zeta, p);
    match e {
        Expr::Num(x) => *x,
        Expr::Var(Var::Kappa) => kappa,
        Expr::Var(Var::Zeta) => zeta,
        Expr::Var(Var::Pi) => std::f64::consts::PI,
        Expr::Param(i) => p[*i],
        Expr::Neg(a) => -r(a),
        Expr::Add(a, b) => r(a) + r(b),
        Expr::Sub(a, b) => r(a) - r(b),
        Expr::Mul(a, b) => r(a) * r(b),
        Expr::Div(a, b) => r(a) / r(b),
        Expr::Pow(a, b) => r(a).powf(r(b)),
        Expr::Call(f, a) => {
            let x = r(a);
            match f {
                Func::Sqrt => x.sqrt(),
                Func::Ln => x.ln(),
                Func::Exp => x.exp(),
                Func::Abs => x.abs(),
            }
        }
    }
}

fn prec(e: &Expr) -> u8 {
    match e {
        Expr::Add(..) | Expr::Sub(..) => 1,
        Expr::Mul(..) | Expr::Div(..) => 2,
        Expr::Neg(..) => 3,
        Expr::Pow(..) => 4,
        _ => 5,
    }
}

fn fname(f: Func) -> &'static str {
    FUNCS.iter().find(|(_, g)| *g == f).expect("listed").0
}

/// Print as text (evalexpr syntax; re-parses to the same tree), with
/// parameters written as `names` (their names, or printed values).
pub fn to_text(e: &Expr, names: &[String]) -> String {
    let t = |x: &Expr| to_text(x, names);
    // Operands are wrapped when their precedence is lower, and the right
    // operand of − and / (and both of ^) also when equal, so the tree shape
    // survives a re-parse.
    let wrap = |x: &Expr, min: u8, strict: bool| {
        let p = prec(x);
        let s = t(x);
        if p < min || (strict && p == min) || (p == 5 && s.starts_with('-')) {
            format!("({s})")
        } else {
            s
        }
    };
    match e {
        Expr::Num(x) => {
            let s = format!("{x:?}");
            s
        }
        Expr::Var(Var::Kappa) => "kappa".into(),
        Expr::Var(Var::Zeta) => "zeta".into(),
        Expr::Var(Var::Pi) => "pi".into(),
        Expr::Param(i) => {
            let n = &names[*i];
            if n.starts_with('-') {
                format!("({n})")
            } else {
                n.clone()
            }
        }
        Expr::Neg(a) => format!("-{}", wrap(a, 4, false)),
        Expr::Add(a, b) => format!("{} + {}", wrap(a, 1, false), wrap(b, 1, true)),
        Expr::Sub(a, b) => format!("{} - {}", wrap(a, 1, false), wrap(b, 1, true)),
        Expr::Mul(a, b) => format!("{} * {}", wrap(a, 2, false), wrap(b, 2, true)),
        Expr::Div(a, b) => format!("{} / {}", wrap(a, 2, false), wrap(b, 2, true)),
        Expr::Pow(a, b) => format!("{}^{}", wrap(a, 4, true), wrap(b, 4, true)),
        Expr::Call(f, a) => format!("{}({})", fname(*f), t(a)),
    }
}

/// Print as typst maths with parameters written as `values` (printed
/// coefficient strings).
pub fn to_typst(e: &Expr, values: &[String]) -> String {
    let t = |x: &Expr| to_typst(x, values);
    let wrap = |x: &Expr, min: u8, strict: bool| {
        let p = prec(x);
        let s = t(x);
        if p < min || (strict && p == min) || (p == 5 && s.starts_with('-')) {
            format!("({s})")
        } else {
            s
        }
    };
    match e {
        Expr::Num(x) => typst_num(&crate::sweep::fmt_num(*x)),
        Expr::Var(Var::Kappa) => "kappa".into(),
        Expr::Var(Var::Zeta) => "zeta".into(),
        Expr::Var(Var::Pi) => "pi".into(),
        Expr::Param(i) => {
            let v = typst_num(&values[*i]);
            if v.starts_with('-') || v.contains("times") {
                format!("({v})")
            } else {
                v
            }
        }
        Expr::Neg(a) => format!("-{}", wrap(a, 4, false)),
        Expr::Add(a, b) => format!("{} + {}", wrap(a, 1, false), wrap(b, 1, true)),
        Expr::Sub(a, b) => format!("{} - {}", wrap(a, 1, false), wrap(b, 1, true)),
        Expr::Mul(a, b) => format!("{} dot {}", wrap(a, 2, false), wrap(b, 2, true)),
        // A typst fraction groups its parts: plain parentheses are dropped
        // by typst around a numerator or denominator, so group explicitly.
        Expr::Div(a, b) => format!("frac({}, {})", t(a), t(b)),
        Expr::Pow(a, b) => format!("{}^({})", wrap(a, 4, true), t(b)),
        Expr::Call(Func::Sqrt, a) => format!("sqrt({})", t(a)),
        Expr::Call(Func::Ln, a) => format!("ln({})", t(a)),
        Expr::Call(Func::Exp, a) => format!("e^({})", t(a)),
        Expr::Call(Func::Abs, a) => format!("abs({})", t(a)),
    }
}

/// A fitted expression, printed.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ExpressionModel {
    /// The expression as the user wrote it.
    pub source: String,
    /// What it gives.
    pub quantity: Quantity,
    /// Fitted parameters, as printed (in declaration order).
    pub parameters: Vec<Coef>,
}

impl ExpressionModel {
    /// Parse the source.
    pub fn tree(&self) -> Result<Expr, FitError> {
        let names: Vec<String> = self.parameters.iter().map(|c| c.name.clone()).collect();
        parse(&self.source, &names)
    }
    /// μcr at (κ, ζ) from the parsed tree and the printed parameters.
    pub fn mu_cr(&self, tree: &Expr, kappa: f64, zeta: f64) -> f64 {
        let p: Vec<f64> = self.parameters.iter().map(|c| c.value).collect();
        let v = eval(tree, kappa, zeta, &p);
        match self.quantity {
            Quantity::MuCr => v,
            Quantity::MuRatio => v * mu0(kappa),
        }
    }
    /// Typst maths.
    pub fn typst(&self) -> Result<String, FitError> {
        let tree = self.tree()?;
        let vals: Vec<String> = self.parameters.iter().map(|c| c.text.clone()).collect();
        let lhs = match self.quantity {
            Quantity::MuCr => "mu_\"cr\"",
            Quantity::MuRatio => "mu_\"cr\" / mu_0",
        };
        Ok(format!("{lhs} = {}", to_typst(&tree, &vals)))
    }
}

struct Problem<'a> {
    tree: &'a Expr,
    data: &'a [(f64, f64, f64)],
    p: DVector<f64>,
}

impl Problem<'_> {
    fn res(&self, p: &[f64]) -> DVector<f64> {
        DVector::from_iterator(
            self.data.len(),
            self.data
                .iter()
                .map(|&(k, z, y)| eval(self.tree, k, z, p) / y - 1.0),
        )
    }
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, x: &DVector<f64>) {
        self.p.copy_from(x);
    }
    fn params(&self) -> DVector<f64> {
        self.p.clone()
    }
    fn residuals(&self) -> Option<DVector<f64>> {
        let r = self.res(self.p.as_slice());
        r.iter().all(|x| x.is_finite()).then_some(r)
    }
    fn jacobian(&self) -> Option<DMatrix<f64>> {
        // Central differences, step scaled to each parameter.
        let n = self.p.len();
        let mut j = DMatrix::zeros(self.data.len(), n);
        for c in 0..n {
            let h = 1e-6 * (1.0 + self.p[c].abs());
            let mut a = self.p.clone();
            let mut b = self.p.clone();
            a[c] += h;
            b[c] -= h;
            let d = (self.res(a.as_slice()) - self.res(b.as_slice())) / (2.0 * h);
            j.set_column(c, &d);
        }
        j.iter().all(|x| x.is_finite()).then_some(j)
    }
}

/// Unrounded result of an expression fit.
#[derive(Debug, Clone, PartialEq)]
pub struct ExpressionFit {
    /// Parameter values.
    pub values: Vec<f64>,
    /// Largest relative error on the samples.
    pub train_max_rel: f64,
}

/// Fit the parameters of `source` to the samples from `start` values.
pub fn fit(
    source: &str,
    names: &[String],
    start: &[f64],
    quantity: Quantity,
    samples: &[Sample],
) -> Result<ExpressionFit, FitError> {
    let tree = parse(source, names)?;
    if samples.len() < names.len() {
        return Err(FitError::Data(format!(
            "{} points cannot determine {} parameters",
            samples.len(),
            names.len()
        )));
    }
    let data: Vec<(f64, f64, f64)> = samples
        .iter()
        .map(|s| {
            let y = match quantity {
                Quantity::MuCr => s.mu_cr,
                Quantity::MuRatio => s.mu_cr / mu0(s.kappa),
            };
            (s.kappa, s.zeta, y)
        })
        .collect();
    let pr = Problem {
        tree: &tree,
        data: &data,
        p: DVector::from_vec(start.to_vec()),
    };
    if pr.residuals().is_none() {
        return Err(FitError::Data(
            "the expression is not finite at the start values on every grid point; change the start values".into(),
        ));
    }
    let (done, report) = LevenbergMarquardt::new().minimize(pr);
    if !report.termination.was_successful() {
        return Err(FitError::NotConverged(format!(
            "{:?}; try other start values",
            report.termination
        )));
    }
    let values: Vec<f64> = done.p.iter().copied().collect();
    let train = done
        .res(&values)
        .iter()
        .map(|r| r.abs())
        .fold(0.0, f64::max);
    Ok(ExpressionFit {
        values,
        train_max_rel: train,
    })
}

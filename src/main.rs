//! `ltb-atlas`: the command line. A thin layer over the library: parse the
//! arguments, load the case, call the solver, write the report. Exit codes:
//! 0 solved (including "no buckling"), 1 solved but not converged to the
//! tolerance, 2 bad input or a failed solve.

use anyhow::Result;
use clap::{Parser, Subcommand};
use ltb_atlas::case::{self, ResolvedCase};
use ltb_atlas::report;
use ltb_atlas::solve::{self, Settings, Status};
use ltb_atlas::stage;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

#[derive(Parser)]
#[command(
    name = "ltb-atlas",
    version,
    about = "Elastic lateral–torsional buckling of beams and cantilevers, and design aids built on it."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

/// Options every stage command shares, defined once.
#[derive(clap::Args)]
struct StageArgs {
    /// Worker threads (default: all cores).
    #[arg(long)]
    jobs: Option<usize>,
    /// Relative error target of every solve (default 1e-4).
    #[arg(long)]
    tolerance: Option<f64>,
    /// Print nothing but errors.
    #[arg(long)]
    quiet: bool,
    /// Run grids larger than the size threshold without asking.
    #[arg(long)]
    yes: bool,
    /// Result cache folder (default: $LTB_ATLAS_CACHE, $XDG_CACHE_HOME/ltb-atlas or ~/.cache/ltb-atlas).
    #[arg(long, value_name = "DIR")]
    cache: Option<PathBuf>,
    /// Solve every case afresh, neither reading nor writing the cache.
    #[arg(long, conflicts_with = "cache")]
    no_cache: bool,
}

impl StageArgs {
    /// The library's stage options from these flags.
    fn options(&self) -> stage::Options {
        stage::Options {
            jobs: self.jobs,
            tolerance: self.tolerance.unwrap_or(1e-4),
            quiet: self.quiet,
            yes: self.yes,
            cache: match (self.no_cache, &self.cache) {
                (true, _) => stage::CacheChoice::Off,
                (false, Some(d)) => stage::CacheChoice::Dir(d.clone()),
                (false, None) => stage::CacheChoice::Default,
            },
        }
    }
}

#[derive(Subcommand)]
enum Command {
    /// Solve one case: the lowest elastic critical load factor and Mcr.
    Solve {
        /// Case file (TOML).
        case: PathBuf,
        /// Print one JSON object instead of the readable report.
        #[arg(long)]
        json: bool,
        /// Write the mode shape to this CSV file.
        #[arg(long, value_name = "FILE.csv")]
        mode: Option<PathBuf>,
        /// Also solve for the reversed load.
        #[arg(long)]
        reversed: bool,
        /// Relative error target (overrides the case's [solver] tolerance; default 1e-4).
        #[arg(long)]
        tolerance: Option<f64>,
    },
    /// Solve every family of a sweep spec over its grid and write CSV tables.
    Sweep {
        /// Sweep spec (TOML).
        spec: PathBuf,
        /// Output folder (created if needed).
        #[arg(long)]
        out: PathBuf,
        /// Solve only slice K of N of every family (K in 1..=N); combine with `merge`.
        #[arg(long, value_name = "K/N")]
        shard: Option<String>,
        /// Threads, tolerance, cache and output options shared by every stage.
        #[command(flatten)]
        stage: StageArgs,
    },
    /// Check simplified code rules against the engine over each family's grid (families with `rules`).
    Check {
        /// Sweep spec (TOML) whose families list `rules`.
        spec: PathBuf,
        /// Output folder (created if needed).
        #[arg(long)]
        out: PathBuf,
        /// A rule is unconservative where Mcr(rule)/Mcr(FE) > 1 + this (default 0.001).
        #[arg(long, value_name = "X")]
        rule_tolerance: Option<f64>,
        /// Threads, tolerance, cache and output options shared by every stage.
        #[command(flatten)]
        stage: StageArgs,
    },
    /// Design buckling resistance tables (EN 1993-1-1:2005 or AISC 360-16) against length, from the engine's Mcr.
    Resistance {
        /// Resistance spec (TOML with a top-level [design] table).
        spec: PathBuf,
        /// Output folder (created if needed).
        #[arg(long)]
        out: PathBuf,
        /// Threads, tolerance, cache and output options shared by every stage.
        #[command(flatten)]
        stage: StageArgs,
    },
    /// Draw the charts of a spec (SVG) from sweep, fit and check outputs.
    Chart {
        /// The spec (TOML) the outputs come from.
        spec: PathBuf,
        /// Folder of the sweep output (needed when the spec has families).
        #[arg(long, value_name = "DIR")]
        sweep: Option<PathBuf>,
        /// Folder of the fit output (fitted curves and validity ranges).
        #[arg(long, value_name = "DIR")]
        fit: Option<PathBuf>,
        /// Folder of the rule-check output (ratio maps).
        #[arg(long, value_name = "DIR")]
        check: Option<PathBuf>,
        /// Folder of the resistance output (resistance curves).
        #[arg(long, value_name = "DIR")]
        resistance: Option<PathBuf>,
        /// Output folder (created if needed).
        #[arg(long)]
        out: PathBuf,
        /// Threads, tolerance, cache and output options shared by every stage.
        #[command(flatten)]
        stage: StageArgs,
    },
    /// Build a handbook: sweep tables, print tables, typst pages and the PDF, with a manifest.
    Build {
        /// Handbook spec (TOML): a sweep spec plus a [handbook] table.
        spec: PathBuf,
        /// Build folder (created; an earlier build there is replaced).
        #[arg(long)]
        out: PathBuf,
        /// typst 0.15.1 binary (default: $TYPST_BIN, else typst on PATH).
        #[arg(long, value_name = "PATH")]
        typst: Option<PathBuf>,
        /// Edition date YYYY-MM-DD (default: the spec's date, else $SOURCE_DATE_EPOCH).
        #[arg(long, value_name = "YYYY-MM-DD")]
        date: Option<String>,
        /// Threads, tolerance, cache and output options shared by every stage.
        #[command(flatten)]
        stage: StageArgs,
    },
    /// Compare two handbook builds: moved table cells, changed fits, flipped rule verdicts.
    Diff {
        /// The older build folder.
        old: PathBuf,
        /// The newer build folder.
        new: PathBuf,
        /// Relative change below which numbers count as equal (default 0: any change).
        #[arg(long, default_value_t = 0.0)]
        tolerance: f64,
        /// Also write the changes to this CSV file.
        #[arg(long, value_name = "FILE.csv")]
        csv: Option<PathBuf>,
    },
    /// Write a starter handbook spec, with comments on every setting, into DIR/handbook.toml.
    Init {
        /// Folder to write into (created if needed).
        dir: PathBuf,
    },
    /// Fit formulas (surfaces, C1/C2 curves, closed forms) to the families that declare `fit`, with measured error bounds.
    Fit {
        /// Sweep spec (TOML) whose families declare `fit`.
        spec: PathBuf,
        /// Output folder (created if needed).
        #[arg(long)]
        out: PathBuf,
        /// Threads, tolerance, cache and output options shared by every stage.
        #[command(flatten)]
        stage: StageArgs,
    },
    /// Evaluate a fitted formula (a .fit.json file) at one kappa and zeta.
    Eval {
        /// The fit file.
        fit: PathBuf,
        /// Torsion parameter kappa.
        #[arg(long, allow_negative_numbers = true)]
        kappa: f64,
        /// Load height parameter zeta.
        #[arg(long, allow_negative_numbers = true)]
        zeta: f64,
        /// Monosymmetry parameter delta (fits made across delta only; default 0).
        #[arg(long, allow_negative_numbers = true, default_value_t = 0.0)]
        delta: f64,
        /// Print one JSON object.
        #[arg(long)]
        json: bool,
        /// Evaluate outside the fit's validity domain (output marked as extrapolated).
        #[arg(long)]
        extrapolate: bool,
    },
    /// Combine the shards of a sharded sweep into the files an unsharded run writes.
    Merge {
        /// The sweep spec the shards were run from.
        spec: PathBuf,
        /// The folder holding the shards (and receiving the merged files).
        #[arg(long)]
        out: PathBuf,
    },
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(code) => code,
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::from(2)
        }
    }
}

fn run(cli: Cli) -> Result<ExitCode> {
    match cli.command {
        Command::Solve {
            case,
            json,
            mode,
            reversed,
            tolerance,
        } => solve_cmd(&case, json, mode.as_deref(), reversed, tolerance),
        Command::Sweep {
            spec,
            out,
            shard,
            stage,
        } => sweep_cmd(&spec, &out, &stage.options(), shard),
        Command::Merge { spec, out } => merge_cmd(&spec, &out),
        Command::Fit { spec, out, stage } => {
            let opts = stage.options();
            let ls = stage::load_spec(&spec)?;
            stage::fit::run(&ls, &out, &opts)?;
            Ok(ExitCode::SUCCESS)
        }
        Command::Eval {
            fit,
            kappa,
            zeta,
            delta,
            json,
            extrapolate,
        } => {
            let e = stage::fit::eval_delta(&fit, kappa, zeta, delta, extrapolate)?;
            let text = if json {
                format!("{}\n", serde_json::to_string_pretty(&e.to_json())?)
            } else {
                e.to_text()
            };
            std::io::stdout().write_all(text.as_bytes())?;
            Ok(ExitCode::SUCCESS)
        }
        Command::Build {
            spec,
            out,
            typst,
            date,
            stage,
        } => {
            let opts = stage.options();
            build_cmd(
                &spec,
                &out,
                &opts,
                stage::build::BuildOptions { typst, date },
            )
        }
        Command::Diff {
            old,
            new,
            tolerance,
            csv,
        } => diff_cmd(&old, &new, tolerance, csv.as_deref()),
        Command::Init { dir } => {
            let p = stage::build::init(&dir)?;
            eprintln!(
                "wrote {}; build it with `ltb-atlas build {} --out DIR`",
                p.display(),
                p.display()
            );
            Ok(ExitCode::SUCCESS)
        }
        Command::Chart {
            spec,
            sweep,
            fit,
            check,
            resistance,
            out,
            stage,
        } => {
            let opts = stage.options();
            // A resistance spec may hold no family.
            let ls = stage::resistance::load(&spec)?;
            let sweep = match sweep {
                Some(s) => s,
                None if ls.spec.families.is_empty() => PathBuf::new(),
                None => anyhow::bail!(
                    "{}: the spec has families: give their sweep output with --sweep DIR",
                    spec.display()
                ),
            };
            let src = stage::chart::Sources {
                sweep,
                fit,
                check,
                resistance,
            };
            stage::chart::run(&ls, &src, &out, &opts)?;
            Ok(ExitCode::SUCCESS)
        }
        Command::Resistance { spec, out, stage } => {
            let opts = stage.options();
            let ls = stage::resistance::load(&spec)?;
            stage::resistance::run(&ls, &out, &opts)?;
            Ok(ExitCode::SUCCESS)
        }
        Command::Check {
            spec,
            out,
            rule_tolerance,
            stage,
        } => {
            let opts = stage.options();
            check_cmd(&spec, &out, &opts, rule_tolerance)
        }
    }
}

/// `FILE:LINE:COLUMN: supports start (line a), end (line b): ` naming the
/// support tables of a case (the first one's position), for errors about the
/// support system as a whole.
fn support_location(path: &Path, rc: &ResolvedCase) -> String {
    match rc.supports_at.first() {
        Some((_, line, column)) => {
            let keys: Vec<String> = rc
                .supports_at
                .iter()
                .map(|(k, l, _)| format!("{k} (line {l})"))
                .collect();
            format!(
                "{}:{line}:{column}: supports {}: ",
                path.display(),
                keys.join(", ")
            )
        }
        None => format!("{}: ", path.display()),
    }
}

fn solve_cmd(
    path: &Path,
    json: bool,
    mode: Option<&Path>,
    reversed: bool,
    tolerance: Option<f64>,
) -> Result<ExitCode> {
    let rc: ResolvedCase = case::load_case(path).map_err(anyhow::Error::new)?;
    let tol = tolerance.or(rc.tolerance).unwrap_or(1e-4);
    if !(tol > 0.0 && tol < 0.1) {
        anyhow::bail!("--tolerance must lie between 0 and 0.1 (a relative error), got {tol}");
    }
    let settings = Settings {
        tolerance: tol,
        reversed,
        ..Default::default()
    };
    let sol = solve::solve(&rc.member, &settings).map_err(|e| match e {
        // A mechanism is a matter of the supports as a whole: point at them.
        solve::SolveError::Mechanism(msg) => {
            anyhow::anyhow!("{}{msg}", support_location(path, &rc))
        }
        other => anyhow::anyhow!("{}: {other}", path.display()),
    })?;
    // Prepare every output before writing any.
    let mode_bytes = match mode {
        Some(_) => {
            let mut b = Vec::new();
            report::write_mode_csv(&mut b, &rc, &sol.forward)?;
            Some(b)
        }
        None => None,
    };
    let design = stage::resistance::solve_design(path, &rc, &sol)?;
    let mut out = Vec::new();
    if json {
        let mut j = report::to_json(&rc, &sol, tol);
        if let (Some((fields, _)), Some(map)) = (&design, j.as_object_mut()) {
            map.extend(fields.clone());
        }
        serde_json::to_writer_pretty(&mut out, &j)?;
        out.push(b'\n');
    } else {
        report::write_text(&mut out, &rc, &sol, &path.display().to_string())?;
        for line in design.iter().flat_map(|(_, lines)| lines) {
            writeln!(out, "{line}")?;
        }
    }
    if let (Some(p), Some(b)) = (mode, mode_bytes) {
        stage::write_atomic(p, &b)?;
    }
    std::io::stdout().write_all(&out)?;
    let not_conv = sol.forward.status == Status::NotConverged
        || sol
            .reversed
            .as_ref()
            .is_some_and(|r| r.status == Status::NotConverged);
    Ok(if not_conv {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

fn sweep_cmd(
    spec_path: &Path,
    out: &Path,
    opts: &stage::Options,
    shard: Option<String>,
) -> Result<ExitCode> {
    let shard = match shard {
        None => None,
        Some(t) => {
            let parsed = t.split_once('/').and_then(|(k, n)| {
                Some((
                    k.trim().parse::<usize>().ok()?,
                    n.trim().parse::<usize>().ok()?,
                ))
            });
            match parsed {
                Some((k, n)) if n >= 1 && (1..=n).contains(&k) => {
                    Some(ltb_atlas::sweep::run::Shard { k, n })
                }
                _ => {
                    anyhow::bail!("--shard {t}: write K/N with 1 ≤ K ≤ N, for example --shard 2/8")
                }
            }
        }
    };
    let ls = stage::load_spec(spec_path)?;
    let summary = stage::sweep(&ls, out, opts, shard)?;
    if !opts.quiet {
        eprintln!(
            "{} cases in {} families, {} not ok; tables and manifest in {}",
            summary.cases,
            ls.spec.families.len(),
            summary.failed,
            out.display()
        );
    }
    Ok(if summary.failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

fn check_cmd(
    spec_path: &Path,
    out: &Path,
    opts: &stage::Options,
    rule_tolerance: Option<f64>,
) -> Result<ExitCode> {
    let ls = stage::load_spec(spec_path)?;
    let tol = rule_tolerance.unwrap_or(ltb_atlas::rules::compare::DEFAULT_TOLERANCE);
    let s = stage::check::run_with_tolerance(&ls, out, opts, tol)?;
    if !opts.quiet {
        eprintln!(
            "{} rule checks, {} cases without an FE result, {} frontier crossings not refined; files in {}",
            s.checks,
            s.failed,
            s.unrefined,
            out.display()
        );
    }
    Ok(if s.failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

fn merge_cmd(spec_path: &Path, out: &Path) -> Result<ExitCode> {
    let ls = stage::load_spec(spec_path)?;
    let (spec, hash) = (&ls.spec, &ls.hash);
    let s = ltb_atlas::sweep::run::merge(spec, hash, out)
        .map_err(|e| anyhow::anyhow!("{}: {e}", out.display()))?;
    eprintln!(
        "merged {} cases ({} not ok) into {}",
        s.cases,
        s.failed,
        out.display()
    );
    Ok(if s.failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

fn build_cmd(
    spec: &Path,
    out: &Path,
    opts: &stage::Options,
    b: stage::build::BuildOptions,
) -> Result<ExitCode> {
    let s = stage::build::run(spec, out, opts, &b)?;
    if !opts.quiet {
        eprintln!(
            "{} cases ({} not ok); {} files; handbook: {}",
            s.cases,
            s.failed,
            s.files,
            s.pdf.as_deref().unwrap_or(out).display()
        );
    }
    Ok(if s.failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

/// Exit 0 when the builds agree, 1 when they differ.
fn diff_cmd(old: &Path, new: &Path, tol: f64, csv: Option<&Path>) -> Result<ExitCode> {
    let changes = stage::build::diff_builds(old, new, tol)?;
    if let Some(p) = csv {
        stage::write_atomic(p, &stage::build::diff_csv(&changes)?)?;
    }
    print!("{}", stage::build::diff_report(old, new, &changes, tol));
    Ok(if changes.is_empty() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    })
}

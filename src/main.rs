//! `ltb-atlas`: the command line. A thin layer over the library: parse the
//! arguments, load the case, call the solver, write the report. Exit codes:
//! 0 solved (including "no buckling"), 1 solved but not converged to the
//! tolerance, 2 bad input or a failed solve.

use anyhow::{Context, Result};
use clap::{Parser, Subcommand};
use ltb_atlas::case::{self, ResolvedCase};
use ltb_atlas::report;
use ltb_atlas::solve::{self, Settings, Status};
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
        /// Solve only slice K of N of every family (K in 1..=N); combine with `merge`.
        #[arg(long, value_name = "K/N")]
        shard: Option<String>,
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

/// Grids above this many cases need `--yes`.
const SWEEP_CONFIRM: usize = 200_000;

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
            jobs,
            tolerance,
            quiet,
            yes,
            cache,
            no_cache,
            shard,
        } => sweep_cmd(
            &spec, &out, jobs, tolerance, quiet, yes, cache, no_cache, shard,
        ),
        Command::Merge { spec, out } => merge_cmd(&spec, &out),
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

/// Write `bytes` to `path` through a temporary file in the same folder and
/// a rename, so that no partial file is ever left behind.
fn write_atomic(path: &Path, bytes: &[u8]) -> Result<()> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let mut tmp = tempfile::NamedTempFile::new_in(dir)
        .with_context(|| format!("cannot write in {}", dir.display()))?;
    tmp.write_all(bytes)?;
    tmp.persist(path)
        .with_context(|| format!("cannot write {}", path.display()))?;
    Ok(())
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
    let mut out = Vec::new();
    if json {
        serde_json::to_writer_pretty(&mut out, &report::to_json(&rc, &sol, tol))?;
        out.push(b'\n');
    } else {
        report::write_text(&mut out, &rc, &sol, &path.display().to_string())?;
    }
    if let (Some(p), Some(b)) = (mode, mode_bytes) {
        write_atomic(p, &b)?;
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

#[allow(clippy::too_many_arguments)]
fn sweep_cmd(
    spec_path: &Path,
    out: &Path,
    jobs: Option<usize>,
    tolerance: Option<f64>,
    quiet: bool,
    yes: bool,
    cache_dir: Option<PathBuf>,
    no_cache: bool,
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
                Some((k, n)) if n >= 1 && (1..=n).contains(&k) => Some(sweep::run::Shard { k, n }),
                _ => {
                    anyhow::bail!("--shard {t}: write K/N with 1 ≤ K ≤ N, for example --shard 2/8")
                }
            }
        }
    };
    use indicatif::{ProgressBar, ProgressStyle};
    use ltb_atlas::sweep::{self, spec::parse_spec};
    use std::io::IsTerminal;

    let text = std::fs::read_to_string(spec_path)
        .with_context(|| format!("cannot read the spec {}", spec_path.display()))?;
    let dir = spec_path.parent().unwrap_or(Path::new("."));
    let spec =
        parse_spec(&text, &spec_path.display().to_string(), dir).map_err(anyhow::Error::new)?;
    let hash = sweep::run::spec_hash(&text, &spec);
    let tol = tolerance.unwrap_or(1e-4);
    if !(tol > 0.0 && tol < 0.1) {
        anyhow::bail!("--tolerance must lie between 0 and 0.1 (a relative error), got {tol}");
    }
    let total: usize = spec
        .families
        .iter()
        .map(|f| shard.map_or(f.size(), |s| s.range(f.size()).len()))
        .sum();
    if total > SWEEP_CONFIRM && !yes {
        anyhow::bail!(
            "{}: the spec holds {total} cases (above {SWEEP_CONFIRM}); at about 10 000 solves per second per core this takes roughly {:.0} s of CPU; rerun with --yes to go ahead",
            spec_path.display(),
            total as f64 / 1e4
        );
    }
    let mut pool = rayon::ThreadPoolBuilder::new();
    if let Some(j) = jobs {
        anyhow::ensure!(j >= 1, "--jobs must be at least 1");
        pool = pool.num_threads(j);
    }
    let pool = pool.build().context("cannot start the worker threads")?;
    let settings = Settings {
        tolerance: tol,
        ..Default::default()
    };
    let show_bar = !quiet && std::io::stderr().is_terminal();
    let bar = if show_bar {
        let b = ProgressBar::new(total as u64);
        b.set_style(
            ProgressStyle::with_template(
                "{spinner} [{elapsed_precise}] {bar:40} {pos}/{len} cases ({per_sec}, ETA {eta})",
            )
            .expect("valid template"),
        );
        b
    } else {
        ProgressBar::hidden()
    };
    let progress = |n: u64| bar.inc(n);
    let mut log = |line: String| {
        if !quiet && !show_bar {
            eprintln!("{line}");
        }
    };
    let mut cache = if no_cache {
        sweep::cache::Cache::disabled()
    } else {
        let dir = cache_dir.unwrap_or_else(sweep::cache::default_dir);
        sweep::cache::Cache::open(&dir).with_context(|| {
            format!(
                "cannot open the result cache {} (use --cache DIR or --no-cache)",
                dir.display()
            )
        })?
    };
    if cache.corrupted > 0 && !quiet {
        eprintln!(
            "warning: {} damaged cache records ignored (their cases are solved again)",
            cache.corrupted
        );
    }
    let cx = sweep::run::Context {
        pool: &pool,
        settings: &settings,
        cache: &mut cache,
        progress: &progress,
        log: &mut log,
    };
    let summary = sweep::run::run(&spec, &hash, out, shard, cx)
        .map_err(|e| anyhow::anyhow!("{e} (check the --out folder and its permissions)"))?;
    if summary.discarded && !quiet {
        eprintln!(
            "warning: a cached result differed from a fresh solve; the cache was discarded and rebuilt"
        );
    }
    if !quiet && summary.hits > 0 {
        eprintln!(
            "{} of {} cases from the cache ({} checked by solving again)",
            summary.hits, summary.cases, summary.checked
        );
    }
    bar.finish_and_clear();
    let failed_total = summary.failed;
    if !quiet {
        eprintln!(
            "{total} cases in {} families, {failed_total} not ok; tables and manifest in {}",
            spec.families.len(),
            out.display()
        );
    }
    Ok(if failed_total > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

fn merge_cmd(spec_path: &Path, out: &Path) -> Result<ExitCode> {
    use ltb_atlas::sweep::spec::parse_spec;
    let text = std::fs::read_to_string(spec_path)
        .with_context(|| format!("cannot read the spec {}", spec_path.display()))?;
    let dir = spec_path.parent().unwrap_or(Path::new("."));
    let spec =
        parse_spec(&text, &spec_path.display().to_string(), dir).map_err(anyhow::Error::new)?;
    let hash = ltb_atlas::sweep::run::spec_hash(&text, &spec);
    let s = ltb_atlas::sweep::run::merge(&spec, &hash, out)
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

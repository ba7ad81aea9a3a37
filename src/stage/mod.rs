//! Stages: the driver layer shared by the command line and the handbook
//! build. Each stage reads a spec, does its work through the library and
//! writes files atomically; the CLI only parses arguments and maps errors to
//! exit codes. Errors here carry their context as text (`anyhow`), the
//! numerics below keep typed errors.

pub mod check;
pub mod resistance;

pub mod chart;

pub mod fit;

use crate::solve::Settings;
use crate::sweep::cache::{self, Cache, point_key};
use crate::sweep::run::{self, Shard, Summary};
use crate::sweep::spec::{Spec, parse_spec};
use crate::sweep::{Family, Point, Row, solve_point_in};
use anyhow::{Context, Result};
use rayon::prelude::*;
use std::io::Write;
use std::path::{Path, PathBuf};

pub mod build;

/// Where solved cases are remembered between runs.
#[derive(Debug, Clone, Default, PartialEq)]
pub enum CacheChoice {
    /// `$LTB_ATLAS_CACHE`, `$XDG_CACHE_HOME/ltb-atlas` or `~/.cache/ltb-atlas`.
    #[default]
    Default,
    /// This folder.
    Dir(PathBuf),
    /// Neither read nor write a cache.
    Off,
}

/// Options every stage shares.
#[derive(Debug, Clone)]
pub struct Options {
    /// Worker threads (None: all cores).
    pub jobs: Option<usize>,
    /// Relative error target of every solve.
    pub tolerance: f64,
    /// Print nothing but errors.
    pub quiet: bool,
    /// Run grids above [`CONFIRM`] cases without asking.
    pub yes: bool,
    /// The result cache.
    pub cache: CacheChoice,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            jobs: None,
            tolerance: 1e-4,
            quiet: false,
            yes: false,
            cache: CacheChoice::Default,
        }
    }
}

impl Options {
    /// Solver settings for every case of a stage.
    pub fn settings(&self) -> Settings {
        Settings {
            tolerance: self.tolerance,
            ..Default::default()
        }
    }

    /// Check the tolerance and start the worker pool.
    pub fn pool(&self) -> Result<rayon::ThreadPool> {
        let tol = self.tolerance;
        if !(tol > 0.0 && tol < 0.1) {
            anyhow::bail!("--tolerance must lie between 0 and 0.1 (a relative error), got {tol}");
        }
        let mut pool = rayon::ThreadPoolBuilder::new();
        if let Some(j) = self.jobs {
            anyhow::ensure!(j >= 1, "--jobs must be at least 1");
            pool = pool.num_threads(j);
        }
        pool.build().context("cannot start the worker threads")
    }

    /// Open the result cache the options name.
    pub fn open_cache(&self) -> Result<Cache> {
        let dir = match &self.cache {
            CacheChoice::Off => return Ok(Cache::disabled()),
            CacheChoice::Dir(d) => d.clone(),
            CacheChoice::Default => cache::default_dir(),
        };
        let c = Cache::open(&dir).with_context(|| {
            format!(
                "cannot open the result cache {} (use --cache DIR or --no-cache)",
                dir.display()
            )
        })?;
        if c.corrupted > 0 && !self.quiet {
            eprintln!(
                "warning: {} damaged cache records ignored (their cases are solved again)",
                c.corrupted
            );
        }
        Ok(c)
    }
}

/// Grids above this many cases need `--yes`.
pub const CONFIRM: usize = 200_000;

/// A spec read from its file: the text (later stages parse their own keys
/// from it), the parsed families and the hash that identifies it.
#[derive(Debug, Clone)]
pub struct LoadedSpec {
    /// The spec file.
    pub path: PathBuf,
    /// Its text.
    pub text: String,
    /// The families.
    pub spec: Spec,
    /// SHA-256 of the spec and its resolved cases.
    pub hash: String,
}

impl LoadedSpec {
    /// The folder relative paths in the spec start from.
    pub fn dir(&self) -> &Path {
        self.path
            .parent()
            .filter(|p| !p.as_os_str().is_empty())
            .unwrap_or(Path::new("."))
    }
    /// The file name as errors show it.
    pub fn origin(&self) -> String {
        self.path.display().to_string()
    }
}

/// Read and parse a spec.
pub fn load_spec(path: &Path) -> Result<LoadedSpec> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read the spec {}", path.display()))?;
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let spec = parse_spec(&text, &path.display().to_string(), dir).map_err(anyhow::Error::new)?;
    let hash = run::spec_hash(&text, &spec);
    Ok(LoadedSpec {
        path: path.to_path_buf(),
        text,
        spec,
        hash,
    })
}

/// Write `bytes` to `path` through a temporary file in the same folder and
/// a rename, so that no partial file is ever left behind.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<()> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    std::fs::create_dir_all(dir).with_context(|| format!("cannot create {}", dir.display()))?;
    let mut tmp = tempfile::Builder::new()
        .prefix(run::TMP_PREFIX)
        .tempfile_in(dir)
        .with_context(|| format!("cannot write in {}", dir.display()))?;
    tmp.write_all(bytes)
        .with_context(|| format!("cannot write {}", path.display()))?;
    tmp.persist(path)
        .with_context(|| format!("cannot write {}", path.display()))?;
    Ok(())
}

/// A progress bar on a terminal, nothing elsewhere (CI logs get plain
/// summary lines from the stages instead).
pub fn progress_bar(total: u64, quiet: bool) -> indicatif::ProgressBar {
    use indicatif::{ProgressBar, ProgressStyle};
    use std::io::IsTerminal;
    if quiet || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let b = ProgressBar::new(total);
    b.set_style(
        ProgressStyle::with_template(
            "{spinner} [{elapsed_precise}] {bar:40} {pos}/{len} cases ({per_sec}, ETA {eta})",
        )
        .expect("valid template"),
    );
    b
}

/// The sweep stage: solve every family of the spec (or one shard of each)
/// and write its tables and manifest into `out`.
pub fn sweep(ls: &LoadedSpec, out: &Path, opts: &Options, shard: Option<Shard>) -> Result<Summary> {
    let total: usize = ls
        .spec
        .families
        .iter()
        .map(|f| shard.map_or(f.size(), |s| s.range(f.size()).len()))
        .sum();
    if total > CONFIRM && !opts.yes {
        anyhow::bail!(
            "{}: the spec holds {total} cases (above {CONFIRM}); at about 10 000 solves per second per core this takes roughly {:.0} s of CPU; rerun with --yes to go ahead",
            ls.path.display(),
            total as f64 / 1e4
        );
    }
    let pool = opts.pool()?;
    let settings = opts.settings();
    let bar = progress_bar(total as u64, opts.quiet);
    let show_bar = !bar.is_hidden();
    let progress = |n: u64| bar.inc(n);
    let quiet = opts.quiet;
    let mut log = |line: String| {
        if !quiet && !show_bar {
            eprintln!("{line}");
        }
    };
    let mut cache = opts.open_cache()?;
    let cx = run::Context {
        pool: &pool,
        settings: &settings,
        cache: &mut cache,
        progress: &progress,
        log: &mut log,
    };
    let summary = run::run(&ls.spec, &ls.hash, out, shard, cx)
        .map_err(|e| anyhow::anyhow!("{e} (check the --out folder and its permissions)"))?;
    bar.finish_and_clear();
    if summary.discarded && !opts.quiet {
        eprintln!(
            "warning: a cached result differed from a fresh solve; the cache was discarded and rebuilt"
        );
    }
    if !opts.quiet && summary.hits > 0 {
        eprintln!(
            "{} of {} cases from the cache ({} checked by solving again)",
            summary.hits, summary.cases, summary.checked
        );
    }
    Ok(summary)
}

/// Solve arbitrary points (a family's grid, a validation grid, refinement
/// points) in parallel, in order, each on its own (no warm start), through
/// the cache: results are identical whatever the thread count or cache
/// state. Fresh results are appended to the cache.
pub fn solve_points(
    points: Vec<Point>,
    settings: &Settings,
    pool: &rayon::ThreadPool,
    cache: &mut Cache,
) -> Result<Vec<Row>> {
    let shared: &Cache = cache;
    let solved: Vec<(Row, Option<[u8; 32]>)> = pool.install(|| {
        points
            .into_par_iter()
            .map_init(crate::solve::Workspace::new, |ws, p| {
                let k = point_key(&p, settings);
                match shared.get(&k) {
                    Some(e) => (e.row(p), None),
                    None => (solve_point_in(ws, p, settings), Some(k)),
                }
            })
            .collect()
    });
    let fresh: Vec<([u8; 32], cache::Entry)> = solved
        .iter()
        .filter_map(|(r, k)| k.map(|k| (k, cache::Entry::of(r))))
        .collect();
    cache
        .append(&fresh)
        .context("cannot append to the result cache")?;
    Ok(solved.into_iter().map(|(r, _)| r).collect())
}

/// Every row of a family's grid, in grid order, through the cache.
pub fn family_rows(
    f: &Family,
    settings: &Settings,
    pool: &rayon::ThreadPool,
    cache: &mut Cache,
) -> Result<Vec<Row>> {
    let mut rows = Vec::with_capacity(f.size());
    let mut start = 0;
    while start < f.size() {
        let end = (start + run::CHUNK).min(f.size());
        let pts: Vec<Point> = (start..end).map(|i| f.point(i)).collect();
        rows.extend(solve_points(pts, settings, pool, cache)?);
        start = end;
    }
    Ok(rows)
}

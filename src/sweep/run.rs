//! Running a parsed spec: every family's grid solved in chunks on a rayon
//! pool and written in order, print tables, and the manifest last. Files go
//! through temporary files in the target folder and a rename.

use super::cache::{Cache, Entry, key};
use super::spec::Spec;
use super::{Cell, Row, header, preamble, print_tables, solve_point, write_row};
use crate::solve::Settings;
use rayon::prelude::*;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Cases solved and written per chunk (bounded memory, ordered output).
pub const CHUNK: usize = 2048;

/// Why a run stopped.
#[derive(Debug, thiserror::Error)]
pub enum SweepError {
    /// A file could not be written.
    #[error("cannot write {path}: {source}")]
    Io {
        /// The file or folder.
        path: PathBuf,
        /// The cause.
        source: std::io::Error,
    },
}

fn io(path: &Path) -> impl FnOnce(std::io::Error) -> SweepError + '_ {
    move |source| SweepError::Io {
        path: path.to_path_buf(),
        source,
    }
}

/// What a run wrote.
#[derive(Debug, Clone, PartialEq)]
pub struct Summary {
    /// Cases in the grids.
    pub cases: usize,
    /// Cases whose status is not "ok".
    pub failed: usize,
    /// Files written (sorted), the manifest excluded.
    pub files: Vec<String>,
    /// Cases taken from the cache.
    pub hits: usize,
    /// Cache hits solved again as a check.
    pub checked: usize,
    /// True when a checked hit differed and the cache was discarded.
    pub discarded: bool,
}

/// Cache hits re-solved per family as a check (the first ones found).
pub const CHECKS: usize = 4;

fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), SweepError> {
    let dir = path.parent().unwrap_or(Path::new("."));
    let mut tmp = tempfile::NamedTempFile::new_in(dir).map_err(io(dir))?;
    tmp.write_all(bytes).map_err(io(path))?;
    tmp.persist(path).map_err(|e| SweepError::Io {
        path: path.to_path_buf(),
        source: e.error,
    })?;
    Ok(())
}

/// Solve and write every family of `spec` into `out` (created if needed).
/// `progress` is called with the number of cases just finished (from any
/// worker thread); `log` receives one plain line per family.
pub fn run(
    spec: &Spec,
    spec_hash: &str,
    out: &Path,
    pool: &rayon::ThreadPool,
    settings: &Settings,
    cache: &mut Cache,
    progress: &(dyn Fn(u64) + Sync),
    log: &mut dyn FnMut(String),
) -> Result<Summary, SweepError> {
    std::fs::create_dir_all(out).map_err(io(out))?;
    // Check the cache first: re-solve the first few hits of every family;
    // any difference discards the whole cache.
    let (mut checked, mut discarded) = (0, false);
    if !cache.is_empty() {
        'families: for f in &spec.families {
            let mut found = 0;
            for i in 0..f.size().min(64 * CHUNK) {
                let p = f.point(i);
                let k = key(&p.member, settings);
                if let Some(e) = cache.get(&k).cloned() {
                    checked += 1;
                    found += 1;
                    if Entry::of(&solve_point(p, settings)) != e {
                        cache.discard().map_err(io(out))?;
                        discarded = true;
                        break 'families;
                    }
                    if found == CHECKS {
                        break;
                    }
                }
            }
        }
    }
    let mut hits = 0usize;
    // A manifest from an earlier run no longer describes the folder.
    let manifest_path = out.join("manifest.json");
    if manifest_path.exists() {
        std::fs::remove_file(&manifest_path).map_err(io(&manifest_path))?;
    }
    let mut files = Vec::new();
    let mut fam_json = Vec::new();
    let mut failed_total = 0usize;
    let mut total = 0usize;
    for f in &spec.families {
        let name = format!("{}.csv", f.name);
        let target = out.join(&name);
        let mut tmp = tempfile::NamedTempFile::new_in(out).map_err(io(out))?;
        let mut failed = 0usize;
        let mut cells: Vec<Cell> = Vec::with_capacity(f.size());
        {
            let mut buf = std::io::BufWriter::new(tmp.as_file_mut());
            preamble(&mut buf, f, spec_hash, settings.tolerance).map_err(io(&target))?;
            let mut w = csv::WriterBuilder::new().from_writer(&mut buf as &mut dyn Write);
            let csv_err = |e: csv::Error| SweepError::Io {
                path: target.clone(),
                source: std::io::Error::other(e),
            };
            w.write_record(header(f)).map_err(csv_err)?;
            let n = f.size();
            let mut start = 0;
            while start < n {
                let end = (start + CHUNK).min(n);
                let shared: &Cache = cache;
                let solved: Vec<(Row, Option<[u8; 32]>)> = pool.install(|| {
                    (start..end)
                        .into_par_iter()
                        .map(|i| {
                            let p = f.point(i);
                            let k = key(&p.member, settings);
                            let out = match shared.get(&k) {
                                Some(e) => (e.row(p), None),
                                None => (solve_point(p, settings), Some(k)),
                            };
                            progress(1);
                            out
                        })
                        .collect()
                });
                let fresh: Vec<([u8; 32], Entry)> = solved
                    .iter()
                    .filter_map(|(r, k)| k.map(|k| (k, Entry::of(r))))
                    .collect();
                hits += solved.len() - fresh.len();
                cache.append(&fresh).map_err(io(out))?;
                let rows: Vec<Row> = solved.into_iter().map(|(r, _)| r).collect();
                for r in &rows {
                    if r.status != "ok" {
                        failed += 1;
                    }
                    cells.push(Cell::from(r));
                    write_row(&mut w, f, r).map_err(csv_err)?;
                }
                start = end;
            }
            w.flush().map_err(io(&target))?;
            drop(w);
            buf.flush().map_err(io(&target))?;
        }
        tmp.persist(&target).map_err(|e| SweepError::Io {
            path: target.clone(),
            source: e.error,
        })?;
        failed_total += failed;
        total += f.size();
        let mut tables = Vec::new();
        for (tname, bytes) in print_tables(f, &cells, spec_hash) {
            write_atomic(&out.join(&tname), &bytes)?;
            tables.push(tname);
        }
        fam_json.push(serde_json::json!({"name": f.name, "cases": f.size(), "failed": failed, "file": name, "print_tables": tables}));
        log(format!(
            "family {}: {} cases, {} not ok -> {}",
            f.name,
            f.size(),
            failed,
            name
        ));
        files.push(name);
        files.extend(tables);
    }
    files.sort();
    let manifest = serde_json::json!({
        "tool": "ltb-atlas",
        "version": env!("CARGO_PKG_VERSION"),
        "spec_sha256": spec_hash,
        "solver_tolerance": settings.tolerance,
        "cases": total,
        "failed": failed_total,
        "families": fam_json,
        "files": files,
        "caution": crate::CAUTION,
    });
    let mut bytes = serde_json::to_vec_pretty(&manifest).expect("a JSON value serialises");
    bytes.push(b'\n');
    write_atomic(&manifest_path, &bytes)?;
    Ok(Summary {
        cases: total,
        failed: failed_total,
        files,
        hits,
        checked,
        discarded,
    })
}

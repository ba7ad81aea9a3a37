//! Running a parsed spec: every family's grid solved in chunks on a rayon
//! pool and written in order, print tables, and the manifest last. Files go
//! through temporary files in the target folder and a rename.

use super::cache::{Cache, Entry, point_key};
use super::spec::Spec;
use super::{Cell, Row, header, preamble, print_tables, solve_point, solve_point_in, write_row};
use crate::solve;
use crate::solve::Settings;
use rayon::prelude::*;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Prefix of the temporary files a run writes before renaming them; left
/// behind only by a killed run, and removed by the next one.
pub const TMP_PREFIX: &str = ".ltb-atlas-tmp-";

/// Remove temporary files a killed run left in `dir`.
fn clean_stale(dir: &Path) {
    if let Ok(rd) = std::fs::read_dir(dir) {
        for e in rd.flatten() {
            if e.file_name().to_string_lossy().starts_with(TMP_PREFIX) {
                let _ = std::fs::remove_file(e.path());
            }
        }
    }
}

/// The spec hash: SHA-256 of the spec text and of the canonical encoding of
/// every resolved base case and variant (so that case files named by the
/// spec count too), as lower-case hex.
pub fn spec_hash(text: &str, spec: &Spec) -> String {
    use sha2::{Digest, Sha256};
    let mut h = Sha256::new();
    h.update(text.as_bytes());
    let s = Settings::default();
    for f in &spec.families {
        h.update(super::cache::encode(&f.case.member, &s));
        for v in &f.variants {
            h.update(super::cache::encode(&v.case.member, &s));
        }
    }
    h.finalize().iter().map(|b| format!("{b:02x}")).collect()
}

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
    /// Shards cannot be merged.
    #[error("{0}")]
    Merge(String),
}

/// A slice of every family's grid: shard `k` of `n` (1-based), the
/// contiguous rows ⌊(k−1)·size/n⌋ .. ⌊k·size/n⌋.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// This shard, 1..=n.
    pub k: usize,
    /// Number of shards.
    pub n: usize,
}

impl Shard {
    /// Rows of a family of `size` cases in this shard.
    pub fn range(&self, size: usize) -> std::ops::Range<usize> {
        ((self.k - 1) * size / self.n)..(self.k * size / self.n)
    }
    fn suffix(&self) -> String {
        format!("shard-{}-of-{}", self.k, self.n)
    }
}

/// Everything a run needs besides the spec.
pub struct Context<'a> {
    /// Worker pool.
    pub pool: &'a rayon::ThreadPool,
    /// Solver settings for every case.
    pub settings: &'a Settings,
    /// The result cache (possibly disabled).
    pub cache: &'a mut Cache,
    /// Called with the number of cases just finished (from any thread).
    pub progress: &'a (dyn Fn(u64) + Sync),
    /// Receives one plain line per family.
    pub log: &'a mut dyn FnMut(String),
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
    let mut tmp = tempfile::Builder::new()
        .prefix(TMP_PREFIX)
        .tempfile_in(dir)
        .map_err(io(dir))?;
    tmp.write_all(bytes).map_err(io(path))?;
    tmp.persist(path).map_err(|e| SweepError::Io {
        path: path.to_path_buf(),
        source: e.error,
    })?;
    Ok(())
}

/// Solve and write every family of `spec` into `out` (created if needed):
/// `<name>.csv`, print tables and `manifest.json` last; or, for a shard,
/// `<name>.shard-K-of-N.csv` and `manifest.shard-K-of-N.json` only, to be
/// combined by [`merge`].
pub fn run(
    spec: &Spec,
    spec_hash: &str,
    out: &Path,
    shard: Option<Shard>,
    cx: Context<'_>,
) -> Result<Summary, SweepError> {
    let Context {
        pool,
        settings,
        cache,
        progress,
        log,
    } = cx;
    std::fs::create_dir_all(out).map_err(io(out))?;
    // Check the cache first: re-solve the first few hits of every family;
    // any difference discards the whole cache.
    let (mut checked, mut discarded) = (0, false);
    if !cache.is_empty() {
        'families: for f in &spec.families {
            let mut found = 0;
            let range = shard.map_or(0..f.size(), |s| s.range(f.size()));
            for i in range.take(64 * CHUNK) {
                let p = f.point(i);
                let k = point_key(&p, settings);
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
    let manifest_name = match shard {
        Some(s) => format!("manifest.{}.json", s.suffix()),
        None => "manifest.json".to_string(),
    };
    let manifest_path = out.join(&manifest_name);
    clean_stale(out);
    // Any manifest describing this folder is stale from now on; a shard run
    // leaves the folder incomplete until `merge`.
    for stale in [manifest_path.clone(), out.join("manifest.json")] {
        if stale.exists() {
            std::fs::remove_file(&stale).map_err(io(&stale))?;
        }
    }
    let mut files = Vec::new();
    let mut fam_json = Vec::new();
    let mut failed_total = 0usize;
    let mut total = 0usize;
    for f in &spec.families {
        let name = match shard {
            Some(s) => format!("{}.{}.csv", f.name, s.suffix()),
            None => format!("{}.csv", f.name),
        };
        let target = out.join(&name);
        let range = shard.map_or(0..f.size(), |s| s.range(f.size()));
        let mut tmp = tempfile::Builder::new()
            .prefix(TMP_PREFIX)
            .tempfile_in(out)
            .map_err(io(out))?;
        let mut failed = 0usize;
        let mut cells: Vec<Cell> = Vec::with_capacity(range.len());
        {
            let mut buf = std::io::BufWriter::new(tmp.as_file_mut());
            preamble(&mut buf, f, spec_hash, settings.tolerance).map_err(io(&target))?;
            let mut w = csv::WriterBuilder::new().from_writer(&mut buf);
            let csv_err = |e: csv::Error| SweepError::Io {
                path: target.clone(),
                source: std::io::Error::other(e),
            };
            w.write_record(header(f)).map_err(csv_err)?;
            // Solving overlaps writing: a writer thread takes each solved
            // chunk, in order, while the pool solves the next one; output and
            // cache are the same as a sequential run.
            let (tx, rx) = std::sync::mpsc::sync_channel::<Vec<Row>>(1);
            let (solved_ok, written) = std::thread::scope(|sc| {
                let writer = sc.spawn(|| -> Result<(), csv::Error> {
                    for chunk in rx {
                        for r in &chunk {
                            if r.status != "ok" {
                                failed += 1;
                            }
                            cells.push(Cell::from(r));
                            write_row(&mut w, f, r)?;
                        }
                    }
                    Ok(())
                });
                let mut start = range.start;
                let mut solved_ok: Result<(), SweepError> = Ok(());
                while start < range.end {
                    let end = (start + CHUNK).min(range.end);
                    let shared: &Cache = cache;
                    let solved: Vec<(Row, Option<[u8; 32]>)> = pool.install(|| {
                        (start..end)
                            .into_par_iter()
                            .map_init(solve::Workspace::new, |ws, i| {
                                let p = f.point(i);
                                let k = point_key(&p, settings);
                                let out = match shared.get(&k) {
                                    Some(e) => (e.row(p), None),
                                    None => (solve_point_in(ws, p, settings), Some(k)),
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
                    if let Err(e) = cache.append(&fresh) {
                        solved_ok = Err(io(out)(e));
                        break;
                    }
                    if tx
                        .send(solved.into_iter().map(|(r, _)| r).collect())
                        .is_err()
                    {
                        // The writer stopped on an error: it is reported below.
                        break;
                    }
                    start = end;
                }
                drop(tx);
                let written = writer.join().expect("the writer thread does not panic");
                (solved_ok, written)
            });
            solved_ok?;
            written.map_err(csv_err)?;
            w.flush().map_err(io(&target))?;
            drop(w);
            buf.flush().map_err(io(&target))?;
        }
        tmp.persist(&target).map_err(|e| SweepError::Io {
            path: target.clone(),
            source: e.error,
        })?;
        failed_total += failed;
        total += range.len();
        log(format!(
            "family {}: {} cases, {} not ok -> {}",
            f.name,
            range.len(),
            failed,
            name
        ));
        if shard.is_some() {
            fam_json.push(serde_json::json!({"name": f.name, "from": range.start, "to": range.end, "failed": failed, "file": name}));
            files.push(name);
        } else {
            let (j, fs) = finish_family(out, f, &name, &cells, failed, spec_hash)?;
            fam_json.push(j);
            files.extend(fs);
        }
    }
    files.sort();
    let manifest = match shard {
        Some(s) => serde_json::json!({
            "tool": "ltb-atlas",
            "version": env!("CARGO_PKG_VERSION"),
            "spec_sha256": spec_hash,
            "solver_tolerance": settings.tolerance,
            "solver_revision": super::cache::SOLVER_REVISION,
            "shard": s.k,
            "of": s.n,
            "families": fam_json,
            "files": files,
        }),
        None => manifest_json(
            spec_hash,
            settings.tolerance,
            total,
            failed_total,
            fam_json,
            &files,
        ),
    };
    write_json(&manifest_path, &manifest)?;
    Ok(Summary {
        cases: total,
        failed: failed_total,
        files,
        hits,
        checked,
        discarded,
    })
}

fn write_json(path: &Path, v: &serde_json::Value) -> Result<(), SweepError> {
    let mut bytes = serde_json::to_vec_pretty(v).expect("a JSON value serialises");
    bytes.push(b'\n');
    write_atomic(path, &bytes)
}

fn manifest_json(
    hash: &str,
    tol: f64,
    total: usize,
    failed: usize,
    families: Vec<serde_json::Value>,
    files: &[String],
) -> serde_json::Value {
    serde_json::json!({
        "tool": "ltb-atlas",
        "version": env!("CARGO_PKG_VERSION"),
        "spec_sha256": hash,
        "solver_tolerance": tol,
        "cases": total,
        "failed": failed,
        "families": families,
        "files": files,
        "caution": crate::CAUTION,
    })
}

/// Print tables of a finished family and its manifest entry.
fn finish_family(
    out: &Path,
    f: &super::Family,
    name: &str,
    cells: &[Cell],
    failed: usize,
    hash: &str,
) -> Result<(serde_json::Value, Vec<String>), SweepError> {
    let mut tables = Vec::new();
    for (tname, bytes) in print_tables(f, cells, hash) {
        write_atomic(&out.join(&tname), &bytes)?;
        tables.push(tname);
    }
    let j = serde_json::json!({"name": f.name, "cases": f.size(), "failed": failed, "file": name, "print_tables": tables});
    let mut files = vec![name.to_string()];
    files.extend(tables);
    Ok((j, files))
}

/// Combine the shards 1..=N of `spec` found in `dir` into exactly the files
/// an unsharded run writes, then remove the shard files. Refuses missing,
/// duplicate or foreign shards (another spec, tolerance or shard count).
pub fn merge(spec: &Spec, spec_hash: &str, dir: &Path) -> Result<Summary, SweepError> {
    let mut manifests: Vec<serde_json::Value> = Vec::new();
    let mut names: Vec<String> = std::fs::read_dir(dir)
        .map_err(io(dir))?
        .filter_map(|e| e.ok().map(|e| e.file_name().to_string_lossy().into_owned()))
        .filter(|n| n.starts_with("manifest.shard-") && n.ends_with(".json"))
        .collect();
    names.sort();
    if names.is_empty() {
        return Err(SweepError::Merge(format!(
            "no shard manifests (manifest.shard-K-of-N.json) in {}",
            dir.display()
        )));
    }
    for n in &names {
        let text = std::fs::read_to_string(dir.join(n)).map_err(io(&dir.join(n)))?;
        let v: serde_json::Value = serde_json::from_str(&text)
            .map_err(|e| SweepError::Merge(format!("{n}: not a shard manifest ({e})")))?;
        manifests.push(v);
    }
    let of = manifests[0]["of"].as_u64().unwrap_or(0) as usize;
    let tol = manifests[0]["solver_tolerance"]
        .as_f64()
        .unwrap_or(f64::NAN);
    let mut seen = vec![false; of + 1];
    for (m, n) in manifests.iter().zip(&names) {
        if m["spec_sha256"].as_str() != Some(spec_hash) {
            return Err(SweepError::Merge(format!(
                "{n} belongs to another spec (its spec hash differs); remove it or merge with its own spec"
            )));
        }
        if m["of"].as_u64() != Some(of as u64) || m["solver_tolerance"].as_f64() != Some(tol) {
            return Err(SweepError::Merge(format!(
                "{n} comes from a run with another shard count or tolerance than {}",
                names[0]
            )));
        }
        let k = m["shard"].as_u64().unwrap_or(0) as usize;
        if k == 0 || k > of {
            return Err(SweepError::Merge(format!(
                "{n}: shard number {k} is outside 1..={of}"
            )));
        }
        if seen[k] {
            return Err(SweepError::Merge(format!(
                "shard {k} of {of} is present twice"
            )));
        }
        seen[k] = true;
    }
    let missing: Vec<String> = (1..=of)
        .filter(|&k| !seen[k])
        .map(|k| k.to_string())
        .collect();
    if !missing.is_empty() {
        return Err(SweepError::Merge(format!(
            "shards {} of {of} are missing; run them (--shard K/{of}) before merging",
            missing.join(", ")
        )));
    }
    manifests.sort_by_key(|m| m["shard"].as_u64().unwrap_or(0));
    for (m, n) in manifests.iter().zip(&names) {
        if m["version"].as_str() != Some(env!("CARGO_PKG_VERSION"))
            || m["solver_revision"].as_u64() != Some(super::cache::SOLVER_REVISION as u64)
        {
            return Err(SweepError::Merge(format!(
                "{n} was written by another version of ltb-atlas; run the shards again"
            )));
        }
    }
    // Check every shard of every family before writing anything.
    for f in &spec.families {
        let mut next = 0usize;
        for (si, m) in manifests.iter().enumerate() {
            let k = si + 1;
            let e = m["families"]
                .as_array()
                .and_then(|a| {
                    a.iter()
                        .find(|e| e["name"].as_str() == Some(f.name.as_str()))
                })
                .ok_or_else(|| SweepError::Merge(format!("shard {k} has no family {}", f.name)))?;
            let (from, to) = (
                e["from"].as_u64().unwrap_or(u64::MAX) as usize,
                e["to"].as_u64().unwrap_or(0) as usize,
            );
            let expected = format!("{}.shard-{k}-of-{of}.csv", f.name);
            if e["file"].as_str() != Some(expected.as_str()) {
                return Err(SweepError::Merge(format!(
                    "shard {k} of family {} names an unexpected file",
                    f.name
                )));
            }
            if from != next || to < from {
                return Err(SweepError::Merge(format!(
                    "family {}: shard {k} covers rows {from}..{to}, expected to start at {next}",
                    f.name
                )));
            }
            let body = std::fs::read_to_string(dir.join(&expected)).map_err(|e| {
                SweepError::Merge(format!(
                    "cannot read {}: {e}",
                    dir.join(&expected).display()
                ))
            })?;
            let rows = body
                .lines()
                .filter(|l| !l.starts_with('#'))
                .count()
                .saturating_sub(1);
            if rows != to - from {
                return Err(SweepError::Merge(format!(
                    "{expected} holds {rows} rows, its manifest says {}",
                    to - from
                )));
            }
            next = to;
        }
        if next != f.size() {
            return Err(SweepError::Merge(format!(
                "family {}: the shards cover {next} of {} rows",
                f.name,
                f.size()
            )));
        }
    }
    clean_stale(dir);
    let old_manifest = dir.join("manifest.json");
    if old_manifest.exists() {
        std::fs::remove_file(&old_manifest).map_err(io(&old_manifest))?;
    }
    let mut files = Vec::new();
    let mut fam_json = Vec::new();
    let (mut total, mut failed_total) = (0, 0);
    let mut shard_files = Vec::new();
    for f in &spec.families {
        let name = format!("{}.csv", f.name);
        let target = dir.join(&name);
        let mut text = String::new();
        let mut cells = Vec::with_capacity(f.size());
        let mut failed = 0;
        let mut next = 0usize;
        for (si, m) in manifests.iter().enumerate() {
            let e = m["families"]
                .as_array()
                .and_then(|a| {
                    a.iter()
                        .find(|e| e["name"].as_str() == Some(f.name.as_str()))
                })
                .ok_or_else(|| {
                    SweepError::Merge(format!("shard {} has no family {}", si + 1, f.name))
                })?;
            let from = e["from"].as_u64().unwrap_or(u64::MAX) as usize;
            let to = e["to"].as_u64().unwrap_or(0) as usize;
            if from != next {
                return Err(SweepError::Merge(format!(
                    "family {}: shard {} starts at row {from}, expected {next}",
                    f.name,
                    si + 1
                )));
            }
            next = to;
            let file = e["file"].as_str().unwrap_or_default().to_string();
            let body = std::fs::read_to_string(dir.join(&file)).map_err(io(&dir.join(&file)))?;
            let mut lines = body.lines();
            let mut head = String::new();
            for l in lines.by_ref() {
                head.push_str(l);
                head.push('\n');
                if !l.starts_with('#') {
                    break; // the header line
                }
            }
            if si == 0 {
                text.push_str(&head);
            }
            let hdr: Vec<String> = header(f);
            let col = |c: &str| hdr.iter().position(|h| h == c).expect("contract column");
            let (mu, est, st) = (col("mu_cr"), col("error_estimate"), col("status"));
            let mcr = hdr.iter().position(|h| h == super::MCR_COLUMN);
            let mut rows = 0;
            for l in lines {
                text.push_str(l);
                text.push('\n');
                let mut rdr = csv::ReaderBuilder::new()
                    .has_headers(false)
                    .from_reader(l.as_bytes());
                let rec = rdr
                    .records()
                    .next()
                    .and_then(|r| r.ok())
                    .ok_or_else(|| SweepError::Merge(format!("{file}: unreadable row")))?;
                let ok = rec.get(st) == Some("ok");
                if !ok {
                    failed += 1;
                }
                cells.push(Cell {
                    mu_cr: rec.get(mu).and_then(|x| x.parse().ok()),
                    error_estimate: rec.get(est).and_then(|x| x.parse().ok()),
                    ok,
                    mcr: mcr.and_then(|c| rec.get(c)).and_then(|x| x.parse().ok()),
                });
                rows += 1;
            }
            if rows != to - from {
                return Err(SweepError::Merge(format!(
                    "{file} holds {rows} rows, its manifest says {}",
                    to - from
                )));
            }
            shard_files.push(file);
        }
        if next != f.size() {
            return Err(SweepError::Merge(format!(
                "family {}: the shards cover {next} of {} rows",
                f.name,
                f.size()
            )));
        }
        write_atomic(&target, text.as_bytes())?;
        total += f.size();
        failed_total += failed;
        let (j, fs) = finish_family(dir, f, &name, &cells, failed, spec_hash)?;
        fam_json.push(j);
        files.extend(fs);
    }
    files.sort();
    write_json(
        &dir.join("manifest.json"),
        &manifest_json(spec_hash, tol, total, failed_total, fam_json, &files),
    )?;
    for f in shard_files.iter().chain(names.iter()) {
        std::fs::remove_file(dir.join(f)).map_err(io(&dir.join(f)))?;
    }
    Ok(Summary {
        cases: total,
        failed: failed_total,
        files,
        hits: 0,
        checked: 0,
        discarded: false,
    })
}

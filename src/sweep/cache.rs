//! The result cache shared by every stage that solves cases.
//!
//! Key: SHA-256 of a canonical encoding of the member to solve (every field
//! in a fixed order, floats as their IEEE-754 bits with −0 written as 0,
//! presets already expanded by the case reader, defaults explicit) together
//! with the solver settings (tolerance, finest level, mesh controls) and
//! [`SOLVER_REVISION`], which must change whenever the engine's numbers can.
//!
//! Storage: one append-only text file `records-v1.txt` in the cache folder,
//! one record per line:
//!
//! ```text
//! <key, 64 hex> <status, hex of UTF-8> <mu_cr bits|-> <load_factor bits|-> <error_estimate bits|-> <elements> <check, 16 hex>
//! ```
//!
//! where `check` is the start of SHA-256 of everything before it, so a torn
//! or altered record is detected and ignored. Floats are stored as bits so a
//! hit reproduces the row byte for byte. Records are appended as chunks
//! finish, so an interrupted sweep resumes where it stopped.

use super::{Point, Row};
use crate::model::{Fixity, Load, Member, Support};
use crate::solve::Settings;
use sha2::{Digest, Sha256};
use std::collections::HashMap;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Bump whenever the engine can return different numbers for the same case.
pub const SOLVER_REVISION: u32 = 3;

/// File name of the record store inside the cache folder.
pub const RECORDS: &str = "records-v1.txt";

/// A cached outcome (everything of a row that the solve produced).
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// Status text.
    pub status: String,
    /// μcr.
    pub mu_cr: Option<f64>,
    /// Load factor.
    pub load_factor: Option<f64>,
    /// Error estimate.
    pub error_estimate: Option<f64>,
    /// Elements.
    pub elements: usize,
}

impl Entry {
    /// The outcome part of a row.
    pub fn of(r: &Row) -> Entry {
        Entry {
            status: r.status.clone(),
            mu_cr: r.mu_cr,
            load_factor: r.load_factor,
            error_estimate: r.error_estimate,
            elements: r.elements,
        }
    }
    /// A row for `p` with this outcome.
    pub fn row(&self, p: Point) -> Row {
        let mu0 = std::f64::consts::PI * (1.0 + p.kappa * p.kappa).sqrt();
        Row {
            status: self.status.clone(),
            mu_cr: self.mu_cr,
            mu0,
            load_factor: self.load_factor,
            error_estimate: self.error_estimate,
            elements: self.elements,
            point: p,
        }
    }
}

fn bits(x: f64) -> u64 {
    if x == 0.0 { 0 } else { x.to_bits() }
}

fn put(buf: &mut Vec<u8>, x: f64) {
    buf.extend_from_slice(&bits(x).to_le_bytes());
}

fn put_fix(buf: &mut Vec<u8>, f: Fixity) {
    match f {
        Fixity::Free => buf.push(0),
        Fixity::Fixed => buf.push(1),
        Fixity::Spring(k) => {
            buf.push(2);
            put(buf, k);
        }
    }
}

fn put_support(buf: &mut Vec<u8>, s: &Support) {
    for f in [
        s.lateral,
        s.lateral_rotation,
        s.twist,
        s.warping,
        s.vertical,
        s.in_plane_rotation,
    ] {
        put_fix(buf, f);
    }
}

/// The canonical encoding of a member and the solver settings.
pub fn encode(m: &Member, s: &Settings) -> Vec<u8> {
    let mut b = Vec::with_capacity(256);
    b.extend_from_slice(b"ltb-atlas case v1");
    b.extend_from_slice(&SOLVER_REVISION.to_le_bytes());
    put(&mut b, s.tolerance);
    b.extend_from_slice(&s.max_level.to_le_bytes());
    put(&mut b, s.mesh.h_max);
    put(&mut b, s.mesh.first);
    put(&mut b, s.mesh.growth);
    put(&mut b, m.kappa);
    put(&mut b, m.delta);
    put_support(&mut b, &m.start);
    put_support(&mut b, &m.end);
    b.extend_from_slice(&(m.supports.len() as u64).to_le_bytes());
    for p in &m.supports {
        put(&mut b, p.at);
        put_support(&mut b, &p.support);
    }
    b.extend_from_slice(&(m.restraints.len() as u64).to_le_bytes());
    for r in &m.restraints {
        put(&mut b, r.at);
        put(&mut b, r.zeta);
        put_fix(&mut b, r.lateral);
        put_fix(&mut b, r.twist);
    }
    b.extend_from_slice(&(m.continuous.len() as u64).to_le_bytes());
    for c in &m.continuous {
        for x in [c.from, c.to, c.zeta, c.lateral, c.twist] {
            put(&mut b, x);
        }
    }
    b.extend_from_slice(&(m.loads.len() as u64).to_le_bytes());
    for l in &m.loads {
        match *l {
            Load::Point { at, fz, zeta } => {
                b.push(0);
                for x in [at, fz, zeta] {
                    put(&mut b, x);
                }
            }
            Load::Distributed {
                from,
                to,
                fz_from,
                fz_to,
                zeta,
            } => {
                b.push(1);
                for x in [from, to, fz_from, fz_to, zeta] {
                    put(&mut b, x);
                }
            }
            Load::EndMoments { start, end } => {
                b.push(2);
                put(&mut b, start);
                put(&mut b, end);
            }
        }
    }
    match m.axial {
        None => b.push(0),
        Some(a) => {
            b.push(1);
            for x in [a.n, a.zeta_centroid, a.rho] {
                put(&mut b, x);
            }
        }
    }
    b.extend_from_slice(&(m.segments.len() as u64).to_le_bytes());
    for s in &m.segments {
        for x in [s.from, s.to, s.eiz, s.git, s.eiw, s.eiy, s.delta] {
            put(&mut b, x);
        }
    }
    b
}

/// The cache key of a member solved with `s`.
pub fn key(m: &Member, s: &Settings) -> [u8; 32] {
    Sha256::digest(encode(m, s)).into()
}

/// The cache key of a grid point: its member's key, extended by the
/// factor that converts the member's μ to the point's reference length when
/// that factor is not 1 (a backspan), since cached rows hold μ already
/// converted.
pub fn point_key(p: &Point, s: &Settings) -> [u8; 32] {
    match p.backspan {
        None => key(&p.member, s),
        Some(r) => {
            let mut b = encode(&p.member, s);
            b.extend_from_slice(b"backspan_ratio");
            b.extend_from_slice(&bits(r).to_le_bytes());
            Sha256::digest(b).into()
        }
    }
}

fn hex(b: &[u8]) -> String {
    b.iter().map(|x| format!("{x:02x}")).collect()
}

fn opt_bits(x: Option<f64>) -> String {
    x.map(|v| format!("{:016x}", bits(v)))
        .unwrap_or_else(|| "-".into())
}

fn parse_opt(s: &str) -> Option<Option<f64>> {
    if s == "-" {
        Some(None)
    } else {
        u64::from_str_radix(s, 16)
            .ok()
            .map(|b| Some(f64::from_bits(b)))
    }
}

/// One record line (without the newline).
pub fn record(k: &[u8; 32], e: &Entry) -> String {
    // Status as hex of its UTF-8 bytes: any message survives exactly.
    let status = hex(e.status.as_bytes());
    let body = format!(
        "{} {} {} {} {} {}",
        hex(k),
        status,
        opt_bits(e.mu_cr),
        opt_bits(e.load_factor),
        opt_bits(e.error_estimate),
        e.elements
    );
    let check = hex(&Sha256::digest(body.as_bytes())[..8]);
    format!("{body} {check}")
}

/// Parse a record line; None when it is torn or altered.
pub fn parse_record(line: &str) -> Option<([u8; 32], Entry)> {
    let (body, check) = line.rsplit_once(' ')?;
    if hex(&Sha256::digest(body.as_bytes())[..8]) != check {
        return None;
    }
    let f: Vec<&str> = body.split(' ').collect();
    if f.len() != 6 || f[0].len() != 64 {
        return None;
    }
    let mut k = [0u8; 32];
    for (i, byte) in k.iter_mut().enumerate() {
        *byte = u8::from_str_radix(&f[0][2 * i..2 * i + 2], 16).ok()?;
    }
    let raw: Option<Vec<u8>> = (0..f[1].len() / 2)
        .map(|i| u8::from_str_radix(f[1].get(2 * i..2 * i + 2)?, 16).ok())
        .collect();
    let status = String::from_utf8(raw?).ok()?;
    Some((
        k,
        Entry {
            status,
            mu_cr: parse_opt(f[2])?,
            load_factor: parse_opt(f[3])?,
            error_estimate: parse_opt(f[4])?,
            elements: f[5].parse().ok()?,
        },
    ))
}

/// The loaded cache: lookups are by key only (nothing is emitted in map order).
#[derive(Debug, Default)]
pub struct Cache {
    dir: Option<PathBuf>,
    map: HashMap<[u8; 32], Entry>,
    /// Records that failed their check when loading.
    pub corrupted: usize,
}

impl Cache {
    /// No cache at all (`--no-cache`).
    pub fn disabled() -> Cache {
        Cache::default()
    }

    /// Load the records in `dir` (created if needed).
    pub fn open(dir: &Path) -> std::io::Result<Cache> {
        std::fs::create_dir_all(dir)?;
        let mut c = Cache {
            dir: Some(dir.to_path_buf()),
            ..Cache::default()
        };
        let path = dir.join(RECORDS);
        if let Ok(file) = std::fs::File::open(&path) {
            use std::io::BufRead;
            // Line by line as bytes: a damaged line (even invalid UTF-8) is
            // counted and skipped, never a reason to ignore the whole store.
            for line in std::io::BufReader::new(file).split(b'\n') {
                let line = line?;
                if line.is_empty() {
                    continue;
                }
                match std::str::from_utf8(&line).ok().and_then(parse_record) {
                    Some((k, e)) => {
                        c.map.insert(k, e);
                    }
                    None => c.corrupted += 1,
                }
            }
        }
        Ok(c)
    }

    /// A cached outcome.
    pub fn get(&self, k: &[u8; 32]) -> Option<&Entry> {
        self.map.get(k)
    }

    /// Number of records loaded.
    pub fn len(&self) -> usize {
        self.map.len()
    }

    /// True when nothing is cached.
    pub fn is_empty(&self) -> bool {
        self.map.is_empty()
    }

    /// Forget every record and truncate the store (after a failed check).
    pub fn discard(&mut self) -> std::io::Result<()> {
        self.map.clear();
        if let Some(d) = &self.dir {
            std::fs::write(d.join(RECORDS), b"")?;
        }
        Ok(())
    }

    /// Append new outcomes (in the given order) and remember them.
    pub fn append(&mut self, items: &[([u8; 32], Entry)]) -> std::io::Result<()> {
        let Some(d) = &self.dir else {
            return Ok(());
        };
        if items.is_empty() {
            return Ok(());
        }
        let mut text = String::new();
        for (k, e) in items {
            text.push_str(&record(k, e));
            text.push('\n');
        }
        let mut f = std::fs::OpenOptions::new()
            .create(true)
            .append(true)
            .open(d.join(RECORDS))?;
        f.write_all(text.as_bytes())?;
        f.flush()?;
        for (k, e) in items {
            self.map.insert(*k, e.clone());
        }
        Ok(())
    }
}

/// The default cache folder: `$LTB_ATLAS_CACHE`, else `$XDG_CACHE_HOME/ltb-atlas`,
/// else `~/.cache/ltb-atlas`, else `.ltb-atlas-cache`.
pub fn default_dir() -> PathBuf {
    if let Some(p) = std::env::var_os("LTB_ATLAS_CACHE") {
        return PathBuf::from(p);
    }
    if let Some(p) = std::env::var_os("XDG_CACHE_HOME") {
        return PathBuf::from(p).join("ltb-atlas");
    }
    if let Some(h) = std::env::var_os("HOME") {
        return PathBuf::from(h).join(".cache").join("ltb-atlas");
    }
    PathBuf::from(".ltb-atlas-cache")
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn records_round_trip_and_detect_alteration() {
        let k = [7u8; 32];
        let e = Entry {
            status: "ok".into(),
            mu_cr: Some(3.7787618759772075),
            load_factor: Some(3.7787618759772075),
            error_estimate: Some(7.5e-6),
            elements: 16,
        };
        let line = record(&k, &e);
        assert_eq!(parse_record(&line), Some((k, e.clone())));
        // One flipped digit anywhere is detected.
        let mut bad = line.clone().into_bytes();
        bad[70] = if bad[70] == b'0' { b'1' } else { b'0' };
        assert_eq!(parse_record(std::str::from_utf8(&bad).unwrap()), None);
        assert_eq!(parse_record(&line[..line.len() - 3]), None);
        let e2 = Entry {
            status: "error: the member is a mechanism".into(),
            mu_cr: None,
            load_factor: None,
            error_estimate: None,
            elements: 0,
        };
        assert_eq!(parse_record(&record(&k, &e2)).unwrap().1, e2);
    }

    #[test]
    fn a_damaged_line_never_hides_the_other_records() {
        let dir = tempfile::tempdir().unwrap();
        let k = [1u8; 32];
        let e = Entry {
            status: "ok".into(),
            mu_cr: Some(1.5),
            load_factor: Some(1.5),
            error_estimate: Some(1e-5),
            elements: 8,
        };
        let mut bytes = record(&k, &e).into_bytes();
        bytes.extend_from_slice(b"\n\xff\xfe not a record\n");
        bytes.extend_from_slice(record(&[2u8; 32], &e).as_bytes());
        bytes.push(b'\n');
        std::fs::write(dir.path().join(RECORDS), bytes).unwrap();
        let c = Cache::open(dir.path()).unwrap();
        assert_eq!((c.len(), c.corrupted), (2, 1));
        assert_eq!(c.get(&k), Some(&e));
    }

    #[test]
    fn key_ignores_negative_zero_and_sees_every_field() {
        use crate::model::{Load, Member, Support};
        let s = Settings::default();
        let a = Member::new(1.0, Support::FORK, Support::FORK).with_load(Load::Point {
            at: 0.5,
            fz: -1.0,
            zeta: 0.0,
        });
        let b = Member::new(1.0, Support::FORK, Support::FORK).with_load(Load::Point {
            at: 0.5,
            fz: -1.0,
            zeta: -0.0,
        });
        assert_eq!(key(&a, &s), key(&b, &s));
        let c = Member::new(1.0, Support::FORK, Support::FORK).with_load(Load::Point {
            at: 0.5,
            fz: -1.0,
            zeta: 1e-300,
        });
        assert_ne!(key(&a, &s), key(&c, &s));
        assert_ne!(
            key(&a, &s),
            key(
                &a,
                &Settings {
                    tolerance: 1e-5,
                    ..s
                }
            )
        );
    }
}

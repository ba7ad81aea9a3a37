//! Throughput benchmark of the critical-moment engine: converged solves per
//! second on one thread, each solve doing its own error estimate and inertia
//! proof, over a fixed pseudo-random set of distinct cases (no cache, no warm
//! start from another case). Prints its figures; run with
//! `cargo bench --bench throughput`. Under `cargo test` it returns at once.

#[path = "../tests/common/mod.rs"]
mod common;

use ltb_atlas::model::Member;
use ltb_atlas::solve::{Settings, Status, Workspace, solve_in};
use std::time::Instant;

/// Small deterministic generator (64-bit LCG, Knuth's MMIX constants).
struct Lcg(u64);
impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

fn log_uniform(r: &mut Lcg, lo: f64, hi: f64) -> f64 {
    (lo.ln() + r.next() * (hi.ln() - lo.ln())).exp()
}

/// Next (κ, ζ): κ log-uniform in [lo, hi], then ζ uniform in [−1, 1] (in that order of draws).
fn kappa_zeta(r: &mut Lcg, lo: f64, hi: f64) -> (f64, f64) {
    let kappa = log_uniform(r, lo, hi);
    let zeta = -1.0 + 2.0 * r.next();
    (kappa, zeta)
}

pub fn mix(n: usize) -> Vec<Member> {
    let mut r = Lcg(20261201);
    (0..n)
        .map(|i| {
            let (kappa, zeta) = kappa_zeta(&mut r, 0.05, 5.0);
            let point = r.next() < 0.5;
            // Even cases: built-in cantilever (tip or uniform load); odd: simple span (central
            // point or uniform load).
            match (i % 2 == 0, point) {
                (true, true) => common::cantilever_tip(kappa, zeta),
                (true, false) => common::cantilever_uniform(kappa, zeta),
                (false, true) => common::simple_span_central_point(kappa, zeta),
                (false, false) => common::simple_span_uniform(kappa, zeta),
            }
        })
        .collect()
}

pub fn cantilever_tip(n: usize) -> Vec<Member> {
    let mut r = Lcg(4100);
    (0..n)
        .map(|_| {
            let (kappa, zeta) = kappa_zeta(&mut r, 0.3, 3.0);
            common::cantilever_tip(kappa, zeta)
        })
        .collect()
}

fn run(name: &str, cases: &[Member]) {
    let s = Settings::default();
    let t = Instant::now();
    let mut est_sum = 0.0;
    let mut est_max: f64 = 0.0;
    let mut elements = 0usize;
    let mut not_ok = 0;
    // LTB_BENCH_HISTORY=1: each case's refinement history on stderr (element count:factor per level)
    let history = std::env::var("LTB_BENCH_HISTORY").is_ok();
    // One workspace for the run, as a sweep worker keeps one: storage only,
    // no values carried from case to case.
    let mut ws = Workspace::new();
    for m in cases {
        let r = solve_in(&mut ws, m, &s).expect("benchmark case must solve");
        if r.forward.status != Status::Ok {
            not_ok += 1;
        }
        est_sum += r.forward.error_estimate;
        est_max = est_max.max(r.forward.error_estimate);
        elements += r.forward.elements;
        if history {
            let h: Vec<String> = r
                .forward
                .history
                .iter()
                .map(|(n, l)| format!("{n}:{l:.8}"))
                .collect();
            eprintln!("{name}\t{}\t{}", m.kappa, h.join(" "));
        }
    }
    let dt = t.elapsed().as_secs_f64();
    println!(
        "{name:<34} {:>7} solves  {:>9.0} solves/s  {:>6.2} µs/solve  mean est {:.2e}  worst est {:.2e}  mean elements {:.1}  not ok {not_ok}",
        cases.len(),
        cases.len() as f64 / dt,
        1e6 * dt / cases.len() as f64,
        est_sum / cases.len() as f64,
        est_max,
        elements as f64 / cases.len() as f64,
    );
}

/// The hand-written banded path against the dense nalgebra reference on
/// the same assembled systems (the final mesh of each case): eigenvalue
/// search only, no estimate, to show what the banded kernels buy.
fn kernels(cases: &[Member]) {
    use ltb_atlas::eigen;
    use ltb_atlas::fe::{assembly, inplane, mesh};
    use ltb_atlas::linalg::dense;
    let systems: Vec<assembly::System> = cases
        .iter()
        .map(|m| {
            let keys = mesh::key_points(m);
            let mf = inplane::moments(m, &keys).unwrap();
            let base = mesh::base_nodes(
                &keys,
                |x| (m.stiffness_at(x).eiw / m.stiffness_at(x).git).sqrt(),
                &Default::default(),
            );
            assembly::assemble(m, &mesh::refine(&base, 2), &mf)
        })
        .collect();
    let t = Instant::now();
    let mut worst: f64 = 0.0;
    let banded: Vec<f64> = systems
        .iter()
        .map(
            |s| match eigen::lowest_positive(&s.k, &s.g, None, &Default::default()).unwrap() {
                eigen::Outcome::Critical { lambda, .. } => lambda,
                _ => f64::NAN,
            },
        )
        .collect();
    let tb = t.elapsed().as_secs_f64();
    let t = Instant::now();
    for (s, lb) in systems.iter().zip(&banded) {
        let (pos, _) = dense::critical_factors(&s.k, &s.g).unwrap();
        worst = worst.max(((pos[0] - lb) / pos[0]).abs());
    }
    let td = t.elapsed().as_secs_f64();
    let n = systems.len() as f64;
    let dofs = systems.iter().map(|s| s.n()).sum::<usize>() as f64 / n;
    println!(
        "eigen kernels on {} final meshes (mean {dofs:.0} DOFs): banded Lanczos + inverse iteration + inertia proof {:.1} µs, \
         dense nalgebra {:.1} µs per system; largest relative difference {worst:.1e}",
        systems.len(),
        1e6 * tb / n,
        1e6 * td / n
    );
}

fn main() {
    if !std::env::args().any(|a| a == "--bench") {
        return; // `cargo test` runs bench targets without --bench: return at once
    }
    let n: usize = std::env::var("LTB_BENCH_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(20000);
    println!(
        "one thread; tolerance 1e-4; each solve estimates its error and proves its factor by inertia"
    );
    run("mix (cantilever + simple span)", &mix(n));
    run("built-in cantilever, tip load", &cantilever_tip(n));
    if std::env::var("LTB_BENCH_SKIP_KERNELS").is_err() {
        kernels(&mix(n.min(2000)));
    }
}

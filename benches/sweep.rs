//! Sweep benchmark: a κ × ζ × four end-condition variants family solved
//! through the library's run loop (ordered chunks, CSV and print tables,
//! manifest) with 1 and 2 threads; prints cases per second, the speed-up and
//! the peak resident memory (VmHWM) of the process. Run with
//! `cargo bench --bench sweep`; `LTB_SWEEP_CASES` sets the size (default
//! 100 000). Under `cargo test` it returns at once.

use ltb_atlas::solve::Settings;
use ltb_atlas::sweep::{run, spec::parse_spec};
use std::time::Instant;

fn spec(cases: usize) -> String {
    // 4 variants × nz ζ values × nk κ values ≈ cases.
    let nz = 25;
    let nk = (cases / (4 * nz)).max(1);
    format!(
        r#"[[family]]
name = "bench"
kappa = {{ from = 0.05, to = 5.0, count = {nk}, spacing = "log" }}
zeta = {{ from = -1.0, to = 1.0, count = {nz} }}
[family.case]
[family.case.start]
preset = "built-in"
[family.case.end]
preset = "free"
[[family.case.load]]
kind = "point"
at = 1.0
[[family.variant]]
name = "root-warping-fixed"
[[family.variant]]
name = "root-warping-free"
[family.variant.start]
warping = "free"
[[family.variant]]
name = "tip-top-flange"
[[family.variant.restraint]]
at = 1.0
lateral = "fixed"
zeta = "kappa"
[[family.variant]]
name = "tip-bottom-flange"
[[family.variant.restraint]]
at = 1.0
lateral = "fixed"
zeta = "-kappa"
"#
    )
}

fn peak_rss_mb() -> f64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("VmHWM"))
                .and_then(|l| l.split_whitespace().nth(1)?.parse::<f64>().ok())
        })
        .map(|kb| kb / 1024.0)
        .unwrap_or(f64::NAN)
}

fn main() {
    if !std::env::args().any(|a| a == "--bench") {
        return;
    }
    let n: usize = std::env::var("LTB_SWEEP_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(100_000);
    let text = spec(n);
    let spec =
        parse_spec(&text, "bench.toml", std::path::Path::new(".")).expect("bench spec parses");
    let cases: usize = spec.families.iter().map(|f| f.size()).sum();
    let mut rates = Vec::new();
    for threads in [1, 2] {
        let dir = tempfile::tempdir().expect("temp dir");
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .expect("pool");
        let t = Instant::now();
        let mut cache = ltb_atlas::sweep::cache::Cache::disabled();
        let cx = run::Context {
            pool: &pool,
            settings: &Settings::default(),
            cache: &mut cache,
            progress: &|_| {},
            log: &mut |_| {},
        };
        let s = run::run(&spec, "bench", dir.path(), None, cx).expect("run");
        let dt = t.elapsed().as_secs_f64();
        rates.push(cases as f64 / dt);
        println!(
            "{cases} cases, {threads} thread(s): {:.0} cases/s ({dt:.1} s, {} not ok)",
            cases as f64 / dt,
            s.failed
        );
    }
    println!(
        "speed-up on 2 threads: {:.2}×; peak resident memory {:.0} MB",
        rates[1] / rates[0],
        peak_rss_mb()
    );
    // Per-case overhead of the driver (hashing, formatting, writing, chunk
    // hand-over): the same family's points solved bare on one thread, on an
    // evenly strided sample of at most 20 000 points.
    let f = &spec.families[0];
    let stride = (f.size() / 20_000).max(1);
    let sample: Vec<usize> = (0..f.size()).step_by(stride).collect();
    let t = Instant::now();
    // one workspace, as each sweep worker keeps one
    let mut ws = ltb_atlas::solve::Workspace::new();
    for &i in &sample {
        std::hint::black_box(ltb_atlas::sweep::solve_point_in(
            &mut ws,
            f.point(i),
            &Settings::default(),
        ));
    }
    let bare = sample.len() as f64 / t.elapsed().as_secs_f64();
    println!(
        "bare solves on 1 thread: {bare:.0} cases/s; driver overhead {:.0} % of the solve",
        100.0 * (bare / rates[0] - 1.0).max(0.0)
    );
}

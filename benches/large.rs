//! Import + scan of a large archive, phase by phase, with peak memory (figures in
//! docs/performance.md). The workloads are generated, not checked in:
//!
//! ```sh
//! telltale synth large /tmp/telltale-perf/large.zip
//! telltale synth priors-large /tmp/telltale-perf/priors-large.json
//! TELLTALE_LARGE=/tmp/telltale-perf/large.zip \
//! TELLTALE_LARGE_PRIORS=/tmp/telltale-perf/priors-large.json cargo bench --bench large
//! ```
//!
//! With `TELLTALE_LARGE_PRIORS` it first times loading that priors file three ways,
//! each with its own peak RSS: from JSON without the cache, from JSON writing a fresh
//! cache (in a temporary folder), and from the cache (best of `TELLTALE_REPEAT`).
//! Without `TELLTALE_LARGE` it stops there (or, without either, says so). Without
//! `TELLTALE_LARGE_PRIORS` it scores against the bundled demo priors. Each phase runs
//! once per repetition (`TELLTALE_REPEAT`, default 3); the shortest time is printed, as
//! the least disturbed by other work on the machine.

use std::path::PathBuf;
use std::time::{Duration, Instant};

use telltale::archive::Archive;
use telltale::evidence::{Sources, gather};
use telltale::import::import;
use telltale::infer::Exposure;
use telltale::limits::Limits;
use telltale::mapping::{Mapping, locate};
use telltale::priors::Priors;
use telltale::scan::{Scan, ScanInput, load_priors};

/// Peak resident memory so far, from the kernel's accounting (Linux).
fn peak_rss_mb() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

/// Start a new peak-RSS measurement (Linux: writing 5 to clear_refs resets VmHWM).
fn reset_peak() {
    let _ = std::fs::write("/proc/self/clear_refs", "5");
}

/// Load the priors file without cache, writing a cache, and from the cache.
fn priors_phases(path: &std::path::Path, repeat: usize) -> Option<Priors> {
    let report = |what: &str, t: Duration, items: usize| {
        println!(
            "priors {what}: {items} items in {:.3} s, peak RSS {:.0} MB",
            t.as_secs_f64(),
            peak_rss_mb().unwrap_or(f64::NAN)
        );
    };
    let dir = tempfile::tempdir().ok()?;
    let cache = dir.path().join("priors");
    reset_peak();
    let t = Instant::now();
    let p = Priors::load(path)
        .map_err(|e| eprintln!("large: {e}"))
        .ok()?;
    report("JSON, no cache", t.elapsed(), p.len_items());
    drop(p);
    reset_peak();
    let t = Instant::now();
    let p = Priors::load_cached(path, Some(&cache)).ok()?;
    report("JSON, writing the cache", t.elapsed(), p.len_items());
    println!("  {}", p.cache_notes.join("; "));
    drop(p);
    reset_peak();
    let mut best = Duration::MAX;
    let mut last = None;
    for _ in 0..repeat.max(1) {
        drop(last.take());
        let t = Instant::now();
        let p = Priors::load_cached(path, Some(&cache)).ok()?;
        best = best.min(t.elapsed());
        last = Some(p);
    }
    let p = last?;
    let bytes: u64 = std::fs::read_dir(&cache)
        .ok()?
        .filter_map(|e| e.ok()?.metadata().ok())
        .map(|m| m.len())
        .sum();
    report(
        &format!("from the cache ({} MB), best of {repeat}", bytes >> 20),
        best,
        p.len_items(),
    );
    Some(p)
}

fn main() {
    // As the binary does, so the peaks here are the CLI's.
    telltale::resident::release_large_blocks();
    let priors_path = std::env::var_os("TELLTALE_LARGE_PRIORS").map(PathBuf::from);
    let repeat: usize = std::env::var("TELLTALE_REPEAT")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(3);
    let loaded = priors_path
        .as_deref()
        .and_then(|p| priors_phases(p, repeat));
    let Some(archive_path) = std::env::var_os("TELLTALE_LARGE").map(PathBuf::from) else {
        println!("large: set TELLTALE_LARGE to an archive made by `telltale synth large`");
        return;
    };
    reset_peak();
    let t = Instant::now();
    // The cached priors from above, or (never writing a cache here) the JSON.
    let mut priors = match loaded.map(Ok).unwrap_or_else(|| match &priors_path {
        Some(p) => Priors::load(p),
        None => load_priors(None),
    }) {
        Ok(p) => p,
        Err(e) => {
            eprintln!("large: {e}");
            return;
        }
    };
    let load = t.elapsed();
    println!(
        "priors: {} items ready in {:.3} s (peak RSS so far {:.0} MB)",
        priors.len_items(),
        load.as_secs_f64(),
        peak_rss_mb().unwrap_or(f64::NAN)
    );
    let limits = Limits::default();
    // What the CLI and the explorer run: Scan::run (the bundled lexicons parsed on a
    // second thread while the archive is read, then evidence and posteriors). It goes
    // first, so that its first run includes parsing the lexicons, as a fresh process
    // does; the phases below then time import and evidence apart.
    reset_peak();
    let input = ScanInput {
        archive: archive_path.clone(),
        ..ScanInput::default()
    };
    let mut scan_times = Vec::new();
    for _ in 0..repeat {
        let t = Instant::now();
        match Scan::run(&input, &mut priors) {
            Ok(scan) => std::hint::black_box(&scan),
            Err(e) => {
                eprintln!("large: {e}");
                return;
            }
        };
        scan_times.push(t.elapsed());
    }
    println!(
        "Scan::run: first (lexicons parsed) {:.3} s, best of {repeat} {:.3} s; peak RSS {:.0} MB",
        scan_times
            .first()
            .copied()
            .unwrap_or_default()
            .as_secs_f64(),
        scan_times
            .iter()
            .min()
            .copied()
            .unwrap_or_default()
            .as_secs_f64(),
        peak_rss_mb().unwrap_or(f64::NAN)
    );
    reset_peak();
    let mut best = [Duration::MAX; 3];
    for _ in 0..repeat {
        let t0 = Instant::now();
        let mut archive = match Archive::open(&archive_path, &limits) {
            Ok(a) => a,
            Err(e) => {
                eprintln!("large: {e}");
                return;
            }
        };
        let mapping = match locate(&mut archive)
            .map_err(|e| e.to_string())
            .and_then(|f| Mapping::parse(&f.text, &f.origin).map_err(|e| e.to_string()))
        {
            Ok(m) => m,
            Err(e) => {
                eprintln!("large: {e}");
                return;
            }
        };
        let footprint = match import(&mut archive, &mapping, &limits) {
            Ok(f) => f,
            Err(e) => {
                eprintln!("large: {e}");
                return;
            }
        };
        let t1 = Instant::now();
        let evidence = gather(&footprint, &priors, &Sources::all());
        let exposure = Exposure::new(&priors, evidence);
        let t2 = Instant::now();
        std::hint::black_box(&exposure);
        best[0] = best[0].min(t1 - t0);
        best[1] = best[1].min(t2 - t1);
        best[2] = best[2].min(t2 - t0);
        println!(
            "import {:.3} s ({} items, {} friends, {} MB read), evidence + posteriors {:.3} s",
            (t1 - t0).as_secs_f64(),
            footprint.items.len(),
            footprint.friends.len(),
            footprint.stats.bytes_read >> 20,
            (t2 - t1).as_secs_f64()
        );
    }
    println!(
        "best of {repeat}: import {:.3} s, evidence + posteriors {:.3} s, import + scan {:.3} s; peak RSS {:.0} MB",
        best[0].as_secs_f64(),
        best[1].as_secs_f64(),
        best[2].as_secs_f64(),
        peak_rss_mb().unwrap_or(f64::NAN)
    );
}

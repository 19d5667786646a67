#![allow(missing_docs, clippy::expect_used, clippy::unwrap_used)]
//! The search's time over many random specifications: its distribution
//! (median, p90, p99, max) and peak memory, and the slowest specifications.
//!
//! `cargo bench --bench random_specs` draws 600 specifications (seeded, so
//! every run draws the same ones) from the property tests' generator
//! (`tests/integration/random_spec.rs`: every family, λ > 0, source
//! resistances, supply tolerances, limits, exact devices, tight gain
//! windows) and widens the shelf to E12, E24, E96 or E192 over the default
//! 10 Ω–10 MΩ or over three decades around the device's scale. Each runs
//! `search::run` once in a process of its own, so its peak memory (the
//! kernel's high-water mark of resident memory) is its own.
//!
//! Options after `--`: `--count N`, `--seed N`, `--cap SECONDS` (a run
//! still going then is stopped and counted as over the cap; default 60),
//! `--only I,J,K` (just those draws), `--csv FILE` (one line per draw).
//! Wall time on a shared machine varies from run to run: compare whole
//! distributions, and look at the work counts for single specifications.

use gatewright::catalog::{Catalog, ESeries};
use gatewright::search::{self, Options, Shelf};
use gatewright::spec::{CatalogChoice, ValidSpec};
use proptest::strategy::{Strategy, ValueTree};
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};
use std::io::{BufRead, BufReader, Write};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

#[path = "../tests/integration/random_spec.rs"]
#[allow(dead_code)]
mod random_spec;

const SERIES: [ESeries; 4] = [ESeries::E12, ESeries::E24, ESeries::E96, ESeries::E192];

/// A child whose resident memory passes this is stopped (the machine is
/// shared); it counts as over the cap.
const MEMORY_CAP_KB: u64 = 3 << 20;

/// The `count` specifications of `seed`, in order.
fn draws(seed: u64, count: usize) -> Vec<ValidSpec> {
    let mut bytes = [0u8; 32];
    bytes[..8].copy_from_slice(&seed.to_le_bytes());
    let mut runner = TestRunner::new_with_rng(
        Config::default(),
        TestRng::from_seed(RngAlgorithm::ChaCha, &bytes),
    );
    let strategy = (random_spec::case(), 0usize..4, 0usize..2, 0usize..2);
    (0..count)
        .map(|_| {
            let (c, series, wide, own_tol) =
                strategy.new_tree(&mut runner).expect("a draw").current();
            let mut spec = c.spec;
            // The generator's one decade, widened: the default range, or
            // a decade below to two above.
            let lo = spec.parts.r_min_ohm;
            let (r_min, r_max) = if wide == 0 {
                (10.0, 10e6)
            } else {
                (lo / 10.0, lo * 100.0)
            };
            spec.parts.catalog = CatalogChoice::Series(SERIES[series]);
            spec.parts.r_min_ohm = r_min;
            spec.parts.r_max_ohm = r_max;
            // Half keep the drawn tolerance (0, 2 % or 10 %); half take the
            // series' own.
            if own_tol == 0 {
                spec.parts.tolerance = None;
            }
            spec
        })
        .collect()
}

fn shelf(spec: &ValidSpec) -> Shelf {
    let CatalogChoice::Series(s) = spec.parts.catalog else {
        unreachable!("the draws use E-series");
    };
    let (lo, hi) = (spec.parts.r_min_ohm, spec.parts.r_max_ohm);
    let cat = Catalog::from_series(s, spec.parts.tolerance, lo, hi).expect("catalog");
    Shelf::new(&cat, spec.parts.tolerance, lo, hi)
}

/// One line of words about a draw, for the list of the slowest.
fn describe(spec: &ValidSpec) -> String {
    let d = &spec.device;
    let exact = d.corners().len() == 1;
    let CatalogChoice::Series(s) = spec.parts.catalog else {
        unreachable!()
    };
    format!(
        "{} {}{} gain {:.3} ±{:.1} % vdd {:.1} vss {:.1} rsig {} λ {} {:?} {}..{} tol {}",
        d.family.id(),
        if exact { "exact" } else { "spread" },
        if spec.supply.tolerance > 0.0 {
            format!(" supply ±{:.0} %", 100.0 * spec.supply.tolerance)
        } else {
            String::new()
        },
        spec.target.gain,
        100.0 * spec.target.tolerance,
        spec.supply.vdd_v,
        spec.supply.vss_v,
        gatewright::units::format_value(spec.source_resistance_ohm),
        d.lambda.max,
        s,
        gatewright::units::format_value(spec.parts.r_min_ohm),
        gatewright::units::format_value(spec.parts.r_max_ohm),
        spec.parts
            .tolerance
            .map_or("series".to_string(), |t| format!("{t}")),
    )
}

/// Resident-memory figures of this process from /proc, in kB.
fn proc_status_kb(key: &str) -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with(key))
                .and_then(|l| l.split_whitespace().nth(1)?.parse().ok())
        })
        .unwrap_or(0)
}

/// In the child: run draw `index`, print `seconds peak_kb designs
/// configurations corner_checks exact_checks`.
fn child(seed: u64, count: usize, index: usize) {
    let spec = draws(seed, count).swap_remove(index);
    let sh = shelf(&spec);
    std::thread::spawn(|| loop {
        if proc_status_kb("VmRSS:") > MEMORY_CAP_KB {
            println!("memory");
            std::process::exit(3);
        }
        std::thread::sleep(Duration::from_millis(20));
    });
    let start = Instant::now();
    let out = search::run(&spec, &sh, &Options::default()).expect("search");
    let seconds = start.elapsed().as_secs_f64();
    println!(
        "{seconds} {} {} {} {} {}",
        proc_status_kb("VmHWM:"),
        out.designs.len(),
        out.effort.configurations,
        out.effort.corner_checks,
        out.effort.exact_checks
    );
}

/// A draw's result: seconds (infinite when stopped) and figures.
struct Run {
    index: usize,
    seconds: f64,
    peak_kb: u64,
    line: String,
}

fn run_child(seed: u64, count: usize, index: usize, cap: f64) -> Run {
    let exe = std::env::current_exe().expect("own path");
    let mut c = Command::new(exe)
        .args([
            "--child",
            &seed.to_string(),
            &count.to_string(),
            &index.to_string(),
        ])
        .stdout(Stdio::piped())
        .spawn()
        .expect("child");
    let start = Instant::now();
    let mut peak_at_stop = 0u64;
    let status = loop {
        if let Some(s) = c.try_wait().expect("wait") {
            break Some(s);
        }
        if start.elapsed().as_secs_f64() > cap {
            // Its high-water mark so far, before it is stopped.
            peak_at_stop = std::fs::read_to_string(format!("/proc/{}/status", c.id()))
                .ok()
                .and_then(|s| {
                    s.lines()
                        .find(|l| l.starts_with("VmHWM:"))
                        .and_then(|l| l.split_whitespace().nth(1)?.parse().ok())
                })
                .unwrap_or(0);
            let _ = c.kill();
            let _ = c.wait();
            break None;
        }
        std::thread::sleep(Duration::from_millis(2));
    };
    let mut line = String::new();
    if status.is_some_and(|s| s.success()) {
        let _ = BufReader::new(c.stdout.take().expect("stdout")).read_line(&mut line);
    }
    let line = line.trim().to_string();
    let mut words = line.split_whitespace();
    match words.next().and_then(|w| w.parse::<f64>().ok()) {
        Some(seconds) => Run {
            index,
            seconds,
            peak_kb: words.next().and_then(|w| w.parse().ok()).unwrap_or(0),
            line,
        },
        None => Run {
            index,
            seconds: f64::INFINITY,
            peak_kb: peak_at_stop,
            line: if status.is_none() {
                format!("over the cap of {cap} s (peak {peak_at_stop} kB so far)")
            } else {
                "over the memory cap or failed".to_string()
            },
        },
    }
}

/// The value at fraction `q` of sorted `x` (nearest rank).
fn quantile(x: &[f64], q: f64) -> f64 {
    let i = ((q * x.len() as f64).ceil() as usize).clamp(1, x.len()) - 1;
    x[i]
}

fn seconds(x: f64) -> String {
    if x.is_finite() {
        format!("{:.4} s", x)
    } else {
        "over the cap".to_string()
    }
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    if args.first().map(String::as_str) == Some("--child") {
        let n = |i: usize| args[i].parse::<u64>().expect("number");
        child(n(1), n(2) as usize, n(3) as usize);
        return;
    }
    let opt = |name: &str| {
        args.iter()
            .position(|a| a == name)
            .and_then(|i| args.get(i + 1))
            .cloned()
    };
    let count: usize = opt("--count").map_or(600, |s| s.parse().expect("--count N"));
    let seed: u64 = opt("--seed").map_or(29, |s| s.parse().expect("--seed N"));
    let cap: f64 = opt("--cap").map_or(60.0, |s| s.parse().expect("--cap SECONDS"));
    let only: Option<Vec<usize>> = opt("--only").map(|s| {
        s.split(',')
            .map(|x| x.trim().parse().expect("--only I,J"))
            .collect()
    });
    let mut csv = opt("--csv").map(|p| std::fs::File::create(p).expect("--csv FILE"));
    let specs = draws(seed, count);
    let which: Vec<usize> = only.unwrap_or_else(|| (0..count).collect());
    let mut runs = Vec::with_capacity(which.len());
    for (k, &i) in which.iter().enumerate() {
        let r = run_child(seed, count, i, cap);
        if let Some(f) = csv.as_mut() {
            writeln!(f, "{i} {} {}", r.line, describe(&specs[i])).expect("csv");
        }
        if r.seconds > 1.0 || k % 50 == 49 {
            eprintln!("[{}/{}] #{i}: {}", k + 1, which.len(), seconds(r.seconds));
        }
        runs.push(r);
    }
    let mut t: Vec<f64> = runs.iter().map(|r| r.seconds).collect();
    t.sort_by(f64::total_cmp);
    let mut m: Vec<f64> = runs.iter().map(|r| r.peak_kb as f64 / 1024.0).collect();
    m.sort_by(f64::total_cmp);
    println!(
        "{} specifications (seed {seed}), search::run, whole search:",
        runs.len()
    );
    println!(
        "  time    median {}  p90 {}  p99 {}  max {}",
        seconds(quantile(&t, 0.5)),
        seconds(quantile(&t, 0.9)),
        seconds(quantile(&t, 0.99)),
        seconds(quantile(&t, 1.0))
    );
    println!(
        "  peak memory (process)  median {:.1} MB  p99 {:.1} MB  max {:.1} MB",
        quantile(&m, 0.5),
        quantile(&m, 0.99),
        quantile(&m, 1.0)
    );
    println!(
        "  over 0.1 s: {}, over 1 s: {}",
        t.iter().filter(|&&x| x > 0.1).count(),
        t.iter().filter(|&&x| x > 1.0).count()
    );
    runs.sort_by(|a, b| b.seconds.total_cmp(&a.seconds));
    println!(
        "slowest 10 (draw: seconds peak_kb designs configurations corner_checks exact_checks):"
    );
    for r in runs.iter().take(10) {
        println!("  #{}: {}  {}", r.index, r.line, describe(&specs[r.index]));
    }
}

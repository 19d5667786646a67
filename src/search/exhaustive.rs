//! The reference search: every combination of shelf values for every part.
//!
//! Each combination is first checked at nominal resistor values over the
//! device corners (a necessary condition: a feasible design must pass at
//! the nominal point too), and only then over every tolerance extreme, so
//! the result is exactly that of evaluating everything in full. Every
//! feasible design that no other one dominates is kept (the collector's
//! `front`), so `--top N` lists N designs whenever N Pareto-optimal ones
//! exist.
//!
//! The combinations of each topology are cut into fixed chunks of
//! [`CHUNK`] in odometer order, searched on as many threads as the machine
//! has cores and merged in chunk order: the result, its work counts
//! included, is the same whatever the number of threads.

use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;

use super::{structural, Collector, Effort, Options, Progress, Shelf, TopologyResult};
use crate::analysis::{all_pass, margins, quick, Problem, WorstCase};
use crate::topology::{Topology, TOPOLOGIES};

/// Combinations per chunk: large enough that a chunk's set-up is nothing
/// beside it (0.05–0.2 s of work on the examples), small enough that the
/// chunks spread evenly over the cores and the progress display moves.
const CHUNK: u64 = 1 << 18;

/// Processor time of one device-law evaluation of the corner pass,
/// seconds, with what the search adds around it (the odometer, the
/// requirement margins, the skipped corners of a combination known to
/// fail): measured on a 2-core x86-64 virtual machine with release builds
/// over the six examples (E12 over 1 kΩ–1 MΩ, and piezo-buffer as
/// shipped): 31–39 ns of user time per evaluation, piezo-buffer 36.5 ns
/// (80.5 s for 2.21e9).
pub const SECONDS_PER_EVALUATION: f64 = 36e-9;

/// Default budget, device-law evaluations: about a minute on two cores at
/// [`SECONDS_PER_EVALUATION`] (piezo-buffer as shipped, 2.21e9, fits).
pub const BUDGET: f64 = 3.2e9;

/// Threads the search runs on: the machine's cores.
pub fn threads() -> usize {
    std::thread::available_parallelism().map_or(1, |x| x.get())
}

/// Estimated wall time of `evaluations` on `threads` free cores, seconds.
pub fn seconds(evaluations: f64, threads: usize) -> f64 {
    evaluations * SECONDS_PER_EVALUATION / threads.max(1) as f64
}

/// Candidate values of part `i` of `t`: the shelf, plus 0 Ω where allowed.
pub(crate) fn choices(t: &dyn Topology, i: usize, p: &Problem, shelf: &Shelf) -> Vec<f64> {
    let mut v = Vec::with_capacity(shelf.values.len() + 1);
    if t.may_be_zero(i, p.spec.device.family) {
        v.push(0.0);
    }
    v.extend_from_slice(&shelf.values);
    v
}

/// Combinations of topology `t` (before corners and tolerance extremes).
fn topology_combinations(t: &dyn Topology, p: &Problem, shelf: &Shelf) -> f64 {
    (0..t.parts().len())
        .map(|i| choices(t, i, p, shelf).len() as f64)
        .product::<f64>()
}

/// Combinations (before corners and tolerance extremes) over every
/// topology the device and rails allow.
pub fn combinations(p: &Problem, shelf: &Shelf) -> f64 {
    TOPOLOGIES
        .iter()
        .filter(|t| structural(p, **t).is_none())
        .map(|t| topology_combinations(*t, p, shelf))
        .sum()
}

/// Device-law evaluations of the corner pass over every combination (one
/// per combination and device corner): the bulk of the exhaustive search's
/// work, and the measure of its budget.
pub fn corner_evaluations(p: &Problem, shelf: &Shelf) -> f64 {
    combinations(p, shelf) * p.corners.len() as f64
}

/// Evaluate every combination for one topology.
pub(crate) fn search(col: &mut Collector<'_>, shelf: &Shelf) {
    let lists: Vec<Vec<f64>> = (0..col.t.parts().len())
        .map(|i| choices(col.t, i, col.p, shelf))
        .collect();
    let total = lists.iter().map(|l| l.len() as u64).product::<u64>();
    chunk(col, shelf, &lists, 0, total);
}

/// Evaluate combinations `start..end` (odometer order, last part fastest)
/// of one topology.
fn chunk(col: &mut Collector<'_>, shelf: &Shelf, lists: &[Vec<f64>], start: u64, end: u64) {
    let t = col.t;
    if start >= end || lists.iter().any(|l| l.is_empty()) {
        return;
    }
    // The odometer at `start`.
    let mut idx = vec![0usize; lists.len()];
    let mut rest = start;
    for k in (0..lists.len()).rev() {
        let n = lists[k].len() as u64;
        idx[k] = usize::try_from(rest % n).unwrap_or(0);
        rest /= n;
    }
    let mut values: Vec<f64> = lists.iter().zip(&idx).map(|(l, &i)| l[i]).collect();
    for _ in start..end {
        col.effort.configurations += 1;
        col.effort.corner_checks += 1;
        if let Some(wc) = corner_pass(col, &values) {
            if all_pass(&margins(col.p, t, &wc)) {
                let tols = shelf.tolerances_for(&values);
                col.exact(&values, &tols);
            } else {
                col.miss.note(col.p, t, &values, &wc);
            }
        }
        // Odometer step, last part fastest.
        let mut k = lists.len();
        while k > 0 {
            k -= 1;
            idx[k] += 1;
            if idx[k] < lists[k].len() {
                values[k] = lists[k][idx[k]];
                break;
            }
            idx[k] = 0;
            values[k] = lists[k][0];
        }
    }
}

/// The envelope of one combination over the device corners at nominal
/// resistor values, or `None` once it is known to fail and to matter no
/// further: a subset of the corners gives an envelope inside the full one,
/// so a requirement that fails there fails in full, and its shortfall is
/// no larger than the full one's. The rest of the corners are skipped once
/// a failure is certain and either the collector holds a design (the
/// closest miss is then never asked for) or the shortfall so far cannot
/// beat the closest miss already noted.
fn corner_pass(col: &Collector<'_>, values: &[f64]) -> Option<WorstCase> {
    let (p, t) = (col.p, col.t);
    let mut wc = WorstCase::empty();
    let last = p.corners.len().saturating_sub(1);
    for (i, c) in p.corners.iter().enumerate() {
        wc.add(&quick(p, t, values, &c.law, &p.rails), c.law.vto_v);
        if i < last
            && !all_pass(&margins(p, t, &wc))
            && (!col.designs.is_empty() || !col.miss.could_beat(p, t, &wc))
        {
            return None;
        }
    }
    Some(wc)
}

/// One chunk of one topology's combinations.
struct Job {
    topology: usize,
    start: u64,
    end: u64,
}

/// Every topology of the registry searched exhaustively, in registry
/// order: its designs (the Pareto front) or why it gave none, with the
/// work done. `progress` counts combinations.
pub(crate) fn search_all(
    p: &Problem,
    shelf: &Shelf,
    opts: &Options,
    progress: &Progress,
) -> Vec<(usize, TopologyResult)> {
    search_in_chunks(p, shelf, opts, progress, CHUNK)
}

/// [`search_all`] with chunks of `size` combinations.
fn search_in_chunks(
    p: &Problem,
    shelf: &Shelf,
    opts: &Options,
    progress: &Progress,
    size: u64,
) -> Vec<(usize, TopologyResult)> {
    let mut lists: Vec<Option<Vec<Vec<f64>>>> = Vec::with_capacity(TOPOLOGIES.len());
    let mut jobs = Vec::new();
    for (i, t) in TOPOLOGIES.iter().enumerate() {
        if structural(p, *t).is_some() {
            lists.push(None);
            continue;
        }
        let l: Vec<Vec<f64>> = (0..t.parts().len())
            .map(|k| choices(*t, k, p, shelf))
            .collect();
        let total = l.iter().map(|x| x.len() as u64).product::<u64>();
        let mut start = 0;
        while start < total {
            let end = total.min(start + size.max(1));
            jobs.push(Job {
                topology: i,
                start,
                end,
            });
            start = end;
        }
        lists.push(Some(l));
    }
    progress.set_total(jobs.iter().map(|j| j.end - j.start).sum());
    let next = AtomicUsize::new(0);
    let done: Mutex<Vec<(usize, Collector<'_>)>> = Mutex::new(Vec::with_capacity(jobs.len()));
    let work = || loop {
        let k = next.fetch_add(1, Ordering::Relaxed);
        let Some(job) = jobs.get(k) else {
            return;
        };
        let mut col = Collector::new(p, job.topology, opts, None, None);
        if let Some(Some(l)) = lists.get(job.topology) {
            chunk(&mut col, shelf, l, job.start, job.end);
        }
        progress.add(job.end - job.start);
        if let Ok(mut d) = done.lock() {
            d.push((k, col));
        }
    };
    let threads = threads();
    std::thread::scope(|sc| {
        let others: Vec<_> = (1..threads)
            .filter_map(|_| std::thread::Builder::new().spawn_scoped(sc, work).ok())
            .collect();
        work();
        for h in others {
            if let Err(e) = h.join() {
                std::panic::resume_unwind(e);
            }
        }
    });
    let mut done = done.into_inner().unwrap_or_else(|e| e.into_inner());
    done.sort_by_key(|(k, _)| *k);
    // Merge each topology's chunks in order.
    let mut merged: Vec<Option<Collector<'_>>> = (0..TOPOLOGIES.len()).map(|_| None).collect();
    for (k, col) in done {
        let slot = &mut merged[jobs[k].topology];
        match slot {
            Some(m) => m.absorb(col),
            None => *slot = Some(col),
        }
    }
    let mut out = Vec::with_capacity(TOPOLOGIES.len());
    for (i, t) in TOPOLOGIES.iter().enumerate() {
        if let Some(r) = structural(p, *t) {
            out.push((i, (Err(r), Effort::default())));
            continue;
        }
        let col = merged[i]
            .take()
            .unwrap_or_else(|| Collector::new(p, i, opts, None, None));
        out.push((i, col.finish()));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::corners_only;
    use crate::catalog::{Catalog, ESeries};
    use crate::search::Design;

    /// One topology the plain way: a single collector over every
    /// combination in odometer order, every corner evaluated.
    fn plain(p: &Problem, shelf: &Shelf, opts: &Options, index: usize) -> Collector<'static> {
        let p: &'static Problem = Box::leak(Box::new(p.clone()));
        let mut col = Collector::new(p, index, opts, None, None);
        let t = col.t;
        let lists: Vec<Vec<f64>> = (0..t.parts().len())
            .map(|i| choices(t, i, p, shelf))
            .collect();
        let total: usize = lists.iter().map(Vec::len).product();
        for mut n in 0..total {
            let mut values = vec![0.0; lists.len()];
            for k in (0..lists.len()).rev() {
                values[k] = lists[k][n % lists[k].len()];
                n /= lists[k].len();
            }
            col.effort.configurations += 1;
            let wc = corners_only(p, t, &values);
            if all_pass(&margins(p, t, &wc)) {
                let tols = shelf.tolerances_for(&values);
                col.exact(&values, &tols);
            } else {
                col.miss.note(p, t, &values, &wc);
            }
        }
        col
    }

    // The chunks, the threads and the skipped corners change the work,
    // never the answer: on every example (as shipped and loosened) over
    // four two-decade E6 shelves, each topology's designs and its closest-miss answer are
    // those of one plain pass that evaluates every corner of every
    // combination.
    #[test]
    fn chunks_and_skipped_corners_change_nothing_but_the_work() {
        let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/examples");
        let mut compared = (0, 0);
        for entry in std::fs::read_dir(dir).unwrap() {
            let path = entry.unwrap().path();
            if path.extension().is_none_or(|e| e != "toml") {
                continue;
            }
            let shipped = crate::spec::parse(&std::fs::read_to_string(&path).unwrap()).unwrap();
            // The example, and a looser one (wide gain window, a tenth of
            // the Zin, half the headroom) that has designs on these shelves.
            let mut loose = shipped.clone();
            loose.target.tolerance = 0.5;
            loose.zin_min_ohm *= 0.1;
            loose.vds_min_v *= 0.5;
            for (spec, (lo, hi)) in [shipped, loose]
                .iter()
                .flat_map(|s| [(100.0, 1e4), (1e3, 1e5), (1e4, 1e6), (1e5, 1e7)].map(|r| (s, r)))
            {
                let cat = Catalog::from_series(ESeries::E6, spec.parts.tolerance, lo, hi).unwrap();
                let shelf = Shelf::new(&cat, spec.parts.tolerance, lo, hi);
                let p = Problem::new(spec);
                let opts = Options {
                    method: crate::search::Method::Exhaustive,
                    ..Options::default()
                };
                // Small chunks (997 combinations, so their ends fall
                // anywhere in the odometer) to merge many.
                let got = search_in_chunks(&p, &shelf, &opts, &Progress::new(), 997);
                for (i, (result, effort)) in got {
                    if structural(&p, TOPOLOGIES[i]).is_some() {
                        continue;
                    }
                    let (want, want_effort) = plain(&p, &shelf, &opts, i).finish();
                    assert_eq!(effort.configurations, want_effort.configurations);
                    match (result, want) {
                        (Ok(a), Ok(b)) => {
                            compared.0 += 1;
                            let key = |d: &Design| (d.values.clone(), d.score);
                            assert_eq!(
                                a.iter().map(key).collect::<Vec<_>>(),
                                b.iter().map(key).collect::<Vec<_>>(),
                                "{} {}",
                                path.display(),
                                TOPOLOGIES[i].id()
                            );
                        }
                        (Err(a), Err(b)) => {
                            compared.1 += 1;
                            assert_eq!(a, b, "{}", path.display());
                        }
                        (a, b) => panic!("{}: {a:?} against {b:?}", path.display()),
                    }
                }
            }
        }
        // Both kinds of answer were compared, many times.
        eprintln!("{compared:?}");
        assert!(compared.0 >= 5 && compared.1 >= 20, "{compared:?}");
    }
}

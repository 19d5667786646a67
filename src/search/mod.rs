//! Synthesis: every topology the device and rails allow, searched over the
//! resistor shelf, each candidate checked exactly at every device corner and
//! tolerance extreme, then ranked.
//!
//! Two searches share one exact evaluation (`analysis::worst_case`):
//! - [`smart`] prunes with necessary conditions and monotone structure
//!   (the RD run, the gate-resistor rule, divider dominance);
//! - [`exhaustive`] evaluates every combination: the reference that proves
//!   the fast search right.
//!
//! This module prints nothing.

mod aid;
pub mod exhaustive;
mod progress;
pub mod smart;

pub use progress::Progress;

use crate::analysis::{
    all_pass, assess, gain_window, lead_extremes, margins, worst_case, worst_case_of, Problem,
    WorstCase, SLACK,
};
use crate::catalog::Catalog;
use crate::rank::{order, pareto, score, Metrics, Prefer};
use crate::spec::ValidSpec;
use crate::topology::{Topology, TOPOLOGIES};
use serde::Serialize;

/// The resistor values the search may use, sorted ascending, with the
/// tolerance of each.
#[derive(Debug, Clone, PartialEq)]
pub struct Shelf {
    /// Name for outputs (`E24`, or the stock list's name).
    pub name: String,
    /// Resistances, ohms, ascending.
    pub values: Vec<f64>,
    /// Relative tolerance of each value.
    pub tolerances: Vec<f64>,
}

impl Shelf {
    /// The catalog's parts inside `[r_min, r_max]` (inclusive, relative
    /// slack 1e-9), with every tolerance replaced by `tolerance` when given.
    pub fn new(cat: &Catalog, tolerance: Option<f64>, r_min_ohm: f64, r_max_ohm: f64) -> Shelf {
        let parts: Vec<_> = cat
            .parts
            .iter()
            .filter(|p| p.ohms >= r_min_ohm * (1.0 - SLACK) && p.ohms <= r_max_ohm * (1.0 + SLACK))
            .collect();
        Shelf {
            name: cat.name.clone(),
            values: parts.iter().map(|p| p.ohms).collect(),
            tolerances: parts
                .iter()
                .map(|p| tolerance.unwrap_or(p.tolerance))
                .collect(),
        }
    }

    /// The shelf without the values the default search never needs: a
    /// value whose tolerance band `[v(1 − t), v(1 + t)]` contains the band
    /// of another value. Every quantity the worst case takes is monotone in
    /// each resistor, so its extremes over the narrower band lie inside
    /// those over the wider one: a design with the other value is feasible
    /// wherever one with this value is, and scores at least as well. On an
    /// E-series shelf (one tolerance) no band contains another and nothing
    /// is left out; a stock list that holds values at several tolerances
    /// loses its looser parts wherever a tighter one lies inside their
    /// band. The exhaustive search takes the whole shelf, so the property
    /// test checks the rule.
    pub fn reduced(&self) -> Shelf {
        let n = self.values.len();
        let band = |i: usize| {
            let (v, t) = (self.values[i], self.tolerances[i]);
            (v * (1.0 - t), v * (1.0 + t))
        };
        // From the highest band floor down (on a tie the lower ceiling
        // first): a band contains an earlier one exactly when the least
        // ceiling so far is at most its own.
        let mut order: Vec<usize> = (0..n).collect();
        order.sort_by(|&i, &j| {
            let (a, b) = (band(i), band(j));
            b.0.total_cmp(&a.0)
                .then(a.1.total_cmp(&b.1))
                .then(i.cmp(&j))
        });
        let mut keep = vec![true; n];
        let mut least_ceiling = f64::INFINITY;
        for i in order {
            let (_, hi) = band(i);
            if least_ceiling <= hi {
                keep[i] = false;
            }
            least_ceiling = least_ceiling.min(hi);
        }
        let pick = |x: &[f64]| -> Vec<f64> {
            x.iter()
                .zip(&keep)
                .filter(|(_, &k)| k)
                .map(|(v, _)| *v)
                .collect()
        };
        Shelf {
            name: self.name.clone(),
            values: pick(&self.values),
            tolerances: pick(&self.tolerances),
        }
    }

    /// Tolerance of each of `values` (see [`Shelf::tolerance_of`]).
    pub fn tolerances_for(&self, values: &[f64]) -> Vec<f64> {
        values.iter().map(|&x| self.tolerance_of(x)).collect()
    }

    /// Tolerance of a value on the shelf (0 for a 0 Ω link).
    pub fn tolerance_of(&self, ohms: f64) -> f64 {
        if ohms == 0.0 {
            return 0.0;
        }
        let i = self.values.partition_point(|&v| v < ohms * (1.0 - 1e-12));
        self.tolerances.get(i).copied().unwrap_or(0.0)
    }
}

/// How thoroughly to search.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Method {
    /// Pruned search (default).
    #[default]
    Smart,
    /// Every combination over the shelf.
    Exhaustive,
}

/// Search options.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Options {
    /// Check at nominal device and nominal resistor values only.
    pub nominal_only: bool,
    /// Ranking preference.
    pub prefer: Prefer,
    /// How many designs to return in all.
    pub top: usize,
    /// How many designs to keep per topology before the Pareto filter.
    pub per_topology: usize,
    /// Which search.
    pub method: Method,
    /// Largest number of device-law evaluations the exhaustive search's
    /// corner pass may make ([`exhaustive::corner_evaluations`]).
    pub budget: f64,
    /// λ > 0, default search: the points of the VDS fold grid of the box
    /// bounds, 2 to 24 (values outside are taken to the nearer end).
    /// `None` chooses one per 32 shelf values, 8 to 24. Every choice gives
    /// the same designs, only the work differs; the property tests use it
    /// to cover the finer grids that long shelves get.
    pub fold_points: Option<usize>,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            nominal_only: false,
            prefer: Prefer::Balanced,
            top: 10,
            per_topology: 10,
            method: Method::Smart,
            budget: exhaustive::BUDGET,
            fold_points: None,
        }
    }
}

/// A feasible design.
#[derive(Clone)]
pub struct Design {
    /// The topology.
    pub topology: &'static dyn Topology,
    /// Position of the topology in the registry (tie-break order).
    pub topology_index: usize,
    /// Resistor values, ohms, in the topology's part order (0 = a wire).
    pub values: Vec<f64>,
    /// Tolerance of each resistor.
    pub tolerances: Vec<f64>,
    /// Worst case over corners and tolerance extremes.
    pub worst: WorstCase,
    /// Trade-off metrics.
    pub metrics: Metrics,
    /// Score, 0 to 1.
    pub score: f64,
}

impl std::fmt::Debug for Design {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Design")
            .field("topology", &self.topology.id())
            .field("values", &self.values)
            .field("score", &self.score)
            .finish()
    }
}

/// Why a topology gave no design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Rejection {
    /// Topology id.
    pub topology: &'static str,
    /// One sentence.
    pub reason: String,
    /// The requirement that bound it.
    pub binding: String,
    /// What the closest candidate reached for that requirement.
    pub best: String,
}

/// Work done, for the benchmark figures and the note.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct Effort {
    /// Bias configurations (or combinations) visited.
    pub configurations: u64,
    /// Corner-only (nominal resistor) evaluations.
    pub corner_checks: u64,
    /// Screens of a candidate on two tolerance extremes (every corner and
    /// supply extreme), before any full check.
    pub screen_checks: u64,
    /// Full worst-case evaluations (corners × tolerance extremes).
    pub exact_checks: u64,
    /// Combinations an exhaustive search over this shelf would visit.
    pub exhaustive_combinations: f64,
}

/// The result of a search.
#[derive(Debug, Clone)]
pub struct Outcome {
    /// Feasible designs, Pareto-optimal, best first, at most `top`.
    pub designs: Vec<Design>,
    /// Topologies that gave no design, with the reason.
    pub rejected: Vec<Rejection>,
    /// Work done.
    pub effort: Effort,
    /// True when only nominal values were checked.
    pub nominal_only: bool,
}

/// The search could not run.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SearchError {
    /// The exhaustive search would exceed its budget.
    #[error("the exhaustive search would make {evaluations:.2e} device evaluations ({combinations:.2e} combinations × {corners} device corners), about {} on {threads} cores, over its budget of {budget:.1e} (about {} here); use the default search, a narrower `[parts] range`, or a coarser series", duration(*seconds), duration(exhaustive::seconds(*budget, *threads)))]
    OverBudget {
        /// Combinations it would visit.
        combinations: f64,
        /// Device corners each combination is evaluated at.
        corners: usize,
        /// Device-law evaluations of its corner pass.
        evaluations: f64,
        /// Time estimate on `threads` cores, seconds.
        seconds: f64,
        /// Cores the estimate assumes (those of this machine).
        threads: usize,
        /// The budget, evaluations.
        budget: f64,
    },
    /// The shelf is empty after applying `[parts] range`.
    #[error("no resistor value of `{shelf}` lies inside `parts.range` {min}..{max} Ω")]
    EmptyShelf {
        /// Shelf name.
        shelf: String,
        /// Range minimum, ohms.
        min: f64,
        /// Range maximum, ohms.
        max: f64,
    },
}

/// The problem the search evaluates: nominal-only mode keeps the nominal
/// device as the only corner (resistor tolerances are dropped by the caller).
pub fn problem_for(spec: &ValidSpec, nominal_only: bool) -> Problem {
    let mut p = Problem::new(spec);
    if nominal_only {
        p.corners = vec![p.nominal.clone()];
        p.spec.supply.tolerance = 0.0;
    }
    p
}

/// Tracks the closest miss of one topology, for the infeasibility answer.
/// Only numbers are kept in the loop; words are made once at the end.
#[derive(Debug, Clone, Default)]
pub(crate) struct MissTracker {
    best: Option<(f64, Vec<f64>, WorstCase)>,
}

impl MissTracker {
    /// The largest shortfall among the failing requirements (−∞ if none).
    /// A candidate whose device is off at some corner counts as short by at
    /// least a whole (1, 100 %): it is no amplifier there, and its gain
    /// shortfall (at most the window's floor over the target) would
    /// otherwise rank it closer than a working stage that misses, say, Zin
    /// by 99 %. (The rule keeps the order the screen relies on: a wider
    /// envelope has the least current no higher, so it is off wherever a
    /// narrower one is.)
    fn shortfall(p: &Problem, t: &dyn Topology, wc: &WorstCase) -> f64 {
        let worst = margins(p, t, wc)
            .into_iter()
            .filter(|m| !m.pass)
            .map(|m| -m.margin)
            .fold(f64::NEG_INFINITY, f64::max);
        if wc.id_min_a > 0.0 {
            worst
        } else {
            worst.max(1.0)
        }
    }

    /// False when a candidate whose envelope contains `inner` cannot become
    /// the closest miss: its shortfall is at least that of `inner`.
    pub(crate) fn could_beat(&self, p: &Problem, t: &dyn Topology, inner: &WorstCase) -> bool {
        let worst = Self::shortfall(p, t, inner);
        self.best.as_ref().is_none_or(|(b, _, _)| worst < *b)
    }

    /// The closer of this miss and `later`'s (this one on a tie, as one
    /// search over both would keep).
    fn absorb(&mut self, later: MissTracker) {
        if let Some((b, v, wc)) = later.best {
            if self.best.as_ref().is_none_or(|(a, _, _)| b < *a) {
                self.best = Some((b, v, wc));
            }
        }
    }

    pub(crate) fn note(&mut self, p: &Problem, t: &dyn Topology, values: &[f64], wc: &WorstCase) {
        let worst = Self::shortfall(p, t, wc);
        if worst.is_finite() && self.best.as_ref().is_none_or(|(b, _, _)| worst < *b) {
            self.best = Some((worst, values.to_vec(), *wc));
        }
    }

    fn rejection(&self, p: &Problem, t: &dyn Topology, fallback: &str) -> Rejection {
        let worst = self.best.as_ref().and_then(|(_, _, wc)| {
            assess(p, t, wc)
                .into_iter()
                .filter(|c| !c.pass)
                .min_by(|a, b| a.margin.total_cmp(&b.margin))
        });
        match worst {
            Some(c) => Rejection {
                topology: t.id(),
                reason: format!(
                    "{}: {} needs {}; the closest candidate reached {} (short by {} % of {})",
                    t.id(),
                    c.name,
                    c.required,
                    c.achieved,
                    percent(-100.0 * c.margin),
                    c.basis
                ),
                binding: c.name.to_string(),
                best: c.achieved.clone(),
            },
            None => Rejection {
                topology: t.id(),
                reason: fallback.to_string(),
                binding: "parts.range".to_string(),
                best: "no candidate".to_string(),
            },
        }
    }
}

/// A duration for people: seconds under two minutes, else minutes or
/// hours, two significant figures at most.
fn duration(seconds: f64) -> String {
    if seconds < 120.0 {
        format!("{seconds:.0} s")
    } else if seconds < 7200.0 {
        format!("{:.0} min", seconds / 60.0)
    } else {
        format!("{:.0} h", seconds / 3600.0)
    }
}

/// A percentage for people: two decimals, or two significant figures in
/// scientific form when it is tiny (never an SI prefix).
fn percent(x: f64) -> String {
    if x.abs() >= 0.01 || x == 0.0 {
        format!("{x:.2}")
    } else {
        format!("{x:.1e}")
    }
}

/// Collects the feasible designs of one topology (the best `keep` of them).
pub(crate) struct Collector<'a> {
    pub(crate) p: &'a Problem,
    pub(crate) t: &'static dyn Topology,
    pub(crate) index: usize,
    pub(crate) prefer: Prefer,
    /// The fold grid's points, when set ([`Options::fold_points`]).
    pub(crate) fold_points: Option<usize>,
    pub(crate) keep: usize,
    pub(crate) designs: Vec<Design>,
    pub(crate) miss: MissTracker,
    pub(crate) effort: Effort,
    /// The best `keep` exact scores so far, descending.
    pub(crate) top_scores: Vec<f64>,
    /// Free cores a long search may take a helper thread from.
    pub(crate) spare: Option<&'a aid::Spare>,
    /// The run's divider pairs, shared by the topologies.
    pub(crate) pairs: Option<&'a smart::PairCache>,
    /// Keep the whole Pareto front (the exhaustive search): no score
    /// threshold, no cut at `keep`, and a design that a kept one dominates
    /// takes no place. Without it the best `keep` by score are kept, and
    /// a dominated one among them can leave fewer than `top` rows after
    /// the Pareto filter.
    pub(crate) front: bool,
}

impl<'a> Collector<'a> {
    /// An empty collector for topology `index` of the registry.
    pub(crate) fn new(
        p: &'a Problem,
        index: usize,
        opts: &Options,
        spare: Option<&'a aid::Spare>,
        pairs: Option<&'a smart::PairCache>,
    ) -> Self {
        Collector {
            p,
            t: TOPOLOGIES[index],
            index,
            prefer: opts.prefer,
            fold_points: opts.fold_points,
            keep: opts.per_topology.max(opts.top).max(1),
            designs: Vec::new(),
            miss: MissTracker::default(),
            effort: Effort::default(),
            top_scores: Vec::new(),
            spare,
            pairs,
            front: opts.method == Method::Exhaustive,
        }
    }

    /// The kept designs in rank order, or why there are none; with the
    /// work done.
    pub(crate) fn finish(mut self) -> TopologyResult {
        if self.designs.is_empty() {
            let r = self.miss.rejection(
                self.p,
                self.t,
                &format!(
                    "{}: no bias network inside parts.range keeps the device on and saturated",
                    self.t.id()
                ),
            );
            return (Err(r), self.effort);
        }
        self.trim();
        (Ok(self.designs), self.effort)
    }

    /// The score a candidate must reach to enter the kept list (−∞ while
    /// the list is not full). A candidate whose score bound is below it
    /// cannot be kept, whatever its exact check says.
    pub(crate) fn threshold(&self) -> f64 {
        if !self.front && self.top_scores.len() >= self.keep {
            self.top_scores[self.keep - 1]
        } else {
            f64::NEG_INFINITY
        }
    }

    /// Score of optimistic metrics (each at least as good as any design
    /// they bound can reach), compared with the threshold.
    pub(crate) fn may_enter(&self, optimistic: &Metrics) -> bool {
        score(&self.p.spec, optimistic, self.prefer) >= self.threshold()
    }

    /// Exact check of one candidate; keeps it when feasible.
    pub(crate) fn exact(&mut self, values: &[f64], tolerances: &[f64]) -> bool {
        let parts = self.t.part_count(values);
        // The screen: two tolerance extremes. Failing there is failing;
        // metrics there bound the full ones (analysis::lead_extremes).
        self.effort.screen_checks += 1;
        let lead = worst_case_of(self.p, self.t, &lead_extremes(self.t, values, tolerances));
        if !all_pass(&margins(self.p, self.t, &lead)) {
            // The full envelope only matters for the closest-miss answer,
            // which is given only while no design is feasible, and only a
            // candidate whose screen already beats the closest miss can.
            if self.designs.is_empty() && self.miss.could_beat(self.p, self.t, &lead) {
                self.effort.exact_checks += 1;
                let wc = worst_case(self.p, self.t, values, tolerances);
                self.miss.note(self.p, self.t, values, &wc);
            }
            return false;
        }
        if !self.may_enter(&Metrics::new(&self.p.spec, &lead, parts)) {
            return false;
        }
        self.effort.exact_checks += 1;
        let wc = worst_case(self.p, self.t, values, tolerances);
        if !all_pass(&margins(self.p, self.t, &wc)) {
            if self.designs.is_empty() {
                self.miss.note(self.p, self.t, values, &wc);
            }
            return false;
        }
        let metrics = Metrics::new(&self.p.spec, &wc, parts);
        let score = score(&self.p.spec, &metrics, self.prefer);
        self.admit(Design {
            topology: self.t,
            topology_index: self.index,
            values: values.to_vec(),
            tolerances: tolerances.to_vec(),
            worst: wc,
            metrics,
            score,
        });
        true
    }

    /// Keep a feasible design (with `front`, unless a kept one dominates
    /// it: whatever dominates it scores at least as high and is kept or
    /// dominated in turn, so it would never be shown).
    fn admit(&mut self, d: Design) {
        if self.front {
            if self.designs.iter().any(|k| k.metrics.dominates(&d.metrics)) {
                return;
            }
            self.designs.retain(|k| !d.metrics.dominates(&k.metrics));
        }
        let at = self.top_scores.partition_point(|&x| x >= d.score);
        self.top_scores.insert(at, d.score);
        self.top_scores.truncate(self.keep);
        self.designs.push(d);
        if !self.front && self.designs.len() >= 8 * self.keep {
            self.trim();
        }
    }

    /// Take in the designs, closest miss and work of a later part of the
    /// same topology's search (the exhaustive search's chunks, merged in
    /// order: the result is that of one search over both).
    pub(crate) fn absorb(&mut self, later: Collector<'_>) {
        for d in later.designs {
            self.admit(d);
        }
        self.miss.absorb(later.miss);
        self.effort.configurations += later.effort.configurations;
        self.effort.corner_checks += later.effort.corner_checks;
        self.effort.screen_checks += later.effort.screen_checks;
        self.effort.exact_checks += later.effort.exact_checks;
    }

    /// Keep the best `keep` designs (with `front`, every one), in rank
    /// order.
    pub(crate) fn trim(&mut self) {
        self.designs.sort_by(|a, b| {
            order(
                (a.score, a.topology_index, &a.values),
                (b.score, b.topology_index, &b.values),
            )
        });
        if !self.front {
            self.designs.truncate(self.keep);
        }
    }
}

/// Structural reasons a topology cannot work, before any search.
fn structural(p: &Problem, t: &dyn Topology) -> Option<Rejection> {
    let s = &p.spec;
    let rej = |binding: &str, reason: String, best: &str| Rejection {
        topology: t.id(),
        reason,
        binding: binding.to_string(),
        best: best.to_string(),
    };
    if !t.supports(s.device.family) {
        return Some(rej(
            "device.family",
            format!("{}: not a topology for a {}", t.id(), s.device.family.id()),
            "n/a",
        ));
    }
    if t.needs_vss() && s.supply.vss_v >= 0.0 {
        return Some(rej(
            "supply.vss",
            format!("{}: needs a negative rail (supply.vss < 0)", t.id()),
            "vss = 0",
        ));
    }
    use crate::spec::Polarity;
    match (s.target.polarity, t.non_inverting()) {
        (Polarity::Inverting, true) => {
            return Some(rej(
                "polarity",
                format!("{}: non-inverting by construction", t.id()),
                "non-inverting",
            ))
        }
        (Polarity::NonInverting, false) => {
            return Some(rej(
                "polarity",
                format!("{}: inverting by construction", t.id()),
                "inverting",
            ))
        }
        _ => {}
    }
    let (lo, _) = gain_window(s);
    let follower = t.roles().iter().all(|r| {
        !matches!(
            r,
            crate::topology::Role::Drain | crate::topology::Role::Feedback
        )
    });
    if follower && lo >= 1.0 {
        return Some(rej(
            "gain",
            format!(
                "{}: |gain| < 1 by construction (a follower), the target needs at least {}",
                t.id(),
                crate::units::format_sig(lo, 4)
            ),
            "< 1",
        ));
    }
    None
}

/// One topology's answer: its kept designs in rank order, or why it gave
/// none; with the work done.
pub(crate) type TopologyResult = (Result<Vec<Design>, Rejection>, Effort);

/// Search one topology (by registry position): its kept designs, or why
/// it gave none, with the work done.
fn search_one(
    p: &Problem,
    shelf: &Shelf,
    opts: &Options,
    index: usize,
    spare: Option<&aid::Spare>,
    pairs: Option<&smart::PairCache>,
) -> TopologyResult {
    let t = TOPOLOGIES[index];
    if let Some(r) = structural(p, t) {
        return (Err(r), Effort::default());
    }
    let mut col = Collector::new(p, index, opts, spare, pairs);
    match opts.method {
        Method::Smart => smart::search(&mut col, shelf),
        Method::Exhaustive => exhaustive::search(&mut col, shelf),
    }
    col.finish()
}

/// `f` for every topology of the registry, in registry order. The
/// topologies are independent searches, so they run on as many threads
/// as the machine has cores (each takes the next topology not yet taken,
/// those with the most resistors, the longest searches, first); without
/// threads they run here one after another.
fn each_topology<R: Send>(f: impl Fn(usize, &aid::Spare) -> R + Sync) -> Vec<(usize, R)> {
    use std::sync::atomic::AtomicUsize;
    let n = TOPOLOGIES.len();
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by_key(|&i| std::cmp::Reverse(TOPOLOGIES[i].parts().len()));
    let next = AtomicUsize::new(0);
    let spare = aid::Spare::default();
    let run = || {
        let mut out = Vec::new();
        loop {
            let k = next.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
            let Some(&i) = order.get(k) else {
                // This core is free now: a search still running may take it.
                spare.add();
                return out;
            };
            out.push((i, f(i, &spare)));
        }
    };
    let threads = std::thread::available_parallelism().map_or(1, |x| x.get().min(n));
    let mut all: Vec<(usize, R)> = std::thread::scope(|sc| {
        let others: Vec<_> = (1..threads)
            .filter_map(|_| std::thread::Builder::new().spawn_scoped(sc, run).ok())
            .collect();
        let mut all = run();
        for h in others {
            match h.join() {
                Ok(v) => all.extend(v),
                Err(e) => std::panic::resume_unwind(e),
            }
        }
        all
    });
    all.sort_by_key(|x| x.0);
    all
}

/// Run the search.
pub fn run(spec: &ValidSpec, shelf: &Shelf, opts: &Options) -> Result<Outcome, SearchError> {
    run_with_progress(spec, shelf, opts, &Progress::new())
}

/// Run the search, counting its progress in `progress` (read it from
/// another thread to show it).
pub fn run_with_progress(
    spec: &ValidSpec,
    shelf: &Shelf,
    opts: &Options,
    progress: &Progress,
) -> Result<Outcome, SearchError> {
    if shelf.values.is_empty() {
        return Err(SearchError::EmptyShelf {
            shelf: shelf.name.clone(),
            min: spec.parts.r_min_ohm,
            max: spec.parts.r_max_ohm,
        });
    }
    let p = problem_for(spec, opts.nominal_only);
    let mut effort = Effort {
        exhaustive_combinations: exhaustive::combinations(&p, shelf),
        ..Effort::default()
    };
    let shelf = if opts.nominal_only {
        Shelf {
            tolerances: vec![0.0; shelf.values.len()],
            ..shelf.clone()
        }
    } else if opts.method == Method::Smart {
        shelf.reduced()
    } else {
        shelf.clone()
    };
    if opts.method == Method::Exhaustive {
        let evaluations = exhaustive::corner_evaluations(&p, &shelf);
        if evaluations > opts.budget {
            let threads = exhaustive::threads();
            return Err(SearchError::OverBudget {
                combinations: effort.exhaustive_combinations,
                corners: p.corners.len(),
                evaluations,
                seconds: exhaustive::seconds(evaluations, threads),
                threads,
                budget: opts.budget,
            });
        }
    }
    let mut all = Vec::new();
    let mut rejected = Vec::new();
    let pairs = smart::PairCache::default();
    let results = match opts.method {
        Method::Exhaustive => exhaustive::search_all(&p, &shelf, opts, progress),
        Method::Smart => {
            each_topology(|i, spare| search_one(&p, &shelf, opts, i, Some(spare), Some(&pairs)))
        }
    };
    for (_, (outcome, e)) in results {
        effort.configurations += e.configurations;
        effort.corner_checks += e.corner_checks;
        effort.exact_checks += e.exact_checks;
        effort.screen_checks += e.screen_checks;
        match outcome {
            Ok(designs) => all.extend(designs),
            Err(r) => rejected.push(r),
        }
    }
    let ms: Vec<Metrics> = all.iter().map(|d| d.metrics).collect();
    let keep = pareto(&ms);
    let mut designs: Vec<Design> = keep.into_iter().map(|i| all[i].clone()).collect();
    designs.sort_by(|a, b| {
        order(
            (a.score, a.topology_index, &a.values),
            (b.score, b.topology_index, &b.values),
        )
    });
    designs.truncate(opts.top);
    Ok(Outcome {
        designs,
        rejected,
        effort,
        nominal_only: opts.nominal_only,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::catalog::ESeries;

    /// A band that contains another's is left out, and only such bands:
    /// against every pair compared directly.
    #[test]
    fn the_reduced_shelf_drops_exactly_the_bands_that_contain_another() {
        let values = [100.0, 101.0, 102.0, 110.0, 120.0, 120.5, 150.0, 1000.0];
        let tolerances = [0.05, 0.001, 0.05, 0.0, 0.1, 0.01, 0.1, 0.1];
        let shelf = Shelf {
            name: "t".to_string(),
            values: values.to_vec(),
            tolerances: tolerances.to_vec(),
        };
        let r = shelf.reduced();
        // 100 ±5 % and 102 ±5 % hold 101 ±0.1 %; 120 ±10 % holds 110 and
        // 120.5 ±1 %; 150 ±10 % holds nothing (its floor is 135).
        assert_eq!(r.values, [101.0, 110.0, 120.5, 150.0, 1000.0]);
        assert_eq!(r.tolerances, [0.001, 0.0, 0.01, 0.1, 0.1]);
        // Pseudo-random shelves against the definition.
        let mut x = 12345u64;
        let mut next = || {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        for _ in 0..200 {
            let mut values: Vec<f64> = (0..40).map(|_| 100.0 * (1.0 + next())).collect();
            values.sort_by(f64::total_cmp);
            values.dedup();
            let tolerances: Vec<f64> = values
                .iter()
                .map(|_| [0.0, 0.001, 0.01, 0.05, 0.1][(next() * 5.0) as usize])
                .collect();
            let shelf = Shelf {
                name: "t".to_string(),
                values: values.clone(),
                tolerances: tolerances.clone(),
            };
            let band = |i: usize| {
                (
                    values[i] * (1.0 - tolerances[i]),
                    values[i] * (1.0 + tolerances[i]),
                )
            };
            let want: Vec<f64> = (0..values.len())
                .filter(|&i| {
                    !(0..values.len())
                        .any(|j| j != i && band(i).0 <= band(j).0 && band(j).1 <= band(i).1)
                })
                .map(|i| values[i])
                .collect();
            assert_eq!(shelf.reduced().values, want);
        }
        // One tolerance: nothing is left out.
        let cat = Catalog::from_series(ESeries::E192, None, 10.0, 10e6).unwrap();
        let e192 = Shelf::new(&cat, None, 10.0, 10e6);
        assert_eq!(e192.reduced(), e192);
    }

    // A helper thread changes the time only (see `aid`): one topology's
    // long search gives the same designs, scores and work counts with a
    // free core to claim from its first batch as with none.
    #[test]
    fn a_helper_thread_changes_nothing_but_the_time() {
        let path = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/dual-rail.toml");
        let text = std::fs::read_to_string(path).unwrap();
        let spec = crate::spec::parse(&text).unwrap();
        let (lo, hi) = (spec.parts.r_min_ohm, spec.parts.r_max_ohm);
        let cat = Catalog::from_series(ESeries::E24, spec.parts.tolerance, lo, hi).unwrap();
        let shelf = Shelf::new(&cat, spec.parts.tolerance, lo, hi);
        let p = problem_for(&spec, false);
        let index = TOPOLOGIES
            .iter()
            .position(|t| t.id() == "divider-split")
            .unwrap();
        let opts = Options::default();
        let alone = search_one(&p, &shelf, &opts, index, None, None);
        let spare = aid::Spare::default();
        spare.add();
        let pairs = smart::PairCache::default();
        let helped = search_one(&p, &shelf, &opts, index, Some(&spare), Some(&pairs));
        // The helper has left and given its core back.
        assert!(spare.claim());
        let (Ok(a), Ok(b)) = (&alone.0, &helped.0) else {
            panic!("divider-split gave no design on dual-rail");
        };
        assert!(a.len() >= 2, "{a:?}");
        let key = |d: &Design| (d.values.clone(), d.score);
        assert_eq!(
            a.iter().map(key).collect::<Vec<_>>(),
            b.iter().map(key).collect::<Vec<_>>()
        );
        assert_eq!(alone.1, helped.1);
        // Long enough that its batches reach the size shared with a helper.
        assert!(alone.1.corner_checks > 1000, "{:?}", alone.1);
    }
}

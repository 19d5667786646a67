//! Branch and bound: the queue of boxes, best bound first, split in
//! halves and bounded in batches (with a helper thread where a core is
//! free).

use crate::search::aid::{Crew, Spare};
use crate::search::smart::axis::Axis;
use crate::search::smart::blocks::{Bound, MAX_SOURCES};
use crate::search::smart::bound::{Bounds, Scratch};
use crate::search::smart::visit::{visit, visit_window};
use crate::search::{Collector, Shelf};

/// Most axes a box has: the divider, the source resistors and a gate
/// resistor (no topology has all three; see the test).
pub(super) const MAX_AXES: usize = 1 + MAX_SOURCES;

/// A box waiting in the branch-and-bound queue.
pub(super) struct Node {
    /// Index range `[start, end)` on each axis (the first `axes.len()`
    /// are used; a fixed array, so a box allocates nothing).
    pub(super) ranges: [(usize, usize); MAX_AXES],
    /// A single configuration's drain resistor window, when the bound
    /// scanned it.
    pub(super) rd_window: Option<(usize, usize)>,
    /// Score bound of each drain resistor in the window (single
    /// configurations only).
    pub(super) rd_scores: Vec<f64>,
}

/// A queue entry: the box's score bound, its order of creation and its
/// slot in the queue's arena (the heap moves these 24 bytes, not boxes).
struct Queued {
    /// Score of the box's optimistic metrics.
    pub(super) score: f64,
    /// Order of creation (ties go to the older box: deterministic).
    seq: u64,
    pub(super) slot: usize,
}

impl PartialEq for Queued {
    fn eq(&self, o: &Self) -> bool {
        self.cmp(o) == std::cmp::Ordering::Equal
    }
}
impl Eq for Queued {}
impl PartialOrd for Queued {
    fn partial_cmp(&self, o: &Self) -> Option<std::cmp::Ordering> {
        Some(self.cmp(o))
    }
}
impl Ord for Queued {
    fn cmp(&self, o: &Self) -> std::cmp::Ordering {
        self.score.total_cmp(&o.score).then(o.seq.cmp(&self.seq))
    }
}

/// The boxes of the queue, best bound first, in slots reused once taken.
struct Queue {
    heap: std::collections::BinaryHeap<Queued>,
    slots: Vec<Node>,
    pub(super) free: Vec<usize>,
    seq: u64,
}

impl Queue {
    pub(super) fn new() -> Queue {
        Queue {
            heap: std::collections::BinaryHeap::new(),
            slots: Vec::new(),
            free: Vec::new(),
            seq: 0,
        }
    }

    pub(super) fn push(&mut self, score: f64, node: Node) {
        let slot = match self.free.pop() {
            Some(i) => {
                self.slots[i] = node;
                i
            }
            None => {
                self.slots.push(node);
                self.slots.len() - 1
            }
        };
        self.heap.push(Queued {
            score,
            seq: self.seq,
            slot,
        });
        self.seq += 1;
    }

    /// The best box and its score bound; its slot is free again.
    fn pop(&mut self) -> Option<(f64, Node)> {
        let q = self.heap.pop()?;
        self.free.push(q.slot);
        let node = std::mem::replace(
            &mut self.slots[q.slot],
            Node {
                ranges: [(0, 0); MAX_AXES],
                rd_window: None,
                rd_scores: Vec::new(),
            },
        );
        Some((q.score, node))
    }
}

/// Branch and bound over the box, best bound first: the box with the
/// highest score bound is split next, so good designs come early and raise
/// the entry threshold, and the search ends when the best waiting bound is
/// below it (no box left can hold a design that would be kept).
pub(super) fn branch<'env>(
    col: &mut Collector<'_>,
    b: &'env Bounds<'_>,
    axes: &'env [Axis],
    root: (f64, Node),
    v: &mut [f64],
    shelf: &Shelf,
    help: &mut Help<'_, 'env>,
) {
    // The box holds every part but the drain resistor (drain feedback,
    // which has no box, never branches).
    let run_k = b.rd;
    let n_axes = axes.len();
    let mut queue = Queue::new();
    queue.push(root.0, root.1);
    let mut space = Scratch::default();
    // The axis to split a box along: the one whose range spans the widest
    // logarithmic range, the largest ratio of its measure (None for a
    // single configuration).
    let widest = |ranges: &[(usize, usize)]| {
        (0..ranges.len())
            .filter(|&i| ranges[i].1 - ranges[i].0 > 1)
            .max_by(|&i, &j| {
                let w = |k: usize| axes[k].scale[ranges[k].1 - 1] / axes[k].scale[ranges[k].0];
                w(i).total_cmp(&w(j))
                    .then((ranges[i].1 - ranges[i].0).cmp(&(ranges[j].1 - ranges[j].0)))
                    .then(j.cmp(&i))
            })
    };
    let mut batch: Vec<Node> = Vec::with_capacity(BATCH);
    let mut popped = 0usize;
    let mut halves: Vec<[(usize, usize); MAX_AXES]> = Vec::with_capacity(2 * BATCH);
    loop {
        // The best boxes waiting, up to BATCH of them, while they can beat
        // the threshold.
        batch.clear();
        let size = (popped / GROWTH).clamp(1, BATCH);
        while batch.len() < size {
            match queue.pop() {
                Some((score, node)) if score >= col.threshold() => batch.push(node),
                _ => break,
            }
        }
        popped += batch.len();
        if batch.is_empty() {
            return;
        }
        // Both halves of every box to split, bounded together (by two
        // threads when a helper is free; the results are the same).
        halves.clear();
        for node in &batch {
            if let Some(i) = widest(&node.ranges[..n_axes]) {
                let (s, e) = node.ranges[i];
                let mid = s + (e - s) / 2;
                for half in [(s, mid), (mid, e)] {
                    let mut r = node.ranges;
                    r[i] = half;
                    halves.push(r);
                }
            }
        }
        let bounded: Vec<Option<Bound>> = match help.crew(b, axes, n_axes, halves.len()) {
            Some(crew) => crew.run(&v.to_vec(), &halves, |v, r| {
                b.bound_with(&mut space, v, axes, &r[..n_axes])
            }),
            None => halves
                .iter()
                .map(|r| b.bound_with(&mut space, v, axes, &r[..n_axes]))
                .collect(),
        };
        // In the order popped: single configurations are visited (which
        // may raise the threshold), the halves that can still beat it wait.
        let mut bounded = halves.iter().zip(bounded);
        for node in batch.drain(..) {
            let ranges = &node.ranges[..n_axes];
            if widest(ranges).is_some() {
                for (r, bd) in bounded.by_ref().take(2) {
                    col.effort.corner_checks += 1;
                    let Some(bd) = bd else {
                        continue;
                    };
                    let score = bd.score;
                    if score >= col.threshold() {
                        queue.push(
                            score,
                            Node {
                                ranges: *r,
                                rd_window: bd.rd_window,
                                rd_scores: bd.rd_scores,
                            },
                        );
                    }
                }
                continue;
            }
            for (a, r) in axes.iter().zip(ranges) {
                for (k, &pos) in a.positions.iter().enumerate() {
                    v[pos] = a.option(r.0)[k];
                }
            }
            col.effort.configurations += 1;
            match (node.rd_window, run_k) {
                (Some(w), Some(k)) => visit_window(col, v, k, w, &node.rd_scores, shelf),
                _ => visit(col, v, run_k, false, shelf),
            }
        }
    }
}

/// Boxes taken from the queue at a time: their halves are bounded
/// together, shared with a helper thread where one is free. Taking up to
/// 32 at a time, not one, costs a few bounds more (a box taken before a
/// design raised the threshold): under 1 % on the examples' own shelves,
/// 9 % on cable-driver over E96.
const BATCH: usize = 32;

/// The batch grows from one box by one per this many boxes taken, so a
/// short search stays nearly one box at a time.
const GROWTH: usize = 16;

/// A batch with fewer halves to bound than this is bounded here alone (a
/// hand-over costs more than it saves there).
const SHARE_FROM: usize = 8;

/// Closes the crew when the search ends, however it ends, so that the
/// helper leaves and its thread can be joined.
pub(super) struct Closing<'a, C, J, R>(pub(super) &'a Crew<C, J, R>);

impl<C, J, R> Drop for Closing<'_, C, J, R> {
    fn drop(&mut self) {
        self.0.close();
    }
}

/// The context and job of a shared bound: the values of every position
/// (ohms) and a box's index ranges.
type BoundCrew = Crew<Vec<f64>, [(usize, usize); MAX_AXES], Option<Bound>>;

/// The helper of one topology's search ([`super::aid`]), claimed from a
/// spare core when a batch is large enough to share.
pub(super) struct Help<'scope, 'env> {
    pub(super) scope: &'scope std::thread::Scope<'scope, 'env>,
    pub(super) crew: &'env BoundCrew,
    pub(super) spare: Option<&'env Spare>,
    pub(super) thread: Option<std::thread::ScopedJoinHandle<'scope, ()>>,
}

impl<'env> Help<'_, 'env> {
    /// The crew to share a batch of `jobs` bounds with, when a helper runs
    /// or a spare core lets one start.
    pub(super) fn crew(
        &mut self,
        b: &'env Bounds<'_>,
        axes: &'env [Axis],
        n_axes: usize,
        jobs: usize,
    ) -> Option<&'env BoundCrew> {
        if jobs < SHARE_FROM {
            return None;
        }
        if self.thread.is_none() {
            let spare = self.spare?;
            if !spare.claim() {
                return None;
            }
            let crew = self.crew;
            let started = std::thread::Builder::new().spawn_scoped(self.scope, move || {
                let mut space = Scratch::default();
                crew.serve(|v: &Vec<f64>, r: &[(usize, usize); MAX_AXES]| {
                    b.bound_with(&mut space, v, axes, &r[..n_axes])
                });
                // The core is free again for another search.
                spare.add();
            });
            match started {
                Ok(h) => self.thread = Some(h),
                Err(_) => {
                    spare.add();
                    self.spare = None;
                    return None;
                }
            }
        }
        Some(self.crew)
    }
}

//! A second thread's share of one topology's search.
//!
//! The topologies are searched on as many threads as the machine has
//! cores, but one of them (the split-source divider, on most specs) often
//! takes most of the time while the other threads have run out of
//! topologies. A thread that runs out registers its core as [`Spare`]; a
//! long search claims it and shares each batch of box bounds with it
//! ([`Crew`]). The batches are formed the same way with a helper or
//! without, and every result is put back in job order, so the search, its
//! work counts included, is the same either way: the helper changes the
//! time only.
//!
//! The hand-over blocks on a mutex and condition variables, after a short
//! poll: a side that waits (the helper for the next batch, the search for
//! the helper's last result) first reads a copy of the batch number a few
//! thousand times, well under a millisecond, since what it waits for is
//! often only microseconds away while a sleep and a wake-up cost tens of
//! microseconds on a virtual machine. The poll is bounded: a thread that
//! spun on would take the core from other work (and on a virtual machine
//! can lose it to the hypervisor).

use std::sync::atomic::{AtomicU64, AtomicUsize, Ordering};
use std::sync::{Condvar, Mutex, MutexGuard};

/// Cores whose worker thread has run out of topologies.
#[derive(Debug, Default)]
pub(crate) struct Spare(AtomicUsize);

impl Spare {
    /// A worker has run out of topologies: its core is free.
    pub(crate) fn add(&self) {
        self.0.fetch_add(1, Ordering::AcqRel);
    }

    /// Take one free core, if there is one.
    pub(crate) fn claim(&self) -> bool {
        self.0
            .fetch_update(Ordering::AcqRel, Ordering::Acquire, |n| n.checked_sub(1))
            .is_ok()
    }
}

/// The shared state of one batch.
struct Shift<C, J, R> {
    /// Batch number: the helper starts a batch when it changes.
    batch: u64,
    /// The batch the helper has begun.
    started: u64,
    /// The batch the helper has finished (its results are in `results`).
    finished: u64,
    /// A batch the search finished alone before the helper began it: the
    /// helper skips it.
    withdrawn: u64,
    closed: bool,
    /// The context every job of the batch shares, and the jobs.
    context: Option<C>,
    jobs: Vec<J>,
    /// The helper's results: job index and result.
    results: Vec<(usize, R)>,
}

/// A search thread and its helper doing the jobs of each batch between
/// them: each takes the next job not yet taken until none is left.
pub(crate) struct Crew<C, J, R> {
    shift: Mutex<Shift<C, J, R>>,
    /// The helper waits here for a batch (or the end).
    posted: Condvar,
    /// The search waits here for the helper's results.
    finished: Condvar,
    /// The next job index of the current batch.
    next: AtomicUsize,
    /// The newest batch posted, and the newest the helper finished (or
    /// `u64::MAX` once the crew is closed): copies of the shift's, read
    /// without the lock by a side that waits a little before it sleeps.
    posted_at: AtomicU64,
    finished_at: AtomicU64,
}

/// Polls of a copy before a side sleeps on its condition variable (see
/// the module's notes; 1,000 and 16,000 measured the same).
const POLLS: u32 = 4000;

/// Poll `ready` up to [`POLLS`] times, or until it holds. The caller then
/// checks the shift under the lock either way: the poll only saves a sleep.
fn poll(ready: impl Fn() -> bool) {
    for _ in 0..POLLS {
        if ready() {
            return;
        }
        std::hint::spin_loop();
    }
}

impl<C, J, R> Crew<C, J, R> {
    /// A crew with no batch yet.
    pub(crate) fn new() -> Crew<C, J, R> {
        Crew {
            shift: Mutex::new(Shift {
                batch: 0,
                started: 0,
                finished: 0,
                withdrawn: 0,
                closed: false,
                context: None,
                jobs: Vec::new(),
                results: Vec::new(),
            }),
            posted: Condvar::new(),
            finished: Condvar::new(),
            next: AtomicUsize::new(0),
            posted_at: AtomicU64::new(0),
            finished_at: AtomicU64::new(0),
        }
    }

    fn lock(&self) -> MutexGuard<'_, Shift<C, J, R>> {
        // A poisoned lock means the other side panicked; that panic is
        // raised where its thread is joined, the state itself is plain data.
        self.shift.lock().unwrap_or_else(|e| e.into_inner())
    }

    /// End the helper's loop.
    pub(crate) fn close(&self) {
        self.lock().closed = true;
        self.posted_at.store(u64::MAX, Ordering::Release);
        self.finished_at.store(u64::MAX, Ordering::Release);
        self.posted.notify_all();
        self.finished.notify_all();
    }
}

impl<C: Clone, J: Clone, R> Crew<C, J, R> {
    /// Take jobs of the current batch (`n` of them) until none is left.
    fn take(&self, n: usize, mut each: impl FnMut(usize)) {
        loop {
            let i = self.next.fetch_add(1, Ordering::AcqRel);
            if i >= n {
                return;
            }
            each(i);
        }
    }

    /// The helper's loop: `work` on the jobs it takes of each batch, until
    /// the crew is closed.
    pub(crate) fn serve(&self, mut work: impl FnMut(&C, &J) -> R) {
        // However the loop ends (a panic too), the search stops waiting.
        struct Leaving<'a, C, J, R>(&'a Crew<C, J, R>);
        impl<C, J, R> Drop for Leaving<'_, C, J, R> {
            fn drop(&mut self) {
                let mut s = self.0.shift.lock().unwrap_or_else(|e| e.into_inner());
                s.closed = true;
                self.0.finished_at.store(u64::MAX, Ordering::Release);
                self.0.finished.notify_all();
            }
        }
        let _leaving = Leaving(self);
        let mut seen = 0;
        loop {
            poll(|| self.posted_at.load(Ordering::Acquire) != seen);
            let (context, jobs) = {
                let mut s = self.lock();
                while !s.closed && s.batch == seen {
                    s = self.posted.wait(s).unwrap_or_else(|e| e.into_inner());
                }
                if s.closed {
                    return;
                }
                seen = s.batch;
                if s.withdrawn == seen {
                    continue;
                }
                s.started = seen;
                (s.context.clone(), s.jobs.clone())
            };
            let mut done = Vec::new();
            if let Some(context) = &context {
                self.take(jobs.len(), |i| done.push((i, work(context, &jobs[i]))));
            }
            let mut s = self.lock();
            s.results = done;
            s.finished = seen;
            self.finished_at.store(seen, Ordering::Release);
            self.finished.notify_one();
        }
    }

    /// Every job's result, in job order, the helper taking some of them:
    /// `work` here, the helper's own `work` there (the two must compute
    /// the same function).
    pub(crate) fn run(&self, context: &C, jobs: &[J], mut work: impl FnMut(&C, &J) -> R) -> Vec<R> {
        let batch = {
            let mut s = self.lock();
            s.batch += 1;
            s.context = Some(context.clone());
            s.jobs.clear();
            s.jobs.extend_from_slice(jobs);
            self.next.store(0, Ordering::Release);
            self.posted_at.store(s.batch, Ordering::Release);
            self.posted.notify_one();
            s.batch
        };
        let mut mine = Vec::new();
        self.take(jobs.len(), |i| mine.push((i, work(context, &jobs[i]))));
        // A helper that has begun the batch may still hold a job: wait
        // until it reports. One that has not begun it is told to skip it
        // (no wake-up to wait for: every job is done here).
        let theirs = {
            let begun = self.lock().started == batch;
            if begun {
                poll(|| self.finished_at.load(Ordering::Acquire) >= batch);
            }
            let mut s = self.lock();
            if s.started != batch {
                s.withdrawn = batch;
                Vec::new()
            } else {
                // (A closed crew has no helper left to wait for.)
                while s.finished != batch && !s.closed {
                    s = self.finished.wait(s).unwrap_or_else(|e| e.into_inner());
                }
                std::mem::take(&mut s.results)
            }
        };
        let mut out: Vec<Option<R>> = (0..jobs.len()).map(|_| None).collect();
        for (i, r) in mine.into_iter().chain(theirs) {
            out[i] = Some(r);
        }
        // A helper that stopped (it panicked) may have left jobs undone.
        out.into_iter()
            .zip(jobs)
            .map(|(r, j)| r.unwrap_or_else(|| work(context, j)))
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Every job of every batch is done once, by one side or the other, and
    // the results come back in job order.
    #[test]
    fn a_crew_does_each_job_once_in_order() {
        let crew: Crew<u64, u64, u64> = Crew::new();
        let by_helper = AtomicUsize::new(0);
        // Jobs slow enough (20 µs) for the helper to wake inside a batch.
        let job = |c: &u64, j: &u64| {
            std::thread::sleep(std::time::Duration::from_micros(20));
            c * 1000 + j * j
        };
        std::thread::scope(|sc| {
            sc.spawn(|| {
                crew.serve(|c, j| {
                    by_helper.fetch_add(1, Ordering::Relaxed);
                    job(c, j)
                })
            });
            // Sizes 1 to 40, then 40 again until the helper has taken a
            // job (it may be slow to start on a busy machine).
            let sizes = (1..=40u64).chain(std::iter::repeat_n(40, 2000));
            for (batch, size) in (1u64..).zip(sizes) {
                if batch > 40 && by_helper.load(Ordering::Relaxed) > 0 {
                    break;
                }
                let jobs: Vec<u64> = (0..size).collect();
                let got = crew.run(&batch, &jobs, job);
                let want: Vec<u64> = jobs.iter().map(|j| batch * 1000 + j * j).collect();
                assert_eq!(got, want);
            }
            crew.close();
        });
        assert!(by_helper.load(Ordering::Relaxed) > 0);
    }

    #[test]
    fn spare_cores_are_claimed_once_each() {
        let s = Spare::default();
        assert!(!s.claim());
        s.add();
        s.add();
        assert!(s.claim());
        assert!(s.claim());
        assert!(!s.claim());
    }
}

//! A progress bar on stderr while a long search runs: only when stderr is
//! a terminal (never in a pipe or a log), and only once the search has run
//! for half a second. The search counts its work in a
//! [`search::Progress`](crate::search::Progress); this module reads the
//! counts from a second thread and draws them with indicatif.

use std::io::IsTerminal;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::{Duration, Instant};

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use crate::search::Progress;

/// How long a search runs before the bar appears (a quick run shows none).
const DELAY: Duration = Duration::from_millis(500);
/// How often the bar is redrawn from the counts.
const TICK: Duration = Duration::from_millis(100);

/// Run `work`, drawing `progress` on stderr as `label` while it runs, if
/// stderr is a terminal. The bar shows once the work has a known total.
pub(crate) fn while_running<T: Send>(
    label: &str,
    progress: &Progress,
    work: impl FnOnce() -> T + Send,
) -> T {
    if !std::io::stderr().is_terminal() {
        return work();
    }
    let finished = AtomicBool::new(false);
    std::thread::scope(|sc| {
        let drawer = sc.spawn(|| draw(label, progress, &finished));
        let out = work();
        finished.store(true, Ordering::Release);
        let _ = drawer.join();
        out
    })
}

fn draw(label: &str, progress: &Progress, finished: &AtomicBool) {
    let start = Instant::now();
    let mut bar: Option<ProgressBar> = None;
    while !finished.load(Ordering::Acquire) {
        std::thread::sleep(TICK);
        let total = progress.total();
        if bar.is_none() && total > 0 && start.elapsed() >= DELAY {
            let b = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::stderr());
            let style = ProgressStyle::with_template(
                "{msg} [{bar:32}] {percent:>3}% {elapsed} elapsed, about {eta} left",
            )
            .map(|s| s.progress_chars("=> "))
            .unwrap_or_else(|_| ProgressStyle::default_bar());
            b.set_style(style);
            b.set_message(label.to_string());
            bar = Some(b);
        }
        if let Some(b) = &bar {
            b.set_length(total);
            b.set_position(progress.done());
        }
    }
    if let Some(b) = bar {
        b.finish_and_clear();
    }
}

//! Fault injection: every file-system call of the writer is made to fail in
//! turn, or the interrupt flag is raised right after it, and the folder
//! tree is compared with what it was before the run.

use super::*;
use std::cell::Cell;
use std::collections::BTreeMap;
use std::sync::atomic::AtomicUsize;

/// What to do at call number `at` (0-based).
#[derive(Clone, Copy, PartialEq)]
enum Fault {
    None,
    Fail(usize),
    Interrupt(usize),
}

/// The real file system with one call made to fail or to raise the
/// interrupt, and the atomic exchange optionally refused as unsupported.
struct FaultyFs {
    fault: Fault,
    exchange_supported: bool,
    calls: Cell<usize>,
    stop: Cell<bool>,
    log: std::cell::RefCell<Vec<String>>,
}

impl FaultyFs {
    fn new(fault: Fault, exchange_supported: bool) -> FaultyFs {
        FaultyFs {
            fault,
            exchange_supported,
            calls: Cell::new(0),
            stop: Cell::new(false),
            log: std::cell::RefCell::new(Vec::new()),
        }
    }

    /// Count the call; fail it if it is the one.
    fn enter(&self, what: &str, p: &Path) -> io::Result<()> {
        let n = self.calls.get();
        self.calls.set(n + 1);
        self.log
            .borrow_mut()
            .push(format!("{n}: {what} {}", p.display()));
        if self.fault == Fault::Fail(n) {
            return Err(io::Error::other(format!(
                "injected failure at call {n} ({what})"
            )));
        }
        Ok(())
    }

    /// After a call that succeeded: raise the interrupt if it is the one.
    fn leave<T>(&self, r: io::Result<T>) -> io::Result<T> {
        if r.is_ok() && self.fault == Fault::Interrupt(self.calls.get() - 1) {
            self.stop.set(true);
        }
        r
    }
}

impl Fs for FaultyFs {
    fn create_dir(&self, p: &Path) -> io::Result<()> {
        self.enter("create_dir", p)?;
        self.leave(RealFs.create_dir(p))
    }
    fn write_file(&self, p: &Path, bytes: &[u8]) -> io::Result<()> {
        self.enter("write_file", p)?;
        self.leave(RealFs.write_file(p, bytes))
    }
    fn sync_dir(&self, p: &Path) -> io::Result<()> {
        self.enter("sync_dir", p)?;
        self.leave(RealFs.sync_dir(p))
    }
    fn rename(&self, from: &Path, to: &Path) -> io::Result<()> {
        self.enter("rename", from)?;
        self.leave(RealFs.rename(from, to))
    }
    fn exchange(&self, a: &Path, b: &Path) -> io::Result<()> {
        self.enter("exchange", a)?;
        if !self.exchange_supported {
            return Err(io::Error::new(io::ErrorKind::Unsupported, "test"));
        }
        self.leave(RealFs.exchange(a, b))
    }
    fn remove_all(&self, p: &Path) -> io::Result<()> {
        self.enter("remove_all", p)?;
        self.leave(RealFs.remove_all(p))
    }
    fn remove_dir(&self, p: &Path) -> io::Result<()> {
        self.enter("remove_dir", p)?;
        self.leave(RealFs.remove_dir(p))
    }
}

/// A fresh scratch folder (created) for one case.
fn scratch(tag: &str) -> PathBuf {
    static N: AtomicUsize = AtomicUsize::new(0);
    let n = N.fetch_add(1, Ordering::Relaxed);
    let d = std::env::temp_dir().join(format!(
        "gatewright-outdir-{}-{tag}-{n}",
        std::process::id()
    ));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Paths under a root, each with its content (None for a folder).
type Tree = BTreeMap<String, Option<Vec<u8>>>;

/// Every path under `root` with its content.
fn tree(root: &Path) -> Tree {
    let mut out = BTreeMap::new();
    let mut todo = vec![root.to_path_buf()];
    while let Some(d) = todo.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let p = e.unwrap().path();
            let rel = p.strip_prefix(root).unwrap().to_string_lossy().into_owned();
            if p.is_dir() {
                out.insert(rel, None);
                todo.push(p);
            } else {
                out.insert(rel, Some(std::fs::read(&p).unwrap()));
            }
        }
    }
    out
}

fn new_files() -> Vec<(&'static str, Vec<u8>)> {
    vec![
        ("report.txt", b"new report".to_vec()),
        ("bom.csv", b"new bom".to_vec()),
        ("design.cir", b"new deck".to_vec()),
    ]
}

/// The three situations: a new folder under two missing parents, and an
/// existing folder replaced with and without the atomic exchange.
#[derive(Clone, Copy, Debug)]
enum Case {
    NewUnderMissingParents,
    ReplaceByExchange,
    ReplaceAside,
}

/// Set up the case; returns (root, --out path).
fn setup(case: Case) -> (PathBuf, PathBuf) {
    let root = scratch(&format!("{case:?}"));
    match case {
        Case::NewUnderMissingParents => {
            std::fs::create_dir(root.join("kept")).unwrap();
            (root.clone(), root.join("kept/a/b/out"))
        }
        Case::ReplaceByExchange | Case::ReplaceAside => {
            let out = root.join("out");
            std::fs::create_dir(&out).unwrap();
            // An old run with a file this run does not write (a deck).
            std::fs::write(out.join("report.txt"), "old report").unwrap();
            std::fs::write(out.join("design3.cir"), "old deck").unwrap();
            (root, out)
        }
    }
}

/// The outcome of one run: (root, --out path, tree before, result, the
/// file system with its call log).
type Run = (PathBuf, PathBuf, Tree, Result<Done>, FaultyFs);

fn run(case: Case, fault: Fault) -> Run {
    let (root, out) = setup(case);
    let before = tree(&root);
    let fs = FaultyFs::new(fault, !matches!(case, Case::ReplaceAside));
    let stop = || fs.stop.get();
    let r = write_with(&fs, &stop, &out, true, &new_files());
    (root, out, before, r, fs)
}

/// The folder holds exactly the new files, and nothing else of the run
/// is left under the root but `left` (the old folder that could not be
/// removed).
fn complete(root: &Path, out: &Path, left: Option<&Path>, ctx: &str) {
    let got = tree(out);
    let want: Tree = new_files()
        .into_iter()
        .map(|(n, b)| (n.to_string(), Some(b)))
        .collect();
    assert_eq!(got, want, "{ctx}");
    for e in std::fs::read_dir(out.parent().unwrap()).unwrap() {
        let p = e.unwrap().path();
        let name = p.file_name().unwrap().to_string_lossy().into_owned();
        if name.starts_with('.') {
            assert_eq!(Some(p.as_path()), left, "{ctx}: {name} left behind");
        }
    }
    let _ = root;
}

#[test]
fn a_clean_run_writes_every_file_and_leaves_no_temporary() {
    for case in [
        Case::NewUnderMissingParents,
        Case::ReplaceByExchange,
        Case::ReplaceAside,
    ] {
        let (root, out, _, r, fs) = run(case, Fault::None);
        assert!(matches!(r, Ok(Done::Clean)), "{case:?}: {r:?}");
        complete(&root, &out, None, &format!("{case:?}"));
        assert!(fs.calls.get() >= 6, "{case:?}: {:?}", fs.log.borrow());
        let _ = std::fs::remove_dir_all(&root);
    }
}

// Each call fails in turn. Up to the parent's sync the run fails and the
// tree is exactly as before (the old folder's bytes, no staging folder, no
// parent created by the run); the one call after it, the removal of the
// old folder, can only leave that folder behind with a warning.
#[test]
fn a_failure_at_any_step_leaves_the_tree_as_it_was() {
    for case in [
        Case::NewUnderMissingParents,
        Case::ReplaceByExchange,
        Case::ReplaceAside,
    ] {
        let (root, _, _, _, fs) = run(case, Fault::None);
        let total = fs.calls.get();
        let _ = std::fs::remove_dir_all(&root);
        let mut failed = 0;
        for k in 0..total {
            let (root, out, before, r, fs) = run(case, Fault::Fail(k));
            let ctx = format!("{case:?}, failure at {:?}", fs.log.borrow().get(k));
            match r {
                Err(e) => {
                    failed += 1;
                    assert!(
                        format!("{e:#}").contains("injected failure"),
                        "{ctx}: {e:#}"
                    );
                    assert_eq!(tree(&root), before, "{ctx}");
                }
                Ok(Done::OldLeft(old, _)) => {
                    assert!(old.exists(), "{ctx}");
                    complete(&root, &out, Some(&old), &ctx);
                }
                Ok(Done::Clean) => panic!("{ctx}: an injected failure went unseen"),
            }
            let _ = std::fs::remove_dir_all(&root);
        }
        // Every call but the final removal of an old folder is undone.
        let after_commit = usize::from(!matches!(case, Case::NewUnderMissingParents));
        assert_eq!(failed, total - after_commit, "{case:?}");
    }
}

// The interrupt is raised right after each call in turn. Before the new
// folder is synced into place the run stops with `Interrupted` and the tree
// is as before; after that the new folder stands.
#[test]
fn an_interrupt_at_any_step_leaves_the_tree_as_it_was() {
    for case in [
        Case::NewUnderMissingParents,
        Case::ReplaceByExchange,
        Case::ReplaceAside,
    ] {
        let (root, _, _, _, fs) = run(case, Fault::None);
        let total = fs.calls.get();
        let _ = std::fs::remove_dir_all(&root);
        for k in 0..total {
            let (root, out, before, r, fs) = run(case, Fault::Interrupt(k));
            let ctx = format!("{case:?}, interrupt after {:?}", fs.log.borrow().get(k));
            match r {
                Err(e) => {
                    assert!(e.chain().any(|c| c.is::<Interrupted>()), "{ctx}: {e:#}");
                    assert_eq!(tree(&root), before, "{ctx}");
                }
                Ok(d) => {
                    assert!(matches!(d, Done::Clean), "{ctx}");
                    complete(&root, &out, None, &ctx);
                }
            }
            let _ = std::fs::remove_dir_all(&root);
        }
    }
}

#[test]
fn force_refuses_a_folder_with_files_it_did_not_write() {
    let root = scratch("foreign");
    let out = root.join("out");
    std::fs::create_dir(&out).unwrap();
    std::fs::write(out.join("report.txt"), "old").unwrap();
    std::fs::write(out.join("thesis.docx"), "mine").unwrap();
    let before = tree(&root);
    let e = write_with(&RealFs, &|| false, &out, true, &new_files()).unwrap_err();
    assert!(format!("{e}").contains("holds `thesis.docx`"), "{e}");
    assert_eq!(tree(&root), before);
    std::fs::remove_file(out.join("thesis.docx")).unwrap();
    std::fs::create_dir(out.join("sub")).unwrap();
    let e = write_with(&RealFs, &|| false, &out, true, &new_files()).unwrap_err();
    assert!(format!("{e}").contains("holds `sub`"), "{e}");
    let _ = std::fs::remove_dir_all(&root);
}

#[test]
fn an_existing_folder_needs_force_and_a_file_is_refused() {
    let root = scratch("exists");
    let out = root.join("out");
    std::fs::create_dir(&out).unwrap();
    let e = write_with(&RealFs, &|| false, &out, false, &new_files()).unwrap_err();
    assert!(
        format!("{e}").contains("already exists; pass --force"),
        "{e}"
    );
    let file = root.join("file");
    std::fs::write(&file, "x").unwrap();
    let e = write_with(&RealFs, &|| false, &file, true, &new_files()).unwrap_err();
    assert!(format!("{e}").contains("is not a folder"), "{e}");
    let e = write_with(&RealFs, &|| false, Path::new(".."), true, &new_files()).unwrap_err();
    assert!(format!("{e}").contains("name a folder"), "{e}");
    let _ = std::fs::remove_dir_all(&root);
}

// A staging folder of a process that no longer runs (a pid above Linux's
// largest, 2^22) is removed by the next run; one of a running process
// (this one) is not.
#[test]
fn a_killed_run_s_staging_folder_is_removed_by_the_next() {
    if !Path::new("/proc/self").exists() {
        return;
    }
    let root = scratch("stale");
    let stale = root.join(".out.gatewright-4999999-0");
    std::fs::create_dir(&stale).unwrap();
    std::fs::write(stale.join("report.txt"), "half").unwrap();
    let live = root.join(format!(".out.gatewright-{}-77", std::process::id()));
    std::fs::create_dir(&live).unwrap();
    let other = root.join(".other.gatewright-4999999-0");
    std::fs::create_dir(&other).unwrap();
    write_with(&RealFs, &|| false, &root.join("out"), false, &new_files()).unwrap();
    assert!(!stale.exists());
    assert!(live.exists());
    assert!(
        other.exists(),
        "a staging folder of another --out is not ours"
    );
    let _ = std::fs::remove_dir_all(&root);
}

#[test]
fn product_names_are_the_bench_files_and_the_decks() {
    for yes in [
        "report.txt",
        "bom.csv",
        "design.cir",
        "design1.cir",
        "design12-corners.cir",
    ] {
        assert!(is_product(yes), "{yes}");
    }
    for no in [
        "notes.txt",
        "design.txt",
        "designx.cir",
        "design-corners.cir",
        "design1.cir.bak",
    ] {
        assert!(!is_product(no), "{no}");
    }
}

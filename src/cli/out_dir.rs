//! `--out DIR`: a folder written all or nothing.
//!
//! Every file is rendered in memory before this module is called. The
//! writer then, step by step:
//!
//! 1. creates the missing parent folders of DIR, remembering which;
//! 2. creates a fresh staging folder beside DIR, `.NAME.gatewright-PID-N`;
//! 3. writes each file into it and fsyncs the file;
//! 4. fsyncs the staging folder;
//! 5. puts it in place: a rename when DIR does not exist; with `--force`,
//!    an atomic exchange of the two folders (Linux `renameat2` with
//!    `RENAME_EXCHANGE`; where that is not available, DIR is first renamed
//!    aside, then the staging folder into its place);
//! 6. fsyncs the parent folder: from here on the new folder is the result;
//! 7. removes the old folder (now under a staging name), if any.
//!
//! An error or an interrupt (SIGINT, SIGTERM) at any step up to 6 undoes
//! every step done: the old DIR is back as it was, the staging folder and
//! every parent folder this run created are gone. A hang-up (SIGHUP) is
//! held off until the write ends, a few milliseconds later: a closed
//! terminal should not cost a finished result, and `nohup` (which ignores
//! it) keeps working. A staging folder left by a run that was killed
//! outright (SIGKILL, a power cut) is removed by the next run that writes
//! the same DIR; the old DIR itself is untouched until the exchange, which
//! is atomic.
//!
//! `--force` replaces DIR only when it holds nothing but files gatewright
//! writes (see [`is_product`]), so a mistyped `--out` cannot delete
//! anyone's documents.
//!
//! Every file-system call goes through [`Fs`], so the tests can make any
//! one of them fail, or raise the interrupt right after it.

use anyhow::{bail, Context, Result};
use std::ffi::OsString;
use std::fs::{File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

/// The run was interrupted by a signal; everything it did was undone.
#[derive(Debug, thiserror::Error)]
#[error("interrupted; `{0}` was left as it was and no temporary file remains")]
pub(crate) struct Interrupted(pub(crate) String);

/// The file-system calls the writer makes.
pub(crate) trait Fs {
    /// Create one folder (its parent exists).
    fn create_dir(&self, p: &Path) -> io::Result<()>;
    /// Create a new file with these bytes and fsync it.
    fn write_file(&self, p: &Path, bytes: &[u8]) -> io::Result<()>;
    /// Fsync a folder, so the names in it are on the disk.
    fn sync_dir(&self, p: &Path) -> io::Result<()>;
    /// Rename a file or folder.
    fn rename(&self, from: &Path, to: &Path) -> io::Result<()>;
    /// Exchange two folders atomically; `Unsupported` where the system
    /// cannot.
    fn exchange(&self, a: &Path, b: &Path) -> io::Result<()>;
    /// Remove a folder and everything in it.
    fn remove_all(&self, p: &Path) -> io::Result<()>;
    /// Remove an empty folder.
    fn remove_dir(&self, p: &Path) -> io::Result<()>;
}

/// The real file system.
pub(crate) struct RealFs;

impl Fs for RealFs {
    fn create_dir(&self, p: &Path) -> io::Result<()> {
        std::fs::create_dir(p)
    }

    fn write_file(&self, p: &Path, bytes: &[u8]) -> io::Result<()> {
        let mut f = OpenOptions::new().write(true).create_new(true).open(p)?;
        f.write_all(bytes)?;
        f.sync_all()
    }

    fn sync_dir(&self, p: &Path) -> io::Result<()> {
        if cfg!(unix) {
            File::open(p)?.sync_all()
        } else {
            // Folders cannot be opened for syncing there; renames are
            // flushed by the system.
            Ok(())
        }
    }

    fn rename(&self, from: &Path, to: &Path) -> io::Result<()> {
        std::fs::rename(from, to)
    }

    #[cfg(target_os = "linux")]
    fn exchange(&self, a: &Path, b: &Path) -> io::Result<()> {
        use rustix::fs::{renameat_with, RenameFlags, CWD};
        match renameat_with(CWD, a, CWD, b, RenameFlags::EXCHANGE) {
            Ok(()) => Ok(()),
            // Old kernels and some file systems do not know the flag.
            Err(e) if e == rustix::io::Errno::INVAL || e == rustix::io::Errno::NOSYS => Err(
                io::Error::new(io::ErrorKind::Unsupported, "no atomic exchange here"),
            ),
            Err(e) => Err(e.into()),
        }
    }

    #[cfg(not(target_os = "linux"))]
    fn exchange(&self, _a: &Path, _b: &Path) -> io::Result<()> {
        Err(io::Error::new(
            io::ErrorKind::Unsupported,
            "no atomic exchange here",
        ))
    }

    fn remove_all(&self, p: &Path) -> io::Result<()> {
        std::fs::remove_dir_all(p)
    }

    fn remove_dir(&self, p: &Path) -> io::Result<()> {
        std::fs::remove_dir(p)
    }
}

/// True for a file name gatewright writes into an `--out` folder: one of
/// the bench files, or a deck `designN.cir` / `designN-corners.cir`.
pub(crate) fn is_product(name: &str) -> bool {
    if super::bench::FILES.contains(&name) {
        return true;
    }
    let Some(rest) = name.strip_prefix("design") else {
        return false;
    };
    let Some(rest) = rest.strip_suffix(".cir") else {
        return false;
    };
    let digits = rest.strip_suffix("-corners").unwrap_or(rest);
    !digits.is_empty() && digits.bytes().all(|b| b.is_ascii_digit())
}

/// Write `files` (name, bytes) as the folder `dir`, all or nothing; with
/// `force` an existing folder of gatewright's files is replaced whole.
/// SIGINT and SIGTERM are caught while it runs and undo the write; SIGHUP
/// is held off until it ends.
pub(crate) fn write_folder(dir: &Path, force: bool, files: &[(&str, Vec<u8>)]) -> Result<()> {
    let stop = Arc::new(AtomicBool::new(false));
    let ids = catch_signals(&stop);
    let result = write_with(&RealFs, &|| stop.load(Ordering::SeqCst), dir, force, files);
    release_signals(ids);
    match result? {
        Done::Clean => Ok(()),
        Done::OldLeft(old, e) => {
            super::talk(&format!(
                "warning: the new `{}` is complete, but the old folder moved to `{}` \
                 could not be removed ({e}); remove it by hand",
                dir.display(),
                old.display()
            ));
            Ok(())
        }
    }
}

#[cfg(unix)]
fn catch_signals(stop: &Arc<AtomicBool>) -> Vec<signal_hook::SigId> {
    use signal_hook::consts::{SIGHUP, SIGINT, SIGTERM};
    let held = Arc::new(AtomicBool::new(false));
    [(SIGINT, stop), (SIGTERM, stop), (SIGHUP, &held)]
        .iter()
        .filter_map(|(s, flag)| signal_hook::flag::register(*s, Arc::clone(flag)).ok())
        .collect()
}

#[cfg(unix)]
fn release_signals(ids: Vec<signal_hook::SigId>) {
    for id in ids {
        signal_hook::low_level::unregister(id);
    }
}

#[cfg(not(unix))]
fn catch_signals(_stop: &Arc<AtomicBool>) {}

#[cfg(not(unix))]
fn release_signals(_ids: ()) {}

/// How a write that put the new folder in place ended.
#[derive(Debug)]
pub(crate) enum Done {
    /// Nothing of the run is left but the new folder.
    Clean,
    /// The old folder, moved aside, could not be removed.
    OldLeft(PathBuf, io::Error),
}

/// What has been done so far, to undo in reverse.
#[derive(Default)]
struct Undo {
    /// Parent folders created, outermost first.
    parents: Vec<PathBuf>,
    /// The staging folder, once created (and while it holds the new files).
    staging: Option<PathBuf>,
    /// The swap, once done.
    swap: Option<Swap>,
}

enum Swap {
    /// The staging folder was renamed to DIR (there was none).
    Renamed,
    /// DIR and the staging folder were exchanged: the old folder is at the
    /// staging path.
    Exchanged,
    /// DIR was renamed to this path, then the staging folder to DIR.
    MovedAside(PathBuf),
    /// DIR was renamed to this path; the staging folder is still staged.
    AsideOnly(PathBuf),
}

impl Undo {
    /// Put everything back; errors here are ignored (nothing better can be
    /// done), but each step is tried.
    fn run(self, fs: &dyn Fs, dir: &Path) {
        if let Some(swap) = &self.swap {
            match swap {
                Swap::Renamed => {
                    if let Some(s) = &self.staging {
                        let _ = fs.rename(dir, s);
                    }
                }
                Swap::Exchanged => {
                    if let Some(s) = &self.staging {
                        let _ = fs.exchange(dir, s);
                    }
                }
                Swap::MovedAside(old) => {
                    if let Some(s) = &self.staging {
                        let _ = fs.rename(dir, s);
                    }
                    let _ = fs.rename(old, dir);
                }
                Swap::AsideOnly(old) => {
                    let _ = fs.rename(old, dir);
                }
            }
        }
        if let Some(s) = &self.staging {
            let _ = fs.remove_all(s);
        }
        for p in self.parents.iter().rev() {
            let _ = fs.remove_dir(p);
        }
    }
}

/// The writer with its file system and interrupt check given (see the
/// module documentation for the steps).
pub(crate) fn write_with(
    fs: &dyn Fs,
    stop: &dyn Fn() -> bool,
    dir: &Path,
    force: bool,
    files: &[(&str, Vec<u8>)],
) -> Result<Done> {
    let shown = dir.display().to_string();
    let Some(name) = dir.file_name().map(OsString::from) else {
        bail!("`--out` = {shown}: name a folder (not `..` or a root)");
    };
    let parent = match dir.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let exists = check_target(dir, force, files, &shown)?;
    let mut undo = Undo::default();
    match steps(fs, stop, dir, &parent, &name, exists, files, &mut undo) {
        Ok(old) => Ok(match old {
            Some(old) => match fs.remove_all(&old) {
                Ok(()) => Done::Clean,
                Err(e) => Done::OldLeft(old, e),
            },
            None => Done::Clean,
        }),
        Err(e) => {
            undo.run(fs, dir);
            Err(e)
        }
    }
}

/// Whether DIR exists, after refusing what must not be replaced.
fn check_target(dir: &Path, force: bool, files: &[(&str, Vec<u8>)], shown: &str) -> Result<bool> {
    let meta = match std::fs::symlink_metadata(dir) {
        Ok(m) => m,
        Err(e) if e.kind() == io::ErrorKind::NotFound => return Ok(false),
        Err(e) => return Err(e).with_context(|| format!("`--out` = {shown}")),
    };
    if meta.file_type().is_symlink() {
        bail!("`--out` = {shown}: is a symbolic link; give the folder itself");
    }
    if !meta.is_dir() {
        bail!("`--out` = {shown}: exists and is not a folder");
    }
    if !force {
        bail!("`--out` = {shown}: already exists; pass --force to replace it");
    }
    let entries = std::fs::read_dir(dir).with_context(|| format!("`--out` = {shown}"))?;
    for entry in entries {
        let entry = entry.with_context(|| format!("`--out` = {shown}"))?;
        let fname = entry.file_name().to_string_lossy().into_owned();
        let plain = entry.file_type().is_ok_and(|t| t.is_file());
        let ours = is_product(&fname) || files.iter().any(|(n, _)| *n == fname);
        if !plain || !ours {
            bail!(
                "`--out` = {shown}: holds `{fname}`, which gatewright did not write; \
                 --force replaces only a folder of gatewright's files \
                 (move it, or choose another --out)"
            );
        }
    }
    Ok(true)
}

/// Steps 1 to 6; returns the old folder's path to remove, if any.
#[allow(clippy::too_many_arguments)]
fn steps(
    fs: &dyn Fs,
    stop: &dyn Fn() -> bool,
    dir: &Path,
    parent: &Path,
    name: &OsString,
    exists: bool,
    files: &[(&str, Vec<u8>)],
    undo: &mut Undo,
) -> Result<Option<PathBuf>> {
    let shown = dir.display().to_string();
    let check = |undo_point: &str| -> Result<()> {
        if stop() {
            return Err(Interrupted(shown.clone()))
                .with_context(|| format!("`--out` = {shown}: {undo_point}"));
        }
        Ok(())
    };
    // 1. Missing parents, outermost first.
    let mut missing: Vec<PathBuf> = parent
        .ancestors()
        .take_while(|a| !a.as_os_str().is_empty() && std::fs::symlink_metadata(a).is_err())
        .map(Path::to_path_buf)
        .collect();
    missing.reverse();
    for p in missing {
        fs.create_dir(&p)
            .with_context(|| format!("`--out` = {shown}: creating `{}`", p.display()))?;
        undo.parents.push(p);
        check("creating its parent folders")?;
    }
    // 2. A fresh staging folder; a stale one of a killed run goes first.
    remove_stale(parent, name);
    let staging = fresh_staging(fs, parent, name)
        .with_context(|| format!("`--out` = {shown}: creating a staging folder beside it"))?;
    undo.staging = Some(staging.clone());
    check("staging")?;
    // 3. Every file, synced.
    for (fname, bytes) in files {
        let p = staging.join(fname);
        fs.write_file(&p, bytes)
            .with_context(|| format!("`--out` = {shown}: writing `{}`", p.display()))?;
        check("writing the files")?;
    }
    // 4. The staging folder's names.
    fs.sync_dir(&staging)
        .with_context(|| format!("`--out` = {shown}: syncing `{}`", staging.display()))?;
    check("syncing")?;
    // 5. Into place.
    let old = if exists {
        match fs.exchange(&staging, dir) {
            Ok(()) => {
                undo.swap = Some(Swap::Exchanged);
                Some(staging.clone())
            }
            Err(e) if e.kind() == io::ErrorKind::Unsupported => {
                let aside = aside_path(&staging);
                fs.rename(dir, &aside)
                    .with_context(|| format!("`--out` = {shown}: moving the old folder aside"))?;
                undo.swap = Some(Swap::AsideOnly(aside.clone()));
                check("replacing the old folder")?;
                fs.rename(&staging, dir)
                    .with_context(|| format!("`--out` = {shown}: moving the new folder in"))?;
                undo.swap = Some(Swap::MovedAside(aside.clone()));
                Some(aside)
            }
            Err(e) => {
                return Err(e)
                    .with_context(|| format!("`--out` = {shown}: exchanging the new folder in"))
            }
        }
    } else {
        fs.rename(&staging, dir)
            .with_context(|| format!("`--out` = {shown}: moving the new folder in"))?;
        undo.swap = Some(Swap::Renamed);
        None
    };
    check("putting the new folder in place")?;
    // 6. The parent's names: the new folder is now on the disk.
    fs.sync_dir(parent)
        .with_context(|| format!("`--out` = {shown}: syncing `{}`", parent.display()))?;
    check("syncing its parent folder")?;
    Ok(old)
}

/// The staging-name prefix of `name`: `.NAME.gatewright-`.
fn staging_prefix(name: &OsString) -> String {
    format!(".{}.gatewright-", name.to_string_lossy())
}

/// Create `.NAME.gatewright-PID-N` beside DIR with the first N free.
fn fresh_staging(fs: &dyn Fs, parent: &Path, name: &OsString) -> io::Result<PathBuf> {
    let pid = std::process::id();
    let mut last = io::Error::other("no free staging name");
    for n in 0..100 {
        let p = parent.join(format!("{}{pid}-{n}", staging_prefix(name)));
        match fs.create_dir(&p) {
            Ok(()) => return Ok(p),
            Err(e) if e.kind() == io::ErrorKind::AlreadyExists => last = e,
            Err(e) => return Err(e),
        }
    }
    Err(last)
}

/// Where the old folder goes when it cannot be exchanged: the staging
/// name with `.old`.
fn aside_path(staging: &Path) -> PathBuf {
    let mut s = staging.as_os_str().to_os_string();
    s.push(".old");
    PathBuf::from(s)
}

/// Remove staging folders of DIR left by runs that no longer exist (their
/// process id is not running). Only where the system lists its processes
/// under `/proc`; elsewhere they stay (and are harmless).
fn remove_stale(parent: &Path, name: &OsString) {
    if !Path::new("/proc/self").exists() {
        return;
    }
    let prefix = staging_prefix(name);
    let Ok(entries) = std::fs::read_dir(parent) else {
        return;
    };
    for entry in entries.flatten() {
        let fname = entry.file_name().to_string_lossy().into_owned();
        let Some(rest) = fname.strip_prefix(&prefix) else {
            continue;
        };
        let Some(pid) = rest.split('-').next().and_then(|p| p.parse::<u32>().ok()) else {
            continue;
        };
        let alive = Path::new("/proc").join(pid.to_string()).exists();
        if !alive && entry.file_type().is_ok_and(|t| t.is_dir()) {
            let _ = std::fs::remove_dir_all(entry.path());
        }
    }
}

#[cfg(test)]
mod tests;

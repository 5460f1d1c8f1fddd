//! One run's output files, committed together or not at all.
//!
//! Every command writes its files through an [`OutputSet`]:
//!
//! 1. [`OutputSet::begin`], before any work: the folders are created, every target is checked
//!    (not a folder, not an input of the run), each folder is locked against a second run
//!    (`.neckline.lock`, waiting up to [`LOCK_WAIT`], then refused naming the other run's
//!    pid), temporaries left by dead runs are removed, and a staging folder
//!    `.neckline-stage.PID.N` is made beside the targets. A folder that cannot be written fails
//!    here, before anything is written anywhere.
//! 2. [`OutputSet::create`] / [`OutputSet::write`] / [`OutputSet::staged`]: each file is
//!    written into the staging folder.
//! 3. [`OutputSet::commit`]: a target that is not a regular file (a device, a FIFO) is written
//!    through (opened and written, never replaced); then the older files are moved aside into
//!    `.neckline-old.PID.N` and the staged ones renamed in (renames within one file system).
//!    Any failure moves everything back: the older set stays whole. In the main output folder,
//!    older outputs of the same command that this run did not write are removed too (when
//!    the run writes into that folder), so that a folder never holds files of two runs.
//!
//! Dropped without a commit (an error, a panic), the set removes its staging folders and
//! releases its locks; on SIGINT or SIGTERM, [`crate::interrupt`] does the same through
//! [`stop_all`]. After SIGKILL the staging folder stays until the next run into that folder
//! takes the lock and removes it.

use neckline_core::error::{Error, Result};
use neckline_core::output::guard_inputs;
use sha2::{Digest, Sha256};
use std::fs::{self, File, OpenOptions};
use std::io::{BufWriter, Read, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};
use std::sync::Mutex;
use std::time::{Duration, Instant};

/// The lock file in each output folder while a run writes into it.
pub const LOCK_NAME: &str = ".neckline.lock";
/// How long a run waits for another run's lock on a folder before it refuses.
pub const LOCK_WAIT: Duration = Duration::from_secs(3);
/// The prefix of a staging folder (`.neckline-stage.PID.N`).
const STAGE_PREFIX: &str = ".neckline-stage.";
/// The prefix of the folder the older files are moved into during a commit.
const OLD_PREFIX: &str = ".neckline-old.";

/// Paths to remove if the run is stopped by a signal, by set; `stopping` once a signal came.
struct Live {
    sets: Vec<(u64, Vec<PathBuf>)>,
    stopping: bool,
}

static LIVE: Mutex<Live> = Mutex::new(Live {
    sets: Vec::new(),
    stopping: false,
});
static NEXT: AtomicU64 = AtomicU64::new(0);

fn live() -> std::sync::MutexGuard<'static, Live> {
    LIVE.lock().unwrap_or_else(|p| p.into_inner())
}

/// Stop every set of this process: no new staging folder or commit starts, and every staging
/// folder and lock file is removed. Returns whether any set was unfinished. Waits for a
/// commit in progress to end (a commit is never left half done by a signal).
pub fn stop_all() -> bool {
    let mut l = live();
    l.stopping = true;
    let any = !l.sets.is_empty();
    for (_, paths) in l.sets.drain(..) {
        for p in paths {
            remove_any(&p);
        }
    }
    any
}

/// Remove a file or a folder with its contents (a few tries: a file may be appearing in it).
fn remove_any(p: &Path) {
    for _ in 0..3 {
        let r = match fs::symlink_metadata(p) {
            Ok(m) if m.is_dir() => fs::remove_dir_all(p),
            Ok(_) => fs::remove_file(p),
            Err(_) => return,
        };
        if r.is_ok() {
            return;
        }
    }
}

fn interrupted() -> Error {
    Error::Usage("stopped by a signal before the outputs were moved in".into())
}

/// A folder the set writes into: locked, with its staging folder.
struct Folder {
    dir: PathBuf,
    stage: PathBuf,
    _lock: Lock,
}

/// One target file.
struct Target {
    path: PathBuf,
    staged: PathBuf,
    /// Not a regular file (a device, a FIFO): written through at commit, never replaced.
    through: bool,
    /// Written into the staging folder (in the order of `order`).
    written: bool,
}

/// What a commit did.
#[derive(Debug, Default)]
pub struct Committed {
    /// The targets written, in the order they were staged.
    pub written: Vec<PathBuf>,
    /// Older outputs in the main folder that this run did not write, removed.
    pub removed: Vec<PathBuf>,
}

/// The files of one run: staged beside their targets and moved in together.
pub struct OutputSet {
    id: u64,
    inputs: Vec<PathBuf>,
    folders: Vec<Folder>,
    targets: Vec<Target>,
    /// Indices into `targets` in the order they were written.
    order: Vec<usize>,
    /// The main output folder and the names of this command's outputs in it.
    own: Option<(PathBuf, &'static [&'static str])>,
    /// A staging folder outside any target folder, for written-through targets only.
    spill: Option<PathBuf>,
    /// Folders this set made, deepest first: removed again (when empty) if it is not committed.
    made: Vec<PathBuf>,
}

/// Which older files a commit removes from the main output folder.
#[derive(Debug, Clone, Copy)]
pub struct Own<'a> {
    /// The main output folder.
    pub dir: &'a Path,
    /// Every file name the command may write into it.
    pub names: &'static [&'static str],
}

impl OutputSet {
    /// Start a set that will write `targets` (files; none is standard output). With `own`, a
    /// commit also removes the files named there that this run did not write. Fails, having
    /// written nothing, when a target is a folder or an input, when a folder cannot be made or
    /// written, or when another run holds a folder past [`LOCK_WAIT`].
    pub fn begin(targets: &[&Path], own: Option<Own<'_>>, inputs: &[PathBuf]) -> Result<Self> {
        let id = NEXT.fetch_add(1, Ordering::Relaxed);
        let mut set = OutputSet {
            id,
            inputs: inputs.to_vec(),
            folders: Vec::new(),
            targets: Vec::new(),
            order: Vec::new(),
            own: own.map(|o| (o.dir.to_path_buf(), o.names)),
            spill: None,
            made: Vec::new(),
        };
        live().sets.push((id, Vec::new()));
        let mut through = Vec::new();
        for &t in targets {
            if set.targets.iter().any(|x| x.path == t) {
                continue;
            }
            guard_inputs(t, inputs)?;
            let dir = folder_of(t);
            if dir.exists() && !dir.is_dir() {
                return Err(Error::Usage(format!(
                    "cannot write {}: {} is a file, not a folder; choose another output path",
                    t.display(),
                    dir.display()
                )));
            }
            match fs::metadata(t) {
                Ok(m) if m.is_dir() => {
                    return Err(Error::Usage(format!(
                        "cannot write {}: it is a folder",
                        t.display()
                    )))
                }
                Ok(m) if !m.is_file() => {
                    through.push(t.to_path_buf());
                    continue;
                }
                _ => {}
            }
            let k = set.folder(&dir)?;
            let name = t.file_name().unwrap_or(t.as_os_str());
            set.targets.push(Target {
                path: t.to_path_buf(),
                staged: set.folders[k].stage.join(name),
                through: false,
                written: false,
            });
        }
        for (k, t) in through.into_iter().enumerate() {
            let stage = match set.folders.first() {
                Some(f) => f.stage.clone(),
                None => set.spill_dir()?,
            };
            let name = t.file_name().unwrap_or(t.as_os_str()).to_string_lossy();
            set.targets.push(Target {
                staged: stage.join(format!("through-{k}-{name}")),
                path: t,
                through: true,
                written: false,
            });
        }
        Ok(set)
    }

    /// Lock `dir` (made if missing), clear dead runs' temporaries and make its staging folder.
    fn folder(&mut self, dir: &Path) -> Result<usize> {
        if let Some(k) = self.folders.iter().position(|f| f.dir == dir) {
            return Ok(k);
        }
        let shown = if dir.as_os_str().is_empty() {
            Path::new(".")
        } else {
            dir
        };
        let missing: Vec<PathBuf> = shown
            .ancestors()
            .take_while(|a| !a.as_os_str().is_empty() && !a.exists())
            .map(Path::to_path_buf)
            .collect();
        fs::create_dir_all(shown).map_err(|e| Error::io(shown, e))?;
        self.made.extend(missing);
        let lock = Lock::take(shown, self.id)?;
        remove_stale(shown);
        let stage = shown.join(format!("{STAGE_PREFIX}{}.{}", std::process::id(), self.id));
        self.make_stage(&stage)?;
        self.folders.push(Folder {
            dir: dir.to_path_buf(),
            stage,
            _lock: lock,
        });
        Ok(self.folders.len() - 1)
    }

    /// A staging folder in the system's temporary folder, for written-through targets alone.
    fn spill_dir(&mut self) -> Result<PathBuf> {
        if let Some(s) = &self.spill {
            return Ok(s.clone());
        }
        let stage =
            std::env::temp_dir().join(format!("{STAGE_PREFIX}{}.{}", std::process::id(), self.id));
        self.make_stage(&stage)?;
        self.spill = Some(stage.clone());
        Ok(stage)
    }

    /// Make a staging folder, registered for removal on a signal (refused once one came).
    fn make_stage(&self, stage: &Path) -> Result<()> {
        let mut l = live();
        if l.stopping {
            return Err(interrupted());
        }
        fs::create_dir(stage).map_err(|e| {
            let dir = stage.parent().unwrap_or(stage);
            Error::Usage(format!(
                "cannot write into {}: {e}; nothing was written",
                dir.display()
            ))
        })?;
        if let Some((_, paths)) = l.sets.iter_mut().find(|(i, _)| *i == self.id) {
            paths.push(stage.to_path_buf());
        }
        Ok(())
    }

    /// Refuse every target that is one of `more` inputs, and never remove them.
    pub fn add_inputs(&mut self, more: &[PathBuf]) -> Result<()> {
        for t in &self.targets {
            guard_inputs(&t.path, more)?;
        }
        self.inputs.extend(more.iter().cloned());
        Ok(())
    }

    fn index(&self, target: &Path) -> Result<usize> {
        self.targets
            .iter()
            .position(|t| t.path == target)
            .ok_or_else(|| {
                Error::Usage(format!(
                    "{} was not planned as an output of this run",
                    target.display()
                ))
            })
    }

    /// Where `target`'s content is written before the commit (marked as written).
    pub fn staged(&mut self, target: &Path) -> Result<PathBuf> {
        let k = self.index(target)?;
        if !self.targets[k].written {
            self.targets[k].written = true;
            self.order.push(k);
        }
        Ok(self.targets[k].staged.clone())
    }

    /// A staged file for `target`, hashed (SHA-256) as it is written.
    pub fn create(&mut self, target: &Path) -> Result<StagedFile> {
        let staged = self.staged(target)?;
        let f = File::create(&staged).map_err(|e| Error::io(target, e))?;
        Ok(StagedFile {
            target: target.to_path_buf(),
            writer: BufWriter::with_capacity(1 << 20, f),
            hash: Sha256::new(),
        })
    }

    /// Stage `bytes` as `target`.
    pub fn write(&mut self, target: &Path, bytes: &[u8]) -> Result<()> {
        let mut f = self.create(target)?;
        f.write_all(bytes).map_err(|e| Error::io(target, e))?;
        f.finish()?;
        Ok(())
    }

    /// Move the staged files in: every one or none. Written-through targets are written first
    /// (a failure there moves nothing in); then, in each folder, the older files are moved
    /// aside and the new ones renamed in, all undone on a failure.
    pub fn commit(mut self) -> Result<Committed> {
        for &k in &self.order {
            let t = &self.targets[k];
            if t.through {
                write_through(&t.staged, &t.path)?;
            }
        }
        let mut l = live();
        if l.stopping {
            return Err(interrupted());
        }
        let removed = self.older_outputs();
        let mut aside: Vec<(PathBuf, PathBuf)> = Vec::new();
        let mut placed: Vec<(PathBuf, PathBuf)> = Vec::new();
        let mut olds: Vec<PathBuf> = Vec::new();
        let result = self.swap(&removed, &mut aside, &mut placed, &mut olds);
        if let Err(e) = result {
            for (staged, target) in placed.iter().rev() {
                let _ = fs::rename(target, staged);
            }
            for (target, old) in aside.iter().rev() {
                let _ = fs::rename(old, target);
            }
            for o in &olds {
                let _ = fs::remove_dir_all(o);
            }
            return Err(e);
        }
        for o in &olds {
            let _ = fs::remove_dir_all(o);
        }
        let written = self
            .order
            .iter()
            .map(|&k| self.targets[k].path.clone())
            .collect();
        self.made.clear();
        self.cleanup(&mut l);
        Ok(Committed { written, removed })
    }

    /// Older outputs of this command in the main folder, not written by this run.
    fn older_outputs(&self) -> Vec<PathBuf> {
        let Some((dir, names)) = &self.own else {
            return Vec::new();
        };
        let receives = self
            .order
            .iter()
            .any(|&k| !self.targets[k].through && &folder_of(&self.targets[k].path) == dir);
        if !receives {
            return Vec::new();
        }
        names
            .iter()
            .map(|n| dir.join(n))
            .filter(|p| {
                !self
                    .order
                    .iter()
                    .any(|&k| same_path(&self.targets[k].path, p))
                    && fs::symlink_metadata(p).is_ok_and(|m| !m.is_dir())
                    && fs::metadata(p).is_ok_and(|m| m.is_file())
                    && guard_inputs(p, &self.inputs).is_ok()
            })
            .collect()
    }

    /// The renames of a commit, recorded so that they can be undone.
    fn swap(
        &self,
        removed: &[PathBuf],
        aside: &mut Vec<(PathBuf, PathBuf)>,
        placed: &mut Vec<(PathBuf, PathBuf)>,
        olds: &mut Vec<PathBuf>,
    ) -> Result<()> {
        let regular: Vec<&Target> = self
            .order
            .iter()
            .map(|&k| &self.targets[k])
            .filter(|t| !t.through)
            .collect();
        for t in &regular {
            if fs::symlink_metadata(&t.path).is_ok_and(|m| m.is_dir()) {
                return Err(Error::Usage(format!(
                    "cannot write {}: it is a folder",
                    t.path.display()
                )));
            }
        }
        let existing = regular
            .iter()
            .map(|t| t.path.clone())
            .filter(|p| fs::symlink_metadata(p).is_ok())
            .chain(removed.iter().cloned());
        for target in existing {
            let dir = folder_of(&target);
            let old = if dir.as_os_str().is_empty() {
                PathBuf::from(format!("{OLD_PREFIX}{}.{}", std::process::id(), self.id))
            } else {
                dir.join(format!("{OLD_PREFIX}{}.{}", std::process::id(), self.id))
            };
            if !olds.contains(&old) {
                fs::create_dir(&old).map_err(|e| Error::io(&dir, e))?;
                olds.push(old.clone());
            }
            let to = old.join(aside.len().to_string());
            fs::rename(&target, &to).map_err(|e| Error::io(&target, e))?;
            aside.push((target, to));
        }
        for t in regular {
            fs::rename(&t.staged, &t.path).map_err(|e| Error::io(&t.path, e))?;
            placed.push((t.staged.clone(), t.path.clone()));
        }
        Ok(())
    }

    /// Remove the staging folders and forget the set (locks are released when dropped).
    fn cleanup(&mut self, l: &mut Live) {
        for f in &self.folders {
            let _ = fs::remove_dir_all(&f.stage);
        }
        if let Some(s) = &self.spill {
            let _ = fs::remove_dir_all(s);
        }
        l.sets.retain(|(i, _)| *i != self.id);
        self.spill = None;
        self.folders.clear();
        for d in self.made.drain(..) {
            let _ = fs::remove_dir(d);
        }
    }
}

impl Drop for OutputSet {
    fn drop(&mut self) {
        let mut l = live();
        self.cleanup(&mut l);
    }
}

/// The folder of a path (`""` for a bare file name).
fn folder_of(p: &Path) -> PathBuf {
    p.parent().map(Path::to_path_buf).unwrap_or_default()
}

fn same_path(a: &Path, b: &Path) -> bool {
    a == b
        || matches!(
            (fs::canonicalize(a), fs::canonicalize(b)),
            (Ok(x), Ok(y)) if x == y
        )
}

/// Copy a staged file into a target that is not a regular file (opened for writing, never
/// created, truncated or replaced).
fn write_through(staged: &Path, target: &Path) -> Result<()> {
    let mut from = File::open(staged).map_err(|e| Error::io(target, e))?;
    let mut to = OpenOptions::new()
        .write(true)
        .open(target)
        .map_err(|e| Error::io(target, e))?;
    std::io::copy(&mut from, &mut to)
        .and_then(|_| to.flush())
        .map_err(|e| Error::io(target, e))?;
    Ok(())
}

/// A staged output being written, hashed as it goes; [`StagedFile::finish`] flushes and syncs
/// it and gives its SHA-256. Dropped unfinished, it stays in the staging folder, which the set
/// removes.
pub struct StagedFile {
    target: PathBuf,
    writer: BufWriter<File>,
    hash: Sha256,
}

impl StagedFile {
    /// The target this file will become.
    pub fn target(&self) -> &Path {
        &self.target
    }

    /// Flush and sync; the SHA-256 of everything written, as lowercase hex.
    pub fn finish(self) -> Result<String> {
        let target = self.target;
        self.writer
            .into_inner()
            .map_err(|e| e.into_error())
            .and_then(|f| f.sync_all())
            .map_err(|e| Error::io(&target, e))?;
        Ok(hex(&self.hash.finalize()))
    }
}

impl Write for StagedFile {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        let n = self.writer.write(buf)?;
        self.hash.update(&buf[..n]);
        Ok(n)
    }
    fn write_all(&mut self, buf: &[u8]) -> std::io::Result<()> {
        self.writer.write_all(buf)?;
        self.hash.update(buf);
        Ok(())
    }
    fn flush(&mut self) -> std::io::Result<()> {
        self.writer.flush()
    }
}

/// Bytes as lowercase hex.
fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// The SHA-256 of a file's bytes, as lowercase hex.
pub fn sha256_of(path: &Path) -> std::io::Result<String> {
    let mut f = File::open(path)?;
    let mut h = Sha256::new();
    let mut buf = vec![0u8; 1 << 16];
    loop {
        let n = f.read(&mut buf)?;
        if n == 0 {
            break;
        }
        h.update(&buf[..n]);
    }
    Ok(hex(&h.finalize()))
}

/// A folder's lock: `.neckline.lock`, locked (`flock`) for as long as the run writes into the
/// folder and holding its pid; removed when released. The kernel drops the lock of a run that
/// dies, so a killed run never keeps a folder locked.
struct Lock {
    path: PathBuf,
    file: Option<File>,
}

impl Lock {
    fn take(dir: &Path, set: u64) -> Result<Lock> {
        let path = dir.join(LOCK_NAME);
        let deadline = Instant::now() + LOCK_WAIT;
        loop {
            let file = OpenOptions::new()
                .read(true)
                .write(true)
                .create(true)
                .truncate(false)
                .open(&path)
                .map_err(|e| {
                    Error::Usage(format!(
                        "cannot write into {}: {e}; nothing was written",
                        dir.display()
                    ))
                })?;
            match file.try_lock() {
                Ok(()) if same_file(&file, &path) => {
                    let mut file = file;
                    let _ = file.set_len(0);
                    let _ = writeln!(file, "{}", std::process::id());
                    if let Some((_, paths)) = live().sets.iter_mut().find(|(i, _)| *i == set) {
                        paths.push(path.clone());
                    }
                    return Ok(Lock {
                        path,
                        file: Some(file),
                    });
                }
                // The run that held it removed the file meanwhile: lock the one there now.
                Ok(()) => continue,
                Err(fs::TryLockError::WouldBlock) if Instant::now() < deadline => {
                    std::thread::sleep(Duration::from_millis(40));
                }
                Err(fs::TryLockError::WouldBlock) => {
                    let pid = fs::read_to_string(&path).unwrap_or_default();
                    let pid = match pid.trim() {
                        "" => "pid not known yet".to_string(),
                        p => format!("pid {p}"),
                    };
                    return Err(Error::Usage(format!(
                        "{} is being written by another neckline run ({pid}); waited {} s. \
                         Let it finish, or choose another output folder",
                        dir.display(),
                        LOCK_WAIT.as_secs()
                    )));
                }
                Err(fs::TryLockError::Error(e)) => return Err(Error::io(&path, e)),
            }
        }
    }
}

impl Drop for Lock {
    fn drop(&mut self) {
        // Removed while still locked, so that a run waiting on it retries on a fresh file.
        let _ = fs::remove_file(&self.path);
        self.file.take();
    }
}

/// Whether the open `file` is the one now at `path` (not removed or replaced meanwhile).
fn same_file(file: &File, path: &Path) -> bool {
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        match (file.metadata(), fs::metadata(path)) {
            (Ok(a), Ok(b)) => a.dev() == b.dev() && a.ino() == b.ino(),
            _ => false,
        }
    }
    #[cfg(not(unix))]
    {
        let _ = (file, path);
        true
    }
}

/// The pid in a temporary's name: `.neckline-stage.PID.N`, `.neckline-old.PID.N`, or an
/// earlier version's `.NAME.PID.tmp`.
fn pid_of_temporary(name: &str) -> Option<u32> {
    if let Some(rest) = name
        .strip_prefix(STAGE_PREFIX)
        .or_else(|| name.strip_prefix(OLD_PREFIX))
    {
        return rest.split('.').next()?.parse().ok();
    }
    let rest = name.strip_prefix('.')?.strip_suffix(".tmp")?;
    rest.rsplit('.').next()?.parse().ok()
}

/// Remove the temporaries in `dir` left by runs that are no longer alive (called with the
/// folder's lock held, so no live run is writing them).
fn remove_stale(dir: &Path) {
    let Ok(entries) = fs::read_dir(dir) else {
        return;
    };
    for e in entries.flatten() {
        let name = e.file_name().to_string_lossy().into_owned();
        if let Some(pid) = pid_of_temporary(&name) {
            if pid != std::process::id() && !alive(pid) {
                remove_any(&e.path());
            }
        }
    }
}

/// Whether a process `pid` exists (signal 0 probes without sending; EPERM = exists, owned by
/// another user: POSIX kill(2)).
#[cfg(unix)]
fn alive(pid: u32) -> bool {
    let Ok(p) = libc::pid_t::try_from(pid) else {
        return true;
    };
    if p <= 0 {
        return true;
    }
    // SAFETY: kill with signal 0 sends nothing; it only checks that the process exists.
    let r = unsafe { libc::kill(p, 0) };
    r == 0 || std::io::Error::last_os_error().raw_os_error() == Some(libc::EPERM)
}

/// Elsewhere a pid cannot be probed here: a temporary is kept.
#[cfg(not(unix))]
fn alive(_pid: u32) -> bool {
    true
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    #[test]
    fn temporaries_are_named_by_their_pid() {
        assert_eq!(pid_of_temporary(".neckline-stage.123.0"), Some(123));
        assert_eq!(pid_of_temporary(".neckline-old.77.4"), Some(77));
        assert_eq!(pid_of_temporary(".points.csv.4242.tmp"), Some(4242));
        assert_eq!(pid_of_temporary("points.csv"), None);
        assert_eq!(pid_of_temporary(".points.xlsx.part"), None);
    }

    #[test]
    fn a_commit_replaces_the_set_and_removes_older_outputs() {
        const NAMES: &[&str] = &["a.txt", "b.txt", "c.txt"];
        let d = tempfile::tempdir().unwrap();
        for n in NAMES {
            fs::write(d.path().join(n), "old").unwrap();
        }
        fs::write(d.path().join("mine.txt"), "user's").unwrap();
        let a = d.path().join("a.txt");
        let own = Own {
            dir: d.path(),
            names: NAMES,
        };
        let mut set = OutputSet::begin(&[&a], Some(own), &[]).unwrap();
        set.write(&a, b"new").unwrap();
        assert_eq!(
            fs::read_to_string(&a).unwrap(),
            "old",
            "not before the commit"
        );
        let done = set.commit().unwrap();
        assert_eq!(done.written, vec![a.clone()]);
        assert_eq!(done.removed.len(), 2);
        assert_eq!(fs::read_to_string(&a).unwrap(), "new");
        assert_eq!(names(d.path()), ["a.txt", "mine.txt"]);
    }

    #[test]
    fn a_failed_commit_moves_everything_back() {
        let d = tempfile::tempdir().unwrap();
        let (one, two) = (d.path().join("one"), d.path().join("two"));
        fs::create_dir(&one).unwrap();
        fs::create_dir(&two).unwrap();
        let (a, b) = (one.join("a.txt"), two.join("b.txt"));
        fs::write(&a, "old a").unwrap();
        fs::write(&b, "old b").unwrap();
        let mut set = OutputSet::begin(&[&a, &b], None, &[]).unwrap();
        set.write(&a, b"new a").unwrap();
        set.write(&b, b"new b").unwrap();
        // The second folder's staged file vanishes: its rename fails after the first one's.
        fs::remove_file(set.staged(&b).unwrap()).unwrap();
        assert!(set.commit().is_err());
        assert_eq!(fs::read_to_string(&a).unwrap(), "old a");
        assert_eq!(fs::read_to_string(&b).unwrap(), "old b");
        assert_eq!(names(&one), ["a.txt"]);
        assert_eq!(names(&two), ["b.txt"]);
    }

    #[test]
    fn a_dropped_set_leaves_nothing() {
        let d = tempfile::tempdir().unwrap();
        let a = d.path().join("new").join("a.txt");
        let mut set = OutputSet::begin(&[&a], None, &[]).unwrap();
        set.write(&a, b"x").unwrap();
        drop(set);
        assert!(names(d.path()).is_empty(), "the folder it made, removed");
    }

    #[test]
    fn a_second_set_waits_for_the_folder_then_refuses_with_the_pid() {
        let d = tempfile::tempdir().unwrap();
        let a = d.path().join("a.txt");
        let first = OutputSet::begin(&[&a], None, &[]).unwrap();
        let start = Instant::now();
        let Err(e) = OutputSet::begin(&[&a], None, &[]) else {
            panic!("a second set into a locked folder");
        };
        assert!(start.elapsed() >= LOCK_WAIT);
        let pid = format!("pid {}", std::process::id());
        assert!(e.to_string().contains(&pid), "{e}");
        drop(first);
        assert!(names(d.path()).is_empty());
    }
}

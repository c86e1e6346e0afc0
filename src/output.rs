//! The one place that writes: standard output, or files written whole or not
//! at all.
//!
//! A run collects every output it makes (the report, `--plot`, `--emit-*`) in
//! an [`Outputs`] plan and writes them only once all are rendered. Before any
//! byte is written each target is checked:
//!
//! - it must not be an input of the run nor another output of it (same
//!   canonical path, or the same file by device and inode);
//! - it must be a regular file or not exist yet; a device, pipe or folder is
//!   refused (standard output is `-`, or no `-o` at all), and so is anything
//!   under `/dev` or `/proc`;
//! - a read-only file is refused, never replaced;
//! - a file with more than one hard link is refused: the rename that makes a
//!   write atomic would give this name a new file and leave the other names
//!   holding the old report;
//! - a symbolic link is written through: the file it points to is replaced
//!   (atomically, in that file's folder) and the link stays a link; a link
//!   whose file does not exist is refused.
//!
//! Then every file is written to a temporary file beside its target
//! (`.name.<pid>.<n>.tmp`), flushed and synced; only when all are written are
//! they renamed over their targets. On any error every temporary file is
//! removed; on SIGINT or SIGTERM [`remove_temporaries`] does the same.
//! Standard output comes last; a reader that closes the pipe early does not
//! change the run's exit status.

use std::collections::HashMap;
use std::fs::{self, File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, Mutex};

use anyhow::{anyhow, bail, Context, Result};
use serde::Serialize;

/// Temporary files this process has created and not yet renamed or removed.
static TEMPORARIES: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

/// Removes every temporary file still on disk (the SIGINT/SIGTERM handler
/// calls this before the process ends). The lock is kept, so no new temporary
/// file can be created after it returns.
pub fn remove_temporaries() -> std::sync::MutexGuard<'static, Vec<PathBuf>> {
    let mut list = TEMPORARIES.lock().unwrap_or_else(|p| p.into_inner());
    for p in list.drain(..) {
        let _ = fs::remove_file(&p);
    }
    list
}

/// A long computation's stop flag: the first SIGINT/SIGTERM sets it (when no
/// file is being written) instead of ending the process.
static STOP_FLAG: Mutex<Option<Arc<AtomicBool>>> = Mutex::new(None);

/// Asks that the next SIGINT or SIGTERM set `flag` rather than end the
/// process, so a long computation can stop by itself and say so; a second
/// signal ends the process as usual.
pub fn stop_on_interrupt(flag: Arc<AtomicBool>) {
    *STOP_FLAG.lock().unwrap_or_else(|p| p.into_inner()) = Some(flag);
}

/// What SIGINT/SIGTERM does: set the stop flag of a computation that asked
/// for one, once, while no file is being written; otherwise remove every
/// temporary file and end with `status`.
pub fn on_interrupt(status: i32) {
    let flag = STOP_FLAG.lock().unwrap_or_else(|p| p.into_inner()).take();
    if let Some(flag) = flag {
        let writing = !TEMPORARIES
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .is_empty();
        if !writing {
            flag.store(true, Ordering::Relaxed);
            return;
        }
    }
    let _held = remove_temporaries();
    std::process::exit(status);
}

fn forget_temporary(path: &Path) {
    let mut list = TEMPORARIES.lock().unwrap_or_else(|p| p.into_inner());
    list.retain(|p| p != path);
}

/// One file to write: the option that asked for it, the path given, the bytes.
struct Planned {
    option: &'static str,
    path: PathBuf,
    bytes: Vec<u8>,
}

/// Everything one run writes, held until the whole run has succeeded.
pub struct Outputs {
    inputs: Vec<PathBuf>,
    files: Vec<Planned>,
    stdout: Option<Vec<u8>>,
}

/// A checked target: the file to replace, and its identity.
struct Target {
    /// The path to rename onto (a link's file when the path is a symbolic link).
    real: PathBuf,
    /// Canonical path of the target (for a new file: its canonical folder and name).
    canonical: PathBuf,
    /// Device and inode when the file exists.
    id: Option<(u64, u64)>,
    /// Permissions to keep when an existing file is replaced.
    permissions: Option<fs::Permissions>,
}

impl Outputs {
    /// A plan for a run that read `inputs` (none of them may be overwritten).
    pub fn new(inputs: &[&Path]) -> Self {
        Outputs {
            inputs: inputs.iter().map(|p| p.to_path_buf()).collect(),
            files: Vec::new(),
            stdout: None,
        }
    }

    /// Adds a side output such as `--plot` (named by `option` in errors).
    pub fn file(&mut self, option: &'static str, path: &Path, bytes: Vec<u8>) {
        self.files.push(Planned {
            option,
            path: path.to_path_buf(),
            bytes,
        });
    }

    /// Adds the report: to `path` (`-o`), or to standard output when there
    /// is none or it is `-`.
    pub fn report(&mut self, path: Option<&Path>, bytes: Vec<u8>) {
        match path {
            Some(p) if p != Path::new("-") => self.file("-o", p, bytes),
            _ => self.stdout = Some(bytes),
        }
    }

    /// Checks every target, writes every file whole (or none) and then
    /// standard output.
    pub fn write(self) -> Result<()> {
        let inputs: Vec<(PathBuf, Option<(u64, u64)>)> = self
            .inputs
            .iter()
            .map(|p| {
                (
                    fs::canonicalize(p).unwrap_or_else(|_| p.clone()),
                    file_id(p),
                )
            })
            .collect();
        let mut targets = Vec::with_capacity(self.files.len());
        let mut seen: HashMap<PathBuf, &'static str> = HashMap::new();
        for f in &self.files {
            let t = check_target(f.option, &f.path)?;
            if let Some((input, _)) = inputs
                .iter()
                .find(|(c, id)| *c == t.canonical || (id.is_some() && *id == t.id))
            {
                bail!(
                    "{} '{}' is the input file '{}'; writing it would destroy the input: choose another name",
                    f.option,
                    f.path.display(),
                    input.display()
                );
            }
            if let Some(other) = seen.get(&t.canonical) {
                bail!(
                    "{} '{}' is also the file for {other}; one run writes each file once: give each output its own name",
                    f.option,
                    f.path.display()
                );
            }
            seen.insert(t.canonical.clone(), f.option);
            targets.push(t);
        }
        let mut written = Vec::with_capacity(targets.len());
        for (n, (f, t)) in self.files.iter().zip(&targets).enumerate() {
            match write_temporary(t, n, &f.bytes) {
                Ok(tmp) => written.push(tmp),
                Err(e) => {
                    for tmp in &written {
                        let _ = fs::remove_file(tmp);
                        forget_temporary(tmp);
                    }
                    return Err(e).with_context(|| format!("writing '{}'", f.path.display()));
                }
            }
        }
        for ((f, t), tmp) in self.files.iter().zip(&targets).zip(&written) {
            let renamed = fs::rename(tmp, &t.real);
            forget_temporary(tmp);
            if let Err(e) = renamed {
                let _ = fs::remove_file(tmp);
                return Err(e).with_context(|| format!("writing '{}'", f.path.display()));
            }
        }
        if let Some(bytes) = &self.stdout {
            write_stdout(bytes)?;
        }
        Ok(())
    }
}

/// Device and inode of an existing file.
#[cfg(unix)]
fn file_id(path: &Path) -> Option<(u64, u64)> {
    use std::os::unix::fs::MetadataExt;
    fs::metadata(path).ok().map(|m| (m.dev(), m.ino()))
}

#[cfg(not(unix))]
fn file_id(_path: &Path) -> Option<(u64, u64)> {
    None
}

#[cfg(unix)]
fn link_count(meta: &fs::Metadata) -> u64 {
    use std::os::unix::fs::MetadataExt;
    meta.nlink()
}

#[cfg(not(unix))]
fn link_count(_meta: &fs::Metadata) -> u64 {
    1
}

/// What kind of thing sits at a path that is not a regular file, in words.
fn kind_of(meta: &fs::Metadata) -> &'static str {
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        let t = meta.file_type();
        if t.is_char_device() || t.is_block_device() {
            return "a device";
        }
        if t.is_fifo() {
            return "a pipe";
        }
        if t.is_socket() {
            return "a socket";
        }
    }
    if meta.is_dir() {
        "a folder"
    } else {
        "not a regular file"
    }
}

/// Checks that `path` may be written by `option` (see the module doc).
fn check_target(option: &'static str, path: &Path) -> Result<Target> {
    let shown = path.display();
    let name = path
        .file_name()
        .ok_or_else(|| anyhow!("{option} '{shown}' names no file"))?;
    let absolute = std::env::current_dir().map_or_else(|_| path.to_path_buf(), |d| d.join(path));
    refuse_system_path(option, path, &absolute)?;
    let real = match fs::symlink_metadata(path) {
        Ok(m) if m.file_type().is_symlink() => fs::canonicalize(path).map_err(|_| {
            anyhow!(
                "{option} '{shown}' is a symbolic link to a file that does not exist; coldpass writes through a link only to an existing file: remove the link or create its file"
            )
        })?,
        Ok(_) => path.to_path_buf(),
        Err(e) if e.kind() == io::ErrorKind::NotFound => {
            let dir = folder_of(path);
            if !dir.is_dir() {
                bail!(
                    "{option} '{shown}': the folder '{}' does not exist",
                    dir.display()
                );
            }
            let canonical = fs::canonicalize(dir)
                .with_context(|| format!("{option} '{shown}'"))?
                .join(name);
            refuse_system_path(option, path, &canonical)?;
            return Ok(Target {
                real: path.to_path_buf(),
                canonical,
                id: None,
                permissions: None,
            });
        }
        Err(e) => return Err(e).with_context(|| format!("{option} '{shown}'")),
    };
    let canonical = fs::canonicalize(&real).unwrap_or_else(|_| real.clone());
    refuse_system_path(option, path, &canonical)?;
    let meta = fs::metadata(&real).with_context(|| format!("{option} '{shown}'"))?;
    if !meta.is_file() {
        bail!(
            "{option} '{shown}' is {}; coldpass writes reports to regular files only (for standard output give `-` or leave {option} out)",
            kind_of(&meta)
        );
    }
    if meta.permissions().readonly() {
        bail!(
            "{option} '{shown}' is read-only; coldpass does not replace it: make it writable or choose another name"
        );
    }
    if link_count(&meta) > 1 {
        bail!(
            "{option} '{shown}' has {} hard links; replacing it would leave the other names holding the old file: remove this name first or choose another",
            link_count(&meta)
        );
    }
    Ok(Target {
        id: file_id(&real),
        real,
        canonical,
        permissions: Some(meta.permissions()),
    })
}

/// Refuses the system's device and process folders whatever they hold.
fn refuse_system_path(option: &str, path: &Path, canonical: &Path) -> Result<()> {
    if canonical.starts_with("/dev") || canonical.starts_with("/proc") {
        bail!(
            "{option} '{}' is a system device or process file; coldpass writes reports to regular files only (for standard output give `-` or leave {option} out)",
            path.display()
        );
    }
    Ok(())
}

fn folder_of(path: &Path) -> &Path {
    match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    }
}

/// Writes `bytes` to a new temporary file beside the target, flushed and
/// synced, registered for removal on a signal; returns its path.
fn write_temporary(t: &Target, n: usize, bytes: &[u8]) -> Result<PathBuf> {
    let name = t.real.file_name().unwrap_or_default().to_string_lossy();
    let tmp = folder_of(&t.real).join(format!(".{name}.{}.{n}.tmp", std::process::id()));
    let mut file = {
        // Registered and created under the lock: the signal handler either
        // sees it or runs before it exists (and then the process ends).
        let mut list = TEMPORARIES.lock().unwrap_or_else(|p| p.into_inner());
        let file = OpenOptions::new().write(true).create_new(true).open(&tmp)?;
        list.push(tmp.clone());
        file
    };
    let result = (|| -> io::Result<()> {
        if let Some(perm) = &t.permissions {
            file.set_permissions(perm.clone())?;
        }
        file.write_all(bytes)?;
        file.sync_all()
    })();
    drop::<File>(file);
    if let Err(e) = result {
        let _ = fs::remove_file(&tmp);
        forget_temporary(&tmp);
        return Err(e.into());
    }
    Ok(tmp)
}

/// Writes to standard output; a reader that has gone (`| head`, `| true`)
/// is not an error, so the run keeps its own exit status.
fn write_stdout(bytes: &[u8]) -> Result<()> {
    let mut out = io::stdout().lock();
    match out.write_all(bytes).and_then(|()| out.flush()) {
        Err(e) if e.kind() == io::ErrorKind::BrokenPipe => Ok(()),
        other => Ok(other?),
    }
}

/// Whether an error is a broken pipe (`coldpass check x | head`).
pub fn is_broken_pipe(err: &anyhow::Error) -> bool {
    err.chain().any(|e| {
        e.downcast_ref::<io::Error>()
            .is_some_and(|io| io.kind() == io::ErrorKind::BrokenPipe)
    })
}

/// Writes `bytes` to a new file at `path`, refusing (with the path named) when
/// a file is already there: the check and the creation are one step
/// (`create_new`), so nothing is ever overwritten.
pub fn write_new_file(path: &Path, bytes: &[u8]) -> Result<()> {
    let mut f = std::fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(path)
        .with_context(|| format!("creating '{}'", path.display()))?;
    let result = f.write_all(bytes).and_then(|()| f.sync_all());
    if let Err(e) = result {
        let _ = std::fs::remove_file(path);
        return Err(e).with_context(|| format!("writing '{}'", path.display()));
    }
    Ok(())
}

/// Refuses a result holding a number that is not finite (an overflow or a
/// NaN): such a figure is not a result, and JSON would print it as `null`,
/// a table as `inf`. The error names the figure by its report key
/// (`passes[3].temperature_rise_c`).
pub fn ensure_finite<T: Serialize>(what: &str, value: &T) -> Result<()> {
    let tree = serde_yaml::to_value(value).context("checking the report's figures")?;
    if let Some((key, v)) = first_non_finite(&tree, String::new()) {
        bail!(
            "the {what}'s figure {key} came out as {v}, which is not a result: an input is too extreme for floating point (an overflow or a division by a tiny number); check the inputs that figure depends on"
        );
    }
    Ok(())
}

fn first_non_finite(v: &serde_yaml::Value, at: String) -> Option<(String, f64)> {
    use serde_yaml::Value;
    match v {
        Value::Number(n) => n.as_f64().filter(|x| !x.is_finite()).map(|x| (at, x)),
        Value::Sequence(items) => items
            .iter()
            .enumerate()
            .find_map(|(i, x)| first_non_finite(x, format!("{at}[{i}]"))),
        Value::Mapping(m) => m.iter().find_map(|(k, x)| {
            let k = k.as_str().map_or_else(|| format!("{k:?}"), str::to_string);
            let key = if at.is_empty() {
                k
            } else {
                format!("{at}.{k}")
            };
            first_non_finite(x, key)
        }),
        Value::Tagged(t) => first_non_finite(&t.value, at),
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_non_finite_figure_is_named() {
        #[derive(Serialize)]
        struct Row {
            power_kw: f64,
        }
        #[derive(Serialize)]
        struct Rep {
            passes: Vec<Row>,
        }
        let rep = Rep {
            passes: vec![
                Row { power_kw: 1.0 },
                Row {
                    power_kw: f64::INFINITY,
                },
            ],
        };
        let e = ensure_finite("report", &rep).unwrap_err().to_string();
        assert!(e.contains("passes[1].power_kw") && e.contains("inf"), "{e}");
        let ok = Rep {
            passes: vec![Row { power_kw: 2.0 }],
        };
        assert!(ensure_finite("report", &ok).is_ok());
    }
}

//! The one place that writes: standard output, or a file written whole
//! (a temporary file beside the target, then a rename) or not at all.

use std::io::{self, Write};
use std::path::Path;

use anyhow::{Context, Result};

/// Writes `bytes` to `path` atomically: a temporary file in the same folder,
/// flushed and synced, then renamed over the target. On any error the
/// temporary file is removed and the target is left as it was.
pub fn write_file(path: &Path, bytes: &[u8]) -> Result<()> {
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let name = path
        .file_name()
        .with_context(|| format!("'{}' names no file", path.display()))?;
    let tmp = dir.join(format!(
        ".{}.{}.tmp",
        name.to_string_lossy(),
        std::process::id()
    ));
    let result = (|| -> io::Result<()> {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = std::fs::remove_file(&tmp);
        return Err(e).with_context(|| format!("writing '{}'", path.display()));
    }
    Ok(())
}

/// Writes the report to `path`, or to standard output when there is none
/// or it is `-`.
pub fn emit(path: Option<&Path>, bytes: &[u8]) -> Result<()> {
    match path {
        Some(p) if p != Path::new("-") => write_file(p, bytes),
        _ => {
            let mut out = io::stdout().lock();
            out.write_all(bytes)?;
            out.flush()?;
            Ok(())
        }
    }
}

/// Reads a whole input file, naming it in the error.
pub fn read_to_string(path: &Path) -> Result<String> {
    std::fs::read_to_string(path).with_context(|| format!("reading '{}'", path.display()))
}

/// Whether an error is a broken pipe (`coldpass check x | head`), which ends quietly.
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

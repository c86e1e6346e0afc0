//! The one place that reads input files, with a bound on how much.
//!
//! A file is read only up to [`MAX_INPUT_BYTES`]: a regular file's size is
//! checked before any byte is read; anything else (a pipe, a device such as
//! `/dev/zero` or `/dev/urandom`, a process substitution) is read through a
//! bounded reader that stops one byte past the limit. Text is all that is
//! read, so a NUL byte or bytes that are not UTF-8 end the read with an error
//! that says the file is not text, without echoing it.

use std::fs::File;
use std::io::{self, Read};
use std::path::Path;

use anyhow::{bail, Context, Result};

/// Largest input file coldpass reads, bytes (16 MiB). A schedule is a few
/// kilobytes and a tensile record of 100,000 points about 2 MB; the limit
/// leaves room for any real file while a device or an endless pipe ends
/// within a fraction of a second.
pub const MAX_INPUT_BYTES: u64 = 16 * 1024 * 1024;

/// How much of the start is looked at for NUL bytes before the rest is read.
const SNIFF_BYTES: usize = 8 * 1024;

/// Reads a whole input file as text, refusing one larger than
/// [`MAX_INPUT_BYTES`], a folder, and anything that is not UTF-8 text.
pub fn read_text(path: &Path) -> Result<String> {
    let shown = path.display();
    let file = File::open(path).with_context(|| format!("reading '{shown}'"))?;
    let meta = file
        .metadata()
        .with_context(|| format!("reading '{shown}'"))?;
    if meta.is_dir() {
        bail!("'{shown}' is a folder; give the file to read");
    }
    if meta.is_file() && meta.len() > MAX_INPUT_BYTES {
        bail!(
            "'{shown}' is {} bytes; coldpass reads input files of at most {MAX_INPUT_BYTES} bytes (16 MiB)",
            meta.len()
        );
    }
    let bytes = read_bounded(file).with_context(|| format!("reading '{shown}'"))?;
    let Some(bytes) = bytes else {
        bail!(
            "'{shown}' holds more than {MAX_INPUT_BYTES} bytes (16 MiB), the most coldpass reads from one input; is it the right file (a device or an endless stream)?"
        );
    };
    text_of(bytes).with_context(|| format!("reading '{shown}'"))
}

/// Reads at most `MAX_INPUT_BYTES`; `None` when there is more. Stops early
/// with an error at a NUL byte in the first block (binary data or a device
/// like `/dev/zero`), so such input costs one read.
fn read_bounded(file: File) -> io::Result<Option<Vec<u8>>> {
    let mut limited = file.take(MAX_INPUT_BYTES + 1);
    let mut head = vec![0u8; SNIFF_BYTES];
    let mut filled = 0;
    while filled < SNIFF_BYTES {
        let n = limited.read(&mut head[filled..])?;
        if n == 0 {
            break;
        }
        filled += n;
        if head[..filled].contains(&0) {
            return Err(not_text("it holds NUL bytes (binary data)"));
        }
    }
    head.truncate(filled);
    let mut bytes = head;
    if filled == SNIFF_BYTES {
        limited.read_to_end(&mut bytes)?;
    }
    if bytes.len() as u64 > MAX_INPUT_BYTES {
        return Ok(None);
    }
    Ok(Some(bytes))
}

fn not_text(why: &str) -> io::Error {
    io::Error::new(
        io::ErrorKind::InvalidData,
        format!("the file is not text: {why}; coldpass reads YAML or CSV text (UTF-8)"),
    )
}

/// The bytes as UTF-8 text, or an error naming the first bad byte's offset.
fn text_of(bytes: Vec<u8>) -> io::Result<String> {
    String::from_utf8(bytes).map_err(|e| {
        let at = e.utf8_error().valid_up_to();
        not_text(&format!("byte {at} is not UTF-8"))
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn devices_end_quickly_with_a_clear_error() {
        for dev in ["/dev/zero", "/dev/urandom"] {
            if !Path::new(dev).exists() {
                continue;
            }
            let e = format!("{:#}", read_text(Path::new(dev)).unwrap_err());
            assert!(e.contains(dev), "{e}");
            assert!(e.contains("not text") || e.contains("16 MiB"), "{e}");
        }
    }

    #[test]
    fn a_folder_is_named_as_one() {
        let e = format!("{:#}", read_text(Path::new(".")).unwrap_err());
        assert!(e.contains("is a folder"), "{e}");
    }
}

//! Any bytes as a design file (a schedule file with `target:`): parsing must
//! not panic; a file that parses and has a target is designed with at most
//! 12 passes (so one input stays fast), and the design must not panic.
#![no_main]

use coldpass::design::{design, DesignOptions};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let Ok(mut file) = coldpass::schedule::parse(text) else {
        return;
    };
    let Some(target) = file.target.as_mut() else {
        return;
    };
    target.max_passes = Some(target.max_passes.unwrap_or(12).min(12));
    let _ = design(&file, &DesignOptions::default());
});

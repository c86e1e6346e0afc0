//! Any bytes as a schedule file: `schedule::parse` must return a file or an
//! error in the file's words (no panic, no internal type name, a bounded
//! message), and must answer quickly whatever the nesting.
#![no_main]

use libfuzzer_sys::fuzz_target;

const INTERNAL: [&str; 5] = [
    "FlowLawSpec",
    "SizeText",
    "u128",
    "untagged enum",
    "tagged enum",
];

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Err(e) = coldpass::schedule::parse(text) {
        let m = e.to_string();
        assert!(!m.is_empty());
        assert!(m.len() < 4096, "message of {} bytes", m.len());
        for w in INTERNAL {
            assert!(
                text.contains(w) || !m.contains(w),
                "internal word {w:?} in {m}"
            );
        }
    }
});

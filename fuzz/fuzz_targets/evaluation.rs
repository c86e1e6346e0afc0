//! Any schedule file that parses is evaluated: no panic, and a report that
//! comes back holds only finite strains and stresses in every step (the
//! shell refuses any other non-finite figure by name).
#![no_main]

use coldpass::evaluation::{evaluate, EvaluateOptions};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let Ok(file) = coldpass::schedule::parse(text) else {
        return;
    };
    if file.passes.is_empty() {
        return;
    }
    if let Ok(rep) = evaluate(&file, &EvaluateOptions::default()) {
        for p in &rep.passes {
            assert!(
                p.strain_after.is_finite(),
                "step {}: strain {}",
                p.step,
                p.strain_after
            );
            assert!(p.flow_stress_exit_mpa.is_finite(), "step {}", p.step);
        }
    }
});

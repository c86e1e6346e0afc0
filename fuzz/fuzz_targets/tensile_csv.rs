//! Any bytes as a tensile record: read as the `fit` command reads a CSV
//! (header row, `#` notes, trimmed cells, the first two columns as strain and
//! stress), then fitted as engineering and as true data. The fit must give a
//! report or an error, never a panic. The command's own column finding is
//! covered through the CLI by tests/reliability_fuzz.rs.
#![no_main]

use coldpass::fit::{fit_record, DataKind, FitOptions};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut reader = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .flexible(true)
        .from_reader(data);
    let mut strain = Vec::new();
    let mut stress = Vec::new();
    for rec in reader.records() {
        let Ok(rec) = rec else { return };
        let (Some(a), Some(b)) = (rec.get(0), rec.get(1)) else {
            return;
        };
        let (Ok(a), Ok(b)) = (a.parse::<f64>(), b.parse::<f64>()) else {
            return;
        };
        strain.push(a);
        stress.push(b);
    }
    for data in [DataKind::Engineering, DataKind::True] {
        let options = FitOptions {
            data,
            shear_modulus_gpa: None,
            reach_strain: None,
        };
        if let Err(e) = fit_record(&strain, &stress, &options) {
            assert!(!e.to_string().is_empty());
        }
    }
});

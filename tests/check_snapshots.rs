//! Every demo schedule is a snapshot: its table and its JSON. A change in a
//! figure shows up as a snapshot diff to review, never silently.

mod common;

use common::{coldpass, demo_schedules, stdout};

#[test]
fn every_demo_schedule_table_and_json() {
    let demos = demo_schedules();
    assert!(demos.len() >= 4, "at least four demo schedules");
    for f in demos {
        let name = f.file_stem().unwrap().to_string_lossy().into_owned();
        let path = format!("schedules-demo/{name}.yaml");
        let table = stdout(&coldpass(&["check", &path]));
        insta::assert_snapshot!(format!("{name}.table"), table);
        let json = stdout(&coldpass(&["check", &path, "--format", "json"]));
        insta::assert_snapshot!(format!("{name}.json"), json);
    }
}

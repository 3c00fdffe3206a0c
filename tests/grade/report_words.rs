//! Issue 9, item 23: the grade report's words. The JSON key of a fault's equivalence class
//! is `fault_class` (`class` means a corner class everywhere else); every undetected fault
//! says at which outputs it can be observed; a fault left "not proven" says why (the input
//! bits in its support against the limit of 20).

use std::collections::BTreeSet;

use arithvec::{write_selection, Generator};

use crate::util::{spec, Flags, Sandbox, Unit};

#[test]
fn issue9_grade_names_fault_classes_observing_outputs_and_why_not_proven() {
    let sb = Sandbox::new();
    let spec_file = sb.spec("sub16", Unit::Sub, 16, 0, Flags::All);
    let s = spec(Unit::Sub, 16, 0, Flags::All);
    // Four vectors: many faults stay undetected, and the upper result bits depend on all
    // 33 input bits, more than the proof limit of 20.
    let generator = Generator::new(&s, Some(0), None);
    write_selection(&generator, &s, &sb.path("weak"), &[0, 1, 2, 3]).expect("write the subset");
    let report = sb.grade(&spec_file, "weak", &["--builtin"]);
    let undetected = report["undetected"].as_array().expect("undetected");
    assert!(!undetected.is_empty(), "{report}");
    let mut statuses = BTreeSet::new();
    for f in undetected {
        assert!(f.get("class").is_none(), "the old key is gone: {f}");
        assert!(f["fault_class"].is_u64(), "{f}");
        let observed = f["observed_at"].as_array().expect("observed_at");
        assert!(
            !observed.is_empty(),
            "an undetected fault reaches some output: {f}"
        );
        let status = f["redundancy"]["status"].as_str().expect("status");
        statuses.insert(status.to_string());
        if status == "not_proven" {
            let support = f["redundancy"]["support_bits"]
                .as_u64()
                .expect("support_bits");
            assert_eq!(f["redundancy"]["limit"].as_u64(), Some(20), "{f}");
            assert!(support > 20, "{f}");
        }
    }
    assert!(statuses.contains("not_proven"), "{statuses:?}");

    // The text table has the same facts in words.
    let run = sb.run(&["grade", &spec_file, "--vectors", "weak", "--builtin"]);
    run.expect_code(0)
        .expect_stdout("observable at")
        .expect_stdout("input bits in its support, over the limit of 20");
    assert!(
        run.stdout.contains("y[15]") || run.stdout.contains("..15]"),
        "the observing outputs are named\n{}",
        run.describe()
    );
}

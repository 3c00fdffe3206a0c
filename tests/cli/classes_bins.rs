//! Issue 9, item 21: `classes --bins` has no empty column, and a bin that only a carry-in
//! could hit says that the spec has no carry-in port rather than blaming the width.

use crate::util::{Sandbox, RESERVOIR_LEVEL};

/// The first line of a box-drawn (or ASCII) table whose cells hold words: the header's cells.
fn header_cells(text: &str) -> Vec<String> {
    let line = text
        .lines()
        .find(|l| l.contains("bin") && l.contains("status"))
        .unwrap_or_else(|| panic!("no header row in\n{text}"));
    line.split(['│', '|'])
        .map(|c| c.trim().to_string())
        .filter(|c| !c.is_empty())
        .collect()
}

#[test]
fn issue9_classes_bins_names_a_missing_carry_in() {
    let sb = Sandbox::new();
    let without_cin: String = RESERVOIR_LEVEL
        .lines()
        .filter(|l| !l.starts_with("carry_in"))
        .map(|l| format!("{l}\n"))
        .collect();
    assert_ne!(
        without_cin, RESERVOIR_LEVEL,
        "the fixture has a carry-in to remove"
    );
    let spec = sb.write("nocin.toml", &without_cin);
    let run = sb.run(&["classes", &spec, "--bins"]);
    run.expect_code(0);
    assert_eq!(
        header_cells(&run.stdout),
        ["bin", "status", "directed hits"]
    );
    for line in run.stdout.lines() {
        // Every row has three non-empty cells (box rows only).
        if line.starts_with('│') {
            let cells: Vec<&str> = line.split('│').map(str::trim).collect();
            assert!(
                cells[1..cells.len() - 1].iter().all(|c| !c.is_empty()),
                "an empty cell: {line}"
            );
        }
    }
    let bin0 = run
        .stdout
        .lines()
        .find(|l| l.contains("cell.rows[bit0.a0b0c1]"))
        .unwrap_or_else(|| panic!("{}", run.describe()));
    assert!(
        bin0.contains("unreachable: the spec has no carry-in port"),
        "{bin0}"
    );
    assert!(!run.stdout.contains("at this width"), "{}", run.stdout);
    let json = sb
        .run(&["classes", &spec, "--bins", "--format", "json"])
        .json();
    let rows = json
        .as_array()
        .expect("classes")
        .iter()
        .find(|c| c["id"] == "cell.rows")
        .expect("cell.rows");
    let unreachable: Vec<&serde_json::Value> = rows["bins"]
        .as_array()
        .expect("bins")
        .iter()
        .filter(|b| b["reachable"] == false)
        .collect();
    assert_eq!(unreachable.len(), 4, "{rows}");
    assert!(unreachable
        .iter()
        .all(|b| b["unreachable_because"] == "no_carry_in_port"));

    // With the carry-in, a 1-bit unit's bins that no input hits say so.
    let one_bit = RESERVOIR_LEVEL.replace("width = 8", "width = 1");
    assert_ne!(one_bit, RESERVOIR_LEVEL);
    let spec = sb.write("w1.toml", &one_bit);
    let run = sb.run(&["classes", &spec, "--bins"]);
    run.expect_code(0)
        .expect_stdout("unreachable: no input hits it at this width and encoding");
    assert!(!run.stdout.contains("carry-in port"), "{}", run.stdout);
}

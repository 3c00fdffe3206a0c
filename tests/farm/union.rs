//! `merge` over the union of the runs' seen indices (issue 9 items 8 and 9, issue 12's
//! incremental merge): halves of one set complete it, a missing shard or an overlap fails
//! the merge, the same run twice and sums past 64 bits are refused with exit 2.

use serde_json::{json, Value};

use crate::sim::assert_same_as_unsharded;
use crate::util::{Sandbox, Table, VectorCsv, RESERVOIR_LEVEL};

/// A sandbox with RESERVOIR_LEVEL's whole set in `all/`, and its perfect log as a table.
fn set_and_log() -> (Sandbox, String, Table) {
    let sb = Sandbox::new();
    let spec = sb.write("reservoir_level.toml", RESERVOIR_LEVEL);
    sb.gen(&spec, "all", &[]);
    let log = VectorCsv::read(&sb, "all").perfect_log();
    (sb, spec, log)
}

/// Checks rows `rows` of `log` against the whole set as `name`.csv, expecting `code`.
fn check_part(
    sb: &Sandbox,
    spec: &str,
    log: &Table,
    rows: std::ops::Range<usize>,
    name: &str,
    code: i32,
) -> (String, Value) {
    let mut part = log.clone();
    part.rows = log.rows[rows].to_vec();
    let file = sb.write(&format!("{name}.csv"), &part.csv());
    let json = format!("{name}.json");
    sb.run(&[
        "check",
        spec,
        "--log",
        &file,
        "--vectors",
        "all",
        "--json",
        &json,
        "-q",
    ])
    .expect_code(code);
    let report = sb.json(&json);
    (json, report)
}

/// Item 8: two logs that each cover one half of one set, each checked against the whole set,
/// merged to "log is missing 380 vectors" (the missing counts were added). They complete the
/// set, and the merge equals the check of the whole log.
#[test]
fn issue9_item8_halves_of_one_set_merge_to_a_complete_run() {
    let (sb, spec, log) = set_and_log();
    let n = log.rows.len();
    let whole_file = sb.write("whole.csv", &log.csv());
    let (_, whole) = sb.check(&spec, &whole_file, &["--vectors", "all"], 0);
    let (a, ra) = check_part(&sb, &spec, &log, 0..n / 2, "first", 1);
    let (b, _) = check_part(&sb, &spec, &log, n / 2..n, "second", 1);
    assert_eq!(
        ra["log_problems"]["missing"].as_u64(),
        Some((n - n / 2) as u64)
    );
    assert_eq!(ra["seen"][0]["ranges"], json!([[0, n / 2 - 1]]));
    sb.run(&["merge", &a, &b, "-o", "merged.json"])
        .expect_code(0);
    let merged = sb.json("merged.json");
    assert_same_as_unsharded(&merged, &whole);
    assert_eq!(merged["seen"][0]["ranges"], json!([[0, n - 1]]));
}

/// Item 8: three quarters of a set merge to an incomplete run (exit 1) that names what is
/// missing; overlapping parts are duplicates (exit 1) with the overlap given as a range.
#[test]
fn issue9_item8_missing_part_and_overlap_fail_the_merge() {
    let (sb, spec, log) = set_and_log();
    let n = log.rows.len();
    let q = n / 4;
    let (p0, _) = check_part(&sb, &spec, &log, 0..q, "q0", 1);
    let (p1, _) = check_part(&sb, &spec, &log, q..2 * q, "q1", 1);
    let (p3, _) = check_part(&sb, &spec, &log, 3 * q..n, "q3", 1);
    sb.run(&["merge", &p0, &p1, &p3, "-o", "three.json"])
        .expect_code(1);
    let three = sb.json("three.json");
    assert_eq!(three["log_problems"]["missing"].as_u64(), Some(q as u64));
    assert_eq!(
        three["log_problems"]["missing_first"][0].as_u64(),
        Some(2 * q as u64)
    );
    assert_eq!(three["verdict"], "fail");

    let (x, _) = check_part(&sb, &spec, &log, 0..n / 2 + 3, "x", 1);
    let (y, _) = check_part(&sb, &spec, &log, n / 2..n, "y", 1);
    sb.run(&["merge", &x, &y, "-o", "overlap.json"])
        .expect_code(1);
    let overlap = sb.json("overlap.json");
    assert_eq!(overlap["log_problems"]["missing"], 0);
    assert_eq!(overlap["log_problems"]["duplicate_count"], 3);
    assert_eq!(
        overlap["log_problems"]["overlapping"],
        json!([[n / 2, n / 2 + 2]])
    );
}

/// Item 9: `merge r.json r.json` gave twice the passes with no warning. The same run twice
/// (the same file, or a copy) is refused with exit 2 naming both files, and nothing is
/// written.
#[test]
fn issue9_item9_the_same_run_twice_is_refused() {
    let (sb, spec, log) = set_and_log();
    let whole_file = sb.write("r.csv", &log.csv());
    sb.run(&[
        "check",
        &spec,
        "--log",
        &whole_file,
        "--vectors",
        "all",
        "--json",
        "r.json",
        "-q",
    ])
    .expect_code(0);
    let run = sb.run(&["merge", "r.json", "r.json", "-o", "never.json"]);
    run.expect_code(2).expect_stderr("r.json and r.json");
    sb.write("copy.json", &sb.read("r.json"));
    sb.run(&["merge", "r.json", "copy.json", "-o", "never.json"])
        .expect_code(2)
        .expect_stderr("r.json and copy.json")
        .expect_stderr("same run");
    assert!(!sb.path("never.json").exists());
}

/// Item 9: sums are checked; a report whose counts are near 2^64 wrapped to a small number.
/// Now the merge stops with exit 2; a report whose own counts disagree is refused as well.
#[test]
fn issue9_item9_sums_past_64_bits_and_corrupt_reports_are_refused() {
    let (sb, spec, log) = set_and_log();
    let n = log.rows.len();
    let (a, ra) = check_part(&sb, &spec, &log, 0..n / 2, "a", 1);
    let (b, rb) = check_part(&sb, &spec, &log, n / 2..n, "b", 1);
    // A bin both halves hit, pushed to the top of the u64 range in one report.
    let hits_b = rb["counts"]["bin_hits"].as_array().unwrap();
    let k = hits_b
        .iter()
        .position(|h| h.as_u64().unwrap() > 0)
        .expect("a bin with hits");
    let mut forged = ra.clone();
    forged["counts"]["bin_hits"][k] = json!(u64::MAX);
    sb.write("forged.json", &forged.to_string());
    sb.run(&["merge", "forged.json", &b, "-o", "never.json"])
        .expect_code(2)
        .expect_stderr("does not fit in 64 bits");

    let mut corrupt = ra.clone();
    corrupt["passed"] = json!(u64::MAX - 5);
    sb.write("corrupt.json", &corrupt.to_string());
    sb.run(&["merge", "corrupt.json", &b, "-o", "never.json"])
        .expect_code(2)
        .expect_stderr("corrupt.json");
    let mut lying = ra.clone();
    lying["seen"][0]["ranges"] = json!([[0, 0]]);
    sb.write("lying.json", &lying.to_string());
    sb.run(&["merge", "lying.json", &b, "-o", "never.json"])
        .expect_code(2)
        .expect_stderr("lying.json");
    assert!(!sb.path("never.json").exists());
    sb.run(&["merge", &a, &b]).expect_code(0);
}

/// Issue 12: `merge --into total.json new.json` merges in place (starting total.json when it
/// does not exist), gives the all-at-once merge, and refuses a report already in the total.
#[test]
fn incremental_merge_into_a_total() {
    let (sb, spec, log) = set_and_log();
    let n = log.rows.len();
    let (a, _) = check_part(&sb, &spec, &log, 0..n / 3, "a", 1);
    let (b, _) = check_part(&sb, &spec, &log, n / 3..2 * n / 3, "b", 1);
    let (c, _) = check_part(&sb, &spec, &log, 2 * n / 3..n, "c", 1);
    sb.run(&["merge", &a, &b, &c, "-o", "at_once.json"])
        .expect_code(0);
    sb.run(&["merge", "--into", "total.json", &a])
        .expect_code(1);
    sb.run(&["merge", "--into", "total.json", &b])
        .expect_code(1);
    sb.run(&["merge", "--into", "total.json", &c])
        .expect_code(0)
        .expect_stdout("PASS");
    let total = sb.json("total.json");
    let at_once = sb.json("at_once.json");
    assert_same_as_unsharded(&total, &at_once);
    assert_eq!(total["runs"], at_once["runs"]);
    let before = sb.read("total.json");
    sb.run(&["merge", "--into", "total.json", &b])
        .expect_code(2)
        .expect_stderr("total.json and b.json");
    assert_eq!(
        sb.read("total.json"),
        before,
        "a refused merge changed the total"
    );
    // --into and -o together make no sense.
    sb.run(&["merge", "--into", "total.json", &b, "-o", "x.json"])
        .expect_code(2);
}

//! `arithvec merge`: shard reports combine to the unsharded verdict; reports of different
//! specs are refused; the merged coverage gate sets the exit code.

use serde_json::json;

use crate::util::{
    assert_json_includes, report_name, Sandbox, VectorCsv, FLOW_ADDER, RESERVOIR_LEVEL,
};

#[test]
fn two_shard_reports_merge_to_the_unsharded_check() {
    let sb = Sandbox::new();
    let spec = sb.write("reservoir_level.toml", RESERVOIR_LEVEL);
    sb.gen(&spec, "all", &[]);
    let whole = VectorCsv::read(&sb, "all");
    let log = sb.write("all.csv", &whole.perfect_log().csv());
    let (_, unsharded) = sb.check(&spec, &log, &["--vectors", "all"], 0);

    let mut reports = Vec::new();
    for i in 0..2 {
        let dir = format!("shard{i}");
        sb.gen(&spec, &dir, &["--shard", &format!("{i}/2")]);
        // The shard's vectors.csv has a header only in shard 0; take the header from the
        // whole set.
        let text = format!(
            "{}\n{}",
            sb.read("all/vectors.csv").lines().next().unwrap(),
            sb.read(&format!("{dir}/vectors.csv"))
                .lines()
                .filter(|l| !l.starts_with("index,"))
                .collect::<Vec<_>>()
                .join("\n")
        );
        let csv = VectorCsv::parse(&text);
        // Shard 0's log has an index column; shard 1's testbench just plays its own
        // stimulus.hex from the top, without one.
        let table = if i == 0 {
            csv.perfect_log()
        } else {
            let ports = csv.ports();
            csv.table(&ports.iter().map(String::as_str).collect::<Vec<_>>())
        };
        let log = sb.write(&format!("{dir}.csv"), &table.csv());
        let (_, r) = sb.check(&spec, &log, &["--vectors", &dir], 0);
        assert_eq!(r["log_problems"]["missing"], 0, "shard {i}");
        assert_eq!(r["vectors"].as_u64().unwrap() as usize, csv.rows.len());
        reports.push(report_name(&log));
    }
    let run = sb.run(&[
        "merge",
        &reports[0],
        &reports[1],
        "-o",
        "merged.json",
        "--require",
        "100",
        "--junit",
        "merged.xml",
    ]);
    run.expect_code(0);
    let merged = sb.json("merged.json");
    for key in [
        "vectors",
        "passed",
        "failed",
        "unknown",
        "coverage",
        "classes",
        "counts",
        "verdict",
        "spec_sha256",
    ] {
        assert_eq!(
            merged[key], unsharded[key],
            "merged {key} differs from the unsharded check"
        );
    }
    assert_json_includes(
        &merged,
        &json!({"verdict": "pass", "gate": {"require": 100.0, "met": true}}),
    );
    assert!(sb.read("merged.xml").contains("<testcase"));
}

/// Writes a check report of the first `rows` vectors of `spec`'s set as a log without operand
/// reference, optionally with one corrupted carry bit, and returns its name.
fn partial_report(sb: &Sandbox, spec: &str, rows: usize, corrupt: bool, name: &str) -> String {
    let dir = format!("{name}_vec");
    sb.gen(spec, &dir, &[]);
    let csv = VectorCsv::read(sb, &dir);
    let ports = csv.ports();
    let mut log = csv.table(&ports.iter().map(String::as_str).collect::<Vec<_>>());
    log.rows.truncate(rows);
    if corrupt {
        let cell = log.cell(1, "co");
        *cell = if cell == "0" { "1" } else { "0" }.to_string();
    }
    let file = sb.write(&format!("{name}.csv"), &log.csv());
    let json_name = format!("{name}.json");
    let run = sb.run(&["check", spec, "--log", &file, "--json", &json_name, "-q"]);
    run.expect_code(if corrupt { 1 } else { 0 });
    json_name
}

#[test]
fn merged_gate_sets_the_exit_code() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    let few = partial_report(&sb, &spec, 4, false, "few");
    let more = partial_report(&sb, &spec, 9, false, "more");
    let bad = partial_report(&sb, &spec, 6, true, "bad");
    // Short of 100 %: exit 3; without a requirement: 0.
    sb.run(&["merge", &few, &more, "--require", "100", "-o", "m1.json"])
        .expect_code(3);
    let m1 = sb.json("m1.json");
    assert_json_includes(
        &m1,
        &json!({"vectors": 13, "passed": 13, "verdict": "coverage_short",
                                      "gate": {"met": false}}),
    );
    sb.run(&["merge", &few, &more])
        .expect_code(0)
        .expect_stdout("PASS");
    // A requirement at the merged coverage is met.
    let pct = m1["coverage"]["percent"]
        .as_f64()
        .unwrap()
        .floor()
        .to_string();
    sb.run(&["merge", &few, &more, "--require", &pct])
        .expect_code(0);
    // The merged coverage is at least each part's.
    let part = sb.json(&few)["coverage"]["covered"].as_u64().unwrap();
    assert!(m1["coverage"]["covered"].as_u64().unwrap() >= part);
    // A failure anywhere fails the merge, gate or not.
    sb.run(&["merge", &few, &bad, "--require", "0", "-o", "m2.json"])
        .expect_code(1);
    assert_json_includes(
        &sb.json("m2.json"),
        &json!({"failed": 1, "verdict": "fail"}),
    );
}

#[test]
fn reports_of_different_specs_are_refused() {
    let sb = Sandbox::new();
    let adder = sb.write("flow_adder.toml", FLOW_ADDER);
    let a = partial_report(&sb, &adder, 5, false, "adder");
    let sub = sb.write("reservoir_level.toml", RESERVOIR_LEVEL);
    sb.gen(&sub, "sub_vec", &[]);
    let csv = VectorCsv::read(&sb, "sub_vec");
    let log = sb.write("sub.csv", &csv.perfect_log().csv());
    sb.check(&sub, &log, &[], 0);
    let sub_report = report_name(&log);
    let run = sb.run(&["merge", &a, &sub_report, "-o", "never.json"]);
    run.expect_code(2)
        .expect_stderr(&sub_report)
        .expect_stderr("different spec");
    assert!(
        !sb.path("never.json").exists(),
        "a refused merge wrote a report"
    );

    // The same unit at another width is another spec, too.
    let wider = sb.write("wide.toml", &FLOW_ADDER.replace("width = 8", "width = 9"));
    let w = partial_report(&sb, &wider, 5, false, "wide");
    sb.run(&["merge", &a, &w])
        .expect_code(2)
        .expect_stderr("different spec");

    // Only the [random] table differs: the same spec, so the reports merge.
    let reseeded = sb.write("reseeded.toml", &FLOW_ADDER.replace("seed = 5", "seed = 6"));
    let r = partial_report(&sb, &reseeded, 5, false, "reseeded");
    sb.run(&["merge", &a, &r]).expect_code(0);

    // Not a report at all.
    sb.write("junk.json", "{\"tool\": \"something else\"}\n");
    sb.run(&["merge", &a, "junk.json"])
        .expect_code(2)
        .expect_stderr("junk.json");
}

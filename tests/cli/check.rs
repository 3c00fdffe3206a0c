//! `arithvec check`: perfect logs pass with full coverage; every kind of corruption gives the
//! documented exit code and names the right vector, port and classes in the JSON report; the
//! accepted log dialects (separators, prefixes, radixes, missing columns, simulator output)
//! are read; the coverage gate and the JUnit file behave.

use std::collections::{BTreeMap, BTreeSet};

use proptest::prelude::*;
use serde_json::{json, Value};

use crate::util::{
    assert_json_includes, failure_indices, flip_hex_bit, hex_to_bin, spec_text, u32_of, u64_of,
    unpack_hex_log, xml_elements, Sandbox, Table, VectorCsv, ENCODINGS, FLOW_ADDER, OPERATIONS,
    RESERVOIR_LEVEL, VALVE_TRIM,
};

/// Writes `text` as a spec, generates its set into `vec/`, and returns (spec file, CSV).
fn set_up(sb: &Sandbox, name: &str, text: &str) -> (String, VectorCsv) {
    let spec = sb.write(&format!("{name}.toml"), text);
    sb.gen(&spec, "vec", &[]);
    (spec, VectorCsv::read(sb, "vec"))
}

/// Port name -> width in bits, from the set's manifest layout.
fn port_widths(sb: &Sandbox, dir: &str) -> BTreeMap<String, u32> {
    let m = sb.json(&format!("{dir}/manifest.json"));
    let mut widths = BTreeMap::new();
    for word in ["stimulus", "expected"] {
        for f in m["layout"][word]["fields"].as_array().unwrap() {
            let w = u32_of(&f["msb"]) - u32_of(&f["lsb"]) + 1;
            widths.insert(f["name"].as_str().unwrap().to_string(), w);
        }
    }
    widths
}

/// The output port names, in layout order.
fn output_ports(sb: &Sandbox, dir: &str) -> Vec<String> {
    let m = sb.json(&format!("{dir}/manifest.json"));
    m["layout"]["expected"]["fields"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| f["name"].as_str().unwrap().to_string())
        .collect()
}

/// The first random (non-directed) vector's index.
fn first_random(sb: &Sandbox) -> usize {
    u64_of(&sb.json("vec/manifest.json")["directed"]) as usize
}

/// The report's summary of class `id`.
fn class<'r>(report: &'r Value, id: &str) -> &'r Value {
    report["classes"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["id"] == id)
        .unwrap_or_else(|| panic!("no class {id} in the report"))
}

/// A sorted list of the strings in a JSON array.
fn strings(v: &Value) -> Vec<String> {
    let mut s: Vec<String> = v
        .as_array()
        .unwrap_or_else(|| panic!("not an array: {v}"))
        .iter()
        .map(|x| x.as_str().unwrap().to_string())
        .collect();
    s.sort();
    s
}

/// Asserts that the report has exactly one failure, at `index`, of `kind`, whose only
/// non-ok output is `port` with `status`, and whose classes are those of the CSV row; and
/// that every one of those classes counts the failure.
#[track_caller]
fn assert_single_failure(
    report: &Value,
    csv: &VectorCsv,
    index: usize,
    kind: &str,
    port: &str,
    status: &str,
) -> Value {
    assert_eq!(failure_indices(report), [index as u64], "{report:#}");
    let f = &report["failures"][0];
    assert_eq!(f["kind"], kind);
    let bad: Vec<(&str, &str)> = f["outputs"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|o| o["status"] != "ok")
        .map(|o| (o["port"].as_str().unwrap(), o["status"].as_str().unwrap()))
        .collect();
    assert_eq!(bad, [(port, status)], "non-ok outputs of the failure");
    assert_eq!(
        strings(&f["classes"]),
        csv.classes(index),
        "failure classes"
    );
    for id in csv.classes(index) {
        let c = class(report, &id);
        assert!(
            u64_of(&c["failures"]) >= 1,
            "class {id} does not count the failure"
        );
        assert_eq!(c["status"], "failing", "class {id}");
    }
    assert!(
        f["repro"]
            .as_str()
            .unwrap()
            .contains(&format!("--index {index}")),
        "repro command: {}",
        f["repro"]
    );
    f.clone()
}

/// The bare-bones report shape every check writes.
fn assert_report_shape(report: &Value) {
    for key in [
        "tool",
        "version",
        "unit",
        "spec_sha256",
        "spec_toml",
        "logs",
        "vectors",
        "passed",
        "failed",
        "unknown",
        "coverage",
        "classes",
        "failures",
        "log_problems",
        "gate",
        "verdict",
        "note",
        "counts",
    ] {
        assert!(report.get(key).is_some(), "report lacks {key}: {report:#}");
    }
    assert_eq!(report["tool"], "arithvec");
}

#[test]
fn a_perfect_log_from_vectors_csv_passes_with_full_coverage() {
    let sb = Sandbox::new();
    for (name, text) in [
        ("flow_adder", FLOW_ADDER),
        ("reservoir_level", RESERVOIR_LEVEL),
        ("valve_trim", VALVE_TRIM),
    ] {
        let spec = sb.write(&format!("{name}.toml"), text);
        let dir = format!("vec_{name}");
        sb.gen(&spec, &dir, &[]);
        let csv = VectorCsv::read(&sb, &dir);
        let log = sb.write(&format!("{name}.csv"), &csv.perfect_log().csv());
        let (run, report) = sb.check(&spec, &log, &["--vectors", &dir, "--require", "100"], 0);
        run.expect_stdout("PASS");
        assert_report_shape(&report);
        let n = csv.rows.len() as u64;
        assert_json_includes(
            &report,
            &json!({
                "unit": name,
                "vectors": n, "passed": n, "failed": 0, "unknown": 0,
                "coverage": {"percent": 100.0, "bins_percent": 100.0, "at_least": 1},
                "failures": [],
                "log_problems": {"missing": 0, "duplicate_count": 0, "bad_line_count": 0,
                                 "out_of_step": null, "out_of_range": []},
                "gate": {"require": 100.0, "met": true},
                "verdict": "pass",
            }),
        );
        let cov = &report["coverage"];
        assert_eq!(cov["covered"], cov["total"]);
        for c in report["classes"].as_array().unwrap() {
            assert_eq!(c["status"], "covered", "{c}");
        }
        // The text report names the unit too.
        let text_run = sb.run(&["check", &spec, "--log", &log, "--vectors", &dir]);
        text_run.expect_code(0).expect_stdout(name);
    }
}

#[test]
fn a_perfect_log_unpacked_from_the_hex_files_passes() {
    let sb = Sandbox::new();
    for (name, text) in [
        ("valve_trim", VALVE_TRIM),
        ("wide", &spec_text("wide", "sub", "offset", 65, 12, 4)),
    ] {
        let spec = sb.write(&format!("{name}.toml"), text);
        let dir = format!("vec_{name}");
        sb.gen(&spec, &dir, &[]);
        let log = sb.write(&format!("{name}.log"), &unpack_hex_log(&sb, &dir).csv());
        let (_, report) = sb.check(&spec, &log, &["--vectors", &dir, "--require", "100"], 0);
        let n = VectorCsv::read(&sb, &dir).rows.len() as u64;
        assert_json_includes(
            &report,
            &json!({"vectors": n, "passed": n, "verdict": "pass",
                    "coverage": {"percent": 100.0}, "gate": {"met": true}}),
        );
    }
}

#[test]
fn one_flipped_result_bit_is_a_mismatch_at_its_index() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    for (k, bit) in [(first_random(&sb) + 3, 0), (5, 7)] {
        let mut log = csv.perfect_log();
        let original = log.cell(k, "delta").clone();
        let flipped = flip_hex_bit(&original, bit);
        *log.cell(k, "delta") = flipped.clone();
        let file = sb.write(&format!("flip{k}.csv"), &log.csv());
        let (run, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
        run.expect_stdout("FAIL");
        assert_json_includes(
            &report,
            &json!({"failed": 1, "unknown": 0, "passed": csv.rows.len() - 1, "verdict": "fail"}),
        );
        let f = assert_single_failure(&report, &csv, k, "mismatch", "delta", "wrong");
        assert_eq!(
            u64_of(&f["line"]),
            k as u64 + 2,
            "header is line 1, row 0 line 2"
        );
        let delta = f["outputs"]
            .as_array()
            .unwrap()
            .iter()
            .find(|o| o["port"] == "delta")
            .unwrap();
        assert_json_includes(
            delta,
            &json!({"signal": "result", "expected": original, "got": flipped,
                    "differing_bits": [bit], "unknown_bits": [],
                    "expected_bin": hex_to_bin(&original, 8), "got_bin": hex_to_bin(&flipped, 8)}),
        );
    }
}

#[test]
fn inverted_borrow_and_wrong_overflow_are_mismatches_on_their_port() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let k = first_random(&sb) + 1;
    for port in ["bout", "ovf"] {
        let mut log = csv.perfect_log();
        let cell = log.cell(k, port);
        *cell = if cell == "0" { "1" } else { "0" }.to_string();
        let file = sb.write(&format!("{port}.csv"), &log.csv());
        let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
        assert_single_failure(&report, &csv, k, "mismatch", port, "wrong");
    }
    // The carry of an add/sub unit in subtract mode, too.
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "valve_trim", VALVE_TRIM);
    let k = (0..csv.rows.len())
        .find(|&i| csv.get(i, "sub") == "1")
        .expect("a subtract-mode vector");
    let mut log = csv.perfect_log();
    let cell = log.cell(k, "cout");
    *cell = if cell == "0" { "1" } else { "0" }.to_string();
    let file = sb.write("cout.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
    assert_single_failure(&report, &csv, k, "mismatch", "cout", "wrong");
}

#[test]
fn an_x_bit_is_unknown_not_passing() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let widths = port_widths(&sb, "vec");
    let k = first_random(&sb) + 2;
    // A binary log, so one single bit can be x.
    let mut log = csv.perfect_log();
    for (c, name) in log.header.clone().iter().enumerate().skip(1) {
        for row in &mut log.rows {
            row[c] = hex_to_bin(&row[c], widths[name]);
        }
    }
    let mut bits: Vec<char> = log.cell(k, "delta").chars().collect();
    bits[8 - 1 - 2] = 'x';
    *log.cell(k, "delta") = bits.into_iter().collect();
    let file = sb.write("xbit.log", &log.render(" "));
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec", "--radix", "bin"], 1);
    assert_json_includes(
        &report,
        &json!({"failed": 0, "unknown": 1, "verdict": "fail"}),
    );
    let f = assert_single_failure(&report, &csv, k, "unknown", "delta", "unknown");
    let delta = f["outputs"]
        .as_array()
        .unwrap()
        .iter()
        .find(|o| o["port"] == "delta")
        .unwrap();
    assert_json_includes(delta, &json!({"unknown_bits": [2], "differing_bits": []}));

    // In hex an x digit makes its four bits unknown.
    let mut log = csv.perfect_log();
    let v = log.cell(k, "delta").clone();
    *log.cell(k, "delta") = format!("{}x", &v[..1]);
    let file = sb.write("xdigit.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
    let f = assert_single_failure(&report, &csv, k, "unknown", "delta", "unknown");
    let delta = f["outputs"]
        .as_array()
        .unwrap()
        .iter()
        .find(|o| o["port"] == "delta")
        .unwrap();
    assert_eq!(delta["unknown_bits"], json!([0, 1, 2, 3]));
}

#[test]
fn a_missing_row_is_reported_by_index() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let k = first_random(&sb) + 4;
    let mut log = csv.perfect_log();
    log.rows.remove(k);
    let file = sb.write("missing.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
    assert_json_includes(
        &report,
        &json!({"failed": 0, "unknown": 0, "vectors": csv.rows.len() - 1, "verdict": "fail",
                "failures": [],
                "log_problems": {"missing": 1, "missing_first": [k], "duplicate_count": 0,
                                 "out_of_step": null}}),
    );
    // Without --vectors nothing says which vectors should be there: the same log passes.
    let (_, report) = sb.check(&spec, &file, &[], 0);
    assert_eq!(report["verdict"], "pass");
}

#[test]
fn rows_shifted_by_one_are_mismatches() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let outputs = output_ports(&sb, "vec");
    // No index column: the checker places row k at vector k.
    let columns = csv.ports();
    let good = csv.table(&columns.iter().map(String::as_str).collect::<Vec<_>>());
    // Row k carries vector k's operands and vector k-1's outputs (a testbench sampling the
    // outputs one cycle early).
    let mut log = good.clone();
    for k in 1..log.rows.len() {
        for port in &outputs {
            *log.cell(k, port) = good.rows[k - 1][good.col(port)].clone();
        }
    }
    let expected: Vec<u64> = (1..good.rows.len())
        .filter(|&k| {
            outputs
                .iter()
                .any(|p| good.rows[k][good.col(p)] != good.rows[k - 1][good.col(p)])
        })
        .map(|k| k as u64)
        .collect();
    assert!(
        expected.len() > 10,
        "the fixture has too few differing neighbours"
    );
    let file = sb.write("shifted.csv", &log.csv());
    let (_, report) = sb.check(
        &spec,
        &file,
        &["--vectors", "vec", "--max-failures", "100000"],
        1,
    );
    assert_eq!(failure_indices(&report), expected);
    assert_eq!(u64_of(&report["failed"]), expected.len() as u64);
    for f in report["failures"].as_array().unwrap() {
        assert_eq!(f["kind"], "mismatch");
    }
    // The operands match the set, so this is not an out-of-step log.
    assert_json_includes(
        &report,
        &json!({"log_problems": {"out_of_step": null, "missing": 0}}),
    );
}

#[test]
fn an_index_column_off_by_one_is_out_of_step() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let n = csv.rows.len();
    let mut log = csv.perfect_log();
    for (k, row) in log.rows.iter_mut().enumerate() {
        row[0] = (k + 1).to_string();
    }
    let inputs = ["level", "drain", "bin"];
    let differs = |k: usize| inputs.iter().any(|p| csv.get(k, p) != csv.get(k + 1, p));
    let stepped: Vec<usize> = (0..n - 1).filter(|&k| differs(k)).collect();
    let first = stepped[0];
    let file = sb.write("offbyone.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
    assert_json_includes(
        &report,
        &json!({"verdict": "fail", "failed": 0,
                "log_problems": {
                    "out_of_step": {"count": stepped.len(), "first_index": first + 1,
                                    "first_line": first + 2},
                    "missing": 1, "missing_first": [0],
                    "out_of_range": [[n, n + 1]]}}),
    );
}

#[test]
fn a_duplicate_index_is_reported() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let k = 7;
    let mut log = csv.perfect_log();
    let again = log.rows[k].clone();
    log.rows.push(again);
    let file = sb.write("dup.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
    let line = csv.rows.len() + 2;
    assert_json_includes(
        &report,
        &json!({"verdict": "fail", "vectors": csv.rows.len(), "failed": 0,
                "log_problems": {"duplicates": [[k, line]], "duplicate_count": 1, "missing": 0}}),
    );
}

#[test]
fn an_unparseable_line_is_bad_input_unless_lenient() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let k = 9;
    let line = k + 2;
    for (case, bad) in [("short", None), ("digit", Some("g1"))] {
        let mut log = csv.perfect_log();
        let mut text;
        match bad {
            None => {
                text = log.csv();
                let mut lines: Vec<&str> = text.lines().collect();
                lines[line - 1] = "this line is not a row";
                text = lines.join("\n") + "\n";
            }
            Some(token) => {
                *log.cell(k, "delta") = token.to_string();
                text = log.csv();
            }
        }
        let file = sb.write(&format!("{case}.csv"), &text);
        let run = sb.run(&["check", &spec, "--log", &file, "--vectors", "vec"]);
        run.expect_code(2)
            .expect_stderr(&format!("{file}:{line}"))
            .expect_stderr("--lenient");
        if bad.is_some() {
            run.expect_stderr("delta");
        }
        // Lenient: the line is counted and skipped, and the verdict decides the exit code.
        let (_, report) = sb.check(&spec, &file, &["--vectors", "vec", "--lenient"], 1);
        assert_json_includes(
            &report,
            &json!({"verdict": "fail", "failed": 0,
                    "log_problems": {"bad_line_count": 1, "missing": 1, "missing_first": [k]}}),
        );
        let listed = report["log_problems"]["bad_lines"][0].as_str().unwrap();
        assert!(listed.contains(&format!("{file}:{line}")), "{listed}");
        let (_, report) = sb.check(&spec, &file, &["--lenient"], 0);
        assert_json_includes(
            &report,
            &json!({"verdict": "pass", "vectors": csv.rows.len() - 1,
                    "log_problems": {"bad_line_count": 1}}),
        );
    }
}

#[test]
fn whitespace_separated_and_0x_prefixed_logs_are_read() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "valve_trim", VALVE_TRIM);
    let widths = port_widths(&sb, "vec");
    let log = csv.perfect_log();
    // Runs of blanks and tabs, with a comment and a blank line thrown in.
    let mut text = String::from("# result log of a valve_trim run\n");
    text.push_str(&log.header.join("\t"));
    text.push_str("\n\n");
    for r in &log.rows {
        text.push_str(&r.join("  \t "));
        text.push('\n');
    }
    let file = sb.write("spaces.log", &text);
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec", "--require", "100"], 0);
    assert_eq!(u64_of(&report["passed"]), csv.rows.len() as u64);

    // 0x on every port value; a hand-written prefix on a full-width value is unambiguous
    // because it is longer than the digits a simulator prints.
    let mut prefixed = log.clone();
    for (c, name) in prefixed.header.clone().iter().enumerate().skip(1) {
        assert!(widths.contains_key(name));
        for row in &mut prefixed.rows {
            row[c] = format!("0x{}", row[c]);
        }
    }
    let file = sb.write("prefixed.csv", &prefixed.csv());
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec", "--require", "100"], 0);
    assert_eq!(u64_of(&report["passed"]), csv.rows.len() as u64);
    // And a prefixed wrong value is still caught.
    let k = first_random(&sb);
    let v = prefixed.cell(k, "out").clone();
    *prefixed.cell(k, "out") = format!("0x{}", flip_hex_bit(&v[2..], 11));
    let file = sb.write("prefixed_bad.log", &prefixed.render(" "));
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
    assert_single_failure(&report, &csv, k, "mismatch", "out", "wrong");
}

#[test]
fn a_log_without_operand_columns_takes_them_from_the_vector_set() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "valve_trim", VALVE_TRIM);
    let outputs = output_ports(&sb, "vec");
    let mut with_index = vec!["index"];
    with_index.extend(outputs.iter().map(String::as_str));
    let no_index: Vec<&str> = outputs.iter().map(String::as_str).collect();
    for (case, cols) in [("indexed", &with_index), ("plain", &no_index)] {
        let log = csv.table(cols);
        let file = sb.write(&format!("{case}.csv"), &log.csv());
        let (_, report) = sb.check(&spec, &file, &["--vectors", "vec", "--require", "100"], 0);
        assert_json_includes(
            &report,
            &json!({"vectors": csv.rows.len(), "verdict": "pass", "coverage": {"percent": 100.0}}),
        );
        let k = first_random(&sb) + 5;
        let mut bad = log.clone();
        let v = bad.cell(k, "out").clone();
        *bad.cell(k, "out") = flip_hex_bit(&v, 4);
        let file = sb.write(&format!("{case}_bad.csv"), &bad.csv());
        let (_, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
        let f = assert_single_failure(&report, &csv, k, "mismatch", "out", "wrong");
        // The operands in the failure are the set's.
        let pos = f["inputs"]
            .as_array()
            .unwrap()
            .iter()
            .find(|i| i["port"] == "pos")
            .unwrap();
        assert_eq!(pos["hex"], csv.get(k, "pos"));
    }
}

/// A deterministic operand sequence of our own for "testbench-chosen" stimulus (a 32-bit LCG
/// with the common Numerical Recipes constants, from memory; any sequence would do).
fn lcg(state: &mut u32) -> u8 {
    *state = state.wrapping_mul(1_664_525).wrapping_add(1_013_904_223);
    (*state >> 24) as u8
}

#[test]
fn a_testbench_s_own_operands_are_checked_and_classified_without_vectors() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    let mut state = 42;
    let mut rows: Vec<(u8, u8, u8)> = (0..40)
        .map(|_| (lcg(&mut state), lcg(&mut state), lcg(&mut state) & 1))
        .collect();
    rows[3].0 = 0xff;
    rows[17].0 = 0xff;
    rows[30] = (0, 0, 0);
    let mut log = Table {
        header: ["a", "b", "cin", "y", "co", "ovf", "z", "n"]
            .map(String::from)
            .to_vec(),
        rows: Vec::new(),
    };
    for &(a, b, cin) in &rows {
        // Reference: Rust standard library u8::overflowing_add.
        let (s, c1) = a.overflowing_add(b);
        let (y, c2) = s.overflowing_add(cin);
        let co = (c1 || c2) as u8;
        log.rows.push(vec![
            format!("{a:02x}"),
            format!("{b:02x}"),
            cin.to_string(),
            format!("{y:02x}"),
            co.to_string(),
            co.to_string(),
            ((y == 0) as u8).to_string(),
            (y >> 7).to_string(),
        ]);
    }
    let file = sb.write("own.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &[], 0);
    let a_max = rows.iter().filter(|r| r.0 == 0xff).count() as u64;
    let a_zero = rows.iter().filter(|r| r.0 == 0).count() as u64;
    assert!(a_max >= 2 && a_zero >= 1);
    assert_json_includes(
        &report,
        &json!({"vectors": 40, "passed": 40, "verdict": "pass"}),
    );
    assert_eq!(u64_of(&class(&report, "a.max")["hits"]), a_max);
    assert_eq!(u64_of(&class(&report, "a.zero")["hits"]), a_zero);

    // A wrong row is reported with classes from the log's own operands.
    let mut bad = log.clone();
    *bad.cell(17, "z") = if bad.cell(17, "z") == "0" { "1" } else { "0" }.to_string();
    let file = sb.write("own_bad.csv", &bad.csv());
    let (_, report) = sb.check(&spec, &file, &[], 1);
    assert_eq!(failure_indices(&report), [17]);
    let f = &report["failures"][0];
    assert!(
        strings(&f["classes"]).contains(&"a.max".to_string()),
        "{f:#}"
    );
    assert_eq!(f["inputs"][0]["hex"], "ff");
}

#[test]
fn a_passing_log_short_of_required_coverage_exits_3() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "flow_adder", FLOW_ADDER);
    let mut log = csv.table(&["a", "b", "cin", "y", "co", "ovf", "z", "n"]);
    log.rows.truncate(5);
    let file = sb.write("first5.csv", &log.csv());
    let (run, report) = sb.check(&spec, &file, &["--require", "100"], 3);
    run.expect_stdout("COVERAGE SHORT");
    assert_json_includes(
        &report,
        &json!({"vectors": 5, "passed": 5, "verdict": "coverage_short",
                "gate": {"require": 100.0, "met": false}}),
    );
    let percent = report["coverage"]["percent"].as_f64().unwrap();
    assert!(percent > 0.0 && percent < 100.0, "{percent}");
    // A requirement at or below the achieved coverage is met.
    let (_, report) = sb.check(
        &spec,
        &file,
        &["--require", &format!("{}", percent.floor())],
        0,
    );
    assert_json_includes(&report, &json!({"verdict": "pass", "gate": {"met": true}}));
    // Failures outrank the gate: exit 1, not 3.
    let mut bad = log.clone();
    *bad.cell(2, "co") = if bad.cell(2, "co") == "0" { "1" } else { "0" }.to_string();
    let file = sb.write("first5_bad.csv", &bad.csv());
    let (_, report) = sb.check(&spec, &file, &["--require", "100"], 1);
    assert_eq!(report["verdict"], "fail");
}

/// The test cases of a JUnit file: (name, has a failure element).
fn junit_cases(xml: &str) -> Vec<(String, bool)> {
    let names = xml_elements(xml);
    assert_eq!(
        names.first().map(String::as_str),
        Some("testsuites"),
        "{xml}"
    );
    xml.split("<testcase ")
        .skip(1)
        .map(|case| {
            let name = case
                .split_once("name=\"")
                .and_then(|(_, rest)| rest.split_once('"'))
                .map(|(n, _)| n.to_string())
                .unwrap_or_else(|| panic!("a test case without a name: {case}"));
            let body = case.split("</testcase>").next().unwrap_or("");
            let closed_at_once = case.split('>').next().unwrap_or("").ends_with('/');
            (name, !closed_at_once && body.contains("<failure"))
        })
        .collect()
}

#[test]
fn junit_has_one_test_case_per_class_plus_log_completeness() {
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "reservoir_level", RESERVOIR_LEVEL);
    let file = sb.write("good.csv", &csv.perfect_log().csv());
    let (_, report) = sb.check(
        &spec,
        &file,
        &["--vectors", "vec", "--junit", "good.xml"],
        0,
    );
    let cases = junit_cases(&sb.read("good.xml"));
    let ids: Vec<String> = report["classes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["id"].as_str().unwrap().to_string())
        .collect();
    // The gate, one case per output port, one per class, then the log's completeness.
    let ports: Vec<String> = output_ports(&sb, "vec")
        .iter()
        .map(|p| format!("output.{p}"))
        .collect();
    let mut want = vec!["gate".to_string()];
    want.extend(ports.iter().cloned());
    want.extend(ids.iter().cloned());
    want.push("log.complete".into());
    let names: Vec<String> = cases.iter().map(|c| c.0.clone()).collect();
    assert_eq!(
        names, want,
        "the gate, one test case per output port and per class, then the log's completeness"
    );
    assert!(
        cases.iter().all(|c| !c.1),
        "a perfect log has no failing test case"
    );

    // One corrupted row: exactly its classes fail.
    let k = first_random(&sb);
    let mut log = csv.perfect_log();
    let v = log.cell(k, "delta").clone();
    *log.cell(k, "delta") = flip_hex_bit(&v, 3);
    let file = sb.write("bad.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &["--vectors", "vec", "--junit", "bad.xml"], 1);
    let cases = junit_cases(&sb.read("bad.xml"));
    assert_eq!(cases.len(), want.len());
    let failing: Vec<String> = cases.iter().filter(|c| c.1).map(|c| c.0.clone()).collect();
    assert_eq!(
        failing[..2],
        ["gate".to_string(), "output.delta".to_string()]
    );
    let mut failing_sorted = failing[2..].to_vec();
    failing_sorted.sort();
    assert_eq!(failing_sorted, csv.classes(k));
    assert_eq!(failing_sorted, strings(&report["failures"][0]["classes"]));

    // A missing row fails the completeness case.
    let mut log = csv.perfect_log();
    log.rows.remove(3);
    let file = sb.write("gap.csv", &log.csv());
    sb.check(&spec, &file, &["--vectors", "vec", "--junit", "gap.xml"], 1);
    let cases = junit_cases(&sb.read("gap.xml"));
    assert_eq!(cases.last().unwrap(), &("log.complete".to_string(), true));
}

/// Finds a program on PATH.
fn on_path(program: &str) -> bool {
    std::env::var_os("PATH")
        .is_some_and(|paths| std::env::split_paths(&paths).any(|dir| dir.join(program).is_file()))
}

/// A testbench of our own: reads stimulus.hex, computes the flow_adder's outputs
/// behaviourally, and writes a hex log (%h) and a binary log (%b) with a few unknowns.
const ICARUS_BENCH: &str = r#"module flow_adder_bench;
  parameter N = 1;
  reg [16:0] stim [0:N-1];
  reg [7:0] a, b, y;
  reg cin, co, ovf, zf, neg;
  integer i, fh, fb;
  initial begin
    $readmemh("vec/stimulus.hex", stim);
    fh = $fopen("sim_hex.log", "w");
    fb = $fopen("sim_bin.log", "w");
    $fdisplay(fh, "index a b cin y co ovf z n");
    $fdisplay(fb, "index a b cin y co ovf z n");
    for (i = 0; i < N; i = i + 1) begin
      {a, b, cin} = stim[i];
      {co, y} = a + b + cin;
      ovf = co; zf = (y == 8'd0); neg = y[7];
      if (i == 3) y[0] = 1'bx;
      if (i == 5) y = 8'bz;
      if (i == 7) co = 1'bx;
      if (i == 9) y[7:4] = 4'bxxxx;
      if (i == 11) begin y[7] = ~y[7]; y[0] = 1'bx; end
      $fdisplay(fh, "%0d %h %h %h %h %h %h %h %h", i, a, b, cin, y, co, ovf, zf, neg);
      $fdisplay(fb, "%0d %b %b %b %b %b %b %b %b", i, a, b, cin, y, co, ovf, zf, neg);
    end
    $fclose(fh);
    $fclose(fb);
    $finish;
  end
endmodule
"#;

#[test]
fn icarus_logs_with_x_and_z_are_checked() {
    if !on_path("iverilog") || !on_path("vvp") {
        assert!(
            std::env::var_os("CI").is_none(),
            "iverilog/vvp are not on PATH and CI is set: the simulator test must run in CI"
        );
        eprintln!("**************** SKIPPED icarus_logs_with_x_and_z_are_checked: iverilog not on PATH ****************");
        return;
    }
    let sb = Sandbox::new();
    let (spec, csv) = set_up(&sb, "flow_adder", FLOW_ADDER);
    let n = csv.rows.len();
    sb.write("bench.v", ICARUS_BENCH);
    let status = std::process::Command::new("iverilog")
        .args([
            "-o",
            "bench.vvp",
            &format!("-Pflow_adder_bench.N={n}"),
            "bench.v",
        ])
        .current_dir(sb.root())
        .status()
        .expect("run iverilog");
    assert!(status.success(), "iverilog failed");
    let out = std::process::Command::new("vvp")
        .args(["-n", "bench.vvp"])
        .current_dir(sb.root())
        .output()
        .expect("run vvp");
    assert!(
        out.status.success(),
        "vvp failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );

    // What the log should hold, per IEEE 1364-2005 17.1.1.3 (from memory; the log reader's
    // documentation records the same rules as confirmed against Icarus 11): in %h a digit
    // whose bits are all x prints "x", all z prints "z", and a digit with only some x bits
    // prints "X"; %b prints each bit.
    let hex = sb.read("sim_hex.log");
    let y_of = |line: usize| {
        hex.lines()
            .nth(line + 1)
            .unwrap()
            .split(' ')
            .nth(4)
            .unwrap()
            .to_string()
    };
    assert!(y_of(3).ends_with('X'), "row 3 y: {}", y_of(3));
    assert_eq!(y_of(5), "zz");
    assert!(y_of(9).starts_with('x'), "row 9 y: {}", y_of(9));
    let bin = sb.read("sim_bin.log");
    let y3 = bin.lines().nth(4).unwrap().split(' ').nth(4).unwrap();
    assert!(
        y3.ends_with('x') && y3[..7].chars().all(|c| c == '0' || c == '1'),
        "{y3}"
    );

    let (_, report) = sb.check(&spec, "sim_hex.log", &["--vectors", "vec"], 1);
    let (_, report_bin) = sb.check(
        &spec,
        "sim_bin.log",
        &["--vectors", "vec", "--radix", "bin"],
        1,
    );
    for (r, y3_unknown) in [(&report, json!([0, 1, 2, 3])), (&report_bin, json!([0]))] {
        assert_json_includes(
            r,
            &json!({"vectors": n, "passed": n - 5, "failed": 1, "unknown": 4,
                    "log_problems": {"missing": 0, "out_of_step": null}}),
        );
        assert_eq!(failure_indices(r), [3, 5, 7, 9, 11]);
        let unknown_bits = |i: usize, port: &str| -> Value {
            r["failures"][i]["outputs"]
                .as_array()
                .unwrap()
                .iter()
                .find(|o| o["port"] == port)
                .unwrap()["unknown_bits"]
                .clone()
        };
        let kinds: Vec<&str> = r["failures"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| f["kind"].as_str().unwrap())
            .collect();
        // Row 11 has a wrong known bit next to an unknown one: a wrong bit is a mismatch.
        assert_eq!(
            kinds,
            ["unknown", "unknown", "unknown", "unknown", "mismatch"]
        );
        assert_eq!(unknown_bits(0, "y"), y3_unknown);
        assert_eq!(unknown_bits(1, "y"), json!([0, 1, 2, 3, 4, 5, 6, 7]));
        assert_eq!(unknown_bits(2, "co"), json!([0]));
        assert_eq!(unknown_bits(3, "y"), json!([4, 5, 6, 7]));
        for (i, k) in [3usize, 5, 7, 9, 11].into_iter().enumerate() {
            assert_eq!(
                strings(&r["failures"][i]["classes"]),
                csv.classes(k),
                "row {k}"
            );
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(24))]

    /// For random specs and random single-bit corruptions of a perfect log, the failures
    /// reported are exactly the corrupted rows.
    #[test]
    fn failures_are_exactly_the_corrupted_rows(
        op in 0..OPERATIONS.len(),
        enc in 0..ENCODINGS.len(),
        width in 1u32..=70,
        count in 0u64..8,
        seed in any::<u64>(),
        indexed in any::<bool>(),
        spaces in any::<bool>(),
        picks in proptest::collection::vec((any::<u32>(), any::<u32>(), any::<u32>()), 1..8),
    ) {
        let sb = Sandbox::new();
        let text = spec_text("prop_unit", OPERATIONS[op], ENCODINGS[enc], width, count, seed);
        let (spec, csv) = set_up(&sb, "prop_unit", &text);
        let widths = port_widths(&sb, "vec");
        let outputs = output_ports(&sb, "vec");
        let mut log = if indexed {
            csv.perfect_log()
        } else {
            let ports = csv.ports();
            csv.table(&ports.iter().map(String::as_str).collect::<Vec<_>>())
        };
        // One corruption per row (two flips of one row could cancel out).
        let mut corrupted: BTreeMap<usize, (String, u32)> = BTreeMap::new();
        for (r, f, b) in picks {
            let row = r as usize % log.rows.len();
            let port = outputs[f as usize % outputs.len()].clone();
            let bit = b % widths[&port];
            corrupted.entry(row).or_insert((port, bit));
        }
        for (&row, (port, bit)) in &corrupted {
            let v = log.cell(row, port).clone();
            *log.cell(row, port) = flip_hex_bit(&v, *bit);
        }
        let file = sb.write("corrupt.log", &log.render(if spaces { " " } else { "," }));
        let (_, report) = sb.check(&spec, &file, &["--vectors", "vec", "--max-failures", "1000000"], 1);
        let got: BTreeSet<u64> = failure_indices(&report).into_iter().collect();
        let want: BTreeSet<u64> = corrupted.keys().map(|&k| k as u64).collect();
        prop_assert_eq!(&got, &want, "spec:\n{}\ncorruptions: {:?}", text, corrupted);
        prop_assert_eq!(u64_of(&report["failed"]), want.len() as u64);
        prop_assert_eq!(u64_of(&report["passed"]), (csv.rows.len() - want.len()) as u64);
        for f in report["failures"].as_array().unwrap() {
            let k = u64_of(&f["index"]) as usize;
            let (port, bit) = &corrupted[&k];
            let o = f["outputs"].as_array().unwrap().iter().find(|o| &o["port"] == port).unwrap();
            prop_assert_eq!(&o["differing_bits"], &json!([bit]));
            prop_assert_eq!(strings(&f["classes"]), csv.classes(k));
        }
    }
}

/// Issue 9 item 17: without --vectors the repro commands still carry --seed.
#[test]
fn issue9_repro_commands_without_vectors_carry_the_seed() {
    let sb = crate::util::Sandbox::new();
    let spec = sb.write("flow_adder.toml", crate::util::FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let mut log = crate::util::VectorCsv::read(&sb, "vec").perfect_log();
    let y = log.cell(3, "y").clone();
    *log.cell(3, "y") = crate::util::flip_hex_bit(&y, 0);
    let file = sb.write("bad.csv", &log.csv());
    let (_, report) = sb.check(&spec, &file, &[], 1);
    let repro = report["failures"][0]["repro"].as_str().expect("repro");
    assert!(repro.contains("--seed 5"), "{repro}");
}

/// Issue 9 item 17: a signed decimal in a value column is a value in the spec's encoding:
/// -1 on an 8-bit sign-magnitude unit is 0x81 (sign bit and magnitude 1; common practice, no
/// source), not the two's-complement 0xff.
#[test]
fn issue9_signed_decimals_are_encoded_in_the_specs_encoding() {
    let sb = crate::util::Sandbox::new();
    let text = crate::util::spec_text("signed_trim", "add", "signmag", 8, 0, 1);
    let spec = sb.write("signed_trim.toml", &text);
    // -1 + -0 = -1: a = 0x81, b = 0x80, result 0x81, no overflow, not zero, negative.
    sb.write(
        "dec.csv",
        "op_a,op_b,res,ovf,zf,nf\n-1,-0,-1,0,0,1\n129,128,129,0,0,1\n",
    );
    let (_, report) = sb.check(&spec, "dec.csv", &["--radix", "dec"], 0);
    assert_eq!(report["passed"], 2, "{report}");
    // Out of the encoding's range: -128 does not exist in 8-bit sign-magnitude.
    sb.write("low.csv", "op_a,op_b,res,ovf,zf,nf\n-128,0,-128,0,0,1\n");
    sb.run(&["check", &spec, "--log", "low.csv", "--radix", "dec"])
        .expect_code(2)
        .expect_stderr("signmag range");
}

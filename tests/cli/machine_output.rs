//! Issue 14: every machine-readable output is exactly one document. For each subcommand the
//! binary lists, every `--format` value its help offers that is a machine format (json, csv)
//! is run, with and without `--quiet` and with the options that add human lines (such as
//! `grade --compact`), and standard output must parse as one JSON value or one rectangular
//! CSV table. Reports written to files (`check --json FILE`, `merge -o FILE`) are held to the
//! same rule. A new subcommand or format fails the test until it is listed here.

use serde_json::Value;

use crate::util::{Run, Sandbox, FLOW_ADDER};

/// The machine formats, and how to parse each.
const MACHINE_FORMATS: [&str; 2] = ["json", "csv"];

/// The `--format` values a subcommand's help offers (empty when it has no `--format`).
fn format_values(sb: &Sandbox, command: &str) -> Vec<String> {
    let help = sb.run(&[command, "--help"]);
    help.expect_code(0);
    // Short help puts the values on the option's line; long help (when some option of the
    // command has a multi-line description) on a line of their own below it.
    let lines: Vec<&str> = help.stdout.lines().collect();
    let Some(start) = lines
        .iter()
        .position(|l| l.trim_start().starts_with("--format"))
    else {
        return Vec::new();
    };
    let values = lines[start..]
        .iter()
        .take_while(|l| *l == &lines[start] || !l.trim_start().starts_with('-'))
        .find_map(|l| l.split("[possible values: ").nth(1))
        .unwrap_or_else(|| {
            panic!(
                "no possible values under {command}'s --format line: {}",
                lines[start]
            )
        });
    values
        .trim_end_matches(']')
        .split(',')
        .map(|v| v.trim().to_string())
        .collect()
}

/// The subcommands `arithvec --help` lists.
fn subcommands(sb: &Sandbox) -> Vec<String> {
    let help = sb.run(&["--help"]);
    help.expect_code(0);
    help.stdout
        .lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        .filter_map(|l| l.split_whitespace().next())
        .filter(|c| *c != "help")
        .map(str::to_string)
        .collect()
}

/// Asserts that `text` is exactly one document of `format`.
#[track_caller]
fn assert_one_document(format: &str, text: &str, run: &Run) {
    match format {
        "json" => {
            if let Err(e) = serde_json::from_str::<Value>(text) {
                panic!("stdout is not one JSON document ({e})\n{}", run.describe());
            }
        }
        "csv" => {
            let mut reader = csv::ReaderBuilder::new()
                .has_headers(true)
                .from_reader(text.as_bytes());
            let columns = reader
                .headers()
                .unwrap_or_else(|e| panic!("no CSV header ({e})\n{}", run.describe()))
                .len();
            assert!(columns > 1, "a one-column CSV header\n{}", run.describe());
            let mut rows = 0;
            for record in reader.records() {
                let record = record
                    .unwrap_or_else(|e| panic!("not one CSV table ({e})\n{}", run.describe()));
                assert_eq!(record.len(), columns, "ragged CSV\n{}", run.describe());
                rows += 1;
            }
            assert!(rows > 0, "a CSV table without rows\n{}", run.describe());
        }
        other => panic!("no parser for machine format {other}"),
    }
}

/// A 4-bit unsigned ripple adder with the ports arithvec's built-in structural model has.
const GRADED_ADDER: &str = r#"name = "graded_adder"
operation = "add"
width = 4
encoding = "unsigned"

[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "y"
carry_out = "co"

[random]
count = 40
seed = 9
"#;

/// A 1-bit unsigned adder whose netlist is wrong (y = a AND b), so grading stops.
const ONE_BIT_ADDER: &str = r#"name = "tiny_adder"
operation = "add"
width = 1
encoding = "unsigned"

[ports]
a = "a"
b = "b"
result = "y"
carry_out = "co"

[random]
count = 4
seed = 1

[dut]
module = "tiny_adder"
"#;

const WRONG_NETLIST: &str = r#"{"modules": {"tiny_adder": {
  "ports": {
    "a": {"direction": "input", "bits": [2]},
    "b": {"direction": "input", "bits": [3]},
    "y": {"direction": "output", "bits": [4]},
    "co": {"direction": "output", "bits": [5]}
  },
  "cells": {
    "g1": {"type": "$_AND_", "connections": {"A": [2], "B": [3], "Y": [4]}},
    "g2": {"type": "$_AND_", "connections": {"A": [2], "B": [3], "Y": [5]}}
  },
  "netnames": {}
}}}"#;

/// The same 1-bit adder done right (y = a XOR b, co = a AND b), so `prove` proves it.
const RIGHT_NETLIST: &str = r#"{"modules": {"tiny_adder": {
  "ports": {
    "a": {"direction": "input", "bits": [2]},
    "b": {"direction": "input", "bits": [3]},
    "y": {"direction": "output", "bits": [4]},
    "co": {"direction": "output", "bits": [5]}
  },
  "cells": {
    "g1": {"type": "$_XOR_", "connections": {"A": [2], "B": [3], "Y": [4]}},
    "g2": {"type": "$_AND_", "connections": {"A": [2], "B": [3], "Y": [5]}}
  },
  "netnames": {}
}}}"#;

/// The runs of `command` in `format`: each is (arguments, expected exit code).
fn runs_of(command: &str, format: &str) -> Vec<(Vec<String>, i32)> {
    let s = |v: &[&str]| v.iter().map(|x| x.to_string()).collect::<Vec<_>>();
    match command {
        "classes" => vec![
            (s(&["classes", "adder.toml", "--format", format]), 0),
            (s(&["classes", "adder.toml", "--bins", "--format", format]), 0),
        ],
        "repro" => vec![
            (s(&["repro", "adder.toml", "--index", "3", "--format", format]), 0),
            (s(&["repro", "adder.toml", "--index", "30", "--format", format]), 0),
        ],
        "grade" => vec![
            (s(&["grade", "graded.toml", "--vectors", "graded", "--builtin", "--format", format]), 0),
            (
                s(&[
                    "grade", "graded.toml", "--vectors", "graded", "--builtin", "--compact", "--out",
                    "vec-min", "--format", format,
                ]),
                0,
            ),
            (
                s(&[
                    "grade", "tiny.toml", "--vectors", "tiny", "--netlist", "wrong.json",
                    "--format", format,
                ]),
                1,
            ),
            (
                s(&[
                    "grade", "graded.toml", "--vectors", "graded", "--builtin", "--top-up",
                    "--format", format,
                ]),
                0,
            ),
        ],
        "prove" => vec![
            (s(&["prove", "tiny.toml", "--netlist", "right.json", "--format", format]), 0),
            (s(&["prove", "tiny.toml", "--netlist", "wrong.json", "--format", format]), 1),
        ],
        other => panic!(
            "subcommand {other} offers --format {format}: add its runs to tests/cli/machine_output.rs"
        ),
    }
}

#[test]
fn issue14_every_machine_format_of_every_command_is_one_document() {
    let sb = Sandbox::new();
    sb.write("adder.toml", FLOW_ADDER);
    sb.gen("adder.toml", "vec", &[]);
    sb.write("graded.toml", GRADED_ADDER);
    sb.gen("graded.toml", "graded", &[]);
    sb.write("tiny.toml", ONE_BIT_ADDER);
    sb.gen("tiny.toml", "tiny", &[]);
    sb.write("wrong.json", WRONG_NETLIST);
    sb.write("right.json", RIGHT_NETLIST);
    let mut ran = 0;
    let mut commands = subcommands(&sb);
    commands.sort();
    assert!(
        commands.len() >= 7 && commands.contains(&"grade".to_string()),
        "could not read the subcommands from --help: {commands:?}"
    );
    for command in &commands {
        for format in format_values(&sb, command) {
            if !MACHINE_FORMATS.contains(&format.as_str()) {
                continue;
            }
            for (args, code) in runs_of(command, &format) {
                for quiet in [false, true] {
                    let mut args: Vec<&str> = args.iter().map(String::as_str).collect();
                    if quiet {
                        args.push("--quiet");
                    }
                    let run = sb.run(&args);
                    run.expect_code(code);
                    assert_one_document(&format, &run.stdout, &run);
                    ran += 1;
                }
            }
        }
    }
    // classes json x2, repro csv x2, grade json x3; each with and without --quiet.
    assert!(ran >= 14, "only {ran} machine-format runs");
}

#[test]
fn issue14_grade_compaction_is_in_the_json_document() {
    let sb = Sandbox::new();
    sb.write("graded.toml", GRADED_ADDER);
    sb.gen("graded.toml", "graded", &[]);
    let run = sb.run(&[
        "grade",
        "graded.toml",
        "--vectors",
        "graded",
        "--builtin",
        "--compact",
        "--out",
        "min",
        "--format",
        "json",
    ]);
    run.expect_code(0);
    let doc: Value = serde_json::from_str(&run.stdout).expect("one JSON document");
    let c = &doc["compaction"];
    let before = c["before"].as_u64().expect("compaction.before");
    let after = c["after"].as_u64().expect("compaction.after");
    assert_eq!(before, doc["vectors"].as_u64().unwrap(), "{}", run.stdout);
    assert!(0 < after && after < before, "{}", run.stdout);
    assert!(
        c["method"].as_str().unwrap().contains("greedy set cover"),
        "{}",
        run.stdout
    );
    // The written set holds exactly `after` vectors.
    assert_eq!(
        sb.json("min/manifest.json")["vectors"].as_u64(),
        Some(after)
    );
    // Without --compact there is no compaction object.
    let plain = sb.run(&[
        "grade",
        "graded.toml",
        "--vectors",
        "graded",
        "--builtin",
        "--format",
        "json",
    ]);
    let doc: Value = serde_json::from_str(&plain.stdout).expect("one JSON document");
    assert!(doc.get("compaction").is_none(), "{}", plain.stdout);
}

#[test]
fn issue14_grade_not_the_spec_is_a_json_document_in_json_mode() {
    let sb = Sandbox::new();
    sb.write("tiny.toml", ONE_BIT_ADDER);
    sb.gen("tiny.toml", "tiny", &[]);
    sb.write("wrong.json", WRONG_NETLIST);
    let run = sb.run(&[
        "grade",
        "tiny.toml",
        "--vectors",
        "tiny",
        "--netlist",
        "wrong.json",
        "--format",
        "json",
    ]);
    run.expect_code(1);
    let doc: Value = serde_json::from_str(&run.stdout).expect("one JSON document");
    assert_eq!(doc["status"], "not_the_spec", "{}", run.stdout);
    let first = &doc["disagreements"][0];
    assert!(
        first["index"].is_u64() && first["port"].is_string(),
        "{}",
        run.stdout
    );
    // The table format keeps the text.
    let text = sb.run(&[
        "grade",
        "tiny.toml",
        "--vectors",
        "tiny",
        "--netlist",
        "wrong.json",
    ]);
    text.expect_code(1)
        .expect_stdout("does not reproduce the golden model");
}

#[test]
fn issue14_reports_written_to_files_are_one_document() {
    let sb = Sandbox::new();
    sb.write("adder.toml", FLOW_ADDER);
    sb.gen("adder.toml", "vec", &[]);
    let csv = crate::util::VectorCsv::read(&sb, "vec");
    sb.write("log.csv", &csv.perfect_log().csv());
    for quiet in [false, true] {
        let mut args = vec![
            "check",
            "adder.toml",
            "--log",
            "log.csv",
            "--json",
            "r.json",
        ];
        if quiet {
            args.push("-q");
        }
        sb.run(&args).expect_code(0);
        let text = sb.read("r.json");
        serde_json::from_str::<Value>(&text).expect("check --json writes one document");
        // One report: merging the same run twice is refused (issue 9 item 9).
        let mut args = vec!["merge", "r.json", "-o", "m.json"];
        if quiet {
            args.push("-q");
        }
        let merge = sb.run(&args);
        assert!(merge.code == 0 || merge.code == 1, "{}", merge.describe());
        serde_json::from_str::<Value>(&sb.read("m.json")).expect("merge -o writes one document");
    }
}

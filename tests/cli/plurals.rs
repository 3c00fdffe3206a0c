//! Issue 9 item 20: counts in report text read correctly in the singular ("1 mismatch",
//! "1 vector"), and long runs show a progress bar with its total on a terminal only.

use std::process::Command;

use crate::support::{skipped, tool_found, BIN};
use crate::util::{Sandbox, VectorCsv, FLOW_ADDER};

/// One wrong carry flag and one row left out: the verdict line and the missing-rows line say
/// "1 mismatch" and "1 vector", never "1 mismatches" or "1 vectors".
#[test]
fn issue9_one_mismatch_and_one_missing_row_read_in_the_singular() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let mut log = VectorCsv::read(&sb, "vec").perfect_log();
    let total = log.rows.len();
    let v = log.cell(3, "co");
    *v = if v == "0" { "1" } else { "0" }.to_string();
    log.rows.remove(8);
    let file = sb.write("one_each.csv", &log.csv());

    let (run, report) = sb.check(&spec, &file, &["--vectors", "vec"], 1);
    let reason = format!(
        "FAIL: log incomplete ({} of {total} rows); 1 mismatch (co: 1);",
        total - 1
    );
    run.expect_stdout(&reason);
    assert_eq!(report["verdict_reasons"][1], "1 mismatch (co: 1)");
    let full = sb.run(&["check", &spec, "--log", &file, "--vectors", "vec"]);
    full.expect_code(1)
        .expect_stdout("log is missing 1 vector of the set");
    for wrong in ["1 mismatches", "1 vectors", "1 rows"] {
        assert!(
            !full.stdout.contains(wrong),
            "{wrong:?} in\n{}",
            full.describe()
        );
    }
}

/// A shard holding a single vector: `gen` says "wrote 1 vector", not "1 vectors".
#[test]
fn issue9_gen_of_one_vector_says_vector() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "all", &[]);
    let total = VectorCsv::read(&sb, "all").rows.len();
    let shard = format!("0/{total}");
    sb.run(&["gen", &spec, "--out", "one", "--shard", &shard])
        .expect_code(0)
        .expect_stdout("wrote 1 vector (");
}

/// A 32-bit two's-complement adder with enough random vectors that grading it is a long run
/// (fault classes x vectors above the bar's threshold).
const PUMP_ADDER: &str = "name = \"pump_adder\"\noperation = \"add\"\nwidth = 32\n\
encoding = \"twos\"\n\n[ports]\na = \"a\"\nb = \"b\"\ncarry_in = \"cin\"\nresult = \"y\"\n\
carry_out = \"co\"\noverflow = \"ovf\"\n\n[random]\ncount = 20000\nseed = 1\n";

/// `grade` on a terminal draws a bar of fault classes with its total; with stderr a pipe, or
/// under -q, there is no bar. The terminal is a pseudo-terminal from util-linux `script`.
#[test]
fn issue9_grade_shows_a_bar_with_its_total_on_a_terminal_only() {
    if !tool_found("script") {
        skipped("script (util-linux) not found: no pseudo-terminal for the progress bar test");
        return;
    }
    let sb = Sandbox::new();
    let spec = sb.write("pump_adder.toml", PUMP_ADDER);
    sb.gen(&spec, "vec", &[]);
    let piped = sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "vec",
        "--builtin",
        "--format",
        "json",
    ]);
    piped.expect_code(0);
    let classes = piped.json()["collapsed"]
        .as_u64()
        .expect("collapsed count in the grade report");
    assert!(classes > 100, "{}", piped.describe());
    let bar = format!("/{classes} fault classes");
    assert!(
        !piped.stderr.contains("fault classes"),
        "{}",
        piped.describe()
    );

    let on_terminal = |extra: &str| {
        let command =
            format!("'{BIN}' {extra} grade {spec} --vectors vec --builtin --threads 1 > /dev/null");
        let out = Command::new("script")
            .args(["-qc", &command, "/dev/null"])
            .current_dir(sb.root())
            .env("TERM", "xterm")
            .output()
            .expect("start script");
        assert!(out.status.success(), "script failed: {out:?}");
        String::from_utf8_lossy(&out.stdout).into_owned()
    };
    let shown = on_terminal("");
    assert!(shown.contains(&bar), "no {bar:?} on the terminal:\n{shown}");
    let quiet = on_terminal("-q");
    assert!(!quiet.contains("fault classes"), "a bar under -q:\n{quiet}");
}

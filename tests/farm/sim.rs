//! Simulator plumbing for the farm tests: the level_delta example unit and its ripple-borrow
//! DUT, an Icarus run of a testbench, and the report fields a merged run must reproduce.

use std::io::Write as _;
use std::process::{Command, Stdio};

use serde_json::Value;

use crate::util::Sandbox;

/// The repository root.
pub const ROOT: &str = env!("CARGO_MANIFEST_DIR");

/// A file of the project's reference hardware.
pub fn hdl(name: &str) -> String {
    format!("{ROOT}/tests/hdl/{name}")
}

/// The DUT sources of the level_delta example (a 16-bit ripple-borrow subtractor).
pub fn level_delta_dut() -> Vec<String> {
    vec![hdl("ripple_sub.v"), hdl("full_subtractor.v")]
}

/// The level_delta example spec (DUT `ripple_sub`) with `count` random vectors, written to
/// `level_delta.toml` in the sandbox.
pub fn level_delta(sb: &Sandbox, count: u64) -> String {
    let text = std::fs::read_to_string(format!("{ROOT}/vector-sets/level_delta/level_delta.toml"))
        .expect("read the level_delta example");
    assert!(text.contains("count = 2000"), "the example's count moved");
    sb.write(
        "level_delta.toml",
        &text.replace("count = 2000", &format!("count = {count}")),
    )
}

/// True when `tool` starts. Under CI (the `CI` variable set) a missing tool panics; otherwise
/// the test prints `*** SKIPPED: <tool> not found ***` and returns false.
pub fn require(tool: &str) -> bool {
    let flag = if tool == "iverilog" || tool == "vvp" {
        "-V"
    } else {
        "--version"
    };
    let found = Command::new(tool)
        .arg(flag)
        .stdin(Stdio::null())
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok();
    if found {
        return true;
    }
    if std::env::var_os("CI").is_some() {
        panic!("{tool} not found on PATH and CI is set: the farm tests must run in CI");
    }
    let _ = writeln!(std::io::stderr(), "\n*** SKIPPED: {tool} not found ***\n");
    false
}

/// Runs `program args` in the sandbox, panicking with its output when it fails.
#[track_caller]
pub fn run_ok(sb: &Sandbox, program: &str, args: &[&str]) -> String {
    let out = Command::new(program)
        .args(args)
        .current_dir(sb.root())
        .output()
        .unwrap_or_else(|e| panic!("start {program}: {e}"));
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        out.status.success(),
        "{program} {} failed ({}):\n{text}",
        args.join(" "),
        out.status
    );
    text
}

/// Writes the Verilog testbench of set `dir`, simulates the DUT on it with Icarus Verilog 11
/// and returns the log's name (`<dir>.csv`).
pub fn icarus(sb: &Sandbox, spec: &str, dir: &str, dut: &[String]) -> String {
    let tb = format!("{dir}_tb.v");
    sb.run(&["testbench", spec, "--vectors", dir, "-o", &tb, "-q"])
        .expect_code(0);
    let sim = format!("{dir}_sim");
    let mut args = vec!["-g2005", "-o", &sim, &tb];
    args.extend(dut.iter().map(String::as_str));
    run_ok(sb, "iverilog", &args);
    let log = format!("{dir}.csv");
    run_ok(
        sb,
        "vvp",
        &[
            "-n",
            &sim,
            &format!("+stimulus={dir}/stimulus.hex"),
            &format!("+results={log}"),
        ],
    );
    log
}

/// The fields of a report that a merge of shard runs must reproduce exactly from one
/// unsharded run: counts, classes, bins and the seen indices, and the verdict.
pub const SAME_AS_UNSHARDED: [&str; 11] = [
    "spec_sha256",
    "vectors",
    "passed",
    "failed",
    "unknown",
    "coverage",
    "classes",
    "counts",
    "seen",
    "log_problems",
    "verdict",
];

/// Asserts that `merged` equals `whole` in every field of [`SAME_AS_UNSHARDED`].
#[track_caller]
pub fn assert_same_as_unsharded(merged: &Value, whole: &Value) {
    for key in SAME_AS_UNSHARDED {
        assert_eq!(
            merged[key], whole[key],
            "merged report's {key} differs from the unsharded run's\n--- merged ---\n{}\n--- unsharded ---\n{}",
            merged[key], whole[key]
        );
    }
}

//! Issue 9, item 22: a self-checking testbench run without its expected file says what is
//! missing and how to give it, and reports a mismatch per output port (not as packed words).
//! Runs on Icarus Verilog (and GHDL for the VHDL message); a missing simulator is SKIPPED
//! loudly, and fails under CI.

#[path = "support/mod.rs"]
mod support;

use std::path::Path;
use std::process::Command;

use support::{hdl, require_tools, Sandbox};

fn root(rel: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join(rel)
        .display()
        .to_string()
}

/// Runs a program in the sandbox; returns (exit code, stdout + stderr).
fn run(sb: &Sandbox, program: &str, args: &[&str]) -> (i32, String) {
    let out = Command::new(program)
        .args(args)
        .current_dir(sb.root())
        .output()
        .unwrap_or_else(|e| panic!("start {program}: {e}"));
    (
        out.status.code().unwrap_or(-1),
        format!(
            "{}{}",
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr)
        ),
    )
}

#[test]
fn issue9_self_check_names_a_missing_expected_file_and_reports_per_port() {
    if !require_tools(&["iverilog", "vvp", "ghdl"]) {
        return;
    }
    let sb = Sandbox::new();
    let spec = root("vector-sets/level_delta/level_delta.toml");
    let vectors = root("vector-sets/level_delta/vectors");
    let bug = sb.write(
        "bug.toml",
        &std::fs::read_to_string(&spec)
            .expect("read the spec")
            .replace(
                "module = \"ripple_sub\"",
                "module = \"ripple_sub_bug_chain\"",
            ),
    );
    sb.run(&[
        "testbench",
        &bug,
        "--vectors",
        &vectors,
        "-o",
        "tb.v",
        "--self-check",
    ])
    .expect_code(0);
    let dut = hdl("bugs/ripple_sub_bug_chain.v").display().to_string();
    let cell = hdl("full_subtractor.v").display().to_string();
    sb.tool("iverilog", &["-g2005", "-o", "sim", "tb.v", &dut, &cell]);
    let stimulus = format!("+stimulus={vectors}/stimulus.hex");

    // No +expected, and no expected.hex in the working directory.
    let (code, text) = run(&sb, "vvp", &["-n", "sim", &stimulus, "+results=r.csv"]);
    assert_ne!(code, 0, "{text}");
    assert!(
        text.contains("cannot read the expected file expected.hex")
            && text.contains("+expected=DIR/expected.hex"),
        "the message says what is missing and how to give it:\n{text}"
    );

    // With it: one line per differing port, named as the DUT names it.
    let expected = format!("+expected={vectors}/expected.hex");
    let (code, text) = run(
        &sb,
        "vvp",
        &["-n", "sim", &stimulus, "+results=r.csv", &expected],
    );
    assert_ne!(code, 0, "the broken DUT fails its self-check:\n{text}");
    let lines: Vec<&str> = text
        .lines()
        .filter(|l| l.starts_with("arithvec-tb: vector "))
        .collect();
    assert!(!lines.is_empty(), "{text}");
    for line in &lines {
        let port = line
            .split(": ")
            .nth(2)
            .and_then(|rest| rest.split(" = ").next())
            .unwrap_or_else(|| panic!("a line without a port: {line}"));
        assert!(["y", "co", "ovf", "zero", "neg"].contains(&port), "{line}");
        assert!(line.contains(", expected "), "{line}");
    }
    assert!(
        lines.iter().any(|l| l.contains(": y = ")),
        "the result port is named:\n{text}"
    );

    // The VHDL testbench names the generic.
    sb.run(&[
        "testbench",
        &spec,
        "--vectors",
        &vectors,
        "--hdl",
        "vhdl",
        "-o",
        "tb_level_delta.vhd",
        "--self-check",
    ])
    .expect_code(0);
    sb.tool(
        "ghdl",
        &[
            "-a",
            "--std=08",
            &hdl("vhdl/full_subtractor.vhd").display().to_string(),
            &hdl("vhdl/ripple_sub.vhd").display().to_string(),
            "tb_level_delta.vhd",
        ],
    );
    sb.tool("ghdl", &["-e", "--std=08", "tb_level_delta"]);
    let (code, text) = run(
        &sb,
        "ghdl",
        &[
            "-r",
            "--std=08",
            "tb_level_delta",
            &format!("-gstimulus={vectors}/stimulus.hex"),
            "-gresults=g.csv",
        ],
    );
    assert_ne!(code, 0, "{text}");
    assert!(
        text.contains("cannot open expected.hex (the expected file)")
            && text.contains("-gexpected=DIR/expected.hex"),
        "{text}"
    );
}

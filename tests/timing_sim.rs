//! Clocked units (issue 10, `[timing]`) on real simulators: the pipelined add/subtract unit
//! and the bit-serial valid/ready adder of `tests/hdl/timing`, at widths 8, 32 and 72, through
//! gen, the clocked testbench, Icarus Verilog 11 / Verilator 5 (`--binary --timing`) / GHDL 2,
//! and check; and each injected bug caught with its reason. A missing simulator is an error
//! under CI and a loud skip elsewhere (tests/support).

#[path = "support/mod.rs"]
mod support;

use serde_json::Value;
use support::{hdl, require_tool, Sandbox};

/// The unit's spec at `width`, with `BUG` set on the DUT (0: the correct unit).
fn spec_text(unit: &str, width: u32, bug: u32) -> String {
    let text = std::fs::read_to_string(hdl(&format!("timing/{unit}.toml"))).unwrap();
    let text = text.replace("width = 8", &format!("width = {width}"));
    let text = text.replace("W = 8 }", &format!("W = {width}, BUG = {bug} }}"));
    if unit == "serial_add" {
        text.replace("latency = 8", &format!("latency = {width}"))
    } else {
        text
    }
}

#[derive(Clone, Copy, PartialEq)]
enum Sim {
    Icarus,
    Verilator,
    Ghdl,
}

/// Runs gen, testbench (with `extra` options), the simulator and check --json; returns the
/// check's exit code and JSON report.
fn run(sim: Sim, unit: &str, width: u32, bug: u32, extra: &[&str]) -> (i32, Value) {
    let sb = Sandbox::new();
    sb.write("unit.toml", &spec_text(unit, width, bug));
    sb.gen("unit.toml", "vec", &[]);
    let (tb, lang) = match sim {
        Sim::Ghdl => ("tb.vhd", "vhdl"),
        _ => ("tb.v", "verilog"),
    };
    let mut args = vec![
        "testbench",
        "unit.toml",
        "--vectors",
        "vec",
        "--hdl",
        lang,
        "-o",
        tb,
        "-q",
    ];
    args.extend_from_slice(extra);
    sb.run(&args).expect_code(0);
    let top = format!("tb_{unit}");
    let dut = hdl(&format!(
        "timing/{unit}.{}",
        if sim == Sim::Ghdl { "vhd" } else { "v" }
    ));
    let dut = dut.to_str().unwrap();
    match sim {
        Sim::Icarus => {
            sb.tool("iverilog", &["-g2005", "-s", &top, "-o", "sim", tb, dut]);
            sb.tool(
                "vvp",
                &["sim", "+stimulus=vec/stimulus.hex", "+results=log.csv"],
            );
        }
        Sim::Verilator => {
            sb.tool(
                "verilator",
                &[
                    "--binary",
                    "--timing",
                    "-Wno-fatal",
                    "-Wno-lint",
                    "-Wno-style",
                    "--top-module",
                    &top,
                    tb,
                    dut,
                    "-o",
                    "sim",
                ],
            );
            sb.tool(
                "obj_dir/sim",
                &["+stimulus=vec/stimulus.hex", "+results=log.csv"],
            );
        }
        Sim::Ghdl => {
            sb.tool("ghdl", &["-a", "--std=08", dut, tb]);
            sb.tool("ghdl", &["-e", "--std=08", &top]);
            sb.tool(
                "ghdl",
                &[
                    "-r",
                    "--std=08",
                    &top,
                    "-gstimulus=vec/stimulus.hex",
                    "-gresults=log.csv",
                ],
            );
        }
    }
    let mut check = vec![
        "check",
        "unit.toml",
        "--log",
        "log.csv",
        "--vectors",
        "vec",
        "--json",
        "-",
        "-q",
    ];
    if unit == "pipe_addsub" {
        check.push("--reset-known");
    }
    let r = sb.run(&check);
    let json: Value = serde_json::from_str(&r.stdout)
        .unwrap_or_else(|e| panic!("check --json: {e}\n{}", r.describe()));
    (r.code, json)
}

fn reasons(report: &Value) -> String {
    report["verdict_reasons"].to_string()
}

/// Ids of the classes with failing vectors.
fn failing_classes(report: &Value) -> Vec<String> {
    report["classes"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|c| c["failures"].as_u64().unwrap_or(0) > 0)
        .map(|c| c["id"].as_str().unwrap().to_string())
        .collect()
}

fn tools(sim: Sim) -> bool {
    match sim {
        Sim::Icarus => require_tool("iverilog") && require_tool("vvp"),
        Sim::Verilator => require_tool("verilator"),
        Sim::Ghdl => require_tool("ghdl"),
    }
}

fn reference_units_pass(sim: Sim) {
    if !tools(sim) {
        return;
    }
    for unit in ["pipe_addsub", "serial_add"] {
        for width in [8, 32, 72] {
            let (code, r) = run(sim, unit, width, 0, &[]);
            assert_eq!(code, 0, "{unit} at {width} bits: {}", reasons(&r));
            assert_eq!(r["verdict"], "pass");
            assert_eq!(r["timing"]["results"], r["timing"]["vectors"]);
            assert_eq!(r["log_problems"]["missing"], 0);
        }
    }
    // Back-pressure with stalls: valid_in dropped on seeded cycles; still one result per
    // vector, in order.
    let (code, r) = run(sim, "serial_add", 32, 0, &["--stall-every", "3"]);
    assert_eq!(code, 0, "serial_add with stalls: {}", reasons(&r));
}

/// The injected bugs, each with its reason (the classes for a wrong computation).
fn bugs_are_caught(sim: Sim) {
    if !tools(sim) {
        return;
    }
    // The sum stage keeps the previous vector's mode: a wrong computation on the rows where
    // the mode switched, reported as mismatches in add and sub classes, not as an order
    // problem.
    let (code, r) = run(sim, "pipe_addsub", 8, 1, &[]);
    assert_eq!(code, 1);
    let why = reasons(&r);
    assert!(why.contains("mismatches"), "{why}");
    assert!(
        !why.contains("out of order") && !why.contains("results than"),
        "{why}"
    );
    let classes = failing_classes(&r);
    assert!(
        classes.iter().any(|c| c.starts_with("add."))
            && classes.iter().any(|c| c.starts_with("sub.")),
        "{classes:?}"
    );
    // A result dropped when ready falls: fewer results than vectors, the bench timed out.
    let (code, r) = run(sim, "serial_add", 8, 1, &[]);
    assert_eq!(code, 1);
    let why = reasons(&r);
    assert!(why.contains("fewer results than vectors"), "{why}");
    assert!(why.contains("timed out"), "{why}");
    assert!(!why.contains("mismatch"), "{why}");
    // Reset leaves co at x: two-state Verilator shows x as 0, so only the four-state
    // simulators can see it.
    if sim != Sim::Verilator {
        let (code, r) = run(sim, "pipe_addsub", 8, 2, &[]);
        assert_eq!(code, 1);
        let why = reasons(&r);
        assert!(why.contains("outputs unknown after reset: co"), "{why}");
    }
}

#[test]
fn reference_units_pass_on_icarus() {
    reference_units_pass(Sim::Icarus);
}

#[test]
fn bugs_are_caught_on_icarus() {
    bugs_are_caught(Sim::Icarus);
}

#[test]
fn reference_units_pass_on_verilator() {
    reference_units_pass(Sim::Verilator);
}

#[test]
fn bugs_are_caught_on_verilator() {
    bugs_are_caught(Sim::Verilator);
}

#[test]
fn reference_units_pass_on_ghdl() {
    reference_units_pass(Sim::Ghdl);
}

#[test]
fn bugs_are_caught_on_ghdl() {
    bugs_are_caught(Sim::Ghdl);
}

/// The checker's order pass on logs edited from a passing run: two rows swapped are "results
/// out of order", a row removed "fewer results", a row repeated at the end "more results",
/// each as the reason in the verdict instead of mismatches.
#[test]
fn count_and_order_are_reported_as_such() {
    if !tools(Sim::Icarus) {
        return;
    }
    let sb = Sandbox::new();
    sb.write("unit.toml", &spec_text("pipe_addsub", 8, 0));
    sb.gen("unit.toml", "vec", &[]);
    sb.run(&[
        "testbench",
        "unit.toml",
        "--vectors",
        "vec",
        "-o",
        "tb.v",
        "-q",
    ])
    .expect_code(0);
    let dut = hdl("timing/pipe_addsub.v");
    sb.tool(
        "iverilog",
        &[
            "-g2005",
            "-s",
            "tb_pipe_addsub",
            "-o",
            "sim",
            "tb.v",
            dut.to_str().unwrap(),
        ],
    );
    sb.tool(
        "vvp",
        &["sim", "+stimulus=vec/stimulus.hex", "+results=log.csv"],
    );
    let log = sb.read("log.csv");
    let lines: Vec<&str> = log.lines().collect();
    let rows: Vec<usize> = (0..lines.len())
        .filter(|&i| !lines[i].starts_with('#') && i > 0)
        .collect();
    let relabel = |line: &str, index: usize| {
        let rest = line.split_once(',').unwrap().1;
        format!("{index},{rest}")
    };
    // Swap the results of vectors 40 and 41 (their own index stays on each row, as the bench
    // writes it: the k-th result is named after vector k).
    let mut swapped: Vec<String> = lines.iter().map(|s| s.to_string()).collect();
    let (r40, r41) = (rows[40], rows[41]);
    swapped[r40] = relabel(lines[r41], 40);
    swapped[r41] = relabel(lines[r40], 41);
    // Drop vector 40's result: every later result moves up one place.
    let mut dropped: Vec<String> = lines[..r40].iter().map(|s| s.to_string()).collect();
    for (k, &i) in rows[41..].iter().enumerate() {
        dropped.push(relabel(lines[i], 40 + k));
    }
    // One result too many.
    let mut extra: Vec<String> = lines.iter().map(|s| s.to_string()).collect();
    extra.push(relabel(lines[*rows.last().unwrap()], rows.len()));
    for (name, text, want) in [
        ("swapped.csv", swapped, "results out of order"),
        ("dropped.csv", dropped, "fewer results than vectors"),
        ("extra.csv", extra, "more results than vectors"),
    ] {
        sb.write(name, &(text.join("\n") + "\n"));
        let r = sb.run(&["check", "unit.toml", "--log", name, "--vectors", "vec"]);
        r.expect_code(1);
        let verdict = r
            .stdout
            .lines()
            .find(|l| l.starts_with("verdict:"))
            .unwrap_or_default()
            .to_string();
        assert!(
            verdict.contains(want),
            "{name}: {verdict}\n{}",
            r.describe()
        );
        assert!(!verdict.contains("mismatch"), "{name}: {verdict}");
    }
}

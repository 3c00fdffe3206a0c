//! VHDL ports of type numeric_std `unsigned` (issue 15): `tests/hdl/vhdl/numeric_add.vhd`
//! declares its operands and result `unsigned`. With `[dut] vhdl_types = "unsigned"` the VHDL
//! testbench converts at the port map and the whole loop passes on GHDL; with
//! `"std_logic_vector"` GHDL's analysis refuses the port map, so the key is what makes the
//! unit compile without a wrapper. A bad value is refused at its line with exit 2.

use std::process::Command;

use crate::flow::{hdl, run_loop, Options, Simulator, Timing};
use crate::spec::UnitSpec;
use crate::support::BIN;

const NUMERIC_ADD: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("result", "y"),
    ("carry_out", "co"),
    ("zero", "zero"),
];

fn numeric_add(width: u32, types: &str) -> UnitSpec {
    UnitSpec::new(
        "numeric_add",
        "add",
        "unsigned",
        width,
        NUMERIC_ADD,
        "numeric_add",
    )
    .dut_key("vhdl_types", types)
}

#[test]
fn issue15_unsigned_vhdl_ports_pass_on_ghdl_with_vhdl_types() {
    if !Simulator::Ghdl.available() {
        return;
    }
    let timing = Timing::start("issue15_vhdl_types_unsigned");
    let source = hdl("vhdl/numeric_add.vhd");
    let mut loops = 0;
    for width in [1, 16] {
        let outcome = run_loop(
            &numeric_add(width, "\"unsigned\""),
            Simulator::Ghdl,
            std::slice::from_ref(&source),
            Options::default(),
        );
        outcome.assert_clean_pass();
        loops += 1;
    }
    // The per-port table form: the ports not listed stay std_logic_vector, so naming only
    // the result is not enough for this unit ...
    let spec = numeric_add(16, "{ y = \"unsigned\" }");
    let (ok, text) = analyse(&spec, &source);
    assert!(
        !ok,
        "GHDL analysed a port map with a and b left std_logic_vector:\n{text}"
    );
    assert!(text.contains("port \"a\""), "{text}");
    assert!(!text.contains("port \"y\""), "{text}");
    // ... and naming every vector port is.
    let spec = numeric_add(
        16,
        "{ a = \"unsigned\", b = \"unsigned\", y = \"unsigned\" }",
    );
    run_loop(
        &spec,
        Simulator::Ghdl,
        std::slice::from_ref(&source),
        Options::default(),
    )
    .assert_clean_pass();
    loops += 1;
    timing.finish(loops);
}

#[test]
fn issue15_std_logic_vector_for_unsigned_ports_fails_ghdl_analysis() {
    if !Simulator::Ghdl.available() {
        return;
    }
    let timing = Timing::start("issue15_vhdl_types_mismatch");
    let source = hdl("vhdl/numeric_add.vhd");
    // Stated explicitly, and the same as leaving the key out.
    for types in [Some("\"std_logic_vector\""), None] {
        let spec = match types {
            Some(t) => numeric_add(16, t),
            None => UnitSpec::new(
                "numeric_add",
                "add",
                "unsigned",
                16,
                NUMERIC_ADD,
                "numeric_add",
            ),
        };
        let (ok, text) = analyse(&spec, &source);
        assert!(
            !ok,
            "GHDL analysed std_logic_vector signals on unsigned ports:\n{text}"
        );
        // GHDL 2: "can't associate 's_a' with port "a"" and the two types.
        assert!(text.contains("can't associate"), "{text}");
        assert!(text.contains("unsigned"), "{text}");
    }
    timing.finish(2);
}

/// gen + testbench --hdl vhdl for `spec`, then `ghdl -a` of the DUT and the testbench:
/// (analysis succeeded, GHDL's output).
fn analyse(spec: &UnitSpec, source: &std::path::Path) -> (bool, String) {
    let dir = tempfile::tempdir().unwrap();
    let root = dir.path();
    std::fs::write(root.join("spec.toml"), spec.to_toml()).unwrap();
    for args in [
        &["gen", "spec.toml", "--out", "vec", "--quiet"][..],
        &[
            "testbench",
            "spec.toml",
            "--vectors",
            "vec",
            "--hdl",
            "vhdl",
            "-o",
            "tb.vhd",
            "--quiet",
        ],
    ] {
        let out = Command::new(BIN)
            .current_dir(root)
            .args(args)
            .output()
            .unwrap();
        assert!(out.status.success(), "{args:?}: {out:?}");
    }
    let out = Command::new("ghdl")
        .current_dir(root)
        .args(["-a", "--std=08"])
        .arg(source)
        .arg("tb.vhd")
        .output()
        .unwrap();
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    (out.status.success(), text)
}

#[test]
fn issue15_bad_vhdl_types_value_is_refused_at_its_line() {
    let dir = tempfile::tempdir().unwrap();
    let spec = numeric_add(8, "\"natural\"").to_toml();
    let line = spec
        .lines()
        .position(|l| l.starts_with("vhdl_types"))
        .unwrap()
        + 1;
    std::fs::write(dir.path().join("spec.toml"), &spec).unwrap();
    let out = Command::new(BIN)
        .current_dir(dir.path())
        .args(["gen", "spec.toml", "--out", "vec"])
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains(&format!(
            "spec.toml:{line}: dut.vhdl_types: unknown VHDL port type \"natural\""
        )),
        "{stderr}"
    );
    assert!(
        !dir.path().join("vec").exists(),
        "gen wrote a set for a bad spec"
    );
    // A table key that is not a vector port of the unit (co is a one-bit flag).
    let spec = numeric_add(8, "{ co = \"unsigned\" }").to_toml();
    std::fs::write(dir.path().join("spec.toml"), &spec).unwrap();
    let out = Command::new(BIN)
        .current_dir(dir.path())
        .args([
            "testbench",
            "spec.toml",
            "--hdl",
            "vhdl",
            "--vectors",
            "vec",
        ])
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains(&format!(
            "spec.toml:{line}: dut.vhdl_types.co: \"co\" is not a vector port"
        )),
        "{stderr}"
    );
}

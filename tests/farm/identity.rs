//! Issue 9 item 10: a vector set's identity is what determines its vectors (name, operation,
//! width, encoding, ports, conventions); `[dut]` is not part of it.

use crate::util::{report_name, Sandbox, VectorCsv, RESERVOIR_LEVEL};

fn with_dut(module: &str, parameters: &str) -> String {
    format!("{RESERVOIR_LEVEL}\n[dut]\nmodule = \"{module}\"\n{parameters}")
}

/// Changing only `[dut]` made `testbench`, `check` and `merge` refuse a byte-identical set
/// ("generated from a different spec"). They accept it now; a change that does alter the
/// vectors is still refused.
#[test]
fn issue9_item10_dut_is_not_part_of_the_set_identity() {
    let sb = Sandbox::new();
    let first = sb.write("first.toml", &with_dut("level_unit", ""));
    let renamed = sb.write(
        "renamed.toml",
        &with_dut("level_unit_v2", "parameters = { W = 8 }\n"),
    );
    sb.gen(&first, "vec", &[]);
    sb.gen(&renamed, "vec2", &[]);
    for f in ["vectors.csv", "stimulus.hex", "expected.hex"] {
        assert_eq!(
            sb.bytes(&format!("vec/{f}")),
            sb.bytes(&format!("vec2/{f}")),
            "{f}"
        );
    }
    sb.run(&[
        "testbench",
        &renamed,
        "--vectors",
        "vec",
        "-o",
        "tb.v",
        "-q",
    ])
    .expect_code(0);
    assert!(sb.read("tb.v").contains("level_unit_v2"));

    let csv = VectorCsv::read(&sb, "vec");
    let mut half = csv.perfect_log();
    let n = half.rows.len();
    let rest = half.rows.split_off(n / 2);
    let log1 = sb.write("one.csv", &half.csv());
    half.rows = rest;
    let log2 = sb.write("two.csv", &half.csv());
    sb.check(&first, &log1, &["--vectors", "vec"], 1);
    sb.check(&renamed, &log2, &["--vectors", "vec"], 1);
    sb.run(&["merge", &report_name(&log1), &report_name(&log2)])
        .expect_code(0);

    // A renamed port changes vectors.csv's header: another set.
    let port = sb.write(
        "port.toml",
        &with_dut("level_unit", "").replace("drain", "outflow"),
    );
    sb.run(&["testbench", &port, "--vectors", "vec", "-o", "tb2.v"])
        .expect_code(2)
        .expect_stderr("different spec");
}

/// The `[random]` table is not in the identity, so the set's own random draw must be used:
/// a set generated with `mix = "corner"` and checked with a spec that has the default mix was
/// reported "out of step" (exit 1), the checker regenerating uniform operands. The manifest's
/// mix and corner share determine the set's vectors now.
#[test]
fn issue9_item10_the_sets_own_random_mix_regenerates_its_vectors() {
    let sb = Sandbox::new();
    let corner = sb.write(
        "corner.toml",
        &RESERVOIR_LEVEL.replace(
            "seed = 3\n",
            "seed = 3\nmix = \"corner\"\ncorner_share = 60\n",
        ),
    );
    assert_ne!(
        sb.read(&corner),
        RESERVOIR_LEVEL,
        "the fixture's [random] moved"
    );
    let plain = sb.write("plain.toml", RESERVOIR_LEVEL);
    sb.gen(&corner, "vec", &[]);
    let csv = VectorCsv::read(&sb, "vec");
    // Outputs only: the operands come from the set by index.
    let outputs: Vec<&str> = ["delta", "bout", "ovf", "empty", "neg"].to_vec();
    let mut columns = vec!["index"];
    columns.extend(outputs);
    let log = sb.write("log.csv", &csv.table(&columns).csv());
    let (_, report) = sb.check(&plain, &log, &["--vectors", "vec"], 0);
    assert!(report["log_problems"]["out_of_step"].is_null());
}

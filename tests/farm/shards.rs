//! Shards on a real simulator (Icarus Verilog 11): a shard's testbench logs the global
//! indices of its vectors (issue 9 item 7), and the whole farm flow (four shards, a testbench
//! and an Icarus run each, a check each, one merge) gives the report of one unsharded run.

use crate::sim::{assert_same_as_unsharded, icarus, level_delta, level_delta_dut, require};
use crate::util::Sandbox;

fn icarus_found() -> bool {
    require("iverilog") && require("vvp")
}

/// Issue 9 item 7: the testbench of shard 1/2 logged 0..N-1, and `check --vectors shard`
/// reported every vector missing (exit 1). It logs the manifest's global indices now.
#[test]
fn issue9_item7_shard_testbench_logs_global_indices() {
    if !icarus_found() {
        return;
    }
    let sb = Sandbox::new();
    let spec = level_delta(&sb, 300);
    sb.gen(&spec, "sh1", &["--shard", "1/2"]);
    let first = sb.json("sh1/manifest.json")["first_index"]
        .as_u64()
        .unwrap();
    let count = sb.json("sh1/manifest.json")["vectors"].as_u64().unwrap();
    assert!(first > 0, "shard 1 of 2 starts past index 0");
    let log = icarus(&sb, &spec, "sh1", &level_delta_dut());
    let text = sb.read(&log);
    let indices: Vec<u64> = text
        .lines()
        .skip(1)
        .map(|l| l.split(',').next().unwrap().parse().unwrap())
        .collect();
    assert_eq!(indices, (first..first + count).collect::<Vec<u64>>());
    let (_, report) = sb.check(&spec, &log, &["--vectors", "sh1"], 0);
    assert_eq!(report["log_problems"]["missing"], 0);
    assert_eq!(report["passed"].as_u64(), Some(count));
    assert_eq!(
        report["seen"][0]["ranges"],
        serde_json::json!([[first, first + count - 1]])
    );

    // The VHDL testbench of the shard logs the same indices (its text; GHDL runs it in the
    // simulator end-to-end tests).
    sb.run(&[
        "testbench",
        &spec,
        "--vectors",
        "sh1",
        "--hdl",
        "vhdl",
        "-o",
        "tb.vhd",
        "-q",
    ])
    .expect_code(0);
    let vhdl = sb.read("tb.vhd");
    assert!(vhdl.contains(&format!("constant c_first_index : natural := {first};")));
    assert!(vhdl.contains("write(v_line, integer'image(c_first_index + v_index));"));
}

/// Issue 9, "Done when": `gen --shard I/4` four times, a testbench and an Icarus run per
/// shard, `check` per shard, `merge` of the four reports: the merged JSON equals the report
/// of one unsharded run in counts, classes, bins and seen indices.
#[test]
fn farm_flow_four_shards_merge_to_the_unsharded_run() {
    if !icarus_found() {
        return;
    }
    let sb = Sandbox::new();
    let spec = level_delta(&sb, 400);
    let dut = level_delta_dut();
    sb.gen(&spec, "whole", &[]);
    let log = icarus(&sb, &spec, "whole", &dut);
    let (_, whole) = sb.check(&spec, &log, &["--vectors", "whole", "--require", "100"], 0);
    assert_eq!(whole["seen"][0]["ranges"], serde_json::json!([[0, 479]]));

    let mut reports = Vec::new();
    for i in 0..4 {
        let dir = format!("shard{i}");
        sb.gen(&spec, &dir, &["--shard", &format!("{i}/4")]);
        let log = icarus(&sb, &spec, &dir, &dut);
        let json = format!("{dir}.json");
        // One shard alone need not cover every class; without --require it passes.
        sb.run(&[
            "check",
            &spec,
            "--log",
            &log,
            "--vectors",
            &dir,
            "--json",
            &json,
            "-q",
        ])
        .expect_code(0);
        reports.push(json);
    }
    let mut args = vec!["merge"];
    args.extend(reports.iter().map(String::as_str));
    args.extend(["-o", "merged.json", "--require", "100"]);
    sb.run(&args).expect_code(0).expect_stdout("PASS");
    let merged = sb.json("merged.json");
    assert_same_as_unsharded(&merged, &whole);
    assert_eq!(merged["runs"].as_array().unwrap().len(), 4);
}

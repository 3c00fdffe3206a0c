//! The farm flows of issue 12 on existing engines, each against one unsharded run of the same
//! set on Icarus Verilog 11: `scripts/farm-parallel.sh` under GNU parallel, and the Slurm
//! array job (`scripts/slurm/`) on a one-node cluster that the test starts itself from
//! Debian's slurm-wlm and munge. A cluster that cannot start fails the test with the reason.

use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

use serde_json::Value;

use crate::sim::{assert_same_as_unsharded, icarus, level_delta, level_delta_dut, require, ROOT};
use crate::support::BIN;
use crate::util::Sandbox;

/// Random vectors in the farm runs: enough for four shards of a few hundred vectors each.
const COUNT: u64 = 400;

/// The report of one unsharded Icarus run of the spec's set.
fn unsharded(sb: &Sandbox, spec: &str) -> Value {
    sb.gen(spec, "whole", &[]);
    let log = icarus(sb, spec, "whole", &level_delta_dut());
    let (_, whole) = sb.check(spec, &log, &["--vectors", "whole", "--require", "100"], 0);
    whole
}

/// Runs a bash script of the repository with `args` and `env`, returning (status, output).
fn script(sb: &Sandbox, path: &str, args: &[&str], env: &[(&str, &str)]) -> (i32, String) {
    let mut cmd = Command::new("bash");
    cmd.arg(format!("{ROOT}/{path}"))
        .args(args)
        .current_dir(sb.root())
        .env("ARITHVEC", BIN);
    for (k, v) in env {
        cmd.env(k, v);
    }
    let out = cmd.output().unwrap_or_else(|e| panic!("start {path}: {e}"));
    (
        out.status.code().unwrap_or(-1),
        format!(
            "{}{}",
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr)
        ),
    )
}

/// `scripts/farm-parallel.sh SPEC 4 icarus DUT...`: four shards under `parallel -j 4`, then
/// a merge whose report equals the unsharded run's.
#[test]
fn gnu_parallel_farm_of_four_shards_equals_the_unsharded_run() {
    if !(require("iverilog") && require("vvp") && require("parallel")) {
        return;
    }
    let sb = Sandbox::new();
    let spec = level_delta(&sb, COUNT);
    let whole = unsharded(&sb, &spec);
    let dut = level_delta_dut();
    let mut args = vec![spec.as_str(), "4", "icarus"];
    args.extend(dut.iter().map(String::as_str));
    let (status, output) = script(
        &sb,
        "scripts/farm-parallel.sh",
        &args,
        &[("OUT", "farm"), ("REQUIRE", "100")],
    );
    assert_eq!(status, 0, "farm-parallel.sh failed:\n{output}");
    let merged = sb.json("farm/merged.json");
    assert_same_as_unsharded(&merged, &whole);
    assert_eq!(merged["runs"].as_array().unwrap().len(), 4);
    assert!(sb.read("farm/merged.xml").contains("<testsuite"));
}

/// Stops the private cluster when the test ends, however it ends.
struct Cluster<'a> {
    dir: &'a Path,
}

impl Drop for Cluster<'_> {
    fn drop(&mut self) {
        let _ = Command::new("bash")
            .arg(format!("{ROOT}/scripts/slurm/local-cluster.sh"))
            .arg("stop")
            .arg(self.dir)
            .output();
    }
}

/// The Slurm flow: a one-node cluster from Debian's packages (configured for localhost by
/// `scripts/slurm/local-cluster.sh`), `scripts/slurm/submit.sh` submitting the array job for
/// N = 4 and the dependent (afterok) merge job, a bounded wait, and the merged report equal
/// to the unsharded run's. When the cluster cannot start, the test fails with the reason.
#[test]
fn slurm_array_job_of_four_shards_equals_the_unsharded_run() {
    if !(require("iverilog") && require("vvp") && require("sbatch")) {
        return;
    }
    let sb = Sandbox::new();
    let spec = level_delta(&sb, COUNT);
    let whole = unsharded(&sb, &spec);
    let cluster_dir = sb.path("cluster");
    let (status, output) = script(
        &sb,
        "scripts/slurm/local-cluster.sh",
        &["start", cluster_dir.to_str().unwrap()],
        &[],
    );
    let _cluster = Cluster { dir: &cluster_dir };
    assert_eq!(
        status, 0,
        "the one-node Slurm cluster did not start, so the Slurm flow could not be tested:\n{output}"
    );
    let conf = cluster_dir.join("slurm.conf");
    let conf = conf.to_str().unwrap();
    let dut = level_delta_dut();
    let mut args = vec![spec.as_str(), "4", "icarus"];
    args.extend(dut.iter().map(String::as_str));
    let (status, output) = script(
        &sb,
        "scripts/slurm/submit.sh",
        &args,
        &[("OUT", "farm"), ("REQUIRE", "100"), ("SLURM_CONF", conf)],
    );
    assert_eq!(status, 0, "submit.sh failed:\n{output}");
    let ids: Vec<&str> = output.split_whitespace().collect();
    assert_eq!(
        ids.len(),
        2,
        "submit.sh prints the array and merge job ids: {output}"
    );

    // Bounded wait for the merge job's status file.
    let status_file = sb.path("farm/merge.status");
    let start = Instant::now();
    while !status_file.exists() {
        if start.elapsed() > Duration::from_secs(180) {
            let queue = Command::new("squeue")
                .env("SLURM_CONF", conf)
                .output()
                .map(|o| String::from_utf8_lossy(&o.stdout).into_owned())
                .unwrap_or_default();
            panic!(
                "the Slurm jobs {output} did not finish within 180 s; queue:\n{queue}\nslurmctld log:\n{}",
                std::fs::read_to_string(cluster_dir.join("slurmctld.log")).unwrap_or_default()
            );
        }
        std::thread::sleep(Duration::from_millis(250));
    }
    // The job writes the status file just before it ends; the report is already in place.
    let merge_log = std::fs::read_to_string(sb.path("farm/slurm/merge.out")).unwrap_or_default();
    assert_eq!(
        sb.read("farm/merge.status").trim(),
        "0",
        "the merge job failed:\n{merge_log}"
    );
    let merged = sb.json("farm/merged.json");
    assert_same_as_unsharded(&merged, &whole);
    assert_eq!(merged["runs"].as_array().unwrap().len(), 4);
}

/// The same flow on GHDL (VHDL testbench and DUT, two shards): the VHDL testbench of shard 1
/// logs global indices too, and the merge equals the unsharded Icarus run.
#[test]
fn gnu_parallel_farm_on_ghdl_equals_the_unsharded_icarus_run() {
    if !(require("iverilog") && require("vvp") && require("ghdl") && require("parallel")) {
        return;
    }
    let sb = Sandbox::new();
    let spec = level_delta(&sb, COUNT);
    let whole = unsharded(&sb, &spec);
    let dut = [
        crate::sim::hdl("vhdl/full_subtractor.vhd"),
        crate::sim::hdl("vhdl/ripple_sub.vhd"),
    ];
    let mut args = vec![spec.as_str(), "2", "ghdl"];
    args.extend(dut.iter().map(String::as_str));
    let (status, output) = script(&sb, "scripts/farm-parallel.sh", &args, &[("OUT", "farm")]);
    assert_eq!(status, 0, "farm-parallel.sh on GHDL failed:\n{output}");
    assert_same_as_unsharded(&sb.json("farm/merged.json"), &whole);
}

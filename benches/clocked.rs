//! Clocked testbench throughput on Verilator: vectors per second of the clocked testbench
//! driving the three-stage pipelined add/sub unit (`tests/hdl/timing/pipe_addsub.v`, one
//! vector per cycle) against the combinational testbench driving the same operation as a
//! combinational unit (`tests/hdl/addsub_unit.v`), both 16-bit, on the same vector set.
//! Prints both rates and their ratio against the goal of 0.5 (issue 10).
//!
//! Run with `cargo bench --bench clocked` (needs verilator). Not a test: timings on shared
//! machines are noisy. `ARITHVEC_BENCH_VECTORS=N` changes the random count (default 200,000).

use std::path::Path;
use std::process::Command;
use std::time::Instant;

const GOAL: f64 = 0.5;
const BIN: &str = env!("CARGO_BIN_EXE_arithvec");

fn spec(timing: bool, count: u64) -> String {
    let mut s = format!(
        "name = \"bench_trim\"\noperation = \"addsub\"\nwidth = 16\nencoding = \"twos\"\n\n\
         [ports]\na = \"a\"\nb = \"b\"\nmode = \"mode\"\nresult = \"y\"\ncarry_out = \"co\"\n\
         overflow = \"ovf\"\nzero = \"zero\"\nnegative = \"neg\"\n\n[conventions]\n\
         carry_out = \"carry\"\n\n[random]\ncount = {count}\nseed = 7\n\n[dut]\n"
    );
    if timing {
        s.push_str(
            "module = \"pipe_addsub\"\nparameters = { W = 16 }\n\n[timing]\nclock = \"clk\"\n\
             reset = \"rst_n\"\nlatency = 3\n",
        );
    } else {
        s.push_str("module = \"addsub_unit\"\nparameters = { W = 16 }\n");
    }
    s
}

fn run(cmd: &mut Command, what: &str) {
    let out = cmd.output().unwrap_or_else(|e| panic!("start {what}: {e}"));
    assert!(
        out.status.success(),
        "{what} failed:\n{}\n{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
}

/// Builds and runs one Verilator testbench; returns vectors per second of the run.
fn rate(dir: &Path, timing: bool, count: u64, hdl: &Path) -> (f64, u64) {
    let name = if timing { "clocked" } else { "comb" };
    let work = dir.join(name);
    std::fs::create_dir_all(&work).unwrap();
    std::fs::write(work.join("unit.toml"), spec(timing, count)).unwrap();
    run(
        Command::new(BIN)
            .current_dir(&work)
            .args(["gen", "unit.toml", "--out", "vec", "-q"]),
        "gen",
    );
    run(
        Command::new(BIN).current_dir(&work).args([
            "testbench",
            "unit.toml",
            "--vectors",
            "vec",
            "-o",
            "tb.v",
            "-q",
        ]),
        "testbench",
    );
    let mut sources = vec!["tb.v".to_string()];
    if timing {
        sources.push(hdl.join("timing/pipe_addsub.v").display().to_string());
    } else {
        sources.push(hdl.join("addsub_unit.v").display().to_string());
        sources.push(hdl.join("full_adder.v").display().to_string());
    }
    let mut args = vec![
        "--binary",
        "--timing",
        "-O3",
        "-Wno-fatal",
        "-Wno-lint",
        "-Wno-style",
        "--top-module",
        "tb_bench_trim",
        "-o",
        "sim",
    ];
    args.extend(sources.iter().map(String::as_str));
    run(
        Command::new("verilator").current_dir(&work).args(&args),
        "verilator",
    );
    let started = Instant::now();
    run(
        Command::new(work.join("obj_dir/sim"))
            .current_dir(&work)
            .args(["+stimulus=vec/stimulus.hex", "+results=log.csv"]),
        "simulation",
    );
    let seconds = started.elapsed().as_secs_f64();
    let log = std::fs::read_to_string(work.join("log.csv")).unwrap();
    let rows = log.lines().skip(1).filter(|l| !l.starts_with('#')).count() as u64;
    (rows as f64 / seconds, rows)
}

fn main() {
    let count: u64 = std::env::var("ARITHVEC_BENCH_VECTORS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(200_000);
    let hdl = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/hdl");
    let dir = tempfile::tempdir().expect("temp dir");
    let (comb, comb_rows) = rate(dir.path(), false, count, &hdl);
    let (clocked, clocked_rows) = rate(dir.path(), true, count, &hdl);
    assert_eq!(comb_rows, clocked_rows, "both runs log every vector");
    let ratio = clocked / comb;
    println!("combinational testbench: {comb_rows} vectors, {comb:.0} vectors/s");
    println!("clocked testbench (3-stage pipeline, one vector per cycle): {clocked:.0} vectors/s");
    println!(
        "ratio clocked / combinational: {ratio:.2} (goal >= {GOAL}: {})",
        if ratio >= GOAL { "met" } else { "NOT met" }
    );
}

//! `--threads N` and `ARITHVEC_THREADS` (issue 8): gen writes byte-identical sets and check
//! writes identical reports on 1, 2, 3 and 8 threads, over sets and logs long enough to span
//! several of the writer's chunks (16,384 vectors) and the checker's blocks (256 KiB of log);
//! bad values are usage errors (exit 2) that name the option or the variable.

use crate::util::{flip_hex_bit, Sandbox, VectorCsv, FLOW_ADDER};

/// Vectors in the random part: crosses two chunk boundaries and ends inside a chunk.
const COUNT: &str = "40000";

const FILES: [&str; 4] = [
    "vectors.csv",
    "stimulus.hex",
    "expected.hex",
    "manifest.json",
];

/// Asserts that the sets in `dir` and `reference` are the same bytes.
#[track_caller]
fn assert_same_set(sb: &Sandbox, dir: &str, reference: &str) {
    for f in FILES {
        let (got, want) = (
            sb.bytes(&format!("{dir}/{f}")),
            sb.bytes(&format!("{reference}/{f}")),
        );
        assert!(got == want, "{dir}/{f} differs from {reference}/{f}");
    }
}

#[test]
fn gen_writes_the_same_set_on_any_thread_count() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "t1", &["--count", COUNT, "--threads", "1"]);
    let rows = VectorCsv::read(&sb, "t1").rows.len();
    assert!(
        rows > 2 * 16384,
        "the set spans several chunks ({rows} rows)"
    );
    for threads in ["2", "3", "8"] {
        let dir = format!("t{threads}");
        sb.gen(&spec, &dir, &["--count", COUNT, "--threads", threads]);
        assert_same_set(&sb, &dir, "t1");
    }
    // A shard that starts and ends inside chunks, written by one and by eight threads.
    for threads in ["1", "8"] {
        let dir = format!("shard{threads}");
        sb.gen(
            &spec,
            &dir,
            &["--count", COUNT, "--shard", "1/3", "--threads", threads],
        );
    }
    assert_same_set(&sb, "shard8", "shard1");
    // The variable sets the count when the option is absent.
    sb.run_with_env(
        &["gen", &spec, "--out", "env", "--count", COUNT, "-q"],
        &[("ARITHVEC_THREADS", "3")],
    )
    .expect_code(0);
    assert_same_set(&sb, "env", "t1");
}

#[test]
fn check_gives_the_same_report_on_any_thread_count() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &["--count", COUNT]);
    let csv = VectorCsv::read(&sb, "vec");
    let mut log = csv.perfect_log();
    // Wrong results spread over every block, plus a duplicate and a dropped row, so the
    // first failures, counts and log problems all depend on merging in order.
    let rows = log.rows.len();
    for r in (5..rows).step_by(997) {
        let y = log.cell(r, "y");
        *y = flip_hex_bit(y, (r % 8) as u32);
    }
    let duplicate = log.rows[20_000].clone();
    log.rows.insert(30_000, duplicate);
    log.rows.remove(rows / 2 + 7);
    let text = log.csv();
    assert!(text.len() > 3 * 256 * 1024, "the log spans several blocks");
    let log = sb.write("log.csv", &text);
    let vec = ["--vectors", "vec", "--max-failures", "25"];
    let reference = |threads: &str| {
        let mut extra = vec.to_vec();
        extra.extend(["--threads", threads]);
        let (_, report) = sb.check(&spec, &log, &extra, 1);
        report
    };
    let one = reference("1");
    assert_eq!(one["failures"].as_array().map(Vec::len), Some(25));
    assert_eq!(one["log_problems"]["duplicate_count"], 1);
    assert_eq!(one["log_problems"]["missing"], 1);
    for threads in ["2", "3", "8"] {
        assert_eq!(reference(threads), one, "{threads} threads");
    }
    let run = sb.run_with_env(
        &[
            "check",
            &spec,
            "--log",
            &log,
            "--vectors",
            "vec",
            "--max-failures",
            "25",
            "--json",
            "env.json",
            "-q",
        ],
        &[("ARITHVEC_THREADS", "3")],
    );
    run.expect_code(1);
    assert_eq!(sb.json("env.json"), one, "ARITHVEC_THREADS=3");
}

#[test]
fn a_bad_thread_count_is_a_usage_error() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let log = sb.write("log.csv", &VectorCsv::read(&sb, "vec").perfect_log().csv());
    let gen = ["gen", spec.as_str(), "--out", "out"];
    let check = ["check", spec.as_str(), "--log", log.as_str()];
    for command in [&gen[..], &check[..]] {
        for bad in ["0", "-2", "many"] {
            let option = format!("--threads={bad}");
            let mut args = command.to_vec();
            args.push(&option);
            sb.run(&args).expect_code(2).expect_stderr("--threads");
        }
        for bad in ["0", "many", ""] {
            sb.run_with_env(command, &[("ARITHVEC_THREADS", bad)])
                .expect_code(2)
                .expect_stderr("ARITHVEC_THREADS");
        }
        // The option wins over a bad variable.
        let mut args = command.to_vec();
        args.extend(["--threads", "2"]);
        sb.run_with_env(&args, &[("ARITHVEC_THREADS", "many")])
            .expect_code(0);
    }
}

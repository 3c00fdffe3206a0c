//! Issue 9 items 11 and 12: an output path that is an input or another output is refused
//! (exit 2, nothing written), and `-` means standard output for every file output.

use crate::util::{Sandbox, VectorCsv, RESERVOIR_LEVEL};

/// A sandbox with RESERVOIR_LEVEL's set in `vec/` and its perfect log in `log.csv`.
fn set_and_log() -> (Sandbox, String) {
    let sb = Sandbox::new();
    let text = format!("{RESERVOIR_LEVEL}\n[dut]\nmodule = \"level_unit\"\n");
    let spec = sb.write("reservoir_level.toml", &text);
    sb.gen(&spec, "vec", &[]);
    let log = VectorCsv::read(&sb, "vec").perfect_log();
    sb.write("log.csv", &log.csv());
    (sb, spec)
}

/// Item 11: `check --json X --junit X` lost the JSON, `check --log F --json F` overwrote
/// the log, `grade --compact --out V --vectors V` replaced the set: all exit 0. Each is
/// refused now, by canonical path (and inode), and the inputs are untouched.
#[test]
fn issue9_item11_outputs_never_overwrite_inputs_or_each_other() {
    let (sb, spec) = set_and_log();
    let log_before = sb.read("log.csv");
    let manifest_before = sb.read("vec/manifest.json");

    sb.run(&[
        "check", &spec, "--log", "log.csv", "--json", "x.out", "--junit", "./x.out",
    ])
    .expect_code(2)
    .expect_stderr("--junit ./x.out is the same file or directory as output --json x.out");
    assert!(!sb.path("x.out").exists());

    sb.run(&["check", &spec, "--log", "log.csv", "--json", "log.csv"])
        .expect_code(2)
        .expect_stderr("input --log");
    sb.run(&[
        "check",
        &spec,
        "--log",
        "log.csv",
        "--vectors",
        "vec",
        "--json",
        "vec/../log.csv",
    ])
    .expect_code(2);
    sb.run(&[
        "check",
        &spec,
        "--log",
        "log.csv",
        "--vectors",
        "vec",
        "--junit",
        "vec/manifest.json",
    ])
    .expect_code(2)
    .expect_stderr("a file of the vector set");
    std::fs::hard_link(sb.path("log.csv"), sb.path("linked.csv")).unwrap();
    sb.run(&["check", &spec, "--log", "log.csv", "--json", "linked.csv"])
        .expect_code(2);

    sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "vec",
        "--builtin",
        "--compact",
        "--out",
        "vec/",
    ])
    .expect_code(2)
    .expect_stderr("--vectors");
    sb.run(&["testbench", &spec, "--vectors", "vec", "-o", &spec])
        .expect_code(2);
    sb.run(&["gen", &spec, "--out", &spec]).expect_code(2);

    sb.run(&[
        "check",
        &spec,
        "--log",
        "log.csv",
        "--vectors",
        "vec",
        "--json",
        "r.json",
        "-q",
    ])
    .expect_code(0);
    let report_before = sb.read("r.json");
    sb.run(&["merge", "r.json", "-o", "r.json"]).expect_code(2);
    sb.run(&["merge", "r.json", "-o", "m.json", "--junit", "m.json"])
        .expect_code(2);
    assert_eq!(sb.read("r.json"), report_before);
    assert_eq!(sb.read("log.csv"), log_before);
    assert_eq!(sb.read("vec/manifest.json"), manifest_before);
    assert!(!sb.path("m.json").exists());
}

/// Item 12: `--json -`, `--junit -`, `testbench -o -` and `merge -o -` created files named
/// `-`. They write to standard output now (the text report goes to stderr so stdout stays
/// parseable), and two outputs on stdout at once are refused.
#[test]
fn issue9_item12_dash_means_standard_output() {
    let (sb, spec) = set_and_log();
    let run = sb.run(&[
        "check",
        &spec,
        "--log",
        "log.csv",
        "--vectors",
        "vec",
        "--json",
        "-",
    ]);
    run.expect_code(0).expect_stderr("PASS");
    let report: serde_json::Value = serde_json::from_str(&run.stdout).expect("JSON on stdout");
    assert_eq!(report["verdict"], "pass");
    sb.write("r.json", &run.stdout);

    let run = sb.run(&["check", &spec, "--log", "log.csv", "--junit", "-", "-q"]);
    run.expect_code(0);
    assert!(run.stdout.starts_with("<?xml"), "{}", run.describe());
    assert!(run.stdout.contains("<testsuite"));

    let run = sb.run(&["testbench", &spec, "--vectors", "vec", "-o", "-"]);
    run.expect_code(0);
    assert!(
        run.stdout.contains("module tb_reservoir_level"),
        "{}",
        run.describe()
    );

    let run = sb.run(&["merge", "r.json", "-o", "-"]);
    run.expect_code(0);
    let merged: serde_json::Value = serde_json::from_str(&run.stdout).expect("JSON on stdout");
    assert_eq!(merged["vectors"], report["vectors"]);

    sb.run(&[
        "check", &spec, "--log", "log.csv", "--json", "-", "--junit", "-",
    ])
    .expect_code(2)
    .expect_stderr("standard output");
    assert!(!sb.path("-").exists(), "a file named - was written");
}

/// Item 11: a failed `gen` left the (empty) output directory behind. A write that fails part
/// way (here: a file-size limit of 1 KiB, `ulimit -f 1` with SIGXFSZ ignored, so the write
/// returns EFBIG) leaves no directory it created; a directory that existed before stays.
#[test]
fn issue9_item11_a_failed_gen_leaves_no_directory() {
    let (sb, spec) = set_and_log();
    std::fs::create_dir(sb.path("existing")).unwrap();
    for out in ["new/deeper/set", "existing"] {
        let status = std::process::Command::new("bash")
            .arg("-c")
            .arg(format!(
                "trap '' XFSZ; ulimit -f 1; exec \"$0\" gen {spec} --out {out} -q"
            ))
            .arg(crate::support::BIN)
            .current_dir(sb.root())
            .output()
            .expect("run bash");
        assert_eq!(
            status.status.code(),
            Some(2),
            "{}",
            String::from_utf8_lossy(&status.stderr)
        );
        assert!(String::from_utf8_lossy(&status.stderr).contains("File too large"));
    }
    assert!(
        !sb.path("new").exists(),
        "gen left the directories it created"
    );
    assert!(
        sb.list("existing").is_empty(),
        "gen left files in the existing directory"
    );
}

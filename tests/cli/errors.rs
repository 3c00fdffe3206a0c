//! Bad input: every subcommand exits 2 with a message naming the file, line and key of each
//! problem, and never writes output for input it refused.

use crate::util::{Sandbox, VectorCsv, FLOW_ADDER, RESERVOIR_LEVEL};

/// A subtractor spec with three problems: an unknown key, a width out of range and a port
/// the operation does not have.
const BROKEN_SPEC: &str = r#"name = "reservoir_level"
operation = "sub"
width = 600
encoding = "twos"
colour = "blue"

[ports]
a = "level"
b = "drain"
mode = "m"
result = "delta"
"#;

#[test]
fn a_bad_spec_lists_every_problem_with_file_line_and_key() {
    let sb = Sandbox::new();
    let spec = sb.write("broken.toml", BROKEN_SPEC);
    sb.write("log.csv", "level,drain,delta\n00,00,00\n");
    let runs = [
        sb.run(&["gen", &spec, "--out", "never"]),
        sb.run(&["classes", &spec]),
        sb.run(&["repro", &spec, "--index", "0"]),
        sb.run(&["check", &spec, "--log", "log.csv"]),
    ];
    for run in &runs {
        run.expect_code(2)
            .expect_stderr("broken.toml:3: width")
            .expect_stderr("600")
            .expect_stderr("broken.toml:5: colour")
            .expect_stderr("unknown key")
            .expect_stderr("broken.toml:10: ports.mode");
        assert!(
            run.stdout.is_empty(),
            "output for a refused spec\n{}",
            run.describe()
        );
    }
    assert!(
        !sb.path("never").exists(),
        "gen created its output for a bad spec"
    );
}

#[test]
fn invalid_toml_names_its_line() {
    let sb = Sandbox::new();
    let spec = sb.write("garbled.toml", "name = \"flow_adder\"\nwidth = = 8\n");
    sb.run(&["classes", &spec])
        .expect_code(2)
        .expect_stderr("garbled.toml:2")
        .expect_stderr("TOML");
    // A wrongly typed value names its key.
    let spec = sb.write(
        "typed.toml",
        &FLOW_ADDER.replace("width = 8", "width = \"eight\""),
    );
    sb.run(&["classes", &spec])
        .expect_code(2)
        .expect_stderr("typed.toml:3: width");
}

#[test]
fn a_missing_spec_file_is_named() {
    let sb = Sandbox::new();
    for args in [
        vec!["gen", "absent.toml", "--out", "v"],
        vec!["classes", "absent.toml"],
        vec!["repro", "absent.toml", "--index", "1"],
        vec!["check", "absent.toml", "--log", "absent.csv"],
    ] {
        sb.run(&args).expect_code(2).expect_stderr("absent.toml");
    }
    assert!(!sb.path("v").exists());
}

#[test]
fn bad_shard_syntax_is_refused_before_writing() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    for shard in ["x", "3/3", "1/0", "a/b", "-1/3", "1/", "1/2/3", ""] {
        let arg = format!("--shard={shard}");
        sb.run(&["gen", &spec, "--out", "v", &arg])
            .expect_code(2)
            .expect_stderr("--shard");
        assert!(
            !sb.path("v").exists(),
            "--shard {shard:?} created the output"
        );
    }
}

#[test]
fn a_log_header_with_an_unknown_column_is_bad_input() {
    let sb = Sandbox::new();
    let spec = sb.write("reservoir_level.toml", RESERVOIR_LEVEL);
    sb.gen(&spec, "vec", &[]);
    let csv = VectorCsv::read(&sb, "vec");
    let mut log = csv.perfect_log();
    let c = log.col("ovf");
    log.header[c] = "overflow_flag".into();
    let file = sb.write("renamed.csv", &log.csv());
    sb.run(&[
        "check",
        &spec,
        "--log",
        &file,
        "--vectors",
        "vec",
        "--json",
        "r.json",
    ])
    .expect_code(2)
    .expect_stderr("renamed.csv:1")
    .expect_stderr("overflow_flag")
    .expect_stderr("ovf");
    assert!(
        !sb.path("r.json").exists(),
        "a report was written for a refused log"
    );
    // Operands missing and no vector set to take them from.
    let file = sb.write("outputs_only.csv", &csv.table(&["delta", "bout"]).csv());
    sb.run(&["check", &spec, "--log", &file])
        .expect_code(2)
        .expect_stderr("outputs_only.csv")
        .expect_stderr("--vectors");
    // An empty log has no header.
    let file = sb.write("empty.csv", "# nothing here\n");
    sb.run(&["check", &spec, "--log", &file])
        .expect_code(2)
        .expect_stderr("empty.csv");
}

#[test]
fn other_usage_errors_exit_2() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let log = sb.write("log.csv", &VectorCsv::read(&sb, "vec").perfect_log().csv());
    sb.run(&["frobnicate"]).expect_code(2);
    sb.run(&["gen", &spec])
        .expect_code(2)
        .expect_stderr("--out");
    sb.run(&["repro", &spec, "--index", "18446744073709551615"])
        .expect_code(2)
        .expect_stderr("--index");
    sb.run(&["check", &spec, "--log", &log, "--radix", "oct"])
        .expect_code(2)
        .expect_stderr("oct");
    sb.run(&["check", &spec, "--log", &log, "--require", "101"])
        .expect_code(2);
    sb.run(&["check", &spec, "--log", "absent.csv"])
        .expect_code(2)
        .expect_stderr("absent.csv");
    // A vector set of another spec is refused.
    let other = sb.write("other.toml", &FLOW_ADDER.replace("width = 8", "width = 7"));
    sb.run(&["check", &other, "--log", &log, "--vectors", "vec"])
        .expect_code(2)
        .expect_stderr("manifest.json")
        .expect_stderr("different spec");
    // --help and --version succeed.
    sb.run(&["--help"])
        .expect_code(0)
        .expect_stdout("Exit codes");
    sb.run(&["--version"])
        .expect_code(0)
        .expect_stdout("arithvec");
}

#[test]
fn an_unwritable_report_path_fails_and_leaves_no_temporary_file() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let log = sb.write("log.csv", &VectorCsv::read(&sb, "vec").perfect_log().csv());
    // The report names are taken by directories, so the final rename fails.
    std::fs::create_dir(sb.path("report.json")).unwrap();
    std::fs::create_dir(sb.path("report.xml")).unwrap();
    let before = sb.list(".");
    sb.run(&["check", &spec, "--log", &log, "--json", "report.json"])
        .expect_code(2)
        .expect_stderr("report.json");
    sb.run(&["check", &spec, "--log", &log, "--junit", "report.xml"])
        .expect_code(2)
        .expect_stderr("report.xml");
    assert_eq!(
        sb.list("."),
        before,
        "a failed report write left files behind"
    );
}

/// Issue 9 item 6: a `--count` whose total (directed + random) overflows 64 bits is refused
/// before anything is written; it used to wrap and write 79 vectors with exit 0.
#[test]
fn issue9_a_count_whose_total_overflows_is_refused() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.run(&[
        "gen",
        &spec,
        "--out",
        "v",
        "--count",
        "18446744073709551615",
    ])
    .expect_code(2)
    .expect_stderr("--count")
    .expect_stderr("more than 2^64 - 1 vectors");
    assert!(!sb.path("v").join("manifest.json").exists());
}

/// Issue 9 item 5: every `--require` refuses nan, inf and values outside 0..=100.
#[test]
fn issue9_require_is_validated_the_same_way_everywhere() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let log = sb.write("log.csv", &VectorCsv::read(&sb, "vec").perfect_log().csv());
    sb.check(&spec, &log, &[], 0);
    let report = crate::util::report_name(&log);
    for bad in ["nan", "101", "inf", "-0.5"] {
        let arg = format!("--require={bad}");
        sb.run(&["check", &spec, "--log", &log, &arg])
            .expect_code(2)
            .expect_stderr("--require");
        sb.run(&["merge", &report, &arg])
            .expect_code(2)
            .expect_stderr("--require");
    }
}

#[test]
fn issue15_bad_port_ranges_name_line_and_key() {
    let sb = crate::util::Sandbox::new();
    let spec = sb.write(
        "bundle.toml",
        "name = \"bundle\"\noperation = \"add\"\nwidth = 8\nencoding = \"twos\"\n\n[ports]\n\
         a = \"ab[15:8]\"\nb = \"ab[8:1]\"\ncarry_in = \"cin[0:1]\"\nresult = \"s[6:0]\"\n\
         carry_out = \"ab[0]\"\noverflow = \"s\"\n",
    );
    sb.run(&["gen", &spec, "--out", "v"])
        .expect_code(2)
        .expect_stderr("bundle.toml:7: ports.a: ab[15:8] overlaps ab[8:1] of b (bit 8)")
        .expect_stderr("bundle.toml:9: ports.carry_in: \"cin[0:1]\": the range runs from MSB down to LSB, so write cin[1:0]")
        .expect_stderr("bundle.toml:10: ports.result: \"s[6:0]\" is 7 bits wide, but result is 8 bits wide")
        .expect_stderr("ports.carry_out: port ab holds both inputs and outputs")
        .expect_stderr("bundle.toml:12: ports.overflow: port s is used whole by overflow and in part by result");
    assert!(!sb.path("v").exists());
}

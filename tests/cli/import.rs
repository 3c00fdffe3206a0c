//! `arithvec import` and `gen --append` (issue 15): a user's CSV of operand values becomes a
//! vector set that check, testbench, merge and grade take like a generated one.

use crate::util::{flip_hex_bit, u64_of, Sandbox, VectorCsv, FLOW_ADDER, VALVE_TRIM};

/// Hand-written vectors for the 8-bit unsigned adder, in every value form. The expected
/// sums are worked by hand (common practice, no source): 200 + 100 + 1 = 301 = 0x12d, so
/// y = 0x2d with carry out; 0xff + 0 + 1 = 0x100; 0b1010 + 5 = 15.
const LAB_CSV: &str = "# cases from the bench\n\
a, b, cin\n\
200, 100, 1\n\
0xFF, 0x00, 1\n\
0b0000_1010, 5, 0\n";

#[test]
fn issue15_import_round_trips_through_check_testbench_merge_and_grade() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.write("lab.csv", LAB_CSV);
    let run = sb.run(&["import", &spec, "--csv", "lab.csv", "--out", "lab"]);
    run.expect_code(0).expect_stdout("3 imported from lab.csv");
    let csv = VectorCsv::read(&sb, "lab");
    assert_eq!(csv.rows.len(), 3);
    for (i, (a, b, y, co)) in [
        ("c8", "64", "2d", "1"),
        ("ff", "00", "00", "1"),
        ("0a", "05", "0f", "0"),
    ]
    .into_iter()
    .enumerate()
    {
        assert_eq!(
            [
                csv.get(i, "a"),
                csv.get(i, "b"),
                csv.get(i, "y"),
                csv.get(i, "co")
            ],
            [a, b, y, co],
            "row {i}"
        );
    }
    assert!(
        csv.classes(1).contains(&"a.max".to_string()),
        "{:?}",
        csv.classes(1)
    );
    let m = sb.json("lab/manifest.json");
    assert_eq!(u64_of(&m["total"]), 3);
    assert_eq!(u64_of(&m["directed"]), 0);
    assert_eq!(m["imported"]["file"], "lab.csv");
    assert_eq!(u64_of(&m["imported"]["first_index"]), 0);
    assert_eq!(
        m["imported"]["csv_sha256"].as_str().unwrap(),
        crate::util::sha256_hex(LAB_CSV.as_bytes())
    );

    // check: the perfect log passes, a flipped result bit fails and names the import.
    let log = csv.perfect_log();
    sb.write("good.csv", &log.csv());
    let (_, report) = sb.check(&spec, "good.csv", &["--vectors", "lab"], 0);
    assert_eq!(u64_of(&report["vectors"]), 3);
    assert_eq!(u64_of(&report["log_problems"]["missing"]), 0);
    let mut bad = log.clone();
    let flipped = flip_hex_bit(bad.cell(2, "y"), 0);
    *bad.cell(2, "y") = flipped;
    sb.write("bad.csv", &bad.csv());
    let (_, report) = sb.check(&spec, "bad.csv", &["--vectors", "lab"], 1);
    let repro = report["failures"][0]["repro"].as_str().unwrap();
    assert!(repro.contains("imported vector 2"), "{repro}");

    // A log missing a row is incomplete against the imported set.
    let mut short = log.clone();
    short.rows.pop();
    sb.write("short.csv", &short.csv());
    let (_, report) = sb.check(&spec, "short.csv", &["--vectors", "lab"], 1);
    assert_eq!(u64_of(&report["log_problems"]["missing"]), 1);

    // merge: two halves of the log make the whole set.
    let (mut first, mut second) = (log.clone(), log.clone());
    first.rows.truncate(2);
    second.rows.drain(..2);
    sb.write("first.csv", &first.csv());
    sb.write("second.csv", &second.csv());
    sb.check(&spec, "first.csv", &["--vectors", "lab"], 1);
    sb.check(&spec, "second.csv", &["--vectors", "lab"], 1);
    let run = sb.run(&[
        "merge",
        "first.csv.report.json",
        "second.csv.report.json",
        "-o",
        "merged.json",
        "-q",
    ]);
    run.expect_code(0);
    let merged = sb.json("merged.json");
    assert_eq!(u64_of(&merged["vectors"]), 3);
    assert_eq!(merged["verdict"], "pass");

    // testbench and grade (the built-in ripple adder) take the set.
    let with_dut = format!("{FLOW_ADDER}\n[dut]\nmodule = \"flow_adder\"\n");
    let spec_dut = sb.write("flow_adder_dut.toml", &with_dut);
    let run = sb.run(&["testbench", &spec_dut, "--vectors", "lab", "-o", "tb.v"]);
    run.expect_code(0);
    assert!(sb.read("tb.v").contains("localparam integer VECTORS = 3;"));
    // grade: the built-in ripple adder of tests/hdl/specs/ripple_add.toml (a twos unit).
    let ripple = crate::support::hdl("specs/ripple_add.toml");
    let ripple = ripple.to_str().unwrap();
    sb.write("ripple.csv", "a,b,cin\n-1,1,0\n0x7fff,1,1\n");
    sb.run(&["import", ripple, "--csv", "ripple.csv", "--out", "rl", "-q"])
        .expect_code(0);
    let run = sb.run(&[
        "grade",
        ripple,
        "--vectors",
        "rl",
        "--builtin",
        "--format",
        "json",
    ]);
    run.expect_code(0);
    assert_eq!(u64_of(&run.json()["vectors"]), 2);
    assert!(u64_of(&run.json()["detected"]) > 0);
    // Compacting or topping up an imported set is refused (its readers could not rebuild
    // the imported vectors from a selection), and nothing is written.
    for (flag, field) in [("--compact", "--compact"), ("--top-up", "--top-up")] {
        let run = sb.run(&[
            "grade",
            ripple,
            "--vectors",
            "rl",
            "--builtin",
            flag,
            "--out",
            "rl-out",
        ]);
        run.expect_code(2)
            .expect_stderr(field)
            .expect_stderr("imported vectors");
        assert!(!sb.path("rl-out").exists(), "{flag} wrote rl-out");
    }

    // An edited imported set is refused, as a generated one is.
    let stim = format!("{}// edited by hand\n", sb.read("lab/stimulus.hex"));
    sb.write("lab/stimulus.hex", &stim);
    let run = sb.run(&["check", &spec, "--log", "good.csv", "--vectors", "lab"]);
    run.expect_code(2).expect_stderr("SHA-256");
}

#[test]
fn issue15_gen_append_puts_the_csv_after_the_random_vectors() {
    let sb = Sandbox::new();
    let spec = sb.write("valve_trim.toml", VALVE_TRIM);
    // 12-bit two's complement: decimal values are values, -2048 is MIN (0x800).
    sb.write(
        "extra.csv",
        "pos,trim,cin,sub\n-2048,1,0,1\n-1,0x7ff,1,0\n2047,-2047,0,0\n",
    );
    sb.gen(&spec, "plain", &[]);
    let run = sb.run(&["gen", &spec, "--out", "v", "--append", "extra.csv"]);
    run.expect_code(0);
    let plain = VectorCsv::read(&sb, "plain");
    let csv = VectorCsv::read(&sb, "v");
    let m = sb.json("v/manifest.json");
    let generated = plain.rows.len();
    assert_eq!(u64_of(&m["total"]) as usize, generated + 3);
    assert_eq!(u64_of(&m["imported"]["first_index"]) as usize, generated);
    assert_eq!(u64_of(&m["imported"]["vectors"]), 3);
    // The generated part is unchanged; the appended rows follow it.
    assert_eq!(&csv.rows[..generated], &plain.rows[..]);
    assert_eq!(csv.get(generated, "pos"), "800");
    assert_eq!(csv.get(generated, "trim"), "001");
    // MIN - 1 overflows (common practice, no source).
    assert_eq!(csv.get(generated, "ovf"), "1");
    assert_eq!(csv.get(generated + 1, "pos"), "fff");
    assert_eq!(csv.get(generated + 2, "trim"), "801");
    let log = csv.perfect_log();
    sb.write("log.csv", &log.csv());
    let (_, report) = sb.check(&spec, "log.csv", &["--vectors", "v"], 0);
    assert_eq!(u64_of(&report["vectors"]) as usize, generated + 3);
    // --shard and --append do not go together.
    sb.run(&[
        "gen",
        &spec,
        "--out",
        "s",
        "--append",
        "extra.csv",
        "--shard",
        "0/2",
    ])
    .expect_code(2);
}

#[test]
fn issue15_bad_import_files_name_file_line_and_column() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.write(
        "bad.csv",
        "a,b,cin\n1,2,0\n0x1FF,2,0\n-1,2,0\n7,zz,1\n1,2\n3,4,2\n",
    );
    let run = sb.run(&["import", &spec, "--csv", "bad.csv", "--out", "out"]);
    run.expect_code(2)
        .expect_stderr("bad.csv:3: column 1 (a): 0x1FF does not fit the port's 8 bits")
        .expect_stderr(
            "bad.csv:4: column 1 (a): -1 is outside the range of the port (8 bits, unsigned)",
        )
        .expect_stderr("bad.csv:5: column 2 (b): \"zz\" is not a number")
        .expect_stderr("bad.csv:6: 2 values, but the header names 3 columns")
        .expect_stderr(
            "bad.csv:7: column 3 (cin): 2 is outside the range of the port (1 bit, unsigned)",
        );
    assert!(!sb.path("out").exists(), "nothing is written on bad input");
    sb.write("cols.csv", "a,b,speed\n1,2,3\n");
    sb.run(&["import", &spec, "--csv", "cols.csv", "--out", "out"])
        .expect_code(2)
        .expect_stderr("cols.csv:1: column 3 (speed): \"speed\" is not a port of unit flow_adder")
        .expect_stderr("cols.csv:1: header: the header has no column for input port(s) cin");
    sb.write("empty.csv", "# nothing\n\n");
    sb.run(&["import", &spec, "--csv", "empty.csv", "--out", "out"])
        .expect_code(2)
        .expect_stderr("empty.csv: the file holds no header line");
    sb.write("header.csv", "a,b,cin\n");
    sb.run(&["import", &spec, "--csv", "header.csv", "--out", "out"])
        .expect_code(2)
        .expect_stderr("header.csv: the file holds a header but no vector");
    sb.run(&["import", &spec, "--csv", "missing.csv", "--out", "out"])
        .expect_code(2)
        .expect_stderr("missing.csv");
    assert!(!sb.path("out").exists());
}

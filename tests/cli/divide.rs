//! div, rem and divrem through the binary: refusals at their spec line (exit 2), a perfect
//! log passing with full coverage, a wrong quotient failing with the division classes named,
//! and `div_by_zero = "dont_care"` leaving exactly the quotient and remainder of a division
//! by zero unchecked.

use crate::util::{Sandbox, VectorCsv};

fn divider(encoding: &str, conventions: &str, ports: &str) -> String {
    format!(
        "name = \"kiln_ratio\"\noperation = \"divrem\"\nwidth = 12\nencoding = \"{encoding}\"\n\n\
         [ports]\na = \"num\"\nb = \"den\"\nquotient = \"q\"\nremainder = \"r\"\n\
         div_by_zero = \"dz\"\n{ports}\n[conventions]\n{conventions}\n\n[random]\ncount = 300\n\
         seed = 11\n"
    )
}

#[test]
fn division_specs_are_refused_at_their_line() {
    let sb = Sandbox::new();
    for (text, expect) in [
        (divider("ones", "", ""), "bad.toml:4: encoding"),
        (
            divider("unsigned", "rounding = \"floor\"", ""),
            "bad.toml:14: conventions.rounding",
        ),
        (
            divider("unsigned", "", "overflow = \"v\"\n"),
            "bad.toml:12: ports.overflow",
        ),
        (
            divider("twos", "div_by_zero = \"sometimes\"", ""),
            "bad.toml:14: conventions.div_by_zero",
        ),
    ] {
        let spec = sb.write("bad.toml", &text);
        sb.run(&["classes", &spec])
            .expect_code(2)
            .expect_stderr(expect);
    }
    let rem = "name = \"kiln_rest\"\noperation = \"rem\"\nwidth = 8\nencoding = \"twos\"\n\n\
               [ports]\na = \"a\"\nb = \"b\"\nremainder = \"r\"\n\n[conventions]\n\
               div_by_zero = \"zero\"\n";
    let spec = sb.write("rem.toml", rem);
    sb.run(&["gen", &spec, "--out", "never"])
        .expect_code(2)
        .expect_stderr("rem.toml:12: conventions.div_by_zero");
    assert!(!sb.path("never").exists());
}

#[test]
fn a_divider_log_is_checked_with_full_coverage_and_a_wrong_quotient_fails() {
    let sb = Sandbox::new();
    let spec = sb.write(
        "div.toml",
        &divider("twos", "rounding = \"floor\"", "overflow = \"v\"\n"),
    );
    sb.gen(&spec, "vec", &[]);
    let csv = VectorCsv::read(&sb, "vec");
    let log = sb.write("good.csv", &csv.perfect_log().csv());
    let (run, report) = sb.check(&spec, &log, &["--vectors", "vec", "--require", "100"], 0);
    run.expect_stdout("PASS");
    assert_eq!(report["failed"], 0);
    assert_eq!(report["coverage"]["percent"], 100.0);
    // A quotient bit wrong on the min / -1 row fails it, and the failure names div.cases.
    let row = (0..csv.rows.len())
        .find(|&i| csv.get(i, "num") == "800" && csv.get(i, "den") == "fff")
        .expect("a min / -1 vector");
    assert!(csv.classes(row).iter().any(|c| c == "div.cases"));
    assert_eq!(csv.get(row, "v"), "1", "min / -1 overflows");
    let mut bad = csv.perfect_log();
    let q = bad.cell(row, "q").clone();
    *bad.cell(row, "q") = crate::util::flip_hex_bit(&q, 0);
    let log = sb.write("bad.csv", &bad.csv());
    let (_, report) = sb.check(&spec, &log, &["--vectors", "vec"], 1);
    assert_eq!(report["failed"], 1);
    let classes = report["failures"][0]["classes"].to_string();
    assert!(classes.contains("div.cases"), "{classes}");
}

#[test]
fn dont_care_leaves_only_the_quotient_and_remainder_of_a_zero_divisor_unchecked() {
    let sb = Sandbox::new();
    let spec = sb.write(
        "dc.toml",
        &divider("unsigned", "div_by_zero = \"dont_care\"", ""),
    );
    sb.gen(&spec, "vec", &[]);
    let csv = VectorCsv::read(&sb, "vec");
    let by_zero: Vec<usize> = (0..csv.rows.len())
        .filter(|&i| csv.get(i, "den").bytes().all(|b| b == b'0'))
        .collect();
    assert!(!by_zero.is_empty());
    let mut log = csv.perfect_log();
    for &i in &by_zero {
        *log.cell(i, "q") = "5a5".into();
        *log.cell(i, "r") = "a5a".into();
    }
    let path = sb.write("free.csv", &log.csv());
    let (_, report) = sb.check(&spec, &path, &["--vectors", "vec"], 0);
    assert_eq!(report["failed"], 0);
    // The flag itself is still compared.
    *log.cell(by_zero[0], "dz") = "0".into();
    let path = sb.write("flag.csv", &log.csv());
    let (_, report) = sb.check(&spec, &path, &["--vectors", "vec"], 1);
    assert_eq!(report["failed"], 1);
    // And a quotient of a non-zero divisor is.
    let mut log = csv.perfect_log();
    let other = (0..csv.rows.len()).find(|i| !by_zero.contains(i)).unwrap();
    let q = log.cell(other, "q").clone();
    *log.cell(other, "q") = crate::util::flip_hex_bit(&q, 3);
    let path = sb.write("wrong.csv", &log.csv());
    sb.check(&spec, &path, &["--vectors", "vec"], 1);
    // A self-checking testbench cannot honour dont_care: refused; without self-check it is
    // written.
    let text = format!(
        "{}\n[dut]\nmodule = \"kiln_ratio\"\n",
        divider("unsigned", "div_by_zero = \"dont_care\"", "")
    );
    let spec = sb.write("dc_tb.toml", &text);
    sb.run(&[
        "testbench",
        &spec,
        "--vectors",
        "vec",
        "--self-check",
        "-o",
        "tb.v",
    ])
    .expect_code(2)
    .expect_stderr("dont_care");
    assert!(!sb.path("tb.v").exists());
    sb.run(&["testbench", &spec, "--vectors", "vec", "-o", "tb.v"])
        .expect_code(0);
}

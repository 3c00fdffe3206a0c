//! Issue 9, item 16: a logged value's unknown digits are shown as they were printed, x apart
//! from z, digit by digit, in the text and JSON reports (rule: `unknown_digit` in
//! src/verdict/check.rs; lowercase when every bit of the digit is unknown, uppercase when only
//! some are, as Verilog `%h` prints them per IEEE 1364-2005 17.1.1.3, from memory).

use crate::util::{Sandbox, VectorCsv, FLOW_ADDER};

#[test]
fn issue9_x_and_z_digits_are_kept_apart_in_reports() {
    let sb = Sandbox::new();
    let spec = sb.write("flow.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let csv = VectorCsv::read(&sb, "vec");
    let mut log = csv.perfect_log();
    // y is 8 bits, two hex digits. Each row keeps the expected value's known digits, so the
    // output is unknown, not wrong.
    let digit = |i: usize, at: usize| csv.get(i, "y").chars().nth(at).expect("two digits");
    let hi = |i: usize| digit(i, 0);
    let lo = |i: usize| digit(i, 1);
    let bin = |c: char| format!("{:04b}", c.to_digit(16).expect("hex digit"));
    *log.cell(0, "y") = format!("z{}", lo(0));
    *log.cell(1, "y") = format!("{}x", hi(1));
    *log.cell(2, "y") = "z".to_string();
    *log.cell(3, "y") = format!("Z{}", lo(3));
    *log.cell(4, "y") = "xz".to_string();
    let log = sb.write("xz.csv", &log.csv());
    let (_, report) = sb.check(&spec, "xz.csv", &["--vectors", "vec"], 1);
    let got = |index: u64| -> (String, String) {
        let f = report["failures"]
            .as_array()
            .expect("failures")
            .iter()
            .find(|f| f["index"] == index)
            .unwrap_or_else(|| panic!("no failure for vector {index}: {report}"));
        let y = f["outputs"]
            .as_array()
            .expect("outputs")
            .iter()
            .find(|o| o["signal"] == "result")
            .expect("the result output");
        assert_eq!(y["status"], "unknown", "{y}");
        (
            y["got"].as_str().expect("got").to_string(),
            y["got_bin"].as_str().expect("got_bin").to_string(),
        )
    };
    assert_eq!(
        got(0),
        (format!("z{}", lo(0)), format!("zzzz{}", bin(lo(0))))
    );
    assert_eq!(
        got(1),
        (format!("{}x", hi(1)), format!("{}xxxx", bin(hi(1))))
    );
    assert_eq!(got(2), ("zz".to_string(), "zzzzzzzz".to_string()));
    // An uppercase Z does not say which bits are z, so all four are (conservative).
    assert_eq!(
        got(3),
        (format!("z{}", lo(3)), format!("zzzz{}", bin(lo(3))))
    );
    assert_eq!(got(4), ("xz".to_string(), "xxxxzzzz".to_string()));

    // The text report shows the same digits.
    let text = sb.run(&["check", &spec, "--log", &log, "--vectors", "vec"]);
    text.expect_code(1)
        .expect_stdout(&format!("got 0xz{}", lo(0)))
        .expect_stdout(&format!("got 0x{}x", hi(1)))
        .expect_stdout("got 0xxz");
}

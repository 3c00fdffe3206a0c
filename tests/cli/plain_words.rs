//! Issue 9, item 20: no Rust debug formatting in the text report (`[99, 100]`,
//! `[(48, 102)]`) and correct plurals.

use crate::util::{Sandbox, VectorCsv, FLOW_ADDER};

#[test]
fn issue9_log_problems_are_written_in_words_with_plurals() {
    let sb = Sandbox::new();
    let spec = sb.write("flow.toml", FLOW_ADDER);
    sb.gen(&spec, "vec", &[]);
    let csv = VectorCsv::read(&sb, "vec");
    let mut log = csv.perfect_log();
    // Vector 3 is missing; vector 5 is logged twice (the copy replaces row 3's place).
    let copy = log.rows[5].clone();
    log.rows[3] = copy;
    let log = sb.write("gaps.csv", &log.csv());
    let run = sb.run(&["check", &spec, "--log", &log, "--vectors", "vec"]);
    run.expect_code(1)
        .expect_stdout("log is missing 1 vector of the set; first: 3\n")
        .expect_stdout("log repeats 1 index: 5 (line ");
    for line in run.stdout.lines() {
        assert!(
            !(line.contains("[(") || line.contains("first: [")),
            "Rust debug formatting in user text: {line}"
        );
    }
}

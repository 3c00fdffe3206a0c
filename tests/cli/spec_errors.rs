//! Issue 9, item 18: a spec's problems are reported in one pass, all of them, each at its own
//! line; a duplicate port name is reported as a duplicate where it is written.

use crate::util::Sandbox;

/// Problems in every table at once, the operation itself among them: an unknown operation
/// used to stop the reader before `[conventions]`, `[random]` and `[dut]` were looked at, so
/// a second run showed more problems.
const EVERYWHERE: &str = r#"name = "silo feed"
operation = "subtract"
width = 16
encoding = "twos"

[ports]
a = "a"
b = "2b"
result = "index"

[conventions]
carry_sense = "borrow"

[random]
count = -3
mix = "lumpy"

[dut]
module = "9feed"
colour = 3
"#;

#[test]
fn issue9_every_problem_of_a_spec_in_one_pass() {
    let sb = Sandbox::new();
    let spec = sb.write("silo.toml", EVERYWHERE);
    let run = sb.run(&["classes", &spec]);
    run.expect_code(2);
    for needle in [
        "silo.toml:1: name",
        "silo.toml:2: operation",
        "silo.toml:8: ports.b",
        "silo.toml:9: ports.result",
        "silo.toml:12: conventions.carry_sense",
        "silo.toml:15: random.count",
        "silo.toml:16: random.mix",
        "silo.toml:19: dut.module",
        "silo.toml:20: dut.colour",
    ] {
        run.expect_stderr(needle);
    }
    assert!(
        run.stdout.is_empty(),
        "output for a refused spec\n{}",
        run.describe()
    );
}

#[test]
fn issue9_a_duplicate_port_name_is_reported_at_its_own_line() {
    let sb = Sandbox::new();
    let spec = sb.write(
        "dup.toml",
        "name = \"silo_feed\"\noperation = \"sub\"\nwidth = 8\nencoding = \"twos\"\n\n\
         [ports]\na = \"a\"\nb = \"a\"\nresult = \"y\"\n",
    );
    let run = sb.run(&["classes", &spec]);
    run.expect_code(2)
        .expect_stderr("dup.toml:8: ports.b")
        .expect_stderr("duplicate port name: \"a\" is already used by ports.a");
    assert!(
        !run.stderr.contains("needs a `b` port"),
        "a named but refused port is not also missing\n{}",
        run.describe()
    );
    // A port that really is missing is reported at the [ports] table, not at line 1.
    let spec = sb.write(
        "nob.toml",
        "name = \"silo_feed\"\noperation = \"sub\"\nwidth = 8\nencoding = \"twos\"\n\n\
         [ports]\na = \"a\"\nresult = \"y\"\n",
    );
    sb.run(&["classes", &spec])
        .expect_code(2)
        .expect_stderr("nob.toml:6: ports.b: operation \"sub\" needs a `b` port");
}

//! Error paths and gates of `arithvec grade`, through the real binary: exit 2 for bad input
//! (with a message naming the problem and its fix), exit 1 when the fault-free netlist is
//! not the unit the spec describes, exit 3 when coverage is short of `--require`. Also the
//! rule that outputs the spec does not check are not observed.

use crate::support::Run;
use crate::util::{have, hdl, Flags, Sandbox, Unit};

/// A sandbox holding the spec `NAME.toml` of a `width`-bit `unit` (no random vectors) and its
/// set generated into `vec`: the sandbox and the spec's file name.
fn generated(name: &str, unit: Unit, width: u32, flags: Flags) -> (Sandbox, String) {
    let sb = Sandbox::new();
    let spec = sb.spec(name, unit, width, 0, flags);
    sb.gen(&spec, "vec", &[]);
    (sb, spec)
}

/// `arithvec grade SPEC --vectors vec --netlist NETLIST` and `extra`, in the sandbox.
fn grade_netlist(sb: &Sandbox, spec: &str, netlist: &str, extra: &[&str]) -> Run {
    let mut args = vec!["grade", spec, "--vectors", "vec", "--netlist", netlist];
    args.extend_from_slice(extra);
    sb.run(&args)
}

#[test]
fn a_netlist_with_word_level_cells_names_the_cell_and_the_synthesis_step() {
    if !have("yosys") {
        return;
    }
    let (sb, spec) = generated("add", Unit::Add, 8, Flags::All);
    // `proc` alone leaves the behavioural adder's `+` as one `$add` cell.
    let script = format!(
        "read_verilog {}; chparam -set W 8 behav_add; proc; write_json behav.json",
        hdl("behav/behav_add.v").display()
    );
    sb.tool("yosys", &["-q", "-p", &script]);
    let run = grade_netlist(&sb, &spec, "behav.json", &["--module", "behav_add"]);
    run.expect_code(2);
    assert!(
        run.stderr
            .contains("has type `$add`, which cannot be graded")
            && run.stderr.contains("behav.json:")
            && run.stderr.contains("cells.$add$")
            && run.stderr.contains("run `synth -flatten` then `abc -g"),
        "{}",
        run.describe()
    );
}

#[test]
fn a_module_missing_from_the_netlist_is_bad_input() {
    if !have("yosys") {
        return;
    }
    let (sb, spec) = generated("add", Unit::Add, 8, Flags::All);
    let json = sb.synthesize("add", Unit::Add, 8);
    let run = grade_netlist(&sb, &spec, &json, &["--module", "absent_unit"]);
    run.expect_code(2);
    assert!(
        run.stderr.contains("no module `absent_unit`") && run.stderr.contains("`ripple_add`"),
        "{}",
        run.describe()
    );
}

#[test]
fn an_adder_graded_against_a_subtractor_spec_is_not_the_spec() {
    if !have("yosys") {
        return;
    }
    let (sb, spec) = generated("sub", Unit::Sub, 8, Flags::All);
    let json = sb.synthesize("add", Unit::Add, 8);
    let run = grade_netlist(&sb, &spec, &json, &["--module", "ripple_add"]);
    run.expect_code(1);
    assert!(
        run.stdout.contains("not the unit the spec describes")
            && run.stdout.contains("arithvec repro sub.toml --index"),
        "{}",
        run.describe()
    );
}

#[test]
fn a_port_width_mismatch_is_bad_input() {
    if !have("yosys") {
        return;
    }
    let (sb, spec) = generated("add", Unit::Add, 8, Flags::All);
    let json = sb.synthesize("add16", Unit::Add, 16);
    let run = grade_netlist(&sb, &spec, &json, &[]);
    run.expect_code(2);
    assert!(
        run.stderr
            .contains("port a: input port is 16 bits wide; the spec's a is 8"),
        "{}",
        run.describe()
    );
}

#[test]
fn the_require_gate_exits_3_when_coverage_is_short() {
    let sb = Sandbox::new();
    let spec = sb.spec("add", Unit::Add, 8, 0, Flags::All);
    let s = crate::util::spec(Unit::Add, 8, 0, Flags::All);
    let generator = arithvec::Generator::new(&s, Some(0), None);
    // Two vectors leave most faults undetected.
    arithvec::write_selection(&generator, &s, &sb.path("two"), &[0, 1]).expect("write");
    let r = sb.grade(&spec, "two", &["--builtin"]);
    let coverage = r["coverage_percent"].as_f64().expect("coverage");
    assert!(coverage < 100.0);
    let short = format!("{:.2}", coverage + 0.01);
    let met = format!("{:.2}", coverage.floor());
    sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "two",
        "--builtin",
        "--require",
        &short,
    ])
    .expect_code(3);
    sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "two",
        "--builtin",
        "--require",
        &met,
    ])
    .expect_code(0);
    // The JSON report is still written when the gate fails.
    let run = sb.run(&[
        "grade",
        &spec,
        "--vectors",
        "two",
        "--builtin",
        "--format",
        "json",
        "--require",
        "100",
    ]);
    run.expect_code(3);
    assert_eq!(run.json()["coverage_percent"].as_f64(), Some(coverage));
}

#[test]
fn outputs_the_spec_does_not_check_are_not_observed() {
    if !have("yosys") {
        return;
    }
    let (sb, spec) = generated("add", Unit::Add, 16, Flags::ArithmeticOnly);
    let json = sb.synthesize("add", Unit::Add, 16);
    let r = sb.grade(&spec, "vec", &["--netlist", &json]);
    assert_eq!(r["unchecked_outputs"], serde_json::json!(["zero", "neg"]));
    // The zero flag's OR chain (15 cells for 16 bits) feeds nothing else; neg is y[15].
    assert_eq!(r["ungraded_gates"], 15);
    assert_eq!(r["detected"], r["collapsed"]);
    let table = grade_netlist(&sb, &spec, &json, &[]);
    table.expect_code(0);
    assert!(
        table
            .stdout
            .contains("not observed: outputs zero, neg (not in the spec's [ports]"),
        "{}",
        table.describe()
    );
    // With the flags in the spec, the same netlist has more faults to grade.
    let spec_all = sb.spec("add_all", Unit::Add, 16, 0, Flags::All);
    sb.gen(&spec_all, "vec_all", &[]);
    let all = sb.grade(&spec_all, "vec_all", &["--netlist", &json]);
    assert!(all["collapsed"].as_u64() > r["collapsed"].as_u64());
    assert_eq!(all["unchecked_outputs"], serde_json::json!([]));
}

/// Issue 9 item 4: a spec output the netlist lacks is bad input (exit 2), like a missing
/// input; it used to be ignored and the run passed.
#[test]
fn issue9_a_spec_output_missing_from_the_netlist_is_bad_input() {
    if !have("yosys") {
        return;
    }
    let (sb, spec) = generated("add", Unit::Add, 8, Flags::All);
    let json = sb.synthesize("add", Unit::Add, 8);
    // Rename the netlist's result port y to res.
    let text = sb.read(&json).replace("\"y\":", "\"res\":");
    let renamed = sb.write("renamed.json", &text);
    let run = grade_netlist(&sb, &spec, &renamed, &[]);
    run.expect_code(2);
    assert!(
        run.stderr
            .contains("has no output port \"y\" (the spec's result)"),
        "{}",
        run.describe()
    );
}

/// Issue 9 item 5: `--require` is validated as in check (finite, 0..=100).
#[test]
fn issue9_grade_require_must_be_a_finite_percentage() {
    let (sb, spec) = generated("add", Unit::Add, 8, Flags::All);
    for bad in ["nan", "101", "inf", "-1", "x"] {
        let arg = format!("--require={bad}");
        let run = sb.run(&["grade", &spec, "--vectors", "vec", "--builtin", &arg]);
        run.expect_code(2);
        assert!(run.stderr.contains("--require"), "{}", run.describe());
    }
}

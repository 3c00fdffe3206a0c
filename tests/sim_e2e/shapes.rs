//! Ports as real modules declare them (issue 15): roles mapped to bit ranges of bundled ports
//! (`tests/hdl/shapes/add_bundle.v`: `{a, b}` packed in one input, `{co, sum}` in one output
//! and packed `nzcv` flags), run through the whole loop on Icarus and Verilator.

use crate::flow::{hdl, run_loop, Options, Simulator, Timing};
use crate::spec::UnitSpec;

/// The bundle ports of add_bundle at 16 bits; nzcv[1] (a second copy of the carry) is a gap.
const BUNDLED: &[(&str, &str)] = &[
    ("a", "ab[31:16]"),
    ("b", "ab[15:0]"),
    ("carry_in", "cin"),
    ("result", "s[15:0]"),
    ("carry_out", "s[16]"),
    ("overflow", "nzcv[0]"),
    ("zero", "nzcv[2]"),
    ("negative", "nzcv[3]"),
];

/// The same, with overflow taken from the carry copy at nzcv[1]: a wrong mapping.
const MISMAPPED: &[(&str, &str)] = &[
    ("a", "ab[31:16]"),
    ("b", "ab[15:0]"),
    ("carry_in", "cin"),
    ("result", "s[15:0]"),
    ("carry_out", "s[16]"),
    ("overflow", "nzcv[1]"),
    ("zero", "nzcv[2]"),
    ("negative", "nzcv[3]"),
];

#[test]
fn issue15_bundled_ports_pass_on_icarus_and_verilator_and_a_wrong_range_fails() {
    let timing = Timing::start("issue15_bundled_ports");
    let source = hdl("shapes/add_bundle.v");
    let mut loops = 0;
    for simulator in [Simulator::Icarus, Simulator::Verilator] {
        if !simulator.available() {
            continue;
        }
        let spec = UnitSpec::new("add_bundle", "add", "twos", 16, BUNDLED, "add_bundle");
        let outcome = run_loop(
            &spec,
            simulator,
            std::slice::from_ref(&source),
            Options::default(),
        );
        outcome.assert_clean_pass();
        // One log column per role, named as the spec writes it.
        let header = std::fs::read_to_string(outcome.dir.path().join("results.csv")).unwrap();
        assert!(
            header.starts_with(
                "index,ab[31:16],ab[15:0],cin,s[15:0],s[16],nzcv[0],nzcv[2],nzcv[3]\n"
            ),
            "{}",
            &header[..200.min(header.len())]
        );
        loops += 1;
        if simulator == Simulator::Icarus {
            let spec = UnitSpec::new("add_bundle", "add", "twos", 16, MISMAPPED, "add_bundle");
            let outcome = run_loop(
                &spec,
                simulator,
                std::slice::from_ref(&source),
                Options::default(),
            );
            assert_eq!(outcome.check_code, 1, "{}", outcome.summary());
            loops += 1;
        }
    }
    timing.finish(loops);
}

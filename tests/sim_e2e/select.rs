//! Issue 10, select units on real simulators: the select ALU of `tests/hdl/select/` (add,
//! sub, compare, negate behind a 4-bit code) passes the whole loop with 100% class coverage
//! on Icarus, Verilator and GHDL at 8, 32 and 72 bits, and its injected zero-polarity bug
//! fails exactly the add, sub and negate rows, naming their zero-flag classes while no
//! compare class fails.

use crate::flow::{
    failing_classes, failures, hdl, run_loop, wrong_ports, Options, Simulator, Timing,
};
use crate::spec::UnitSpec;

/// The ALU's ports (tests/hdl/select/select_alu.v and .vhd).
const ALU_PORTS: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("select", "op"),
    ("result", "rd"),
    ("carry_out", "co"),
    ("overflow", "v"),
    ("zero", "z"),
    ("negative", "n"),
    ("less", "lt"),
    ("equal", "eq"),
    ("greater", "gt"),
];

/// The codes the ALU decodes (its header).
const ALU_SELECT: &str =
    "\n[select]\nwidth = 4\nadd = 0x0\nsub = 0x1\ncompare = 0x5\nnegate = 0x6\n";

fn alu(width: u32) -> UnitSpec {
    UnitSpec::new(
        "tally_alu",
        "select",
        "twos",
        width,
        ALU_PORTS,
        "select_alu",
    )
    .tables(ALU_SELECT)
}

#[test]
fn issue10_select_alu_passes_on_every_simulator() {
    let timing = Timing::start("issue10_select_alu_passes_on_every_simulator");
    let mut loops = 0;
    for simulator in [Simulator::Icarus, Simulator::Verilator, Simulator::Ghdl] {
        if !simulator.available() {
            continue;
        }
        let source = match simulator {
            Simulator::Ghdl => hdl("select/select_alu.vhd"),
            _ => hdl("select/select_alu.v"),
        };
        for width in [8, 32, 72] {
            let outcome = run_loop(
                &alu(width),
                simulator,
                std::slice::from_ref(&source),
                Options::default(),
            );
            outcome.assert_clean_pass();
            let ids: Vec<&str> = outcome.report["classes"]
                .as_array()
                .unwrap()
                .iter()
                .map(|c| c["id"].as_str().unwrap())
                .collect();
            for id in [
                "add.chain.length",
                "sub.borrow.edge",
                "compare.outcome",
                "negate.overflow.boundary",
                "select.code",
            ] {
                assert!(ids.contains(&id), "{simulator:?} {width}: no class {id}");
            }
            loops += 1;
        }
    }
    timing.finish(loops);
}

#[test]
fn issue10_select_alu_zero_polarity_bug_names_the_zero_classes() {
    if !Simulator::Icarus.available() {
        return;
    }
    let timing = Timing::start("issue10_select_alu_zero_polarity_bug_names_the_zero_classes");
    for width in [8, 32, 72] {
        let spec = alu(width).parameter("BUG", 1);
        let options = Options {
            self_check: false,
            max_failures: 1_000_000,
        };
        let outcome = run_loop(
            &spec,
            Simulator::Icarus,
            &[hdl("select/select_alu.v")],
            options,
        );
        let why = outcome.summary();
        assert_eq!(outcome.check_code, 1, "{why}");
        // Every add, sub and negate row fails, on z only; no compare row fails.
        let rows = outcome.vectors();
        let arithmetic: Vec<u64> = rows
            .iter()
            .filter(|r| r["op"] != 5u32.into())
            .map(|r| u64::try_from(&r["index"]).unwrap())
            .collect();
        let listed = failures(&outcome.report);
        assert_eq!(listed.len(), arithmetic.len(), "{why}");
        for i in &arithmetic {
            let f = listed
                .get(i)
                .unwrap_or_else(|| panic!("row {i} should fail: {why}"));
            assert_eq!(wrong_ports(f), ["z".to_string()].into(), "{why}");
        }
        let failing = failing_classes(&outcome.report);
        for id in [
            "add.result.zero_from_nonzero",
            "sub.result.zero_from_nonzero",
            "negate.result.bits",
        ] {
            assert!(failing.contains(id), "{id} should fail: {failing:?}");
        }
        assert!(
            !failing.iter().any(|c| c.starts_with("compare.")),
            "no compare class may fail: {failing:?}"
        );
    }
    timing.finish(3);
}

/// The ALU with an active-low zero flag (`ZERO_ACTIVE_LOW = 1`) passes on every simulator
/// when the spec says `active_low = ["zero"]`; with the polarity bug on top it fails on z,
/// naming the zero classes.
#[test]
fn issue10_active_low_zero_passes_and_its_polarity_bug_is_caught() {
    let timing = Timing::start("issue10_active_low_zero_passes_and_its_polarity_bug_is_caught");
    let mut loops = 0;
    let low = |width: u32| {
        alu(width)
            .tables("\n[conventions]\nactive_low = [\"zero\"]\n")
            .parameter("ZERO_ACTIVE_LOW", 1)
    };
    for simulator in [Simulator::Icarus, Simulator::Verilator, Simulator::Ghdl] {
        if !simulator.available() {
            continue;
        }
        let source = match simulator {
            Simulator::Ghdl => hdl("select/select_alu.vhd"),
            _ => hdl("select/select_alu.v"),
        };
        for width in [8, 72] {
            let outcome = run_loop(
                &low(width),
                simulator,
                std::slice::from_ref(&source),
                Options::default(),
            );
            outcome.assert_clean_pass();
            loops += 1;
        }
    }
    if Simulator::Icarus.available() {
        let outcome = run_loop(
            &low(32).parameter("BUG", 1),
            Simulator::Icarus,
            &[hdl("select/select_alu.v")],
            Options::default(),
        );
        let why = outcome.summary();
        assert_eq!(outcome.check_code, 1, "{why}");
        let failing = failing_classes(&outcome.report);
        assert!(failing.contains("add.result.zero_from_nonzero"), "{why}");
        for f in failures(&outcome.report).values() {
            assert_eq!(wrong_ports(f), ["z".to_string()].into(), "{why}");
        }
        loops += 1;
    }
    timing.finish(loops);
}

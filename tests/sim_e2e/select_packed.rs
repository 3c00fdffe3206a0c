//! Issue 10, packed active-low flags on real simulators: the select ALU of
//! `tests/hdl/select/select_alu_packed.v` and `.vhd` (add, sub, compare, negate; flags packed
//! as nzcv = {n, z, co, v} with z active low, described by `[ports] flags = "nzcv"` and a
//! `[flags]` table) passes the whole loop with full class coverage on Icarus, Verilator and
//! GHDL at 8, 32 and 72 bits. Its injected bugs are caught on every simulator, each naming
//! the failing classes: the zero flag's polarity inverted (fails nzcv[2] only, on the zero
//! classes), and the carry and overflow bits swapped in the vector (fails nzcv[0] and
//! nzcv[1] only, on carry and overflow classes); no compare class fails in either.

use std::collections::BTreeSet;

use crate::flow::Timing;
use crate::flow::{failing_classes, failures, hdl, run_loop, wrong_ports, Options, Simulator};
use crate::spec::UnitSpec;

const PORTS: &[(&str, &str)] = &[
    ("a", "a"),
    ("b", "b"),
    ("select", "op"),
    ("result", "rd"),
    ("flags", "nzcv"),
    ("less", "lt"),
    ("equal", "eq"),
    ("greater", "gt"),
];

/// The codes the ALU decodes, the flag layout and the polarity (the module's header).
const TABLES: &str = "\n[select]\nwidth = 4\nadd = 0x0\nsub = 0x1\ncompare = 0x5\nnegate = 0x6\n\
     \n[flags]\noverflow = 0\ncarry_out = 1\nzero = 2\nnegative = 3\n\
     \n[conventions]\nactive_low = [\"zero\"]\n";

fn alu(width: u32) -> UnitSpec {
    UnitSpec::new(
        "nzcv_alu",
        "select",
        "twos",
        width,
        PORTS,
        "select_alu_packed",
    )
    .tables(TABLES)
}

fn sources(simulator: Simulator) -> Vec<std::path::PathBuf> {
    match simulator {
        Simulator::Ghdl => vec![
            hdl("select/select_alu.vhd"),
            hdl("select/select_alu_packed.vhd"),
        ],
        _ => vec![
            hdl("select/select_alu.v"),
            hdl("select/select_alu_packed.v"),
        ],
    }
}

const SIMULATORS: [Simulator; 3] = [Simulator::Icarus, Simulator::Verilator, Simulator::Ghdl];

#[test]
fn issue10_packed_active_low_flags_pass_on_every_simulator() {
    let timing = Timing::start("issue10_packed_active_low_flags_pass_on_every_simulator");
    let mut loops = 0;
    for simulator in SIMULATORS {
        if !simulator.available() {
            continue;
        }
        for width in [8, 32, 72] {
            let outcome = run_loop(
                &alu(width),
                simulator,
                &sources(simulator),
                Options::default(),
            );
            outcome.assert_clean_pass();
            let cols: BTreeSet<String> = outcome.vectors()[0].keys().cloned().collect();
            for col in ["nzcv[0]", "nzcv[1]", "nzcv[2]", "nzcv[3]", "lt"] {
                assert!(cols.contains(col), "{simulator:?} {width}: no column {col}");
            }
            loops += 1;
        }
    }
    timing.finish(loops);
}

/// Runs the bug `bug` at `width` on `simulator` and returns (failing classes, wrong ports).
fn caught(simulator: Simulator, width: u32, bug: i64) -> (BTreeSet<String>, BTreeSet<String>) {
    let options = Options {
        self_check: false,
        max_failures: 1_000_000,
    };
    let outcome = run_loop(
        &alu(width).parameter("BUG", bug),
        simulator,
        &sources(simulator),
        options,
    );
    let why = outcome.summary();
    assert_eq!(
        outcome.check_code, 1,
        "{simulator:?} {width} bug {bug}: {why}"
    );
    let mut ports = BTreeSet::new();
    for f in failures(&outcome.report).values() {
        ports.extend(wrong_ports(f));
    }
    let failing = failing_classes(&outcome.report);
    assert!(
        !failing.iter().any(|c| c.starts_with("compare.")),
        "{simulator:?} {width} bug {bug}: no compare class may fail: {failing:?}"
    );
    (failing, ports)
}

#[test]
fn issue10_packed_flag_bugs_are_caught_naming_their_classes() {
    let timing = Timing::start("issue10_packed_flag_bugs_are_caught_naming_their_classes");
    let mut loops = 0;
    for simulator in SIMULATORS {
        if !simulator.available() {
            continue;
        }
        let widths: &[u32] = match simulator {
            Simulator::Icarus => &[8, 32, 72],
            _ => &[32],
        };
        for &width in widths {
            // The zero flag's polarity inverted: only the zero bit is wrong.
            let (failing, ports) = caught(simulator, width, 1);
            assert_eq!(
                ports,
                ["nzcv[2]".to_string()].into(),
                "{simulator:?} {width}"
            );
            for id in [
                "add.result.zero_from_nonzero",
                "sub.result.zero_from_nonzero",
                "negate.result.bits",
            ] {
                assert!(
                    failing.contains(id),
                    "{simulator:?} {width}: {id}: {failing:?}"
                );
            }
            // Carry and overflow swapped in the vector: only those two bits are wrong.
            let (failing, ports) = caught(simulator, width, 2);
            assert_eq!(
                ports,
                ["nzcv[0]".to_string(), "nzcv[1]".to_string()].into(),
                "{simulator:?} {width}"
            );
            for id in ["add.overflow.boundary", "sub.borrow.edge"] {
                assert!(
                    failing.contains(id),
                    "{simulator:?} {width}: {id}: {failing:?}"
                );
            }
            loops += 2;
        }
    }
    timing.finish(loops);
}

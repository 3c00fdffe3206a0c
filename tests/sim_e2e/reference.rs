//! Every structural reference DUT in `tests/hdl/` (and the VHDL twins) runs the whole loop
//! and `check --require 100` exits 0: all vectors pass and every corner class is covered, at
//! widths 4, 16, 32 and 72 (above 64, where arithvec leaves its u128 fast path). Verilator
//! compiles take seconds each, so it runs two DUTs at two widths only.

use std::path::PathBuf;

use crate::flow::{hdl, run_loop, Options, Simulator, Timing};
use crate::spec::{UnitSpec, COMPARE, MODE_ONLY, NO_CARRY, NO_CARRY_IN, WITH_CARRY_IN};

/// Widths for every reference DUT: tiny, common, 32, and one above 64.
const WIDTHS: [u32; 4] = [4, 16, 32, 72];

/// Widths for the slow Verilator compiles.
const VERILATOR_WIDTHS: [u32; 2] = [16, 72];

/// A reference DUT: how to describe it and which files define it.
struct Dut {
    unit: &'static str,
    operation: &'static str,
    encoding: &'static str,
    ports: &'static [(&'static str, &'static str)],
    module: &'static str,
    /// addsub_unit reports the raw adder carry in subtract mode (its header says so).
    carry_convention: bool,
    verilog: &'static [&'static str],
    vhdl: &'static [&'static str],
}

const RIPPLE_ADD: Dut = Dut {
    unit: "brine_total",
    operation: "add",
    encoding: "twos",
    ports: WITH_CARRY_IN,
    module: "ripple_add",
    carry_convention: false,
    verilog: &["ripple_add.v", "full_adder.v"],
    vhdl: &[],
};

const RIPPLE_SUB: Dut = Dut {
    unit: "sluice_gap",
    operation: "sub",
    encoding: "twos",
    ports: WITH_CARRY_IN,
    module: "ripple_sub",
    carry_convention: false,
    verilog: &["ripple_sub.v", "full_subtractor.v"],
    vhdl: &["vhdl/full_subtractor.vhd", "vhdl/ripple_sub.vhd"],
};

const ADDSUB_UNIT: Dut = Dut {
    unit: "loom_trim",
    operation: "addsub",
    encoding: "twos",
    ports: MODE_ONLY,
    module: "addsub_unit",
    carry_convention: true,
    verilog: &["addsub_unit.v", "full_adder.v"],
    vhdl: &["vhdl/full_adder.vhd", "vhdl/addsub_unit.vhd"],
};

const ONES_ADD: Dut = Dut {
    unit: "orchard_sum",
    operation: "add",
    encoding: "ones",
    ports: NO_CARRY_IN,
    module: "ones_add",
    carry_convention: false,
    verilog: &["ones_add.v", "full_adder.v"],
    vhdl: &[],
};

const SIGNMAG_ADD: Dut = Dut {
    unit: "ledger_net",
    operation: "add",
    encoding: "signmag",
    ports: NO_CARRY,
    module: "signmag_add",
    carry_convention: false,
    verilog: &["signmag_add.v", "full_adder.v", "full_subtractor.v"],
    vhdl: &[],
};

const COMPARATOR: Dut = Dut {
    unit: "tide_rank",
    operation: "compare",
    encoding: "twos",
    ports: COMPARE,
    module: "comparator",
    carry_convention: false,
    verilog: &["comparator.v", "full_subtractor.v"],
    vhdl: &[],
};

impl Dut {
    fn spec(&self, width: u32) -> UnitSpec {
        let spec = UnitSpec::new(
            self.unit,
            self.operation,
            self.encoding,
            width,
            self.ports,
            self.module,
        );
        if self.carry_convention {
            spec.convention("carry_out", "carry")
        } else {
            spec
        }
    }

    fn sources(&self, simulator: Simulator) -> Vec<PathBuf> {
        let files = match simulator {
            Simulator::Ghdl => self.vhdl,
            _ => self.verilog,
        };
        assert!(
            !files.is_empty(),
            "{} has no sources for {simulator:?}",
            self.module
        );
        files.iter().map(|f| hdl(f)).collect()
    }

    /// Runs the loop at every width and asserts a clean pass with full coverage.
    fn passes(&self, simulator: Simulator, widths: &[u32], test: &'static str) {
        if !simulator.available() {
            return;
        }
        let timing = Timing::start(test);
        for &width in widths {
            let outcome = run_loop(
                &self.spec(width),
                simulator,
                &self.sources(simulator),
                Options::default(),
            );
            outcome.assert_clean_pass();
            // The set really had both parts: directed corners and the random vectors.
            assert!(outcome.directed() > 0, "{}", outcome.summary());
            assert_eq!(outcome.random(), 300, "{}", outcome.summary());
        }
        timing.finish(widths.len());
    }
}

#[test]
fn icarus_ripple_add() {
    RIPPLE_ADD.passes(Simulator::Icarus, &WIDTHS, "icarus_ripple_add");
}

#[test]
fn icarus_ripple_sub() {
    RIPPLE_SUB.passes(Simulator::Icarus, &WIDTHS, "icarus_ripple_sub");
}

#[test]
fn icarus_addsub_unit() {
    ADDSUB_UNIT.passes(Simulator::Icarus, &WIDTHS, "icarus_addsub_unit");
}

#[test]
fn icarus_ones_add() {
    ONES_ADD.passes(Simulator::Icarus, &WIDTHS, "icarus_ones_add");
}

#[test]
fn icarus_signmag_add() {
    SIGNMAG_ADD.passes(Simulator::Icarus, &WIDTHS, "icarus_signmag_add");
}

#[test]
fn icarus_comparator() {
    COMPARATOR.passes(Simulator::Icarus, &WIDTHS, "icarus_comparator");
}

#[test]
fn ghdl_ripple_sub() {
    RIPPLE_SUB.passes(Simulator::Ghdl, &WIDTHS, "ghdl_ripple_sub");
}

#[test]
fn ghdl_addsub_unit() {
    ADDSUB_UNIT.passes(Simulator::Ghdl, &WIDTHS, "ghdl_addsub_unit");
}

#[test]
fn verilator_ripple_sub() {
    RIPPLE_SUB.passes(
        Simulator::Verilator,
        &VERILATOR_WIDTHS,
        "verilator_ripple_sub",
    );
}

#[test]
fn verilator_addsub_unit() {
    ADDSUB_UNIT.passes(
        Simulator::Verilator,
        &VERILATOR_WIDTHS,
        "verilator_addsub_unit",
    );
}

//! Simulator end-to-end tests: the real `arithvec` binary and real simulators (Icarus Verilog
//! 11, Verilator 5, GHDL 2) run the whole loop (gen, testbench, simulate, check) in a fresh
//! temporary directory per run, on the project's reference hardware in `tests/hdl/`.
//!
//! Groups, one module each: `reference` (every structural DUT passes with 100% class
//! coverage), `bugs` (every injected bug fails, and the failing classes point at it),
//! `behav` (the simulator's own `+`, `-` and `$signed` agree with arithvec's golden model on
//! 100,000 random vectors per run). `tools` decides what a missing simulator means (an error
//! under CI, a loud SKIPPED line otherwise), `spec` renders the TOML specs and `flow` runs
//! the commands. Every test writes one `sim_e2e timing:` line to stderr so the CI budget can
//! be watched.

mod behav;
mod behav_ops;
mod bugs;
mod flow;
mod reference;
mod sat;
mod select;
mod select_packed;
mod shapes;
mod spec;
#[path = "../support/mod.rs"]
mod support;
mod tools;
mod vhdl_types;

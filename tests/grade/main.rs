//! Fault grading end to end: the real `arithvec grade` binary (and, where a measurement
//! needs it, the library) on the built-in units and on Yosys netlists of `tests/hdl/`,
//! cross-checked with Icarus Verilog. Each test works in a fresh temporary directory. A
//! missing yosys or iverilog fails the test when `CI` is set and prints a loud SKIPPED line
//! otherwise.

mod compact;
mod compare;
mod ctest;
mod errors;
mod icarus;
mod prove;
mod reference;
mod report_words;
#[path = "../support/mod.rs"]
mod support;
mod threads;
mod topup;
mod transition;
mod util;

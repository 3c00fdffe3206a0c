//! Stage 5, the simulator boundary: the Verilog and VHDL testbenches that apply a vector set
//! to a unit, and the reader of the result logs that simulators and bench testers write.
//!
//! May import `crate::error`, `crate::spec`, `crate::arith`, `crate::corners` and
//! `crate::sets`; it knows nothing about verdicts or coverage.

pub(crate) mod log;
pub(crate) mod testbench;

//! The gate-level side: Yosys JSON netlists and the built-in ripple models, stuck-at fault
//! lists with collapsing, bit-parallel fault simulation, redundancy proofs, compaction, and
//! grading a vector set against a netlist.
//!
//! May import `crate::error`, `crate::spec`, `crate::arith`, `crate::corners` and
//! `crate::sets`; never `crate::sim` or `crate::verdict`.

pub(crate) mod fault;
pub(crate) mod grade;
pub(crate) mod netlist;
pub(crate) mod prove;
pub(crate) mod sat;

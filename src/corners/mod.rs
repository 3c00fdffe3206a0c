//! Stage 3, corner cases: the catalogue of corner classes and their bins (what a vector
//! exercises: chain lengths, overflow boundaries, special operands, per-bit cells) and the
//! generator that builds a directed vector for every reachable bin plus the seeded random
//! stream.
//!
//! May import `crate::error`, `crate::spec` and `crate::arith`; never files, logs or reports.

pub(crate) mod classes;
pub(crate) mod compare;
pub(crate) mod construct;
pub(crate) mod construct_divide;
pub(crate) mod construct_sat;
pub(crate) mod construct_simple;
pub(crate) mod generate;
pub(crate) mod pairs;
#[cfg(test)]
mod reachability;

//! arithvec: golden-model test vectors, result-log checking and corner-class coverage for
//! arithmetic datapaths (adders, subtractors, add/sub units, negators, incrementers,
//! comparators) in five number encodings.
//!
//! The library is the whole tool; the `arithvec` binary only parses arguments and calls it.
//! Modules are private; their public types are re-exported here.

#![deny(missing_docs)]

mod error;
mod fault;
mod netlist;
mod spec;
mod word;

pub use error::{Error, ErrorKind, Problem, Result};
pub use fault::{
    compact, detection_matrix, grade, grade_with, DetectionMatrix, Fault, FaultEntry, FaultList,
    FaultReport, FaultSite, GradeOptions, PatternSet, PortValue, Redundancy, SimulationMode,
};
pub use netlist::{Driver, Gate, GateKind, NetId, Netlist, NetlistBuilder, Port};
pub use spec::{
    is_identifier, CarryInConvention, CarryOutConvention, Conventions, Dut, Encoding, Mix,
    NegativeZero, Operation, ParamValue, Ports, RandomSettings, Signal, Spec, ZeroFlag,
};
pub use word::{hex_digits, Word, MAX_WIDTH};

//! arithvec: golden-model test vectors, result-log checking and corner-class coverage for
//! arithmetic datapaths (adders, subtractors, add/sub units, negators, incrementers,
//! comparators) in five number encodings.
//!
//! The library is the whole tool; the `arithvec` binary only parses arguments and calls it.
//! Modules are private; their public types are re-exported here.
//!
//! ```
//! use arithvec::{Generator, Inputs, Spec, Word};
//!
//! let spec = Spec::parse(
//!     r#"
//!     name = "level_delta"
//!     operation = "sub"
//!     width = 8
//!     encoding = "twos"
//!     [ports]
//!     a = "a"
//!     b = "b"
//!     result = "y"
//!     carry_out = "co"
//!     overflow = "ovf"
//!     "#,
//!     "unit.toml",
//! )?;
//! let generator = Generator::new(&spec, Some(100), Some(1));
//! // 0x80 - 0x01 = 0x7f: -128 - 1 overflows two's complement, and needs no borrow.
//! let out = generator.catalogue().model().evaluate(&Inputs {
//!     a: Word::from_u64(0x80),
//!     b: Word::from_u64(0x01),
//!     ..Inputs::default()
//! });
//! assert_eq!(out.result, Word::from_u64(0x7f));
//! assert!(out.overflow && !out.carry_out);
//! // Random vector j is a pure function of (spec, seed, j).
//! let j = generator.directed().len() as u64 + 42;
//! assert_eq!(generator.vector(j), Generator::new(&spec, Some(100), Some(1)).vector(j));
//! # Ok::<(), arithvec::Error>(())
//! ```

#![deny(missing_docs)]

// The pipeline, in order: spec -> arith -> corners -> sets -> sim -> verdict, with the
// gate-level side (gates) beside sim/verdict. Each stage may import only the stages before it;
// tests/layout.rs keeps that true.
mod arith;
mod corners;
mod error;
mod gates;
mod sets;
mod sim;
mod spec;
mod verdict;

pub use arith::encoding::Value;
pub use arith::model::{Inputs, Model, Outputs};
pub use arith::word::{hex_digits, Word, MAX_WIDTH};
pub use corners::classes::{Catalogue, Class, Hits};
pub use corners::generate::{Generator, RandomStream};
pub use corners::pairs::{transition_pair_bound, transition_pairs};
pub use error::{Error, ErrorKind, Problem, Result};
pub use gates::fault::{
    compact, detection_matrix, grade, grade_with, DetectionMatrix, Fault, FaultEntry, FaultList,
    FaultReport, FaultSite, GradeOptions, PatternSet, PortValue, Redundancy, SimulationMode,
};
pub use gates::fault::{
    grade_transitions, PairSelection, TransitionEntry, TransitionFault, TransitionList,
    TransitionReport,
};
pub use gates::grade::{
    write_selection, write_topped_up, BuiltinModel, GradeOutcome, Grader, NetlistMismatch,
    TopUpFault, TopUpReport, TopUpStatus, TransitionOutcome, EXHAUSTIVE_REDUNDANCY_METHOD,
    SAT_REDUNDANCY_METHOD, TOP_UP_METHOD,
};
pub use gates::netlist::{Driver, Gate, GateKind, NetId, Netlist, NetlistBuilder, Port};
pub use gates::prove::{
    prove, prove_against, CounterOutput, Counterexample, ProveReport, ProveVerdict, PROOF_CLAIM,
    PROOF_LIMITS,
};
pub use gates::sat::{
    equivalence_miter, equivalence_miter_bits, fault_miter, Answer, RefBit, Solved,
};
pub use sets::hexfile::Packer;
pub use sets::import::{csv_sha256, parse_import_csv, read_imported};
pub use sets::layout::{Field, Layout, WordLayout};
pub use sets::vectorset::{
    csv_header, csv_row, read_manifest, read_manifest_unverified,
    remove_temporaries as remove_set_temporaries, sha256_hex, spec_identity, verify_files,
    write as write_vector_set, write_imported, FileRecord, ImportSource, Imported, Manifest,
    ManifestField, ManifestLayout, ManifestWord, PairLayout, Selection, SetBytes, Shard,
    TopUpVector, VectorSet, WriteOptions, EXPECTED_HEX, MANIFEST_JSON, PAIR_LAYOUT, STIMULUS_HEX,
    VECTORS_CSV,
};
pub use sim::log::{FieldValue, LogReader, LogRow, Radix, RowError};
pub use sim::testbench::{
    emit_testbench, testbench_file_name, testbench_name, Hdl, TestbenchOptions,
    MAX_TESTBENCH_VECTORS,
};
pub use spec::{
    check_ranges, default_amount_width, is_identifier, parse_port_text, ActiveLow, Bundle,
    CarryInConvention, CarryOutConvention, Conventions, DivByZero, Dut, Encoding, LargeAmount, Mix,
    NegativeZero, OffsetCarry, OpOptions, Operation, ParamValue, PortRange, Ports, RandomSettings,
    ResultPart, Rounding, SelectSpec, Signal, Signedness, Spec, UndefinedOutputs, VhdlType,
    VhdlTypes, ZeroFlag,
};
pub use spec::{Edge, ResetActive, Timing};
pub use verdict::check::{
    merge as merge_reports, CheckOptions, CheckReport, Checker, CoverageGate, Failure,
    FieldValueReport, LogProblems, Observed, OperationOutputs, OutOfStep, OutputReport,
    OutputTally, Verdict, EVIDENCE_NOTE,
};
pub use verdict::coverage::{
    surprise, BinFailures, ClassStatus, ClassSummary, Coverage, CoverageCounts, CoverageSummary,
};
pub use verdict::html::{
    render_check_html, render_grade_html, CompactedSet, GradeFault, GradeSummary, HtmlContext,
    HtmlRun, NetlistReference, TopUpSummary, HTML_FAILURES,
};
pub use verdict::report::{render_junit, render_junit_timed, render_text, verdict_line, ClassRows};
pub use verdict::seen::{RunRecord, SeenIndices, SetIdentity};
pub use verdict::table::{
    render_table, render_table_with, set_table_layout, table_layout, TableLayout,
};
pub use verdict::timing::{
    apply_timing, scan_markers, Displaced, Markers, TimingPass, TimingReport,
};

//! arithvec: golden-model test vectors, result-log checking and corner-class coverage for
//! arithmetic datapaths (adders, subtractors, add/sub units, negators, incrementers,
//! comparators) in five number encodings.
//!
//! The library is the whole tool; the `arithvec` binary only parses arguments and calls it.
//! Modules are private; their public types are re-exported here.

#![deny(missing_docs)]

mod bits;
mod classes;
mod encoding;
mod error;
mod generate;
mod hexfile;
mod layout;
mod model;
mod spec;
mod vectorset;
mod word;

pub use classes::{Catalogue, Class, Hits};
pub use encoding::Value;
pub use error::{Error, ErrorKind, Problem, Result};
pub use generate::{Generator, RandomStream};
pub use hexfile::Packer;
pub use layout::{Field, Layout, WordLayout};
pub use model::{Inputs, Model, Outputs};
pub use spec::{
    is_identifier, CarryInConvention, CarryOutConvention, Conventions, Dut, Encoding, Mix,
    NegativeZero, Operation, ParamValue, Ports, RandomSettings, Signal, Spec, ZeroFlag,
};
pub use vectorset::{
    csv_header, csv_row, read_manifest, sha256_hex, spec_identity, write as write_vector_set,
    FileRecord, Manifest, ManifestField, ManifestLayout, ManifestWord, Shard, VectorSet,
    WriteOptions, EXPECTED_HEX, MANIFEST_JSON, STIMULUS_HEX, VECTORS_CSV,
};
pub use word::{hex_digits, Word, MAX_WIDTH};

//! Stage 2, arithmetic: the bit-vector types ([`word::Word`], the fixed-width [`bits::Bits`]
//! integers), the five number encodings and the golden model of every operation.
//!
//! This stage knows nothing about files, simulators or reports. It may import only
//! `crate::error` and `crate::spec` (for the operation, encoding and convention types).

pub(crate) mod bits;
pub(crate) mod encoding;
pub(crate) mod model;
pub(crate) mod ops;
pub(crate) mod sat;
pub(crate) mod select;
pub(crate) mod word;

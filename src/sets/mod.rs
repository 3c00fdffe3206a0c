//! Stage 4, vector sets: the on-disk form of a generated set (vectors.csv, stimulus.hex,
//! expected.hex, manifest.json), the packing of ports into `$readmemh` words and the manifest
//! that names every file with its size and SHA-256.
//!
//! May import `crate::error`, `crate::spec`, `crate::arith` and `crate::corners`.

pub(crate) mod commit;
pub(crate) mod hexfile;
pub(crate) mod import;
pub(crate) mod layout;
pub(crate) mod vectorset;

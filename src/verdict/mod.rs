//! Stage 6, the verdict: checking every logged result against the golden model, exact
//! corner-class coverage, the sign-off gate and its exit status, merging of reports, and the
//! text, JSON, JUnit and HTML renderings.
//!
//! May import every earlier stage (`error`, `spec`, `arith`, `corners`, `sets`, `sim`), never
//! `crate::gates`.

pub(crate) mod bitmap;
pub(crate) mod check;
pub(crate) mod coverage;
pub(crate) mod html;
pub(crate) mod report;
pub(crate) mod seen;
pub(crate) mod table;
pub(crate) mod timing;

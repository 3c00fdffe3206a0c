//! The saturating operations `add_sat` and `sub_sat`: which operations they are. Part of
//! stage 1: no arithmetic here (the model is `arith::sat`).
//!
//! Every encoding is accepted: each has a largest and a smallest value to clamp to (ones'
//! complement and sign-magnitude clamp to +-(2^(N-1) - 1), so their range stays symmetric).
//! The ports are a, b, result, saturated and the optional zero and negative flags; a
//! carry_in, carry_out or overflow port is refused as a port the operation does not have.

use super::Operation;

impl Operation {
    /// The saturating operations, in documentation order.
    pub const SATURATING: [Operation; 2] = [Operation::AddSat, Operation::SubSat];

    /// True for add_sat and sub_sat.
    pub fn is_saturating(self) -> bool {
        matches!(self, Operation::AddSat | Operation::SubSat)
    }
}

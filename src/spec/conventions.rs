//! The one rule for `[conventions]` keys: a key is accepted only when some value of it would
//! change an expected output the unit has (or what the checker accepts), given the spec's
//! operation, encoding, ports and other conventions. The reader refuses a key without effect,
//! and `Spec::to_toml` writes exactly the keys with an effect, so a spec means one thing.
//! `tests/conventions.rs` checks the rule against the golden model, exhaustively at small
//! widths, for every key x encoding x operation x output port.

use super::{Encoding, NegativeZero, Operation, Signal, Spec, ZeroFlag};

/// A key of the `[conventions]` table.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum ConventionKey {
    CarryOut,
    CarryIn,
    NegativeZero,
    ZeroFlag,
    OffsetCarry,
}

impl ConventionKey {
    /// Every key, in the order the reader checks them.
    pub(crate) const ALL: [ConventionKey; 5] = [
        ConventionKey::CarryOut,
        ConventionKey::CarryIn,
        ConventionKey::NegativeZero,
        ConventionKey::ZeroFlag,
        ConventionKey::OffsetCarry,
    ];

    /// The key as written in the spec.
    pub(crate) fn name(self) -> &'static str {
        match self {
            ConventionKey::CarryOut => "carry_out",
            ConventionKey::CarryIn => "carry_in",
            ConventionKey::NegativeZero => "negative_zero",
            ConventionKey::ZeroFlag => "zero_flag",
            ConventionKey::OffsetCarry => "offset_carry",
        }
    }
}

impl Spec {
    /// None when `key` has an effect on this spec; otherwise why it has none (the message the
    /// reader gives, ending in what to do).
    pub(crate) fn convention_without_effect(&self, key: ConventionKey) -> Option<&'static str> {
        if self.select.is_some() {
            // A select unit: the key has an effect when it has one on some carried operation.
            let parts = self.select_parts();
            let whys: Vec<_> = parts
                .iter()
                .map(|(_, part)| part.convention_without_effect(key))
                .collect();
            return if whys.iter().any(Option::is_none) {
                None
            } else {
                whys.into_iter().flatten().next()
            };
        }
        let enc = self.encoding;
        let op = self.operation;
        match key {
            ConventionKey::CarryOut => {
                (!(self.subtracts() && enc.is_binary_datapath() && self.has(Signal::CarryOut)))
                    .then_some(
                        "has no effect: it applies to a carry_out port of a subtracting unit \
                 (sub, addsub, negate, decrement) in unsigned, twos or offset encoding; \
                 remove it",
                    )
            }
            ConventionKey::CarryIn => (!(matches!(op, Operation::Sub | Operation::AddSub)
                && self.has(Signal::CarryIn)))
            .then_some(
                "has no effect: it applies to the carry_in port of a sub or addsub unit; \
                 remove it",
            ),
            ConventionKey::NegativeZero => {
                if !enc.has_negative_zero() || op == Operation::Compare {
                    Some(
                        "has no effect: it applies to the result of a ones or signmag unit \
                         (not a comparator); remove it",
                    )
                } else if !(self.has(Signal::Result)
                    || self.has(Signal::Negative)
                    || (self.has(Signal::Zero) && self.conventions.zero_flag == ZeroFlag::Bits))
                {
                    // Overflow, carry_out and a value zero flag read the same for +0 and -0.
                    Some(
                        "has no effect: no output of this unit tells +0 from -0 (they show in \
                         the result, the negative flag, or a zero flag with zero_flag = \
                         \"bits\"); remove it",
                    )
                } else {
                    None
                }
            }
            ConventionKey::ZeroFlag => {
                if !self.has(Signal::Zero) {
                    Some("has no effect: the unit has no zero port; remove it")
                } else if enc == Encoding::Offset {
                    Some(
                        "has no effect: offset binary has one zero (10..0) and the zero flag \
                         is set for it; remove it",
                    )
                } else if !enc.has_negative_zero() {
                    Some(
                        "has no effect: unsigned and twos have one zero, whose bits are all 0; \
                         remove it",
                    )
                } else if self.conventions.negative_zero == NegativeZero::Positive {
                    Some(
                        "has no effect: with negative_zero = \"positive\" no result is -0, so \
                         \"value\" and \"bits\" agree; remove it",
                    )
                } else {
                    None
                }
            }
            ConventionKey::OffsetCarry => {
                if enc != Encoding::Offset {
                    Some("has no effect: it applies to offset-binary units only; remove it")
                } else if !matches!(op, Operation::Add | Operation::Sub | Operation::AddSub) {
                    Some(
                        "has no effect: it applies to add, sub and addsub units, which add or \
                         subtract two codes; remove it",
                    )
                } else if !self.has(Signal::CarryOut) {
                    Some("has no effect: the unit has no carry_out port; remove it")
                } else {
                    None
                }
            }
        }
    }
}

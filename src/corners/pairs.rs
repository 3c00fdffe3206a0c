//! Directed launch/capture pairs for transition (gross delay) faults of a ripple adder or
//! subtractor: `gen --pairs`.
//!
//! A pair is two vectors applied in consecutive cycles: the launch vector sets every line to
//! its initial value, the capture vector makes the transition and observes it. Two families,
//! in this order:
//!
//! * **chain** pairs launch a carry (borrow) generated in bit 0 into a chain of every length
//!   `k = 1 ..= width`: for an adder the capture vector is `a = 2^k - 1`, `b = 1` (bit 0
//!   generates, bits 1 .. k-1 propagate, bit k kills, or the carry leaves as carry out at
//!   `k = width`), the launch vector the same with `b = 0`; then the same two vectors in the
//!   other order, so the chain also falls. For a subtractor (`a - b`) the capture vector is
//!   `a = 2^k` (bit k kills the borrow; nothing when `k = width`), `b = 1`. That is `2 x
//!   width` pairs; the `k = width` pair launches into the longest chain there is.
//! * **cell** pairs give every one-bit cell every change of its three inputs (a, b, carry
//!   or borrow in): the cells of one parity are the targets and see the local change `x ->
//!   y` (all 56 ordered pairs of distinct triples), and each cell of the other parity
//!   generates or kills the carry (borrow) its upper neighbour needs in each vector. A target
//!   cell's carry out is seen through its neighbour's sum bit, which an XOR always passes
//!   on; bit 0's carry in is the carry_in port (as given: either meaning of the port gives
//!   bit 0 every change too) or none. That is `2 x 56 = 112` pairs at any width.
//!
//! The total is `2 x width + 112` pairs (fewer after duplicates are dropped at width 1 and
//! 2): linear in the width. The construction is common practice for ripple structures, no
//! single source; it guarantees every change of every cell's inputs, and so every testable
//! transition fault inside a cell-by-cell ripple netlist, but proves nothing for other
//! structures (a netlist graded with `grade --model transition` shows what it reaches).

use std::collections::HashSet;

use crate::arith::model::Inputs;
use crate::arith::word::Word;
use crate::error::{Error, Problem, Result};
use crate::spec::{Encoding, Operation, Signal, Spec};

/// The pairs `gen --pairs` writes, launch vector first, for `spec`. Errors for units other
/// than add and sub in unsigned or two's-complement encoding (whose ports are the raw bits
/// of a ripple chain).
pub fn transition_pairs(spec: &Spec) -> Result<Vec<(Inputs, Inputs)>> {
    let subtract = match spec.operation {
        Operation::Add => false,
        Operation::Sub => true,
        _ => {
            return Err(Error::problem(
                Problem::new(
                    "--pairs",
                    format!(
                        "launch/capture pairs are built for add and sub units (a ripple carry \
                         or borrow chain), not {}",
                        spec.operation
                    ),
                )
                .field("pairs"),
            ))
        }
    };
    if !matches!(spec.encoding, Encoding::Unsigned | Encoding::Twos) || spec.select.is_some() {
        return Err(Error::problem(
            Problem::new(
                "--pairs",
                format!(
                    "launch/capture pairs are built for unsigned and twos units, whose operand \
                     bits are the ripple chain's own; this unit is {}",
                    spec.encoding
                ),
            )
            .field("pairs"),
        ));
    }
    let width = spec.width;
    let has_carry_in = spec.has(Signal::CarryIn);
    let mut pairs = Vec::new();
    let mut seen = HashSet::new();
    let mut push = |launch: Inputs, capture: Inputs| {
        if seen.insert((launch, capture)) {
            pairs.push((launch, capture));
        }
    };
    // Chain family.
    for k in 1..=width {
        let a = if subtract {
            if k < width {
                Word::bit_mask(k)
            } else {
                Word::ZERO
            }
        } else {
            Word::ones(k)
        };
        let quiet = Inputs {
            a,
            ..Inputs::default()
        };
        let launched = Inputs {
            a,
            b: Word::from_u64(1),
            ..Inputs::default()
        };
        push(quiet, launched);
        push(launched, quiet);
    }
    // Cell family: (a, b, c) triples as 3-bit numbers, a the high bit.
    let triple = |t: u32| (t >> 2 & 1 == 1, t >> 1 & 1 == 1, t & 1 == 1);
    // A cell's (a, b) that generates (true) or kills (false) its carry or borrow out.
    let setup = |carry: bool| match (subtract, carry) {
        (false, true) => (true, true),
        (false, false) => (false, false),
        (true, true) => (false, true),
        (true, false) => (true, false),
    };
    let vector = |parity: u32, t: u32| {
        let (ta, tb, tc) = triple(t);
        let mut v = Inputs::default();
        for i in 0..width {
            let (a, b) = if i % 2 == parity { (ta, tb) } else { setup(tc) };
            v.a.set_bit(i, a);
            v.b.set_bit(i, b);
        }
        if has_carry_in && parity == 0 {
            v.carry_in = tc;
        }
        v
    };
    for parity in 0..2 {
        for x in 0..8 {
            for y in 0..8 {
                if x != y {
                    push(vector(parity, x), vector(parity, y));
                }
            }
        }
    }
    Ok(pairs)
}

/// The number of pairs [`transition_pairs`] builds at `width` before duplicates are dropped:
/// `2 x width + 112`.
pub const fn transition_pair_bound(width: u32) -> usize {
    2 * width as usize + 112
}

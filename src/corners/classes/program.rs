//! The straight-line class program: the catalogue's predicates compiled, per spec, into a flat
//! list of mask tests over the masked operands, so that classifying a vector is a short loop with
//! no branching on the spec. The reference predicates are in the parent module; tests hold the
//! two together.

use super::*;

/// The masked operands and range limits every predicate reads.
#[derive(Clone, Copy)]
pub(super) struct Operands<B> {
    pub(super) a: B,
    pub(super) b: B,
    pub(super) mask: B,
    pub(super) max: B,
    pub(super) min: B,
}

/// A class compiled for the fast path (units up to 64 bits wide).
#[derive(Debug, Clone)]
pub(super) struct NarrowStep {
    pub(super) op: NarrowOp,
    pub(super) class: u16,
    pub(super) base: u32,
    pub(super) slot: u16,
}

/// The compiled classes of one addsub group. Most classes that compare an operand or the
/// result with a fixed pattern miss for almost every vector, so they are gated: a 64-entry
/// hash filter per compared value says whether the value may equal one of the patterns, and
/// the step list used for the vector leaves out the classes of closed gates. The filter only
/// skips classes that cannot hit, so the hits are exactly those of the full list.
#[derive(Debug, Clone)]
pub(super) struct NarrowGroup {
    /// Step lists in catalogue order, indexed by the open gates (bit 0: operand a, bit 1:
    /// operand b, bit 2: the result).
    pub(super) lists: [Vec<NarrowStep>; 8],
    /// Per gate, bit `filter_slot(v)` is set for every pattern the gate's classes compare with.
    pub(super) filters: [u64; 3],
}

/// The filter bit of a pattern (a multiplicative hash to 6 bits).
#[inline]
pub(super) fn filter_slot(v: u128) -> u32 {
    ((v as u64 ^ (v >> 64) as u64).wrapping_mul(0x9e37_79b9_7f4a_7c15) >> 58) as u32
}

impl NarrowGroup {
    pub(super) fn new(steps: Vec<NarrowStep>) -> NarrowGroup {
        let mut filters = [0u64; 3];
        let gate = |op: &NarrowOp| -> Option<(usize, Vec<u128>)> {
            match *op {
                NarrowOp::Special { on_b, code } => Some((on_b as usize, vec![code])),
                NarrowOp::Alternating {
                    on_b,
                    pattern,
                    inverse,
                } => Some((on_b as usize, vec![pattern, inverse])),
                NarrowOp::ResultPattern { code } => Some((2, vec![code])),
                _ => None,
            }
        };
        for step in &steps {
            if let Some((g, patterns)) = gate(&step.op) {
                for p in patterns {
                    filters[g] |= 1 << filter_slot(p);
                }
            }
        }
        let lists = std::array::from_fn(|open: usize| {
            steps
                .iter()
                .filter(|s| gate(&s.op).is_none_or(|(g, _)| open >> g & 1 == 1))
                .cloned()
                .collect()
        });
        NarrowGroup { lists, filters }
    }

    /// The gates a vector opens.
    #[inline]
    pub(super) fn open(&self, a: u128, b: u128, result: u128) -> usize {
        let f = &self.filters;
        ((f[0] >> filter_slot(a) & 1)
            | (f[1] >> filter_slot(b) & 1) << 1
            | (f[2] >> filter_slot(result) & 1) << 2) as usize
    }
}

/// The classes-only fast path of one group: which classes a vector hits, as a bit mask,
/// computed without visiting the classes one by one. Classes that always hit are one
/// constant; the others are a handful of straight-line tests, each setting its class's bit.
/// Only groups whose classes are all of the kinds below get one.
#[derive(Debug, Clone)]
pub(super) struct MaskProgram {
    /// result.bits and chain.length: hit by every vector.
    pub(super) always: u128,
    /// cell.rows: hit on a ripple datapath.
    pub(super) cell_rows: u128,
    /// chain.carry_in: hit when the ripple datapath's carry-in is set.
    pub(super) chain_carry_in: u128,
    /// walking_one and walking_zero of operand a and b.
    pub(super) walking: [(u128, u128); 2],
    pub(super) result_zero_from_nonzero: u128,
    pub(super) binary: bool,
    pub(super) overflow: u128,
    pub(super) overflow_targets: [u128; 4],
    pub(super) edge: u128,
    pub(super) edge_flip: u128,
    /// Pattern classes: (compared value: 0 a, 1 b, 2 result; pattern; class bit).
    pub(super) patterns: Vec<(usize, u128, u128)>,
    /// The bins of the same classes, for [`MaskProgram::record`].
    pub(super) bins: BinPlan,
}

/// First bins (and dense slots) of a [`MaskProgram`]'s classes.
#[derive(Debug, Clone, Default)]
pub(super) struct BinPlan {
    pub(super) result_bits: Option<(u32, u16)>,
    pub(super) cell_rows: Option<(u32, u16)>,
    pub(super) chain_length: Option<u32>,
    pub(super) chain_carry_in: Option<u32>,
    pub(super) walking: [(Option<u32>, Option<u32>); 2],
    pub(super) result_zero_from_nonzero: Option<u32>,
    pub(super) overflow: Option<u32>,
    pub(super) edge: Option<u32>,
    /// The bin of each entry of `patterns`.
    pub(super) patterns: Vec<u32>,
}

impl MaskProgram {
    pub(super) fn new(steps: &[NarrowStep], classes: usize, binary: bool) -> Option<MaskProgram> {
        if classes > 128 {
            return None;
        }
        let mut p = MaskProgram {
            always: 0,
            cell_rows: 0,
            chain_carry_in: 0,
            walking: [(0, 0); 2],
            result_zero_from_nonzero: 0,
            binary,
            overflow: 0,
            overflow_targets: [0; 4],
            edge: 0,
            edge_flip: 0,
            patterns: Vec::new(),
            bins: BinPlan::default(),
        };
        for step in steps {
            let bit = 1u128 << step.class;
            let (base, plan) = (step.base, &mut p.bins);
            match step.op {
                NarrowOp::ResultBits => plan.result_bits = Some((base, step.slot)),
                NarrowOp::ChainLength => plan.chain_length = Some(base),
                NarrowOp::CellRows => plan.cell_rows = Some((base, step.slot)),
                NarrowOp::ChainFromCarryIn => plan.chain_carry_in = Some(base),
                NarrowOp::WalkingOne { on_b } => plan.walking[on_b as usize].0 = Some(base),
                NarrowOp::WalkingZero { on_b } => plan.walking[on_b as usize].1 = Some(base),
                NarrowOp::OverflowBoundary { .. } => plan.overflow = Some(base),
                NarrowOp::UnsignedEdge { .. } => plan.edge = Some(base),
                NarrowOp::ResultZeroFromNonzero { .. } => {
                    plan.result_zero_from_nonzero = Some(base)
                }
                NarrowOp::Special { .. } | NarrowOp::ResultPattern { .. } => {
                    plan.patterns.push(base)
                }
                NarrowOp::Alternating { .. } => plan.patterns.extend([base, base + 1]),
                NarrowOp::Generic => {}
            }
            match step.op {
                NarrowOp::ResultBits | NarrowOp::ChainLength => p.always |= bit,
                NarrowOp::CellRows => p.cell_rows |= bit,
                NarrowOp::ChainFromCarryIn => p.chain_carry_in |= bit,
                NarrowOp::WalkingOne { on_b } => p.walking[on_b as usize].0 |= bit,
                NarrowOp::WalkingZero { on_b } => p.walking[on_b as usize].1 |= bit,
                NarrowOp::OverflowBoundary { targets } => {
                    p.overflow |= bit;
                    p.overflow_targets = targets;
                }
                NarrowOp::UnsignedEdge { flip } => {
                    p.edge |= bit;
                    p.edge_flip = flip;
                }
                NarrowOp::Special { on_b, code } => p.patterns.push((on_b as usize, code, bit)),
                NarrowOp::Alternating {
                    on_b,
                    pattern,
                    inverse,
                } => {
                    p.patterns.push((on_b as usize, pattern, bit));
                    p.patterns.push((on_b as usize, inverse, bit));
                }
                NarrowOp::ResultPattern { code } => p.patterns.push((2, code, bit)),
                NarrowOp::ResultZeroFromNonzero { .. } => p.result_zero_from_nonzero |= bit,
                NarrowOp::Generic => return None,
            }
        }
        Some(p)
    }

    /// Records every bin and class `inputs` hits, as [`Catalogue::classify_narrow`] with
    /// [`Detail::Bins`] does but without per-class dispatch. The bins come in another order
    /// (which coverage counting does not care about); the classes are in catalogue order.
    pub(super) fn record(
        &self,
        cat: &Catalogue,
        inputs: &Inputs,
        t: &Trace<u128>,
        group: &NarrowGroup,
        hits: &mut Hits,
    ) {
        hits.clear(1);
        let w = cat.model.width();
        let mask = u128::low_mask(w);
        let a = inputs.a.low_u128() & mask;
        let b = inputs.b.low_u128() & mask;
        let plan = &self.bins;
        // The classes hit, gathered as their bins are found.
        let mut m = self.always;
        let with_cin = |k: u32| {
            if cat.has_carry_in {
                k * 2 + t.cin as u32
            } else {
                k
            }
        };
        if let Some((base, slot)) = plan.result_bits {
            hits.masks.push((!t.result & mask) as u64);
            hits.masks.push(t.result as u64);
            hits.dense.push(DenseHit {
                base,
                stride: 2,
                slot,
            });
            hits.dense.push(DenseHit {
                base: base + 1,
                stride: 2,
                slot: slot + 1,
            });
        }
        if plan.chain_length.is_some() || plan.chain_carry_in.is_some() {
            let (longest, from_cin) = narrow_chains(&t.path, w);
            if let Some(base) = plan.chain_length {
                hits.bins.push(base + longest);
            }
            if let (Some(base), Path::Ripple { c0: true, .. }) = (plan.chain_carry_in, t.path) {
                hits.bins.push(base + from_cin);
                m |= self.chain_carry_in;
            }
        }
        if let (Some((base, slot)), Path::Ripple { x, y, carries, .. }) = (plan.cell_rows, t.path) {
            m |= self.cell_rows;
            let (nx, ny, c, nc) = (!x & mask, !y & mask, carries, !carries);
            let pairs = [nx & ny, nx & y, x & ny, x & y];
            for (p, &pair) in pairs.iter().enumerate() {
                for (low, m) in [(0, pair & nc), (1, pair & c)] {
                    if m != 0 {
                        let row = (p as u32) * 2 + low;
                        hits.masks.push(m as u64);
                        hits.dense.push(DenseHit {
                            base: base + row,
                            stride: 8,
                            slot: slot + row as u16,
                        });
                    }
                }
            }
        }
        for ((x, &(one, zero)), &(one_bit, zero_bit)) in
            [a, b].iter().zip(&plan.walking).zip(&self.walking)
        {
            if let (Some(base), 1) = (one, x.count_ones()) {
                hits.bins.push(base + x.trailing_zeros());
                m |= one_bit;
            }
            let inv = !x & mask;
            if let (Some(base), 1) = (zero, inv.count_ones()) {
                hits.bins.push(base + inv.trailing_zeros());
                m |= zero_bit;
            }
        }
        if let Some(base) = plan.result_zero_from_nonzero {
            let nonzero = t.va != 0 || (self.binary && t.vb != 0);
            if nonzero && decode(t.result, w, cat.model.encoding()) == 0 {
                hits.bins.push(base);
                m |= self.result_zero_from_nonzero;
            }
        }
        if let Some(base) = plan.overflow {
            if let Some(k) = self.overflow_targets.iter().position(|v| *v == t.truth) {
                hits.bins.push(base + with_cin(k as u32));
                m |= self.overflow;
            }
        }
        if let Some(base) = plan.edge {
            let (ux, uy) = (a ^ self.edge_flip, b ^ self.edge_flip);
            let c = t.cin as u128;
            let k = if t.subtracting {
                match ux.wrapping_sub(uy).wrapping_sub(c) {
                    0 => Some(0),
                    u128::MAX => Some(1),
                    _ => None,
                }
            } else {
                let sum = ux + uy + c;
                if sum == mask {
                    Some(0)
                } else if sum == mask + 1 {
                    Some(1)
                } else {
                    None
                }
            };
            if let Some(k) = k {
                hits.bins.push(base + with_cin(k));
                m |= self.edge;
            }
        }
        if group.open(a, b, t.result) != 0 {
            let values = [a, b, t.result];
            for (&(on, pattern, bit), &bin) in self.patterns.iter().zip(&plan.patterns) {
                if values[on] == pattern {
                    hits.bins.push(bin);
                    m |= bit;
                }
            }
        }
        while m != 0 {
            hits.classes.push(m.trailing_zeros() as u16);
            m &= m - 1;
        }
    }

    /// The classes `inputs` hits (bit c for class c).
    #[inline]
    pub(super) fn classes(
        &self,
        cat: &Catalogue,
        inputs: &Inputs,
        t: &Trace<u128>,
        group: &NarrowGroup,
    ) -> u128 {
        let w = cat.model.width();
        let mask = u128::low_mask(w);
        let a = inputs.a.low_u128() & mask;
        let b = inputs.b.low_u128() & mask;
        let set = |hit: bool, bit: u128| if hit { bit } else { 0 };
        let mut m = self.always;
        if let Path::Ripple { c0, .. } = t.path {
            m |= self.cell_rows | set(c0, self.chain_carry_in);
        }
        for (x, &(one, zero)) in [a, b].iter().zip(&self.walking) {
            m |= set(x.count_ones() == 1, one) | set((!x & mask).count_ones() == 1, zero);
        }
        if self.result_zero_from_nonzero != 0 {
            let nonzero = t.va != 0 || (self.binary && t.vb != 0);
            let zero = decode(t.result, w, cat.model.encoding()) == 0;
            m |= set(nonzero && zero, self.result_zero_from_nonzero);
        }
        m |= set(self.overflow_targets.contains(&t.truth), self.overflow);
        if self.edge != 0 {
            let (ux, uy) = (a ^ self.edge_flip, b ^ self.edge_flip);
            let c = t.cin as u128;
            let hit = if t.subtracting {
                let d = ux.wrapping_sub(uy).wrapping_sub(c);
                d == 0 || d == u128::MAX
            } else {
                let sum = ux + uy + c;
                sum == mask || sum == mask + 1
            };
            m |= set(hit, self.edge);
        }
        if group.open(a, b, t.result) != 0 {
            let values = [a, b, t.result];
            for &(on, pattern, bit) in &self.patterns {
                m |= set(values[on] == pattern, bit);
            }
        }
        m
    }
}

/// The fast-path form of a [`Kind`]: the patterns it compares with, worked out once.
#[derive(Debug, Clone, Copy)]
pub(super) enum NarrowOp {
    Special {
        on_b: bool,
        code: u128,
    },
    Alternating {
        on_b: bool,
        pattern: u128,
        inverse: u128,
    },
    WalkingOne {
        on_b: bool,
    },
    WalkingZero {
        on_b: bool,
    },
    ResultPattern {
        code: u128,
    },
    ResultZeroFromNonzero {
        binary: bool,
    },
    ResultBits,
    OverflowBoundary {
        targets: [u128; 4],
    },
    UnsignedEdge {
        flip: u128,
    },
    ChainLength,
    ChainFromCarryIn,
    CellRows,
    /// Every other kind, evaluated by the generic predicate.
    Generic,
}

/// [`chain_lengths`] for units up to 64 bits wide. Instead of visiting every generate bit it
/// advances all chains at once, one bit position per step, so the loop runs as many times as
/// the longest chain is long (a handful of steps for random operands).
pub(super) fn narrow_chains(path: &Path<u128>, w: u32) -> (u32, u32) {
    let (cell, x, y, c0) = match *path {
        Path::Ripple { cell, x, y, c0, .. } => (cell, x, y, c0),
        Path::EndAround { x, y, .. } => (Cell::Adder, x, y, false),
        _ => return (0, 0),
    };
    let mask = u128::low_mask(w);
    let (g, p) = match cell {
        Cell::Adder => (x & y, (x ^ y) & mask),
        Cell::Subtractor => (!x & y & mask, !(x ^ y) & mask),
    };
    let from_cin = if c0 { p.trailing_ones().min(w) } else { 0 };
    let mut longest = 0;
    let mut front = g & mask;
    while front != 0 {
        longest += 1;
        front = (front << 1) & p;
    }
    (longest.max(from_cin), from_cin)
}

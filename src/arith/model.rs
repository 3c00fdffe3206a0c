//! The golden arithmetic model: every operation, every encoding, every flag.
//!
//! [`Model::evaluate`] maps a vector's inputs to the outputs a correct unit produces, following
//! the rules written down in DEVELOPERS.md ("Golden model rules"). The arithmetic is generic
//! over `bits::Bits` and runs on `u128` for widths up to 64 and on a 576-bit integer above.
//! Internally the model also records a [`Trace`] of the datapath (operands as the adder sees
//! them, the carry or borrow into every bit, the true result), which the corner-class
//! catalogue reads. The model knows nothing about files, ports or formats.

use crate::arith::bits::{Bits, Huge, Wide};
use crate::arith::encoding::{
    decode, encode, is_negative_zero, negative_zero, representable, sign_bit,
};
use crate::arith::ops::OpUnit;
use crate::arith::select::SelectModel;
use crate::arith::word::Word;
use crate::spec::ActiveLow;
use crate::spec::{
    CarryInConvention, CarryOutConvention, Encoding, NegativeZero, OffsetCarry, Operation, Signal,
    Spec, ZeroFlag,
};

/// The inputs of one vector. Fields the unit lacks are zero / false.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub struct Inputs {
    /// First operand.
    pub a: Word,
    /// Second operand.
    pub b: Word,
    /// The carry_in port's value (its meaning follows `conventions.carry_in`).
    pub carry_in: bool,
    /// addsub select: false = add, true = subtract.
    pub mode: bool,
    /// A select unit's operation code (0 for other units).
    pub select: u32,
}

/// The outputs of one vector. Fields the unit lacks are still computed where defined.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub struct Outputs {
    /// The N-bit result.
    pub result: Word,
    /// The carry_out port's value (its meaning follows `conventions.carry_out`).
    pub carry_out: bool,
    /// The true result is not representable (for add_sat and sub_sat: the `saturated`
    /// port, set exactly when the result was clamped).
    pub overflow: bool,
    /// Zero flag.
    pub zero: bool,
    /// Negative flag (the result's sign bit).
    pub negative: bool,
    /// Compare: a < b.
    pub less: bool,
    /// Compare: a == b.
    pub equal: bool,
    /// Compare: a > b.
    pub greater: bool,
    /// Division: the remainder (the quotient is `result`).
    pub remainder: Word,
    /// Division: the divisor is zero.
    pub div_by_zero: bool,
    /// Division by zero under `div_by_zero = "dont_care"`: the quotient and remainder are
    /// not compared for this vector (every other output is).
    pub dont_care: bool,
}

impl Inputs {
    /// The value of an input signal as a word.
    pub fn get(&self, signal: Signal) -> Word {
        match signal {
            Signal::A => self.a,
            Signal::B => self.b,
            Signal::CarryIn => Word::from_u64(self.carry_in as u64),
            Signal::Mode => Word::from_u64(self.mode as u64),
            Signal::Amount => self.b,
            Signal::Select => Word::from_u64(self.select as u64),
            _ => Word::ZERO,
        }
    }

    /// Sets an input signal from a word (1-bit signals take bit 0).
    pub fn set(&mut self, signal: Signal, value: Word) {
        match signal {
            Signal::A => self.a = value,
            Signal::B => self.b = value,
            Signal::CarryIn => self.carry_in = value.bit(0),
            Signal::Mode => self.mode = value.bit(0),
            Signal::Amount => self.b = value,
            Signal::Select => self.select = value.low_u64() as u32,
            _ => {}
        }
    }
}

impl Outputs {
    /// False for an output this vector leaves unspecified (the quotient and remainder of a
    /// division by zero under `div_by_zero = "dont_care"`), which no checker compares.
    #[inline]
    pub fn is_specified(&self, signal: Signal) -> bool {
        !(self.dont_care && matches!(signal, Signal::Quotient | Signal::Remainder))
    }

    /// The low 64 bits of an output signal's value, without building a word.
    #[inline]
    pub(crate) fn get_low(&self, signal: Signal) -> u64 {
        match signal {
            Signal::Result => self.result.low_u64(),
            Signal::CarryOut => self.carry_out as u64,
            Signal::Overflow => self.overflow as u64,
            Signal::Zero => self.zero as u64,
            Signal::Negative => self.negative as u64,
            Signal::Less => self.less as u64,
            Signal::Equal => self.equal as u64,
            Signal::Greater => self.greater as u64,
            Signal::Quotient => self.result.low_u64(),
            Signal::Remainder => self.remainder.low_u64(),
            Signal::DivByZero => self.div_by_zero as u64,
            Signal::Saturated => self.overflow as u64,
            _ => 0,
        }
    }

    /// The value of an output signal as a word.
    pub fn get(&self, signal: Signal) -> Word {
        let flag = |b: bool| Word::from_u64(b as u64);
        match signal {
            Signal::Result => self.result,
            Signal::CarryOut => flag(self.carry_out),
            Signal::Overflow => flag(self.overflow),
            Signal::Zero => flag(self.zero),
            Signal::Negative => flag(self.negative),
            Signal::Less => flag(self.less),
            Signal::Equal => flag(self.equal),
            Signal::Greater => flag(self.greater),
            Signal::Quotient => self.result,
            Signal::Remainder => self.remainder,
            Signal::DivByZero => flag(self.div_by_zero),
            Signal::Saturated => flag(self.overflow),
            _ => Word::ZERO,
        }
    }

    /// Sets an output signal from a word (1-bit signals take bit 0).
    pub fn set(&mut self, signal: Signal, value: Word) {
        let b = value.bit(0);
        match signal {
            Signal::Result => self.result = value,
            Signal::CarryOut => self.carry_out = b,
            Signal::Overflow => self.overflow = b,
            Signal::Zero => self.zero = b,
            Signal::Negative => self.negative = b,
            Signal::Less => self.less = b,
            Signal::Equal => self.equal = b,
            Signal::Greater => self.greater = b,
            Signal::Quotient => self.result = value,
            Signal::Remainder => self.remainder = value,
            Signal::DivByZero => self.div_by_zero = b,
            Signal::Saturated => self.overflow = b,
            _ => {}
        }
    }
}

/// Which one-bit cell a binary datapath is built from, for chain and cell-row classes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Cell {
    /// Full adder: generate x&y, propagate x^y, kill ~x&~y.
    Adder,
    /// Full subtractor x - y: generate ~x&y, propagate ~(x^y), kill x&~y.
    Subtractor,
}

/// The datapath of one evaluation, as the corner classes see it.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Path<B> {
    /// An N-bit ripple adder or subtractor on (x, y, c0): unsigned, twos and offset units.
    Ripple {
        cell: Cell,
        x: B,
        y: B,
        c0: bool,
        /// Bit i is the carry (borrow) into bit i; bit N is the carry (borrow) out.
        carries: B,
    },
    /// A one's-complement end-around-carry adder on (x, y).
    EndAround {
        x: B,
        y: B,
        /// The first pass x + y, N + 1 bits.
        first: B,
        /// The end-around carry.
        carry: bool,
    },
    /// A sign-magnitude adder.
    SignMagnitude {
        /// The signs differed (after inverting b's for a subtraction): magnitudes subtract.
        effective_sub: bool,
        /// a's magnitude.
        ma: B,
        /// The effective second operand's magnitude.
        mb: B,
        /// Same-sign case: the magnitude sum carried out.
        magnitude_carry: bool,
    },
    /// No adder: a comparator, or a negator that only flips bits.
    None,
}

/// Everything the model computed for one vector.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Trace<B> {
    /// Decoded a and b (b is zero for unary operations).
    pub va: B,
    pub vb: B,
    /// The carry_in as the arithmetic uses it: a carry for addition, a borrow for subtraction
    /// (already translated from the port's convention), false when there is none.
    pub cin: bool,
    /// True when the operation subtracts (sub, addsub in mode 1, negate, decrement).
    pub subtracting: bool,
    /// The exact mathematical result (for compare: va - vb).
    pub truth: B,
    /// Result pattern (N bits).
    pub result: B,
    pub path: Path<B>,
    pub outputs_flags: Flags,
    /// Division: the remainder pattern (zero for the other operations).
    pub remainder: B,
}

/// The one-bit outputs.
#[derive(Debug, Clone, Copy, Default)]
pub(crate) struct Flags {
    pub carry_out: bool,
    pub overflow: bool,
    pub zero: bool,
    pub negative: bool,
    pub less: bool,
    pub equal: bool,
    pub greater: bool,
    pub div_by_zero: bool,
    /// See [`Outputs::dont_care`].
    pub dont_care: bool,
}

/// Where one input of a ripple datapath comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Source {
    A,
    B,
    /// ~b (an add/sub unit in subtract mode, a one's-complement subtractor).
    NotB,
    /// The constant 00..0.
    Zero,
    /// The constant 00..01.
    One,
    /// The constant 11..10 (one's-complement -1).
    NotOne,
}

impl Source {
    fn pick<B: Bits>(self, a: B, b: B, width: u32) -> B {
        match self {
            Source::A => a,
            Source::B => b,
            Source::NotB => b.not().mask(width),
            Source::Zero => B::zero(),
            Source::One => B::one().mask(width),
            Source::NotOne => B::one().not().mask(width),
        }
    }

    /// The datapath operand: the source, with offset binary's top-bit inversion applied to
    /// operands (not to constants).
    pub(crate) fn operand<B: Bits>(self, a: B, b: B, width: u32, flip: B) -> B {
        let v = self.pick(a, b, width);
        if self.is_constant() {
            v
        } else {
            v.xor(flip)
        }
    }

    pub(crate) fn is_constant(self) -> bool {
        matches!(self, Source::Zero | Source::One | Source::NotOne)
    }
}

/// Where the datapath's carry-in (borrow-in for a subtractor cell) comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum CarrySource {
    Fixed(bool),
    /// The carry_in port, inverted or not.
    Port {
        invert: bool,
    },
}

impl CarrySource {
    pub(crate) fn value(self, port: bool) -> bool {
        match self {
            CarrySource::Fixed(v) => v,
            CarrySource::Port { invert } => port != invert,
        }
    }
}

/// The N-bit ripple datapath behind an operation: which cell, what feeds it. For offset
/// binary (`flip`) the operands' top bits are inverted on the way in (constants are not) and
/// the result's top bit on the way out.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct RippleView {
    pub cell: Cell,
    pub x: Source,
    pub y: Source,
    pub c0: CarrySource,
    pub flip: bool,
}

/// The golden model for one spec.
#[derive(Debug, Clone)]
pub struct Model {
    operation: Operation,
    encoding: Encoding,
    width: u32,
    carry_out: CarryOutConvention,
    carry_in: CarryInConvention,
    negative_zero: NegativeZero,
    zero_flag: ZeroFlag,
    /// `conventions.offset_carry = "codes"` on an offset add, sub or addsub unit.
    codes_carry: bool,
    has_carry_in: bool,
    force_wide: bool,
    /// [`Model::ripple_view`] for mode false and true, worked out once.
    views: [Option<RippleView>; 2],
    /// The shift, rotate or multiply unit, for those operations.
    unit: Option<OpUnit>,
    /// A select unit's per-operation models (see `arith::select`).
    pub(crate) select: Option<std::sync::Arc<SelectModel>>,
    /// `conventions.active_low`: these flags are inverted on the way out.
    active_low: ActiveLow,
}

impl Model {
    /// The model for `spec`.
    pub fn new(spec: &Spec) -> Model {
        let mut model = Model {
            operation: spec.operation,
            encoding: spec.encoding,
            width: spec.width,
            carry_out: spec.conventions.carry_out,
            carry_in: spec.conventions.carry_in,
            negative_zero: spec.conventions.negative_zero,
            zero_flag: spec.conventions.zero_flag,
            codes_carry: spec.encoding == Encoding::Offset
                && spec.conventions.offset_carry == OffsetCarry::Codes
                && matches!(
                    spec.operation,
                    Operation::Add | Operation::Sub | Operation::AddSub
                ),
            has_carry_in: spec.has(Signal::CarryIn),
            force_wide: false,
            views: [None; 2],
            unit: spec.options.map(|options| OpUnit {
                operation: spec.operation,
                encoding: spec.encoding,
                width: spec.width,
                options,
                negative_zero: spec.conventions.negative_zero,
                zero_flag: spec.conventions.zero_flag,
            }),
            select: SelectModel::new(spec).map(std::sync::Arc::new),
            active_low: spec.conventions.active_low,
        };
        model.views = [model.find_ripple_view(false), model.find_ripple_view(true)];
        model
    }

    /// The same model, always on the wide arithmetic path (for cross-checking the fast path).
    #[doc(hidden)]
    pub fn wide_only(mut self) -> Model {
        self.force_wide = true;
        self
    }

    /// Operand width in bits.
    pub fn width(&self) -> u32 {
        self.width
    }

    /// The encoding.
    pub fn encoding(&self) -> Encoding {
        self.encoding
    }

    /// The operation.
    pub fn operation(&self) -> Operation {
        self.operation
    }

    pub(crate) fn uses_fast_path(&self) -> bool {
        // A u128 holds a 63 x 63-bit signed product; a 64-bit multiplier takes the wide path.
        self.width <= 64
            && !self.force_wide
            && !(self.operation == Operation::Mul && self.width > 63)
    }

    /// True when the exact results need more than the 576-bit wide integer (products of
    /// operands above 286 bits).
    pub(crate) fn needs_huge(&self) -> bool {
        self.operation == Operation::Mul && 2 * self.width + 2 > Wide::CAPACITY
    }

    /// The shift, rotate or multiply unit (None for the other operations).
    pub(crate) fn unit(&self) -> Option<&OpUnit> {
        self.unit.as_ref()
    }

    /// The ripple datapath for the operation in `mode` (ignored unless addsub), or None when
    /// the unit has none (compare, sign-magnitude, one's-complement negate).
    #[inline]
    pub(crate) fn ripple_view(&self, mode: bool) -> Option<RippleView> {
        self.views[mode as usize]
    }

    fn find_ripple_view(&self, mode: bool) -> Option<RippleView> {
        use Source::*;
        let port = |invert: bool| {
            if self.has_carry_in {
                CarrySource::Port { invert }
            } else {
                CarrySource::Fixed(invert)
            }
        };
        // For subtraction the port is a borrow unless the convention says it is the raw
        // adder carry-in.
        let borrow_port = |adder_view: bool| {
            if self.has_carry_in {
                let raw_carry = self.carry_in == CarryInConvention::Carry;
                CarrySource::Port {
                    invert: raw_carry != adder_view,
                }
            } else {
                // No borrow-in: the adder view's carry-in is tied to 1, the cell's borrow to 0.
                CarrySource::Fixed(adder_view)
            }
        };
        let (cell, x, y, c0) = match (self.encoding, self.operation) {
            (
                _,
                Operation::Shl
                | Operation::Shr
                | Operation::Sra
                | Operation::Rol
                | Operation::Ror
                | Operation::Mul
                | Operation::Div
                | Operation::Rem
                | Operation::DivRem
                | Operation::Abs
                | Operation::Min
                | Operation::Max
                | Operation::And
                | Operation::Or
                | Operation::Xor
                | Operation::Not
                | Operation::Pass
                | Operation::AddSat
                | Operation::SubSat
                | Operation::Select,
            ) => return None,
            (Encoding::SignMagnitude, _) | (_, Operation::Compare) => return None,
            (Encoding::Ones, Operation::Negate) => return None,
            (Encoding::Ones, Operation::Add) => (Cell::Adder, A, B, CarrySource::Fixed(false)),
            (Encoding::Ones, Operation::AddSub) if !mode => {
                (Cell::Adder, A, B, CarrySource::Fixed(false))
            }
            (Encoding::Ones, Operation::Sub | Operation::AddSub) => {
                (Cell::Adder, A, NotB, CarrySource::Fixed(false))
            }
            (Encoding::Ones, Operation::Increment) => {
                (Cell::Adder, A, One, CarrySource::Fixed(false))
            }
            (Encoding::Ones, Operation::Decrement) => {
                (Cell::Adder, A, NotOne, CarrySource::Fixed(false))
            }
            (_, Operation::Add) => (Cell::Adder, A, B, port(false)),
            (_, Operation::Sub) => (Cell::Subtractor, A, B, borrow_port(false)),
            // An add/sub unit is one adder: b XOR mode, mode into the carry-in.
            (_, Operation::AddSub) if mode => (Cell::Adder, A, NotB, borrow_port(true)),
            (_, Operation::AddSub) => (Cell::Adder, A, B, port(false)),
            (_, Operation::Negate) => (Cell::Subtractor, Zero, A, CarrySource::Fixed(false)),
            (_, Operation::Increment) => (Cell::Adder, A, Zero, CarrySource::Fixed(true)),
            (_, Operation::Decrement) => (Cell::Subtractor, A, Zero, CarrySource::Fixed(true)),
        };
        Some(RippleView {
            cell,
            x,
            y,
            c0,
            flip: self.encoding == Encoding::Offset,
        })
    }

    /// The outputs a correct unit gives for `inputs`.
    pub fn evaluate(&self, inputs: &Inputs) -> Outputs {
        if let Some(select) = &self.select {
            return select.evaluate(inputs);
        }
        if self.uses_fast_path() {
            self.outputs_of(&self.trace::<u128>(inputs))
        } else if self.needs_huge() {
            self.outputs_of(&self.trace::<Huge>(inputs))
        } else {
            self.outputs_of(&self.trace::<Wide>(inputs))
        }
    }

    /// Under `negative_zero = "either"`, the other acceptable outputs when the result is a
    /// zero (the other zero pattern, with the zero and negative flags it implies).
    pub fn alternative(&self, outputs: &Outputs) -> Option<Outputs> {
        if self.negative_zero != NegativeZero::Either || self.operation == Operation::Compare {
            return None;
        }
        let w = self.width;
        let p = Wide::from_word(&outputs.result);
        let nz = negative_zero::<Wide>(w, self.encoding)?;
        let other = if p.is_zero() {
            nz
        } else if p == nz {
            Wide::zero()
        } else {
            return None;
        };
        let mut alt = *outputs;
        alt.result = other.to_word();
        alt.zero = self.zero_flag_of(other) != self.active_low.contains(Signal::Zero);
        alt.negative =
            sign_bit(other, w, self.encoding) != self.active_low.contains(Signal::Negative);
        Some(alt)
    }

    pub(crate) fn outputs_of<B: Bits>(&self, t: &Trace<B>) -> Outputs {
        let f = t.outputs_flags;
        let mut outputs = Outputs {
            result: t.result.to_word(),
            carry_out: f.carry_out,
            overflow: f.overflow,
            zero: f.zero,
            negative: f.negative,
            less: f.less,
            equal: f.equal,
            greater: f.greater,
            remainder: t.remainder.to_word(),
            div_by_zero: f.div_by_zero,
            dont_care: f.dont_care,
        };
        // `conventions.active_low`: these one-bit flags are inverted on the way out.
        for s in self.active_low.signals() {
            let v = outputs.get(s).bit(0);
            outputs.set(s, Word::from_u64(!v as u64));
        }
        outputs
    }

    fn zero_flag_of<B: Bits>(&self, result: B) -> bool {
        match self.zero_flag {
            ZeroFlag::Value => decode(result, self.width, self.encoding).is_zero(),
            ZeroFlag::Bits => result.is_zero(),
        }
    }

    /// The carry-in as arithmetic (carry when adding, borrow when subtracting).
    fn arithmetic_carry_in(&self, inputs: &Inputs, subtracting: bool) -> bool {
        if !self.has_carry_in {
            return false;
        }
        if subtracting && self.carry_in == CarryInConvention::Carry {
            !inputs.carry_in
        } else {
            inputs.carry_in
        }
    }

    /// Runs the model and keeps the datapath trace.
    pub(crate) fn trace<B: Bits>(&self, inputs: &Inputs) -> Trace<B> {
        if let Some(select) = &self.select {
            return select.trace(inputs);
        }
        if let Some(unit) = &self.unit {
            let r = unit.evaluate(B::from_word(&inputs.a), B::from_word(&inputs.b));
            return Trace {
                va: r.va,
                vb: r.vb,
                cin: false,
                subtracting: false,
                truth: r.truth,
                result: r.result,
                path: Path::None,
                outputs_flags: Flags {
                    carry_out: r.carry_out,
                    overflow: r.overflow,
                    zero: r.zero,
                    negative: r.negative,
                    div_by_zero: r.div_by_zero,
                    dont_care: r.dont_care,
                    ..Flags::default()
                },
                remainder: r.remainder,
            };
        }
        let w = self.width;
        let enc = self.encoding;
        let mask = B::low_mask(w);
        let a = B::from_word(&inputs.a).mask(w);
        let b = if self.operation.is_binary() {
            B::from_word(&inputs.b).mask(w)
        } else {
            B::zero()
        };
        let va = decode(a, w, enc);
        let vb = if self.operation.is_binary() {
            decode(b, w, enc)
        } else {
            B::zero()
        };
        let subtracting = match self.operation {
            Operation::Sub | Operation::Negate | Operation::Decrement => true,
            Operation::AddSub => inputs.mode,
            _ => false,
        };
        let cin = self.arithmetic_carry_in(inputs, subtracting);
        let cin_b = B::from_bool(cin);
        let truth = match self.operation {
            Operation::Add => va.add(vb).add(cin_b),
            Operation::Sub => va.sub(vb).sub(cin_b),
            Operation::AddSub if inputs.mode => va.sub(vb).sub(cin_b),
            Operation::AddSub => va.add(vb).add(cin_b),
            Operation::Negate => va.neg(),
            Operation::Increment => va.add(B::one()),
            Operation::Decrement => va.sub(B::one()),
            Operation::Compare => va.sub(vb),
            // Shifts, rotates and mul returned above with their own unit's trace.
            _ => unreachable!("extended operations have their own model"),
        };

        if self.operation == Operation::Compare {
            let flags = Flags {
                less: va.slt(&vb),
                equal: va == vb,
                greater: vb.slt(&va),
                ..Flags::default()
            };
            return Trace {
                va,
                vb,
                cin: false,
                subtracting: true,
                truth,
                result: B::zero(),
                path: Path::None,
                outputs_flags: flags,
                remainder: B::zero(),
            };
        }

        let (result, path, raw_carry_out) = match enc {
            Encoding::Unsigned | Encoding::Twos | Encoding::Offset | Encoding::Ones => {
                let Some(view) = self.ripple_view(inputs.mode) else {
                    // One's-complement negation is a row of inverters.
                    let r = a.not().mask(w);
                    return self.finish(va, vb, cin, subtracting, truth, r, Path::None, false);
                };
                let flip = if view.flip {
                    B::single_bit(w - 1)
                } else {
                    B::zero()
                };
                let x = view.x.operand(a, b, w, flip);
                let y = view.y.operand(a, b, w, flip);
                let c0 = view.c0.value(inputs.carry_in);
                let raw = match view.cell {
                    Cell::Adder => x.add(y).add(B::from_bool(c0)),
                    Cell::Subtractor => x.sub(y).sub(B::from_bool(c0)),
                };
                let carries = x.xor(y).xor(raw).mask(w + 1);
                let out = raw.bit(w);
                if enc == Encoding::Ones {
                    let r = raw.add(B::from_bool(out)).mask(w);
                    (
                        r,
                        Path::EndAround {
                            x,
                            y,
                            first: raw,
                            carry: out,
                        },
                        out,
                    )
                } else {
                    // An offset unit that adds the codes carries out of its own top bit.
                    let out = if self.codes_carry {
                        offset_carries(view.cell, x, y, c0, w).1
                    } else {
                        out
                    };
                    (
                        raw.and(mask).xor(flip),
                        Path::Ripple {
                            cell: view.cell,
                            x,
                            y,
                            c0,
                            carries,
                        },
                        out,
                    )
                }
            }
            Encoding::SignMagnitude => {
                let m = w - 1;
                let sign = B::single_bit(m);
                let b_eff = match self.operation {
                    Operation::Add => b,
                    Operation::AddSub if !subtracting => b,
                    Operation::Sub | Operation::AddSub => b.xor(sign),
                    Operation::Increment => B::one().mask(m),
                    Operation::Decrement => B::one().mask(m).or(sign),
                    Operation::Negate => {
                        let r = a.xor(sign);
                        return self.finish(va, vb, cin, subtracting, truth, r, Path::None, false);
                    }
                    Operation::Compare => unreachable!("handled above"),
                    _ => unreachable!("extended operations have their own model"),
                };
                let (sa, sb) = (a.bit(m), b_eff.bit(m));
                let (ma, mb) = (a.mask(m), b_eff.mask(m));
                let (mag, s, effective_sub, magnitude_carry) = if sa == sb {
                    let sum = ma.add(mb);
                    (sum.mask(m), sa, false, sum.bit(m))
                } else if !ma.slt(&mb) {
                    (ma.sub(mb), sa, true, false)
                } else {
                    (mb.sub(ma), sb, true, false)
                };
                let r = if s { mag.or(sign) } else { mag };
                (
                    r,
                    Path::SignMagnitude {
                        effective_sub,
                        ma,
                        mb,
                        magnitude_carry,
                    },
                    false,
                )
            }
        };
        let carry_out = if subtracting && enc.is_binary_datapath() {
            // For a ripple subtractor raw_carry_out is the borrow; for the add/sub unit's
            // adder it is the raw carry, NOT borrow.
            let borrow = match path {
                Path::Ripple {
                    cell: Cell::Subtractor,
                    ..
                } => raw_carry_out,
                _ => !raw_carry_out,
            };
            match self.carry_out {
                CarryOutConvention::Borrow => borrow,
                CarryOutConvention::Carry => !borrow,
            }
        } else {
            raw_carry_out
        };
        self.finish(va, vb, cin, subtracting, truth, result, path, carry_out)
    }

    #[allow(clippy::too_many_arguments)]
    fn finish<B: Bits>(
        &self,
        va: B,
        vb: B,
        cin: bool,
        subtracting: bool,
        truth: B,
        mut result: B,
        path: Path<B>,
        carry_out: bool,
    ) -> Trace<B> {
        let (w, enc) = (self.width, self.encoding);
        if self.negative_zero == NegativeZero::Positive && is_negative_zero(result, w, enc) {
            result = B::zero();
        }
        let flags = Flags {
            carry_out,
            overflow: !representable(truth, w, enc),
            zero: self.zero_flag_of(result),
            negative: sign_bit(result, w, enc),
            ..Flags::default()
        };
        Trace {
            va,
            vb,
            cin,
            subtracting,
            truth,
            result,
            path,
            outputs_flags: flags,
            remainder: B::zero(),
        }
    }

    /// The pattern for value `v` when representable (used by the directed generator).
    pub(crate) fn encode_value<B: Bits>(&self, v: B) -> Option<B> {
        representable(v, self.width, self.encoding).then(|| encode(v, self.width, self.encoding))
    }
}

/// The raw carry (borrow, for a subtractor cell) out of the top bit of an offset-binary
/// ripple datapath with operands `x`, `y` and carry-in `c0` as the inner two's-complement
/// datapath sees them: (the inner datapath's, that of the same cell fed the codes, whose top
/// bits are the inverse). They differ exactly when the top bits of `x` and `y` are equal for
/// an adder cell, and differ for a subtractor cell.
pub(crate) fn offset_carries<B: Bits>(cell: Cell, x: B, y: B, c0: bool, w: u32) -> (bool, bool) {
    let flip = B::single_bit(w - 1);
    let c = B::from_bool(c0);
    let raw = |x: B, y: B| match cell {
        Cell::Adder => x.add(y).add(c),
        Cell::Subtractor => x.sub(y).sub(c),
    };
    (raw(x, y).bit(w), raw(x.xor(flip), y.xor(flip)).bit(w))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec(op: Operation, enc: Encoding, width: u32) -> Spec {
        Spec::with_defaults(op, enc, width)
    }

    fn eval(s: &Spec, a: u64, b: u64, cin: bool, mode: bool) -> Outputs {
        Model::new(s).evaluate(&Inputs {
            a: Word::from_u64(a),
            b: Word::from_u64(b),
            carry_in: cin,
            mode,
            select: 0,
        })
    }

    /// Hand-worked 8-bit two's-complement examples (common practice, no source):
    /// 0x7f + 0x01 = 0x80 overflows; 0x80 - 0x01 = 0x7f overflows with no borrow;
    /// 0x00 - 0x01 = 0xff borrows without overflow.
    #[test]
    fn twos_worked_examples() {
        let add = spec(Operation::Add, Encoding::Twos, 8);
        let o = eval(&add, 0x7f, 0x01, false, false);
        assert_eq!(o.result, Word::from_u64(0x80));
        assert!(o.overflow && !o.carry_out && o.negative);
        let sub = spec(Operation::Sub, Encoding::Twos, 8);
        let o = eval(&sub, 0x80, 0x01, false, false);
        assert_eq!(o.result, Word::from_u64(0x7f));
        assert!(o.overflow && !o.carry_out);
        let o = eval(&sub, 0x00, 0x01, false, false);
        assert_eq!(o.result, Word::from_u64(0xff));
        assert!(
            !o.overflow && o.carry_out,
            "borrow convention: carry_out = borrow"
        );
    }

    /// RFC 1071 section 3 worked example: the one's-complement sum of the 16-bit words
    /// 0x0001, 0xf203, 0xf4f5, 0xf6f7 is 0xddf2 (end-around carries folded in).
    #[test]
    fn rfc1071_checksum_example() {
        let add = spec(Operation::Add, Encoding::Ones, 16);
        let mut acc = 0x0001;
        for w in [0xf203u64, 0xf4f5, 0xf6f7] {
            acc = eval(&add, acc, w, false, false).result.low_u64();
        }
        assert_eq!(acc, 0xddf2);
    }

    /// Sign-magnitude x + (-x) is -0 without a zero fix-up when x < 0 and +0 when x > 0
    /// (DOMAIN notes after M. Mano, Computer System Architecture, 10-2).
    #[test]
    fn signmag_x_plus_minus_x() {
        let add = spec(Operation::Add, Encoding::SignMagnitude, 8);
        assert_eq!(
            eval(&add, 0x85, 0x05, false, false).result,
            Word::from_u64(0x80)
        );
        assert_eq!(
            eval(&add, 0x05, 0x85, false, false).result,
            Word::from_u64(0x00)
        );
        let mut fixed = add.clone();
        fixed.conventions.negative_zero = NegativeZero::Positive;
        assert_eq!(eval(&fixed, 0x85, 0x05, false, false).result, Word::ZERO);
    }

    #[test]
    fn ones_x_plus_minus_x_is_negative_zero() {
        let add = spec(Operation::Add, Encoding::Ones, 8);
        let o = eval(&add, 0x05, 0xfa, false, false);
        assert_eq!(o.result, Word::from_u64(0xff));
        assert!(o.zero && o.negative && !o.overflow);
    }

    #[test]
    fn carry_conventions_invert_only_the_port() {
        let mut sub = spec(Operation::Sub, Encoding::Unsigned, 8);
        let borrow = eval(&sub, 3, 5, false, false);
        sub.conventions.carry_out = CarryOutConvention::Carry;
        let carry = eval(&sub, 3, 5, false, false);
        assert!(borrow.carry_out && !carry.carry_out);
        assert_eq!(borrow.result, carry.result);
        sub.conventions.carry_in = CarryInConvention::Carry;
        // Raw carry-in 1 means "no borrow": 5 - 3 = 2.
        assert_eq!(eval(&sub, 5, 3, true, false).result, Word::from_u64(2));
        assert_eq!(eval(&sub, 5, 3, false, false).result, Word::from_u64(1));
    }

    #[test]
    fn addsub_mode_selects() {
        let s = spec(Operation::AddSub, Encoding::Twos, 8);
        assert_eq!(eval(&s, 10, 3, false, false).result, Word::from_u64(13));
        assert_eq!(eval(&s, 10, 3, false, true).result, Word::from_u64(7));
        assert_eq!(eval(&s, 10, 3, true, true).result, Word::from_u64(6));
    }

    #[test]
    fn either_zero_offers_the_other_pattern() {
        let mut s = spec(Operation::Add, Encoding::Ones, 8);
        s.conventions.negative_zero = NegativeZero::Either;
        let m = Model::new(&s);
        let o = m.evaluate(&Inputs {
            a: Word::from_u64(5),
            b: Word::from_u64(0xfa),
            ..Inputs::default()
        });
        let alt = m.alternative(&o).unwrap();
        assert_eq!(alt.result, Word::ZERO);
        assert!(alt.zero && !alt.negative);
    }
}

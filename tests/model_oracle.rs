//! Checks the golden model against references from outside it, through the public API only.
//!
//! The main oracle is an independent reimplementation of DEVELOPERS.md ("Golden model
//! rules") written here on decoded values with num-bigint arithmetic, so it holds at every
//! width up to 512. It works from values and ranges rather than from the model's bit
//! tricks: the binary datapaths wrap the true result modulo 2^N, offset binary is that
//! two's-complement pattern with its top bit inverted, one's complement runs the
//! end-around-carry adder, and sign-magnitude follows the magnitude rules. The same
//! reference, instantiated on `i128`, covers every input at widths 1 to 6. Rust's own
//! primitive integer methods check the common widths 8 to 128, and textbook truth tables
//! and hand-worked examples pin single cases whose answer is known without any model.

use std::cmp::Ordering;

use arithvec::{
    CarryInConvention, CarryOutConvention, Encoding, Inputs, Model, NegativeZero, OffsetCarry,
    Operation, Outputs, Signal, Spec, Value, Word, ZeroFlag,
};
use num_bigint::{BigInt, Sign};

// ---------------------------------------------------------------------------------------
// Deterministic pseudo-random numbers.
// ---------------------------------------------------------------------------------------

/// SplitMix64 (Steele, Lea and Flood, "Fast splittable pseudorandom number generators",
/// OOPSLA 2014; constants from memory). Fixed seeds keep every run identical.
struct SplitMix(u64);

impl SplitMix {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }

    fn below(&mut self, n: u64) -> u64 {
        self.next() % n
    }

    fn coin(&mut self) -> bool {
        self.next() & 1 == 1
    }

    /// A uniformly random pattern of `width` bits.
    fn word(&mut self, width: u32) -> Word {
        let mut limbs = [0u64; 8];
        for limb in &mut limbs {
            *limb = self.next();
        }
        Word::from_limbs(limbs).masked(width)
    }
}

/// The special patterns of a `width`-bit field: 0, 1, all ones, MSB only, all ones below the
/// MSB, and both alternating patterns. At small widths some coincide, which is harmless.
fn specials(width: u32) -> Vec<Word> {
    let msb = Word::bit_mask(width - 1);
    let below_msb = Word::ones(width - 1);
    let fives = Word::from_limbs([0x5555_5555_5555_5555; 8]).masked(width);
    let aces = Word::from_limbs([0xaaaa_aaaa_aaaa_aaaa; 8]).masked(width);
    vec![
        Word::ZERO,
        Word::from_u64(1).masked(width),
        Word::ones(width),
        msb,
        below_msb,
        fives,
        aces,
    ]
}

/// A random operand: uniform, a special, or a special with a few bits flipped (which lands
/// next to the corners where carries and signs change).
fn operand(rng: &mut SplitMix, width: u32, specials: &[Word]) -> Word {
    match rng.below(4) {
        0 | 1 => rng.word(width),
        2 => specials[rng.below(specials.len() as u64) as usize],
        _ => {
            let mut w = specials[rng.below(specials.len() as u64) as usize];
            for _ in 0..=rng.below(3) {
                let i = rng.below(width as u64) as u32;
                w.set_bit(i, !w.bit(i));
            }
            w
        }
    }
}

/// A second operand, sometimes tied to the first so that equal operands, x + ~x (a carry
/// chain through every bit, and -0 in one's complement) and equal magnitudes of opposite
/// sign (sign-magnitude x + -x) come up often.
fn partner(rng: &mut SplitMix, a: &Word, width: u32, specials: &[Word]) -> Word {
    let msb = Word::bit_mask(width - 1);
    match rng.below(8) {
        0 => *a,
        1 => a.not(width),
        2 => a.xor(&msb),
        _ => operand(rng, width, specials),
    }
}

/// A few hundred vectors for one combination: every pair of specials, then mixed random
/// operands. carry_in and mode are always drawn, even for units without those ports, so
/// that the check also shows the model ignores inputs the unit does not have.
fn vectors(seed: u64, width: u32, count: usize) -> Vec<Inputs> {
    let mut rng = SplitMix(seed);
    let sp = specials(width);
    let mut out = Vec::with_capacity(sp.len() * sp.len() + count);
    for a in &sp {
        for b in &sp {
            out.push(Inputs {
                a: *a,
                b: *b,
                carry_in: rng.coin(),
                mode: rng.coin(),
                select: 0,
            });
        }
    }
    for _ in 0..count {
        let a = operand(&mut rng, width, &sp);
        let b = partner(&mut rng, &a, width, &sp);
        out.push(Inputs {
            a,
            b,
            carry_in: rng.coin(),
            mode: rng.coin(),
            select: 0,
        });
    }
    out
}

// ---------------------------------------------------------------------------------------
// The independent reference, straight from DEVELOPERS.md "Golden model rules".
// ---------------------------------------------------------------------------------------

/// The integer operations the reference needs. Implemented for num-bigint's `BigInt` (any
/// width) and for `i128` (widths up to 64, where true results need at most 66 bits).
trait RefInt: Clone + Ord {
    /// The non-negative integer whose binary digits are `w`.
    fn from_pattern(w: &Word) -> Self;
    /// The pattern of a non-negative integer below 2^512.
    fn to_pattern(&self) -> Word;
    fn small(v: i64) -> Self;
    fn pow2(n: u32) -> Self;
    fn plus(&self, o: &Self) -> Self;
    fn minus(&self, o: &Self) -> Self;
}

/// num-bigint 0.5 (crates.io), the arbitrary-precision oracle.
impl RefInt for BigInt {
    fn from_pattern(w: &Word) -> Self {
        let bytes: Vec<u8> = w.limbs().iter().flat_map(|l| l.to_le_bytes()).collect();
        BigInt::from_bytes_le(Sign::Plus, &bytes)
    }
    fn to_pattern(&self) -> Word {
        let (sign, digits) = self.to_u64_digits();
        assert!(
            sign != Sign::Minus && digits.len() <= 8,
            "pattern out of range"
        );
        let mut limbs = [0u64; 8];
        limbs[..digits.len()].copy_from_slice(&digits);
        Word::from_limbs(limbs)
    }
    fn small(v: i64) -> Self {
        BigInt::from(v)
    }
    fn pow2(n: u32) -> Self {
        BigInt::from(1) << n
    }
    fn plus(&self, o: &Self) -> Self {
        self + o
    }
    fn minus(&self, o: &Self) -> Self {
        self - o
    }
}

/// Native 128-bit integers, for the exhaustive small widths where speed matters.
impl RefInt for i128 {
    fn from_pattern(w: &Word) -> Self {
        assert!(w.significant_bits() <= 100, "pattern too wide for i128");
        w.low_u128() as i128
    }
    fn to_pattern(&self) -> Word {
        assert!(*self >= 0, "negative pattern");
        Word::from_u128(*self as u128)
    }
    fn small(v: i64) -> Self {
        v as i128
    }
    fn pow2(n: u32) -> Self {
        1i128 << n
    }
    fn plus(&self, o: &Self) -> Self {
        self + o
    }
    fn minus(&self, o: &Self) -> Self {
        self - o
    }
}

/// The reference unit for one spec.
struct Reference<T> {
    operation: Operation,
    encoding: Encoding,
    width: u32,
    carry_out: CarryOutConvention,
    carry_in: CarryInConvention,
    negative_zero: NegativeZero,
    zero_flag: ZeroFlag,
    /// An offset add/sub/addsub whose carry comes from adding the codes.
    codes_carry: bool,
    has_carry_in: bool,
    zero: T,
    one: T,
    /// 2^N.
    full: T,
    /// 2^(N-1): the MSB's weight, and the sign-magnitude magnitude modulus.
    half: T,
}

impl<T: RefInt> Reference<T> {
    fn new(spec: &Spec) -> Self {
        Reference {
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
            zero: T::small(0),
            one: T::small(1),
            full: T::pow2(spec.width),
            half: T::pow2(spec.width - 1),
        }
    }

    fn msb(&self, p: &T) -> bool {
        p >= &self.half
    }

    /// ~p within N bits.
    fn complement(&self, p: &T) -> T {
        self.full.minus(&self.one).minus(p)
    }

    fn negated(&self, v: &T) -> T {
        self.zero.minus(v)
    }

    /// p with its MSB inverted.
    fn flip_msb(&self, p: &T) -> T {
        if self.msb(p) {
            p.minus(&self.half)
        } else {
            p.plus(&self.half)
        }
    }

    /// x mod 2^N in 0 .. 2^N (the callers' x lie within a few multiples of 2^N).
    fn wrap(&self, x: &T) -> T {
        let mut x = x.clone();
        while x < self.zero {
            x = x.plus(&self.full);
        }
        while x >= self.full {
            x = x.minus(&self.full);
        }
        x
    }

    /// The value of pattern p: the table "Values of an N-bit pattern".
    fn value(&self, p: &T) -> T {
        let msb = self.msb(p);
        match self.encoding {
            Encoding::Unsigned => p.clone(),
            Encoding::Twos if msb => p.minus(&self.full),
            Encoding::Ones if msb => self.negated(&self.complement(p)),
            Encoding::SignMagnitude if msb => self.negated(&p.minus(&self.half)),
            Encoding::Offset => p.minus(&self.half),
            _ => p.clone(),
        }
    }

    /// The representable range, inclusive.
    fn range(&self) -> (T, T) {
        let top = self.half.minus(&self.one);
        match self.encoding {
            Encoding::Unsigned => (self.zero.clone(), self.full.minus(&self.one)),
            Encoding::Twos | Encoding::Offset => (self.negated(&self.half), top),
            _ => (self.negated(&top), top),
        }
    }

    /// The -0 pattern, for the encodings that have one.
    fn negative_zero_pattern(&self) -> Option<T> {
        match self.encoding {
            Encoding::Ones => Some(self.full.minus(&self.one)),
            Encoding::SignMagnitude => Some(self.half.clone()),
            _ => None,
        }
    }

    fn zero_flag(&self, r: &T) -> bool {
        match self.zero_flag {
            ZeroFlag::Value => self.value(r) == self.zero,
            ZeroFlag::Bits => r == &self.zero,
        }
    }

    /// "negative = the result's sign bit": the MSB, NOT the MSB for offset binary.
    fn negative_flag(&self, r: &T) -> bool {
        self.msb(r) != (self.encoding == Encoding::Offset)
    }

    fn subtracting(&self, mode: bool) -> bool {
        match self.operation {
            Operation::Sub | Operation::Negate | Operation::Decrement => true,
            Operation::AddSub => mode,
            _ => false,
        }
    }

    /// The expected outputs, and under negative_zero = "either" the other acceptable
    /// outputs when the result is a zero.
    fn evaluate(&self, inputs: &Inputs) -> (Outputs, Option<Outputs>) {
        let n = self.width;
        let binary = self.operation.is_binary();
        let a = T::from_pattern(&inputs.a.masked(n));
        let b = if binary {
            T::from_pattern(&inputs.b.masked(n))
        } else {
            self.zero.clone()
        };
        let (va, vb) = (self.value(&a), self.value(&b));
        let subtracting = self.subtracting(inputs.mode);
        // The carry (adding) or borrow (subtracting) the arithmetic uses: under the `carry`
        // convention a subtracting unit's port is the adder carry-in, so borrow = NOT port.
        let c = self.has_carry_in
            && (inputs.carry_in != (subtracting && self.carry_in == CarryInConvention::Carry));
        let c = if c {
            self.one.clone()
        } else {
            self.zero.clone()
        };

        if self.operation == Operation::Compare {
            let order = va.cmp(&vb);
            let out = Outputs {
                less: order == Ordering::Less,
                equal: order == Ordering::Equal,
                greater: order == Ordering::Greater,
                ..Outputs::default()
            };
            return (out, None);
        }

        let truth = match self.operation {
            Operation::Add => va.plus(&vb).plus(&c),
            Operation::Sub => va.minus(&vb).minus(&c),
            Operation::AddSub if inputs.mode => va.minus(&vb).minus(&c),
            Operation::AddSub => va.plus(&vb).plus(&c),
            Operation::Negate => self.negated(&va),
            Operation::Increment => va.plus(&self.one),
            Operation::Decrement => va.minus(&self.one),
            _ => unreachable!("compare returned above"),
        };

        let (mut result, carry_out) = match self.encoding {
            Encoding::Unsigned | Encoding::Twos | Encoding::Offset => {
                self.binary_datapath(&va, &vb, &c, &truth, inputs.mode)
            }
            Encoding::Ones => self.ones_datapath(&a, &b),
            Encoding::SignMagnitude => (self.signmag_datapath(&a, &b), false),
            other => unimplemented!("no reference for encoding {other}"),
        };
        if self.negative_zero == NegativeZero::Positive
            && self.negative_zero_pattern().as_ref() == Some(&result)
        {
            result = self.zero.clone();
        }
        let (lo, hi) = self.range();
        let out = Outputs {
            result: result.to_pattern(),
            carry_out,
            overflow: truth < lo || truth > hi,
            zero: self.zero_flag(&result),
            negative: self.negative_flag(&result),
            ..Outputs::default()
        };
        let alternative = if self.negative_zero == NegativeZero::Either {
            self.negative_zero_pattern().and_then(|nz| {
                let other = if result == self.zero {
                    nz
                } else if result == nz {
                    self.zero.clone()
                } else {
                    return None;
                };
                Some(Outputs {
                    result: other.to_pattern(),
                    zero: self.zero_flag(&other),
                    negative: self.negative_flag(&other),
                    ..out
                })
            })
        } else {
            None
        };
        (out, alternative)
    }

    /// unsigned, twos and offset: result = T wrapped to N bits (offset: that two's pattern
    /// with the MSB inverted). The carry and borrow are those of the N-bit binary adder or
    /// subtractor on the inner patterns, which are the operand values mod 2^N.
    fn binary_datapath(&self, va: &T, vb: &T, c: &T, truth: &T, mode: bool) -> (T, bool) {
        let wrapped = self.wrap(truth);
        let result = if self.encoding == Encoding::Offset {
            self.flip_msb(&wrapped)
        } else {
            wrapped
        };
        // The codes of offset binary are value + 2^(N-1) (common practice, no source); an
        // adder of the codes carries when code_a + code_b + c reaches 2^N.
        let (ua, ub) = if self.codes_carry {
            (va.plus(&self.half), vb.plus(&self.half))
        } else {
            (self.wrap(va), self.wrap(vb))
        };
        let carry_of = |raw: T| raw >= self.full;
        let borrow_of = |raw: T| raw < self.zero;
        let subtract = |x: &T, y: &T, bin: &T| borrow_of(x.minus(y).minus(bin));
        let borrow = match self.operation {
            Operation::Add => return (result, carry_of(ua.plus(&ub).plus(c))),
            Operation::AddSub if !mode => return (result, carry_of(ua.plus(&ub).plus(c))),
            Operation::Increment => return (result, carry_of(ua.plus(&self.one))),
            Operation::Sub | Operation::AddSub => subtract(&ua, &ub, c),
            Operation::Negate => subtract(&self.zero, &ua, &self.zero),
            Operation::Decrement => subtract(&ua, &self.zero, &self.one),
            _ => unreachable!("compare has no datapath"),
        };
        let port = match self.carry_out {
            CarryOutConvention::Borrow => borrow,
            CarryOutConvention::Carry => !borrow,
        };
        (result, port)
    }

    /// ones: the end-around-carry adder on a and y (b, ~b, 00..01 or 11..10); negate is ~a.
    fn ones_datapath(&self, a: &T, b: &T) -> (T, bool) {
        let y = match self.operation {
            Operation::Add => b.clone(),
            Operation::Sub => self.complement(b),
            Operation::Increment => self.wrap(&self.one),
            Operation::Decrement => self.wrap(&self.full.minus(&T::small(2))),
            Operation::Negate => return (self.complement(a), false),
            _ => unreachable!("addsub is resolved by the caller, compare has no datapath"),
        };
        self.end_around(a, &y)
    }

    fn end_around(&self, x: &T, y: &T) -> (T, bool) {
        let first = x.plus(y);
        let carry = first >= self.full;
        let raw = if carry { first.plus(&self.one) } else { first };
        (self.wrap(&raw), carry)
    }

    /// signmag: the magnitude adder / subtractor of M = N - 1 bits.
    fn signmag_datapath(&self, a: &T, b: &T) -> T {
        let split = |p: &T| {
            if self.msb(p) {
                (true, p.minus(&self.half))
            } else {
                (false, p.clone())
            }
        };
        let unit_magnitude = if self.width > 1 {
            self.one.clone()
        } else {
            self.zero.clone()
        };
        let (sa, ma) = split(a);
        let (sb, mb) = match self.operation {
            Operation::Add => split(b),
            Operation::Sub => {
                let (s, m) = split(b);
                (!s, m)
            }
            Operation::Increment => (false, unit_magnitude),
            Operation::Decrement => (true, unit_magnitude),
            Operation::Negate => {
                let (s, m) = split(a);
                return self.join(!s, &m);
            }
            _ => unreachable!("addsub is resolved by the caller, compare has no datapath"),
        };
        if sa == sb {
            let mut m = ma.plus(&mb);
            if m >= self.half {
                m = m.minus(&self.half);
            }
            self.join(sa, &m)
        } else if ma >= mb {
            self.join(sa, &ma.minus(&mb))
        } else {
            self.join(sb, &mb.minus(&ma))
        }
    }

    fn join(&self, sign: bool, magnitude: &T) -> T {
        if sign {
            magnitude.plus(&self.half)
        } else {
            magnitude.clone()
        }
    }
}

/// The reference for one spec, built once. An add/sub unit is an adder in mode 0 and a
/// subtractor in mode 1; the reference's one's-complement and sign-magnitude datapaths are
/// written per operation, so those addsub units use an add and a sub reference with the
/// same conventions.
struct Oracle<T> {
    main: Reference<T>,
    /// The mode-1 reference of a one's-complement or sign-magnitude addsub unit.
    subtract: Option<Reference<T>>,
    /// The outputs the unit has ports for; only those are compared, since only those are
    /// what a DUT could show.
    shown: Vec<Signal>,
}

impl<T: RefInt> Oracle<T> {
    fn new(spec: &Spec) -> Self {
        let mut main = Reference::<T>::new(spec);
        let mut subtract = None;
        if spec.operation == Operation::AddSub && !spec.encoding.is_binary_datapath() {
            main.operation = Operation::Add;
            let mut sub = Reference::<T>::new(spec);
            sub.operation = Operation::Sub;
            subtract = Some(sub);
        }
        Oracle {
            main,
            subtract,
            shown: spec.outputs().into_iter().map(|(s, _)| s).collect(),
        }
    }

    fn evaluate(&self, inputs: &Inputs) -> (Outputs, Option<Outputs>) {
        match &self.subtract {
            Some(sub) if inputs.mode => sub.evaluate(inputs),
            _ => self.main.evaluate(inputs),
        }
    }

    fn visible(&self, o: &Outputs) -> Outputs {
        let mut shown = Outputs::default();
        for &signal in &self.shown {
            shown.set(signal, o.get(signal));
        }
        shown
    }
}

fn reference_for<T: RefInt>(spec: &Spec, inputs: &Inputs) -> (Outputs, Option<Outputs>) {
    Oracle::<T>::new(spec).evaluate(inputs)
}

/// Every spec of `width` with every convention that has an effect, following the spec
/// reader's rules for when each convention applies.
fn combinations(width: u32) -> Vec<Spec> {
    let mut out = Vec::new();
    for op in Operation::ALL {
        for enc in Encoding::ALL {
            let base = Spec::with_defaults(op, enc, width);
            let carry_outs =
                if base.subtracts() && enc.is_binary_datapath() && base.has(Signal::CarryOut) {
                    vec![CarryOutConvention::Borrow, CarryOutConvention::Carry]
                } else {
                    vec![CarryOutConvention::Borrow]
                };
            let carry_ins =
                if matches!(op, Operation::Sub | Operation::AddSub) && base.has(Signal::CarryIn) {
                    vec![CarryInConvention::Borrow, CarryInConvention::Carry]
                } else {
                    vec![CarryInConvention::Borrow]
                };
            let zeros = if enc.has_negative_zero() && op != Operation::Compare {
                vec![
                    NegativeZero::Hardware,
                    NegativeZero::Positive,
                    NegativeZero::Either,
                ]
            } else {
                vec![NegativeZero::Hardware]
            };
            let zero_flags = if enc != Encoding::Offset && base.has(Signal::Zero) {
                vec![ZeroFlag::Value, ZeroFlag::Bits]
            } else {
                vec![ZeroFlag::Value]
            };
            let offset_carries = if enc == Encoding::Offset
                && matches!(op, Operation::Add | Operation::Sub | Operation::AddSub)
                && base.has(Signal::CarryOut)
            {
                vec![OffsetCarry::Inner, OffsetCarry::Codes]
            } else {
                vec![OffsetCarry::Inner]
            };
            for &co in &carry_outs {
                for &ci in &carry_ins {
                    for &nz in &zeros {
                        for &zf in &zero_flags {
                            for &oc in &offset_carries {
                                let mut s = base.clone();
                                s.conventions.carry_out = co;
                                s.conventions.carry_in = ci;
                                s.conventions.negative_zero = nz;
                                s.conventions.zero_flag = zf;
                                s.conventions.offset_carry = oc;
                                out.push(s);
                            }
                        }
                    }
                }
            }
        }
    }
    out
}

fn describe(spec: &Spec, i: &Inputs) -> String {
    let c = &spec.conventions;
    format!(
        "{} w={} co={:?} ci={:?} nz={:?} zf={:?} a={} b={} cin={} mode={}",
        spec.name,
        spec.width,
        c.carry_out,
        c.carry_in,
        c.negative_zero,
        c.zero_flag,
        i.a.to_hex(spec.width),
        i.b.to_hex(spec.width),
        i.carry_in as u8,
        i.mode as u8
    )
}

/// Mismatches found so far (the first few are kept for the failure message) and the number
/// of vectors checked.
#[derive(Default)]
struct Tally {
    checked: u64,
    failures: u64,
    shown: Vec<String>,
}

impl Tally {
    fn record(&mut self, ok: bool, what: impl FnOnce() -> String) {
        self.checked += 1;
        if !ok {
            self.failures += 1;
            if self.shown.len() < 12 {
                self.shown.push(what());
            }
        }
    }

    fn finish(self, name: &str, at_least: u64) {
        println!("{name}: {} vectors checked", self.checked);
        assert!(
            self.failures == 0,
            "{name}: {} of {} vectors disagree:\n{}",
            self.failures,
            self.checked,
            self.shown.join("\n")
        );
        assert!(
            self.checked >= at_least,
            "{name}: only {} vectors checked, expected at least {at_least}",
            self.checked
        );
    }
}

/// Compares the model's outputs (and its `alternative`) with the reference for one vector.
fn check_vector<T: RefInt>(
    spec: &Spec,
    oracle: &Oracle<T>,
    model: &Model,
    inputs: &Inputs,
    tally: &mut Tally,
) {
    let (want, want_alt) = oracle.evaluate(inputs);
    let got = model.evaluate(inputs);
    let got_alt = model.alternative(&got);
    let show = |o: &Outputs| oracle.visible(o);
    let ok = show(&got) == show(&want) && got_alt.map(|o| show(&o)) == want_alt.map(|o| show(&o));
    tally.record(ok, || {
        format!(
            "{}\n  model     {:?} alt {:?}\n  reference {:?} alt {:?}",
            describe(spec, inputs),
            show(&got),
            got_alt.map(|o| show(&o)),
            show(&want),
            want_alt.map(|o| show(&o)),
        )
    });
}

/// Every input of a small-width unit (carry_in and mode only where the unit has them).
fn every_input(spec: &Spec) -> Vec<Inputs> {
    let n = 1u64 << spec.width;
    let bs = if spec.operation.is_binary() { n } else { 1 };
    let cins: &[bool] = if spec.has(Signal::CarryIn) {
        &[false, true]
    } else {
        &[false]
    };
    let modes: &[bool] = if spec.has(Signal::Mode) {
        &[false, true]
    } else {
        &[false]
    };
    let mut out = Vec::new();
    for a in 0..n {
        for b in 0..bs {
            for &carry_in in cins {
                for &mode in modes {
                    out.push(Inputs {
                        a: Word::from_u64(a),
                        b: Word::from_u64(b),
                        carry_in,
                        mode,
                        select: 0,
                    });
                }
            }
        }
    }
    out
}

const RANDOM_WIDTHS_NARROW: [u32; 11] = [1, 2, 3, 7, 8, 31, 32, 33, 63, 64, 65];
const RANDOM_WIDTHS_WIDE: [u32; 7] = [127, 128, 129, 255, 256, 511, 512];

fn random_against_bigint(widths: &[u32], random_per_combination: usize, name: &str) {
    let mut tally = Tally::default();
    let mut combos = 0u64;
    for &width in widths {
        for (k, spec) in combinations(width).iter().enumerate() {
            combos += 1;
            let model = Model::new(spec);
            let oracle = Oracle::<BigInt>::new(spec);
            let seed = 0x0a11_ce00 ^ ((width as u64) << 16) ^ k as u64;
            for inputs in vectors(seed, width, random_per_combination) {
                check_vector(spec, &oracle, &model, &inputs, &mut tally);
            }
        }
    }
    println!("{name}: {combos} combinations");
    tally.finish(name, combos * random_per_combination as u64);
}

/// Part 1: the num-bigint reference against the model at widths up to 65 (the fast path,
/// and the first width on the wide path).
#[test]
fn bigint_reference_narrow_widths() {
    random_against_bigint(&RANDOM_WIDTHS_NARROW, 250, "bigint reference, widths 1..65");
}

/// Part 1: the num-bigint reference against the model at widths 127 to 512 (the wide path,
/// including limb boundaries and the maximum width).
#[test]
fn bigint_reference_wide_widths() {
    random_against_bigint(
        &RANDOM_WIDTHS_WIDE,
        200,
        "bigint reference, widths 127..512",
    );
}

/// Part 3: every input at widths 1 to 6, every operation, encoding and convention, against
/// the same reference on i128.
#[test]
fn exhaustive_small_widths() {
    let mut tally = Tally::default();
    for width in 1..=6 {
        for spec in combinations(width) {
            let model = Model::new(&spec);
            let oracle = Oracle::<i128>::new(&spec);
            for inputs in every_input(&spec) {
                check_vector(&spec, &oracle, &model, &inputs, &mut tally);
            }
        }
    }
    tally.finish("exhaustive widths 1..=6", 500_000);
}

/// The i128 and BigInt instantiations of the reference agree, so the exhaustive check rests
/// on the same oracle as the random one.
#[test]
fn reference_integer_types_agree() {
    let mut tally = Tally::default();
    for width in [1, 5, 6, 33, 64] {
        for (k, spec) in combinations(width).iter().enumerate() {
            for inputs in vectors(0xb16 ^ k as u64, width, 20) {
                let small = reference_for::<i128>(spec, &inputs);
                let big = reference_for::<BigInt>(spec, &inputs);
                tally.record(small == big, || describe(spec, &inputs));
            }
        }
    }
    tally.finish("i128 vs BigInt reference", 10_000);
}

fn fast_equals_wide(spec: &Spec, inputs: &[Inputs], tally: &mut Tally) {
    let fast = Model::new(spec);
    let wide = Model::new(spec).wide_only();
    for inputs in inputs {
        fast_equals_wide_once(spec, &fast, &wide, inputs, tally);
    }
}

fn fast_equals_wide_once(
    spec: &Spec,
    fast: &Model,
    wide: &Model,
    inputs: &Inputs,
    tally: &mut Tally,
) {
    let (f, w) = (fast.evaluate(inputs), wide.evaluate(inputs));
    let ok = f == w && fast.alternative(&f) == wide.alternative(&w);
    tally.record(ok, || {
        format!("{}\n  fast {f:?}\n  wide {w:?}", describe(spec, inputs))
    });
}

/// Part 4: the u128 fast path and the 576-bit wide path give identical outputs (every
/// field, not only the visible ones) for every input at widths 1 to 6.
#[test]
fn fast_path_equals_wide_path_exhaustive() {
    let mut tally = Tally::default();
    for width in 1..=6 {
        for spec in combinations(width) {
            fast_equals_wide(&spec, &every_input(&spec), &mut tally);
        }
    }
    tally.finish("fast == wide, exhaustive widths 1..=6", 500_000);
}

/// Part 4: fast path equals wide path on random vectors at every width from 31 to 64.
#[test]
fn fast_path_equals_wide_path_random() {
    let mut tally = Tally::default();
    for width in 31..=64 {
        for (k, spec) in combinations(width).iter().enumerate() {
            let seed = 0xfa57 ^ ((width as u64) << 20) ^ k as u64;
            fast_equals_wide(spec, &vectors(seed, width, 60), &mut tally);
        }
    }
    tally.finish("fast == wide, random widths 31..=64", 100_000);
}

// ---------------------------------------------------------------------------------------
// Part 2: Rust standard library, primitive integer methods.
// ---------------------------------------------------------------------------------------

fn run(spec: &Spec, a: u128, b: u128, carry_in: bool, mode: bool) -> Outputs {
    Model::new(spec).evaluate(&Inputs {
        a: Word::from_u128(a),
        b: Word::from_u128(b),
        carry_in,
        mode,
        select: 0,
    })
}

fn spec_of(op: Operation, enc: Encoding, width: u32) -> Spec {
    Spec::with_defaults(op, enc, width)
}

/// Checks unsigned, two's-complement and offset units of one primitive width against the
/// Rust standard library, primitive integer methods (`overflowing_add`, `overflowing_sub`,
/// `overflowing_neg`, `checked_add`, `checked_sub`, `wrapping_*`, `Ord`). Offset binary is
/// mapped to the signed type by inverting the MSB (DEVELOPERS.md: offset binary is two's
/// complement with the MSB inverted).
macro_rules! std_oracle {
    ($test:ident, $u:ty, $i:ty) => {
        #[test]
        fn $test() {
            const W: u32 = <$u>::BITS;
            const MSB: $u = 1 << (W - 1);
            let specs: Vec<Spec> = [
                Operation::Add,
                Operation::Sub,
                Operation::AddSub,
                Operation::Negate,
                Operation::Increment,
                Operation::Decrement,
                Operation::Compare,
            ]
            .iter()
            .flat_map(|&op| {
                [Encoding::Unsigned, Encoding::Twos, Encoding::Offset]
                    .map(|enc| spec_of(op, enc, W))
            })
            .collect();
            let find = |op: Operation, enc: Encoding| {
                specs
                    .iter()
                    .find(|s| s.operation == op && s.encoding == enc)
                    .expect("spec listed")
            };
            let mut arm = find(Operation::Sub, Encoding::Unsigned).clone();
            arm.conventions.carry_out = CarryOutConvention::Carry;
            arm.conventions.carry_in = CarryInConvention::Carry;

            let mut rng = SplitMix(W as u64 * 7919);
            let sp: Vec<$u> = [
                0,
                1,
                <$u>::MAX,
                MSB,
                MSB - 1,
                <$u>::MAX / 3,
                <$u>::MAX / 3 * 2,
            ]
            .to_vec();
            let mut pairs: Vec<($u, $u)> = Vec::new();
            for &a in &sp {
                for &b in &sp {
                    pairs.push((a, b));
                }
            }
            for _ in 0..600 {
                let wide = (rng.next() as u128) << 64 | rng.next() as u128;
                let a = wide as $u;
                let b = match rng.below(4) {
                    0 => !a,
                    1 => sp[rng.below(sp.len() as u64) as usize],
                    _ => ((rng.next() as u128) << 64 | rng.next() as u128) as $u,
                };
                pairs.push((a, b));
            }

            let mut checks = 0u64;
            let mut check = |ok: bool, what: &dyn Fn() -> String| {
                checks += 1;
                assert!(ok, "{}", what());
            };
            let word = |v: $u| Word::from_u128(v as u128);
            let to_offset = |v: $u| (v ^ MSB) as $i;
            for &(a, b) in &pairs {
                let (ia, ib) = (a as $i, b as $i);
                let ctx = || format!("width {W}: a={a:#x} b={b:#x}");

                for cin in [false, true] {
                    // Unsigned add: carry_out is the carry of a + b + cin, which two
                    // overflowing_add steps report exactly (at most one of them carries).
                    let (s1, c1) = a.overflowing_add(b);
                    let (s2, c2) = s1.overflowing_add(cin as $u);
                    let o = run(
                        find(Operation::Add, Encoding::Unsigned),
                        a as u128,
                        b as u128,
                        cin,
                        false,
                    );
                    check(
                        o.result == word(s2) && o.carry_out == (c1 | c2) && o.overflow == (c1 | c2),
                        &|| format!("unsigned add cin={cin} {}: {o:?}", ctx()),
                    );
                    // Unsigned sub with borrow-in: borrow of a - b - bin the same way.
                    let (d1, b1) = a.overflowing_sub(b);
                    let (d2, b2) = d1.overflowing_sub(cin as $u);
                    let o = run(
                        find(Operation::Sub, Encoding::Unsigned),
                        a as u128,
                        b as u128,
                        cin,
                        false,
                    );
                    check(
                        o.result == word(d2) && o.carry_out == (b1 | b2) && o.overflow == (b1 | b2),
                        &|| format!("unsigned sub bin={cin} {}: {o:?}", ctx()),
                    );
                    // Carry conventions (C = NOT borrow, carry-in 1 = no borrow).
                    let (d1, b1) = a.overflowing_sub(b);
                    let (d2, b2) = d1.overflowing_sub((!cin) as $u);
                    let o = run(&arm, a as u128, b as u128, cin, false);
                    check(o.result == word(d2) && o.carry_out == !(b1 | b2), &|| {
                        format!("unsigned sub, carry conventions, c={cin} {}: {o:?}", ctx())
                    });
                    // Two's add / sub with carry: the second overflowing step can only wrap
                    // back the other way, so the sum overflows when exactly one step did.
                    let (s1, o1) = ia.overflowing_add(ib);
                    let (s2, o2) = s1.overflowing_add(cin as $i);
                    let o = run(
                        find(Operation::Add, Encoding::Twos),
                        a as u128,
                        b as u128,
                        cin,
                        false,
                    );
                    check(
                        o.result == word(s2 as $u)
                            && o.overflow == (o1 != o2)
                            && o.carry_out == (c1 | c2),
                        &|| format!("twos add cin={cin} {}: {o:?}", ctx()),
                    );
                    let (d1, o1) = ia.overflowing_sub(ib);
                    let (d2, o2) = d1.overflowing_sub(cin as $i);
                    let o = run(
                        find(Operation::Sub, Encoding::Twos),
                        a as u128,
                        b as u128,
                        cin,
                        false,
                    );
                    check(
                        o.result == word(d2 as $u) && o.overflow == (o1 != o2),
                        &|| format!("twos sub bin={cin} {}: {o:?}", ctx()),
                    );
                }

                // Without carry-in: the flags are exactly the std overflow flags.
                let (s, carry) = a.overflowing_add(b);
                let (si, ovf) = ia.overflowing_add(ib);
                assert_eq!(s, si as $u);
                for mode in [false, true] {
                    let o = run(
                        find(Operation::AddSub, Encoding::Twos),
                        a as u128,
                        b as u128,
                        false,
                        mode,
                    );
                    let (r, v) = if mode {
                        ia.overflowing_sub(ib)
                    } else {
                        (si, ovf)
                    };
                    check(o.result == word(r as $u) && o.overflow == v, &|| {
                        format!("twos addsub mode={mode} {}: {o:?}", ctx())
                    });
                    let o = run(
                        find(Operation::AddSub, Encoding::Unsigned),
                        a as u128,
                        b as u128,
                        false,
                        mode,
                    );
                    let (r, c) = if mode {
                        a.overflowing_sub(b)
                    } else {
                        (s, carry)
                    };
                    check(o.result == word(r) && o.carry_out == c, &|| {
                        format!("unsigned addsub mode={mode} {}: {o:?}", ctx())
                    });
                }
                let o = run(
                    find(Operation::Add, Encoding::Twos),
                    a as u128,
                    b as u128,
                    false,
                    false,
                );
                check(
                    o.overflow == ovf
                        && o.carry_out == carry
                        && o.negative == (si < 0)
                        && o.zero == (si == 0),
                    &|| format!("twos add flags {}: {o:?}", ctx()),
                );

                // Offset binary through the signed type.
                let (oa, ob) = (to_offset(a), to_offset(b));
                let (r, v) = oa.overflowing_add(ob);
                let o = run(
                    find(Operation::Add, Encoding::Offset),
                    a as u128,
                    b as u128,
                    false,
                    false,
                );
                check(
                    o.result == word(r as $u ^ MSB)
                        && o.overflow == v
                        && o.negative == (r < 0)
                        && o.zero == (r == 0),
                    &|| format!("offset add {}: {o:?}", ctx()),
                );
                let (r, v) = oa.overflowing_sub(ob);
                let o = run(
                    find(Operation::Sub, Encoding::Offset),
                    a as u128,
                    b as u128,
                    false,
                    false,
                );
                check(o.result == word(r as $u ^ MSB) && o.overflow == v, &|| {
                    format!("offset sub {}: {o:?}", ctx())
                });
                let (r, v) = oa.overflowing_neg();
                let o = run(
                    find(Operation::Negate, Encoding::Offset),
                    a as u128,
                    0,
                    false,
                    false,
                );
                check(o.result == word(r as $u ^ MSB) && o.overflow == v, &|| {
                    format!("offset negate {}: {o:?}", ctx())
                });

                // Negate: i*::overflowing_neg gives the two's overflow, u*::overflowing_neg
                // the borrow of 0 - a (and the unsigned overflow, since -a < 0 unless a = 0).
                let (r, v) = ia.overflowing_neg();
                let o = run(
                    find(Operation::Negate, Encoding::Twos),
                    a as u128,
                    0,
                    false,
                    false,
                );
                check(
                    o.result == word(r as $u) && o.overflow == v && r == ia.wrapping_neg(),
                    &|| format!("twos negate {}: {o:?}", ctx()),
                );
                let (r, f) = a.overflowing_neg();
                let o = run(
                    find(Operation::Negate, Encoding::Unsigned),
                    a as u128,
                    0,
                    false,
                    false,
                );
                check(
                    o.result == word(r) && o.carry_out == f && o.overflow == f,
                    &|| format!("unsigned negate {}: {o:?}", ctx()),
                );

                // Increment and decrement: checked_add(1) / checked_sub(1) fail exactly on
                // overflow; for unsigned that is also the carry / borrow.
                let o = run(
                    find(Operation::Increment, Encoding::Unsigned),
                    a as u128,
                    0,
                    false,
                    false,
                );
                let none = a.checked_add(1).is_none();
                check(
                    o.result == word(a.wrapping_add(1))
                        && o.overflow == none
                        && o.carry_out == none,
                    &|| format!("unsigned increment {}: {o:?}", ctx()),
                );
                let o = run(
                    find(Operation::Decrement, Encoding::Unsigned),
                    a as u128,
                    0,
                    false,
                    false,
                );
                let none = a.checked_sub(1).is_none();
                check(
                    o.result == word(a.wrapping_sub(1))
                        && o.overflow == none
                        && o.carry_out == none,
                    &|| format!("unsigned decrement {}: {o:?}", ctx()),
                );
                let o = run(
                    find(Operation::Increment, Encoding::Twos),
                    a as u128,
                    0,
                    false,
                    false,
                );
                check(
                    o.result == word(ia.wrapping_add(1) as $u)
                        && o.overflow == ia.checked_add(1).is_none(),
                    &|| format!("twos increment {}: {o:?}", ctx()),
                );
                let o = run(
                    find(Operation::Decrement, Encoding::Twos),
                    a as u128,
                    0,
                    false,
                    false,
                );
                check(
                    o.result == word(ia.wrapping_sub(1) as $u)
                        && o.overflow == ia.checked_sub(1).is_none(),
                    &|| format!("twos decrement {}: {o:?}", ctx()),
                );
                let o = run(
                    find(Operation::Increment, Encoding::Offset),
                    a as u128,
                    0,
                    false,
                    false,
                );
                check(o.overflow == oa.checked_add(1).is_none(), &|| {
                    format!("offset increment {}: {o:?}", ctx())
                });
                let o = run(
                    find(Operation::Decrement, Encoding::Offset),
                    a as u128,
                    0,
                    false,
                    false,
                );
                check(o.overflow == oa.checked_sub(1).is_none(), &|| {
                    format!("offset decrement {}: {o:?}", ctx())
                });

                // Compare: Ord on the unsigned, signed and offset-mapped values.
                for (enc, order) in [
                    (Encoding::Unsigned, a.cmp(&b)),
                    (Encoding::Twos, ia.cmp(&ib)),
                    (Encoding::Offset, oa.cmp(&ob)),
                ] {
                    let o = run(
                        find(Operation::Compare, enc),
                        a as u128,
                        b as u128,
                        false,
                        false,
                    );
                    check(
                        o.less == order.is_lt()
                            && o.equal == order.is_eq()
                            && o.greater == order.is_gt(),
                        &|| format!("{enc} compare {}: {o:?}", ctx()),
                    );
                }
            }
            println!(
                "std oracle, width {W}: {} pairs, {checks} checks",
                pairs.len()
            );
            assert!(checks > 20 * pairs.len() as u64);
        }
    };
}

std_oracle!(rust_std_width_8, u8, i8);
std_oracle!(rust_std_width_16, u16, i16);
std_oracle!(rust_std_width_32, u32, i32);
std_oracle!(rust_std_width_64, u64, i64);
std_oracle!(rust_std_width_128, u128, i128);

// ---------------------------------------------------------------------------------------
// Part 5: one-bit truth tables.
// ---------------------------------------------------------------------------------------

/// Full adder (textbook, common practice, no source): (a, b, cin) -> (s, cout).
const FULL_ADDER: [(u8, u8, u8, u8, u8); 8] = [
    (0, 0, 0, 0, 0),
    (0, 0, 1, 1, 0),
    (0, 1, 0, 1, 0),
    (0, 1, 1, 0, 1),
    (1, 0, 0, 1, 0),
    (1, 0, 1, 0, 1),
    (1, 1, 0, 0, 1),
    (1, 1, 1, 1, 1),
];

/// Full subtractor a - b - bin (textbook, common practice, no source): (a, b, bin) ->
/// (d, bout).
const FULL_SUBTRACTOR: [(u8, u8, u8, u8, u8); 8] = [
    (0, 0, 0, 0, 0),
    (0, 0, 1, 1, 1),
    (0, 1, 0, 1, 1),
    (0, 1, 1, 0, 1),
    (1, 0, 0, 1, 0),
    (1, 0, 1, 0, 0),
    (1, 1, 0, 0, 0),
    (1, 1, 1, 1, 1),
];

/// One-bit subtract as an adder on a + ~b + c, with the carry conventions on both ports
/// (common practice, no source): (a, b, c) -> (s, cout).
const ADDER_SUBTRACT: [(u8, u8, u8, u8, u8); 8] = [
    (0, 0, 0, 1, 0),
    (0, 0, 1, 0, 1),
    (0, 1, 0, 0, 0),
    (0, 1, 1, 1, 0),
    (1, 0, 0, 0, 1),
    (1, 0, 1, 1, 1),
    (1, 1, 0, 1, 0),
    (1, 1, 1, 0, 1),
];

fn one_bit_rows(spec: &Spec, table: &[(u8, u8, u8, u8, u8); 8], what: &str) {
    for &(a, b, c, s, cout) in table {
        let o = run(spec, a as u128, b as u128, c == 1, false);
        assert_eq!(
            (o.result, o.carry_out),
            (Word::from_u64(s as u64), cout == 1),
            "{what} row a={a} b={b} c={c}"
        );
    }
}

#[test]
fn full_adder_truth_table() {
    one_bit_rows(
        &spec_of(Operation::Add, Encoding::Unsigned, 1),
        &FULL_ADDER,
        "full adder",
    );
}

#[test]
fn full_subtractor_truth_table() {
    one_bit_rows(
        &spec_of(Operation::Sub, Encoding::Unsigned, 1),
        &FULL_SUBTRACTOR,
        "full subtractor",
    );
}

#[test]
fn adder_subtract_truth_table_with_carry_conventions() {
    let mut s = spec_of(Operation::Sub, Encoding::Unsigned, 1);
    s.conventions.carry_in = CarryInConvention::Carry;
    s.conventions.carry_out = CarryOutConvention::Carry;
    one_bit_rows(&s, &ADDER_SUBTRACT, "a + ~b + c");
}

// ---------------------------------------------------------------------------------------
// Part 6: hand-worked examples.
// ---------------------------------------------------------------------------------------

fn run_spec(spec: &Spec, a: u64, b: u64) -> Outputs {
    run(spec, a as u128, b as u128, false, false)
}

/// 8-bit two's complement: 100 + 50 = 150 does not fit and wraps to -106 = 0x96, with no
/// carry out (common practice, no source).
#[test]
fn twos_100_plus_50_overflows_to_minus_106() {
    let o = run_spec(&spec_of(Operation::Add, Encoding::Twos, 8), 100, 50);
    assert_eq!(o.result, Word::from_u64(0x96));
    assert_eq!(
        Value::decode(&o.result, 8, Encoding::Twos).to_string(),
        "-106"
    );
    assert!(o.overflow && o.negative && !o.carry_out && !o.zero);
}

/// RFC 1071 section 3 ("Numerical Examples"): the one's-complement sum of the 16-bit words
/// 0001 f203 f4f5 f6f7 is ddf2; in swapped byte order the sum is f2dd, which is ddf2
/// swapped (the byte-order independence of RFC 1071 section 2 (B)); and the 32-bit sum
/// 0001f203 + f4f5f6f7 = f4f7e8fa folds to ddf2 at 16 bits.
#[test]
fn rfc1071_section3_ones_complement_sums() {
    let add16 = spec_of(Operation::Add, Encoding::Ones, 16);
    let sum16 = |words: &[u64]| {
        words[1..].iter().fold(words[0], |acc, &w| {
            run_spec(&add16, acc, w).result.low_u64()
        })
    };
    assert_eq!(sum16(&[0x0001, 0xf203, 0xf4f5, 0xf6f7]), 0xddf2);
    assert_eq!(sum16(&[0x0100, 0x03f2, 0xf5f4, 0xf7f6]), 0xf2dd);
    let add32 = spec_of(Operation::Add, Encoding::Ones, 32);
    let o = run_spec(&add32, 0x0001_f203, 0xf4f5_f6f7);
    assert_eq!(o.result, Word::from_u64(0xf4f7_e8fa));
    assert!(!o.carry_out, "no end-around carry in the 32-bit sum");
    let folded = run_spec(&add16, 0xf4f7, 0xe8fa);
    assert_eq!(folded.result, Word::from_u64(0xddf2));
    assert!(folded.carry_out, "0xf4f7 + 0xe8fa carries end-around");
}

/// 4-bit sign-magnitude -3 + 3: the magnitudes are equal, so the hardware keeps a's sign
/// and gives -0 (1000); with negative_zero = "positive" the result is +0 (common practice,
/// no source). 3 + -3 gives +0 either way. The value zero flag is set for both zeros; the
/// bits zero flag only for 0000.
#[test]
fn signmag_minus_3_plus_3() {
    let mut add = spec_of(Operation::Add, Encoding::SignMagnitude, 4);
    let o = run_spec(&add, 0b1011, 0b0011);
    assert_eq!(o.result, Word::from_u64(0b1000));
    assert_eq!(
        Value::decode(&o.result, 4, Encoding::SignMagnitude).to_string(),
        "-0"
    );
    assert!(o.zero && o.negative && !o.overflow);
    assert_eq!(run_spec(&add, 0b0011, 0b1011).result, Word::ZERO);
    add.conventions.zero_flag = ZeroFlag::Bits;
    assert!(!run_spec(&add, 0b1011, 0b0011).zero);
    add.conventions.zero_flag = ZeroFlag::Value;
    add.conventions.negative_zero = NegativeZero::Positive;
    let o = run_spec(&add, 0b1011, 0b0011);
    assert_eq!(o.result, Word::ZERO);
    assert!(o.zero && !o.negative);
}

/// Offset binary (excess-128 at 8 bits): 0x80 is zero, 0x7f is -1 and 0x00 is -128
/// (common practice, no source).
#[test]
fn offset_binary_midpoint_is_zero() {
    let show = |p: u64| Value::decode(&Word::from_u64(p), 8, Encoding::Offset).to_string();
    assert_eq!(show(0x80), "0");
    assert_eq!(show(0x7f), "-1");
    assert_eq!(show(0x00), "-128");
    let o = run_spec(&spec_of(Operation::Add, Encoding::Offset, 8), 0x80, 0x80);
    assert_eq!(o.result, Word::from_u64(0x80));
    assert!(o.zero && !o.negative && !o.overflow);
    let o = run_spec(&spec_of(Operation::Negate, Encoding::Offset, 8), 0x80, 0);
    assert_eq!(o.result, Word::from_u64(0x80), "-0 is 0");
    let cmp = spec_of(Operation::Compare, Encoding::Offset, 8);
    assert!(run_spec(&cmp, 0x7f, 0x80).less);
    assert!(run_spec(&cmp, 0x80, 0x80).equal);
}

/// 0x00 - 0x01 at 8 bits borrows. The Arm convention reports the carry flag as NOT borrow
/// (Arm Architecture Reference Manual, SUBS; from memory), so C = 0; x86 reports CF =
/// borrow (Intel SDM vol. 1, EFLAGS; from memory), so CF = 1. The result is 0xff under
/// both. For 0x01 - 0x00 the flags swap. The Arm SBC carry-in is also NOT borrow (from
/// memory), the x86 SBB carry-in is the borrow (from memory).
#[test]
fn arm_and_x86_subtract_carry_conventions() {
    let x86 = spec_of(Operation::Sub, Encoding::Unsigned, 8);
    let mut arm = x86.clone();
    arm.conventions.carry_out = CarryOutConvention::Carry;
    arm.conventions.carry_in = CarryInConvention::Carry;

    let o = run(&x86, 0x00, 0x01, false, false);
    assert_eq!((o.result, o.carry_out), (Word::from_u64(0xff), true));
    let o = run(&arm, 0x00, 0x01, true, false);
    assert_eq!((o.result, o.carry_out), (Word::from_u64(0xff), false));

    let o = run(&x86, 0x01, 0x00, false, false);
    assert_eq!((o.result, o.carry_out), (Word::from_u64(0x01), false));
    let o = run(&arm, 0x01, 0x00, true, false);
    assert_eq!((o.result, o.carry_out), (Word::from_u64(0x01), true));

    // SBB with CF = 1 and SBC with C = 0 both subtract one more.
    assert_eq!(run(&x86, 0x05, 0x03, true, false).result, Word::from_u64(1));
    assert_eq!(
        run(&arm, 0x05, 0x03, false, false).result,
        Word::from_u64(1)
    );
}

/// An unsigned N-bit subtractor's borrow-out on top of its N result bits is the exact
/// (N+1)-bit two's-complement difference a - b (common practice, no source). Checked for
/// every 8-bit pair.
#[test]
fn unsigned_borrow_and_result_form_the_exact_difference() {
    let sub = spec_of(Operation::Sub, Encoding::Unsigned, 8);
    let model = Model::new(&sub);
    for a in 0..256i64 {
        for b in 0..256i64 {
            let o = model.evaluate(&Inputs {
                a: Word::from_u64(a as u64),
                b: Word::from_u64(b as u64),
                ..Inputs::default()
            });
            let nine_bits = o.result.low_u64() as i64 | (o.carry_out as i64) << 8;
            let signed = if o.carry_out {
                nine_bits - 512
            } else {
                nine_bits
            };
            assert_eq!(signed, a - b, "a={a} b={b}");
        }
    }
}

/// 0x80 against 0x7f at 8 bits: as two's complement -128 < 127, as unsigned 128 > 127
/// (common practice, no source).
#[test]
fn compare_depends_on_the_encoding() {
    let o = run_spec(&spec_of(Operation::Compare, Encoding::Twos, 8), 0x80, 0x7f);
    assert!(o.less && !o.equal && !o.greater);
    let o = run_spec(
        &spec_of(Operation::Compare, Encoding::Unsigned, 8),
        0x80,
        0x7f,
    );
    assert!(o.greater && !o.equal && !o.less);
}

/// One's complement: +0 and -0 compare equal, and x + ~x is -0 (common practice, no
/// source; DEVELOPERS.md states the same for the end-around-carry adder).
#[test]
fn ones_complement_zeros() {
    let cmp = spec_of(Operation::Compare, Encoding::Ones, 8);
    assert!(run_spec(&cmp, 0x00, 0xff).equal);
    let o = run_spec(&spec_of(Operation::Add, Encoding::Ones, 8), 0x35, 0xca);
    assert_eq!(o.result, Word::from_u64(0xff));
    assert!(o.zero && !o.overflow);
}

/// The reference on its own (no model involved) reproduces hand-worked examples, so an
/// agreement between model and reference is not two copies of one mistake: 8-bit twos
/// 100 + 50 wraps to 0x96 with overflow; 4-bit sign-magnitude -3 + 3 is -0; 8-bit one's
/// complement 0x35 + 0xca is -0 (0xff); 8-bit unsigned 0x00 - 0x01 is 0xff with a borrow
/// (common practice, no source).
#[test]
fn reference_reproduces_hand_worked_examples() {
    let eval = |op, enc, width, a: u64, b: u64| {
        let inputs = Inputs {
            a: Word::from_u64(a),
            b: Word::from_u64(b),
            ..Inputs::default()
        };
        reference_for::<BigInt>(&spec_of(op, enc, width), &inputs).0
    };
    let o = eval(Operation::Add, Encoding::Twos, 8, 100, 50);
    assert_eq!(o.result, Word::from_u64(0x96));
    assert!(o.overflow && o.negative && !o.carry_out);
    let o = eval(Operation::Add, Encoding::SignMagnitude, 4, 0b1011, 0b0011);
    assert_eq!(o.result, Word::from_u64(0b1000));
    assert!(o.zero && !o.overflow);
    let o = eval(Operation::Add, Encoding::Ones, 8, 0x35, 0xca);
    assert_eq!(o.result, Word::from_u64(0xff));
    assert!(o.zero && !o.carry_out);
    let o = eval(Operation::Sub, Encoding::Unsigned, 8, 0x00, 0x01);
    assert_eq!(o.result, Word::from_u64(0xff));
    assert!(o.carry_out && o.overflow);
}

//! Spec keys of the shift, rotate and multiply operations: their options, which encodings
//! they accept, and the widths of their ports.
//!
//! Root keys `amount_width` (shifts) and `result_width` (mul); `[conventions]` keys
//! `large_amount` (shl, shr, sra), `signedness` and `result_part` (mul). Every key is refused,
//! at its line, where it would have no effect, and so is every encoding an operation does not
//! define. Part of stage 1: no arithmetic here.

use serde::Serialize;

use super::{Encoding, Operation, Reader, Signal, Spec, Table, MAX_WIDTH};

/// What a shifter does with an amount of N or more (shl, shr, sra).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum LargeAmount {
    /// Shift everything out (the default; Verilog's `<<`, `>>`, `>>>` per IEEE 1364-2005
    /// 5.1.12): zeros, or copies of the sign bit for sra.
    Saturate,
    /// Use only the low log2(N) bits of the amount (power-of-two widths only), as the 32-bit
    /// shifts of RISC-V and x86 do (from memory).
    Mask,
}

/// How a two's-complement multiplier reads its operands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Signedness {
    /// Both operands signed (the default).
    Signed,
    /// a signed, b unsigned (RISC-V MULHSU's reading, from memory).
    SignedUnsigned,
}

/// Which bits of the 2N-bit product an R-bit result holds (R < 2N).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ResultPart {
    /// The low R bits (the default).
    Low,
    /// The high R bits, product bits 2N-R .. 2N-1.
    High,
}

/// How a two's-complement divider rounds a quotient that is not whole (div, rem, divrem).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Rounding {
    /// Toward zero; the remainder takes the dividend's sign (the default; C99, Rust's `/`
    /// and `%`, RISC-V DIV/REM, x86 IDIV, Verilog `/` `%`; from memory).
    Truncate,
    /// Toward minus infinity; the remainder takes the divisor's sign (Python's `//` and
    /// `%`; from memory).
    Floor,
}

/// What a divider's quotient and remainder are when the divisor is zero.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum DivByZero {
    /// The quotient is all ones (unsigned 2^N - 1, twos -1) and the remainder is the
    /// dividend (the default; RISC-V M's DIV/DIVU/REM/REMU, from memory).
    AllOnes,
    /// The quotient is 0 and the remainder is the dividend (AArch64 SDIV/UDIV return 0,
    /// and its MSUB-computed remainder a - 0 * b is the dividend; from memory).
    Zero,
    /// The quotient and remainder are not checked, only `div_by_zero` is (x86 DIV/IDIV
    /// trap instead of returning a value; from memory).
    DontCare,
}

/// The options of the operations that have them, every default filled in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
pub struct OpOptions {
    /// Shifts: bits of the amount port (default ceil(log2 N) + 1).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub amount_width: Option<u32>,
    /// shl, shr, sra: see [`LargeAmount`].
    #[serde(skip_serializing_if = "Option::is_none")]
    pub large_amount: Option<LargeAmount>,
    /// mul: bits of the result port (default 2N).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub result_width: Option<u32>,
    /// mul in twos: see [`Signedness`].
    #[serde(skip_serializing_if = "Option::is_none")]
    pub signedness: Option<Signedness>,
    /// mul with result_width < 2N: see [`ResultPart`].
    #[serde(skip_serializing_if = "Option::is_none")]
    pub result_part: Option<ResultPart>,
    /// div, rem, divrem in twos: see [`Rounding`].
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rounding: Option<Rounding>,
    /// div, rem, divrem: see [`DivByZero`].
    #[serde(skip_serializing_if = "Option::is_none")]
    pub div_by_zero: Option<DivByZero>,
}

/// ceil(log2 n) + 1: enough bits for every amount 0..=N and one more.
pub fn default_amount_width(n: u32) -> u32 {
    let mut bits = 0;
    while (1u64 << bits) < n as u64 {
        bits += 1;
    }
    bits + 1
}

impl Operation {
    /// True for shl, shr, sra, rol and ror.
    pub fn is_shift(self) -> bool {
        matches!(
            self,
            Operation::Shl | Operation::Shr | Operation::Sra | Operation::Rol | Operation::Ror
        )
    }

    /// True for div, rem and divrem.
    pub fn is_division(self) -> bool {
        matches!(self, Operation::Div | Operation::Rem | Operation::DivRem)
    }

    /// True for and, or, xor, not and pass (bit patterns in, a bit pattern out).
    pub fn is_logic(self) -> bool {
        matches!(
            self,
            Operation::And | Operation::Or | Operation::Xor | Operation::Not | Operation::Pass
        )
    }

    /// True for abs, min and max.
    pub fn is_select_value(self) -> bool {
        matches!(self, Operation::Abs | Operation::Min | Operation::Max)
    }

    /// True for the operations whose model lives in `arith::ops` (shifts, rotates, mul,
    /// division, abs/min/max and the logic operations).
    pub fn is_extended(self) -> bool {
        self.is_shift()
            || self == Operation::Mul
            || self.is_division()
            || self.is_logic()
            || self.is_select_value()
            || self.is_saturating()
    }

    /// Why `encoding` makes no sense for this operation, if it does not.
    pub(crate) fn refuses(self, encoding: Encoding) -> Option<String> {
        match self {
            Operation::Sra if encoding != Encoding::Twos => Some(format!(
                "sra fills with copies of the two's-complement sign bit and is defined for \
                 encoding \"twos\" only (got \"{}\"); use shr for a logical shift",
                encoding.name()
            )),
            Operation::Mul
                if !matches!(
                    encoding,
                    Encoding::Unsigned | Encoding::Twos | Encoding::SignMagnitude
                ) =>
            {
                Some(format!(
                    "mul is defined for encodings unsigned, twos and signmag (got \"{}\")",
                    encoding.name()
                ))
            }
            Operation::Abs if encoding == Encoding::Unsigned => Some(
                "abs of an unsigned value is the value itself; use operation \"pass\"".to_string(),
            ),
            op if op.is_division() && !matches!(encoding, Encoding::Unsigned | Encoding::Twos) => {
                Some(format!(
                    "{} is defined for encodings unsigned and twos (got \"{}\")",
                    op.name(),
                    encoding.name()
                ))
            }
            _ => None,
        }
    }
}

impl Spec {
    /// The width in bits of `signal` for this spec (the result of a multiplier and the
    /// amount of a shifter have their own widths).
    pub fn signal_width(&self, signal: Signal) -> u32 {
        match (signal, &self.options) {
            (Signal::Select, _) => self.select.as_ref().map_or(1, |s| s.width),
            (Signal::Amount, Some(o)) => o.amount_width.unwrap_or(1),
            (Signal::Result, Some(o)) if o.result_width.is_some() => {
                o.result_width.unwrap_or(self.width)
            }
            _ => signal.width(self.width),
        }
    }

    /// The TOML lines of the options: (root keys, `[conventions]` keys).
    pub(super) fn options_toml(&self) -> (String, String) {
        let (mut root, mut conv) = (String::new(), String::new());
        let Some(o) = &self.options else {
            return (root, conv);
        };
        if let Some(w) = o.amount_width {
            root.push_str(&format!("amount_width = {w}\n"));
        }
        if let Some(w) = o.result_width {
            root.push_str(&format!("result_width = {w}\n"));
        }
        if let Some(l) = o.large_amount {
            let v = match l {
                LargeAmount::Saturate => "saturate",
                LargeAmount::Mask => "mask",
            };
            conv.push_str(&format!("large_amount = \"{v}\"\n"));
        }
        if let Some(s) = o.signedness {
            let v = match s {
                Signedness::Signed => "signed",
                Signedness::SignedUnsigned => "signed_unsigned",
            };
            conv.push_str(&format!("signedness = \"{v}\"\n"));
        }
        if let Some(p) = o.result_part {
            let v = match p {
                ResultPart::Low => "low",
                ResultPart::High => "high",
            };
            conv.push_str(&format!("result_part = \"{v}\"\n"));
        }
        if let Some(r) = o.rounding {
            let v = match r {
                Rounding::Truncate => "truncate",
                Rounding::Floor => "floor",
            };
            conv.push_str(&format!("rounding = \"{v}\"\n"));
        }
        if let Some(d) = o.div_by_zero {
            let v = match d {
                DivByZero::AllOnes => "all_ones",
                DivByZero::Zero => "zero",
                DivByZero::DontCare => "dont_care",
            };
            conv.push_str(&format!("div_by_zero = \"{v}\"\n"));
        }
        (root, conv)
    }

    /// The default options of an extended operation (None for the others).
    pub(super) fn default_options(
        operation: Operation,
        encoding: Encoding,
        width: u32,
    ) -> Option<OpOptions> {
        if !operation.is_extended() {
            return None;
        }
        let shifts_out = matches!(operation, Operation::Shl | Operation::Shr | Operation::Sra);
        Some(OpOptions {
            amount_width: operation.is_shift().then(|| default_amount_width(width)),
            large_amount: shifts_out.then_some(LargeAmount::Saturate),
            result_width: (operation == Operation::Mul).then(|| (2 * width).min(MAX_WIDTH)),
            signedness: (operation == Operation::Mul && encoding == Encoding::Twos)
                .then_some(Signedness::Signed),
            result_part: (operation == Operation::Mul && 2 * width > MAX_WIDTH)
                .then_some(ResultPart::Low),
            rounding: (operation.is_division() && encoding == Encoding::Twos)
                .then_some(Rounding::Truncate),
            div_by_zero: operation.is_division().then_some(DivByZero::AllOnes),
        })
    }
}

/// The `[conventions]` keys this file reads.
pub(super) const CONVENTION_KEYS: [&str; 5] = [
    "large_amount",
    "signedness",
    "result_part",
    "rounding",
    "div_by_zero",
];

/// The root keys this file reads.
pub(super) const ROOT_KEYS: [&str; 2] = ["amount_width", "result_width"];

impl Reader<'_> {
    /// Reads `amount_width` and `result_width` from the root table into `spec.options`.
    pub(super) fn read_option_widths(&mut self, root: &Table<'_>, spec: &mut Spec) {
        let op = spec.operation;
        let n = spec.width;
        if let Some((w, at)) = self.integer(root, "", "amount_width") {
            if !op.is_shift() {
                self.problem(
                    at..at,
                    "amount_width",
                    "has no effect: only shl, shr, sra, rol and ror have an amount; remove it",
                );
            } else if !(1..=64).contains(&w) {
                self.problem(at..at, "amount_width", format!("must be 1..=64, got {w}"));
            } else if let Some(o) = spec.options.as_mut() {
                o.amount_width = Some(w as u32);
            }
        }
        let given = self.integer(root, "", "result_width");
        if let Some((w, at)) = given {
            if op != Operation::Mul {
                self.problem(
                    at..at,
                    "result_width",
                    "has no effect: only mul has a result of its own width; remove it",
                );
            } else if !(1..=(2 * n).min(MAX_WIDTH) as i128).contains(&w) {
                self.problem(
                    at..at,
                    "result_width",
                    format!(
                        "must be 1..={} (at most 2N and at most {MAX_WIDTH} bits), got {w}",
                        (2 * n).min(MAX_WIDTH)
                    ),
                );
            } else if let Some(o) = spec.options.as_mut() {
                o.result_width = Some(w as u32);
                o.result_part = ((w as u32) < 2 * n).then_some(ResultPart::Low);
            }
        } else if op == Operation::Mul && 2 * n > MAX_WIDTH {
            self.problems.push(
                super::Problem::new(
                    self.file,
                    format!(
                        "a {n}-bit mul has a {}-bit full product, wider than the {MAX_WIDTH}-bit \
                         ports arithvec handles; set result_width (with result_part = \"low\" \
                         or \"high\")",
                        2 * n
                    ),
                )
                .at_line(1)
                .field("result_width"),
            );
        }
    }

    /// Reads the options' `[conventions]` keys.
    pub(super) fn read_option_conventions(&mut self, t: &Table<'_>, spec: &mut Spec) {
        let p = "conventions.";
        let op = spec.operation;
        let n = spec.width;
        if let Some((v, at)) = self.choice(
            t,
            p,
            "large_amount",
            &[
                ("saturate", LargeAmount::Saturate),
                ("mask", LargeAmount::Mask),
            ],
        ) {
            let aw = spec.options.and_then(|o| o.amount_width).unwrap_or(0);
            if !matches!(op, Operation::Shl | Operation::Shr | Operation::Sra) {
                self.problem(
                    at..at,
                    "conventions.large_amount",
                    "has no effect: it applies to shl, shr and sra (a rotate takes the amount \
                     modulo N); remove it",
                );
            } else if aw < 64 && (1u64 << aw) - 1 < n as u64 {
                self.problem(
                    at..at,
                    "conventions.large_amount",
                    format!(
                        "has no effect: a {aw}-bit amount never reaches the width {n}; remove it"
                    ),
                );
            } else if v == LargeAmount::Mask && !n.is_power_of_two() {
                self.problem(
                    at..at,
                    "conventions.large_amount",
                    format!(
                        "\"mask\" keeps the low log2(N) bits of the amount, which is defined for \
                         a power-of-two width only (got {n}); use \"saturate\""
                    ),
                );
            } else if let Some(o) = spec.options.as_mut() {
                o.large_amount = Some(v);
            }
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "signedness",
            &[
                ("signed", Signedness::Signed),
                ("signed_unsigned", Signedness::SignedUnsigned),
                ("unsigned", Signedness::Signed),
            ],
        ) {
            let unsigned = self
                .string(t, p, "signedness")
                .is_some_and(|(s, _)| s == "unsigned");
            if op != Operation::Mul || spec.encoding != Encoding::Twos {
                self.problem(
                    at..at,
                    "conventions.signedness",
                    "has no effect: it applies to a mul in encoding \"twos\"; remove it",
                );
            } else if unsigned {
                self.problem(
                    at..at,
                    "conventions.signedness",
                    "an unsigned-by-unsigned multiplier is encoding = \"unsigned\"; use that",
                );
            } else if let Some(o) = spec.options.as_mut() {
                o.signedness = Some(v);
            }
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "result_part",
            &[("low", ResultPart::Low), ("high", ResultPart::High)],
        ) {
            let rw = spec.options.and_then(|o| o.result_width).unwrap_or(0);
            if op != Operation::Mul || rw >= 2 * n {
                self.problem(
                    at..at,
                    "conventions.result_part",
                    "has no effect: it applies to a mul whose result_width is below 2N; \
                     remove it",
                );
            } else if v == ResultPart::High && spec.encoding == Encoding::SignMagnitude {
                self.problem(
                    at..at,
                    "conventions.result_part",
                    "the high bits of a sign-magnitude product carry no sign; use \"low\"",
                );
            } else if let Some(o) = spec.options.as_mut() {
                o.result_part = Some(v);
            }
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "rounding",
            &[("truncate", Rounding::Truncate), ("floor", Rounding::Floor)],
        ) {
            if !op.is_division() {
                self.problem(
                    at..at,
                    "conventions.rounding",
                    "has no effect: it applies to div, rem and divrem; remove it",
                );
            } else if spec.encoding != Encoding::Twos {
                self.problem(
                    at..at,
                    "conventions.rounding",
                    "has no effect: an unsigned quotient rounds the same both ways; remove it",
                );
            } else if let Some(o) = spec.options.as_mut() {
                o.rounding = Some(v);
            }
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "div_by_zero",
            &[
                ("all_ones", DivByZero::AllOnes),
                ("zero", DivByZero::Zero),
                ("dont_care", DivByZero::DontCare),
            ],
        ) {
            if !op.is_division() {
                self.problem(
                    at..at,
                    "conventions.div_by_zero",
                    "has no effect: it applies to div, rem and divrem; remove it",
                );
            } else if op == Operation::Rem && v != DivByZero::DontCare {
                self.problem(
                    at..at,
                    "conventions.div_by_zero",
                    "has no effect on a rem: \"all_ones\" and \"zero\" choose the quotient, \
                     and the remainder is the dividend under both; remove it (or use \
                     \"dont_care\")",
                );
            } else if let Some(o) = spec.options.as_mut() {
                o.div_by_zero = Some(v);
            }
        }
    }

    /// Checks that need the whole spec: ports and conventions that the options rule out.
    pub(super) fn check_options(&mut self, spec: &Spec) {
        let Some(o) = spec.options else { return };
        let n = spec.width;
        if spec.operation == Operation::Mul {
            let rw = o.result_width.unwrap_or(2 * n);
            let high = o.result_part == Some(ResultPart::High);
            if spec.has(Signal::Overflow) && (rw >= 2 * n || high) {
                self.problems.push(
                    super::Problem::new(
                        self.file,
                        "a mul has an overflow port only when its low result part is narrower \
                         than the 2N-bit product; remove it",
                    )
                    .at_line(1)
                    .field("ports.overflow"),
                );
            }
            if spec.conventions.negative_zero == super::NegativeZero::Either {
                self.problems.push(
                    super::Problem::new(
                        self.file,
                        "negative_zero = \"either\" is not supported for mul; use \"hardware\" \
                         or \"positive\"",
                    )
                    .at_line(1)
                    .field("conventions.negative_zero"),
                );
            }
        }
        if (spec.operation.is_logic() || spec.operation.is_select_value())
            && spec.conventions.negative_zero != super::NegativeZero::Hardware
        {
            self.problems.push(
                super::Problem::new(
                    self.file,
                    format!(
                        "negative_zero has no effect on {}: its result is an operand's pattern \
                         (or, for abs, the magnitude's +0); remove it",
                        spec.operation.name()
                    ),
                )
                .at_line(1)
                .field("conventions.negative_zero"),
            );
        }
        if spec.operation.is_shift() && !spec.has(Signal::Amount) {
            self.problems.push(
                super::Problem::new(
                    self.file,
                    format!(
                        "operation \"{}\" needs an `amount` port",
                        spec.operation.name()
                    ),
                )
                .at_line(1)
                .field("ports.amount"),
            );
        }
    }
}

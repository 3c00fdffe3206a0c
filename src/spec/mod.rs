//! The operation spec: what unit is under test, in which encoding, with which ports and flag
//! conventions, and how many random vectors to draw.
//!
//! This module owns the spec types, the TOML reader and its validation. Validation collects
//! every problem in the file (unknown keys, wrong types, ports the operation does not have,
//! conventions that would have no effect) and reports each with its line and key. Nothing here
//! does arithmetic; `model` reads a validated [`Spec`].
//!
//! Stage 1 of the pipeline: it may import only `crate::error`.

use std::collections::BTreeMap;
use std::fmt;

use serde::Serialize;
use toml::de::{DeTable, DeValue};
use toml::Spanned;

use crate::error::{Error, Problem, Result};

mod conventions;
use conventions::ConventionKey;
mod flags;
mod ops;
mod sat;
mod select;
pub use flags::ActiveLow;
pub use ops::{
    default_amount_width, DivByZero, LargeAmount, OpOptions, ResultPart, Rounding, Signedness,
};
pub use select::{SelectSpec, UndefinedOutputs};
mod packed;
pub use packed::PackedFlags;
mod ports;
pub use ports::{check_ranges, parse_port_text, Bundle, PortRange};
mod vhdl_types;
pub use vhdl_types::{VhdlType, VhdlTypes};
mod timing;
pub use timing::{Edge, ResetActive, Timing};

/// The widest operand arithvec handles, in bits.
pub const MAX_WIDTH: u32 = 512;

/// The arithmetic operation the unit performs.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
#[non_exhaustive]
pub enum Operation {
    /// `a + b + carry_in`.
    Add,
    /// `a - b - borrow_in`.
    Sub,
    /// `a + b + carry_in` when `mode` is 0, `a - b - borrow_in` when `mode` is 1.
    AddSub,
    /// `-a`.
    Negate,
    /// `a + 1`.
    Increment,
    /// `a - 1`.
    Decrement,
    /// Orders `a` against `b` by value under the encoding.
    Compare,
    /// `a << amount`, zeros shifted in.
    Shl,
    /// `a >> amount`, zeros shifted in.
    Shr,
    /// `a >> amount`, copies of the sign bit shifted in (twos only).
    Sra,
    /// `a` rotated left by `amount` modulo N.
    Rol,
    /// `a` rotated right by `amount` modulo N.
    Ror,
    /// `a * b`, an R-bit result (default R = 2N).
    Mul,
    /// `a / b`: quotient, with div_by_zero and overflow flags.
    Div,
    /// `a % b` (the remainder of the same division): remainder, div_by_zero, overflow.
    Rem,
    /// Quotient and remainder of one division.
    DivRem,
    /// |a|, with overflow where -min does not fit.
    Abs,
    /// The operand of smaller value (a on a tie).
    Min,
    /// The operand of larger value (a on a tie).
    Max,
    /// Bitwise a AND b.
    And,
    /// Bitwise a OR b.
    Or,
    /// Bitwise a XOR b.
    Xor,
    /// Bitwise NOT a.
    Not,
    /// a unchanged.
    Pass,
    /// `a + b` clamped to the encoding's max/min, with a saturated flag (`spec::sat`).
    AddSat,
    /// `a - b` clamped to the encoding's max/min, with a saturated flag (`spec::sat`).
    SubSat,
    /// Several operations behind one select port; the `[select]` table gives the code of
    /// each (see `spec::select`).
    Select,
}

impl Operation {
    /// Every operation, in documentation order.
    pub const ALL: [Operation; 7] = [
        Operation::Add,
        Operation::Sub,
        Operation::AddSub,
        Operation::Negate,
        Operation::Increment,
        Operation::Decrement,
        Operation::Compare,
    ];

    /// The shift, rotate and multiply operations (models in `arith::ops`).
    pub const EXTENDED: [Operation; 17] = [
        Operation::Shl,
        Operation::Shr,
        Operation::Sra,
        Operation::Rol,
        Operation::Ror,
        Operation::Mul,
        Operation::Div,
        Operation::Rem,
        Operation::DivRem,
        Operation::Abs,
        Operation::Min,
        Operation::Max,
        Operation::And,
        Operation::Or,
        Operation::Xor,
        Operation::Not,
        Operation::Pass,
    ];

    /// The spec-file spelling.
    pub fn name(self) -> &'static str {
        match self {
            Operation::Add => "add",
            Operation::Sub => "sub",
            Operation::AddSub => "addsub",
            Operation::Negate => "negate",
            Operation::Increment => "increment",
            Operation::Decrement => "decrement",
            Operation::Compare => "compare",
            Operation::Shl => "shl",
            Operation::Shr => "shr",
            Operation::Sra => "sra",
            Operation::Rol => "rol",
            Operation::Ror => "ror",
            Operation::Mul => "mul",
            Operation::Div => "div",
            Operation::Rem => "rem",
            Operation::DivRem => "divrem",
            Operation::Abs => "abs",
            Operation::Min => "min",
            Operation::Max => "max",
            Operation::And => "and",
            Operation::Or => "or",
            Operation::Xor => "xor",
            Operation::Not => "not",
            Operation::Pass => "pass",
            Operation::AddSat => "add_sat",
            Operation::SubSat => "sub_sat",
            Operation::Select => "select",
        }
    }

    /// True for operations with a `b` operand.
    pub fn is_binary(self) -> bool {
        matches!(
            self,
            Operation::Add
                | Operation::Sub
                | Operation::AddSub
                | Operation::Compare
                | Operation::Mul
                | Operation::Div
                | Operation::Rem
                | Operation::DivRem
                | Operation::Min
                | Operation::Max
                | Operation::And
                | Operation::Or
                | Operation::Xor
                | Operation::AddSat
                | Operation::SubSat
        )
    }

    /// The signals this operation can have.
    pub fn signals(self) -> &'static [Signal] {
        use Signal::*;
        match self {
            Operation::Add | Operation::Sub => {
                &[A, B, CarryIn, Result, CarryOut, Overflow, Zero, Negative]
            }
            Operation::AddSub => &[
                A, B, CarryIn, Mode, Result, CarryOut, Overflow, Zero, Negative,
            ],
            Operation::Negate | Operation::Increment | Operation::Decrement => {
                &[A, Result, CarryOut, Overflow, Zero, Negative]
            }
            Operation::Compare => &[A, B, Less, Equal, Greater],
            Operation::Shl | Operation::Shr | Operation::Sra | Operation::Rol | Operation::Ror => {
                &[A, Amount, Result, CarryOut, Zero, Negative]
            }
            Operation::Mul => &[A, B, Result, Overflow, Zero, Negative],
            Operation::Div => &[A, B, Overflow, Quotient, DivByZero],
            Operation::Rem => &[A, B, Overflow, Remainder, DivByZero],
            Operation::DivRem => &[A, B, Overflow, Quotient, Remainder, DivByZero],
            Operation::Abs => &[A, Result, Overflow],
            Operation::Min | Operation::Max => &[A, B, Result],
            Operation::And | Operation::Or | Operation::Xor => &[A, B, Result, Zero, Negative],
            Operation::Not | Operation::Pass => &[A, Result, Zero, Negative],
            Operation::AddSat | Operation::SubSat => &[A, B, Result, Saturated, Zero, Negative],
            // The union of the operations a select unit can carry; `spec::select` refuses a
            // port no carried operation has.
            Operation::Select => &[
                A, B, CarryIn, Select, Result, CarryOut, Overflow, Zero, Negative, Less, Equal,
                Greater,
            ],
        }
    }
}

impl fmt::Display for Operation {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// How an N-bit pattern stands for a number.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
#[non_exhaustive]
pub enum Encoding {
    /// 0 .. 2^N - 1.
    Unsigned,
    /// Two's complement, -2^(N-1) .. 2^(N-1) - 1.
    Twos,
    /// One's complement, -(2^(N-1) - 1) .. 2^(N-1) - 1, with +0 and -0.
    Ones,
    /// Sign-magnitude, -(2^(N-1) - 1) .. 2^(N-1) - 1, with +0 and -0.
    #[serde(rename = "signmag")]
    SignMagnitude,
    /// Offset binary (excess-2^(N-1)), -2^(N-1) .. 2^(N-1) - 1.
    Offset,
}

impl Encoding {
    /// Every encoding, in documentation order.
    pub const ALL: [Encoding; 5] = [
        Encoding::Unsigned,
        Encoding::Twos,
        Encoding::Ones,
        Encoding::SignMagnitude,
        Encoding::Offset,
    ];

    /// The spec-file spelling.
    pub fn name(self) -> &'static str {
        match self {
            Encoding::Unsigned => "unsigned",
            Encoding::Twos => "twos",
            Encoding::Ones => "ones",
            Encoding::SignMagnitude => "signmag",
            Encoding::Offset => "offset",
        }
    }

    /// True for the encodings with two zero codes.
    pub fn has_negative_zero(self) -> bool {
        matches!(self, Encoding::Ones | Encoding::SignMagnitude)
    }

    /// True for the encodings whose datapath is a plain N-bit binary adder (after, for offset
    /// binary, inverting the top bit of each operand and of the result).
    pub fn is_binary_datapath(self) -> bool {
        matches!(self, Encoding::Unsigned | Encoding::Twos | Encoding::Offset)
    }
}

impl fmt::Display for Encoding {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// One input or output of the unit. The names are arithvec's; the spec's `[ports]` table maps
/// them to the DUT's own names.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Signal {
    /// First operand.
    A,
    /// Second operand.
    B,
    /// Carry-in (add) or borrow-in (sub), per `conventions.carry_in`.
    CarryIn,
    /// Add/subtract select of an addsub unit: 0 = add, 1 = subtract.
    Mode,
    /// The N-bit result.
    Result,
    /// Carry-out or borrow-out, per `conventions.carry_out`.
    CarryOut,
    /// The true result is not representable.
    Overflow,
    /// The result is zero (per `conventions.zero_flag`).
    Zero,
    /// The result's sign bit is set.
    Negative,
    /// Compare: a < b.
    Less,
    /// Compare: a == b.
    Equal,
    /// Compare: a > b.
    Greater,
    /// Shift amount (width `amount_width`).
    Amount,
    /// Division: the N-bit quotient.
    Quotient,
    /// Division: the N-bit remainder.
    Remainder,
    /// Division: the divisor is zero.
    DivByZero,
    /// Operation select code of a select unit (width `[select] width`).
    Select,
    /// add_sat, sub_sat: the true result was clamped to the encoding's max or min.
    Saturated,
}

impl Signal {
    /// Every signal, in file-layout order: inputs first, then outputs.
    pub const ALL: [Signal; 18] = [
        Signal::A,
        Signal::B,
        Signal::CarryIn,
        Signal::Mode,
        Signal::Result,
        Signal::CarryOut,
        Signal::Overflow,
        Signal::Zero,
        Signal::Negative,
        Signal::Less,
        Signal::Equal,
        Signal::Greater,
        Signal::Amount,
        Signal::Quotient,
        Signal::Remainder,
        Signal::DivByZero,
        Signal::Select,
        Signal::Saturated,
    ];

    /// The key used in `[ports]`.
    pub fn key(self) -> &'static str {
        match self {
            Signal::A => "a",
            Signal::B => "b",
            Signal::CarryIn => "carry_in",
            Signal::Mode => "mode",
            Signal::Result => "result",
            Signal::CarryOut => "carry_out",
            Signal::Overflow => "overflow",
            Signal::Zero => "zero",
            Signal::Negative => "negative",
            Signal::Less => "less",
            Signal::Equal => "equal",
            Signal::Greater => "greater",
            Signal::Amount => "amount",
            Signal::Quotient => "quotient",
            Signal::Remainder => "remainder",
            Signal::DivByZero => "div_by_zero",
            Signal::Select => "select",
            Signal::Saturated => "saturated",
        }
    }

    /// Looks a signal up by its `[ports]` key.
    pub fn from_key(key: &str) -> Option<Signal> {
        Signal::ALL.into_iter().find(|s| s.key() == key)
    }

    /// True for inputs of the unit.
    pub fn is_input(self) -> bool {
        matches!(
            self,
            Signal::A
                | Signal::B
                | Signal::CarryIn
                | Signal::Mode
                | Signal::Amount
                | Signal::Select
        )
    }

    /// The signal's width in bits for a unit of operand width `width`.
    pub fn width(self, width: u32) -> u32 {
        match self {
            Signal::A | Signal::B | Signal::Result | Signal::Quotient | Signal::Remainder => width,
            _ => 1,
        }
    }
}

/// What a subtracting unit's carry-out port reports.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum CarryOutConvention {
    /// 1 = a borrow was needed (the default).
    Borrow,
    /// The raw adder carry of a + ~b + 1, which is NOT borrow.
    Carry,
}

/// What a subtracting unit's carry-in port means.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum CarryInConvention {
    /// The input is a borrow and is subtracted (the default).
    Borrow,
    /// The input is the raw adder carry-in of a + ~b + c, so 1 means "no borrow".
    Carry,
}

/// Which zero a one's-complement or sign-magnitude unit produces.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum NegativeZero {
    /// Bit-exact with the usual datapath (the default): end-around-carry adder for one's
    /// complement, the magnitude adder/subtractor without a zero fix-up for sign-magnitude.
    Hardware,
    /// Every zero result is +0.
    Positive,
    /// Either zero is accepted when the result's value is zero.
    Either,
}

/// Which datapath an offset-binary add, sub or addsub unit's carry_out comes from. Both are
/// built: they give the same result and differ in the carry out of the top bit exactly when
/// the adder's two operand codes have equal top bits (class `offset.carry_source`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum OffsetCarry {
    /// The inner two's-complement datapath: each operand's top bit is inverted on the way in,
    /// the result's on the way out, and the carry is the inner adder's (the default). At 8
    /// bits 0x80 + 0x80 carries out 0.
    Inner,
    /// The codes are added (or subtracted) as they are and the result's top bit is inverted;
    /// the carry is that adder's. At 8 bits 0x80 + 0x80 carries out 1.
    Codes,
}

impl OffsetCarry {
    fn is_inner(&self) -> bool {
        *self == OffsetCarry::Inner
    }
}

/// When the zero flag is set.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ZeroFlag {
    /// When the result's value is zero: +0 and -0 both set it (the default).
    Value,
    /// Only when every result bit is 0.
    Bits,
}

/// How random operands are drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Mix {
    /// Every operand bit pattern equally likely (the default).
    Uniform,
    /// A share of operands (`corner_share` percent) drawn from the special values and their
    /// neighbourhoods, the rest uniform.
    Corner,
}

/// The spec's port names, by signal.
#[derive(Debug, Clone, PartialEq, Eq, Default, Serialize)]
pub struct Ports {
    names: BTreeMap<Signal, String>,
    /// The packed flags vector (`ports.flags` with a `[flags]` table), if any; its flags
    /// are in `names` as `PORT[BIT]` ranges. Left out of the JSON when absent.
    #[serde(skip_serializing_if = "Option::is_none")]
    packed: Option<PackedFlags>,
}

impl Ports {
    /// The DUT's name for `signal`, if the DUT has it.
    pub fn get(&self, signal: Signal) -> Option<&str> {
        self.names.get(&signal).map(String::as_str)
    }

    /// Adds or replaces a port name.
    pub fn set(&mut self, signal: Signal, name: impl Into<String>) {
        self.names.insert(signal, name.into());
    }
}

/// Flag and zero conventions.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
pub struct Conventions {
    /// See [`CarryOutConvention`].
    pub carry_out: CarryOutConvention,
    /// See [`CarryInConvention`].
    pub carry_in: CarryInConvention,
    /// See [`NegativeZero`].
    pub negative_zero: NegativeZero,
    /// See [`ZeroFlag`].
    pub zero_flag: ZeroFlag,
    /// See [`OffsetCarry`]. Left out of the normalised JSON when it is the default, so the
    /// identity of every spec written before the key existed is unchanged.
    #[serde(skip_serializing_if = "OffsetCarry::is_inner")]
    pub offset_carry: OffsetCarry,
    /// Flags that are 1 when false (see [`ActiveLow`]); left out of the normalised JSON
    /// when empty.
    #[serde(skip_serializing_if = "ActiveLow::is_empty")]
    pub active_low: ActiveLow,
}

impl Default for Conventions {
    fn default() -> Conventions {
        Conventions {
            carry_out: CarryOutConvention::Borrow,
            carry_in: CarryInConvention::Borrow,
            negative_zero: NegativeZero::Hardware,
            zero_flag: ZeroFlag::Value,
            offset_carry: OffsetCarry::Inner,
            active_low: ActiveLow::default(),
        }
    }
}

/// The `[random]` table.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct RandomSettings {
    /// Number of random vectors after the directed ones (default 1000).
    pub count: u64,
    /// ChaCha seed (default 1).
    pub seed: u64,
    /// Operand distribution (default uniform).
    pub mix: Mix,
    /// Percent of operands drawn from specials when `mix = "corner"` (default 25).
    pub corner_share: u32,
}

impl Default for RandomSettings {
    fn default() -> RandomSettings {
        RandomSettings {
            count: 1000,
            seed: 1,
            mix: Mix::Uniform,
            corner_share: 25,
        }
    }
}

/// A Verilog parameter / VHDL generic value.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(untagged)]
pub enum ParamValue {
    /// An integer.
    Int(i64),
    /// A string (emitted as a string literal).
    Str(String),
}

/// The `[dut]` table: the module or entity to instantiate.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Dut {
    /// Module (Verilog) or entity (VHDL) name.
    pub module: String,
    /// Parameters / generics, by name.
    pub parameters: BTreeMap<String, ParamValue>,
    /// The VHDL types of its vector ports (`vhdl_types`; default std_logic_vector).
    #[serde(skip_serializing_if = "VhdlTypes::is_default")]
    pub vhdl_types: VhdlTypes,
}

/// A validated operation spec.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Spec {
    /// Unit name used in reports and file headers.
    pub name: String,
    /// The operation.
    pub operation: Operation,
    /// Bits per operand, 1..=512.
    pub width: u32,
    /// The number encoding.
    pub encoding: Encoding,
    /// The DUT's port names.
    pub ports: Ports,
    /// Flag conventions.
    pub conventions: Conventions,
    /// Random-vector settings.
    pub random: RandomSettings,
    /// The DUT to instantiate in testbenches and netlists, if given.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub dut: Option<Dut>,
    /// Options of the shift, rotate and multiply operations (None for the others).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub options: Option<OpOptions>,
    /// The `[select]` table of a select unit (None for the others).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub select: Option<SelectSpec>,
    /// The `[timing]` table of a clocked unit (None for a combinational one).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub timing: Option<Timing>,
}

impl Spec {
    /// Reads and validates a spec from TOML text; `file` names it in error messages.
    pub fn parse(text: &str, file: &str) -> Result<Spec> {
        Reader::new(text, file).read()
    }

    /// The input signals this spec's unit has, in file-layout order, with port names.
    pub fn inputs(&self) -> Vec<(Signal, &str)> {
        self.fields(true)
    }

    /// The output signals this spec's unit has, in file-layout order, with port names.
    pub fn outputs(&self) -> Vec<(Signal, &str)> {
        self.fields(false)
    }

    fn fields(&self, inputs: bool) -> Vec<(Signal, &str)> {
        Signal::ALL
            .into_iter()
            .filter(|s| s.is_input() == inputs)
            .filter_map(|s| self.ports.get(s).map(|p| (s, p)))
            .collect()
    }

    /// True when the unit has `signal`.
    pub fn has(&self, signal: Signal) -> bool {
        self.ports.get(signal).is_some()
    }

    /// True when the operation subtracts in some mode (and so the borrow conventions apply).
    pub fn subtracts(&self) -> bool {
        if let Some(select) = &self.select {
            return select.operations().any(|op| {
                matches!(
                    op,
                    Operation::Sub | Operation::Negate | Operation::Decrement
                )
            });
        }
        matches!(
            self.operation,
            Operation::Sub | Operation::AddSub | Operation::Negate | Operation::Decrement
        )
    }

    /// The normalised spec as canonical JSON (every default filled in, fixed key order).
    pub fn normalised_json(&self) -> String {
        serde_json::to_string(self).expect("spec serialises")
    }

    /// The normalised spec as TOML that [`Spec::parse`] reads back to an equal spec: every
    /// key written, conventions only where they have an effect.
    pub fn to_toml(&self) -> String {
        let q = |s: &str| format!("\"{}\"", s.replace('\\', "\\\\").replace('"', "\\\""));
        let mut t = format!(
            "name = {}\noperation = {}\nwidth = {}\nencoding = {}\n\n[ports]\n",
            q(&self.name),
            q(self.operation.name()),
            self.width,
            q(self.encoding.name())
        );
        let (option_root, option_conv) = self.options_toml();
        if !option_root.is_empty() {
            t.insert_str(t.len() - "\n[ports]\n".len(), &option_root);
        }
        for sig in Signal::ALL {
            if let Some(p) = self.ports.get(sig) {
                if !self.is_packed_member(sig) {
                    t.push_str(&format!("{} = {}\n", sig.key(), q(p)));
                }
            }
        }
        if let Some(p) = self.ports.packed_flags() {
            t.push_str(&format!("{} = {}\n", packed::KEY, q(&p.port)));
        }
        t.push_str(&self.select_toml());
        t.push_str(&self.packed_flags_toml());
        let c = &self.conventions;
        let mut conv = String::new();
        for key in ConventionKey::ALL {
            if self.convention_without_effect(key).is_some() {
                continue;
            }
            let v = match key {
                ConventionKey::CarryOut => match c.carry_out {
                    CarryOutConvention::Borrow => "borrow",
                    CarryOutConvention::Carry => "carry",
                },
                ConventionKey::CarryIn => match c.carry_in {
                    CarryInConvention::Borrow => "borrow",
                    CarryInConvention::Carry => "carry",
                },
                ConventionKey::NegativeZero => match c.negative_zero {
                    NegativeZero::Hardware => "hardware",
                    NegativeZero::Positive => "positive",
                    NegativeZero::Either => "either",
                },
                ConventionKey::ZeroFlag => match c.zero_flag {
                    ZeroFlag::Value => "value",
                    ZeroFlag::Bits => "bits",
                },
                ConventionKey::OffsetCarry => match c.offset_carry {
                    OffsetCarry::Inner => "inner",
                    OffsetCarry::Codes => "codes",
                },
            };
            conv.push_str(&format!("{} = {}\n", key.name(), q(v)));
        }
        conv.push_str(&option_conv);
        conv.push_str(&self.select_conventions_toml());
        conv.push_str(&self.active_low_toml());
        if !conv.is_empty() {
            t.push_str("\n[conventions]\n");
            t.push_str(&conv);
        }
        let r = &self.random;
        t.push_str(&format!(
            "\n[random]\ncount = {}\nseed = {}\n",
            r.count, r.seed
        ));
        if r.mix == Mix::Corner {
            t.push_str(&format!(
                "mix = \"corner\"\ncorner_share = {}\n",
                r.corner_share
            ));
        }
        if let Some(d) = &self.dut {
            t.push_str(&format!("\n[dut]\nmodule = {}\n", q(&d.module)));
            if !d.parameters.is_empty() {
                let list: Vec<String> = d
                    .parameters
                    .iter()
                    .map(|(k, v)| match v {
                        ParamValue::Int(i) => format!("{k} = {i}"),
                        ParamValue::Str(s) => format!("{k} = {}", q(s)),
                    })
                    .collect();
                t.push_str(&format!("parameters = {{ {} }}\n", list.join(", ")));
            }
            t.push_str(&d.vhdl_types.to_toml());
        }
        if let Some(timing) = &self.timing {
            t.push_str(&timing.to_toml());
        }
        t
    }

    /// A minimal spec with default ports for `operation` (every signal the operation can have
    /// under `encoding`, named by its key), for tests and examples.
    pub fn with_defaults(operation: Operation, encoding: Encoding, width: u32) -> Spec {
        let mut ports = Ports::default();
        for &s in operation.signals() {
            if signal_allowed(s, operation, encoding).is_ok() {
                ports.set(s, s.key());
            }
        }
        Spec {
            name: format!("{}_{}_{}", operation.name(), encoding.name(), width),
            operation,
            width,
            encoding,
            ports,
            conventions: Conventions::default(),
            random: RandomSettings::default(),
            dut: None,
            options: Spec::default_options(operation, encoding, width),
            select: None,
            timing: None,
        }
    }
}

/// Whether `signal` makes sense under `encoding` (the operation's own list aside).
fn signal_allowed(
    signal: Signal,
    operation: Operation,
    encoding: Encoding,
) -> std::result::Result<(), String> {
    match (signal, encoding) {
        (Signal::CarryOut, Encoding::Ones) if operation == Operation::Negate => Err(
            "a one's-complement negator is a row of inverters with no carry-out; remove it"
                .to_string(),
        ),
        (Signal::CarryIn, Encoding::Ones | Encoding::SignMagnitude) => Err(format!(
            "a carry_in port is defined for unsigned, twos and offset units only (a {} \
             datapath has no plain carry-in); remove it",
            encoding.name()
        )),
        (Signal::Overflow, Encoding::Unsigned) if operation.is_division() => Err(
            "an unsigned division never overflows (only the two's-complement min / -1 does); \
             remove it"
                .to_string(),
        ),
        (Signal::Overflow, Encoding::Ones | Encoding::SignMagnitude)
            if operation == Operation::Abs =>
        {
            Err(format!(
                "the abs of a {} value never overflows (-min is max); remove it",
                encoding.name()
            ))
        }
        (Signal::CarryOut, Encoding::SignMagnitude) => Err(
            "a sign-magnitude unit has no carry-out of its own; use the overflow port for \
             magnitude overflow"
                .to_string(),
        ),
        _ => Ok(()),
    }
}

/// Every key the `[conventions]` table may hold (which ones have an effect depends on the unit).
fn convention_table_keys() -> Vec<&'static str> {
    let mut keys = vec![
        "carry_out",
        "carry_in",
        "negative_zero",
        "zero_flag",
        "offset_carry",
    ];
    keys.extend(ops::CONVENTION_KEYS);
    keys.push(select::CONVENTION_KEY);
    keys.push(flags::CONVENTION_KEY);
    keys
}

/// Walks the parsed TOML document, collecting problems.
struct Reader<'a> {
    text: &'a str,
    file: &'a str,
    problems: Vec<Problem>,
}

type Table<'i> = DeTable<'i>;

impl<'a> Reader<'a> {
    fn new(text: &'a str, file: &'a str) -> Reader<'a> {
        Reader {
            text,
            file,
            problems: Vec::new(),
        }
    }

    fn line_of(&self, span: std::ops::Range<usize>) -> usize {
        let end = span.start.min(self.text.len());
        self.text.as_bytes()[..end]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1
    }

    fn problem(&mut self, span: std::ops::Range<usize>, key: &str, message: impl Into<String>) {
        let line = self.line_of(span);
        self.problems.push(
            Problem::new(self.file, message)
                .at_line(line)
                .field(key.to_string()),
        );
    }

    fn read(mut self) -> Result<Spec> {
        let doc = match DeTable::parse(self.text) {
            Ok(doc) => doc,
            Err(e) => {
                let line = e.span().map(|s| self.line_of(s));
                let mut p = Problem::new(self.file, format!("not valid TOML: {}", e.message()));
                p.line = line;
                return Err(Error::problem(p));
            }
        };
        let spec = self.read_root(doc.get_ref());
        if self.problems.is_empty() {
            Ok(spec.expect("no problems means a spec"))
        } else {
            self.problems.sort_by_key(|p| p.line);
            Err(Error::input(self.problems))
        }
    }

    fn check_keys(&mut self, table: &Table<'_>, prefix: &str, allowed: &[&str]) {
        for (k, _) in table.iter() {
            if !allowed.contains(&k.get_ref().as_ref()) {
                let key = format!("{prefix}{}", k.get_ref());
                self.problem(
                    k.span(),
                    &key,
                    format!("unknown key; expected one of: {}", allowed.join(", ")),
                );
            }
        }
    }

    fn get<'t, 'i>(
        table: &'t Table<'i>,
        key: &str,
    ) -> Option<(
        &'t Spanned<toml::de::DeString<'i>>,
        &'t Spanned<DeValue<'i>>,
    )> {
        table.get_key_value(key)
    }

    fn string(&mut self, table: &Table<'_>, prefix: &str, key: &str) -> Option<(String, usize)> {
        let (_, v) = Self::get(table, key)?;
        match v.get_ref() {
            DeValue::String(s) => Some((s.to_string(), v.span().start)),
            _ => {
                self.problem(v.span(), &format!("{prefix}{key}"), "expected a string");
                None
            }
        }
    }

    fn integer(&mut self, table: &Table<'_>, prefix: &str, key: &str) -> Option<(i128, usize)> {
        let (_, v) = Self::get(table, key)?;
        match v.get_ref() {
            DeValue::Integer(i) => {
                let digits: String = i.as_str().chars().filter(|&c| c != '_').collect();
                let (neg, body) = match digits.strip_prefix('-') {
                    Some(rest) => (true, rest.to_string()),
                    None => (false, digits.trim_start_matches('+').to_string()),
                };
                let body = body
                    .trim_start_matches("0x")
                    .trim_start_matches("0o")
                    .trim_start_matches("0b");
                match i128::from_str_radix(body, i.radix()) {
                    Ok(n) => Some((if neg { -n } else { n }, v.span().start)),
                    Err(_) => {
                        self.problem(v.span(), &format!("{prefix}{key}"), "integer out of range");
                        None
                    }
                }
            }
            _ => {
                self.problem(v.span(), &format!("{prefix}{key}"), "expected an integer");
                None
            }
        }
    }

    fn table<'t, 'i>(&mut self, root: &'t Table<'i>, key: &str) -> Option<&'t Table<'i>> {
        let (_, v) = Self::get(root, key)?;
        match v.get_ref() {
            DeValue::Table(t) => Some(t),
            _ => {
                self.problem(v.span(), key, "expected a table");
                None
            }
        }
    }

    fn choice<T: Copy>(
        &mut self,
        table: &Table<'_>,
        prefix: &str,
        key: &str,
        options: &[(&str, T)],
    ) -> Option<(T, usize)> {
        let (s, at) = self.string(table, prefix, key)?;
        match options.iter().find(|(name, _)| *name == s) {
            Some(&(_, v)) => Some((v, at)),
            None => {
                let names: Vec<&str> = options.iter().map(|(n, _)| *n).collect();
                self.problem(
                    at..at,
                    &format!("{prefix}{key}"),
                    format!(
                        "unknown value \"{s}\"; expected one of: {}",
                        names.join(", ")
                    ),
                );
                None
            }
        }
    }

    fn read_root(&mut self, root: &Table<'_>) -> Option<Spec> {
        self.check_keys(
            root,
            "",
            &[
                "name",
                "operation",
                "width",
                "encoding",
                "ports",
                "conventions",
                "random",
                "dut",
                "select",
                "timing",
                packed::KEY,
                ops::ROOT_KEYS[0],
                ops::ROOT_KEYS[1],
            ],
        );
        let name = self.string(root, "", "name");
        if let Some((n, at)) = &name {
            if n.is_empty()
                || !n
                    .chars()
                    .all(|c| c.is_ascii_alphanumeric() || matches!(c, '_' | '-' | '.'))
            {
                self.problem(
                    *at..*at,
                    "name",
                    "use letters, digits, '_', '-' and '.' only (it appears in file headers)",
                );
            }
        }
        let operation = self.choice(
            root,
            "",
            "operation",
            &Operation::ALL
                .into_iter()
                .chain(Operation::EXTENDED)
                .chain(Operation::SATURATING)
                .chain([Operation::Select])
                .map(|o| (o.name(), o))
                .collect::<Vec<_>>(),
        );
        let encoding = self.choice(root, "", "encoding", &Encoding::ALL.map(|e| (e.name(), e)));
        let width = self.integer(root, "", "width");
        if let Some((w, at)) = width {
            if !(1..=MAX_WIDTH as i128).contains(&w) {
                self.problem(at..at, "width", format!("must be 1..={MAX_WIDTH}, got {w}"));
            }
        }
        for (key, got) in [
            ("name", name.is_some()),
            ("operation", operation.is_some()),
            ("encoding", encoding.is_some()),
            ("width", width.is_some()),
        ] {
            if !got && Self::get(root, key).is_none() {
                self.problems.push(
                    Problem::new(self.file, "required key is missing")
                        .at_line(1)
                        .field(key),
                );
            }
        }
        let ports_table = self.table(root, "ports");
        let conv_table = self.table(root, "conventions");
        let random_table = self.table(root, "random");
        let dut_table = self.table(root, "dut");

        let (operation, encoding) = match (operation, encoding) {
            (Some((o, _)), Some((e, _))) => (o, e),
            _ => {
                // Still check every table that does not depend on the operation and encoding,
                // so that every problem is reported in one pass.
                if let Some(t) = ports_table {
                    let mut keys: Vec<&str> = Signal::ALL.iter().map(|s| s.key()).collect();
                    keys.push(packed::KEY);
                    self.check_keys(t, "ports.", &keys);
                    for signal in Signal::ALL {
                        if Self::get(t, signal.key()).is_some() {
                            if let Some((name, at)) = self.string(t, "ports.", signal.key()) {
                                self.check_port_name(&name, at, signal);
                            }
                        }
                    }
                }
                if let Some(t) = conv_table {
                    self.check_keys(t, "conventions.", &convention_table_keys());
                }
                if let Some(t) = random_table {
                    self.read_random(t, &mut RandomSettings::default());
                }
                if let Some(t) = dut_table {
                    self.read_dut(t);
                }
                return None;
            }
        };
        let ports_line = Self::get(root, "ports").map_or(1, |(k, _)| self.line_of(k.span()));
        let ports = match ports_table {
            Some(t) => self.read_ports(t, operation, encoding, ports_line),
            None => {
                self.problems.push(
                    Problem::new(self.file, "the [ports] table is missing")
                        .at_line(1)
                        .field("ports"),
                );
                Ports::default()
            }
        };
        let mut spec = Spec {
            name: name.map(|n| n.0).unwrap_or_default(),
            operation,
            width: width
                .map(|w| w.0.clamp(1, MAX_WIDTH as i128) as u32)
                .unwrap_or(8),
            encoding,
            ports,
            conventions: Conventions::default(),
            random: RandomSettings::default(),
            dut: None,
            options: None,
            select: None,
            timing: None,
        };
        spec.options = Spec::default_options(spec.operation, spec.encoding, spec.width);
        if let Some(why) = spec.operation.refuses(spec.encoding) {
            let at = Self::get(root, "encoding").map_or(0..0, |(_, v)| v.span());
            self.problem(at, "encoding", why);
        }
        self.read_option_widths(root, &mut spec);
        self.read_select(root, ports_table, &mut spec);
        self.read_packed_flags(root, ports_table, &mut spec);
        if let Some(t) = ports_table {
            // Bit ranges (`s[15:0]`) are checked once every role's width is known.
            for (signal, message) in check_ranges(&spec.ports, |s| spec.signal_width(s)) {
                let at = Self::get(t, signal.key()).map_or(0..0, |(_, v)| v.span());
                self.problem(at, &format!("ports.{}", signal.key()), message);
            }
        }
        if let Some(t) = conv_table {
            self.read_select_conventions(t, &mut spec);
            self.read_active_low(t, &mut spec);
            self.read_conventions(t, &mut spec);
            self.read_option_conventions(t, &mut spec);
        }
        self.require_addsub_carry_in(&spec, conv_table, ports_table);
        self.check_options(&spec);
        if let Some(t) = random_table {
            self.read_random(t, &mut spec.random);
        }
        self.read_timing(root, &mut spec);
        if let Some(t) = dut_table {
            spec.dut = self.read_dut(t);
            let types = self.read_vhdl_types(t, &spec);
            if let Some(d) = spec.dut.as_mut() {
                d.vhdl_types = types;
            }
        }
        Some(spec)
    }

    /// Reports a port name that no testbench or vector file could use; true when it is usable.
    fn check_port_name(&mut self, name: &str, at: usize, signal: Signal) -> bool {
        let key = format!("ports.{}", signal.key());
        // A role may be a bit range of a port (`s[15:0]`, `s[16]`): the name is the part
        // before the range.
        let port = match parse_port_text(name) {
            Ok((port, _)) => port,
            Err(msg) => {
                self.problem(at..at, &key, msg);
                return false;
            }
        };
        if !is_identifier(port) {
            self.problem(
                at..at,
                &key,
                format!(
                    "\"{port}\" is not a usable port name (letters, digits and '_', not \
                     starting with a digit; a bit range is written NAME[MSB:LSB] or NAME[BIT])"
                ),
            );
            return false;
        }
        if port == "index" || port == "classes" {
            self.problem(
                at..at,
                &key,
                format!("\"{name}\" is reserved for the vector files' own columns"),
            );
            return false;
        }
        true
    }

    /// Reads `[ports]`; `table_line` is the line of the table's header, where a missing
    /// port is reported.
    fn read_ports(
        &mut self,
        t: &Table<'_>,
        operation: Operation,
        encoding: Encoding,
        table_line: usize,
    ) -> Ports {
        let mut keys: Vec<&str> = Signal::ALL.iter().map(|s| s.key()).collect();
        keys.push(packed::KEY);
        self.check_keys(t, "ports.", &keys);
        let mut ports = Ports::default();
        let mut seen: BTreeMap<String, Signal> = BTreeMap::new();
        for signal in Signal::ALL {
            let Some((k, _)) = Self::get(t, signal.key()) else {
                continue;
            };
            let key = format!("ports.{}", signal.key());
            let Some((name, at)) = self.string(t, "ports.", signal.key()) else {
                continue;
            };
            if !operation.signals().contains(&signal) {
                self.problem(
                    k.span(),
                    &key,
                    format!(
                        "operation \"{}\" has no {} port; remove it",
                        operation.name(),
                        signal.key()
                    ),
                );
                continue;
            }
            if let Err(msg) = signal_allowed(signal, operation, encoding) {
                self.problem(k.span(), &key, msg);
                continue;
            }
            if !self.check_port_name(&name, at, signal) {
                continue;
            }
            if let Some(other) = seen.get(&name) {
                self.problem(
                    at..at,
                    &key,
                    format!(
                        "duplicate port name: \"{name}\" is already used by ports.{}",
                        other.key()
                    ),
                );
                continue;
            }
            seen.insert(name.clone(), signal);
            ports.set(signal, name);
        }
        // A port that is named but refused above has its own problem at its own line; saying
        // also that the operation "needs" it would point at the wrong cause.
        let missing = |ports: &Ports, signal: Signal| {
            ports.get(signal).is_none() && Self::get(t, signal.key()).is_none()
        };
        let line = table_line;
        if missing(&ports, Signal::A) {
            self.problems.push(
                Problem::new(self.file, "every operation needs an `a` port")
                    .at_line(line)
                    .field("ports.a"),
            );
        }
        if operation.is_binary() && missing(&ports, Signal::B) {
            self.problems.push(
                Problem::new(
                    self.file,
                    format!("operation \"{}\" needs a `b` port", operation.name()),
                )
                .at_line(line)
                .field("ports.b"),
            );
        }
        if operation == Operation::AddSub && missing(&ports, Signal::Mode) {
            self.problems.push(
                Problem::new(
                    self.file,
                    "an addsub unit needs a `mode` port (0 = add, 1 = subtract)",
                )
                .at_line(line)
                .field("ports.mode"),
            );
        }
        if !Signal::ALL
            .iter()
            .any(|s| !s.is_input() && ports.get(*s).is_some())
            && Self::get(t, packed::KEY).is_none()
        {
            self.problems.push(
                Problem::new(self.file, "the unit has no output port; name at least one")
                    .at_line(line)
                    .field("ports"),
            );
        }
        ports
    }

    fn read_conventions(&mut self, t: &Table<'_>, spec: &mut Spec) {
        self.check_keys(t, "conventions.", &convention_table_keys());
        let p = "conventions.";
        // Every value is read first: whether one key has an effect can depend on another
        // (negative_zero and zero_flag).
        let mut present: Vec<(ConventionKey, usize)> = Vec::new();
        if let Some((v, at)) = self.choice(
            t,
            p,
            "carry_out",
            &[
                ("borrow", CarryOutConvention::Borrow),
                ("carry", CarryOutConvention::Carry),
            ],
        ) {
            spec.conventions.carry_out = v;
            present.push((ConventionKey::CarryOut, at));
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "carry_in",
            &[
                ("borrow", CarryInConvention::Borrow),
                ("carry", CarryInConvention::Carry),
            ],
        ) {
            spec.conventions.carry_in = v;
            present.push((ConventionKey::CarryIn, at));
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "negative_zero",
            &[
                ("hardware", NegativeZero::Hardware),
                ("positive", NegativeZero::Positive),
                ("either", NegativeZero::Either),
            ],
        ) {
            spec.conventions.negative_zero = v;
            present.push((ConventionKey::NegativeZero, at));
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "zero_flag",
            &[("value", ZeroFlag::Value), ("bits", ZeroFlag::Bits)],
        ) {
            spec.conventions.zero_flag = v;
            if v == ZeroFlag::Bits && spec.encoding == Encoding::Offset {
                self.problem(
                    at..at,
                    "conventions.zero_flag",
                    "\"bits\" is not meaningful for offset binary, whose zero is 10..0; remove \
                     the key (the zero flag is set for the value 0)",
                );
            } else {
                present.push((ConventionKey::ZeroFlag, at));
            }
        }
        if let Some((v, at)) = self.choice(
            t,
            p,
            "offset_carry",
            &[("inner", OffsetCarry::Inner), ("codes", OffsetCarry::Codes)],
        ) {
            spec.conventions.offset_carry = v;
            present.push((ConventionKey::OffsetCarry, at));
        }
        for (key, at) in present {
            if let Some(why) = spec.convention_without_effect(key) {
                self.problem(at..at, &format!("conventions.{}", key.name()), why);
            }
        }
    }

    /// An addsub unit's carry_in port means a carry in one mode and, in the other, either a
    /// borrow or the raw adder carry-in; both are built, so the spec must say which.
    fn require_addsub_carry_in(
        &mut self,
        spec: &Spec,
        conventions: Option<&Table<'_>>,
        ports: Option<&Table<'_>>,
    ) {
        if spec.operation != Operation::AddSub || !spec.has(Signal::CarryIn) {
            return;
        }
        if conventions.is_some_and(|t| Self::get(t, "carry_in").is_some()) {
            return;
        }
        let at = ports
            .and_then(|t| Self::get(t, "carry_in"))
            .map_or(0..0, |(k, _)| k.span());
        self.problem(
            at,
            "conventions.carry_in",
            "an addsub unit with a carry_in port must say what the port means when subtracting: \
             carry_in = \"borrow\" (mode 1 computes a - b - cin, as a borrow-in) or \
             carry_in = \"carry\" (the port feeds the adder's carry-in, as in a plain \
             a + (b ^ m) + cin unit, so mode 1 computes a - b - 1 + cin); add one of them \
             under [conventions]",
        );
    }

    fn read_random(&mut self, t: &Table<'_>, random: &mut RandomSettings) {
        self.check_keys(t, "random.", &["count", "seed", "mix", "corner_share"]);
        if let Some((n, at)) = self.integer(t, "random.", "count") {
            if !(0..=u64::MAX as i128).contains(&n) {
                self.problem(at..at, "random.count", "must be a non-negative integer");
            } else {
                random.count = n as u64;
            }
        }
        if let Some((n, at)) = self.integer(t, "random.", "seed") {
            if !(0..=u64::MAX as i128).contains(&n) {
                self.problem(at..at, "random.seed", "must be an integer 0..2^64-1");
            } else {
                random.seed = n as u64;
            }
        }
        if let Some((m, _)) = self.choice(
            t,
            "random.",
            "mix",
            &[("uniform", Mix::Uniform), ("corner", Mix::Corner)],
        ) {
            random.mix = m;
        }
        if let Some((n, at)) = self.integer(t, "random.", "corner_share") {
            if !(0..=100).contains(&n) {
                self.problem(
                    at..at,
                    "random.corner_share",
                    "must be a percentage 0..=100",
                );
            } else {
                random.corner_share = n as u32;
                if random.mix != Mix::Corner {
                    self.problem(
                        at..at,
                        "random.corner_share",
                        "has no effect unless mix = \"corner\"",
                    );
                }
            }
        }
    }

    fn read_dut(&mut self, t: &Table<'_>) -> Option<Dut> {
        self.check_keys(t, "dut.", &["module", "parameters", "vhdl_types"]);
        let module = self.string(t, "dut.", "module");
        if let Some((m, at)) = &module {
            if !is_identifier(m) {
                self.problem(
                    *at..*at,
                    "dut.module",
                    format!("\"{m}\" is not a usable module name"),
                );
            }
        } else if Self::get(t, "module").is_none() {
            self.problems.push(
                Problem::new(self.file, "the [dut] table needs a module name")
                    .at_line(1)
                    .field("dut.module"),
            );
        }
        let mut parameters = BTreeMap::new();
        if let Some((_, v)) = Self::get(t, "parameters") {
            match v.get_ref() {
                DeValue::Table(params) => {
                    for (k, pv) in params.iter() {
                        let key = format!("dut.parameters.{}", k.get_ref());
                        if !is_identifier(k.get_ref()) {
                            self.problem(k.span(), &key, "not a usable parameter name");
                            continue;
                        }
                        let value = match pv.get_ref() {
                            DeValue::String(s) => ParamValue::Str(s.to_string()),
                            DeValue::Integer(_) => {
                                match self.integer(params, "dut.parameters.", k.get_ref()) {
                                    Some((n, _)) if i64::try_from(n).is_ok() => {
                                        ParamValue::Int(n as i64)
                                    }
                                    Some((_, at)) => {
                                        self.problem(at..at, &key, "integer out of range");
                                        continue;
                                    }
                                    None => continue,
                                }
                            }
                            _ => {
                                self.problem(pv.span(), &key, "expected an integer or a string");
                                continue;
                            }
                        };
                        parameters.insert(k.get_ref().to_string(), value);
                    }
                }
                _ => self.problem(v.span(), "dut.parameters", "expected a table"),
            }
        }
        module.map(|(module, _)| Dut {
            module,
            parameters,
            vhdl_types: VhdlTypes::default(),
        })
    }
}

/// True for names usable as Verilog and VHDL identifiers.
pub fn is_identifier(name: &str) -> bool {
    let mut chars = name.chars();
    matches!(chars.next(), Some(c) if c.is_ascii_alphabetic() || c == '_')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"
name = "pump_delta"
operation = "sub"
width = 16
encoding = "twos"

[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "y"
carry_out = "co"
overflow = "ovf"
zero = "zero"
negative = "neg"

[conventions]
carry_out = "borrow"
carry_in = "borrow"

[random]
count = 1000
seed = 1
"#;

    #[test]
    fn reads_the_documented_example() {
        let spec = Spec::parse(GOOD, "unit.toml").unwrap();
        assert_eq!(spec.operation, Operation::Sub);
        assert_eq!(spec.width, 16);
        assert_eq!(spec.ports.get(Signal::CarryIn), Some("cin"));
        assert_eq!(
            spec.inputs(),
            vec![(Signal::A, "a"), (Signal::B, "b"), (Signal::CarryIn, "cin")]
        );
        assert_eq!(spec.outputs().len(), 5);
    }

    #[test]
    fn lists_every_problem_with_line_and_key() {
        let text = r#"name = "x"
operation = "negate"
width = 600
encoding = "twos"
colour = "red"

[ports]
a = "a"
b = "b"
mode = "m"
result = "y"
"#;
        let err = Spec::parse(text, "bad.toml").unwrap_err();
        let problems = err.problems();
        let find = |field: &str| problems.iter().find(|p| p.field.as_deref() == Some(field));
        assert_eq!(find("width").unwrap().line, Some(3));
        assert_eq!(find("colour").unwrap().line, Some(5));
        assert_eq!(find("ports.b").unwrap().line, Some(9));
        assert_eq!(find("ports.mode").unwrap().line, Some(10));
        assert!(err
            .to_string()
            .contains("bad.toml:3: width: must be 1..=512"));
    }

    #[test]
    fn rejects_conventions_without_effect() {
        let text = r#"name = "x"
operation = "add"
width = 8
encoding = "twos"
[ports]
a = "a"
b = "b"
result = "y"
[conventions]
carry_out = "carry"
"#;
        let err = Spec::parse(text, "c.toml").unwrap_err();
        assert_eq!(
            err.problems()[0].field.as_deref(),
            Some("conventions.carry_out")
        );
    }

    #[test]
    fn normalised_toml_reads_back_equal() {
        let spec = Spec::parse(GOOD, "unit.toml").unwrap();
        assert_eq!(Spec::parse(&spec.to_toml(), "again.toml").unwrap(), spec);
        for op in Operation::ALL {
            for enc in Encoding::ALL {
                let mut s = Spec::with_defaults(op, enc, 8);
                s.dut = Some(Dut {
                    module: "m".into(),
                    parameters: [("W".to_string(), ParamValue::Int(8))]
                        .into_iter()
                        .collect(),
                    vhdl_types: VhdlTypes::default(),
                });
                assert_eq!(
                    Spec::parse(&s.to_toml(), "x.toml").unwrap(),
                    s,
                    "{op} {enc}"
                );
            }
        }
    }

    #[test]
    fn rejects_bad_toml_with_line() {
        let err = Spec::parse("name = \"x\"\nwidth = = 3\n", "t.toml").unwrap_err();
        assert_eq!(err.problems()[0].line, Some(2));
    }

    #[test]
    fn rejects_duplicate_and_reserved_port_names() {
        let text = r#"name = "x"
operation = "add"
width = 8
encoding = "unsigned"
[ports]
a = "p"
b = "p"
result = "index"
"#;
        let err = Spec::parse(text, "d.toml").unwrap_err();
        let fields: Vec<_> = err
            .problems()
            .iter()
            .map(|p| p.field.clone().unwrap())
            .collect();
        assert!(fields.contains(&"ports.b".to_string()));
        assert!(fields.contains(&"ports.result".to_string()));
    }

    #[test]
    fn reads_vhdl_types_and_refuses_bad_values_at_their_line() {
        let base = "name = \"x\"\noperation = \"add\"\nwidth = 8\nencoding = \"unsigned\"\n\
                    [ports]\na = \"a\"\nb = \"b\"\nresult = \"y\"\ncarry_out = \"co\"\n\
                    [dut]\nmodule = \"m\"\n";
        let spec = Spec::parse(&format!("{base}vhdl_types = \"unsigned\"\n"), "v.toml").unwrap();
        let types = &spec.dut.as_ref().unwrap().vhdl_types;
        assert_eq!(types.of("a"), VhdlType::Unsigned);
        assert_eq!(Spec::parse(&spec.to_toml(), "again.toml").unwrap(), spec);
        let text = format!("{base}vhdl_types = {{ y = \"signed\" }}\n");
        let spec = Spec::parse(&text, "v.toml").unwrap();
        let types = &spec.dut.as_ref().unwrap().vhdl_types;
        assert_eq!(
            (types.of("y"), types.of("a")),
            (VhdlType::Signed, VhdlType::StdLogicVector)
        );
        assert_eq!(Spec::parse(&spec.to_toml(), "again.toml").unwrap(), spec);
        let default = Spec::parse(base, "v.toml").unwrap();
        assert!(default.dut.unwrap().vhdl_types.is_default());
        for (value, field, says) in [
            (
                "\"numeric\"",
                "dut.vhdl_types",
                "unknown VHDL port type \"numeric\"",
            ),
            ("3", "dut.vhdl_types", "expected one of"),
            (
                "{ co = \"unsigned\" }",
                "dut.vhdl_types.co",
                "not a vector port",
            ),
            (
                "{ y = \"bits\" }",
                "dut.vhdl_types.y",
                "unknown VHDL port type \"bits\"",
            ),
        ] {
            let text = format!("{base}vhdl_types = {value}\n");
            let err = Spec::parse(&text, "v.toml").unwrap_err();
            let p = &err.problems()[0];
            assert_eq!(p.line, Some(12), "{value}");
            assert_eq!(p.field.as_deref(), Some(field), "{value}");
            assert!(p.message.contains(says), "{value}: {}", p.message);
        }
    }
}

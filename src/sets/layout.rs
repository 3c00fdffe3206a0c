//! Where each field sits in the packed `$readmemh` words.
//!
//! A stimulus word is the spec's input fields (a, b, carry_in, mode, in that order, those the
//! unit has) concatenated MSB-first: the first field occupies the highest bits. An expected
//! word is the output fields (result, carry_out, overflow, zero, negative, less, equal,
//! greater) packed the same way. The layout is a pure function of the spec; the hex writer,
//! the manifest and the testbench emitters all read it from here.

use serde::Serialize;

use crate::spec::{Signal, Spec};

/// One field of a packed word.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Field {
    /// The arithvec signal.
    pub signal: Signal,
    /// The DUT's port name.
    pub name: String,
    /// Highest bit of the field in the packed word.
    pub msb: u32,
    /// Lowest bit of the field in the packed word.
    pub lsb: u32,
}

impl Field {
    /// The field's width in bits.
    pub fn width(&self) -> u32 {
        self.msb - self.lsb + 1
    }
}

/// The fields of one packed word, highest first.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct WordLayout {
    /// Total bits in the word.
    pub width: u32,
    /// The fields, in file order (highest bits first).
    pub fields: Vec<Field>,
}

impl WordLayout {
    fn pack(spec: &Spec, signals: Vec<(Signal, &str)>) -> WordLayout {
        let width: u32 = signals.iter().map(|(s, _)| spec.signal_width(*s)).sum();
        let mut top = width;
        let fields = signals
            .into_iter()
            .map(|(signal, name)| {
                let w = spec.signal_width(signal);
                let field = Field {
                    signal,
                    name: name.to_string(),
                    msb: top - 1,
                    lsb: top - w,
                };
                top -= w;
                field
            })
            .collect();
        WordLayout { width, fields }
    }

    /// The number of hex digits per line of the `$readmemh` file.
    pub fn hex_digits(&self) -> u32 {
        self.width.div_ceil(4)
    }

    /// The field carrying `signal`, if any.
    pub fn field(&self, signal: Signal) -> Option<&Field> {
        self.fields.iter().find(|f| f.signal == signal)
    }
}

/// Both packed words of a vector set.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Layout {
    /// `stimulus.hex`: the inputs.
    pub stimulus: WordLayout,
    /// `expected.hex`: the outputs.
    pub expected: WordLayout,
}

impl Layout {
    /// The layout for `spec`.
    pub fn for_spec(spec: &Spec) -> Layout {
        Layout {
            stimulus: WordLayout::pack(spec, spec.inputs()),
            expected: WordLayout::pack(spec, spec.outputs()),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spec::{Encoding, Operation};

    #[test]
    fn sub_with_borrow_in_packs_a_highest() {
        let spec = Spec::with_defaults(Operation::Sub, Encoding::Twos, 16);
        let layout = Layout::for_spec(&spec);
        let s = &layout.stimulus;
        assert_eq!(s.width, 33);
        assert_eq!((s.fields[0].msb, s.fields[0].lsb), (32, 17));
        assert_eq!((s.fields[1].msb, s.fields[1].lsb), (16, 1));
        assert_eq!((s.fields[2].msb, s.fields[2].lsb), (0, 0));
        assert_eq!(s.hex_digits(), 9);
        // result, carry_out, overflow, zero, negative
        assert_eq!(layout.expected.width, 20);
        assert_eq!(layout.expected.fields[0].signal, Signal::Result);
    }
}

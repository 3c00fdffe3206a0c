//! The golden model of a select unit: one model per carried operation, chosen by the
//! vector's select code.
//!
//! Each carried operation is modelled by its own [`Model`], built from the part spec
//! `Spec::select_parts` gives (same width, encoding and conventions, the operation's own
//! ports), so every operation arithvec models is carried without code here. A code the spec
//! does not list has no operation: its expected outputs are all 0 and every output is
//! compared (a unit that decodes an unlisted code into an operation fails loudly). Knows
//! nothing about files or ports beyond the spec.

use crate::arith::bits::Bits;
use crate::arith::model::{Flags, Inputs, Model, Outputs, Path, Trace};
use crate::spec::{Encoding, Operation, Signal, Spec, UndefinedOutputs};

/// The per-operation models of a select unit.
#[derive(Debug, Clone)]
pub(crate) struct SelectModel {
    /// (code, operation, model), in `[select]` table order.
    pub(crate) parts: Vec<(u32, Operation, Model)>,
    encoding: Encoding,
    undefined_zero: bool,
    /// The unit's output ports. Only these are cleared: some outputs share storage in
    /// [`Outputs`] (a quotient is kept in the result), so clearing a signal the unit does not
    /// have could clear one it does.
    outputs: Vec<Signal>,
}

impl SelectModel {
    /// The select model for `spec`, or None when it is not a select unit.
    pub(crate) fn new(spec: &Spec) -> Option<SelectModel> {
        let select = spec.select.as_ref()?;
        Some(SelectModel {
            parts: spec
                .select_parts()
                .into_iter()
                .map(|(code, part)| (code, part.operation, Model::new(&part)))
                .collect(),
            encoding: spec.encoding,
            undefined_zero: select.undefined_outputs == UndefinedOutputs::Zero,
            outputs: Signal::ALL
                .into_iter()
                .filter(|&s| !s.is_input() && spec.has(s))
                .collect(),
        })
    }

    /// The part selected by `inputs`, if its code is listed.
    pub(crate) fn part(&self, inputs: &Inputs) -> Option<(usize, Operation, &Model)> {
        self.parts
            .iter()
            .enumerate()
            .find(|(_, (code, _, _))| *code == inputs.select)
            .map(|(i, (_, op, m))| (i, *op, m))
    }

    pub(crate) fn evaluate(&self, inputs: &Inputs) -> Outputs {
        match self.part(inputs) {
            Some((_, op, model)) => self.clear_undefined(op, model.evaluate(inputs)),
            None => Outputs::default(),
        }
    }

    /// Outputs `op` does not define are 0 in the expected values (what a unit under
    /// `undefined_outputs = "zero"` must drive; unchecked otherwise).
    fn clear_undefined(&self, op: Operation, mut outputs: Outputs) -> Outputs {
        for &s in &self.outputs {
            if !Spec::defines(op, s, self.encoding) {
                outputs.set(s, crate::arith::word::Word::ZERO);
            }
        }
        outputs
    }

    pub(crate) fn trace<B: Bits>(&self, inputs: &Inputs) -> Trace<B> {
        match self.part(inputs) {
            Some((_, _, model)) => model.trace(inputs),
            None => Trace {
                va: B::zero(),
                vb: B::zero(),
                cin: false,
                subtracting: false,
                truth: B::zero(),
                result: B::zero(),
                remainder: B::zero(),
                path: Path::None,
                outputs_flags: Flags::default(),
            },
        }
    }

    /// True when the checker compares output `signal` for `inputs`.
    pub(crate) fn compares(&self, inputs: &Inputs, signal: Signal) -> bool {
        match self.part(inputs) {
            Some((_, op, _)) => self.undefined_zero || Spec::defines(op, signal, self.encoding),
            None => true,
        }
    }
}

impl Model {
    /// True when a checker compares output `signal` of a vector with `inputs`: always, except
    /// for a select unit's outputs that the selected operation does not define (unless
    /// `[conventions] undefined_outputs = "zero"`).
    pub fn compares(&self, inputs: &Inputs, signal: Signal) -> bool {
        match &self.select {
            Some(s) => s.compares(inputs, signal),
            None => true,
        }
    }

    /// The operation a vector with `inputs` runs: the unit's own, or for a select unit the
    /// one its code selects (None for a code the spec does not list).
    pub fn selected_operation(&self, inputs: &Inputs) -> Option<Operation> {
        match &self.select {
            Some(s) => s.part(inputs).map(|(_, op, _)| op),
            None => Some(self.operation()),
        }
    }

    /// [`Model::alternative`] for the operation `inputs` selects.
    pub fn alternative_for(&self, inputs: &Inputs, outputs: &Outputs) -> Option<Outputs> {
        match &self.select {
            Some(s) => {
                let (_, op, model) = s.part(inputs)?;
                let alt = model.alternative(outputs)?;
                Some(s.clear_undefined(op, alt))
            }
            None => self.alternative(outputs),
        }
    }
}

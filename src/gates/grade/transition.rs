//! Transition-fault grading of a spec's vector set (`grade --model transition`): the same
//! port matching and fault-free check as stuck-at grading, then [`grade_transitions`] on
//! the graded netlist.

use super::{Grader, NetlistMismatch};
use crate::arith::model::{Inputs, Outputs};
use crate::error::Result;
use crate::gates::fault::{grade_transitions, PairSelection, TransitionList, TransitionReport};

/// What transition grading found.
#[derive(Debug)]
pub enum TransitionOutcome {
    /// The netlist reproduces the golden model on every vector; here is the report.
    Graded(Box<TransitionReport>),
    /// The fault-free netlist is not the spec: the first disagreements.
    NotTheSpec(Vec<NetlistMismatch>),
}

impl Grader<'_> {
    /// Transition-fault coverage of `vectors` taken as pairs by `pairs`, after the
    /// fault-free check against `expected`.
    pub fn grade_transitions(
        &self,
        vectors: &[Inputs],
        expected: &[Outputs],
        pairs: PairSelection,
    ) -> Result<TransitionOutcome> {
        let bad = self.fault_free_mismatches(vectors, expected)?;
        if !bad.is_empty() {
            return Ok(TransitionOutcome::NotTheSpec(bad));
        }
        let patterns = self.patterns(vectors)?;
        let list = TransitionList::new(&self.netlist);
        let mut report = grade_transitions(
            &self.netlist,
            &list,
            &self.faults,
            &patterns,
            pairs,
            self.threads,
        )?;
        report.unchecked_outputs = self.unchecked_outputs.clone();
        report.ungraded_gates = self.ungraded_gates;
        Ok(TransitionOutcome::Graded(Box::new(report)))
    }
}

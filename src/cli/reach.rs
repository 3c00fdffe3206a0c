//! Why a corner bin is unreachable, for `arithvec classes`: a bin the directed generator
//! cannot construct is either impossible at this width and encoding, or needs an input the
//! spec does not have. The carry-in is the input a DUT most often lacks, so each unreachable
//! bin is tried again on the same spec with a carry-in port added: a bin reachable there is
//! unreachable only because the spec has no carry-in port.

use arithvec::{Catalogue, Generator, Signal, Spec};

/// Why one bin is unreachable (meaningless for a reachable bin).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Unreachable {
    /// No input of this width and encoding hits the bin.
    AtThisWidth,
    /// A carry-in (borrow-in) would hit it, and the spec names no carry_in port.
    NoCarryIn,
}

impl Unreachable {
    /// The words for the text table.
    pub(crate) fn words(self) -> &'static str {
        match self {
            Unreachable::AtThisWidth => "no input hits it at this width and encoding",
            Unreachable::NoCarryIn => "the spec has no carry-in port (ports.carry_in)",
        }
    }

    /// The JSON value.
    pub(crate) fn json(self) -> &'static str {
        match self {
            Unreachable::AtThisWidth => "width_and_encoding",
            Unreachable::NoCarryIn => "no_carry_in_port",
        }
    }
}

/// The reason for every bin of `cat` (the catalogue of `spec`), indexed by global bin.
pub(crate) fn why_unreachable(spec: &Spec, cat: &Catalogue) -> Vec<Unreachable> {
    let mut reasons = vec![Unreachable::AtThisWidth; cat.bin_count()];
    if spec.has(Signal::CarryIn) || !spec.operation.signals().contains(&Signal::CarryIn) {
        return reasons;
    }
    if (0..cat.bin_count()).all(|b| cat.is_reachable(b)) {
        return reasons;
    }
    let mut with_carry = spec.clone();
    // Any name the spec does not use: only the catalogue is built, no file is written.
    let mut name = String::from("carry_in");
    while Signal::ALL
        .iter()
        .any(|&s| spec.ports.get(s) == Some(name.as_str()))
    {
        name.push('_');
    }
    with_carry.ports.set(Signal::CarryIn, name);
    let generator = Generator::new(&with_carry, Some(0), None);
    let other = generator.catalogue();
    let reachable_there: std::collections::HashMap<String, bool> = (0..other.bin_count())
        .map(|b| (other.bin_id(b), other.is_reachable(b)))
        .collect();
    for (b, reason) in reasons.iter_mut().enumerate() {
        if !cat.is_reachable(b) && reachable_there.get(&cat.bin_id(b)) == Some(&true) {
            *reason = Unreachable::NoCarryIn;
        }
    }
    reasons
}

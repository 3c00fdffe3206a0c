//! The corner-class catalogue: named arithmetic situations, their bins, and the predicates
//! that say which bins a vector hits.
//!
//! A class has a stable dotted id (`chain.length`, `b.walking_one`, `sub.overflow.boundary`),
//! a one-line description, and one or more bins (`k=17`, `bit3.a1b0c1`, `at_max.cin1`). For an
//! addsub unit every class exists once per mode, prefixed `add.` or `sub.`. Which classes exist
//! depends on the operation and encoding; which bins exist also depends on the width: a bin
//! is *reachable* when the directed generator could construct a vector that hits it, and only
//! reachable bins count towards coverage (tests confirm by exhaustive enumeration at small
//! widths that every bin some input can hit is reachable).
//!
//! This module owns the predicates ([`Catalogue::classify`]); `generate` owns construction.
//! It does no I/O.

use crate::arith::bits::{Bits, Wide};
use crate::arith::encoding::{decode, max_value, min_value, negative_zero};
use crate::arith::model::{offset_carries, Cell, Inputs, Model, Outputs, Path, Trace};
use crate::arith::word::Word;
use crate::spec::{Encoding, Operation, Signal, Spec};

mod divide;
mod ext;
mod program;
mod sat;
mod select;
mod simple;
mod templates;
pub(crate) use divide::case_labels;
pub(crate) use ext::{booth_digits, booth_operand, ExtKind};
use program::*;
pub(crate) use sat::extremes as sat_extremes;
use templates::*;

/// Which operand an operand class watches.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Operand {
    A,
    B,
}

impl Operand {
    fn name(self) -> &'static str {
        match self {
            Operand::A => "a",
            Operand::B => "b",
        }
    }
}

/// The special operand values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Special {
    Zero,
    One,
    Max,
    Min,
    MinusOne,
    NegativeZero,
}

impl Special {
    const ALL: [Special; 6] = [
        Special::Zero,
        Special::One,
        Special::Max,
        Special::Min,
        Special::MinusOne,
        Special::NegativeZero,
    ];

    fn id(self) -> &'static str {
        match self {
            Special::Zero => "zero",
            Special::One => "one",
            Special::Max => "max",
            Special::Min => "min",
            Special::MinusOne => "minus_one",
            Special::NegativeZero => "neg_zero",
        }
    }

    fn describe(self) -> &'static str {
        match self {
            Special::Zero => "is zero (+0)",
            Special::One => "is +1",
            Special::Max => "is the largest value",
            Special::Min => "is the most negative value (the largest-magnitude negative)",
            Special::MinusOne => "is -1",
            Special::NegativeZero => "is -0",
        }
    }

    /// The pattern of this special under the model's encoding, if it has one.
    pub(crate) fn code(self, model: &Model) -> Option<Word> {
        let (w, enc) = (model.width(), model.encoding());
        let v: Wide = match self {
            Special::Zero => Wide::zero(),
            Special::One => Wide::one(),
            Special::Max => max_value(w, enc),
            Special::Min => min_value(w, enc),
            Special::MinusOne => Wide::one().neg(),
            Special::NegativeZero => return negative_zero::<Wide>(w, enc).map(|p| p.to_word()),
        };
        model.encode_value(v).map(|p| p.to_word())
    }
}

/// What a class watches; each kind has its own bins and predicate.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Kind {
    Special(Operand, Special, Word),
    /// Watches for ..0101 (this pattern) and ..1010 (its inverse).
    Alternating(Operand, Word),
    WalkingOne(Operand),
    WalkingZero(Operand),
    ResultZeroFromNonzero,
    ResultPattern(Special, Word),
    ResultBits,
    ResultWalkingOne,
    OverflowBoundary,
    UnsignedEdge,
    ChainLength,
    ChainFromCarryIn,
    CellRows,
    EndAroundCarry,
    SignMagEffectiveAdd,
    SignMagEffectiveSub,
    SignMagOpposites,
    OffsetMidpoint,
    OffsetCarrySource,
    CompareOutcome,
    CompareEqual,
    CompareOffByOne,
    CompareSignsDiffer,
    CompareExtremes,
    CompareFirstDifference,
    CompareSingleBit,
    CompareLowerOppose,
    /// Equal operands at each of these special patterns, one bin each.
    CompareEqualSpecial(Vec<Word>),
    CompareSignOnly,
    /// A class of the shift, rotate and multiply operations (see `ext`).
    Ext(ExtKind),
    /// A select unit's code (classified in `classes::select`, never by a predicate).
    SelectCode,
    /// A select unit's pair of back-to-back operations (classified in `classes::select` from
    /// the previous vector's code, never by a predicate).
    SelectSwitch,
}

/// One corner class.
#[derive(Debug, Clone)]
pub struct Class {
    id: String,
    description: String,
    pub(crate) kind: Kind,
    /// addsub mode the class belongs to (None: every vector).
    pub(crate) mode: Option<bool>,
    pub(crate) first_bin: u32,
    /// First dense family of the class (result bits and cell rows), else 0.
    pub(crate) dense_slot: u16,
    pub(crate) labels: Vec<String>,
}

impl Class {
    /// The stable dotted id.
    pub fn id(&self) -> &str {
        &self.id
    }

    /// One-line description.
    pub fn description(&self) -> &str {
        &self.description
    }

    /// Bin labels, in bin order (reachable or not).
    pub fn bin_labels(&self) -> &[String] {
        &self.labels
    }

    /// Global index of the class's first bin.
    pub fn first_bin(&self) -> usize {
        self.first_bin as usize
    }

    /// Number of bins (reachable or not).
    pub fn bin_count(&self) -> usize {
        self.labels.len()
    }
}

/// Bins of one dense family hit by one vector: bins `base + i * stride` for every bit i set
/// in the hit's mask. The masks live in [`Hits`] as `limbs` 64-bit limbs each, so a narrow
/// unit moves one machine word per family instead of a 512-bit pattern.
#[derive(Debug, Clone, Copy)]
pub(crate) struct DenseHit {
    pub base: u32,
    pub stride: u32,
    /// The family's index in [`Catalogue::dense_families`].
    pub slot: u16,
}

/// The bins and classes one vector hits. Reused across vectors to avoid allocation.
#[derive(Debug, Clone, Default)]
pub struct Hits {
    pub(crate) bins: Vec<u32>,
    pub(crate) dense: Vec<DenseHit>,
    /// The masks of `dense`, `limbs` limbs per hit, in the same order.
    pub(crate) masks: Vec<u64>,
    /// Limbs per dense mask (the unit's width in 64-bit limbs).
    pub(crate) limbs: usize,
    /// Classes hit, as class indices in catalogue order (no duplicates).
    pub(crate) classes: Vec<u16>,
}

impl Hits {
    /// A new, empty hit set.
    pub fn new() -> Hits {
        Hits::default()
    }

    fn clear(&mut self, limbs: usize) {
        self.bins.clear();
        self.dense.clear();
        self.masks.clear();
        self.classes.clear();
        self.limbs = limbs;
    }

    /// The mask of dense hit `i`.
    #[inline]
    pub(crate) fn mask(&self, i: usize) -> &[u64] {
        &self.masks[i * self.limbs..(i + 1) * self.limbs]
    }

    #[inline]
    fn push_dense<B: Bits>(&mut self, base: u32, stride: u32, slot: u16, mask: B) {
        self.dense.push(DenseHit { base, stride, slot });
        for l in 0..self.limbs {
            self.masks.push(mask.limb(l));
        }
    }

    /// Calls `f` with every global bin index hit (in no particular order, no duplicates).
    pub fn for_each_bin(&self, mut f: impl FnMut(usize)) {
        for &b in &self.bins {
            f(b as usize);
        }
        for (i, d) in self.dense.iter().enumerate() {
            for (l, &limb) in self.mask(i).iter().enumerate() {
                let mut m = limb;
                while m != 0 {
                    let bit = l as u32 * 64 + m.trailing_zeros();
                    f((d.base + bit * d.stride) as usize);
                    m &= m - 1;
                }
            }
        }
    }

    /// The classes hit, as indices into [`Catalogue::classes`], in catalogue order.
    pub fn classes(&self) -> &[u16] {
        &self.classes
    }
}

/// Whether classification should compute bins or only the set of classes (cheaper).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Detail {
    Bins,
    ClassesOnly,
}

/// The classes of one spec, with their bins and reachability.
#[derive(Debug, Clone)]
pub struct Catalogue {
    model: Model,
    has_carry_in: bool,
    classes: Vec<Class>,
    /// Per global bin: the class index.
    bin_class: Vec<u16>,
    /// Per global bin: reachable (the generator constructed a vector for it).
    reachable: Vec<bool>,
    /// Class index ranges per addsub mode (or one range).
    groups: Vec<(Option<bool>, std::ops::Range<usize>)>,
    /// Dense bin families (base bin, stride): counted with bit-sliced counters.
    dense_families: Vec<(u32, u32)>,
    /// Per group, the classes compiled for the 64-bit fast path (empty above 64 bits).
    narrow: Vec<NarrowGroup>,
    /// Per group, the classes-only form of the fast path, where every class kind of the
    /// group has one (binary datapaths with at most 128 classes).
    masks: Vec<Option<MaskProgram>>,
    /// A select unit's parts (see `classes::select`).
    select: Option<Box<select::SelectCatalogue>>,
}

impl Catalogue {
    /// Builds the candidate catalogue for `spec`: every class and bin that could apply.
    /// Reachability starts all-true; the directed generator narrows it with
    /// [`Catalogue::set_reachable`].
    pub(crate) fn candidates(spec: &Spec) -> Catalogue {
        if spec.select.is_some() {
            return Catalogue::select_candidates(spec);
        }
        let model = Model::new(spec);
        let mut cat = Catalogue {
            model: model.clone(),
            has_carry_in: spec.has(Signal::CarryIn),
            classes: Vec::new(),
            bin_class: Vec::new(),
            reachable: Vec::new(),
            groups: Vec::new(),
            dense_families: Vec::new(),
            narrow: Vec::new(),
            masks: Vec::new(),
            select: None,
        };
        let modes: Vec<Option<bool>> = if spec.operation == Operation::AddSub {
            vec![Some(false), Some(true)]
        } else {
            vec![None]
        };
        for mode in modes {
            let start = cat.classes.len();
            for (id, description, kind, labels) in class_templates(&model, spec, mode) {
                let prefix = match mode {
                    Some(false) => "add.",
                    Some(true) => "sub.",
                    None => "",
                };
                let description = match mode {
                    Some(false) => format!("add mode: {description}"),
                    Some(true) => format!("subtract mode: {description}"),
                    None => description,
                };
                let class_index = cat.classes.len() as u16;
                let first_bin = cat.bin_class.len() as u32;
                cat.bin_class
                    .extend(std::iter::repeat_n(class_index, labels.len()));
                cat.reachable
                    .extend(std::iter::repeat_n(true, labels.len()));
                let dense_slot = cat.dense_families.len() as u16;
                match kind {
                    Kind::ResultBits => {
                        cat.dense_families.push((first_bin, 2));
                        cat.dense_families.push((first_bin + 1, 2));
                    }
                    Kind::CellRows => {
                        for row in 0..8 {
                            cat.dense_families.push((first_bin + row, 8));
                        }
                    }
                    _ => {}
                }
                cat.classes.push(Class {
                    id: format!("{prefix}{id}"),
                    description,
                    kind,
                    mode,
                    first_bin,
                    dense_slot,
                    labels,
                });
            }
            cat.groups.push((mode, start..cat.classes.len()));
        }
        if model.uses_fast_path() {
            cat.narrow = cat
                .groups
                .iter()
                .map(|(_, range)| {
                    NarrowGroup::new(range.clone().map(|ci| cat.compile_narrow(ci)).collect())
                })
                .collect();
            let binary = cat.model.operation().is_binary();
            cat.masks = cat
                .narrow
                .iter()
                .map(|g| {
                    let steps = g.lists.last().map_or(&[][..], |l| l.as_slice());
                    MaskProgram::new(steps, cat.classes.len(), binary)
                })
                .collect();
        }
        cat
    }

    /// The dense bin families as (base bin, stride), indexed by [`DenseHit::slot`].
    pub(crate) fn dense_families(&self) -> &[(u32, u32)] {
        &self.dense_families
    }

    /// Class `ci` compiled for the fast path: its constants as `u128` patterns.
    fn compile_narrow(&self, ci: usize) -> NarrowStep {
        let class = &self.classes[ci];
        let w = self.model.width();
        let enc = self.model.encoding();
        let code = |word: &Word| word.low_u128();
        let on_b = |x: &Operand| *x == Operand::B;
        let op = match &class.kind {
            Kind::Special(x, _, c) => NarrowOp::Special {
                on_b: on_b(x),
                code: code(c),
            },
            Kind::Alternating(x, pattern) => NarrowOp::Alternating {
                on_b: on_b(x),
                pattern: code(pattern),
                inverse: !code(pattern) & u128::low_mask(w),
            },
            Kind::WalkingOne(x) => NarrowOp::WalkingOne { on_b: on_b(x) },
            Kind::WalkingZero(x) => NarrowOp::WalkingZero { on_b: on_b(x) },
            Kind::ResultPattern(_, c) => NarrowOp::ResultPattern { code: code(c) },
            Kind::ResultZeroFromNonzero => NarrowOp::ResultZeroFromNonzero {
                binary: self.model.operation().is_binary(),
            },
            Kind::ResultBits => NarrowOp::ResultBits,
            Kind::OverflowBoundary => {
                let (max, min) = (max_value::<u128>(w, enc), min_value::<u128>(w, enc));
                NarrowOp::OverflowBoundary {
                    targets: [max, max.wrapping_add(1), min, min.wrapping_sub(1)],
                }
            }
            Kind::UnsignedEdge => NarrowOp::UnsignedEdge {
                flip: if enc == Encoding::Offset {
                    1 << (w - 1)
                } else {
                    0
                },
            },
            Kind::ChainLength => NarrowOp::ChainLength,
            Kind::ChainFromCarryIn => NarrowOp::ChainFromCarryIn,
            Kind::CellRows => NarrowOp::CellRows,
            _ => NarrowOp::Generic,
        };
        NarrowStep {
            op,
            class: ci as u16,
            base: class.first_bin,
            slot: class.dense_slot,
        }
    }

    /// The model the catalogue classifies with.
    pub fn model(&self) -> &Model {
        &self.model
    }

    /// All classes (including those whose bins are all unreachable at this width).
    pub fn classes(&self) -> &[Class] {
        &self.classes
    }

    /// Total number of bins, reachable or not.
    pub fn bin_count(&self) -> usize {
        self.bin_class.len()
    }

    /// The class index of global bin `bin`.
    pub fn class_of_bin(&self, bin: usize) -> usize {
        self.bin_class[bin] as usize
    }

    /// True when global bin `bin` counts towards coverage.
    pub fn is_reachable(&self, bin: usize) -> bool {
        self.reachable[bin]
    }

    pub(crate) fn set_reachable(&mut self, bin: usize, reachable: bool) {
        self.reachable[bin] = reachable;
    }

    /// The reachable bins of class `class`, as global indices.
    pub fn reachable_bins(&self, class: usize) -> impl Iterator<Item = usize> + '_ {
        let c = &self.classes[class];
        (c.first_bin()..c.first_bin() + c.bin_count()).filter(|&b| self.reachable[b])
    }

    /// True when the class has at least one reachable bin.
    pub fn is_class_reachable(&self, class: usize) -> bool {
        self.reachable_bins(class).next().is_some()
    }

    /// The full id of a bin: `class_id[label]`, or the class id alone for one-bin classes.
    pub fn bin_id(&self, bin: usize) -> String {
        let c = &self.classes[self.class_of_bin(bin)];
        if c.labels.len() == 1 {
            c.id.clone()
        } else {
            format!("{}[{}]", c.id, c.labels[bin - c.first_bin()])
        }
    }

    /// Evaluates the model on `inputs` and records in `hits` every bin the vector hits.
    pub fn evaluate(&self, inputs: &Inputs, hits: &mut Hits) -> Outputs {
        self.evaluate_with(inputs, hits, Detail::Bins)
    }

    pub(crate) fn evaluate_with(
        &self,
        inputs: &Inputs,
        hits: &mut Hits,
        detail: Detail,
    ) -> Outputs {
        if let Some(outputs) = self.select_evaluate(inputs, hits, detail) {
            return outputs;
        }
        if self.model.uses_fast_path() {
            let t = self.model.trace::<u128>(inputs);
            self.classify_narrow(inputs, &t, hits, detail);
            self.model.outputs_of(&t)
        } else if self.model.needs_huge() {
            let t = self.model.trace::<crate::arith::bits::Huge>(inputs);
            self.classify(inputs, &t, hits, detail);
            self.model.outputs_of(&t)
        } else {
            let t = self.model.trace::<Wide>(inputs);
            self.classify(inputs, &t, hits, detail);
            self.model.outputs_of(&t)
        }
    }

    /// Evaluates the model on `inputs` and returns the outputs with the set of classes hit
    /// as a bit mask (bit c for class c), for catalogues of at most 128 classes; `hits` is
    /// scratch space. None for larger catalogues (use [`Catalogue::evaluate_with`]).
    pub(crate) fn evaluate_class_mask(
        &self,
        inputs: &Inputs,
        hits: &mut Hits,
    ) -> (Outputs, Option<u128>) {
        if self.model.uses_fast_path() && self.select.is_none() {
            let group = self
                .groups
                .iter()
                .position(|(m, _)| m.is_none() || *m == Some(inputs.mode));
            if let Some(program) = group.and_then(|g| self.masks[g].as_ref()) {
                let t = self.model.trace::<u128>(inputs);
                let mask = program.classes(self, inputs, &t, &self.narrow[group.unwrap_or(0)]);
                return (self.model.outputs_of(&t), Some(mask));
            }
        }
        let outputs = self.evaluate_with(inputs, hits, Detail::ClassesOnly);
        let mask = (self.classes.len() <= 128)
            .then(|| hits.classes.iter().fold(0u128, |m, &c| m | 1 << c));
        (outputs, mask)
    }

    /// Evaluates the model on `inputs` and records in `hits` every bin and class the vector
    /// hits, for coverage counting: the same bins and classes as [`Catalogue::evaluate`], the
    /// bins possibly in another order.
    pub(crate) fn evaluate_for_coverage(&self, inputs: &Inputs, hits: &mut Hits) -> Outputs {
        if self.model.uses_fast_path() && self.select.is_none() {
            let group = self
                .groups
                .iter()
                .position(|(m, _)| m.is_none() || *m == Some(inputs.mode));
            if let Some(g) = group {
                if let Some(program) = self.masks[g].as_ref() {
                    let t = self.model.trace::<u128>(inputs);
                    program.record(self, inputs, &t, &self.narrow[g], hits);
                    return self.model.outputs_of(&t);
                }
            }
        }
        self.evaluate_with(inputs, hits, Detail::Bins)
    }

    /// The class ids of a class bit mask, space-separated, as in the `classes` column.
    pub(crate) fn class_list_of_mask(&self, mask: u128, out: &mut String) {
        let mut m = mask;
        while m != 0 {
            let c = m.trailing_zeros() as usize;
            if m != mask {
                out.push(' ');
            }
            out.push_str(&self.classes[c].id);
            m &= m - 1;
        }
    }

    /// The class ids hit, space-separated, as written in the `classes` column.
    pub fn class_list(&self, hits: &Hits, out: &mut String) {
        for (i, &c) in hits.classes.iter().enumerate() {
            if i > 0 {
                out.push(' ');
            }
            out.push_str(&self.classes[c as usize].id);
        }
    }

    fn classify<B: Bits>(&self, inputs: &Inputs, t: &Trace<B>, hits: &mut Hits, detail: Detail) {
        hits.clear(self.model.width().div_ceil(64) as usize);
        let w = self.model.width();
        let enc = self.model.encoding();
        let group = self
            .groups
            .iter()
            .find(|(m, _)| m.is_none() || *m == Some(inputs.mode))
            .map(|(_, r)| r.clone())
            .unwrap_or(0..0);
        let a = B::from_word(&inputs.a).mask(w);
        let b = B::from_word(&inputs.b).mask(w);
        let mask = B::low_mask(w);
        let max = max_value::<B>(w, enc);
        let min = min_value::<B>(w, enc);
        let operands = Operands {
            a,
            b,
            mask,
            max,
            min,
        };
        // Chain lengths are needed by two classes; compute them once, lazily.
        let mut chains: Option<(u32, u32)> = None;
        for ci in group {
            if self.classify_class(&self.classes[ci], &operands, t, hits, detail, &mut chains) {
                hits.classes.push(ci as u16);
            }
        }
    }

    /// Records the bins class `class` hits; true when it hits any.
    fn classify_class<B: Bits>(
        &self,
        class: &Class,
        operands: &Operands<B>,
        t: &Trace<B>,
        hits: &mut Hits,
        detail: Detail,
        chains: &mut Option<(u32, u32)>,
    ) -> bool {
        let w = self.model.width();
        let enc = self.model.encoding();
        let op = self.model.operation();
        let Operands {
            a,
            b,
            mask,
            max,
            min,
        } = *operands;
        let base = class.first_bin;
        let before = (hits.bins.len(), hits.dense.len());
        let mut hit_any = false;
        let bin = |hits: &mut Hits, k: u32| hits.bins.push(base + k);
        {
            match &class.kind {
                Kind::Special(operand, _, code) => {
                    let x = if *operand == Operand::A { a } else { b };
                    if x == B::from_word(code) {
                        bin(hits, 0);
                    }
                }
                Kind::Alternating(operand, pattern) => {
                    let x = if *operand == Operand::A { a } else { b };
                    let pattern = B::from_word(pattern);
                    if x == pattern {
                        bin(hits, 0);
                    } else if x == pattern.not().mask(w) {
                        bin(hits, 1);
                    }
                }
                Kind::WalkingOne(operand) => {
                    let x = if *operand == Operand::A { a } else { b };
                    if x.count_ones() == 1 {
                        bin(hits, x.not().trailing_ones());
                    }
                }
                Kind::WalkingZero(operand) => {
                    let x = if *operand == Operand::A { a } else { b };
                    let inv = x.not().mask(w);
                    if inv.count_ones() == 1 {
                        bin(hits, inv.not().trailing_ones());
                    }
                }
                Kind::ResultZeroFromNonzero => {
                    let nonzero = !t.va.is_zero() || (op.is_binary() && !t.vb.is_zero());
                    if nonzero && decode(t.result, w, enc).is_zero() {
                        bin(hits, 0);
                    }
                }
                Kind::ResultPattern(_, code) => {
                    if t.result == B::from_word(code) {
                        bin(hits, 0);
                    }
                }
                Kind::ResultBits => {
                    if detail == Detail::Bins {
                        let slot = class.dense_slot;
                        hits.push_dense(base, 2, slot, t.result.not().mask(w));
                        hits.push_dense(base + 1, 2, slot + 1, t.result);
                    } else {
                        hit_any = true;
                    }
                }
                Kind::ResultWalkingOne => {
                    if t.result.count_ones() == 1 {
                        bin(hits, t.result.not().trailing_ones());
                    }
                }
                Kind::OverflowBoundary => {
                    let targets = [max, max.add(B::one()), min, min.sub(B::one())];
                    if let Some(k) = targets.iter().position(|v| *v == t.truth) {
                        let k = k as u32;
                        if self.has_carry_in {
                            bin(hits, k * 2 + t.cin as u32);
                        } else {
                            bin(hits, k);
                        }
                    }
                }
                Kind::UnsignedEdge => {
                    // The datapath's operands as unsigned patterns (offset: top bits inverted).
                    let flip = if enc == Encoding::Offset {
                        B::single_bit(w - 1)
                    } else {
                        B::zero()
                    };
                    let (ux, uy) = (a.xor(flip), b.xor(flip));
                    let c = B::from_bool(t.cin);
                    let k = if t.subtracting {
                        let d = ux.sub(uy).sub(c);
                        if d.is_zero() {
                            Some(0)
                        } else if d == B::zero().not() {
                            Some(1)
                        } else {
                            None
                        }
                    } else {
                        let s = ux.add(uy).add(c);
                        if s == mask {
                            Some(0)
                        } else if s == mask.add(B::one()) {
                            Some(1)
                        } else {
                            None
                        }
                    };
                    if let Some(k) = k {
                        if self.has_carry_in {
                            bin(hits, k * 2 + t.cin as u32);
                        } else {
                            bin(hits, k);
                        }
                    }
                }
                Kind::ChainLength | Kind::ChainFromCarryIn => {
                    let (longest, from_cin) =
                        *chains.get_or_insert_with(|| chain_lengths(&t.path, w));
                    if class.kind == Kind::ChainLength {
                        bin(hits, longest);
                    } else if let Path::Ripple { c0: true, .. } = t.path {
                        bin(hits, from_cin);
                    }
                }
                Kind::CellRows => {
                    if let Path::Ripple { x, y, carries, .. } = t.path {
                        if detail == Detail::Bins {
                            let sel = |v: B, one: bool| if one { v } else { v.not() };
                            for row in 0..8u32 {
                                let m = sel(x, row & 4 != 0)
                                    .and(sel(y, row & 2 != 0))
                                    .and(sel(carries, row & 1 != 0))
                                    .and(mask);
                                if !m.is_zero() {
                                    let slot = class.dense_slot + row as u16;
                                    hits.push_dense(base + row, 8, slot, m);
                                }
                            }
                        } else {
                            hit_any = true;
                        }
                    }
                }
                Kind::EndAroundCarry => {
                    if let Path::EndAround { first, carry, .. } = t.path {
                        if !carry {
                            bin(hits, 0);
                        } else {
                            bin(hits, 1);
                            let low = B::low_mask(w - 1);
                            if w >= 2 && first.and(low) == low {
                                bin(hits, 2);
                            }
                        }
                    }
                }
                Kind::SignMagEffectiveAdd => {
                    if let Path::SignMagnitude {
                        effective_sub: false,
                        magnitude_carry,
                        ..
                    } = t.path
                    {
                        bin(hits, magnitude_carry as u32);
                    }
                }
                Kind::SignMagEffectiveSub => {
                    if let Path::SignMagnitude {
                        effective_sub: true,
                        ma,
                        mb,
                        ..
                    } = t.path
                    {
                        let k = if ma == mb {
                            2
                        } else if mb.slt(&ma) {
                            0
                        } else {
                            1
                        };
                        bin(hits, k);
                    }
                }
                Kind::SignMagOpposites => {
                    if let Path::SignMagnitude {
                        effective_sub: true,
                        ma,
                        mb,
                        ..
                    } = t.path
                    {
                        if ma == mb && !ma.is_zero() {
                            bin(hits, a.bit(w - 1) as u32);
                        }
                    }
                }
                Kind::OffsetCarrySource => {
                    if let Path::Ripple { cell, x, y, c0, .. } = t.path {
                        match offset_carries(cell, x, y, c0, w) {
                            (true, false) => bin(hits, 0),
                            (false, true) => bin(hits, 1),
                            _ => {}
                        }
                    }
                }
                Kind::OffsetMidpoint => {
                    let mid = B::single_bit(w - 1);
                    if a == mid {
                        bin(hits, 0);
                    }
                    if op.is_binary() && b == mid {
                        bin(hits, 1);
                    }
                    if t.result == mid {
                        bin(hits, 2);
                    } else if t.result == mid.sub(B::one()) {
                        bin(hits, 3);
                    } else if t.result == mid.add(B::one()).mask(w) {
                        bin(hits, 4);
                    }
                }
                Kind::CompareOutcome => {
                    let f = t.outputs_flags;
                    bin(
                        hits,
                        if f.less {
                            0
                        } else if f.equal {
                            1
                        } else {
                            2
                        },
                    );
                }
                Kind::CompareEqual => {
                    if t.va == t.vb {
                        if a == b {
                            bin(hits, 0);
                        } else if a.is_zero() {
                            bin(hits, 1);
                        } else {
                            bin(hits, 2);
                        }
                    }
                }
                Kind::CompareOffByOne => {
                    if t.va.add(B::one()) == t.vb {
                        bin(hits, 0);
                    } else if t.vb.add(B::one()) == t.va {
                        bin(hits, 1);
                    }
                }
                Kind::CompareSignsDiffer => {
                    let (sa, sb) = (a.bit(w - 1), b.bit(w - 1));
                    if sa && !sb {
                        bin(hits, 0);
                    } else if !sa && sb {
                        bin(hits, 1);
                    }
                }
                Kind::CompareExtremes => {
                    let k = match (t.va == min, t.va == max, t.vb == min, t.vb == max) {
                        (true, _, _, true) => Some(0),
                        (_, true, true, _) => Some(1),
                        (true, _, true, _) => Some(2),
                        (_, true, _, true) => Some(3),
                        _ => None,
                    };
                    if let Some(k) = k {
                        bin(hits, k);
                    }
                }
                Kind::CompareFirstDifference
                | Kind::CompareSingleBit
                | Kind::CompareLowerOppose
                | Kind::CompareSignOnly => {
                    if let Some(k) = compare_bit_bin(&class.kind, a, b, w) {
                        bin(hits, k);
                    }
                }
                Kind::CompareEqualSpecial(codes) => {
                    if a == b {
                        if let Some(k) = codes.iter().position(|c| B::from_word(c) == a) {
                            bin(hits, k as u32);
                        }
                    }
                }
                Kind::Ext(kind) => match ext::ext_hit(&self.model, kind, t) {
                    Some(hit) if detail == Detail::ClassesOnly => hit_any = hit,
                    _ => ext::ext_bins(&self.model, kind, a, b, t, |k| bin(hits, k)),
                },
                // Classified by the select catalogue itself.
                Kind::SelectCode | Kind::SelectSwitch => {}
            }
        }
        hit_any || hits.bins.len() > before.0 || hits.dense.len() > before.1
    }
    /// The fast path of [`Catalogue::classify`] for units up to 64 bits wide: the same
    /// predicates on `u128` with the constants compiled in, and the hot kinds written out
    /// without the generic plumbing. Kinds outside the binary datapath fall back to the
    /// generic predicate. With [`Detail::ClassesOnly`] only the classes are exact (some bins
    /// are left out). A test compares both paths on every spec shape.
    fn classify_narrow(&self, inputs: &Inputs, t: &Trace<u128>, hits: &mut Hits, detail: Detail) {
        hits.clear(1);
        let w = self.model.width();
        let enc = self.model.encoding();
        let Some(group) = self
            .groups
            .iter()
            .position(|(m, _)| m.is_none() || *m == Some(inputs.mode))
        else {
            return;
        };
        let mask = u128::low_mask(w);
        let a = inputs.a.low_u128() & mask;
        let b = inputs.b.low_u128() & mask;
        let operands = Operands {
            a,
            b,
            mask,
            max: max_value::<u128>(w, enc),
            min: min_value::<u128>(w, enc),
        };
        let bins = detail == Detail::Bins;
        let mut chains: Option<(u32, u32)> = None;
        let with_cin = |k: u32| {
            if self.has_carry_in {
                k * 2 + t.cin as u32
            } else {
                k
            }
        };
        let program = &self.narrow[group];
        let open = program.open(a, b, t.result);
        for step in &program.lists[open] {
            let base = step.base;
            let operand = |on_b: bool| if on_b { b } else { a };
            let hit = match step.op {
                NarrowOp::Special { on_b, code } => {
                    let hit = operand(on_b) == code;
                    if hit {
                        hits.bins.push(base);
                    }
                    hit
                }
                NarrowOp::Alternating {
                    on_b,
                    pattern,
                    inverse,
                } => {
                    let x = operand(on_b);
                    if x == pattern {
                        hits.bins.push(base);
                        true
                    } else if x == inverse {
                        hits.bins.push(base + 1);
                        true
                    } else {
                        false
                    }
                }
                NarrowOp::WalkingOne { on_b } => {
                    let x = operand(on_b);
                    let hit = x.count_ones() == 1;
                    if hit {
                        hits.bins.push(base + x.trailing_zeros());
                    }
                    hit
                }
                NarrowOp::WalkingZero { on_b } => {
                    let inv = !operand(on_b) & mask;
                    let hit = inv.count_ones() == 1;
                    if hit {
                        hits.bins.push(base + inv.trailing_zeros());
                    }
                    hit
                }
                NarrowOp::ResultZeroFromNonzero { binary } => {
                    let nonzero = t.va != 0 || (binary && t.vb != 0);
                    let hit = nonzero && decode(t.result, w, enc) == 0;
                    if hit {
                        hits.bins.push(base);
                    }
                    hit
                }
                NarrowOp::ResultPattern { code } => {
                    let hit = t.result == code;
                    if hit {
                        hits.bins.push(base);
                    }
                    hit
                }
                NarrowOp::ResultBits => {
                    if bins {
                        hits.masks.push((!t.result & mask) as u64);
                        hits.masks.push(t.result as u64);
                        hits.dense.push(DenseHit {
                            base,
                            stride: 2,
                            slot: step.slot,
                        });
                        hits.dense.push(DenseHit {
                            base: base + 1,
                            stride: 2,
                            slot: step.slot + 1,
                        });
                    }
                    true
                }
                NarrowOp::OverflowBoundary { targets } => {
                    match targets.iter().position(|v| *v == t.truth) {
                        Some(k) => {
                            hits.bins.push(base + with_cin(k as u32));
                            true
                        }
                        None => false,
                    }
                }
                NarrowOp::UnsignedEdge { flip } => {
                    let (ux, uy) = (a ^ flip, b ^ flip);
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
                    match k {
                        Some(k) => {
                            hits.bins.push(base + with_cin(k));
                            true
                        }
                        None => false,
                    }
                }
                // Whether these hit does not depend on the chains, so a classes-only
                // evaluation skips measuring them.
                NarrowOp::ChainLength => {
                    if bins {
                        let (longest, _) = *chains.get_or_insert_with(|| narrow_chains(&t.path, w));
                        hits.bins.push(base + longest);
                    }
                    true
                }
                NarrowOp::ChainFromCarryIn => {
                    let hit = matches!(t.path, Path::Ripple { c0: true, .. });
                    if hit && bins {
                        let (_, from_cin) =
                            *chains.get_or_insert_with(|| narrow_chains(&t.path, w));
                        hits.bins.push(base + from_cin);
                    }
                    hit
                }
                NarrowOp::CellRows => match t.path {
                    Path::Ripple { x, y, carries, .. } => {
                        if bins {
                            // The eight (x, y, carry-in) rows partition the N cells.
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
                                            slot: step.slot + row as u16,
                                        });
                                    }
                                }
                            }
                        }
                        true
                    }
                    _ => false,
                },
                NarrowOp::Generic => self.classify_class(
                    &self.classes[step.class as usize],
                    &operands,
                    t,
                    hits,
                    detail,
                    &mut chains,
                ),
            };
            if hit {
                hits.classes.push(step.class);
            }
        }
    }
}
/// The highest set bit of `x` (which must not be zero), looking at the low `w` bits.
fn top_bit<B: Bits>(x: B, w: u32) -> u32 {
    let mut l = w.div_ceil(64) as usize;
    while l > 0 {
        l -= 1;
        let limb = x.limb(l);
        if limb != 0 {
            return l as u32 * 64 + 63 - limb.leading_zeros();
        }
    }
    0
}

/// The bin a first-difference-style compare class hits: 2i for a1b0, 2i + 1 for a0b1 at the
/// first differing bit i (the sign-only class has just those two bins).
fn compare_bit_bin<B: Bits>(kind: &Kind, a: B, b: B, w: u32) -> Option<u32> {
    let d = a.xor(b);
    if d.is_zero() {
        return None;
    }
    let i = top_bit(d, w);
    let order = if a.bit(i) { 0 } else { 1 };
    let hit = match kind {
        Kind::CompareFirstDifference => true,
        Kind::CompareSingleBit => d.count_ones() == 1,
        Kind::CompareLowerOppose => {
            let low = B::low_mask(i);
            let (la, lb) = (a.and(low), b.and(low));
            // Masked patterns are non-negative, so the signed order is the unsigned one.
            if a.bit(i) {
                la.slt(&lb)
            } else {
                lb.slt(&la)
            }
        }
        Kind::CompareSignOnly => {
            return (d == B::single_bit(w - 1)).then_some(order);
        }
        _ => false,
    };
    hit.then_some(2 * i + order)
}

/// The pattern ...0101 (LSB set).
pub(crate) fn alternating<B: Bits>(width: u32) -> B {
    let mut p = B::zero();
    let mut i = 0;
    while i < width {
        p = p.or(B::single_bit(i));
        i += 2;
    }
    p
}

/// (longest chain, chain started by the carry-in) on a ripple or end-around datapath.
/// A chain starts at a generate bit (or at the carry-in) and runs through the propagate bits
/// above it; its length is the number of bit positions whose carry-out it drives.
fn chain_lengths<B: Bits>(path: &Path<B>, w: u32) -> (u32, u32) {
    let (cell, x, y, c0) = match *path {
        Path::Ripple { cell, x, y, c0, .. } => (cell, x, y, c0),
        Path::EndAround { x, y, .. } => (Cell::Adder, x, y, false),
        _ => return (0, 0),
    };
    let mask = B::low_mask(w);
    let (g, p) = match cell {
        Cell::Adder => (x.and(y), x.xor(y)),
        Cell::Subtractor => (x.not().and(y).and(mask), x.xor(y).not().and(mask)),
    };
    let from_cin = if c0 { p.trailing_ones().min(w) } else { 0 };
    let mut longest = from_cin;
    let mut rest = g;
    while !rest.is_zero() {
        let s = rest.not().trailing_ones();
        let len = 1 + p.shr(s + 1).trailing_ones().min(w - s - 1);
        longest = longest.max(len);
        rest = rest.and(rest.sub(B::one()));
    }
    (longest, from_cin)
}

#[cfg(test)]
mod tests;

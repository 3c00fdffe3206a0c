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

use crate::bits::{Bits, Wide};
use crate::encoding::{decode, max_value, min_value, negative_zero};
use crate::model::{Cell, Inputs, Model, Outputs, Path, Trace};
use crate::spec::{Encoding, Operation, Signal, Spec};
use crate::word::Word;

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
    CompareOutcome,
    CompareEqual,
    CompareOffByOne,
    CompareSignsDiffer,
    CompareExtremes,
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

/// Bins of one dense family hit by one vector: bins `base + i * stride` for every set bit i.
#[derive(Debug, Clone, Copy)]
pub(crate) struct DenseHit {
    pub base: u32,
    pub stride: u32,
    pub mask: Word,
}

/// The bins and classes one vector hits. Reused across vectors to avoid allocation.
#[derive(Debug, Clone, Default)]
pub struct Hits {
    pub(crate) bins: Vec<u32>,
    pub(crate) dense: Vec<DenseHit>,
    /// Classes hit, as class indices in catalogue order (no duplicates).
    pub(crate) classes: Vec<u16>,
}

impl Hits {
    /// A new, empty hit set.
    pub fn new() -> Hits {
        Hits::default()
    }

    fn clear(&mut self) {
        self.bins.clear();
        self.dense.clear();
        self.classes.clear();
    }

    /// Calls `f` with every global bin index hit (in no particular order, no duplicates).
    pub fn for_each_bin(&self, mut f: impl FnMut(usize)) {
        for &b in &self.bins {
            f(b as usize);
        }
        for d in &self.dense {
            for i in d.mask.set_bits() {
                f((d.base + i * d.stride) as usize);
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
}

impl Catalogue {
    /// Builds the candidate catalogue for `spec`: every class and bin that could apply.
    /// Reachability starts all-true; the directed generator narrows it with
    /// [`Catalogue::set_reachable`].
    pub(crate) fn candidates(spec: &Spec) -> Catalogue {
        let model = Model::new(spec);
        let mut cat = Catalogue {
            model: model.clone(),
            has_carry_in: spec.has(Signal::CarryIn),
            classes: Vec::new(),
            bin_class: Vec::new(),
            reachable: Vec::new(),
            groups: Vec::new(),
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
                cat.classes.push(Class {
                    id: format!("{prefix}{id}"),
                    description,
                    kind,
                    mode,
                    first_bin,
                    labels,
                });
            }
            cat.groups.push((mode, start..cat.classes.len()));
        }
        cat
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
        if self.model.uses_fast_path() {
            let t = self.model.trace::<u128>(inputs);
            self.classify(inputs, &t, hits, detail);
            self.model.outputs_of(&t)
        } else {
            let t = self.model.trace::<Wide>(inputs);
            self.classify(inputs, &t, hits, detail);
            self.model.outputs_of(&t)
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
        hits.clear();
        let w = self.model.width();
        let enc = self.model.encoding();
        let op = self.model.operation();
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
        // Chain lengths are needed by two classes; compute them once, lazily.
        let mut chains: Option<(u32, u32)> = None;

        for ci in group {
            let class = &self.classes[ci];
            let base = class.first_bin;
            let before = (hits.bins.len(), hits.dense.len());
            let mut hit_any = false;
            let bin = |hits: &mut Hits, k: u32| hits.bins.push(base + k);
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
                        hits.dense.push(DenseHit {
                            base,
                            stride: 2,
                            mask: t.result.not().mask(w).to_word(),
                        });
                        hits.dense.push(DenseHit {
                            base: base + 1,
                            stride: 2,
                            mask: t.result.to_word(),
                        });
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
                                    hits.dense.push(DenseHit {
                                        base: base + row,
                                        stride: 8,
                                        mask: m.to_word(),
                                    });
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
            }
            if hit_any || hits.bins.len() > before.0 || hits.dense.len() > before.1 {
                hits.classes.push(ci as u16);
            }
        }
    }
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

type Template = (String, String, Kind, Vec<String>);

fn one_bin() -> Vec<String> {
    vec!["hit".to_string()]
}

fn with_carry_in(labels: &[&str], has_carry_in: bool, cin_name: &str) -> Vec<String> {
    if has_carry_in {
        labels
            .iter()
            .flat_map(|l| [format!("{l}.{cin_name}0"), format!("{l}.{cin_name}1")])
            .collect()
    } else {
        labels.iter().map(|l| l.to_string()).collect()
    }
}

/// The candidate classes for one spec and addsub mode.
fn class_templates(model: &Model, spec: &Spec, mode: Option<bool>) -> Vec<Template> {
    let w = spec.width;
    let enc = spec.encoding;
    let op = spec.operation;
    let has_cin = spec.has(Signal::CarryIn);
    let subtracting = match op {
        Operation::Sub | Operation::Negate | Operation::Decrement | Operation::Compare => true,
        Operation::AddSub => mode == Some(true),
        _ => false,
    };
    let mut out: Vec<Template> = Vec::new();
    let bits = |f: &dyn Fn(u32) -> String| (0..w).map(f).collect::<Vec<_>>();

    let operands: &[Operand] = if op.is_binary() {
        &[Operand::A, Operand::B]
    } else {
        &[Operand::A]
    };
    for &x in operands {
        let n = x.name();
        let mut seen: Vec<Word> = Vec::new();
        for s in Special::ALL {
            if let Some(code) = s.code(model) {
                if seen.contains(&code) {
                    continue;
                }
                seen.push(code);
                out.push((
                    format!("{n}.{}", s.id()),
                    format!("operand {n} {}", s.describe()),
                    Kind::Special(x, s, code),
                    one_bin(),
                ));
            }
        }
        out.push((
            format!("{n}.alternating"),
            format!("operand {n} is an alternating pattern ..0101 or ..1010"),
            Kind::Alternating(x, alternating::<Wide>(w).to_word()),
            vec!["0101".into(), "1010".into()],
        ));
        out.push((
            format!("{n}.walking_one"),
            format!("operand {n} has exactly one 1 bit, at each position"),
            Kind::WalkingOne(x),
            bits(&|i| format!("bit{i}")),
        ));
        out.push((
            format!("{n}.walking_zero"),
            format!("operand {n} has exactly one 0 bit, at each position"),
            Kind::WalkingZero(x),
            bits(&|i| format!("bit{i}")),
        ));
    }

    if op == Operation::Compare {
        out.push((
            "compare.outcome".into(),
            "each outcome: a < b, a == b, a > b".into(),
            Kind::CompareOutcome,
            vec!["less".into(), "equal".into(), "greater".into()],
        ));
        let mut eq_bins = vec!["same_bits".to_string()];
        if enc.has_negative_zero() {
            eq_bins.push("plus_zero_vs_minus_zero".into());
            eq_bins.push("minus_zero_vs_plus_zero".into());
        }
        out.push((
            "compare.equal".into(),
            "equal values: identical bits, and +0 against -0 where the encoding has both".into(),
            Kind::CompareEqual,
            eq_bins,
        ));
        out.push((
            "compare.off_by_one".into(),
            "values one apart, both ways".into(),
            Kind::CompareOffByOne,
            vec!["a_is_b_minus_1".into(), "a_is_b_plus_1".into()],
        ));
        out.push((
            "compare.signs_differ".into(),
            "top bits differ, where signed and unsigned order disagree".into(),
            Kind::CompareSignsDiffer,
            vec!["a_msb1_b_msb0".into(), "a_msb0_b_msb1".into()],
        ));
        out.push((
            "compare.extremes".into(),
            "min against max and the like".into(),
            Kind::CompareExtremes,
            vec![
                "min_vs_max".into(),
                "max_vs_min".into(),
                "min_vs_min".into(),
                "max_vs_max".into(),
            ],
        ));
        return out;
    }

    // Result classes.
    out.push((
        "result.zero_from_nonzero".into(),
        "the result's value is zero although an operand is not".into(),
        Kind::ResultZeroFromNonzero,
        one_bin(),
    ));
    let mut seen: Vec<Word> = Vec::new();
    for s in [Special::Max, Special::Min, Special::NegativeZero] {
        if let Some(code) = s.code(model) {
            if seen.contains(&code) {
                continue;
            }
            seen.push(code);
            out.push((
                format!("result.{}", s.id()),
                format!("the result {}", s.describe()),
                Kind::ResultPattern(s, code),
                one_bin(),
            ));
        }
    }
    out.push((
        "result.bits".into(),
        "every result bit seen at 0 and at 1".into(),
        Kind::ResultBits,
        (0..w)
            .flat_map(|i| [format!("bit{i}=0"), format!("bit{i}=1")])
            .collect(),
    ));
    if spec.has(Signal::Zero) {
        // A zero flag is a NOR over the result bits however synthesis builds it; each of its
        // inputs stuck at 0 shows only when that result bit is the sole 1. All-zero plus
        // every one-hot pattern is the complete single stuck-at test of a fan-out-free OR
        // tree (common practice, no source); all-zero results are already in the set.
        out.push((
            "result.walking_one".into(),
            "the result has exactly one 1 bit, at each position (each input of the zero \
             flag's detector alone at 1)"
                .into(),
            Kind::ResultWalkingOne,
            bits(&|i| format!("bit{i}")),
        ));
    }
    let cin_name = if subtracting { "bin" } else { "cin" };
    out.push((
        "overflow.boundary".into(),
        "true result exactly at max / one past max / exactly at min / one past min".into(),
        Kind::OverflowBoundary,
        with_carry_in(
            &["at_max", "past_max", "at_min", "past_min"],
            has_cin,
            cin_name,
        ),
    ));

    if enc.is_binary_datapath() && op.is_binary() {
        let (id, desc, labels): (&str, &str, [&str; 2]) = if subtracting {
            (
                "borrow.edge",
                "unsigned borrow-out edge: a - b - bin is exactly 0 (no borrow) or -1 (borrow)",
                ["no_borrow", "borrow"],
            )
        } else {
            (
                "carry.edge",
                "unsigned carry-out edge: a + b + cin is exactly 2^N - 1 (no carry) or 2^N (carry)",
                ["no_carry", "carry"],
            )
        };
        out.push((
            id.into(),
            desc.into(),
            Kind::UnsignedEdge,
            with_carry_in(&labels, has_cin, cin_name),
        ));
    }

    let ripple = model.ripple_view(mode.unwrap_or(false));
    if let Some(view) = ripple {
        let word = if view.cell == Cell::Subtractor {
            "borrow"
        } else {
            "carry"
        };
        out.push((
            "chain.length".into(),
            format!(
                "longest {word} chain, k = 0..N bit positions (a chain starts at a generate \
                 bit or the {word}-in and runs through propagate bits)"
            ),
            Kind::ChainLength,
            (0..=w).map(|k| format!("k={k}")).collect(),
        ));
        let constant_carry_in = matches!(op, Operation::Increment | Operation::Decrement);
        if enc.is_binary_datapath() && (has_cin || constant_carry_in || mode == Some(true)) {
            out.push((
                "chain.carry_in".into(),
                format!("{word} chain started by the {word}-in, k = 0..N bit positions"),
                Kind::ChainFromCarryIn,
                (0..=w).map(|k| format!("k={k}")).collect(),
            ));
        }
        if enc.is_binary_datapath() {
            let cell = if view.cell == Cell::Subtractor {
                "full-subtractor"
            } else {
                "full-adder"
            };
            out.push((
                "cell.rows".into(),
                format!(
                    "every bit's {cell} cell sees each (a, b, {word}-in) row; bins bitI.aXbYcZ \
                     name the cell's own inputs"
                ),
                Kind::CellRows,
                (0..w)
                    .flat_map(|i| {
                        (0..8).map(move |r| {
                            format!("bit{i}.a{}b{}c{}", (r >> 2) & 1, (r >> 1) & 1, r & 1)
                        })
                    })
                    .collect(),
            ));
        }
        if enc == Encoding::Ones {
            out.push((
                "ones.end_around".into(),
                "one's-complement end-around carry: none, taken, and taken rippling through \
                 all low N-1 bits"
                    .into(),
                Kind::EndAroundCarry,
                vec![
                    "no_carry".into(),
                    "carry".into(),
                    "carry_full_ripple".into(),
                ],
            ));
        }
    }
    if enc == Encoding::SignMagnitude && op != Operation::Negate {
        out.push((
            "signmag.effective_add".into(),
            "sign-magnitude effective addition (signs agree): magnitude without and with carry-out"
                .into(),
            Kind::SignMagEffectiveAdd,
            vec!["no_carry".into(), "magnitude_carry".into()],
        ));
        out.push((
            "signmag.effective_sub".into(),
            "sign-magnitude effective subtraction (signs differ): |a| larger, |b| larger, equal"
                .into(),
            Kind::SignMagEffectiveSub,
            vec![
                "a_larger".into(),
                "b_larger".into(),
                "equal_magnitudes".into(),
            ],
        ));
        out.push((
            "signmag.x_plus_minus_x".into(),
            "sign-magnitude x + (-x) with x non-zero: x positive, x negative".into(),
            Kind::SignMagOpposites,
            vec!["x_positive".into(), "x_negative".into()],
        ));
    }
    if enc == Encoding::Offset {
        out.push((
            "offset.midpoint".into(),
            "offset-binary midpoint 10..0 (value 0) on a, b and the result, and its neighbours"
                .into(),
            Kind::OffsetMidpoint,
            vec![
                "a_mid".into(),
                "b_mid".into(),
                "result_mid".into(),
                "result_mid_minus_1".into(),
                "result_mid_plus_1".into(),
            ],
        ));
    }
    out
}

//! Vector generation: the directed corner set, built by construction, and the seeded random
//! part, addressable by index.
//!
//! Directed vectors are solved for, never searched at random: each bin kind has a
//! constructor (an operand equation, a role template for the carry chain, a carry solver for
//! cell rows, or a short fixed list of special operand pairs), and a candidate is kept only
//! when the catalogue's own predicate confirms it hits the bin. Bins no constructor can reach
//! are marked unreachable. The set starts from the seed set (eight cell-exercising vectors
//! and four that give adjacent cells every pair of carry roles), adds a vector only for bins
//! not yet hit, then drops vectors that became redundant.
//!
//! Random vector j is a pure function of (spec, seed, j): ChaCha20 keyed from the seed, read
//! from word position j * K where K is the fixed number of 32-bit words one vector consumes.
//! This module does no I/O.

use rand_chacha::ChaCha20Rng;
use rand_core::{Rng, SeedableRng};
use sha2::{Digest, Sha256};

use crate::arith::bits::{Bits, Wide};
use crate::arith::encoding::{decode, max_value, min_value};
use crate::arith::model::{CarrySource, Cell, Inputs, Outputs, RippleView, Source};
use crate::arith::word::Word;
use crate::corners::classes::{alternating, Catalogue, Detail, Hits, Kind, Operand, Special};
use crate::corners::compare;
use crate::spec::{Encoding, Mix, Operation, Signal, Spec};

/// The directed set and the random plan for one spec.
#[derive(Debug, Clone)]
pub struct Generator {
    catalogue: Catalogue,
    directed: Vec<Inputs>,
    /// Per global bin: how many directed vectors hit it.
    directed_hits: Vec<u32>,
    random: RandomPlan,
    /// Special operand patterns for the corner-biased mix.
    pool: std::sync::Arc<[Word]>,
    /// Vectors given from outside (`arithvec import`, `gen --append`), after the random part.
    appended: std::sync::Arc<[Inputs]>,
    /// A select unit's codes, drawn uniformly for random vectors (empty for other units).
    codes: std::sync::Arc<[u32]>,
    /// Launch/capture pairs (`gen --pairs`) at the end of the directed part: (first index,
    /// pairs). Vector `first + 2k` launches pair k, `first + 2k + 1` captures it.
    pairs: Option<(u64, u64)>,
}

/// Settings of the random part.
#[derive(Debug, Clone, Copy)]
struct RandomPlan {
    count: u64,
    seed: u64,
    mix: Mix,
    corner_share: u32,
    width: u32,
    binary: bool,
    /// Width of the second operand field (the amount of a shifter).
    b_width: u32,
    words_per_operand: u32,
    key: [u8; 32],
}

impl RandomPlan {
    /// 32-bit words one random vector consumes: per operand a mix selector, a special
    /// selector and the uniform bits; then one word of flag bits.
    fn words_per_vector(&self) -> u64 {
        let operands = if self.binary { 2 } else { 1 };
        (operands * (2 + self.words_per_operand) + 1) as u64
    }
}

mod select;

/// Domain separation for the random key, so a seed's stream is arithvec's own.
const KEY_LABEL: &[u8] = b"arithvec random vectors v1";

impl Generator {
    /// Builds the directed set for `spec` and plans `count` random vectors from `seed`
    /// (the spec's `[random]` values unless overridden).
    pub fn new(spec: &Spec, count: Option<u64>, seed: Option<u64>) -> Generator {
        if spec.select.is_some() {
            return Generator::for_select(spec, count, seed);
        }
        let mut catalogue = Catalogue::candidates(spec);
        let (directed, directed_hits) = build_directed(spec, &mut catalogue);
        let seed = seed.unwrap_or(spec.random.seed);
        let mut hasher = Sha256::new();
        hasher.update(KEY_LABEL);
        hasher.update(seed.to_le_bytes());
        let key: [u8; 32] = hasher.finalize().into();
        let pool = operand_pool(&catalogue).into();
        Generator {
            pool,
            appended: Vec::new().into(),
            codes: std::sync::Arc::from([]),
            pairs: None,
            catalogue,
            directed,
            directed_hits,
            random: RandomPlan {
                count: count.unwrap_or(spec.random.count),
                seed,
                mix: spec.random.mix,
                corner_share: spec.random.corner_share,
                width: spec.width,
                binary: spec.operation.is_binary() || spec.operation.is_shift(),
                b_width: if spec.operation.is_shift() {
                    spec.signal_width(Signal::Amount).min(spec.width)
                } else {
                    spec.width
                },
                words_per_operand: spec.width.div_ceil(32),
                key,
            },
        }
    }

    /// The corner-class catalogue, with reachability settled.
    pub fn catalogue(&self) -> &Catalogue {
        &self.catalogue
    }

    /// The directed vectors, in file order.
    pub fn directed(&self) -> &[Inputs] {
        &self.directed
    }

    /// How many directed vectors hit global bin `bin`.
    pub fn directed_hits(&self, bin: usize) -> u32 {
        self.directed_hits[bin]
    }

    /// For each class, how many directed vectors hit at least one of its bins.
    pub fn directed_class_hits(&self) -> Vec<u32> {
        let mut counts = vec![0u32; self.catalogue.classes().len()];
        let mut hits = Hits::new();
        let mut previous = None;
        for v in &self.directed {
            self.catalogue.evaluate(v, &mut hits);
            self.catalogue.record_switch(previous, v.select, &mut hits);
            previous = Some(v.select);
            for &c in hits.classes() {
                counts[c as usize] += 1;
            }
        }
        counts
    }

    /// Evaluates and classifies vector `index` of the set, whose inputs are `inputs`: as
    /// [`Catalogue::evaluate`], plus a select unit's `select.switch` bin, which needs the
    /// vector before it (`index - 1`).
    pub fn evaluate_at(&self, index: u64, inputs: &Inputs, hits: &mut Hits) -> Outputs {
        let outputs = self.catalogue.evaluate(inputs, hits);
        if self.catalogue.is_select() {
            let previous = index
                .checked_sub(1)
                .and_then(|i| self.vector(i))
                .map(|v| v.select);
            self.catalogue.record_switch(previous, inputs.select, hits);
        }
        outputs
    }

    /// Number of random vectors.
    pub fn random_count(&self) -> u64 {
        self.random.count
    }

    /// The seed in use.
    pub fn seed(&self) -> u64 {
        self.random.seed
    }

    /// Directed plus random plus appended.
    pub fn total(&self) -> u64 {
        self.directed.len() as u64 + self.random.count + self.appended.len() as u64
    }

    /// The same set with `vectors` after its random part (indices `directed + random ..`).
    /// They are given, not generated: a set holding them records where they came from.
    pub fn with_appended(mut self, vectors: Vec<Inputs>) -> Generator {
        self.appended = vectors.into();
        self
    }

    /// The same catalogue with no directed and no random vectors, for a set made only of
    /// appended (imported) vectors.
    pub fn without_generated(mut self) -> Generator {
        self.directed.clear();
        self.directed_hits.iter_mut().for_each(|h| *h = 0);
        self.random.count = 0;
        self
    }

    /// The same set with the launch/capture pairs of [`crate::transition_pairs`] after its
    /// directed vectors (so they are directed vectors too, and the random part follows
    /// them). Errors for units the pairs are not built for.
    pub fn with_transition_pairs(mut self, spec: &Spec) -> crate::error::Result<Generator> {
        let pairs = crate::corners::pairs::transition_pairs(spec)?;
        let first = self.directed.len() as u64;
        let mut hits = Hits::new();
        for (launch, capture) in &pairs {
            for v in [launch, capture] {
                self.catalogue.evaluate(v, &mut hits);
                let counts = &mut self.directed_hits;
                hits.for_each_bin(|b| counts[b] += 1);
                self.directed.push(*v);
            }
        }
        self.pairs = Some((first, pairs.len() as u64));
        Ok(self)
    }

    /// The launch/capture pairs of [`Generator::with_transition_pairs`]: (index of the first
    /// launch vector, number of pairs).
    pub fn transition_pair_block(&self) -> Option<(u64, u64)> {
        self.pairs
    }

    /// The appended vectors, in file order.
    pub fn appended(&self) -> &[Inputs] {
        &self.appended
    }

    /// The inputs of vector `index` (directed first, then random, then appended), or None
    /// past the end.
    pub fn vector(&self, index: u64) -> Option<Inputs> {
        let d = self.directed.len() as u64;
        if index < d {
            Some(self.directed[index as usize])
        } else if index - d < self.random.count {
            let mut stream = self.random_stream(index - d);
            Some(stream.next_inputs())
        } else {
            let k = index - d - self.random.count;
            self.appended.get(usize::try_from(k).ok()?).copied()
        }
    }

    /// A sequential reader of random vectors starting at random index `j`.
    pub fn random_stream(&self, j: u64) -> RandomStream {
        let mut rng = ChaCha20Rng::from_seed(self.random.key);
        rng.set_word_pos(j as u128 * self.random.words_per_vector() as u128);
        RandomStream {
            rng,
            plan: self.random,
            pool: self.pool.clone(),
            codes: self.codes.clone(),
        }
    }
}

/// Draws consecutive random vectors; see [`Generator::random_stream`].
pub struct RandomStream {
    rng: ChaCha20Rng,
    plan: RandomPlan,
    pool: std::sync::Arc<[Word]>,
    codes: std::sync::Arc<[u32]>,
}

impl RandomStream {
    fn operand(&mut self) -> Word {
        let selector = self.rng.next_u32();
        let special = self.rng.next_u32();
        let w = self.plan.width;
        if w <= 64 && self.plan.mix == Mix::Uniform {
            // Up to two words, low word first: the limb the loop below would build.
            let mut v = self.rng.next_u32() as u64;
            if self.plan.words_per_operand == 2 {
                v |= (self.rng.next_u32() as u64) << 32;
            }
            return Word::from_u64(v & (u64::MAX >> (64 - w)));
        }
        let mut limbs = [0u64; 8];
        for i in 0..self.plan.words_per_operand as usize {
            let v = self.rng.next_u32() as u64;
            limbs[i / 2] |= v << ((i % 2) * 32);
        }
        if self.plan.mix == Mix::Corner && selector % 100 < self.plan.corner_share {
            // A special value, nudged by -2..=+2 to reach its neighbourhood.
            let base = self.pool[special as usize % self.pool.len()];
            let delta = ((special >> 16) % 5) as i64 - 2;
            let v =
                Wide::from_word(&base).add(Wide::from_word(&Word::from_u64(delta as u64)).sext(64));
            return v.mask(w).to_word();
        }
        Word::from_limbs(limbs).masked(w)
    }

    /// The next random vector.
    pub fn next_inputs(&mut self) -> Inputs {
        let a = self.operand();
        let b = if self.plan.binary {
            self.operand().masked(self.plan.b_width)
        } else {
            Word::ZERO
        };
        let flags = self.rng.next_u32();
        // A select unit's code comes from the same word's upper bits, so the stream of every
        // other unit is unchanged.
        let select = match self.codes.len() {
            0 => 0,
            n => self.codes[(flags >> 8) as usize % n],
        };
        Inputs {
            a,
            b,
            carry_in: flags & 1 == 1,
            mode: flags & 2 == 2,
            select,
        }
    }
}

/// Distinct special patterns used by the corner-biased mix and by the pair constructors.
fn operand_pool(cat: &Catalogue) -> Vec<Word> {
    let model = cat.model();
    let w = model.width();
    let mut pool: Vec<Word> = Vec::new();
    let mut push = |p: Word| {
        let p = p.masked(w);
        if !pool.contains(&p) {
            pool.push(p);
        }
    };
    for s in [
        Special::Zero,
        Special::One,
        Special::MinusOne,
        Special::Max,
        Special::Min,
        Special::NegativeZero,
    ] {
        if let Some(c) = s.code(model) {
            push(c);
        }
    }
    let values: [Wide; 6] = [
        Wide::one().add(Wide::one()),
        Wide::one().add(Wide::one()).neg(),
        max_value::<Wide>(w, model.encoding()).sub(Wide::one()),
        min_value::<Wide>(w, model.encoding()).add(Wide::one()),
        max_value::<Wide>(w, model.encoding()).shr(1),
        max_value::<Wide>(w, model.encoding()).shr(1).neg(),
    ];
    for v in values {
        if let Some(p) = model.encode_value(v) {
            push(p.to_word());
        }
    }
    push(Word::ZERO);
    push(Word::ones(w));
    push(Word::bit_mask(w - 1));
    push(Word::ones(w - 1));
    push(alternating::<Wide>(w).to_word());
    push(alternating::<Wide>(w).not().mask(w).to_word());
    pool
}

/// A datapath role of one bit position.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Role {
    Generate,
    Propagate,
    Kill,
    /// Any role that is available (kill first, then generate, then propagate).
    Any,
}

/// Builds inputs from per-bit choices on the datapath's (x, y, c0).
struct Datapath {
    view: RippleView,
    width: u32,
    mode: Option<bool>,
}

impl Datapath {
    /// The (x, y) bit pairs giving `role` on this cell.
    fn options(&self, role: Role) -> &'static [(bool, bool)] {
        match (self.view.cell, role) {
            (Cell::Adder, Role::Generate) => &[(true, true)],
            (Cell::Adder, Role::Propagate) => &[(true, false), (false, true)],
            (Cell::Adder, Role::Kill) => &[(false, false)],
            (Cell::Subtractor, Role::Generate) => &[(false, true)],
            (Cell::Subtractor, Role::Propagate) => &[(false, false), (true, true)],
            (Cell::Subtractor, Role::Kill) => &[(true, false)],
            (_, Role::Any) => &[],
        }
    }

    fn constant_bit(src: Source, i: u32) -> Option<bool> {
        match src {
            Source::Zero => Some(false),
            Source::One => Some(i == 0),
            Source::NotOne => Some(i != 0),
            _ => None,
        }
    }

    fn allowed(&self, i: u32, x: bool, y: bool) -> bool {
        Self::constant_bit(self.view.x, i).is_none_or(|c| c == x)
            && Self::constant_bit(self.view.y, i).is_none_or(|c| c == y)
    }

    /// The first allowed (x, y) pair for `role` at bit `i`.
    fn pick(&self, i: u32, role: Role) -> Option<(bool, bool)> {
        if role == Role::Any {
            return [Role::Kill, Role::Generate, Role::Propagate]
                .into_iter()
                .find_map(|r| self.pick(i, r));
        }
        self.options(role)
            .iter()
            .copied()
            .find(|&(x, y)| self.allowed(i, x, y))
    }

    fn c0_allowed(&self, c0: bool) -> bool {
        match self.view.c0 {
            CarrySource::Fixed(v) => v == c0,
            CarrySource::Port { .. } => true,
        }
    }

    /// Inputs for roles listed from bit 0 upward (missing top bits: Any) and carry-in c0.
    fn inputs_from_roles(&self, roles: &[Role], c0: bool) -> Option<Inputs> {
        let mut bits = Vec::with_capacity(self.width as usize);
        for i in 0..self.width {
            let role = roles.get(i as usize).copied().unwrap_or(Role::Any);
            bits.push(self.pick(i, role)?);
        }
        self.inputs_from_bits(&bits, c0)
    }

    /// Inputs for explicit (x_i, y_i) bits and carry-in c0.
    fn inputs_from_bits(&self, bits: &[(bool, bool)], c0: bool) -> Option<Inputs> {
        if !self.c0_allowed(c0) {
            return None;
        }
        let w = self.width;
        let mut x = Word::ZERO;
        let mut y = Word::ZERO;
        for (i, &(xb, yb)) in bits.iter().enumerate() {
            if !self.allowed(i as u32, xb, yb) {
                return None;
            }
            x.set_bit(i as u32, xb);
            y.set_bit(i as u32, yb);
        }
        let flip = if self.view.flip {
            Word::bit_mask(w - 1)
        } else {
            Word::ZERO
        };
        let mut inputs = Inputs {
            mode: self.mode.unwrap_or(false),
            ..Inputs::default()
        };
        for (src, v) in [(self.view.x, x), (self.view.y, y)] {
            match src {
                Source::A => inputs.a = v.xor(&flip),
                Source::B => inputs.b = v.xor(&flip),
                Source::NotB => inputs.b = v.not(w).xor(&flip),
                Source::Zero | Source::One | Source::NotOne => {}
            }
        }
        inputs.carry_in = match self.view.c0 {
            CarrySource::Fixed(_) => false,
            CarrySource::Port { invert } => c0 != invert,
        };
        Some(inputs)
    }

    /// Role choices for bits below `i` that make the carry into bit `i` equal `want`,
    /// written into `roles[..i]`; returns the c0 to use. Solves c_i = G_{i-1} | P_{i-1} c_{i-1}
    /// from the top down, preferring a generate or kill right below bit i.
    fn solve_carry(&self, i: u32, want: bool, roles: &mut [Role]) -> Option<bool> {
        if i == 0 {
            return self.c0_allowed(want).then_some(want);
        }
        let direct = if want { Role::Generate } else { Role::Kill };
        if self.pick(i - 1, direct).is_some() {
            roles[(i - 1) as usize] = direct;
            for r in roles.iter_mut().take((i - 1) as usize) {
                *r = Role::Any;
            }
            // Any carry-in will do; prefer one that is allowed.
            return Some(!self.c0_allowed(false));
        }
        if self.pick(i - 1, Role::Propagate).is_some() {
            roles[(i - 1) as usize] = Role::Propagate;
            return self.solve_carry(i - 1, want, roles);
        }
        None
    }
}

/// Candidate inputs for one bin, best first. The caller keeps the first that hits.
fn candidates(cat: &Catalogue, spec: &Spec, class: usize, k: u32, pool: &[Word]) -> Vec<Inputs> {
    if spec.operation.is_division() {
        return crate::corners::construct_divide::candidates(cat, spec, class, k);
    }
    if spec.operation.is_logic() || spec.operation.is_select_value() {
        return crate::corners::construct_simple::candidates(cat, spec, class, k);
    }
    if spec.operation.is_saturating() {
        return crate::corners::construct_sat::candidates(cat, spec, class, k);
    }
    if spec.operation.is_extended() {
        return crate::corners::construct::candidates(cat, spec, class, k);
    }
    let c = &cat.classes()[class];
    let model = cat.model();
    let w = spec.width;
    let mode = c.mode;
    let base = Inputs {
        mode: mode.unwrap_or(false),
        ..Inputs::default()
    };
    let has_cin = spec.has(Signal::CarryIn);
    let subtracting = match spec.operation {
        Operation::Sub | Operation::Negate | Operation::Decrement => true,
        Operation::AddSub => mode == Some(true),
        _ => false,
    };
    let solver = Solver {
        spec,
        cat,
        mode: base.mode,
        subtracting,
        has_cin,
    };
    let pair = |a: Word, b: Word| Inputs { a, b, ..base };
    let mask = Word::ones(w);
    match &c.kind {
        Kind::Special(operand, _, code) => {
            let other = Special::Zero.code(model).unwrap_or(Word::ZERO);
            match operand {
                Operand::A => vec![pair(*code, *code), pair(*code, other)],
                Operand::B => vec![pair(*code, *code), pair(other, *code)],
            }
        }
        Kind::Alternating(operand, _) => {
            let p = alternating::<Wide>(w).to_word();
            let p = if k == 0 { p } else { p.not(w) };
            match operand {
                Operand::A => vec![pair(p, p.not(w))],
                Operand::B => vec![pair(p.not(w), p)],
            }
        }
        Kind::WalkingOne(operand) | Kind::WalkingZero(operand) => {
            let one = Word::bit_mask(k);
            let (x, other) = if matches!(c.kind, Kind::WalkingOne(_)) {
                (one, one.not(w))
            } else {
                (one.not(w), one)
            };
            match operand {
                Operand::A => vec![pair(x, other), pair(x, Word::ZERO)],
                Operand::B => vec![pair(other, x), pair(Word::ZERO, x)],
            }
        }
        Kind::ResultZeroFromNonzero => {
            let zero = Special::Zero.code(model).unwrap_or(Word::ZERO);
            solver.for_result(zero, true)
        }
        Kind::ResultPattern(_, code) => solver.for_result(*code, false),
        Kind::ResultBits => {
            let bit = Word::bit_mask(k / 2);
            let mut out = if k % 2 == 1 {
                solver.for_result(mask, false)
            } else {
                solver.for_result(Word::ZERO, false)
            };
            out.extend(if k % 2 == 1 {
                solver.for_result(bit, false)
            } else {
                solver.for_result(bit.not(w), false)
            });
            out
        }
        Kind::ResultWalkingOne => solver.for_result(Word::bit_mask(k), false),
        Kind::OverflowBoundary => {
            let (target, cin) = if has_cin {
                (k / 2, k % 2 == 1)
            } else {
                (k, false)
            };
            let max = max_value::<Wide>(w, spec.encoding);
            let min = min_value::<Wide>(w, spec.encoding);
            let t = [max, max.add(Wide::one()), min, min.sub(Wide::one())][target as usize];
            solver.for_truth(t, Some(cin))
        }
        Kind::UnsignedEdge => {
            let (edge, cin) = if has_cin {
                (k / 2, k % 2 == 1)
            } else {
                (k, false)
            };
            solver.for_edge(edge, cin)
        }
        Kind::ChainLength | Kind::ChainFromCarryIn => {
            let Some(dp) = solver.datapath() else {
                return Vec::new();
            };
            let n = w as usize;
            let k = k as usize;
            let mut out = Vec::new();
            let mut push = |roles: Vec<Role>, c0: bool| {
                if let Some(v) = dp.inputs_from_roles(&roles, c0) {
                    out.push(v);
                }
            };
            let rep = |r: Role, n: usize| std::iter::repeat_n(r, n);
            if matches!(c.kind, Kind::ChainFromCarryIn) {
                let roles: Vec<Role> = rep(Role::Propagate, k)
                    .chain(rep(Role::Kill, (k < n) as usize))
                    .collect();
                push(roles, true);
            } else if k == 0 {
                for c0 in [false, true] {
                    push(rep(Role::Kill, n).collect(), c0);
                    push(rep(Role::Propagate, n).collect(), c0);
                }
                push(
                    rep(Role::Kill, 1)
                        .chain(rep(Role::Propagate, n - 1))
                        .collect(),
                    true,
                );
            } else {
                for c0 in [false, true] {
                    // Generate at bit 0, propagate up to bit k-1, kill at bit k.
                    push(
                        rep(Role::Generate, 1)
                            .chain(rep(Role::Propagate, k - 1))
                            .chain(rep(Role::Kill, n - k))
                            .collect(),
                        c0,
                    );
                    // Generate at bit N-k, propagating to the top; nothing below it carries.
                    push(
                        rep(Role::Propagate, n - k)
                            .chain(rep(Role::Generate, 1))
                            .chain(rep(Role::Propagate, k - 1))
                            .collect(),
                        false,
                    );
                    push(
                        rep(Role::Kill, n - k)
                            .chain(rep(Role::Generate, 1))
                            .chain(rep(Role::Propagate, k - 1))
                            .collect(),
                        c0,
                    );
                }
                // The chain started by the carry-in.
                push(
                    rep(Role::Propagate, k)
                        .chain(rep(Role::Kill, n - k))
                        .collect(),
                    true,
                );
            }
            out
        }
        Kind::CellRows => {
            let Some(dp) = solver.datapath() else {
                return Vec::new();
            };
            let (bit, row) = (k / 8, k % 8);
            let (xa, yb, cc) = (row & 4 != 0, row & 2 != 0, row & 1 != 0);
            let mut roles = vec![Role::Any; w as usize];
            let Some(c0) = dp.solve_carry(bit, cc, &mut roles) else {
                return Vec::new();
            };
            let mut bits = Vec::with_capacity(w as usize);
            for i in 0..w {
                let pick = if i == bit {
                    Some((xa, yb))
                } else {
                    dp.pick(i, roles[i as usize])
                };
                match pick {
                    Some(p) => bits.push(p),
                    None => return Vec::new(),
                }
            }
            dp.inputs_from_bits(&bits, c0).into_iter().collect()
        }
        Kind::EndAroundCarry => {
            let mut out = Vec::new();
            if let Some(dp) = solver.datapath() {
                // x = 11..1, y = 10..0 in datapath terms: the first pass is 1 01..1 and the
                // end-around carry ripples through every low bit.
                let bits: Vec<(bool, bool)> = (0..w).map(|i| (true, i == w - 1)).collect();
                out.extend(dp.inputs_from_bits(&bits, false));
            }
            out.extend(solver.pairs(pool));
            out
        }
        Kind::CompareFirstDifference | Kind::CompareSingleBit | Kind::CompareLowerOppose => {
            let lower = if matches!(c.kind, Kind::CompareLowerOppose) {
                compare::Lower::Oppose
            } else {
                compare::Lower::Fill
            };
            let (a, b) = compare::first_difference(w, k / 2, k.is_multiple_of(2), false, lower);
            vec![pair(a, b)]
        }
        Kind::CompareSignOnly => {
            let sign = Word::bit_mask(w - 1);
            if k == 0 {
                vec![pair(sign, Word::ZERO)]
            } else {
                vec![pair(Word::ZERO, sign)]
            }
        }
        Kind::CompareEqualSpecial(codes) => vec![pair(codes[k as usize], codes[k as usize])],
        _ => solver.pairs(pool),
    }
}

/// Solves operand equations for one spec and mode.
struct Solver<'a> {
    spec: &'a Spec,
    cat: &'a Catalogue,
    mode: bool,
    subtracting: bool,
    has_cin: bool,
}

impl Solver<'_> {
    fn datapath(&self) -> Option<Datapath> {
        self.cat
            .model()
            .ripple_view(self.mode)
            .map(|view| Datapath {
                view,
                width: self.spec.width,
                mode: (self.spec.operation == Operation::AddSub).then_some(self.mode),
            })
    }

    /// The port value that gives arithmetic carry (or borrow) `c`.
    fn port_for(&self, c: bool) -> bool {
        if self.subtracting
            && self.spec.conventions.carry_in == crate::spec::CarryInConvention::Carry
        {
            !c
        } else {
            c
        }
    }

    fn carry_options(&self, cin: Option<bool>) -> Vec<bool> {
        match (self.has_cin, cin) {
            (false, _) => vec![false],
            (true, Some(c)) => vec![c],
            (true, None) => vec![false, true],
        }
    }

    /// The patterns for value `v`: one, or both zeros where the encoding has -0.
    fn patterns(&self, v: Wide) -> Vec<Word> {
        let m = self.cat.model();
        let Some(p) = m.encode_value(v) else {
            return Vec::new();
        };
        let mut out = vec![p.to_word()];
        if v.is_zero() {
            if let Some(nz) = Special::NegativeZero.code(m) {
                out.push(nz);
            }
        }
        out
    }

    /// Inputs for operand values a and b (every zero pattern where it matters) and arithmetic
    /// carry-in c.
    fn inputs(&self, a: Wide, b: Wide, c: bool) -> Vec<Inputs> {
        let bs = if self.spec.operation.is_binary() {
            self.patterns(b)
        } else {
            vec![Word::ZERO]
        };
        let mut out = Vec::new();
        for pa in self.patterns(a) {
            for &pb in &bs {
                out.push(Inputs {
                    a: pa,
                    b: pb,
                    carry_in: self.has_cin && self.port_for(c),
                    mode: self.mode,
                    select: 0,
                });
            }
        }
        out
    }

    /// Inputs whose true result is `t`, with arithmetic carry-in `cin` (None: either).
    fn for_truth(&self, t: Wide, cin: Option<bool>) -> Vec<Inputs> {
        let w = self.spec.width;
        let enc = self.spec.encoding;
        let max = max_value::<Wide>(w, enc);
        let min = min_value::<Wide>(w, enc);
        let one = Wide::one();
        let mut out = Vec::new();
        for c in self.carry_options(cin) {
            let cb = Wide::from_bool(c);
            match self.spec.operation {
                Operation::Increment => out.extend(self.inputs(t.sub(one), Wide::zero(), c)),
                Operation::Decrement => out.extend(self.inputs(t.add(one), Wide::zero(), c)),
                Operation::Negate => out.extend(self.inputs(t.neg(), Wide::zero(), c)),
                Operation::Compare => {}
                _ => {
                    // a chosen, b solved: t = a + b + c  or  t = a - b - c.
                    let half = sar1(t);
                    let a_choices = [
                        half,
                        half.add(one),
                        t.sub(max),
                        t.sub(min),
                        max,
                        min,
                        one,
                        one.neg(),
                        t,
                        Wide::zero(),
                        t.add(max),
                        t.add(min),
                    ];
                    for a in a_choices {
                        let b = if self.subtracting {
                            a.sub(t).sub(cb)
                        } else {
                            t.sub(a).sub(cb)
                        };
                        out.extend(self.inputs(a, b, c));
                    }
                }
            }
        }
        out
    }

    /// Inputs whose result pattern is `p` (when `nonzero`, with a non-zero operand first).
    fn for_result(&self, p: Word, nonzero: bool) -> Vec<Inputs> {
        let w = self.spec.width;
        let enc = self.spec.encoding;
        let v = decode(Wide::from_word(&p.masked(w)), w, enc);
        let span = Wide::single_bit(w);
        let truths: Vec<Wide> =
            if matches!(enc, Encoding::Unsigned | Encoding::Twos | Encoding::Offset) {
                vec![v, v.add(span), v.sub(span)]
            } else {
                // One's complement and sign-magnitude wrap differently on overflow; the
                // exact value and its overflowing neighbours by the modulus are tried.
                let ones = Wide::low_mask(w);
                let mag = Wide::low_mask(w - 1).add(Wide::one());
                vec![v, v.add(ones), v.sub(ones), v.add(mag), v.sub(mag)]
            };
        let mut out = Vec::new();
        for t in truths {
            let found = self.for_truth(t, None);
            if nonzero {
                let (first, rest): (Vec<_>, Vec<_>) = found
                    .into_iter()
                    .partition(|i| !i.a.is_zero() && !i.b.is_zero());
                out.extend(first);
                out.extend(rest);
            } else {
                out.extend(found);
            }
        }
        out
    }

    /// Inputs on an unsigned carry/borrow edge: edge 0 = no carry (borrow), 1 = carry (borrow).
    fn for_edge(&self, edge: u32, c: bool) -> Vec<Inputs> {
        let w = self.spec.width;
        let mask = Wide::low_mask(w);
        let flip = if self.spec.encoding == Encoding::Offset {
            Wide::single_bit(w - 1)
        } else {
            Wide::zero()
        };
        let cb = Wide::from_bool(c);
        let mut out = Vec::new();
        for ux in [
            Wide::single_bit(w - 1),
            mask,
            Wide::zero(),
            Wide::one(),
            mask.shr(1),
        ] {
            let uy = if self.subtracting {
                // ux - uy - c = 0 (edge 0) or -1 (edge 1).
                ux.sub(cb).add(Wide::from_bool(edge == 1))
            } else {
                // ux + uy + c = 2^N - 1 (edge 0) or 2^N (edge 1).
                mask.add(Wide::from_bool(edge == 1)).sub(ux).sub(cb)
            };
            if uy.is_negative() || mask.slt(&uy) {
                continue;
            }
            out.push(Inputs {
                a: ux.xor(flip).to_word(),
                b: uy.xor(flip).to_word(),
                carry_in: self.has_cin && self.port_for(c),
                mode: self.mode,
                select: 0,
            });
        }
        out
    }

    /// Every pair of pool patterns, with each carry-in.
    fn pairs(&self, pool: &[Word]) -> Vec<Inputs> {
        let mut out = Vec::new();
        let bs: &[Word] = if self.spec.operation.is_binary() {
            pool
        } else {
            &[Word::ZERO]
        };
        for c in self.carry_options(None) {
            for &a in pool {
                for &b in bs {
                    out.push(Inputs {
                        a,
                        b,
                        carry_in: c,
                        mode: self.mode,
                        select: 0,
                    });
                }
            }
        }
        out
    }
}

/// Arithmetic shift right by one (floor division by 2).
fn sar1(v: Wide) -> Wide {
    let neg = v.is_negative();
    let s = v.shr(1);
    if neg {
        s.or(Wide::single_bit(Wide::CAPACITY - 1))
    } else {
        s
    }
}

/// The eight cell-exercising vectors in datapath terms, for a cell with free operands and
/// carry-in: (0,0,0) (1..1,1..1,1) (1010..,1010..,1) (0101..,0101..,0) (0,1..1,0)
/// (0,1..1,1) (1..1,0,0) (1..1,0,1) for a full adder. From the DOMAIN notes, where they were
/// derived and checked by exhaustive stuck-at simulation (not from the literature); a
/// subtractor cell is an adder cell with y and the carries inverted, so it takes the same
/// set with y and c0 inverted.
///
/// Then four vectors whose cells alternate generate/propagate and kill/propagate, starting
/// with either role at bit 0. With them every pair of adjacent cells sees all nine
/// combinations of (generate, propagate, kill) roles: the eight alone give only the five
/// pairs gg, kk, pp, gk and kg. That matters once synthesis restructures the chain across
/// cell boundaries: Yosys 0.23 with abc, for a 4-bit ripple adder, builds the carry into
/// the top bit twice, and one copy feeds only the carry-out, so a stuck-at-1 on the branch of
/// bit 2's generate into that copy shows only when bit 2 generates and bit 3 propagates
/// (observed with `arithvec grade` and confirmed with Icarus Verilog; tests/grade).
fn seed_vectors(dp: &Datapath) -> Vec<Inputs> {
    let w = dp.width;
    let ones = Word::ones(w);
    let alt_hi: Word = {
        // 1010.. from the top: bit w-1 set, alternating down.
        let mut p = Word::ZERO;
        let mut i = w as i64 - 1;
        while i >= 0 {
            p.set_bit(i as u32, true);
            i -= 2;
        }
        p
    };
    let alt_lo = alt_hi.not(w);
    let table = [
        (Word::ZERO, Word::ZERO, false),
        (ones, ones, true),
        (alt_hi, alt_hi, true),
        (alt_lo, alt_lo, false),
        (Word::ZERO, ones, false),
        (Word::ZERO, ones, true),
        (ones, Word::ZERO, false),
        (ones, Word::ZERO, true),
    ];
    let mut out = Vec::new();
    for (x, y, c) in table {
        let (y, c) = if dp.view.cell == Cell::Subtractor {
            (y.not(w), !c)
        } else {
            (y, c)
        };
        let bits: Vec<(bool, bool)> = (0..w).map(|i| (x.bit(i), y.bit(i))).collect();
        if let Some(v) = dp.inputs_from_bits(&bits, c) {
            out.push(v);
        }
    }
    let c0 = !dp.c0_allowed(false);
    for (even, odd) in [
        (Role::Generate, Role::Propagate),
        (Role::Propagate, Role::Generate),
        (Role::Kill, Role::Propagate),
        (Role::Propagate, Role::Kill),
    ] {
        let roles: Vec<Role> = (0..w)
            .map(|i| if i % 2 == 0 { even } else { odd })
            .collect();
        if let Some(v) = dp.inputs_from_roles(&roles, c0) {
            out.push(v);
        }
    }
    out
}

/// Builds the directed set and settles reachability in `cat`.
fn build_directed(spec: &Spec, cat: &mut Catalogue) -> (Vec<Inputs>, Vec<u32>) {
    let pool = operand_pool(cat);
    let bins = cat.bin_count();
    let mut counts = vec![0u32; bins];
    let mut set: Vec<(Inputs, Vec<u32>, bool)> = Vec::new();
    let mut hits = Hits::new();
    let bins_of = |cat: &Catalogue, v: &Inputs, hits: &mut Hits| -> Vec<u32> {
        cat.evaluate_with(v, hits, Detail::Bins);
        let mut list = Vec::new();
        hits.for_each_bin(|b| list.push(b as u32));
        list
    };

    // Seeds first (kept through pruning): they give every cell all eight rows together
    // with observable carries, and adjacent cells every pair of carry roles, which class
    // coverage alone does not demand.
    let modes: Vec<Option<bool>> = if spec.operation == Operation::AddSub {
        vec![Some(false), Some(true)]
    } else {
        vec![None]
    };
    for mode in modes {
        if let Some(view) = cat.model().ripple_view(mode.unwrap_or(false)) {
            if spec.encoding.is_binary_datapath() {
                let dp = Datapath {
                    view,
                    width: spec.width,
                    mode,
                };
                for v in seed_vectors(&dp) {
                    if set.iter().any(|(s, _, _)| *s == v) {
                        continue;
                    }
                    let list = bins_of(cat, &v, &mut hits);
                    for &b in &list {
                        counts[b as usize] += 1;
                    }
                    set.push((v, list, true));
                }
            }
        }
    }

    // A comparator's first-difference vectors, kept through pruning like the ripple seeds.
    if spec.operation == Operation::Compare {
        for (a, b) in compare::seed_pairs(spec.width) {
            let v = Inputs {
                a,
                b,
                ..Inputs::default()
            };
            if set.iter().any(|(s, _, _)| *s == v) {
                continue;
            }
            let list = bins_of(cat, &v, &mut hits);
            for &b in &list {
                counts[b as usize] += 1;
            }
            set.push((v, list, true));
        }
    }

    let mut unreachable = Vec::new();
    for ci in 0..cat.classes().len() {
        let class = &cat.classes()[ci];
        let (first, n) = (class.first_bin(), class.bin_count());
        for k in 0..n {
            let bin = first + k;
            if counts[bin] > 0 {
                continue;
            }
            let cands = candidates(cat, spec, ci, k as u32, &pool);
            let mut found = false;
            for v in cands {
                let list = bins_of(cat, &v, &mut hits);
                if list.contains(&(bin as u32)) {
                    for &b in &list {
                        counts[b as usize] += 1;
                    }
                    set.push((v, list, false));
                    found = true;
                    break;
                }
            }
            if !found {
                unreachable.push(bin);
            }
        }
    }
    for bin in unreachable {
        cat.set_reachable(bin, false);
    }

    // Drop vectors every one of whose bins another vector also hits (latest first).
    let mut keep = vec![true; set.len()];
    for i in (0..set.len()).rev() {
        let (_, list, seed) = &set[i];
        if *seed {
            continue;
        }
        if list.iter().all(|&b| counts[b as usize] >= 2) {
            keep[i] = false;
            for &b in list {
                counts[b as usize] -= 1;
            }
        }
    }
    let vectors = set
        .into_iter()
        .zip(keep)
        .filter_map(|((v, _, _), k)| k.then_some(v))
        .collect();
    (vectors, counts)
}

/// Evaluates and classifies one vector, returning the outputs; the classes column text is
/// appended to `classes` when given. `previous` is the select code of the vector applied
/// before (a select unit's `select.switch` class; None for the first vector or other units).
pub(crate) fn evaluate_vector(
    cat: &Catalogue,
    previous: Option<u32>,
    inputs: &Inputs,
    hits: &mut Hits,
    classes: Option<&mut String>,
) -> Outputs {
    let outputs = cat.evaluate_with(inputs, hits, Detail::ClassesOnly);
    cat.record_switch(previous, inputs.select, hits);
    if let Some(out) = classes {
        cat.class_list(hits, out);
    }
    outputs
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spec::Encoding;

    #[test]
    fn random_vectors_are_index_addressable() {
        let spec = Spec::with_defaults(Operation::Sub, Encoding::Twos, 32);
        let g = Generator::new(&spec, Some(100), Some(7));
        let mut stream = g.random_stream(0);
        let seq: Vec<Inputs> = (0..100).map(|_| stream.next_inputs()).collect();
        let d = g.directed().len() as u64;
        for (j, v) in seq.iter().enumerate() {
            assert_eq!(g.vector(d + j as u64).unwrap(), *v);
        }
        assert_eq!(g.vector(d + 100), None);
    }

    /// With corner_share = 100 every random operand lies within 2 of a special pattern; with
    /// the uniform mix at 32 bits that happens essentially never (about 40 * 5 / 2^32 per
    /// operand, simple counting).
    #[test]
    fn corner_mix_draws_from_the_specials() {
        let near_special = |g: &Generator, w: Word| {
            let x = Wide::from_word(&w);
            g.pool.iter().any(|p| {
                let d = x.sub(Wide::from_word(p)).mask(32);
                d.to_word().low_u64() <= 2 || d.to_word().low_u64() >= (1 << 32) - 2
            })
        };
        let mut spec = Spec::with_defaults(Operation::Add, Encoding::Twos, 32);
        spec.random.mix = Mix::Corner;
        spec.random.corner_share = 100;
        let g = Generator::new(&spec, Some(2000), Some(5));
        let mut s = g.random_stream(0);
        for _ in 0..2000 {
            let v = s.next_inputs();
            assert!(near_special(&g, v.a) && near_special(&g, v.b), "{v:?}");
        }
        spec.random.mix = Mix::Uniform;
        let g = Generator::new(&spec, Some(2000), Some(5));
        let mut s = g.random_stream(0);
        let near = (0..2000)
            .filter(|_| near_special(&g, s.next_inputs().a))
            .count();
        assert!(
            near < 5,
            "{near} of 2000 uniform operands were near a special value"
        );
        spec.random.mix = Mix::Corner;
        spec.random.corner_share = 25;
        let g = Generator::new(&spec, Some(4000), Some(5));
        let mut s = g.random_stream(0);
        let near = (0..4000)
            .filter(|_| near_special(&g, s.next_inputs().a))
            .count();
        assert!((800..1200).contains(&near), "{near} of 4000 at a 25% share");
    }

    #[test]
    fn directed_set_hits_every_reachable_bin() {
        for op in Operation::ALL {
            for enc in Encoding::ALL {
                for w in [1, 2, 3, 8, 33] {
                    let spec = Spec::with_defaults(op, enc, w);
                    let g = Generator::new(&spec, Some(0), None);
                    let cat = g.catalogue();
                    for bin in 0..cat.bin_count() {
                        if cat.is_reachable(bin) {
                            assert!(
                                g.directed_hits(bin) > 0,
                                "{op} {enc} w{w}: {}",
                                cat.bin_id(bin)
                            );
                        }
                    }
                }
            }
        }
    }

    /// Every spec variant the exhaustive reachability test covers.
    pub(crate) fn spec_variants(op: Operation, enc: Encoding, w: u32) -> Vec<Spec> {
        use crate::spec::{CarryInConvention, CarryOutConvention, NegativeZero, ZeroFlag};
        let base = Spec::with_defaults(op, enc, w);
        let mut out = vec![base.clone()];
        if base.has(Signal::CarryIn) && matches!(op, Operation::Sub | Operation::AddSub) {
            let mut s = base.clone();
            s.conventions.carry_in = CarryInConvention::Carry;
            s.conventions.carry_out = CarryOutConvention::Carry;
            out.push(s);
        }
        if base.has(Signal::CarryIn) {
            let mut s = base.clone();
            s.ports = crate::spec::Ports::default();
            for (sig, name) in base.inputs().into_iter().chain(base.outputs()) {
                if sig != Signal::CarryIn {
                    s.ports.set(sig, name);
                }
            }
            out.push(s);
        }
        if enc.has_negative_zero() && op != Operation::Compare {
            let mut s = base.clone();
            s.conventions.negative_zero = NegativeZero::Positive;
            s.conventions.zero_flag = ZeroFlag::Bits;
            out.push(s);
        }
        out
    }

    /// At small widths, every bin that some input hits must be reachable (the constructors
    /// found it), and every reachable bin must be hit by some input. Exhaustive over all
    /// inputs for every operation, encoding and convention variant.
    #[test]
    fn reachability_matches_exhaustive_enumeration() {
        let mut failures = Vec::new();
        for op in Operation::ALL {
            for enc in Encoding::ALL {
                for w in 1..=5u32 {
                    for spec in spec_variants(op, enc, w) {
                        let g = Generator::new(&spec, Some(0), None);
                        let cat = g.catalogue();
                        let mut seen = vec![false; cat.bin_count()];
                        let mut hits = Hits::new();
                        let n = 1u64 << w;
                        let bs = if op.is_binary() { n } else { 1 };
                        for a in 0..n {
                            for b in 0..bs {
                                for c in 0..4u64 {
                                    let v = Inputs {
                                        a: Word::from_u64(a),
                                        b: Word::from_u64(b),
                                        carry_in: c & 1 == 1 && spec.has(Signal::CarryIn),
                                        mode: c & 2 == 2 && op == Operation::AddSub,
                                        select: 0,
                                    };
                                    cat.evaluate(&v, &mut hits);
                                    hits.for_each_bin(|b| seen[b] = true);
                                }
                            }
                        }
                        for (bin, &was_seen) in seen.iter().enumerate() {
                            if was_seen != cat.is_reachable(bin) {
                                failures.push(format!(
                                    "{} w{w} {:?} cin={}: bin {} hit by enumeration = {}, reachable = {}",
                                    spec.name,
                                    spec.conventions,
                                    spec.has(Signal::CarryIn),
                                    cat.bin_id(bin),
                                    was_seen,
                                    cat.is_reachable(bin)
                                ));
                            }
                        }
                    }
                }
            }
        }
        assert!(
            failures.is_empty(),
            "{} mismatches:\n{}",
            failures.len(),
            failures
                .iter()
                .take(60)
                .cloned()
                .collect::<Vec<_>>()
                .join("\n")
        );
    }
}

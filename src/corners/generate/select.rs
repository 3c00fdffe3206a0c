//! The vector set of a select unit: every carried operation's directed set under its code,
//! then every ordered pair of operations back to back (an operation after itself too), then random vectors whose code is drawn
//! uniformly from the listed codes.
//!
//! Each operation's directed set is its own generator's (built from its part spec), so its
//! classes reach the same bins as for a unit of that operation alone. Random vector j stays a
//! pure function of (spec, seed, j): the operands are drawn as for the unit's width and
//! encoding and the code from the upper bits of the vector's flag word. No I/O.

use super::{operand_pool, Generator, RandomPlan, KEY_LABEL};
use crate::arith::model::Inputs;
use crate::corners::classes::{Catalogue, Hits};
use crate::spec::{Signal, Spec};
use sha2::{Digest, Sha256};

impl Generator {
    /// The generator of select unit `spec`.
    pub(super) fn for_select(spec: &Spec, count: Option<u64>, seed: Option<u64>) -> Generator {
        let seed = seed.unwrap_or(spec.random.seed);
        let parts: Vec<(u32, Generator)> = spec
            .select_parts()
            .into_iter()
            .map(|(code, part)| (code, Generator::new(&part, Some(0), Some(seed))))
            .collect();
        let mut directed: Vec<Inputs> = Vec::new();
        for (code, g) in &parts {
            directed.extend(g.directed.iter().map(|v| Inputs {
                select: *code,
                ..*v
            }));
        }
        // Every ordered pair of operations back to back, an operation after itself included
        // (a unit that keeps the previous operation's control for a cycle shows here): for
        // each first operation, a vector of it followed by the first directed vector of each
        // operation. So every `select.switch` bin is hit by construction.
        for (first, g1) in &parts {
            for (second, g2) in &parts {
                for (code, g) in [(first, g1), (second, g2)] {
                    if let Some(v) = g.directed.first() {
                        directed.push(Inputs {
                            select: *code,
                            ..*v
                        });
                    }
                }
            }
        }
        let codes: Vec<u32> = parts.iter().map(|(c, _)| *c).collect();
        let catalogue = Catalogue::compose(
            spec,
            parts
                .into_iter()
                .map(|(code, g)| (code, g.catalogue.model().operation(), g.catalogue))
                .collect(),
        );
        let mut directed_hits = vec![0u32; catalogue.bin_count()];
        let mut hits = Hits::new();
        let mut previous = None;
        for v in &directed {
            catalogue.evaluate(v, &mut hits);
            catalogue.record_switch(previous, v.select, &mut hits);
            previous = Some(v.select);
            hits.for_each_bin(|b| directed_hits[b] += 1);
        }
        let mut hasher = Sha256::new();
        hasher.update(KEY_LABEL);
        hasher.update(seed.to_le_bytes());
        let key: [u8; 32] = hasher.finalize().into();
        let pool = operand_pool(&catalogue).into();
        Generator {
            appended: Vec::new().into(),
            pool,
            codes: codes.into(),
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
                binary: spec.has(Signal::B),
                b_width: spec.width,
                words_per_operand: spec.width.div_ceil(32),
                key,
            },
        }
    }
}

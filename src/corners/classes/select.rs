//! The catalogue of a select unit: the classes of every carried operation, prefixed by its
//! name (`add.chain.length`, `compare.order`), then `select.code`, one bin per listed code,
//! then `select.switch`, one bin per ordered pair of listed operations applied back to back
//! (`add->sub`, and `add->add` too).
//!
//! `select.switch` is the one class that depends on two vectors: the vector before in the
//! order the testbench applies them. [`Catalogue::evaluate`] sees one vector, so the callers
//! that know the previous one (the set writer, the checker, the generator's directed count)
//! add its bin with [`Catalogue::record_switch`].
//!
//! Each carried operation keeps its own [`Catalogue`] (built from its part spec, reachability
//! settled by its own generator); the select catalogue lays their classes and bins out one
//! after another and classifies a vector with the part its code selects, shifting the part's
//! bin, dense-family and class numbers into place. No predicate is written twice. No I/O.

use super::{Catalogue, Class, Detail, Hits, Kind};
use crate::arith::model::{Inputs, Model, Outputs};
use crate::spec::{Operation, Signal, Spec};

/// One carried operation inside a select catalogue.
#[derive(Debug, Clone)]
pub(crate) struct SelectPart {
    pub(crate) code: u32,
    pub(crate) operation: Operation,
    pub(crate) catalogue: Catalogue,
    class_offset: u16,
    bin_offset: u32,
    slot_offset: u16,
}

/// The parts and the place of the `select.code` class.
#[derive(Debug, Clone)]
pub(crate) struct SelectCatalogue {
    pub(crate) parts: Vec<SelectPart>,
    code_class: u16,
    code_first_bin: u32,
    switch_class: u16,
    switch_first_bin: u32,
}

impl Catalogue {
    /// The catalogue of select unit `spec` from its parts' catalogues, in `[select]` order.
    pub(crate) fn compose(spec: &Spec, parts: Vec<(u32, Operation, Catalogue)>) -> Catalogue {
        let mut cat = Catalogue {
            model: Model::new(spec),
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
        let mut placed = Vec::new();
        for (code, operation, part) in parts {
            let class_offset = cat.classes.len() as u16;
            let bin_offset = cat.bin_class.len() as u32;
            let slot_offset = cat.dense_families.len() as u16;
            for c in &part.classes {
                cat.classes.push(Class {
                    // Ids that already start with the operation's name (compare.outcome)
                    // keep it once.
                    id: if c.id.starts_with(&format!("{}.", operation.name())) {
                        c.id.clone()
                    } else {
                        format!("{}.{}", operation.name(), c.id)
                    },
                    description: format!("{}: {}", operation.name(), c.description),
                    kind: c.kind.clone(),
                    mode: c.mode,
                    first_bin: c.first_bin + bin_offset,
                    dense_slot: c.dense_slot + slot_offset,
                    labels: c.labels.clone(),
                });
            }
            cat.bin_class
                .extend(part.bin_class.iter().map(|&c| c + class_offset));
            cat.reachable.extend_from_slice(&part.reachable);
            cat.dense_families.extend(
                part.dense_families
                    .iter()
                    .map(|&(base, stride)| (base + bin_offset, stride)),
            );
            placed.push(SelectPart {
                code,
                operation,
                catalogue: part,
                class_offset,
                bin_offset,
                slot_offset,
            });
        }
        let code_class = cat.classes.len() as u16;
        let code_first_bin = cat.bin_class.len() as u32;
        let labels: Vec<String> = placed
            .iter()
            .map(|p| format!("{}=0x{:x}", p.operation.name(), p.code))
            .collect();
        cat.bin_class
            .extend(std::iter::repeat_n(code_class, labels.len()));
        cat.reachable
            .extend(std::iter::repeat_n(true, labels.len()));
        cat.classes.push(Class {
            id: "select.code".to_string(),
            description: "the select port carries each listed operation code".to_string(),
            kind: Kind::SelectCode,
            mode: None,
            first_bin: code_first_bin,
            dense_slot: 0,
            labels,
        });
        // select.switch: bin p * n + q for operation p followed by operation q.
        let switch_class = cat.classes.len() as u16;
        let switch_first_bin = cat.bin_class.len() as u32;
        let mut pairs = Vec::new();
        for p in &placed {
            for q in &placed {
                pairs.push(format!("{}->{}", p.operation.name(), q.operation.name()));
            }
        }
        cat.bin_class
            .extend(std::iter::repeat_n(switch_class, pairs.len()));
        cat.reachable.extend(std::iter::repeat_n(true, pairs.len()));
        cat.classes.push(Class {
            id: "select.switch".to_string(),
            description: "each ordered pair of listed operations runs back to back (the \
                          second right after the first)"
                .to_string(),
            kind: Kind::SelectSwitch,
            mode: None,
            first_bin: switch_first_bin,
            dense_slot: 0,
            labels: pairs,
        });
        cat.select = Some(Box::new(SelectCatalogue {
            parts: placed,
            code_class,
            code_first_bin,
            switch_class,
            switch_first_bin,
        }));
        cat
    }

    /// The candidate catalogue of a select unit: its parts' candidates.
    pub(crate) fn select_candidates(spec: &Spec) -> Catalogue {
        let parts = spec
            .select_parts()
            .into_iter()
            .map(|(code, part)| (code, part.operation, Catalogue::candidates(&part)))
            .collect();
        Catalogue::compose(spec, parts)
    }

    /// True for the catalogue of a select unit (whose `select.switch` class needs the
    /// previous vector: see [`Catalogue::record_switch`]).
    pub(crate) fn is_select(&self) -> bool {
        self.select.is_some()
    }

    /// Adds to `hits` the `select.switch` bin of a vector with select code `code` applied
    /// right after one with code `previous` (None for the first vector). Returns the class
    /// index when a bin was added: both codes must be listed. No effect on other catalogues.
    pub(crate) fn record_switch(
        &self,
        previous: Option<u32>,
        code: u32,
        hits: &mut Hits,
    ) -> Option<u16> {
        let select = self.select.as_ref()?;
        let position = |c: u32| select.parts.iter().position(|p| p.code == c);
        let (p, q) = (position(previous?)?, position(code)?);
        let n = select.parts.len();
        hits.bins.push(select.switch_first_bin + (p * n + q) as u32);
        if !hits.classes.contains(&select.switch_class) {
            hits.classes.push(select.switch_class);
        }
        Some(select.switch_class)
    }

    /// Classifies `inputs` with the part its code selects; None when this is not a select
    /// catalogue.
    pub(crate) fn select_evaluate(
        &self,
        inputs: &Inputs,
        hits: &mut Hits,
        detail: Detail,
    ) -> Option<Outputs> {
        let select = self.select.as_ref()?;
        let Some((i, part)) = select
            .parts
            .iter()
            .enumerate()
            .find(|(_, p)| p.code == inputs.select)
        else {
            hits.clear(self.model.width().div_ceil(64) as usize);
            return Some(self.model.evaluate(inputs));
        };
        part.catalogue.evaluate_with(inputs, hits, detail);
        for b in &mut hits.bins {
            *b += part.bin_offset;
        }
        for d in &mut hits.dense {
            d.base += part.bin_offset;
            d.slot += part.slot_offset;
        }
        for c in &mut hits.classes {
            *c += part.class_offset;
        }
        hits.bins.push(select.code_first_bin + i as u32);
        hits.classes.push(select.code_class);
        Some(self.model.evaluate(inputs))
    }
}

//! The catalogue of a select unit: the classes of every carried operation, prefixed by its
//! name (`add.chain.length`, `compare.order`), then `select.code`, one bin per listed code.
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
        cat.select = Some(Box::new(SelectCatalogue {
            parts: placed,
            code_class,
            code_first_bin,
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

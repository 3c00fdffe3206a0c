//! Wide lane blocks for the bit-parallel mode: four 64-vector blocks (256 vectors) per pass
//! through a fault's cone, each gate evaluated on four words at once. The walk's own cost
//! (reading marks, choosing faulty or fault-free values, the horizon) is paid once per 256
//! vectors instead of once per 64, and the four-word operations map to vector instructions.
//! The results are those of the 64-lane code block by block: the same lanes are detected,
//! so the first detection and the detection matrix do not change.

use super::*;

/// Words per wide pass.
pub(super) const WIDE: usize = 4;

/// Four words of lanes: word `w` is block `w` of a group.
pub(super) type Wide = [u64; WIDE];

/// A faulty wide value, valid only while its mark equals the engine's current mark.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct WideSlot {
    pub(super) value: Wide,
    pub(super) mark: u32,
}

#[inline(always)]
fn each(f: impl Fn(usize) -> u64) -> Wide {
    std::array::from_fn(f)
}

/// [`GateKind::eval`] on four words: pin `p`'s words in `inputs[p]`.
#[inline(always)]
pub(super) fn eval_wide(kind: GateKind, inputs: [Wide; 4]) -> Wide {
    let [a, b, c, d] = inputs;
    match kind {
        GateKind::Buf => a,
        GateKind::Not => each(|w| !a[w]),
        GateKind::And => each(|w| a[w] & b[w]),
        GateKind::Nand => each(|w| !(a[w] & b[w])),
        GateKind::Or => each(|w| a[w] | b[w]),
        GateKind::Nor => each(|w| !(a[w] | b[w])),
        GateKind::Xor => each(|w| a[w] ^ b[w]),
        GateKind::Xnor => each(|w| !(a[w] ^ b[w])),
        GateKind::AndNot => each(|w| a[w] & !b[w]),
        GateKind::OrNot => each(|w| a[w] | !b[w]),
        GateKind::Mux => each(|w| (a[w] & !c[w]) | (b[w] & c[w])),
        GateKind::NMux => each(|w| !((a[w] & !c[w]) | (b[w] & c[w]))),
        GateKind::Aoi3 => each(|w| !((a[w] & b[w]) | c[w])),
        GateKind::Oai3 => each(|w| !((a[w] | b[w]) & c[w])),
        GateKind::Aoi4 => each(|w| !((a[w] & b[w]) | (c[w] & d[w]))),
        GateKind::Oai4 => each(|w| !((a[w] | b[w]) & (c[w] | d[w]))),
    }
}

/// A chunk's fault-free values regrouped for wide passes: group `g` is blocks `4g .. 4g + 4`
/// of the chunk, one [`Wide`] per net. Blocks past the last whole group are left to the
/// 64-lane code.
#[derive(Default)]
pub(super) struct WideChunk {
    pub(super) groups: usize,
    nets: usize,
    good: Vec<Wide>,
    masks: Vec<Wide>,
}

impl WideChunk {
    /// Regroups `chunk` (reusing the buffers).
    pub(super) fn fill(&mut self, chunk: &Chunk) {
        self.groups = chunk.blocks.len() / WIDE;
        self.nets = chunk.nets;
        self.good.clear();
        self.masks.clear();
        for g in 0..self.groups {
            let blocks: [&[u64]; WIDE] = std::array::from_fn(|w| chunk.good(g * WIDE + w));
            self.good
                .extend((0..self.nets).map(|n| each(|w| blocks[w][n])));
            self.masks
                .push(each(|w| lane_mask(chunk.blocks[g * WIDE + w].1)));
        }
    }

    /// Group `g`'s fault-free values and lane masks.
    pub(super) fn group(&self, g: usize) -> (&[Wide], Wide) {
        (
            &self.good[g * self.nets..(g + 1) * self.nets],
            self.masks[g],
        )
    }
}

impl Engine<'_> {
    /// [`Engine::set`] on four words.
    #[inline(always)]
    fn set_wide(
        &mut self,
        n: usize,
        value: Wide,
        good: &[Wide],
        mask: Wide,
        detected: &mut Wide,
    ) -> bool {
        let diff = each(|w| (value[w] ^ good[n][w]) & mask[w]);
        if diff.iter().fold(0, |any, d| any | d) == 0 {
            return false;
        }
        self.faulty_wide[n] = WideSlot {
            value,
            mark: self.mark,
        };
        if self.topo.observed[n] {
            *detected = each(|w| detected[w] | diff[w]);
        }
        self.horizon = self.horizon.max(self.topo.last_reader[n]);
        true
    }

    /// [`Engine::detect`] on a group of four blocks: the lanes of each block in which
    /// `fault` makes some primary output differ.
    pub(super) fn detect_wide(
        &mut self,
        fault: &Fault,
        cone: &[u32],
        good: &[Wide],
        mask: Wide,
    ) -> Wide {
        if self.faulty_wide.len() != self.faulty.len() {
            self.faulty_wide = vec![WideSlot::default(); self.faulty.len()];
        }
        self.next_mark();
        self.horizon = 0;
        let stuck = if fault.stuck_at {
            [!0u64; WIDE]
        } else {
            [0; WIDE]
        };
        let mut detected = [0u64; WIDE];
        let topo = self.topo;
        let activated = match fault.site {
            FaultSite::Stem(net) => self.set_wide(net.index(), stuck, good, mask, &mut detected),
            FaultSite::GateInput { gate, pin } => {
                let g = &topo.sim_gates[gate];
                let mut ins = [[0u64; WIDE]; 4];
                for k in 0..g.arity as usize {
                    ins[k] = good[g.inputs[k] as usize];
                }
                ins[pin] = stuck;
                let value = eval_wide(g.kind, ins);
                self.set_wide(g.output as usize, value, good, mask, &mut detected)
            }
            FaultSite::OutputBit { port, bit } => {
                let net = self.nl.outputs()[port].nets()[bit as usize];
                let v = good[net.index()];
                return each(|w| (v[w] ^ stuck[w]) & mask[w]);
            }
        };
        if !activated {
            return detected;
        }
        for &g in cone {
            if g > self.horizon {
                break;
            }
            let gate = &topo.sim_gates[g as usize];
            let mut ins = [[0u64; WIDE]; 4];
            let mut touched = false;
            for (value, &n) in ins.iter_mut().zip(&gate.inputs[..gate.arity as usize]) {
                let slot = &self.faulty_wide[n as usize];
                if slot.mark == self.mark {
                    touched = true;
                    *value = slot.value;
                } else {
                    *value = good[n as usize];
                }
            }
            if touched {
                let value = eval_wide(gate.kind, ins);
                self.set_wide(gate.output as usize, value, good, mask, &mut detected);
            }
        }
        detected
    }
}

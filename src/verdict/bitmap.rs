//! The failing-bit map: for each output port, which bit positions differ between expected and
//! got in the failures a report lists. One line for a terminal, and the same numbers for the
//! HTML report's strip.
//!
//! Pure functions of a [`CheckReport`] (and the spec it carries); no I/O.

use crate::spec::Spec;
use crate::verdict::check::CheckReport;

/// Differing-bit tallies of one output port over the listed failures.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PortBits {
    /// The DUT's port name.
    pub port: String,
    /// Bits of the port.
    pub width: u32,
    /// `counts[i]`: listed failures in which bit i (LSB = 0) of the port differs.
    pub counts: Vec<u64>,
}

/// Per output port that has a differing bit in a listed failure, the tally of differing
/// bits, in the order the ports first appear; empty when nothing differs.
pub fn failing_bits(r: &CheckReport) -> Vec<PortBits> {
    let spec = Spec::parse(&r.spec_toml, "report (spec_toml)").ok();
    let mut ports: Vec<PortBits> = Vec::new();
    for f in &r.failures {
        for o in &f.outputs {
            if o.differing_bits.is_empty() {
                continue;
            }
            let width = port_width(spec.as_ref(), &o.port, o.expected_bin.as_deref())
                .max(o.differing_bits.iter().max().map_or(1, |&b| b + 1));
            let at = match ports.iter().position(|p| p.port == o.port) {
                Some(at) => at,
                None => {
                    ports.push(PortBits {
                        port: o.port.clone(),
                        width,
                        counts: vec![0; width as usize],
                    });
                    ports.len() - 1
                }
            };
            let p = &mut ports[at];
            if p.counts.len() < width as usize {
                p.counts.resize(width as usize, 0);
                p.width = width;
            }
            for &bit in &o.differing_bits {
                p.counts[bit as usize] += 1;
            }
        }
    }
    ports
}

fn port_width(spec: Option<&Spec>, port: &str, expected_bin: Option<&str>) -> u32 {
    if let Some(spec) = spec {
        if let Some((sig, _)) = spec.outputs().into_iter().find(|(_, p)| *p == port) {
            return sig.width(spec.width);
        }
    }
    expected_bin.map_or(1, |b| b.len() as u32)
}

/// `#` where a bit differs in some listed failure, `.` where none does; MSB first, grouped by
/// eight bits.
pub fn bit_string(p: &PortBits) -> String {
    let mut s = String::new();
    for i in (0..p.width).rev() {
        s.push(if p.counts[i as usize] > 0 { '#' } else { '.' });
        if i > 0 && i % 8 == 0 {
            s.push(' ');
        }
    }
    s
}

/// The one-line terminal map, or `None` when no listed failure has a differing bit:
/// `failing bits in the 3 listed failures (MSB left, # = differs): y[7:0] ...#.... co #`.
pub fn bit_map_line(r: &CheckReport) -> Option<String> {
    let ports = failing_bits(r);
    if ports.is_empty() {
        return None;
    }
    let parts: Vec<String> = ports
        .iter()
        .map(|p| {
            if p.width == 1 {
                format!("{} {}", p.port, bit_string(p))
            } else {
                format!("{}[{}:0] {}", p.port, p.width - 1, bit_string(p))
            }
        })
        .collect();
    let n = r.failures.len();
    Some(format!(
        "failing bits in the {n} listed failure{} (MSB left, # = differs): {}",
        if n == 1 { "" } else { "s" },
        parts.join("  ")
    ))
}

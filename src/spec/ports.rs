//! Port bit ranges: a spec role (an input such as `a`, an output such as `carry_out`) mapped
//! to a bit range of a named DUT port, so a unit whose ports bundle several roles (`{co, sum}`
//! in one output, `{a, b}` packed in one input, flags packed in one vector) needs no wrapper.
//!
//! Syntax, in `[ports]`: `NAME` (the whole port is the role), `NAME[MSB:LSB]` (bits MSB down
//! to LSB, MSB >= LSB) or `NAME[BIT]` (one bit). For example `result = "s[15:0]"`,
//! `carry_out = "s[16]"`. A port holding ranges is a *bundle*: its width is the highest bit
//! any role takes plus one; gaps are allowed (a testbench drives an input bundle's gap bits 0
//! and ignores an output bundle's). Rules (checked by [`check_ranges`]): a range's width is
//! the role's width; two roles' ranges of one port do not overlap; a port is either used whole
//! by one role or only through ranges; one port does not hold inputs and outputs both.
//!
//! The role's text (`s[15:0]`) stays its name everywhere a column is named: in vectors.csv, in
//! the result log (one column per role, as for plain ports) and in reports. Emitters ask
//! [`Ports::bundles`] for the physical ports. Packed flags (`[ports] flags = "nzcv"` with a
//! `[flags]` table of bit positions) are one more use: each flag becomes `nzcv[BIT]` through
//! [`Ports::set`] and [`check_ranges`] applies unchanged.
//!
//! Part of stage 1: no arithmetic here.

use std::collections::BTreeMap;

use crate::spec::{Ports, Signal};

/// A role's bit range of a named port.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct PortRange {
    /// The DUT's port.
    pub port: String,
    /// Highest bit of the range.
    pub msb: u32,
    /// Lowest bit of the range.
    pub lsb: u32,
}

impl PortRange {
    /// Bits in the range.
    pub fn width(&self) -> u32 {
        self.msb - self.lsb + 1
    }
}

/// A physical port that holds one or more roles' bit ranges.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Bundle {
    /// The DUT's port name.
    pub port: String,
    /// Its width: the highest bit any role takes, plus one.
    pub width: u32,
    /// True for an input port.
    pub input: bool,
    /// The roles in it, lowest bit first: (signal, msb, lsb).
    pub members: Vec<(Signal, u32, u32)>,
}

/// A `[ports]` value split up: the port name and its (msb, lsb) range, if any.
pub type PortText<'a> = (&'a str, Option<(u32, u32)>);

/// Splits a `[ports]` value into the port name and its range, if any. Errors say what is
/// wrong with the brackets; the caller checks that the name is an identifier.
pub fn parse_port_text(text: &str) -> Result<PortText<'_>, String> {
    let Some(open) = text.find('[') else {
        return Ok((text, None));
    };
    let name = &text[..open];
    let inner = text[open + 1..].strip_suffix(']').ok_or_else(|| {
        format!("\"{text}\": a bit range is written NAME[MSB:LSB] or NAME[BIT], ending in ']'")
    })?;
    let number = |s: &str| {
        s.trim()
            .parse::<u32>()
            .map_err(|_| format!("\"{text}\": \"{}\" is not a bit number", s.trim()))
    };
    let (msb, lsb) = match inner.split_once(':') {
        Some((m, l)) => (number(m)?, number(l)?),
        None => {
            let b = number(inner)?;
            (b, b)
        }
    };
    if msb < lsb {
        return Err(format!(
            "\"{text}\": the range runs from MSB down to LSB, so write {name}[{lsb}:{msb}]"
        ));
    }
    if msb >= 1 << 20 {
        return Err(format!("\"{text}\": bit {msb} is past any port's width"));
    }
    Ok((name, Some((msb, lsb))))
}

impl Ports {
    /// The bit range of `signal`'s port, when the spec maps the role to a range.
    pub fn range(&self, signal: Signal) -> Option<PortRange> {
        let text = self.get(signal)?;
        match parse_port_text(text) {
            Ok((port, Some((msb, lsb)))) => Some(PortRange {
                port: port.to_string(),
                msb,
                lsb,
            }),
            _ => None,
        }
    }

    /// The DUT port `signal` lives on: its name, without any range.
    pub fn hdl_port(&self, signal: Signal) -> Option<&str> {
        let text = self.get(signal)?;
        Some(parse_port_text(text).map_or(text, |(port, _)| port))
    }

    /// True when some role is mapped to a bit range.
    pub fn has_ranges(&self) -> bool {
        self.names.keys().any(|&s| self.range(s).is_some())
    }

    /// The ports that hold bit ranges, by name, with their roles.
    pub fn bundles(&self) -> Vec<Bundle> {
        let mut by_port: BTreeMap<String, Bundle> = BTreeMap::new();
        for &signal in self.names.keys() {
            let Some(r) = self.range(signal) else {
                continue;
            };
            let b = by_port.entry(r.port.clone()).or_insert_with(|| Bundle {
                port: r.port.clone(),
                width: 0,
                input: signal.is_input(),
                members: Vec::new(),
            });
            b.width = b.width.max(r.msb + 1);
            b.members.push((signal, r.msb, r.lsb));
        }
        let mut list: Vec<Bundle> = by_port.into_values().collect();
        for b in &mut list {
            b.members.sort_by_key(|m| m.2);
            // A packed flags port may declare more bits than its flags use.
            if let Some(p) = self.packed_flags().filter(|p| p.port == b.port) {
                b.width = b.width.max(p.width.unwrap_or(0));
            }
        }
        list
    }
}

/// Problems with the spec's bit ranges, per role: a range whose width is not the role's
/// (`width_of`), ranges of one port that overlap, a port used whole and through ranges, and
/// a port holding both inputs and outputs.
pub fn check_ranges(ports: &Ports, width_of: impl Fn(Signal) -> u32) -> Vec<(Signal, String)> {
    let mut problems = Vec::new();
    for (&signal, text) in &ports.names {
        if let Some(r) = ports.range(signal) {
            let want = width_of(signal);
            if r.width() != want {
                problems.push((
                    signal,
                    format!(
                        "\"{text}\" is {} bit{} wide, but {} is {want} bit{} wide",
                        r.width(),
                        if r.width() == 1 { "" } else { "s" },
                        signal.key(),
                        if want == 1 { "" } else { "s" }
                    ),
                ));
            }
        }
    }
    for b in ports.bundles() {
        for (&signal, text) in &ports.names {
            if ports.range(signal).is_none() && text == &b.port {
                problems.push((
                    signal,
                    format!(
                        "port {} is used whole by {} and in part by {}; give {} a range too",
                        b.port,
                        signal.key(),
                        b.members[0].0.key(),
                        signal.key()
                    ),
                ));
            }
        }
        for (k, &(signal, msb, lsb)) in b.members.iter().enumerate() {
            if signal.is_input() != b.input {
                problems.push((
                    signal,
                    format!(
                        "port {} holds both inputs and outputs ({} and {})",
                        b.port,
                        b.members[0].0.key(),
                        signal.key()
                    ),
                ));
            }
            if let Some(&(other, omsb, olsb)) = b.members[..k].iter().find(|m| m.1 >= lsb) {
                let (from, to) = (lsb.max(olsb), msb.min(omsb));
                problems.push((
                    signal,
                    format!(
                        "{}[{msb}:{lsb}] overlaps {}[{omsb}:{olsb}] of {} (bit{} {})",
                        b.port,
                        b.port,
                        other.key(),
                        if from == to { "" } else { "s" },
                        if from == to {
                            from.to_string()
                        } else {
                            format!("{to}..{from}")
                        }
                    ),
                ));
            }
        }
    }
    problems
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_names_ranges_and_single_bits() {
        assert_eq!(parse_port_text("sum"), Ok(("sum", None)));
        assert_eq!(parse_port_text("s[15:0]"), Ok(("s", Some((15, 0)))));
        assert_eq!(parse_port_text("s[16]"), Ok(("s", Some((16, 16)))));
        assert!(parse_port_text("s[0:3]").unwrap_err().contains("s[3:0]"));
        assert!(parse_port_text("s[x]")
            .unwrap_err()
            .contains("not a bit number"));
        assert!(parse_port_text("s[3")
            .unwrap_err()
            .contains("ending in ']'"));
    }

    fn ports(list: &[(Signal, &str)]) -> Ports {
        let mut p = Ports::default();
        for (s, n) in list {
            p.set(*s, *n);
        }
        p
    }

    fn width(s: Signal) -> u32 {
        s.width(16)
    }

    #[test]
    fn a_carry_and_sum_bundle_is_one_port_of_17_bits() {
        let p = ports(&[
            (Signal::A, "a"),
            (Signal::B, "b"),
            (Signal::Result, "s[15:0]"),
            (Signal::CarryOut, "s[16]"),
        ]);
        assert!(check_ranges(&p, width).is_empty());
        let b = p.bundles();
        assert_eq!(b.len(), 1);
        assert_eq!(
            (b[0].port.as_str(), b[0].width, b[0].input),
            ("s", 17, false)
        );
        assert_eq!(
            b[0].members,
            vec![(Signal::Result, 15, 0), (Signal::CarryOut, 16, 16)]
        );
        assert_eq!(p.hdl_port(Signal::CarryOut), Some("s"));
        assert_eq!(p.hdl_port(Signal::A), Some("a"));
    }

    #[test]
    fn overlaps_widths_mixed_use_and_directions_are_refused() {
        let p = ports(&[
            (Signal::A, "ab[31:16]"),
            (Signal::B, "ab[16:1]"),
            (Signal::Result, "y[14:0]"),
            (Signal::CarryOut, "ab[0]"),
            (Signal::Overflow, "y"),
        ]);
        let text: Vec<String> = check_ranges(&p, width)
            .into_iter()
            .map(|(s, m)| format!("{}: {m}", s.key()))
            .collect();
        let all = text.join("\n");
        assert!(
            all.contains("a: ab[31:16] overlaps ab[16:1] of b (bit 16)"),
            "{all}"
        );
        assert!(
            all.contains("\"y[14:0]\" is 15 bits wide, but result is 16 bits wide"),
            "{all}"
        );
        assert!(
            all.contains("port y is used whole by overflow and in part by result"),
            "{all}"
        );
        assert!(
            all.contains("port ab holds both inputs and outputs"),
            "{all}"
        );
    }

    #[test]
    fn gaps_are_fine() {
        let p = ports(&[
            (Signal::A, "ab[31:16]"),
            (Signal::B, "ab[15:0]"),
            (Signal::Negative, "f[3]"),
            (Signal::Zero, "f[1]"),
        ]);
        assert!(check_ranges(&p, width).is_empty());
        let f = &p.bundles()[1];
        assert_eq!((f.port.as_str(), f.width), ("f", 4));
    }
}

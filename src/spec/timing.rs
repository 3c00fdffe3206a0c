//! The `[timing]` table: a clocked unit (registered outputs, a pipeline of `latency` stages,
//! or a multi-cycle unit with valid/ready handshakes). Part of stage 1: it reads and validates
//! the table and writes it back; the clocked testbench (`sim::testbench::clocked`) and the
//! checker's result-order pass (`verdict::timing`) are its only readers.
//!
//! `[timing]` is presentation, like `[dut]`: it says how the testbench drives the unit in
//! time, never what the vectors are, so it is not part of the vector set's identity (the
//! same set checks a combinational and a pipelined build of one unit).

use serde::Serialize;

use super::{is_identifier, Reader, Spec, Table};

/// The active clock edge.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Edge {
    /// Registers update on the rising edge (the default).
    Rising,
    /// Registers update on the falling edge.
    Falling,
}

/// The level at which the reset port is asserted.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ResetActive {
    /// Asserted at 0 (the default, as `rst_n`).
    Low,
    /// Asserted at 1.
    High,
}

/// A validated `[timing]` table.
#[derive(Debug, Clone, PartialEq, Eq, Hash, Serialize)]
pub struct Timing {
    /// The clock input's port name.
    pub clock: String,
    /// The active edge.
    pub edge: Edge,
    /// The reset input's port name, if the unit has one.
    pub reset: Option<String>,
    /// The reset's asserted level (default low).
    pub reset_active: ResetActive,
    /// Active edges the testbench holds reset for (default 2; 1.. when there is a reset).
    pub reset_cycles: u32,
    /// Cycles from applying a vector to its outputs being valid (at least 1). With
    /// `valid_out` it is the expected latency, used for the testbench's time-out.
    pub latency: u32,
    /// Cycles between new vectors (1 = fully pipelined; at least 1).
    pub interval: u32,
    /// Input port the testbench drives high with each vector.
    pub valid_in: Option<String>,
    /// Output port that marks a result (results are taken when it is high).
    pub valid_out: Option<String>,
    /// Output port: the unit accepts a vector only when it is high.
    pub ready: Option<String>,
}

/// Every key of `[timing]`.
const KEYS: [&str; 10] = [
    "clock",
    "edge",
    "reset",
    "reset_active",
    "reset_cycles",
    "latency",
    "interval",
    "valid_in",
    "valid_out",
    "ready",
];

/// The largest latency, interval or reset length the testbench supports.
pub const MAX_CYCLES: u32 = 1 << 16;

impl Timing {
    /// The control ports of the table, as (key, port name): clock, reset and handshakes.
    pub fn ports(&self) -> Vec<(&'static str, &str)> {
        let mut list = vec![("clock", self.clock.as_str())];
        for (key, port) in [
            ("reset", &self.reset),
            ("valid_in", &self.valid_in),
            ("valid_out", &self.valid_out),
            ("ready", &self.ready),
        ] {
            if let Some(p) = port {
                list.push((key, p.as_str()));
            }
        }
        list
    }

    /// The table as TOML, `[timing]` header included.
    pub(super) fn to_toml(&self) -> String {
        let q = |s: &str| format!("\"{s}\"");
        let mut t = format!(
            "\n[timing]\nclock = {}\nedge = {}\n",
            q(&self.clock),
            q(match self.edge {
                Edge::Rising => "rising",
                Edge::Falling => "falling",
            })
        );
        if let Some(r) = &self.reset {
            t.push_str(&format!(
                "reset = {}\nreset_active = {}\nreset_cycles = {}\n",
                q(r),
                q(match self.reset_active {
                    ResetActive::Low => "low",
                    ResetActive::High => "high",
                }),
                self.reset_cycles
            ));
        }
        t.push_str(&format!(
            "latency = {}\ninterval = {}\n",
            self.latency, self.interval
        ));
        for (key, port) in [
            ("valid_in", &self.valid_in),
            ("valid_out", &self.valid_out),
            ("ready", &self.ready),
        ] {
            if let Some(p) = port {
                t.push_str(&format!("{key} = {}\n", q(p)));
            }
        }
        t
    }
}

impl Reader<'_> {
    /// Reads `[timing]` into `spec.timing`. Every problem is reported at its key's line:
    /// unknown keys, a latency of 0, an interval of 0, handshakes or reset keys without the
    /// port they need, and port names that collide with each other or with `[ports]`.
    pub(super) fn read_timing(&mut self, root: &Table<'_>, spec: &mut Spec) {
        let Some(t) = self.table(root, "timing") else {
            return;
        };
        let p = "timing.";
        self.check_keys(t, p, &KEYS);
        let header = Self::get(root, "timing").map_or(0..0, |(k, _)| k.span());
        let clock = self.string(t, p, "clock");
        let edge = self.choice(
            t,
            p,
            "edge",
            &[("rising", Edge::Rising), ("falling", Edge::Falling)],
        );
        let reset = self.string(t, p, "reset");
        let reset_active = self.choice(
            t,
            p,
            "reset_active",
            &[("low", ResetActive::Low), ("high", ResetActive::High)],
        );
        let cycles = |r: &mut Self, key: &str, min: i128| -> Option<(u32, usize)> {
            let (n, at) = r.integer(t, p, key)?;
            if n < min || n > MAX_CYCLES as i128 {
                let why = if key == "latency" && n == 0 {
                    "must be at least 1 for a clocked unit: the outputs are registered, so a \
                     vector's results appear at least one cycle after it is applied (leave \
                     [timing] out for a combinational unit)"
                        .to_string()
                } else if key == "interval" && n == 0 {
                    "must be at least 1: it is the number of cycles between new vectors \
                     (1 = a new vector every cycle)"
                        .to_string()
                } else {
                    format!("must be {min}..={MAX_CYCLES}, got {n}")
                };
                r.problem(at..at, &format!("{p}{key}"), why);
                return None;
            }
            Some((n as u32, at))
        };
        let reset_cycles = cycles(self, "reset_cycles", 1);
        let latency = cycles(self, "latency", 1);
        let interval = cycles(self, "interval", 1);
        let valid_in = self.string(t, p, "valid_in");
        let valid_out = self.string(t, p, "valid_out");
        let ready = self.string(t, p, "ready");

        let Some((clock, _)) = clock else {
            // Without a clock nothing in the table has a meaning; say so at the key that
            // needs one, else at the table's header.
            let needs = ["valid_out", "valid_in", "ready", "latency", "reset"]
                .into_iter()
                .find_map(|k| Self::get(t, k).map(|(key, _)| (k, key.span())));
            if Self::get(t, "clock").is_none() {
                match needs {
                    Some((k, span)) => self.problem(
                        span,
                        &format!("{p}{k}"),
                        "needs a clock: add clock = \"<clock port>\" to [timing] (a \
                         combinational unit has no [timing] table)",
                    ),
                    None => self.problem(
                        header,
                        "timing.clock",
                        "a [timing] table needs clock = \"<clock port>\"",
                    ),
                }
            }
            return;
        };
        if Self::get(t, "latency").is_none() {
            self.problem(
                header,
                "timing.latency",
                "a clocked unit needs latency = N: the cycles from applying a vector to its \
                 outputs being valid (with valid_out, the expected latency)",
            );
        }
        if reset.is_none() {
            for k in ["reset_active", "reset_cycles"] {
                if let Some((key, _)) = Self::get(t, k) {
                    self.problem(
                        key.span(),
                        &format!("{p}{k}"),
                        "has no effect without reset = \"<reset port>\"; remove it or name the \
                         reset port",
                    );
                }
            }
        }
        if ready.is_some() && valid_in.is_none() {
            if let Some((key, _)) = Self::get(t, "ready") {
                self.problem(
                    key.span(),
                    "timing.ready",
                    "ready needs valid_in: the unit accepts a vector when valid_in and ready \
                     are both high",
                );
            }
        }
        // Port names: usable identifiers, none used twice here or in [ports].
        let mut taken: Vec<(String, String)> = Vec::new();
        for (sig, port) in spec.inputs().into_iter().chain(spec.outputs()) {
            let name = match super::parse_port_text(port) {
                Ok((name, _)) => name.to_string(),
                Err(_) => port.to_string(),
            };
            taken.push((name, format!("ports.{}", sig.key())));
        }
        for key in ["clock", "reset", "valid_in", "valid_out", "ready"] {
            let Some((name, at)) = (match key {
                "clock" => Some((clock.clone(), 0)),
                "reset" => reset.clone(),
                "valid_in" => valid_in.clone(),
                "valid_out" => valid_out.clone(),
                _ => ready.clone(),
            }) else {
                continue;
            };
            let at = if key == "clock" {
                Self::get(t, "clock").map_or(0, |(_, v)| v.span().start)
            } else {
                at
            };
            let field = format!("{p}{key}");
            if !is_identifier(&name) {
                self.problem(
                    at..at,
                    &field,
                    format!(
                        "\"{name}\" is not a usable port name (letters, digits and '_', not \
                         starting with a digit)"
                    ),
                );
                continue;
            }
            if name == "index" || name == "classes" {
                self.problem(
                    at..at,
                    &field,
                    format!("\"{name}\" is reserved for the vector files' own columns"),
                );
                continue;
            }
            if let Some((_, other)) = taken.iter().find(|(n, _)| *n == name) {
                self.problem(
                    at..at,
                    &field,
                    format!("duplicate port name: \"{name}\" is already used by {other}"),
                );
                continue;
            }
            taken.push((name, field));
        }
        spec.timing = Some(Timing {
            clock,
            edge: edge.map_or(Edge::Rising, |e| e.0),
            reset: reset.map(|r| r.0),
            reset_active: reset_active.map_or(ResetActive::Low, |r| r.0),
            reset_cycles: reset_cycles.map_or(2, |r| r.0),
            latency: latency.map_or(1, |l| l.0),
            interval: interval.map_or(1, |i| i.0),
            valid_in: valid_in.map(|v| v.0),
            valid_out: valid_out.map(|v| v.0),
            ready: ready.map(|v| v.0),
        });
    }
}

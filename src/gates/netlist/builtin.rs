//! Built-in structural units: ripple adder, subtractor and add/sub netlists built from
//! full-adder and full-subtractor cells, used by `grade --builtin` and by the tests as
//! reference circuits.

use super::*;

impl Netlist {
    pub(super) fn check_width(width: u32, unit: &str) -> Result<()> {
        if width == 0 || width > MAX_WIDTH {
            return Err(Error::problem(
                Problem::new(
                    format!("<built-in {unit}>"),
                    format!("width must be 1 to {MAX_WIDTH}, not {width}"),
                )
                .field("width"),
            ));
        }
        Ok(())
    }

    /// A `width`-bit ripple-carry adder built from full-adder cells (s = a ^ b ^ c,
    /// co = (a & b) | (c & (a ^ b)), DOMAIN "One-bit cells"). Ports: inputs `a`, `b` and, when
    /// `carry_in`, `cin`; outputs `y`, `co` (carry out) and `ovf` (two's-complement overflow,
    /// carry into the MSB XOR carry out). Without a carry-in, bit 0 is a half adder.
    /// Per-bit nets are `p[i]` (a ^ b), `g[i]` (a & b), `t[i]` (c & p), `carry[i]` (carry
    /// into bit i); cells are `fa[i].xor_ab`, `fa[i].xor_sum`, `fa[i].and_ab`, `fa[i].and_cp`,
    /// `fa[i].or_carry` and `ovf_xor`.
    pub fn ripple_adder(width: u32, carry_in: bool) -> Result<Netlist> {
        Netlist::ripple(width, carry_in, Cell::Add, "ripple adder", "ripple_adder")
    }

    /// A `width`-bit ripple-borrow subtractor (a - b - bin) built from full-subtractor cells
    /// (d = a ^ b ^ bin, bout = (~a & b) | (~(a ^ b) & bin), DOMAIN "One-bit cells"). Ports:
    /// inputs `a`, `b` and, when `borrow_in`, `cin` (a borrow: 1 subtracts one more); outputs
    /// `y`, `co` (the borrow out: 1 = a borrow was needed) and `ovf` (two's-complement
    /// overflow, borrow into the MSB XOR borrow out). Without a borrow-in, bit 0 is a half
    /// subtractor. Per-bit nets: `x[i]` (a ^ b), `g[i]` (~a & b), `t[i]` (bin & ~x),
    /// `carry[i]` (borrow into bit i); cells `fs[i].xor_ab`, `fs[i].xor_diff`,
    /// `fs[i].andnot_ba`, `fs[i].andnot_bx`, `fs[i].or_borrow`, `ovf_xor`.
    pub fn ripple_subtractor(width: u32, borrow_in: bool) -> Result<Netlist> {
        Netlist::ripple(
            width,
            borrow_in,
            Cell::Subtract,
            "ripple subtractor",
            "ripple_subtractor",
        )
    }

    /// A ripple chain of `cell`s with ports `a`, `b`, `cin` (when `carry_in`), `y`, `co` and
    /// `ovf`: the adder and the subtractor above. `unit` names it in messages.
    fn ripple(width: u32, carry_in: bool, cell: Cell, unit: &str, module: &str) -> Result<Netlist> {
        Netlist::check_width(width, unit)?;
        let mut b = NetlistBuilder::new(&format!("<built-in {unit}>"), module);
        let a = b.input("a", width);
        let bb = b.input("b", width);
        let cin = carry_in.then(|| b.input("cin", 1)[0]);
        let (y, carries) = ripple_chain(&mut b, &a, &bb, cin, cell);
        finish_flags(&mut b, &y, &carries);
        b.build()
    }

    /// A `width`-bit add/subtract unit: every b bit is XORed with `mode` (nets `bm[i]`,
    /// cells `bx[i]`) and `mode` is the ripple adder's carry-in, so mode 0 gives a + b and
    /// mode 1 gives a + ~b + 1 = a - b (DOMAIN "Subtraction and its flags"). Ports: inputs
    /// `a`, `b`, `mode`; outputs `y`, `co` (the raw adder carry: NOT borrow when
    /// subtracting) and `ovf` (carry into the MSB XOR carry out).
    pub fn addsub_unit(width: u32) -> Result<Netlist> {
        Netlist::check_width(width, "add/sub unit")?;
        let mut b = NetlistBuilder::new("<built-in add/sub unit>", "addsub_unit");
        let a = b.input("a", width);
        let bb = b.input("b", width);
        let mode = b.input("mode", 1)[0];
        let bm: Vec<NetId> = (0..width as usize)
            .map(|i| {
                b.gate_net(
                    GateKind::Xor,
                    &format!("bx[{i}]"),
                    &[bb[i], mode],
                    "bm",
                    Some(i as i64),
                )
            })
            .collect();
        let (y, carries) = ripple_chain(&mut b, &a, &bm, Some(mode), Cell::Add);
        finish_flags(&mut b, &y, &carries);
        b.build()
    }
}

#[derive(Clone, Copy, PartialEq, Eq)]
pub(super) enum Cell {
    Add,
    Subtract,
}

/// The gates of a one-bit cell, by role: `p = a ^ b` (net `propagate`), `g` the generate
/// term (`generate` gate on `a, b`, or on `b, a` when `generate_swapped`), the sum or
/// difference `p ^ c` (cell `sum`), `t` the carried-through term (`through` gate on `c, p`)
/// and the carry (borrow) out `g | t` (cell `merge`).
struct CellGates {
    prefix: &'static str,
    propagate: &'static str,
    generate: (GateKind, &'static str),
    generate_swapped: bool,
    sum: &'static str,
    through: (GateKind, &'static str),
    merge: &'static str,
}

impl Cell {
    fn gates(self) -> CellGates {
        match self {
            // Full adder: s = a ^ b ^ c, co = (a & b) | (c & (a ^ b)).
            Cell::Add => CellGates {
                prefix: "fa",
                propagate: "p",
                generate: (GateKind::And, "and_ab"),
                generate_swapped: false,
                sum: "xor_sum",
                through: (GateKind::And, "and_cp"),
                merge: "or_carry",
            },
            // Full subtractor: d = a ^ b ^ bin, bout = (~a & b) | (bin & ~(a ^ b)).
            Cell::Subtract => CellGates {
                prefix: "fs",
                propagate: "x",
                generate: (GateKind::AndNot, "andnot_ba"),
                generate_swapped: true,
                sum: "xor_diff",
                through: (GateKind::AndNot, "andnot_bx"),
                merge: "or_borrow",
            },
        }
    }
}

/// Builds the ripple chain; returns the result nets and the carries (borrows) into each bit
/// plus the final carry out (so `width + 1` entries; entry 0 is the carry-in, if any).
pub(super) fn ripple_chain(
    b: &mut NetlistBuilder,
    a: &[NetId],
    bb: &[NetId],
    carry_in: Option<NetId>,
    cell: Cell,
) -> (Vec<NetId>, Vec<Option<NetId>>) {
    let width = a.len();
    let mut carries = vec![carry_in];
    let mut y = Vec::with_capacity(width);
    let gates = cell.gates();
    let prefix = gates.prefix;
    for i in 0..width {
        let idx = Some(i as i64);
        let name = |part: &str| format!("{prefix}[{i}].{part}");
        // The last carry out is the `co` port's own net, so reports name it `co`.
        let (carry_name, carry_index) = if i + 1 == width {
            ("co", None)
        } else {
            ("carry", Some(i as i64 + 1))
        };
        let out_name = if width == 1 { None } else { idx };
        let ab = [a[i], bb[i]];
        let generate_in = if gates.generate_swapped {
            [bb[i], a[i]]
        } else {
            ab
        };
        let next = match carries[i] {
            Some(c) => {
                let p = b.gate_net(GateKind::Xor, &name("xor_ab"), &ab, gates.propagate, idx);
                let (kind, cell_name) = gates.generate;
                let g = b.gate_net(kind, &name(cell_name), &generate_in, "g", idx);
                y.push(b.gate_net(GateKind::Xor, &name(gates.sum), &[p, c], "y", out_name));
                let (kind, cell_name) = gates.through;
                let t = b.gate_net(kind, &name(cell_name), &[c, p], "t", idx);
                b.gate_net(
                    GateKind::Or,
                    &name(gates.merge),
                    &[g, t],
                    carry_name,
                    carry_index,
                )
            }
            None => {
                // Half cell: the sum (difference) is a ^ b and the carry (borrow) the
                // generate term alone.
                y.push(b.gate_net(GateKind::Xor, &name("xor_ab"), &ab, "y", out_name));
                let (kind, cell_name) = gates.generate;
                b.gate_net(
                    kind,
                    &name(cell_name),
                    &generate_in,
                    carry_name,
                    carry_index,
                )
            }
        };
        carries.push(Some(next));
    }
    (y, carries)
}

/// Adds the `y`, `co` and `ovf` output ports.
pub(super) fn finish_flags(b: &mut NetlistBuilder, y: &[NetId], carries: &[Option<NetId>]) {
    let width = y.len();
    let co = carries[width].expect("a ripple chain always produces a carry out");
    b.output("y", y);
    b.output("co", &[co]);
    // Overflow is the carry into the MSB XOR the carry out; with no carry-in at width 1 the
    // carry into the MSB is constant 0 and overflow is the carry out itself.
    let ovf = match carries[width - 1] {
        Some(c) => b.gate_net(GateKind::Xor, "ovf_xor", &[c, co], "ovf", None),
        None => co,
    };
    b.output("ovf", &[ovf]);
}

// ripple_sub_bug_chain: copy of ripple_sub with ONE deliberate bug, for testing that vector
// sets find it.
// BUG: the borrow chain is broken in the middle: the borrow into bit BREAK = W/2 is tied to
// 0 instead of coming from bit BREAK-1 (at W = 4: the borrow from bit 1 into bit 2 is
// dropped; at W = 1, BREAK = 0 and the borrow-in cin itself is ignored). The overflow flag
// reads the same broken net as the cell.
// EXPOSED BY: any vector whose true borrow into bit W/2 is 1, i.e. a borrow chain that is
// generated below bit W/2 (or started by cin) and reaches bit W/2: the "borrow chain of
// length >= W/2" corners, e.g. 0 - 1 (a full-length chain) or 0 - 0 with cin = 1. About half
// of all uniform vectors hit it, so random vectors find it too.
//
// The reference unit's own description follows; the bug above overrides it.
// ripple_sub: W-bit two's-complement ripple-BORROW subtractor, a - b - cin, built from
// full_subtractor cells chained in a generate loop (no `-` operator). cin is a borrow-in.
//   y    = (a - b - cin) mod 2^W
//   co   = borrow out of bit W-1 (1 = a borrow was needed, i.e. a < b + cin unsigned)
//   ovf  = borrow into the MSB xor borrow out of the MSB. This is the adder rule
//          "carry into MSB xor carry out" rewritten for a + ~b + (1 - cin), whose carry at
//          every position is NOT the borrow there (common practice).
//   zero = all result bits are 0
//   neg  = result MSB
// The borrows are per-bit scalar wires chained by name (see ripple_add.v for why).
module ripple_sub_bug_chain #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    // At W = 1 the broken link is cin itself, which then feeds nothing.
    /* verilator lint_off UNUSEDSIGNAL */
    input  wire         cin,
    /* verilator lint_on UNUSEDSIGNAL */
    output wire [W-1:0] y,
    output wire         co,
    output wire         ovf,
    output wire         zero,
    output wire         neg
);
    localparam BREAK = W / 2;

    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            wire borrow_in;   // borrow into bit i
            // The borrow out of bit BREAK-1 is the dangling end of the broken link.
            /* verilator lint_off UNUSEDSIGNAL */
            wire borrow_out;  // borrow out of bit i
            /* verilator lint_on UNUSEDSIGNAL */
            if (i == BREAK) begin : g_broken
                assign borrow_in = 1'b0;  // the bug: should be the borrow from bit i-1 (or cin)
            end else if (i == 0) begin : g_first
                assign borrow_in = cin;
            end else begin : g_chain
                assign borrow_in = g_bit[i-1].borrow_out;
            end
            full_subtractor u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .bin (borrow_in),
                .d   (y[i]),
                .bout(borrow_out)
            );
        end
    endgenerate

    assign co   = g_bit[W-1].borrow_out;
    assign ovf  = g_bit[W-1].borrow_in ^ g_bit[W-1].borrow_out;
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

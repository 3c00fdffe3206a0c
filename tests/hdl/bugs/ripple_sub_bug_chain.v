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
module ripple_sub_bug_chain #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    /* verilator lint_off UNUSEDSIGNAL */
    // At W = 1 the broken net is cin itself, so cin then feeds nothing.
    input  wire         cin,
    /* verilator lint_on UNUSEDSIGNAL */
    output wire [W-1:0] y,
    output wire         co,
    output wire         ovf,
    output wire         zero,
    output wire         neg
);
    localparam BREAK = W / 2;

    // borrow[i] is the borrow out of bit i-1 (borrow[0] = cin); chain_in[i] is the net that
    // actually feeds bit i. They differ only at the broken link.
    /* verilator lint_off UNUSEDSIGNAL */
    // borrow[BREAK] is the dangling end of the broken link.
    wire [W:0]   borrow;
    /* verilator lint_on UNUSEDSIGNAL */
    wire [W-1:0] chain_in;
    assign borrow[0] = cin;

    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            if (i == BREAK) begin : g_broken
                assign chain_in[i] = 1'b0;  // the bug
            end else begin : g_link
                assign chain_in[i] = borrow[i];
            end
            full_subtractor u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .bin (chain_in[i]),
                .d   (y[i]),
                .bout(borrow[i+1])
            );
        end
    endgenerate

    assign co   = borrow[W];
    assign ovf  = chain_in[W-1] ^ borrow[W];
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

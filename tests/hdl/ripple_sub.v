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
module ripple_sub #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    input  wire         cin,
    output wire [W-1:0] y,
    output wire         co,
    output wire         ovf,
    output wire         zero,
    output wire         neg
);
    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            wire borrow_in;   // borrow into bit i
            wire borrow_out;  // borrow out of bit i
            if (i == 0) begin : g_first
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

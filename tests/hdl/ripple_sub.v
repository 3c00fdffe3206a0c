// ripple_sub: W-bit two's-complement ripple-BORROW subtractor, a - b - cin, built from
// full_subtractor cells chained in a generate loop (no `-` operator). cin is a borrow-in.
//   y    = (a - b - cin) mod 2^W
//   co   = borrow out of bit W-1 (1 = a borrow was needed, i.e. a < b + cin unsigned)
//   ovf  = borrow into the MSB xor borrow out of the MSB. This is the adder rule
//          "carry into MSB xor carry out" rewritten for a + ~b + (1 - cin), whose carry at
//          every position is NOT the borrow there (common practice).
//   zero = all result bits are 0
//   neg  = result MSB
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
    // borrow[i] is the borrow into bit i; borrow[W] is the borrow out of the word.
    wire [W:0] borrow;
    assign borrow[0] = cin;

    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            full_subtractor u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .bin (borrow[i]),
                .d   (y[i]),
                .bout(borrow[i+1])
            );
        end
    endgenerate

    assign co   = borrow[W];
    assign ovf  = borrow[W-1] ^ borrow[W];
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

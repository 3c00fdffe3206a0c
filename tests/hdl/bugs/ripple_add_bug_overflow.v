// ripple_add_bug_overflow: copy of ripple_add with ONE deliberate bug, for testing
// that vector sets find it.
// BUG: ovf is the raw carry out (the UNSIGNED overflow rule) instead of carry into the MSB
// xor carry out of the MSB.
// EXPOSED BY: the corners where signed overflow and carry disagree: carry without overflow
// (e.g. -1 + 1 = 0 has co = 1 but ovf must be 0) and overflow without carry (e.g. MAX + 1,
// or MAX + 0 with cin = 1: ovf must be 1 while co = 0).
//
// The reference unit's own description follows; the bug above overrides it.
// ripple_add: W-bit two's-complement ripple-carry adder with carry-in, built from full_adder
// cells chained in a generate loop (no `+` operator).
//   y    = (a + b + cin) mod 2^W
//   co   = raw carry out of bit W-1
//   ovf  = carry into the MSB xor carry out of the MSB (two's-complement overflow,
//          common practice; at W = 1 the carry into the MSB is cin itself)
//   zero = all result bits are 0 (the only two's-complement zero)
//   neg  = result MSB
module ripple_add_bug_overflow #(
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
    // carry[i] is the carry into bit i; carry[W] is the carry out of the word.
    wire [W:0] carry;
    assign carry[0] = cin;

    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            full_adder u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .cin (carry[i]),
                .s   (y[i]),
                .cout(carry[i+1])
            );
        end
    endgenerate

    assign co   = carry[W];
    assign ovf  = carry[W];  // the bug: should be carry[W-1] ^ carry[W]
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

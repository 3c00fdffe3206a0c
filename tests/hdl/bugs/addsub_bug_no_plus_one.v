// addsub_bug_no_plus_one: copy of addsub_unit with ONE deliberate bug, for testing
// that vector sets find it.
// BUG: the adder carry-in is tied to 0 instead of mode, so subtract mode computes a + ~b =
// a - b - 1 (the "+1" of the two's complement negation is forgotten).
// EXPOSED BY: every subtract-mode vector (the result is always one too small), e.g. 0 - 0
// gives 11..1; add mode is unaffected.
//
// The reference unit's own description follows; the bug above overrides it.
// addsub_unit: W-bit two's-complement add/subtract unit. Every bit of b is XORed with mode
// and mode drives the adder's carry-in, so mode = 0 gives a + b and mode = 1 gives
// a + ~b + 1 = a - b (common practice). Built from full_adder cells; no separate carry-in.
//   y    = a + b (mode 0) or a - b (mode 1), mod 2^W
//   co   = the raw adder carry out in both modes, so in subtract mode co = NOT borrow
//          (co = 1 means a >= b unsigned); an arithvec spec declares carry_out = "carry"
//   ovf  = carry into the MSB xor carry out of the MSB
//   zero = all result bits are 0
//   neg  = result MSB
module addsub_bug_no_plus_one #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    input  wire         mode,
    output wire [W-1:0] y,
    output wire         co,
    output wire         ovf,
    output wire         zero,
    output wire         neg
);
    wire [W-1:0] b_eff = b ^ {W{mode}};
    wire [W:0]   carry;
    assign carry[0] = 1'b0;  // the bug: should be mode

    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            full_adder u_cell (
                .a   (a[i]),
                .b   (b_eff[i]),
                .cin (carry[i]),
                .s   (y[i]),
                .cout(carry[i+1])
            );
        end
    endgenerate

    assign co   = carry[W];
    assign ovf  = carry[W-1] ^ carry[W];
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

// addsub_bug_carry_convention: copy of addsub_unit with ONE deliberate bug, for testing
// that vector sets find it.
// BUG: co reports the BORROW in subtract mode (co = raw carry xor mode) although the unit is
// documented (and its spec declares carry_out = "carry") as reporting the raw adder carry.
// EXPOSED BY: every subtract-mode vector (co is inverted whenever mode = 1), e.g. 0 - 0 (raw
// carry 1, the bug gives 0); add mode is unaffected. Any subtract vector checked under the
// declared carry_out convention catches it.
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
// The carries are per-bit scalar wires chained by name (see ripple_add.v for why).
module addsub_bug_carry_convention #(
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
    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            wire b_eff = b[i] ^ mode;  // b, or ~b when subtracting
            wire carry_in;             // carry into bit i
            wire carry_out;            // carry out of bit i
            if (i == 0) begin : g_first
                assign carry_in = mode;
            end else begin : g_chain
                assign carry_in = g_bit[i-1].carry_out;
            end
            full_adder u_cell (
                .a   (a[i]),
                .b   (b_eff),
                .cin (carry_in),
                .s   (y[i]),
                .cout(carry_out)
            );
        end
    endgenerate

    assign co   = g_bit[W-1].carry_out ^ mode;  // the bug: should be g_bit[W-1].carry_out
    assign ovf  = g_bit[W-1].carry_in ^ g_bit[W-1].carry_out;
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

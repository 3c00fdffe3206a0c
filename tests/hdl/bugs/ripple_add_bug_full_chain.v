// ripple_add_bug_full_chain: copy of ripple_add with ONE deliberate bug, for testing
// that vector sets find it.
// The copy adds a carry-skip path for the whole word, as a faster adder would: when every
// bit propagates (a ^ b all ones) the carry out is taken from the skip mux instead of the
// end of the ripple chain. In a correct carry-skip adder the skip mux's data input is the
// carry-in of the skipped block, here cin.
// BUG: the skip mux's data input is mis-wired to bit 0's generate signal a[0] & b[0]
// instead of cin. Whenever the skip is selected bit 0 propagates, so a[0] & b[0] = 0: co
// reads 0 where it must be cin. co (and ovf, which uses co) are therefore wrong exactly when
// all W bits propagate AND cin = 1, i.e. the full-length carry chain started by the
// carry-in; y is never wrong.
// EXPOSED BY: the corner "carry chain of length W from cin": b = ~a with cin = 1 (e.g.
// 0 + 11..1 + 1). Probability that one uniform random vector (a, b, cin) hits it:
// 2^-W (all bits propagate) * 1/2 (cin = 1) = 2^-(W+1); at W = 32 that is
// 2^-33 ~ 1.2e-10, so a million uniform vectors expose it with probability ~ 1.2e-4.
// At W = 4 exhaustive simulation finds it on 16 of the 512 vectors.
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
// Each bit's carries are scalar wires inside its generate block, chained by name, rather
// than one (W+1)-bit vector: Icarus 11 re-evaluates every reader of a vector net when any
// bit of it changes, which made a 64-bit ripple about 12 times slower to simulate (observed).
module ripple_add_bug_full_chain #(
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
            wire carry_in;   // carry into bit i
            wire carry_out;  // carry out of bit i
            if (i == 0) begin : g_first
                assign carry_in = cin;
            end else begin : g_chain
                assign carry_in = g_bit[i-1].carry_out;
            end
            full_adder u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .cin (carry_in),
                .s   (y[i]),
                .cout(carry_out)
            );
        end
    endgenerate

    // Whole-word skip: when every bit propagates, take the carry out from the skip mux.
    wire all_propagate = &(a ^ b);
    wire skip_in       = a[0] & b[0];  // the bug: should be cin
    wire carry_out     = all_propagate ? skip_in : g_bit[W-1].carry_out;

    assign co   = carry_out;
    assign ovf  = g_bit[W-1].carry_in ^ carry_out;
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

// sat_add_bug_one_past: copy of sat_add with ONE deliberate bug, for testing that vector
// sets find it.
// BUG: the positive-overflow detector misses a wrapped sum of exactly 10..0 (it requires a
// non-zero low part, as a detector sharing the zero tree of the low W-1 bits might), so
// T = max + 1 passes through as min with sat = 0.
// EXPOSED BY: sat.boundary[one_past_max] only: T = 2^(W-1) exactly. A uniform random pair
// hits it with probability (2^(W-1) - 1) / 2^(2W) < 2^-(W+1): 2^-33 at W = 32, so a million
// random vectors miss it with probability above 0.9998 (simple counting).
//
// The reference unit's own description follows; the bug above overrides it.
// sat_add: W-bit two's-complement saturating adder: a ripple of full_adder cells, an
// overflow detector on the sign bits and a clamp multiplexer (no `+` operator).
//   y    = a + b clamped to [-2^(W-1), 2^(W-1) - 1]
//   sat  = the sum was clamped
//   zero = all result bits are 0
//   neg  = result MSB
// Spec: operation = "add_sat", encoding = "twos" (tests/sim_e2e/sat.rs).
module sat_add_bug_one_past #(
    parameter W = 32
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire [W-1:0] y,
    output wire         sat,
    output wire         zero,
    output wire         neg
);
    wire [W-1:0] sum;
    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            wire carry_in;
            wire carry_out;
            if (i == 0) begin : g_first
                assign carry_in = 1'b0;
            end else begin : g_chain
                assign carry_in = g_bit[i-1].carry_out;
            end
            full_adder u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .cin (carry_in),
                .s   (sum[i]),
                .cout(carry_out)
            );
        end
    endgenerate

    // Two's-complement overflow of the wrapped sum: both operands of one sign, the sum of the
    // other (common practice, no source).
    wire pos_ovf = ~a[W-1] & ~b[W-1] & sum[W-1] & (|sum[W-2:0]);
    wire neg_ovf = a[W-1] & b[W-1] & ~sum[W-1];
    assign sat  = pos_ovf | neg_ovf;
    wire [W-1:0] max_code = {1'b0, {(W-1){1'b1}}};
    wire [W-1:0] min_code = {1'b1, {(W-1){1'b0}}};
    assign y    = pos_ovf ? max_code : (neg_ovf ? min_code : sum);
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

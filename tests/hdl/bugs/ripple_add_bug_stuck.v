// ripple_add_bug_stuck: copy of ripple_add with ONE deliberate bug, for testing
// that vector sets find it.
// BUG: result bit STUCK = (W-1)/2 is stuck at 0 (bit 1 at W = 4, bit 0 at W = 1). The stuck
// net is the one driving the y port and the zero flag, as a stuck-at fault on a cell's sum
// output would be; the carry chain is intact.
// EXPOSED BY: any vector whose true sum has a 1 in bit (W-1)/2, e.g. the walking-ones
// corners (a = 1 << k, b = 0) or all-ones results (0 + (-1)). About half of all uniform
// vectors expose it.
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
module ripple_add_bug_stuck #(
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
    localparam STUCK = (W - 1) / 2;

    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            wire carry_in;   // carry into bit i
            wire carry_out;  // carry out of bit i
            // The stuck bit's cell output is cut off from y and feeds nothing.
            /* verilator lint_off UNUSEDSIGNAL */
            wire sum;        // the cell's sum output
            /* verilator lint_on UNUSEDSIGNAL */
            if (i == 0) begin : g_first
                assign carry_in = cin;
            end else begin : g_chain
                assign carry_in = g_bit[i-1].carry_out;
            end
            full_adder u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .cin (carry_in),
                .s   (sum),
                .cout(carry_out)
            );
            if (i == STUCK) begin : g_stuck
                assign y[i] = 1'b0;  // the bug: should be sum
            end else begin : g_ok
                assign y[i] = sum;
            end
        end
    endgenerate

    assign co   = g_bit[W-1].carry_out;
    assign ovf  = g_bit[W-1].carry_in ^ g_bit[W-1].carry_out;
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

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
module ripple_add #(
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

    assign co   = g_bit[W-1].carry_out;
    assign ovf  = g_bit[W-1].carry_in ^ g_bit[W-1].carry_out;
    assign zero = ~|y;
    assign neg  = y[W-1];
endmodule

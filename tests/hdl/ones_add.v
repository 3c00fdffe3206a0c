// ones_add: W-bit one's-complement adder with end-around carry (common practice, as in the
// Internet checksum, RFC 1071). Two ripple passes of full_adder cells, so there is no
// combinational loop: pass 1 computes a + b with carry-in 0; its carry out (the end-around
// carry) is the carry-in of pass 2, which adds it to pass 1's sum (an incrementer: the
// cells' b inputs are 0).
//   y    = (a + b + eac) mod 2^W where eac is pass 1's carry out
//   co   = eac, the end-around carry
//   ovf  = operands have the same sign and the result's sign differs, which for this adder
//          is exactly "the true sum lies outside +-(2^(W-1) - 1)" (checked exhaustively for
//          W = 1..7 by tests/hdl/selfcheck)
//   zero = result value is zero: +0 (00..0) or -0 (11..1)
//   neg  = result MSB
// Pass 2 cannot carry out: pass 1's sum is at most 2^(W+1) - 2, so when eac = 1 the low W
// bits are at most 2^W - 2 and adding 1 stays below 2^W.
// The carries are per-bit scalar wires chained by name (see ripple_add.v for why).
module ones_add #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire [W-1:0] y,
    output wire         co,
    output wire         ovf,
    output wire         zero,
    output wire         neg
);
    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            wire first_sum;         // pass 1 sum bit
            wire first_carry_in;    // pass 1 carry into bit i
            wire first_carry_out;   // pass 1 carry out of bit i
            wire second_carry_in;   // pass 2 carry into bit i
            // Pass 2's carry out of the MSB is always 0 (see above) and so feeds nothing.
            /* verilator lint_off UNUSEDSIGNAL */
            wire second_carry_out;  // pass 2 carry out of bit i
            /* verilator lint_on UNUSEDSIGNAL */
            if (i == 0) begin : g_first
                assign first_carry_in  = 1'b0;
                assign second_carry_in = g_bit[W-1].first_carry_out;  // the end-around carry
            end else begin : g_chain
                assign first_carry_in  = g_bit[i-1].first_carry_out;
                assign second_carry_in = g_bit[i-1].second_carry_out;
            end
            full_adder u_first (
                .a   (a[i]),
                .b   (b[i]),
                .cin (first_carry_in),
                .s   (first_sum),
                .cout(first_carry_out)
            );
            full_adder u_second (
                .a   (first_sum),
                .b   (1'b0),
                .cin (second_carry_in),
                .s   (y[i]),
                .cout(second_carry_out)
            );
        end
    endgenerate

    assign co   = g_bit[W-1].first_carry_out;
    assign ovf  = ~(a[W-1] ^ b[W-1]) & (y[W-1] ^ a[W-1]);
    assign zero = (~|y) | (&y);
    assign neg  = y[W-1];
endmodule

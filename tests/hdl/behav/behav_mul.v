// behav_mul: behavioural W x W multiplier with the full 2W-bit product, written with the
// language's own `*`, for cross-checking arithvec's golden model of mul.
// SIGNED = 1: two's complement (signedness = "signed"), SIGNED = 0: unsigned.
//   p = a * b (2W bits, never overflows); zero = p is 0; neg = p's MSB.
//
// Language rules this model relies on (IEEE 1364-2005, clause 5 "Expressions"; the clause
// number is certain, the subsection numbers are from memory):
//   5.1.5  arithmetic operators: * on unsigned operands wraps modulo 2^(expression width).
//   5.4.1  expression bit lengths: the operands of * are extended to the assignment target's
//          2W bits, so no product bit is lost.
//   5.5.1-5.5.2 types: with both operands $signed the product is signed and the operands are
//          sign-extended to 2W bits first.
module behav_mul #(
    parameter W = 16,
    parameter SIGNED = 1
) (
    input  wire [W-1:0]   a,
    input  wire [W-1:0]   b,
    output wire [2*W-1:0] p,
    output wire           zero,
    output wire           neg
);
    /* verilator lint_off WIDTH */
    wire signed [2*W-1:0] p_signed = $signed(a) * $signed(b);
    wire [2*W-1:0] p_unsigned = a * b;
    /* verilator lint_on WIDTH */
    assign p    = (SIGNED != 0) ? p_signed : p_unsigned;
    assign zero = p == {2*W{1'b0}};
    assign neg  = p[2*W-1];
endmodule

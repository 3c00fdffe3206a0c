// behav_div: behavioural W-bit divider written with the language's own `/` and `%`, for
// cross-checking arithvec's golden model of divrem (rounding = "truncate",
// div_by_zero = "all_ones").
// SIGNED = 1: two's complement, SIGNED = 0: unsigned.
//   q = a / b, r = a % b; dz = b is 0; ovf = a is the most negative value and b is -1.
// Two cases are written out because the language leaves them to the arithvec convention:
//   b = 0: Verilog's / and % give all-x (IEEE 1364-2005 5.1.5), so q = all ones, r = a.
//   min / -1 (SIGNED): the true quotient 2^(W-1) does not fit; q = min, r = 0 (the wrapped
//   value), without asking the simulator to divide (a 64-bit host division would trap).
//
// Language rules this model relies on (IEEE 1364-2005, clause 5 "Expressions"; the clause
// number is certain, the subsection numbers are from memory):
//   5.1.5  arithmetic operators: integer division truncates toward zero; the result of %
//          takes the sign of the first operand.
//   5.5.1-5.5.2 types: with both operands $signed, / and % are signed operations.
module behav_div #(
    parameter W = 16,
    parameter SIGNED = 1
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire [W-1:0] q,
    output wire [W-1:0] r,
    output wire         dz,
    output wire         ovf
);
    wire [W-1:0] min_value = {1'b1, {(W-1){1'b0}}};
    wire [W-1:0] minus_one = {W{1'b1}};
    assign dz  = b == {W{1'b0}};
    assign ovf = (SIGNED != 0) && a == min_value && b == minus_one;
    // Divide only by a safe divisor, so no x reaches the muxes below.
    wire [W-1:0] safe_b = (dz || ovf) ? {{(W-1){1'b0}}, 1'b1} : b;
    wire signed [W-1:0] q_signed = $signed(a) / $signed(safe_b);
    wire signed [W-1:0] r_signed = $signed(a) % $signed(safe_b);
    // The unsigned operands are zero-extended by one bit: Icarus Verilog 11.0 divides some
    // 100-bit all-ones dividends wrongly at their own width (seen here: 2^100 - 1 / 1 gives
    // 0, while the 101-bit zero-extended division gives 2^100 - 1).
    wire [W:0] q_wide = {1'b0, a} / {1'b0, safe_b};
    wire [W:0] r_wide = {1'b0, a} % {1'b0, safe_b};
    wire [W-1:0] q_unsigned = q_wide[W-1:0];
    wire [W-1:0] r_unsigned = r_wide[W-1:0];
    assign q = dz ? {W{1'b1}} : ovf ? min_value : (SIGNED != 0) ? q_signed : q_unsigned;
    assign r = dz ? a : ovf ? {W{1'b0}} : (SIGNED != 0) ? r_signed : r_unsigned;
endmodule

// behav_sub: behavioural W-bit subtractor y = a - b - cin (cin is a borrow-in) written with the
// language's own operators, for cross-checking simulators and the structural units.
// SIGNED = 1: two's complement, SIGNED = 0: unsigned.
//   co = borrow out (1 = a - b - cin < 0 on the unsigned patterns); ovf = true difference not
//   representable; zero = result is 0; neg = result MSB.
// arithvec conventions: carry_out = "borrow", carry_in = "borrow".
//
// Language rules this model relies on (IEEE 1364-2005, clause 5 "Expressions"; the clause
// number is certain, the subsection numbers are from memory):
//   5.1.5  arithmetic operators: + and - on unsigned operands wrap modulo 2^(expression width).
//   5.1.7  relational operators: the comparison is signed only when both operands are signed.
//   5.4.1  expression bit lengths: the operands of + and - are context-determined, extended
//          to the widest of the operands and the assignment target, so a (W+1)-bit target
//          keeps the carry of two W-bit operands.
//   5.5.1  expression types: an expression is signed only if every operand is signed;
//          concatenations and bit selects are unsigned, hence $signed({1'b0, cin}) to keep a
//          1-bit carry from turning a signed sum unsigned.
//   5.5.2  evaluation: once the type and width are known, signed operands are sign-extended
//          (and unsigned ones zero-extended) to the expression width; $signed() and
//          $unsigned() (described in 5.5) change only the type, not the bits.
// The WIDTH lint of Verilator flags exactly these implicit extensions; they are what the
// model means, so WIDTH is waived around the arithmetic lines only.
module behav_sub #(
    parameter W = 16,
    parameter SIGNED = 1
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
    // Two's-complement range limits in W+2 bits, wide enough for every true result here.
    localparam signed [W+1:0] ZERO = 0;
    localparam signed [W+1:0] ONE = 1;
    localparam signed [W+1:0] MAXV = (ONE <<< (W - 1)) - ONE;
    localparam signed [W+1:0] MINV = ZERO - (ONE <<< (W - 1));

    // Overflow: the true result is not representable. Two's complement: outside
    // MINV..MAXV. Unsigned: above 2^W - 1 (the carry) or below 0 (the borrow), i.e. co.
    /* verilator lint_off WIDTH */
    wire signed [W+1:0] raw = $signed({1'b0, a}) - $signed({1'b0, b}) - $signed({1'b0, cin});
    wire signed [W+1:0] true_diff = $signed(a) - $signed(b) - $signed({1'b0, cin});
    /* verilator lint_on WIDTH */

    assign y    = raw[W-1:0];
    assign co   = raw < ZERO;
    assign ovf  = (SIGNED != 0) ? (true_diff > MAXV || true_diff < MINV) : co;
    assign zero = y == {W{1'b0}};
    assign neg  = y[W-1];
endmodule

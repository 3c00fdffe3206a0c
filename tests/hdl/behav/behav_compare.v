// behav_compare: behavioural W-bit comparator written with the language's relational operators,
// for cross-checking simulators. SIGNED = 1: two's-complement order ($signed operands),
// SIGNED = 0: unsigned order.
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
module behav_compare #(
    parameter W = 16,
    parameter SIGNED = 1
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire         lt,
    output wire         eq,
    output wire         gt
);

    assign lt = (SIGNED != 0) ? ($signed(a) < $signed(b)) : (a < b);
    assign eq = a == b;
    assign gt = (SIGNED != 0) ? ($signed(a) > $signed(b)) : (a > b);
endmodule

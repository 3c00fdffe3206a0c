// select_alu_packed: the select ALU of select_alu.v with its arithmetic flags packed in one
// active-low-zero vector (invented unit): nzcv = {n, z, co, v}, so bit 0 is overflow, bit 1
// carry out (borrow of sub and negate), bit 2 zero (active low: 0 when the result is zero,
// during add, sub and negate), bit 3 negative. lt, eq and gt stay separate ports.
// BUG selects an injected bug for the tests (0 = none):
//   1: the zero flag's polarity inverted (active high instead of active low)
//   2: the carry and overflow bits swapped in the packed vector (nzcv = {n, z, v, co})
module select_alu_packed #(
    parameter W = 8,
    parameter BUG = 0
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    input  wire [3:0]   op,
    output wire [W-1:0] rd,
    output wire [3:0]   nzcv,
    output wire         lt,
    output wire         eq,
    output wire         gt
);
    wire co, v, z, n;
    select_alu #(.W(W), .ZERO_ACTIVE_LOW(1), .BUG(BUG == 1 ? 1 : 0)) alu (
        .a(a), .b(b), .op(op), .rd(rd), .co(co), .v(v), .z(z), .n(n),
        .lt(lt), .eq(eq), .gt(gt)
    );
    assign nzcv = (BUG == 2) ? {n, z, v, co} : {n, z, co, v};
endmodule

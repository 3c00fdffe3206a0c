// select_alu: W-bit two's-complement ALU behind a 4-bit operation select (invented unit).
//   op 0x0: rd = a + b        op 0x1: rd = a - b
//   op 0x5: compare a, b (lt, eq, gt; signed)      op 0x6: rd = -a
// Flags of add, sub and negate: co (carry out of add; borrow of sub and negate, 0 - a),
// v (signed overflow), z (result zero), n (result sign). During compare rd and the
// arithmetic flags are 0; during add, sub and negate lt, eq and gt are 0.
// ZERO_ACTIVE_LOW = 1 makes z active low (0 when the result is zero, during add, sub and
// negate). BUG selects an injected bug for the tests (0 = none):
//   1: the zero flag's polarity inverted against ZERO_ACTIVE_LOW
module select_alu #(
    parameter W = 8,
    parameter ZERO_ACTIVE_LOW = 0,
    parameter BUG = 0
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    input  wire [3:0]   op,
    output reg  [W-1:0] rd,
    output reg          co,
    output reg          v,
    output reg          z,
    output reg          n,
    output reg          lt,
    output reg          eq,
    output reg          gt
);
    reg [W:0] wide;
    always @* begin
        rd = {W{1'b0}}; co = 1'b0; v = 1'b0; z = 1'b0; n = 1'b0;
        lt = 1'b0; eq = 1'b0; gt = 1'b0;
        wide = {(W+1){1'b0}};
        case (op)
            4'h0: begin
                wide = {1'b0, a} + {1'b0, b};
                rd = wide[W-1:0];
                co = wide[W];
                v = (a[W-1] == b[W-1]) && (rd[W-1] != a[W-1]);
            end
            4'h1: begin
                wide = {1'b0, a} - {1'b0, b};
                rd = wide[W-1:0];
                co = wide[W];
                v = (a[W-1] != b[W-1]) && (rd[W-1] != a[W-1]);
            end
            4'h6: begin
                wide = {(W+1){1'b0}} - {1'b0, a};
                rd = wide[W-1:0];
                co = wide[W];
                v = a[W-1] && (rd[W-1] == 1'b1);
            end
            4'h5: begin
                lt = $signed(a) < $signed(b);
                eq = a == b;
                gt = $signed(a) > $signed(b);
            end
            default: ;
        endcase
        if (op == 4'h0 || op == 4'h1 || op == 4'h6) begin
            z = (rd == 0) ^ (BUG == 1) ^ (ZERO_ACTIVE_LOW == 1);
            n = rd[W-1];
        end
    end
endmodule

// behav_shift: behavioural W-bit shifter and rotator written with the language's own shift
// operators, for cross-checking arithvec's golden model of shl, shr, sra, rol and ror.
// OP = 0 shl, 1 shr, 2 sra, 3 rol, 4 ror. The amount port is AW bits wide.
//   y = shifted or rotated a; co = the bit shifted (rotated) out last, 0 for amount 0;
//   zero = y is 0; neg = y's MSB.
// arithvec convention: large_amount = "saturate" (an amount of W or more shifts every bit out).
//
// Language rules this model relies on (IEEE 1364-2005, clause 5 "Expressions"; the clause
// number is certain, the subsection numbers are from memory):
//   5.1.12 shift operators: << and >> fill the vacated bits with 0; >>> fills with the sign bit
//          when the left operand is signed; the right operand is always read as unsigned, and
//          a shift by the operand's width or more leaves only fill bits.
//   5.4.1  expression bit lengths: a shift's width is its left operand's, so the extra bit of
//          {1'b0, a} and {a, 1'b0} catches the last bit shifted out.
module behav_shift #(
    parameter W = 16,
    parameter AW = 5,
    parameter OP = 0
) (
    input  wire [W-1:0]  a,
    input  wire [AW-1:0] sh,
    output reg  [W-1:0]  y,
    output reg           co,
    output wire          zero,
    output wire          neg
);
    wire signed [W:0] a_low = {a, 1'b0};
    /* verilator lint_off WIDTH */
    wire [AW-1:0] k = sh % W;
    /* verilator lint_on WIDTH */
    always @* begin
        case (OP)
            0: {co, y} = {1'b0, a} << sh;
            1: {y, co} = {a, 1'b0} >> sh;
            2: {y, co} = a_low >>> sh;
            3: begin
                y  = (a << k) | (a >> (W - k));
                co = (sh != 0) & y[0];
            end
            default: begin
                y  = (a >> k) | (a << (W - k));
                co = (sh != 0) & y[W-1];
            end
        endcase
    end
    assign zero = y == {W{1'b0}};
    assign neg  = y[W-1];
endmodule

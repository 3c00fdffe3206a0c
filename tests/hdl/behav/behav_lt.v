// behav_lt: a comparator written as a user writes one, with the language's relational
// operators and nothing else (`assign lt = a < b`), for grading what Yosys makes of it.
// SIGNED = 1 compares as two's complement, SIGNED = 0 as unsigned (IEEE 1364-2005 5.1.7,
// from memory: the comparison is signed only when both operands are signed).
module behav_lt #(
    parameter W = 8,
    parameter SIGNED = 0
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

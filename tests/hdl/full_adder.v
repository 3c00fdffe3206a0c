// full_adder: one-bit full-adder cell, the building block of every structural adder here.
// Textbook equations (common practice, no source): s = a ^ b ^ cin,
// cout = (a & b) | (cin & (a ^ b)), i.e. generate a&b, propagate a^b.
module full_adder (
    input  wire a,
    input  wire b,
    input  wire cin,
    output wire s,
    output wire cout
);
    wire propagate = a ^ b;
    assign s    = propagate ^ cin;
    assign cout = (a & b) | (cin & propagate);
endmodule

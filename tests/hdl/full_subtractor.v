// full_subtractor: one-bit full-subtractor cell computing a - b - bin.
// Textbook equations (common practice, no source): d = a ^ b ^ bin,
// bout = (~a & b) | (~(a ^ b) & bin), i.e. generate ~a&b, propagate ~(a^b), kill a&~b.
module full_subtractor (
    input  wire a,
    input  wire b,
    input  wire bin,
    output wire d,
    output wire bout
);
    wire differ = a ^ b;
    assign d    = differ ^ bin;
    assign bout = (~a & b) | (~differ & bin);
endmodule

// behav_offset_sub: behavioural W-bit offset-binary (excess-2^(W-1)) subtractor with a zero
// flag, for test top-up: random vectors rarely make the result zero, so stuck-at faults on the
// zero detector's inputs go undetected until top-up adds vectors for them.
//   Offset binary: code = value + 2^(W-1), i.e. two's complement with the MSB inverted (common
//   practice, no source). So y = (a - b) with the MSB inverted is the code of the difference
//   (wrapping modulo 2^W like the two's-complement difference it mirrors).
//   zero = the result's value is 0, i.e. its code is 10...0.
// Language rules: IEEE 1364-2005 clause 5 "Expressions" (subtraction wraps modulo 2^W at the
// W-bit target; from memory).
module behav_offset_sub #(
    parameter W = 24
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire [W-1:0] y,
    output wire         zero
);
    wire [W-1:0] d = a - b;
    assign y = {~d[W-1], d[W-2:0]};
    assign zero = y == {1'b1, {(W-1){1'b0}}};
endmodule

// add_bundle: a W-bit two's-complement adder written the way published RTL often is, with
// its ports bundled: both operands packed in one input {a, b}, the carry out and the sum in
// one output {co, sum}, and the flags packed in one output nzcv = {n, z, c, v}.
//   s    = {co, sum}: sum = (a + b + cin) mod 2^W, co = the raw carry out
//   nzcv = {n, z, c, v}: n = sum MSB, z = (sum == 0), c = co again, v = two's-complement
//          overflow (operands of one sign, sum of the other; common practice)
// The spec maps the roles to bit ranges (see tests/hdl/shapes/add_bundle.toml); nzcv[1] (c)
// is left unmapped, a gap the checker ignores.
module add_bundle #(parameter W = 16) (
  input  [2*W-1:0] ab,
  input            cin,
  output [W:0]     s,
  output [3:0]     nzcv
);
  wire [W-1:0] a = ab[2*W-1:W];
  wire [W-1:0] b = ab[W-1:0];
  assign s = {1'b0, a} + {1'b0, b} + {{W{1'b0}}, cin};
  wire [W-1:0] sum = s[W-1:0];
  assign nzcv = {sum[W-1], sum == {W{1'b0}}, s[W],
                 (a[W-1] == b[W-1]) && (sum[W-1] != a[W-1])};
endmodule

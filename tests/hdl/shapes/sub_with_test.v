// A behavioural W-bit two's-complement subtractor with borrow-in, in a file that also carries
// its own test module, as many real DUT files do. The test module finishes the simulation at
// time 0, so a testbench that lets it run as a second top ends before applying any vector.
`timescale 1ns / 1ps
module sub_with_test #(parameter W = 16) (
  input [W-1:0] a, input [W-1:0] b, input bin,
  output [W-1:0] d, output bout, output v, output z, output n
);
  wire [W:0] raw = {1'b0, a} - {1'b0, b} - {{W{1'b0}}, bin};
  assign d = raw[W-1:0];
  assign bout = raw[W];
  assign v = (a[W-1] != b[W-1]) && (d[W-1] != a[W-1]);
  assign z = (d == {W{1'b0}});
  assign n = d[W-1];
endmodule

module sub_with_test_smoke;
  reg [15:0] a = 16'd5, b = 16'd3;
  wire [15:0] d;
  wire bout, v, z, n;
  sub_with_test u (.a(a), .b(b), .bin(1'b0), .d(d), .bout(bout), .v(v), .z(z), .n(n));
  initial begin
    #0 $display("sub_with_test_smoke: extra top ran");
    $finish;
  end
endmodule

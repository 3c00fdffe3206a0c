// serial_add: W-bit unsigned adder that adds one bit per cycle (LSB first), with a
// valid/ready handshake. A vector is accepted at an active edge where in_valid and in_ready
// are high; W cycles later out_valid is high for one cycle with y = a + b mod 2^W and co the
// carry out. in_ready is high when idle and in the last cycle of a sum, so back-to-back
// vectors take W cycles each; it falls while a sum is in progress. rst_n (active low,
// synchronous) empties the unit.
// BUG = 1: a result is dropped when ready falls, that is when the next vector is accepted in
//          the cycle the sum completes.
module serial_add #(
    parameter W = 8,
    parameter BUG = 0
) (
    input  wire         clk,
    input  wire         rst_n,
    input  wire         in_valid,
    output wire         in_ready,
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output reg  [W-1:0] y,
    output reg          co,
    output reg          out_valid
);
    reg         busy;
    reg [W-1:0] ra, rb, acc;
    reg         c;
    reg [31:0]  n;
    wire        last = busy && (n == W - 1);
    wire        bit_sum = ra[0] ^ rb[0] ^ c;
    wire        bit_carry = (ra[0] & rb[0]) | (c & (ra[0] ^ rb[0]));
    wire        take = in_valid && in_ready;
    assign in_ready = !busy || last;

    always @(posedge clk) begin
        if (!rst_n) begin
            busy <= 1'b0; out_valid <= 1'b0; n <= 32'd0; c <= 1'b0;
            ra <= {W{1'b0}}; rb <= {W{1'b0}}; acc <= {W{1'b0}};
            y <= {W{1'b0}}; co <= 1'b0;
        end else begin
            out_valid <= 1'b0;
            if (busy) begin
                acc <= {bit_sum, acc[W-1:1]};
                c <= bit_carry;
                ra <= ra >> 1;
                rb <= rb >> 1;
                n <= n + 32'd1;
                if (last) begin
                    busy <= 1'b0;
                    y <= {bit_sum, acc[W-1:1]};
                    co <= bit_carry;
                    out_valid <= !(BUG == 1 && take);
                end
            end
            if (take) begin
                ra <= a; rb <= b; c <= 1'b0; n <= 32'd0; acc <= {W{1'b0}};
                busy <= 1'b1;
            end
        end
    end
endmodule

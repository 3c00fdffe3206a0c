// pipe_addsub: W-bit two's-complement add/subtract unit registered in three stages
// (inputs, sum, outputs), so a vector's results appear 3 cycles after it is applied and a new
// vector can be applied every cycle. mode = 0 gives a + b, mode = 1 a - b (b inverted, mode
// as the carry-in; common practice). co is the raw adder carry (NOT borrow when
// subtracting), ovf the signed overflow, zero and neg from the result. rst_n (active low,
// synchronous) clears every register.
// BUG = 1: the sum stage uses the previous vector's mode (the pipeline keeps the previous
//          operation's control for one stage).
// BUG = 2: reset leaves the co register unassigned (x until the first result).
module pipe_addsub #(
    parameter W = 8,
    parameter BUG = 0
) (
    input  wire         clk,
    input  wire         rst_n,
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    input  wire         mode,
    output reg  [W-1:0] y,
    output reg          co,
    output reg          ovf,
    output reg          zero,
    output reg          neg
);
    reg [W-1:0] a1, b1;
    reg         m1, m1_prev;
    reg [W-1:0] s2;
    reg         c2, v2;
    wire         m_use = (BUG == 1) ? m1_prev : m1;
    wire [W-1:0] b_eff = b1 ^ {W{m_use}};
    wire [W:0]   sum = {1'b0, a1} + {1'b0, b_eff} + {{W{1'b0}}, m_use};

    always @(posedge clk) begin
        if (!rst_n) begin
            a1 <= {W{1'b0}}; b1 <= {W{1'b0}}; m1 <= 1'b0; m1_prev <= 1'b0;
            s2 <= {W{1'b0}}; c2 <= 1'b0; v2 <= 1'b0;
            y <= {W{1'b0}}; ovf <= 1'b0; zero <= 1'b0; neg <= 1'b0;
        end else begin
            a1 <= a; b1 <= b; m1 <= mode; m1_prev <= m1;
            s2 <= sum[W-1:0];
            c2 <= sum[W];
            v2 <= (a1[W-1] == b_eff[W-1]) && (sum[W-1] != a1[W-1]);
            y <= s2; ovf <= v2; zero <= ~|s2; neg <= s2[W-1];
        end
    end

    always @(posedge clk) begin
        if (!rst_n) begin
            if (BUG != 2) co <= 1'b0;
        end else begin
            co <= c2;
        end
    end
endmodule

// array_mul: structural W x W unsigned array multiplier, p = a * b (2W bits). Row i adds the
// partial product a[i] & b (shifted left by i) to the running sum with a ripple row of
// full_adder cells (full_adder.v). Rows go over a's bits, where a behavioural `a * b` mapped by
// Yosys sums rows over b's bits, so the two are equal only because multiplication commutes:
// a classic miter that SAT solvers find hard, used to test that `prove` ends "unknown"
// within its conflict budget instead of running on.
module array_mul #(
    parameter W = 16
) (
    input  wire [W-1:0]   a,
    input  wire [W-1:0]   b,
    output wire [2*W-1:0] p
);
    // acc[r*2W +: 2W] is the sum after r rows; carry[r*(W+1) + j] the carry into bit j of row r.
    wire [(W+1)*2*W-1:0] acc;
    wire [W*(W+1)-1:0]   carry;
    assign acc[2*W-1:0] = {2*W{1'b0}};
    genvar i, j, k;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_row
            assign carry[i*(W+1)] = 1'b0;
            for (j = 0; j < W; j = j + 1) begin : g_col
                full_adder fa (
                    .a(acc[i*2*W + i + j]),
                    .b(a[i] & b[j]),
                    .cin(carry[i*(W+1) + j]),
                    .s(acc[(i+1)*2*W + i + j]),
                    .cout(carry[i*(W+1) + j + 1])
                );
            end
            for (k = 0; k < 2*W; k = k + 1) begin : g_pass
                if (k < i) begin : g_low
                    assign acc[(i+1)*2*W + k] = acc[i*2*W + k];
                end else if (k == i + W) begin : g_top
                    assign acc[(i+1)*2*W + k] = carry[i*(W+1) + W];
                end else if (k > i + W) begin : g_high
                    assign acc[(i+1)*2*W + k] = acc[i*2*W + k];
                end
            end
        end
    endgenerate
    assign p = acc[W*2*W +: 2*W];
endmodule

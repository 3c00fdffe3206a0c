// chk_ones_add: checks a one's-complement adder (ports a b y co ovf zero neg) against golden
// answers computed from decoded values. One's-complement addition with end-around carry is
// addition modulo 2^W - 1 (common practice), so with T = value(a) + value(b):
//   y    = the pattern congruent to T modulo 2^W - 1; for T = 0 that is +0 (00..0) only when
//          both operands are +0, else -0 (11..1) (DEVELOPERS.md: +0 comes only from +0 + +0)
//   co   = the end-around carry: the unsigned patterns' sum reaches 2^W
//   ovf  = T outside +-(2^(W-1) - 1); zero = y is +0 or -0; neg = y[W-1].
module chk_ones_add #(
    parameter W = 4,
    parameter SIGNED = 1,
    parameter NRAND = 2000,
    parameter EXH_BITS = 14,
    parameter DIRECTED = 1
);
`include "common.vh"
    localparam signed [BW-1:0] MODULUS = TWO_W - BIG_ONE;
    reg  [W-1:0] a, b;
    wire [W-1:0] y;
    wire         co, ovf, zero, neg;
    `DUT_INST dut (.a(a), .b(b), .y(y), .co(co), .ovf(ovf), .zero(zero), .neg(neg));

    task check;
        reg signed [BW-1:0] t, r;
        reg [W-1:0] ey;
        reg eco, eovf, ezero, eneg;
        begin
            #1;
            t = ones_value(a) + ones_value(b);
            if (t == BIG_ZERO) begin
                ey = (a == 0 && b == 0) ? {W{1'b0}} : {W{1'b1}};
            end else begin
                r = t % MODULUS;
                if (r < BIG_ZERO) r = r + MODULUS;
                ey = r[W-1:0];
            end
            eco   = unsigned_value(a) + unsigned_value(b) >= TWO_W;
            eovf  = (t > HALF - BIG_ONE) || (t < BIG_ONE - HALF);
            ezero = ones_value(ey) == BIG_ZERO;
            eneg  = ey[W-1];
            if ({y, co, ovf, zero, neg} === {ey, eco, eovf, ezero, eneg}) passed = passed + 1;
            else begin
                failed = failed + 1;
                if (failed <= 6) begin
                    $write("  FAIL %s W=%0d a=%h b=%h:", `DUTNAME, W, a, b);
                    $write(" got y=%h co=%b ovf=%b zero=%b neg=%b;", y, co, ovf, zero, neg);
                    $display(" expected y=%h co=%b ovf=%b zero=%b neg=%b",
                             ey, eco, eovf, ezero, eneg);
                end
            end
        end
    endtask

    integer ia, ib, n;
    initial begin
        seed = 5000 + W;
        passed = 0;
        failed = 0;
        if (2 * W <= EXH_BITS) begin
            for (ia = 0; ia < (1 << W); ia = ia + 1)
                for (ib = 0; ib < (1 << W); ib = ib + 1) begin
                    a = ia; b = ib;
                    check;
                end
        end else begin
            if (DIRECTED != 0) begin
                for (ia = 0; ia < 8; ia = ia + 1)
                    for (ib = 0; ib < 8; ib = ib + 1) begin
                        a = special(ia); b = special(ib);
                        check;
                        b = ~a;
                        check;
                    end
            end
            for (n = 0; n < NRAND; n = n + 1) begin
                pick_word(a); pick_partner(a, b);
                check;
            end
        end
        report(2 * W <= EXH_BITS);
    end
endmodule

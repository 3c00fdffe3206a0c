// chk_signmag_add: checks a sign-magnitude adder (ports a b y ovf zero neg) against golden
// answers computed from decoded values, T = value(a) + value(b), M = W - 1 magnitude bits:
//   T = 0: y = a's sign with magnitude 0 (same signs keep the sign; different signs with
//          equal magnitudes take a's sign; there is no zero fix-up)
//   else:  y = sign of T with magnitude |T| mod 2^M (on overflow T has the operands' sign)
//   ovf = |T| > 2^M - 1; zero = y's magnitude is 0; neg = y's sign bit.
module chk_signmag_add #(
    parameter W = 4,
    parameter SIGNED = 1,
    parameter NRAND = 2000,
    parameter EXH_BITS = 14,
    parameter DIRECTED = 1
);
`include "common.vh"
    reg  [W-1:0] a, b;
    wire [W-1:0] y;
    wire         ovf, zero, neg;
    `DUT_INST dut (.a(a), .b(b), .y(y), .ovf(ovf), .zero(zero), .neg(neg));

    task check;
        reg signed [BW-1:0] t, magnitude, wrapped;
        reg [W-1:0] ey;
        reg eovf, ezero, eneg;
        begin
            #1;
            t = signmag_value(a) + signmag_value(b);
            magnitude = (t < BIG_ZERO) ? BIG_ZERO - t : t;
            wrapped = magnitude % HALF;
            ey = wrapped[W-1:0];
            ey[W-1] = (t == BIG_ZERO) ? a[W-1] : (t < BIG_ZERO);
            eovf  = magnitude > HALF - BIG_ONE;
            ezero = signmag_value(ey) == BIG_ZERO;
            eneg  = ey[W-1];
            if ({y, ovf, zero, neg} === {ey, eovf, ezero, eneg}) passed = passed + 1;
            else begin
                failed = failed + 1;
                if (failed <= 6) begin
                    $write("  FAIL %s W=%0d a=%h b=%h:", `DUTNAME, W, a, b);
                    $write(" got y=%h ovf=%b zero=%b neg=%b;", y, ovf, zero, neg);
                    $display(" expected y=%h ovf=%b zero=%b neg=%b",
                             ey, eovf, ezero, eneg);
                end
            end
        end
    endtask

    integer ia, ib, n;
    initial begin
        seed = 6000 + W;
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
                        b = a ^ HALF[W-1:0];  // the same magnitude with the other sign
                        check;
                    end
            end
            for (n = 0; n < NRAND; n = n + 1) begin
                pick_word(a); pick_partner(a, b);
                if (DIRECTED != 0 && ($random(seed) & 7) == 0) b = a ^ HALF[W-1:0];
                check;
            end
        end
        report(2 * W <= EXH_BITS);
    end
endmodule

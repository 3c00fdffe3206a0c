// chk_addsub_unit: checks an add/subtract unit without a carry-in (ports a b mode y co ovf
// zero neg; two's complement) against golden answers computed from decoded values:
// mode 0: T = value(a) + value(b), co = carry of the unsigned sum;
// mode 1: T = value(a) - value(b), co = NOT borrow (the raw carry of a + ~b + 1, the
// "carry" convention); y = T mod 2^W, ovf = T outside the range, zero = (y == 0),
// neg = y[W-1].
module chk_addsub_unit #(
    parameter W = 4,
    parameter SIGNED = 1,
    parameter NRAND = 2000,
    parameter EXH_BITS = 14,
    parameter DIRECTED = 1
);
`include "common.vh"
    reg  [W-1:0] a, b;
    reg          mode;
    wire [W-1:0] y;
    wire         co, ovf, zero, neg;
    `DUT_INST dut (
        .a(a), .b(b), .mode(mode), .y(y), .co(co), .ovf(ovf), .zero(zero), .neg(neg));

    task check;
        reg signed [BW-1:0] t, raw;
        reg [W-1:0] ey;
        reg eco, eovf, ezero, eneg;
        begin
            #1;
            if (mode) begin
                t   = binary_value(a) - binary_value(b);
                raw = unsigned_value(a) - unsigned_value(b);
                eco = !(raw < BIG_ZERO);
            end else begin
                t   = binary_value(a) + binary_value(b);
                raw = unsigned_value(a) + unsigned_value(b);
                eco = raw >= TWO_W;
            end
            ey    = t[W-1:0];
            eovf  = out_of_binary_range(t);
            ezero = ey == 0;
            eneg  = ey[W-1];
            if ({y, co, ovf, zero, neg} === {ey, eco, eovf, ezero, eneg}) passed = passed + 1;
            else begin
                failed = failed + 1;
                if (failed <= 6) begin
                    $write("  FAIL %s W=%0d a=%h b=%h mode=%b:", `DUTNAME, W, a, b, mode);
                    $write(" got y=%h co=%b ovf=%b zero=%b neg=%b;", y, co, ovf, zero, neg);
                    $display(" expected y=%h co=%b ovf=%b zero=%b neg=%b",
                             ey, eco, eovf, ezero, eneg);
                end
            end
        end
    endtask

    integer ia, ib, im, n;
    initial begin
        seed = 3000 + W;
        passed = 0;
        failed = 0;
        if (2 * W + 1 <= EXH_BITS) begin
            for (ia = 0; ia < (1 << W); ia = ia + 1)
                for (ib = 0; ib < (1 << W); ib = ib + 1)
                    for (im = 0; im < 2; im = im + 1) begin
                        a = ia; b = ib; mode = im[0];
                        check;
                    end
        end else begin
            if (DIRECTED != 0) begin
                for (ia = 0; ia < 8; ia = ia + 1)
                    for (ib = 0; ib < 8; ib = ib + 1)
                        for (im = 0; im < 2; im = im + 1) begin
                            a = special(ia); b = special(ib); mode = im[0];
                            check;
                            b = ~a;
                            check;
                            b = a;
                            check;
                        end
            end
            for (n = 0; n < NRAND; n = n + 1) begin
                pick_word(a); pick_partner(a, b); mode = $random(seed);
                check;
            end
        end
        report(2 * W + 1 <= EXH_BITS);
    end
endmodule

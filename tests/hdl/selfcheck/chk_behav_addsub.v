// chk_behav_addsub: checks an add/subtract unit with carry-in (ports a b cin mode y co ovf
// zero neg) under the conventions carry_in = "borrow", carry_out = "borrow", against golden
// answers computed from decoded values:
// mode 0: T = value(a) + value(b) + cin, co = carry of the unsigned sum;
// mode 1: T = value(a) - value(b) - cin, co = borrow (the unsigned difference is negative);
// y = T mod 2^W, ovf = T outside the range, zero = (y == 0), neg = y[W-1].
module chk_behav_addsub #(
    parameter W = 4,
    parameter SIGNED = 1,
    parameter NRAND = 2000,
    parameter EXH_BITS = 14,
    parameter DIRECTED = 1
);
`include "common.vh"
    reg  [W-1:0] a, b;
    reg          cin, mode;
    wire [W-1:0] y;
    wire         co, ovf, zero, neg;
    `DUT_INST dut (
        .a(a), .b(b), .cin(cin), .mode(mode), .y(y), .co(co), .ovf(ovf), .zero(zero),
        .neg(neg));

    task check;
        reg signed [BW-1:0] t, raw, c;
        reg [W-1:0] ey;
        reg eco, eovf, ezero, eneg;
        begin
            #1;
            c = cin ? BIG_ONE : BIG_ZERO;
            if (mode) begin
                t   = binary_value(a) - binary_value(b) - c;
                raw = unsigned_value(a) - unsigned_value(b) - c;
                eco = raw < BIG_ZERO;
            end else begin
                t   = binary_value(a) + binary_value(b) + c;
                raw = unsigned_value(a) + unsigned_value(b) + c;
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
                    $write("  FAIL %s W=%0d a=%h b=%h cin=%b mode=%b:", `DUTNAME, W, a, b, cin, mode);
                    $write(" got y=%h co=%b ovf=%b zero=%b neg=%b;", y, co, ovf, zero, neg);
                    $display(" expected y=%h co=%b ovf=%b zero=%b neg=%b",
                             ey, eco, eovf, ezero, eneg);
                end
            end
        end
    endtask

    integer ia, ib, ic, n;
    initial begin
        seed = 4000 + W;
        passed = 0;
        failed = 0;
        if (2 * W + 2 <= EXH_BITS) begin
            for (ia = 0; ia < (1 << W); ia = ia + 1)
                for (ib = 0; ib < (1 << W); ib = ib + 1)
                    for (ic = 0; ic < 4; ic = ic + 1) begin
                        a = ia; b = ib; cin = ic[0]; mode = ic[1];
                        check;
                    end
        end else begin
            if (DIRECTED != 0) begin
                for (ia = 0; ia < 8; ia = ia + 1)
                    for (ib = 0; ib < 8; ib = ib + 1)
                        for (ic = 0; ic < 4; ic = ic + 1) begin
                            a = special(ia); b = special(ib); cin = ic[0]; mode = ic[1];
                            check;
                            b = ~a;
                            check;
                            b = a;
                            check;
                        end
            end
            for (n = 0; n < NRAND; n = n + 1) begin
                pick_word(a); pick_partner(a, b); cin = $random(seed); mode = $random(seed);
                check;
            end
        end
        report(2 * W + 2 <= EXH_BITS);
    end
endmodule

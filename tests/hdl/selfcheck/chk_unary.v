// chk_unary: checks a unary unit (ports a y co ovf zero neg) selected by macro OP
// (0 negate, 1 increment, 2 decrement), with carry_out = "borrow" for negate and decrement,
// against golden answers computed from decoded values:
//   negate:    T = -value(a), co = (0 - unsigned(a) < 0)
//   increment: T = value(a) + 1, co = (unsigned(a) + 1 >= 2^W)
//   decrement: T = value(a) - 1, co = (unsigned(a) - 1 < 0)
//   y = T mod 2^W, ovf = T outside the range, zero = (y == 0), neg = y[W-1].
module chk_unary #(
    parameter W = 4,
    parameter SIGNED = 1,
    parameter NRAND = 2000,
    parameter EXH_BITS = 14,
    parameter DIRECTED = 1
);
`include "common.vh"
    localparam OPK = `OP;
    reg  [W-1:0] a;
    wire [W-1:0] y;
    wire         co, ovf, zero, neg;
    `DUT_INST dut (
        .a(a), .y(y), .co(co), .ovf(ovf), .zero(zero), .neg(neg));

    task check;
        reg signed [BW-1:0] t, raw;
        reg [W-1:0] ey;
        reg eco, eovf, ezero, eneg;
        begin
            #1;
            case (OPK)
                0: begin
                    t = BIG_ZERO - binary_value(a);
                    raw = BIG_ZERO - unsigned_value(a);
                    eco = raw < BIG_ZERO;
                end
                1: begin
                    t = binary_value(a) + BIG_ONE;
                    raw = unsigned_value(a) + BIG_ONE;
                    eco = raw >= TWO_W;
                end
                default: begin
                    t = binary_value(a) - BIG_ONE;
                    raw = unsigned_value(a) - BIG_ONE;
                    eco = raw < BIG_ZERO;
                end
            endcase
            ey    = t[W-1:0];
            eovf  = out_of_binary_range(t);
            ezero = ey == 0;
            eneg  = ey[W-1];
            if ({y, co, ovf, zero, neg} === {ey, eco, eovf, ezero, eneg}) passed = passed + 1;
            else begin
                failed = failed + 1;
                if (failed <= 6) begin
                    $write("  FAIL %s W=%0d a=%h:", `DUTNAME, W, a);
                    $write(" got y=%h co=%b ovf=%b zero=%b neg=%b;", y, co, ovf, zero, neg);
                    $display(" expected y=%h co=%b ovf=%b zero=%b neg=%b",
                             ey, eco, eovf, ezero, eneg);
                end
            end
        end
    endtask

    integer ia, n;
    initial begin
        seed = 8000 + W + 100 * OPK;
        passed = 0;
        failed = 0;
        if (W <= EXH_BITS) begin
            for (ia = 0; ia < (1 << W); ia = ia + 1) begin
                a = ia;
                check;
            end
        end else begin
            if (DIRECTED != 0) begin
                for (ia = 0; ia < 8; ia = ia + 1) begin
                    a = special(ia);
                    check;
                    a = special(ia) + 1;
                    check;
                    a = special(ia) - 1;
                    check;
                end
            end
            for (n = 0; n < NRAND; n = n + 1) begin
                pick_word(a);
                check;
            end
        end
        report(W <= EXH_BITS);
    end
endmodule

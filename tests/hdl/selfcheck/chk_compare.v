// chk_compare: checks a comparator (ports a b lt eq gt) against the order of the decoded
// values (two's complement for SIGNED = 1, unsigned for SIGNED = 0).
module chk_compare #(
    parameter W = 4,
    parameter SIGNED = 1,
    parameter NRAND = 2000,
    parameter EXH_BITS = 14,
    parameter DIRECTED = 1
);
`include "common.vh"
    reg  [W-1:0] a, b;
    wire         lt, eq, gt;
    `DUT_INST dut (.a(a), .b(b), .lt(lt), .eq(eq), .gt(gt));

    task check;
        reg signed [BW-1:0] va, vb;
        reg elt, eeq, egt;
        begin
            #1;
            va = binary_value(a);
            vb = binary_value(b);
            elt = va < vb;
            eeq = va == vb;
            egt = va > vb;
            if ({lt, eq, gt} === {elt, eeq, egt}) passed = passed + 1;
            else begin
                failed = failed + 1;
                if (failed <= 6) begin
                    $write("  FAIL %s W=%0d a=%h b=%h:", `DUTNAME, W, a, b);
                    $write(" got lt=%b eq=%b gt=%b;", lt, eq, gt);
                    $display(" expected lt=%b eq=%b gt=%b",
                             elt, eeq, egt);
                end
            end
        end
    endtask

    integer ia, ib, n;
    initial begin
        seed = 7000 + W;
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
                        b = a;
                        check;
                        b = a ^ HALF[W-1:0];  // sign bits differ: signed and unsigned orders disagree
                        check;
                    end
            end
            for (n = 0; n < NRAND; n = n + 1) begin
                pick_word(a); pick_partner(a, b);
                if (DIRECTED != 0) case ($random(seed) & 7)
                    0: b = a;
                    1: b = a ^ 1;
                    2: b = a ^ HALF[W-1:0];
                    default: ;
                endcase
                check;
            end
        end
        report(2 * W <= EXH_BITS);
    end
endmodule

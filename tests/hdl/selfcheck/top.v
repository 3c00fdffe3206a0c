// top: runs one checker (macro CHK, a chk_* module) at every width WMIN..WMAX side by side.
// Each checker prints one "passed, failed" line; run.sh adds them up.
`ifndef CHK
`define CHK chk_add
`endif
module top;
    parameter WMIN = 4;
    parameter WMAX = 4;
    parameter SIGNED = 1;
    parameter NRAND = 2000;
    parameter EXH_BITS = 14;
    parameter DIRECTED = 1;
    genvar w;
    generate
        for (w = WMIN; w <= WMAX; w = w + 1) begin : g_width
            `CHK #(.W(w), .SIGNED(SIGNED), .NRAND(NRAND), .EXH_BITS(EXH_BITS),
                   .DIRECTED(DIRECTED)) u_chk ();
        end
    endgenerate
endmodule

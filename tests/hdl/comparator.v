// comparator: W-bit two's-complement signed comparator, structural. A ripple of
// full_subtractor cells computes a - b (borrow-in 0); only its borrow chain and sign bit are
// kept. Signed a < b is N xor V of a - b, with N the difference MSB and V = borrow into the
// MSB xor borrow out (common practice). Equality comes from a bitwise XNOR tree, and
// a > b is "neither less nor equal".
// The borrows are per-bit scalar wires chained by name (see ripple_add.v for why).
module comparator #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire         lt,
    output wire         eq,
    output wire         gt
);
    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            wire borrow_in;   // borrow into bit i
            wire borrow_out;  // borrow out of bit i
            // A comparator needs only the sign bit of the difference; the lower difference
            // bits are produced by the cells but feed nothing.
            /* verilator lint_off UNUSEDSIGNAL */
            wire diff;
            /* verilator lint_on UNUSEDSIGNAL */
            if (i == 0) begin : g_first
                assign borrow_in = 1'b0;
            end else begin : g_chain
                assign borrow_in = g_bit[i-1].borrow_out;
            end
            full_subtractor u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .bin (borrow_in),
                .d   (diff),
                .bout(borrow_out)
            );
        end
    endgenerate

    wire negative = g_bit[W-1].diff;
    wire overflow = g_bit[W-1].borrow_in ^ g_bit[W-1].borrow_out;

    assign lt = negative ^ overflow;
    assign eq = &(a ~^ b);
    assign gt = ~lt & ~eq;
endmodule

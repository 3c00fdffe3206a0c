// comparator: W-bit two's-complement signed comparator, structural. A ripple of
// full_subtractor cells computes a - b (borrow-in 0); only its borrow chain and sign bit are
// kept. Signed a < b is N xor V of a - b, with N the difference MSB and V = borrow into the
// MSB xor borrow out (common practice). Equality comes from a bitwise XNOR tree, and
// a > b is "neither less nor equal".
module comparator #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire         lt,
    output wire         eq,
    output wire         gt
);
    wire [W:0] borrow;
    // A comparator needs only the sign bit of the difference; the lower difference bits are
    // produced by the cells but feed nothing.
    /* verilator lint_off UNUSEDSIGNAL */
    wire [W-1:0] diff;
    /* verilator lint_on UNUSEDSIGNAL */
    assign borrow[0] = 1'b0;

    genvar i;
    generate
        for (i = 0; i < W; i = i + 1) begin : g_bit
            full_subtractor u_cell (
                .a   (a[i]),
                .b   (b[i]),
                .bin (borrow[i]),
                .d   (diff[i]),
                .bout(borrow[i+1])
            );
        end
    endgenerate

    wire negative = diff[W-1];
    wire overflow = borrow[W-1] ^ borrow[W];

    assign lt = negative ^ overflow;
    assign eq = &(a ~^ b);
    assign gt = ~lt & ~eq;
endmodule

// signmag_add: W-bit sign-magnitude adder as usually built (common practice; M. Mano,
// Computer System Architecture, 10-2). The sign is bit W-1, the magnitude the M = W-1 bits
// below it. Three ripple chains of cells work side by side and muxes pick the answer:
//   ma + mb (full_adder cells), ma - mb and mb - ma (full_subtractor cells; the borrow out
//   of ma - mb is the magnitude comparison ma < mb).
// Same signs:      magnitude = ma + mb mod 2^M, sign kept, ovf = the magnitude's carry out.
// Different signs: subtract the smaller magnitude from the larger and take the larger's
//                  sign; equal magnitudes give a's sign (no zero fix-up, so x + (-x) is -0
//                  when x < 0). Never overflows.
//   zero = result value is zero (+0 or -0, i.e. magnitude bits all 0)
//   neg  = result sign bit (set for -0 too)
// The carries and borrows are per-bit scalar wires chained by name (see ripple_add.v for why).
// At W = 1 there are no magnitude bits: every value is +-0, the result is a (same signs keep
// the sign; different signs have "equal" magnitudes and take a's sign), zero is always 1.
module signmag_add #(
    parameter W = 16
) (
    input  wire [W-1:0] a,
    input  wire [W-1:0] b,
    output wire [W-1:0] y,
    output wire         ovf,
    output wire         zero,
    output wire         neg
);
    generate
        if (W == 1) begin : g_sign_only
            // With no magnitude bits b cannot change the result (see the header).
            /* verilator lint_off UNUSEDSIGNAL */
            wire unused_b = b[0];
            /* verilator lint_on UNUSEDSIGNAL */
            assign y    = a;
            assign ovf  = 1'b0;
            assign zero = 1'b1;
            assign neg  = a[0];
        end else begin : g_full
            localparam M = W - 1;
            wire         sign_a = a[W-1];
            wire         sign_b = b[W-1];
            wire [M-1:0] mag_a  = a[M-1:0];
            wire [M-1:0] mag_b  = b[M-1:0];
            wire         same_sign = ~(sign_a ^ sign_b);
            wire [M-1:0] mag_y;
            wire         b_larger;  // mb > ma: the borrow out of ma - mb

            genvar i;
            for (i = 0; i < M; i = i + 1) begin : g_bit
                wire sum;             // bit i of ma + mb
                wire sum_carry_in;
                wire sum_carry_out;
                wire a_minus_b;       // bit i of ma - mb
                wire a_minus_b_borrow_in;
                wire a_minus_b_borrow_out;
                wire b_minus_a;       // bit i of mb - ma
                wire b_minus_a_borrow_in;
                // Only the difference bits of mb - ma are used; which magnitude is larger
                // is already known from the borrow out of ma - mb.
                /* verilator lint_off UNUSEDSIGNAL */
                wire b_minus_a_borrow_out;
                /* verilator lint_on UNUSEDSIGNAL */
                if (i == 0) begin : g_first
                    assign sum_carry_in        = 1'b0;
                    assign a_minus_b_borrow_in = 1'b0;
                    assign b_minus_a_borrow_in = 1'b0;
                end else begin : g_chain
                    assign sum_carry_in        = g_bit[i-1].sum_carry_out;
                    assign a_minus_b_borrow_in = g_bit[i-1].a_minus_b_borrow_out;
                    assign b_minus_a_borrow_in = g_bit[i-1].b_minus_a_borrow_out;
                end
                full_adder u_sum (
                    .a   (mag_a[i]),
                    .b   (mag_b[i]),
                    .cin (sum_carry_in),
                    .s   (sum),
                    .cout(sum_carry_out)
                );
                full_subtractor u_a_minus_b (
                    .a   (mag_a[i]),
                    .b   (mag_b[i]),
                    .bin (a_minus_b_borrow_in),
                    .d   (a_minus_b),
                    .bout(a_minus_b_borrow_out)
                );
                full_subtractor u_b_minus_a (
                    .a   (mag_b[i]),
                    .b   (mag_a[i]),
                    .bin (b_minus_a_borrow_in),
                    .d   (b_minus_a),
                    .bout(b_minus_a_borrow_out)
                );
                // Result magnitude bit: the sum for equal signs, else the larger minus the
                // smaller (b_larger, from the end of the ma - mb chain).
                assign mag_y[i] = same_sign ? sum : (b_larger ? b_minus_a : a_minus_b);
            end

            assign b_larger = g_bit[M-1].a_minus_b_borrow_out;
            wire         sign_y   = same_sign ? sign_a : (b_larger ? sign_b : sign_a);

            assign y    = {sign_y, mag_y};
            assign ovf  = same_sign & g_bit[M-1].sum_carry_out;
            assign zero = ~|mag_y;
            assign neg  = sign_y;
        end
    endgenerate
endmodule

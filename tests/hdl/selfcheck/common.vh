// common.vh: shared helpers for the self-check testbenches, included inside each checker
// module body after its parameters: W (width), SIGNED (1 = two's complement, 0 = unsigned,
// where the unit has both), NRAND (random vectors when not exhaustive), EXH_BITS (exhaustive
// when the input bits fit), DIRECTED (0 turns the directed corners and biased picks off,
// leaving uniform random operands only, to show which bugs such vectors miss).
// The golden answers are computed from the decoded VALUES of the operands with plain integer
// arithmetic in (W+4)-bit signed registers, as DEVELOPERS.md "Golden model rules" defines
// them; nothing here reuses the units' structure or the behavioural models' expressions.

// How the checker instantiates the DUT: a synthesized netlist has no parameters, a
// behavioural model also takes SIGNED.
`ifdef NETLIST
`define DUT_INST `DUT
`elsif BEHAV
`define DUT_INST `DUT #(.W(W), .SIGNED(SIGNED))
`else
`define DUT_INST `DUT #(.W(W))
`endif

localparam BW = W + 4;
localparam signed [BW-1:0] BIG_ZERO = 0;
localparam signed [BW-1:0] BIG_ONE  = 1;
localparam signed [BW-1:0] TWO_W    = BIG_ONE <<< W;        // 2^W
localparam signed [BW-1:0] HALF     = BIG_ONE <<< (W - 1);  // 2^(W-1)

integer seed;
integer passed;
integer failed;

// Value of pattern p read as an unsigned number.
function signed [BW-1:0] unsigned_value(input [W-1:0] p);
    unsigned_value = {4'b0000, p};
endfunction

// Two's complement: p - 2^W * msb.
function signed [BW-1:0] twos_value(input [W-1:0] p);
    twos_value = p[W-1] ? unsigned_value(p) - TWO_W : unsigned_value(p);
endfunction

// One's complement: msb ? -(~p) : p.
function signed [BW-1:0] ones_value(input [W-1:0] p);
    ones_value = p[W-1] ? BIG_ZERO - unsigned_value(~p) : unsigned_value(p);
endfunction

// Sign-magnitude: (msb ? -1 : 1) * (p mod 2^(W-1)).
function signed [BW-1:0] signmag_value(input [W-1:0] p);
    reg signed [BW-1:0] magnitude;
    begin
        magnitude = p[W-1] ? unsigned_value(p) - HALF : unsigned_value(p);
        signmag_value = p[W-1] ? BIG_ZERO - magnitude : magnitude;
    end
endfunction

// Unsigned or two's-complement value, by SIGNED.
function signed [BW-1:0] binary_value(input [W-1:0] p);
    binary_value = (SIGNED != 0) ? twos_value(p) : unsigned_value(p);
endfunction

// True when value v does not fit the unsigned (SIGNED = 0) or two's-complement range.
function out_of_binary_range(input signed [BW-1:0] v);
    if (SIGNED != 0) out_of_binary_range = (v < BIG_ZERO - HALF) || (v > HALF - BIG_ONE);
    else out_of_binary_range = (v < BIG_ZERO) || (v > TWO_W - BIG_ONE);
endfunction

// A random W-bit word built from 32-bit $random draws.
task random_word(output [W-1:0] r);
    integer k;
    begin
        r = 0;
        for (k = 0; k < W; k = k + 32) r = {r, $random(seed)};
    end
endtask

// Special operand patterns: 0, 1, all ones, MIN 10..0, MAX 01..1, 0101.., 1010.., 2.
function [W-1:0] special(input integer k);
    integer i;
    begin
        special = 0;
        case (k % 8)
            0: special = 0;
            1: special = 1;
            2: special = ~special;
            3: special = HALF[W-1:0];
            4: special = ~HALF[W-1:0];
            5: for (i = 0; i < W; i = i + 1) special[i] = (i % 2 == 0);
            6: for (i = 0; i < W; i = i + 1) special[i] = (i % 2 == 1);
            default: special = 2;
        endcase
    end
endfunction

// A random operand: a special pattern a quarter of the time, else uniform (always uniform
// when DIRECTED = 0).
task pick_word(output [W-1:0] r);
    integer choice;
    begin
        choice = $random(seed);
        if (choice < 0) choice = -choice;
        if (DIRECTED != 0 && choice % 4 == 0) r = special(choice / 4);
        else random_word(r);
    end
endtask

// A random second operand: ~first (a full-length propagate chain) an eighth of the time,
// else as pick_word (always uniform when DIRECTED = 0).
task pick_partner(input [W-1:0] first, output [W-1:0] r);
    integer choice;
    begin
        choice = $random(seed);
        if (choice < 0) choice = -choice;
        if (DIRECTED != 0 && choice % 8 == 0) r = ~first;
        else pick_word(r);
    end
endtask

// The one summary line per checker that run.sh adds up.
task report(input exhaustive);
    if (exhaustive)
        $display("RESULT %s W=%0d SIGNED=%0d: %0d passed, %0d failed (exhaustive)", `DUTNAME, W,
                 SIGNED, passed, failed);
    else
        $display("RESULT %s W=%0d SIGNED=%0d: %0d passed, %0d failed (sampled)",
                 `DUTNAME, W, SIGNED, passed, failed);
endtask

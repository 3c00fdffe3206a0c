#!/usr/bin/env bash
# run.sh: self-check of the HDL units under tests/hdl (reference units, injected-bug variants,
# behavioural models, VHDL twins). Run from anywhere:
#
#   tests/hdl/selfcheck/run.sh          quick: exhaustive W = 1..7, sampled widths up to 512
#   tests/hdl/selfcheck/run.sh full     also every width 8..130 (takes several minutes)
#
# Steps (each prints one line per unit and width group; PROBLEM lines mark failures):
#   1. lint     verilator --lint-only -Wall at several widths (behavioural models: SIGNED 0 and 1)
#   2. exhaust  Icarus, exhaustive at W = 1..7 (directed+random where 2W+2 inputs exceed 15
#               bits), against golden answers the testbenches compute from decoded values
#   3. widths   Icarus, directed corners + random vectors ("sampled") at wider widths up to 512
#   4. uniform  W = 32, uniform random vectors only: shows which bugs such vectors miss
#   5. bugs     every injected-bug variant must FAIL the exhaustive check at W = 4 and W = 5
#   6. mutants  small edits of reference units and models made here with sed must FAIL too,
#               so the checkers are known to be able to fail
#   7. yosys    the synthesis flow at W = 4 and 16; only simple gate cells may remain; every
#               W = 4 netlist is re-simulated exhaustively (bug netlists must still fail)
#   8. ghdl     analyze + elaborate the VHDL units, exhaustive testbenches at W = 1, 2, 4, 5, 8
# Exit status 0 only when every step met its expectation.

set -u
MODE=${1:-quick}
HDL=$(cd "$(dirname "$0")/.." && pwd)
SC=$HDL/selfcheck
WORK=$(mktemp -d)
trap 'rm -rf "$WORK"' EXIT
CELLS="$HDL/full_adder.v $HDL/full_subtractor.v"
PROBLEMS=0

problem() {
    echo "PROBLEM: $*"
    PROBLEMS=$((PROBLEMS + 1))
}

# Reference units: module, checker, source file.
REFS="ripple_add:chk_add:ripple_add.v
ripple_sub:chk_sub:ripple_sub.v
addsub_unit:chk_addsub_unit:addsub_unit.v
ones_add:chk_ones_add:ones_add.v
signmag_add:chk_signmag_add:signmag_add.v
comparator:chk_compare:comparator.v"

# Injected-bug variants: module, checker.
BUGS="ripple_sub_bug_chain:chk_sub
addsub_bug_carry_convention:chk_addsub_unit
ripple_add_bug_overflow:chk_add
addsub_bug_no_plus_one:chk_addsub_unit
ripple_add_bug_stuck:chk_add
ones_add_bug_no_end_around:chk_ones_add
ripple_add_bug_full_chain:chk_add"

# Behavioural models: module, checker, OP for chk_unary (- when unused).
BEHAV="behav_add:chk_add:-
behav_sub:chk_sub:-
behav_addsub:chk_behav_addsub:-
behav_negate:chk_unary:0
behav_increment:chk_unary:1
behav_decrement:chk_unary:2
behav_compare:chk_compare:-"

# sim LABEL CHECKER DUT SIGNED WMIN WMAX NRAND EXH_BITS DIRECTED "DEFINES" FILES...
# Compiles top.v with the checker for widths WMIN..WMAX, runs it, prints the summed counts
# and sets SIM_PASSED / SIM_FAILED. FAIL lines (up to 6 per width) go to $WORK/LABEL.fails.
sim() {
    local label=$1 chk=$2 dut=$3 signed=$4 wmin=$5 wmax=$6 nrand=$7 exh=$8 directed=$9
    local defines=${10}
    shift 10
    local log=$WORK/$label.log
    SIM_PASSED=0
    SIM_FAILED=0
    # shellcheck disable=SC2086
    if ! iverilog -g2005 -Wall -o "$WORK/$label.vvp" -I "$SC" -DCHK="$chk" -DDUT="$dut" \
        "-DDUTNAME=\"$dut\"" $defines -Ptop.WMIN="$wmin" -Ptop.WMAX="$wmax" \
        -Ptop.SIGNED="$signed" -Ptop.NRAND="$nrand" -Ptop.EXH_BITS="$exh" \
        -Ptop.DIRECTED="$directed" "$SC/top.v" "$SC/$chk.v" "$@" >"$log" 2>&1; then
        cat "$log"
        problem "$label: compile failed"
        SIM_FAILED=1
        return
    fi
    if ! vvp -n "$WORK/$label.vvp" >>"$log" 2>&1; then
        problem "$label: simulation failed"
    fi
    local got
    got=$(grep -c '^RESULT' "$log")
    if [ "$got" -ne $((wmax - wmin + 1)) ]; then
        problem "$label: expected $((wmax - wmin + 1)) RESULT lines, got $got"
        SIM_FAILED=1
    fi
    if grep -qi 'warning\|error' "$log"; then
        grep -i 'warning\|error' "$log" | head -5
        problem "$label: compiler or simulator warnings"
    fi
    read -r SIM_PASSED SIM_FAILED_SUM < <(awk '/^RESULT/ {p += $(NF-4); f += $(NF-2)}
        END {print p + 0, f + 0}' "$log")
    SIM_FAILED=$((SIM_FAILED + SIM_FAILED_SUM))
    grep '^  FAIL' "$log" >"$WORK/$label.fails"
    local kind
    kind=$(awk '/^RESULT/ {print $NF}' "$log" | sort -u | tr -d '()' | paste -sd, -)
    printf '%-44s W=%s..%s: %8d passed, %6d failed (%s)\n' "$label" "$wmin" "$wmax" \
        "$SIM_PASSED" "$SIM_FAILED" "$kind"
}

# expect_pass: call after sim for units that must pass.
expect_pass() {
    if [ "$SIM_FAILED" -ne 0 ] || [ "$SIM_PASSED" -eq 0 ]; then
        sed 's/^/    /' "$WORK/$1.fails"
        problem "$1 should pass"
    fi
}

files_of() {  # files_of MODULE: the sources a module needs
    case $1 in
        behav_*) echo "$HDL/behav/$1.v" ;;
        *_bug_*) echo "$HDL/bugs/$1.v $CELLS" ;;
        full_*) echo "$HDL/$1.v" ;;
        *) echo "$HDL/$1.v $CELLS" ;;
    esac
}

echo "== 1. lint (verilator --lint-only -Wall)"
lint_count=0
for entry in $REFS $BUGS $BEHAV full_adder full_subtractor; do
    m=${entry%%:*}
    case $m in
        behav_*) variants="-GSIGNED=0 -GSIGNED=1"; widths="1 2 3 4 5 16 33 130 512" ;;
        full_*) variants="-"; widths="-" ;;
        *) variants="-"; widths="1 2 3 4 5 16 33 130 512" ;;
    esac
    for w in $widths; do
        for v in $variants; do
            opts=""
            [ "$w" = "-" ] || opts="-GW=$w"
            [ "$v" = "-" ] || opts="$opts $v"
            # shellcheck disable=SC2046,SC2086
            if ! out=$(verilator --lint-only -Wall $opts --top-module "$m" $(files_of "$m") 2>&1); then
                echo "$out" | head -8
                problem "lint $m $opts"
            fi
            lint_count=$((lint_count + 1))
        done
    done
done
echo "lint: $lint_count runs, $PROBLEMS problems so far"

echo "== 2. exhaustive (Icarus, W = 1..7)"
for entry in $REFS; do
    IFS=: read -r m chk _ <<<"$entry"
    # shellcheck disable=SC2046
    sim "$m" "$chk" "$m" 1 1 7 2000 15 1 "" $(files_of "$m")
    expect_pass "$m"
done
for entry in $BEHAV; do
    IFS=: read -r m chk op <<<"$entry"
    for s in 0 1; do
        defs="-DBEHAV"
        [ "$op" = "-" ] || defs="$defs -DOP=$op"
        sim "$m.SIGNED$s" "$chk" "$m" "$s" 1 7 2000 15 1 "$defs" $(files_of "$m")
        expect_pass "$m.SIGNED$s"
    done
done

echo "== 3. wider widths (Icarus, directed corners + random)"
if [ "$MODE" = full ]; then
    GROUPS_W="8:130:100 256:256:20 512:512:20 32:32:5000"
else
    GROUPS_W="8:24:100 31:33:100 63:65:50 127:130:20 256:256:10 512:512:10 32:32:5000"
fi
for g in $GROUPS_W; do
    IFS=: read -r wmin wmax nrand <<<"$g"
    for entry in $REFS; do
        IFS=: read -r m chk _ <<<"$entry"
        # shellcheck disable=SC2046
        sim "$m.W$wmin-$wmax" "$chk" "$m" 1 "$wmin" "$wmax" "$nrand" 15 1 "" $(files_of "$m")
        expect_pass "$m.W$wmin-$wmax"
    done
    for entry in $BEHAV; do
        IFS=: read -r m chk op <<<"$entry"
        for s in 0 1; do
            defs="-DBEHAV"
            [ "$op" = "-" ] || defs="$defs -DOP=$op"
            # shellcheck disable=SC2046
            sim "$m.SIGNED$s.W$wmin-$wmax" "$chk" "$m" "$s" "$wmin" "$wmax" "$nrand" 15 1 \
                "$defs" $(files_of "$m")
            expect_pass "$m.SIGNED$s.W$wmin-$wmax"
        done
    done
done

echo "== 4. uniform random only, W = 32, 5000 vectors (no directed corners)"
for entry in $BUGS; do
    IFS=: read -r m chk <<<"$entry"
    # shellcheck disable=SC2046
    sim "$m.uniform" "$chk" "$m" 1 32 32 5000 15 0 "" $(files_of "$m")
done
echo "   (the same bugs with directed corners, W = 32, 100 random vectors on top)"
for entry in $BUGS; do
    IFS=: read -r m chk <<<"$entry"
    # shellcheck disable=SC2046
    sim "$m.directed" "$chk" "$m" 1 32 32 100 15 1 "" $(files_of "$m")
    [ "$SIM_FAILED" -gt 0 ] || problem "$m: directed corners at W = 32 did not expose the bug"
done

echo "== 5. injected bugs must fail (Icarus, exhaustive W = 4 and 5)"
for entry in $BUGS; do
    IFS=: read -r m chk <<<"$entry"
    # shellcheck disable=SC2046
    sim "$m" "$chk" "$m" 1 4 5 2000 15 1 "" $(files_of "$m")
    if [ "$SIM_FAILED" -eq 0 ]; then
        problem "$m was not exposed"
    else
        sed -n '1,4s/^/    /p' "$WORK/$m.fails"
    fi
done

echo "== 6. mutants of reference units must fail (Icarus, exhaustive W = 4)"
mutant() {  # mutant NAME CHECKER MODULE SOURCE SED-EXPRESSION "DEFINES"
    local name=$1 chk=$2 m=$3 src=$4 expr=$5 defs=$6
    sed "$expr" "$src" >"$WORK/$name.v"
    if cmp -s "$src" "$WORK/$name.v"; then
        problem "mutant $name: the edit did not apply"
        return
    fi
    local deps=$CELLS
    case $m in behav_*) deps="" ;; esac
    # shellcheck disable=SC2086
    sim "mutant.$name" "$chk" "$m" 1 4 4 2000 15 1 "$defs" "$WORK/$name.v" $deps
    [ "$SIM_FAILED" -gt 0 ] || problem "mutant $name was not exposed"
}
mutant signmag_zero_fixup chk_signmag_add signmag_add "$HDL/signmag_add.v" \
    's/assign y    = {sign_y, mag_y};/assign y    = {sign_y \& ~zero, mag_y};/' ""
mutant comparator_unsigned chk_compare comparator "$HDL/comparator.v" \
    's/assign lt = negative ^ overflow;/assign lt = g_bit[W-1].borrow_out;/' ""
mutant ones_zero_bits chk_ones_add ones_add "$HDL/ones_add.v" \
    's/assign zero = (~|y) | (&y);/assign zero = ~|y;/' ""
mutant ripple_sub_ovf_a chk_sub ripple_sub "$HDL/ripple_sub.v" \
    's/assign ovf  = g_bit\[W-1\].borrow_in ^ g_bit\[W-1\].borrow_out;/assign ovf  = g_bit[W-1].borrow_out;/' ""
mutant behav_add_unsigned_cin chk_add behav_add "$HDL/behav/behav_add.v" \
    's/\$signed(b) + \$signed({1.b0, cin})/$signed(b) + cin/' "-DBEHAV"
mutant behav_sub_carry chk_sub behav_sub "$HDL/behav/behav_sub.v" \
    's/assign co   = raw < ZERO;/assign co   = !(raw < ZERO);/' "-DBEHAV"

echo "== 7. yosys (synth -flatten; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX)"
for entry in $REFS $BUGS $BEHAV; do
    m=${entry%%:*}
    chk=$(echo "$entry" | cut -d: -f2)
    for w in 4 16; do
        net=$WORK/$m.W$w
        # shellcheck disable=SC2046
        if ! yosys -q -p "read_verilog $(files_of "$m"); chparam -set W $w $m; synth -flatten -top $m; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json $net.json; write_verilog -noattr $net.v" >"$net.log" 2>&1; then
            head -5 "$net.log"
            problem "yosys $m W=$w"
            continue
        fi
        python3 "$SC/check_netlist.py" "$net.json" "$m" "$m W=$w" || problem "netlist $m W=$w"
    done
    defs="-DNETLIST"
    case $entry in behav_*:chk_unary:*) defs="$defs -DOP=${entry##*:}" ;; esac
    sim "netlist.$m" "$chk" "$m" 1 4 4 2000 15 1 "$defs" "$WORK/$m.W4.v"
    case $m in
        *_bug_*) [ "$SIM_FAILED" -gt 0 ] || problem "netlist of $m passed; the bug was lost" ;;
        *) expect_pass "netlist.$m" ;;
    esac
done

echo "== 8. ghdl (VHDL-2008: analyze, elaborate, exhaustive testbenches)"
GW=$WORK/ghdl
mkdir -p "$GW"
if (cd "$GW" && ghdl -a --std=08 "$HDL/vhdl/full_adder.vhd" "$HDL/vhdl/full_subtractor.vhd" \
        "$HDL/vhdl/ripple_sub.vhd" "$HDL/vhdl/addsub_unit.vhd" "$SC/tb_ripple_sub.vhd" \
        "$SC/tb_addsub_unit.vhd"); then
    for u in ripple_sub addsub_unit; do
        (cd "$GW" && ghdl -e --std=08 "$u" && ghdl -e --std=08 "tb_$u") || problem "ghdl -e $u"
        for w in 1 130 512; do
            (cd "$GW" && ghdl -r --std=08 "$u" -gW=$w --stop-time=1ns) >/dev/null 2>&1 \
                || problem "ghdl: $u does not elaborate at W=$w"
        done
        for w in 1 2 4 5 8; do
            out=$(cd "$GW" && ghdl -r --std=08 "tb_$u" -gW=$w 2>&1)
            line=$(echo "$out" | grep '^RESULT')
            echo "${line:-no RESULT line}"
            case $line in *" 0 failed"*) ;; *) echo "$out" | head -8; problem "ghdl tb_$u W=$w" ;; esac
        done
    done
else
    problem "ghdl -a failed"
fi

echo "=="
if [ "$PROBLEMS" -eq 0 ]; then
    echo "selfcheck: all steps met their expectations ($MODE)"
else
    echo "selfcheck: $PROBLEMS problem(s)"
fi
[ "$PROBLEMS" -eq 0 ]

#!/usr/bin/env bash
# One shard of a farm run: generates shard I of N of SPEC's vector set, writes its testbench,
# simulates the DUT on it and checks the log, leaving OUT/shardI/report.json for
# `arithvec merge`. Used by farm-parallel.sh (GNU parallel) and slurm/arithvec-array.sbatch.
#
#   farm-shard.sh SPEC I N SIMULATOR OUT DUT_SOURCE...
#
# SIMULATOR is icarus, verilator or ghdl; DUT_SOURCE are the DUT's HDL files (VHDL for ghdl).
# ARITHVEC names the arithvec binary (default: arithvec on PATH). Environment COUNT and SEED,
# when set, are passed to `gen` as --count and --seed.
#
# Exit status: 0 when the report was written, whatever its verdict (the merged report gives
# the verdict of the whole set, so a failing shard must not stop the merge); 2 when the shard
# could not be generated, simulated or checked (bad input, a simulator error, no log).
set -euo pipefail
if [ $# -lt 6 ]; then
  echo "usage: $0 SPEC I N SIMULATOR OUT DUT_SOURCE..." >&2
  exit 2
fi
spec=$1 index=$2 shards=$3 sim=$4 out=$5
shift 5
av=${ARITHVEC:-arithvec}
dir="$out/shard$index"
rm -rf "$dir"
mkdir -p "$dir"
gen_extra=()
[ -n "${COUNT:-}" ] && gen_extra+=(--count "$COUNT")
[ -n "${SEED:-}" ] && gen_extra+=(--seed "$SEED")
fail() { echo "farm-shard $index/$shards: $*" >&2; exit 2; }
"$av" gen "$spec" --out "$dir/vec" --shard "$index/$shards" -q "${gen_extra[@]}" \
  || fail "gen failed"
case "$sim" in
  icarus)
    "$av" testbench "$spec" --vectors "$dir/vec" --hdl verilog -o "$dir/tb.v" -q || fail "testbench failed"
    iverilog -g2005 -o "$dir/sim" "$dir/tb.v" "$@" || fail "iverilog failed"
    vvp -n "$dir/sim" "+stimulus=$dir/vec/stimulus.hex" "+results=$dir/results.csv" \
      > "$dir/sim.log" || fail "vvp failed (see $dir/sim.log)"
    ;;
  verilator)
    "$av" testbench "$spec" --vectors "$dir/vec" --hdl verilog -o "$dir/tb.v" -q || fail "testbench failed"
    top=$(sed -n 's/^module \([A-Za-z0-9_]*\);.*/\1/p' "$dir/tb.v" | head -n 1)
    verilator --binary --timing -Wno-fatal --top-module "$top" -Mdir "$dir/obj" \
      "$dir/tb.v" "$@" -o sim > "$dir/build.log" 2>&1 || fail "verilator failed (see $dir/build.log)"
    "$dir/obj/sim" "+stimulus=$dir/vec/stimulus.hex" "+results=$dir/results.csv" \
      > "$dir/sim.log" || fail "the Verilator binary failed (see $dir/sim.log)"
    ;;
  ghdl)
    "$av" testbench "$spec" --vectors "$dir/vec" --hdl vhdl -o "$dir/tb.vhd" -q || fail "testbench failed"
    top=$(sed -n 's/^entity \([A-Za-z0-9_]*\) is.*/\1/p' "$dir/tb.vhd" | head -n 1)
    ghdl -a --std=08 --workdir="$dir" "$@" "$dir/tb.vhd" || fail "ghdl -a failed"
    # ghdl -r elaborates and runs (Debian's GHDL has the mcode back end: no executable).
    ghdl -r --std=08 --workdir="$dir" "$top" "-gstimulus=$dir/vec/stimulus.hex" \
      "-gresults=$dir/results.csv" > "$dir/sim.log" 2>&1 \
      || fail "the GHDL simulation failed (see $dir/sim.log)"
    ;;
  *) fail "unknown simulator \"$sim\" (icarus, verilator or ghdl)" ;;
esac
set +e
"$av" check "$spec" --log "$dir/results.csv" --vectors "$dir/vec" \
  --json "$dir/report.json" --junit "$dir/report.xml" -q
status=$?
set -e
# 0 pass, 1 mismatches, 3 coverage short (normal for one shard): the report holds the verdict.
if [ "$status" = 2 ] || [ ! -f "$dir/report.json" ]; then
  fail "check could not judge the log (exit $status)"
fi
exit 0

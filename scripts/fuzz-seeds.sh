#!/usr/bin/env bash
# Builds the fuzzers' seed corpus from real files into fuzz/seeds/READER/: the example specs
# and vector sets (vector-sets/), simulator logs of the HDL reference units (tests/hdl) as
# Icarus, Verilator and GHDL write them through arithvec's own testbenches, and Yosys
# netlists of those units. scripts/fuzz-readers.sh --minimise merges what the fuzzers found
# into the checked-in corpus (fuzz/corpus/), which starts from these seeds.
#
# Seeds are kept small (a few kilobytes at most): AFL++'s speed falls with input size, and
# the manifest, hex and netlist targets were slow on whole vector sets and pretty-printed
# netlists. A simulator or synthesis step that fails stops the script with its name and
# output; a tool that is not installed is said so on stderr.
set -euo pipefail
cd "$(dirname "$0")/.."
root=$PWD
cargo build --release --locked -q
bin=$root/target/release/arithvec
seeds=$root/fuzz/seeds
rm -rf "$seeds"
mkdir -p "$seeds"/{spec,log,manifest,hex,netlist}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

cp vector-sets/*/*.toml tests/hdl/specs/*.toml "$seeds/spec/"
# Manifest and hex seeds: the example sets cut to a few words, with manifests that match the
# cut files (the fuzz crate's `seeds` binary; see fuzz/src/targets.rs, small_sets).
# Built with the harness by `bash scripts/fuzz-readers.sh --build`.
seeds_bin=$root/fuzz/target/afl/release/seeds
[ -x "$seeds_bin" ] || bash scripts/fuzz-readers.sh --build
"$seeds_bin" "$seeds"

failures=()
fail() {
  echo "fuzz-seeds: $1 failed; its output:" >&2
  cat "$2" >&2
  failures+=("$1")
}
missing() { echo "fuzz-seeds: $1 is not installed: no $1 seeds" >&2; }
command -v iverilog >/dev/null || missing iverilog
command -v verilator >/dev/null || missing verilator
command -v ghdl >/dev/null || missing ghdl
command -v yosys >/dev/null || missing yosys

# Logs: a short vector set per unit, run on each simulator that is installed.
sources=(tests/hdl/*.v)
for spec in vector-sets/*/*.toml tests/hdl/specs/{ones_add,signmag_add,addsub_unit,comparator,ripple_add}.toml; do
  name=$(basename "$spec" .toml)
  dir=$work/$name
  mkdir -p "$dir"
  "$bin" gen "$spec" --out "$dir/vec" --count 8 -q
  module=$(awk -F'"' '/^module *=/ { print $2 }' "$spec")
  "$bin" testbench "$spec" --vectors "$dir/vec" --hdl verilog -o "$dir/tb.v" -q
  if command -v iverilog >/dev/null; then
    (iverilog -g2005 -o "$dir/sim" "$dir/tb.v" "${sources[@]}" \
      && vvp -n "$dir/sim" "+stimulus=$dir/vec/stimulus.hex" \
        "+results=$seeds/log/$name.icarus.csv") > "$dir/icarus.out" 2>&1 \
      || fail "Icarus on $name" "$dir/icarus.out"
  fi
  if command -v verilator >/dev/null; then
    (cd "$dir" && verilator --binary --timing -Wno-fatal --top-module "tb_$name" tb.v \
      "${sources[@]/#/$root/}" -o vsim \
      && obj_dir/vsim "+stimulus=$dir/vec/stimulus.hex" \
        "+results=$seeds/log/$name.verilator.csv") > "$dir/verilator.out" 2>&1 \
      || fail "Verilator on $name" "$dir/verilator.out"
  fi
  if command -v ghdl >/dev/null && [ -f "tests/hdl/vhdl/$module.vhd" ]; then
    "$bin" testbench "$spec" --vectors "$dir/vec" --hdl vhdl -o "$dir/tb.vhd" -q
    # The cells first: GHDL analyses in order, and a unit must be analysed before a unit
    # that instantiates it (a plain glob put addsub_unit.vhd before full_adder.vhd).
    (cd "$dir" && ghdl -a --std=08 "$root"/tests/hdl/vhdl/full_*.vhd \
      && ghdl -a --std=08 "$root/tests/hdl/vhdl/$module.vhd" tb.vhd \
      && ghdl -e --std=08 "tb_$name" \
      && ghdl -r --std=08 "tb_$name" "-gstimulus=$dir/vec/stimulus.hex" \
        "-gresults=$seeds/log/$name.ghdl.csv") > "$dir/ghdl.out" 2>&1 \
      || fail "GHDL on $name" "$dir/ghdl.out"
  fi
done

# Netlists: the reference units at 1 and 2 bits through the documented synthesis flow, then
# compacted with jq (one line, empty attributes, short cell names, hidden net names dropped):
# Yosys's pretty-printed JSON of even a 2-bit adder is 12-20 kB, mostly whitespace and
# generated names, which slowed the netlist fuzzer to a few hundred executions a second.
compact='.modules |= with_entries(.value |= (.attributes = {} | del(.parameter_default_values)
  | .cells |= (to_entries | to_entries
      | map({key: ("c\(.key)"), value: (.value.value | .attributes = {} | del(.hide_name))})
      | from_entries)
  | .netnames |= with_entries(select(.value.hide_name == 0) | .value.attributes = {})))'
if command -v yosys >/dev/null; then
  command -v jq >/dev/null || { echo "fuzz-seeds: jq is needed to compact the netlists" >&2; exit 2; }
  for unit in ripple_add:full_adder ripple_sub:full_subtractor addsub_unit:full_adder \
              ones_add:full_adder comparator:full_subtractor; do
    top=${unit%%:*}
    cell=${unit##*:}
    for w in 1 2; do
      yosys -q -p "read_verilog tests/hdl/$top.v tests/hdl/$cell.v; chparam -set W $w $top; \
        synth -flatten -top $top; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; \
        write_json $work/$top.w$w.json" > "$work/yosys.out" 2>&1 \
        && jq -c "$compact" "$work/$top.w$w.json" > "$seeds/netlist/$top.w$w.json" \
        || fail "Yosys on $top at $w bits" "$work/yosys.out"
    done
  done
fi
ls -l "$seeds"/*
if [ ${#failures[@]} -gt 0 ]; then
  echo "fuzz-seeds: ${#failures[@]} step(s) failed: ${failures[*]}" >&2
  exit 1
fi

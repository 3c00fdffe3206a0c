#!/usr/bin/env bash
# Builds the fuzzers' seed corpus from real files into fuzz/seeds/READER/: the example specs
# and vector sets (vector-sets/), simulator logs of the HDL reference units (tests/hdl) as
# Icarus, Verilator and GHDL write them through arithvec's own testbenches, and Yosys
# netlists of those units. scripts/fuzz-readers.sh --minimise merges what the fuzzers found
# into the checked-in corpus (fuzz/corpus/), which starts from these seeds.
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
for set in vector-sets/*/; do
  name=$(basename "$set")
  cp "$set/vectors/manifest.json" "$seeds/manifest/$name.json"
  # The first lines (the header and some words) keep the seeds small.
  head -n 40 "$set/vectors/stimulus.hex" > "$seeds/hex/$name.stimulus.hex"
  head -n 40 "$set/vectors/expected.hex" > "$seeds/hex/$name.expected.hex"
done

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
    iverilog -g2005 -o "$dir/sim" "$dir/tb.v" "${sources[@]}"
    vvp -n "$dir/sim" "+stimulus=$dir/vec/stimulus.hex" "+results=$seeds/log/$name.icarus.csv" >/dev/null
  fi
  if command -v verilator >/dev/null; then
    (cd "$dir" && verilator --binary --timing -Wno-fatal --top-module "tb_$name" tb.v \
      "${sources[@]/#/$root/}" -o vsim >/dev/null 2>&1 \
      && obj_dir/vsim "+stimulus=$dir/vec/stimulus.hex" "+results=$seeds/log/$name.verilator.csv" >/dev/null) || true
  fi
  if command -v ghdl >/dev/null && [ -f "tests/hdl/vhdl/$module.vhd" ]; then
    "$bin" testbench "$spec" --vectors "$dir/vec" --hdl vhdl -o "$dir/tb.vhd" -q
    (cd "$dir" && ghdl -a --std=08 "$root"/tests/hdl/vhdl/*.vhd tb.vhd \
      && ghdl -e --std=08 "tb_$name" \
      && ghdl -r --std=08 "tb_$name" "-gstimulus=$dir/vec/stimulus.hex" \
        "-gresults=$seeds/log/$name.ghdl.csv" >/dev/null) || true
  fi
done

# Netlists: the reference units at 2 bits through the documented synthesis flow.
if command -v yosys >/dev/null; then
  for unit in ripple_add:full_adder ripple_sub:full_subtractor addsub_unit:full_adder \
              ones_add:full_adder comparator:full_subtractor; do
    top=${unit%%:*}
    cell=${unit##*:}
    yosys -q -p "read_verilog tests/hdl/$top.v tests/hdl/$cell.v; chparam -set W 2 $top; \
      synth -flatten -top $top; abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; \
      write_json $seeds/netlist/$top.json" || echo "yosys failed on $top" >&2
  done
fi
ls "$seeds"/* | head -100

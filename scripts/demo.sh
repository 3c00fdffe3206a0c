#!/usr/bin/env bash
# The whole loop on a built-in example: generate vectors for the level_delta subtractor,
# emit a Verilog testbench, simulate the project's own ripple-borrow subtractor on Icarus
# Verilog, then check the result log and gate on 100% class coverage.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-simulators.sh
cargo build --release --locked -q
bin=target/release/arithvec
work=target/demo
rm -rf "$work" && mkdir -p "$work"
spec=vector-sets/level_delta/level_delta.toml
"$bin" gen "$spec" --out "$work/vec"
"$bin" testbench "$spec" --vectors "$work/vec" --hdl verilog -o "$work/tb_level_delta.v"
iverilog -g2005 -o "$work/sim" "$work/tb_level_delta.v" tests/hdl/ripple_sub.v tests/hdl/full_subtractor.v
vvp -n "$work/sim" +stimulus="$work/vec/stimulus.hex" +results="$work/results.csv"
"$bin" check "$spec" --log "$work/results.csv" --vectors "$work/vec" --require 100 \
  --junit "$work/check.xml" --json "$work/check.json" --brief

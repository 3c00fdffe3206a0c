#!/usr/bin/env bash
# Installs the simulators and synthesis tool the tests and the demo use, from Debian's
# packages, when any is missing: Icarus Verilog (iverilog, vvp), Verilator, GHDL and Yosys.
set -euo pipefail
missing=()
command -v iverilog >/dev/null 2>&1 && command -v vvp >/dev/null 2>&1 || missing+=(iverilog)
command -v verilator >/dev/null 2>&1 || missing+=(verilator)
command -v ghdl >/dev/null 2>&1 || missing+=(ghdl)
command -v yosys >/dev/null 2>&1 || missing+=(yosys)
if [ ${#missing[@]} -eq 0 ]; then
  exit 0
fi
echo "installing: ${missing[*]}" >&2
sudo=""
if [ "$(id -u)" != 0 ]; then sudo="sudo"; fi
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -q
$sudo apt-get install -y -q "${missing[@]}"

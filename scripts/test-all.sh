#!/usr/bin/env bash
# Runs every arithvec check on a fresh machine: installs the simulators when missing, then
# formatting, lints and the whole test suite (unit, integration, simulator end-to-end).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-simulators.sh
bash scripts/install-farm-tools.sh
# A missing simulator fails a test instead of skipping it when CI is set.
export CI="${CI:-true}"
cargo fmt --all -- --check
cargo clippy --locked --all-targets -- -D warnings
cargo test --locked --release

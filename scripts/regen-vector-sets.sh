#!/usr/bin/env bash
# Regenerates the checked-in example sets under vector-sets/ and their SHA256SUMS. Run it
# after a deliberate change to the generator; the test suite fails until the files match.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --locked -q
for spec in vector-sets/*/*.toml; do
  dir=$(dirname "$spec")
  target/release/arithvec gen "$spec" --out "$dir/vectors" -q
done
(cd vector-sets && sha256sum */vectors/* > SHA256SUMS)

#!/usr/bin/env bash
# A regression farm on GNU parallel: splits SPEC's vector set into N shards, runs each shard
# (gen, testbench, simulation, check; see farm-shard.sh) as a `parallel -j` job, then merges
# the N reports into OUT/merged.json and OUT/merged.xml and exits with the merge's status
# (0 pass, 1 mismatches or an incomplete set, 2 bad input, 3 coverage short).
#
#   farm-parallel.sh SPEC N SIMULATOR DUT_SOURCE...
#
# Environment: OUT (default farm), ARITHVEC (default: arithvec on PATH), JOBS (parallel's -j,
# default N), REQUIRE (merge --require), COUNT / SEED (passed to gen), PARALLEL_OPTS (more
# options for GNU parallel). Spreading over hosts needs no change to this script: with the
# working directory on a shared file system,
#   PARALLEL_OPTS="--sshlogin 8/build1,8/build2 --workdir ." farm-parallel.sh ...
# runs the shards on build1 and build2 (paths are made absolute, so each host finds them).
set -euo pipefail
if [ $# -lt 4 ]; then
  echo "usage: $0 SPEC N SIMULATOR DUT_SOURCE..." >&2
  exit 2
fi
here=$(cd "$(dirname "$0")" && pwd)
spec=$(realpath "$1") shards=$2 sim=$3
shift 3
case "$shards" in
  ''|*[!0-9]*|0) echo "N must be a positive integer, got \"$shards\"" >&2; exit 2 ;;
esac
dut=()
for f in "$@"; do dut+=("$(realpath "$f")"); done
out=$(realpath -m "${OUT:-farm}")
av=${ARITHVEC:-$(command -v arithvec || true)}
[ -n "$av" ] || { echo "no arithvec binary: set ARITHVEC or put arithvec on PATH" >&2; exit 2; }
export ARITHVEC=$(realpath "$av")
command -v parallel >/dev/null || { echo "GNU parallel is not installed (apt-get install parallel)" >&2; exit 2; }
mkdir -p "$out"
rm -f "$out/merged.json" "$out/merged.xml"
# shellcheck disable=SC2086 # PARALLEL_OPTS is a list of options.
seq 0 $((shards - 1)) | parallel -j "${JOBS:-$shards}" --halt now,fail=1 --env ARITHVEC \
  --env COUNT --env SEED ${PARALLEL_OPTS:-} \
  -q bash "$here/farm-shard.sh" "$spec" {} "$shards" "$sim" "$out" "${dut[@]}"
reports=()
for i in $(seq 0 $((shards - 1))); do reports+=("$out/shard$i/report.json"); done
merge_extra=()
[ -n "${REQUIRE:-}" ] && merge_extra+=(--require "$REQUIRE")
exec "$ARITHVEC" merge "${reports[@]}" -o "$out/merged.json" --junit "$out/merged.xml" "${merge_extra[@]}"

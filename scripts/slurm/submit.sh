#!/usr/bin/env bash
# Submits a farm run to Slurm: an array job of N shard tasks (arithvec-array.sbatch) and a
# merge job (arithvec-merge.sbatch) that depends on it with --dependency=afterok, so the merge
# runs only when every shard wrote its report. Prints the two job ids ("ARRAY MERGE").
#
#   submit.sh SPEC N SIMULATOR DUT_SOURCE...
#
# Environment: OUT (default farm; on a file system every node sees), ARITHVEC (default:
# arithvec on PATH), REQUIRE, COUNT, SEED, SBATCH_OPTS (more sbatch options, e.g. a partition).
# The merged report is OUT/merged.json; OUT/merge.status holds the merge's exit status.
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
dut=""
for f in "$@"; do dut="$dut $(realpath "$f")"; done
out=$(realpath -m "${OUT:-farm}")
av=${ARITHVEC:-$(command -v arithvec || true)}
[ -n "$av" ] || { echo "no arithvec binary: set ARITHVEC or put arithvec on PATH" >&2; exit 2; }
mkdir -p "$out/slurm"
rm -f "$out/merged.json" "$out/merged.xml" "$out/merge.status"
export FARM_SCRIPTS FARM_SPEC FARM_N FARM_SIM FARM_OUT FARM_DUT ARITHVEC
FARM_SCRIPTS=$(dirname "$here") FARM_SPEC=$spec FARM_N=$shards FARM_SIM=$sim FARM_OUT=$out
FARM_DUT=${dut# } ARITHVEC=$(realpath "$av")
# shellcheck disable=SC2086 # SBATCH_OPTS is a list of options.
array=$(sbatch --parsable --array=0-$((shards - 1)) --export=ALL ${SBATCH_OPTS:-} \
  --output="$out/slurm/shard-%a.out" --chdir="$out" "$here/arithvec-array.sbatch")
array=${array%%;*}
# shellcheck disable=SC2086
merge=$(sbatch --parsable --dependency=afterok:"$array" --kill-on-invalid-dep=yes --export=ALL \
  ${SBATCH_OPTS:-} --output="$out/slurm/merge.out" --chdir="$out" "$here/arithvec-merge.sbatch")
echo "${array} ${merge%%;*}"

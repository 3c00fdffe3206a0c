#!/usr/bin/env bash
# Fuzzes arithvec's readers (spec TOML, result log, manifest, $readmemh hex, Yosys JSON) with
# AFL++, one reader at a time, each until it has run EXECS executions (default 10 million).
# Not part of CI: CI replays the checked-in corpus (fuzz/corpus/) in tests/fuzz_corpus.rs.
#
#   bash scripts/fuzz-readers.sh [READER...]        # default: all five readers
#   EXECS=1000000 bash scripts/fuzz-readers.sh log  # a shorter run of one reader
#   bash scripts/fuzz-readers.sh --minimise         # afl-cmin the findings into fuzz/corpus/
#   bash scripts/fuzz-readers.sh --build            # only build the harness (and `seeds`)
#
# Needs Debian's afl++ package (apt-get install afl++): afl-fuzz, afl-cmin and the
# afl-compiler-rt.o runtime that the `afl` crate's persistent loop links against. The
# harness is built with the stable toolchain's own SanitizerCoverage pass (trace-pc-guard,
# which AFL++'s runtime implements), so no nightly compiler and no `cargo afl` are needed.
# Results (executions, edges found, crashes, hangs) go to fuzz/out/READER/ and one line per
# reader is appended to fuzz/out/summary.txt.
set -euo pipefail
cd "$(dirname "$0")/.."
root=$PWD
EXECS=${EXECS:-10000000}
TIMEOUT_MS=${TIMEOUT_MS:-1000}
MEMORY_MB=${MEMORY_MB:-256}
RUNTIME=${AFL_RUNTIME:-/usr/lib/afl/afl-compiler-rt.o}
READERS_ALL=(spec log manifest hex netlist)

minimise=0
build_only=0
readers=()
for arg in "$@"; do
  case "$arg" in
    --minimise) minimise=1 ;;
    --build) build_only=1 ;;
    spec|log|manifest|hex|netlist) readers+=("$arg") ;;
    *) echo "unknown argument: $arg (readers: ${READERS_ALL[*]}, or --minimise)" >&2; exit 2 ;;
  esac
done
[ ${#readers[@]} -gt 0 ] || readers=("${READERS_ALL[@]}")

for tool in afl-fuzz afl-cmin; do
  command -v "$tool" >/dev/null || { echo "$tool not found: apt-get install afl++" >&2; exit 2; }
done
[ -f "$RUNTIME" ] || { echo "AFL++ runtime $RUNTIME not found (set AFL_RUNTIME)" >&2; exit 2; }

build() {
  # The flags cargo-afl passes, with Debian's AFL++ runtime linked in directly.
  RUSTFLAGS="-C debug-assertions -C overflow-checks -C passes=sancov-module \
    -C codegen-units=1 -C opt-level=3 -C target-cpu=native \
    -C llvm-args=-sanitizer-coverage-level=3 \
    -C llvm-args=-sanitizer-coverage-trace-pc-guard \
    -C llvm-args=-sanitizer-coverage-prune-blocks=0 \
    -C llvm-args=-sanitizer-coverage-trace-compares \
    --cfg fuzzing -C link-arg=$RUNTIME" \
    CARGO_TARGET_DIR="$root/fuzz/target/afl" \
    cargo build --release --manifest-path fuzz/Cargo.toml --bins
}

build
[ "$build_only" = 0 ] || exit 0
bin="$root/fuzz/target/afl/release"
mkdir -p fuzz/out
export AFL_SKIP_CPUFREQ=1 AFL_I_DONT_CARE_ABOUT_MISSING_CRASHES=1 AFL_NO_UI=1
# The manifest and hex targets write a small vector set per execution: keep it in memory.
if [ -z "${TMPDIR:-}" ] && [ -d /dev/shm ] && [ -w /dev/shm ]; then export TMPDIR=/dev/shm; fi
# NICE=19 runs the fuzzer at the lowest priority on a shared machine.
NICE=${NICE:-0}

if [ "$minimise" = 1 ]; then
  for r in "${readers[@]}"; do
    queue="fuzz/out/$r/default/queue"
    [ -d "$queue" ] || { echo "no findings for $r (run the fuzzer first)" >&2; continue; }
    tmp=$(mktemp -d)
    cp fuzz/corpus/"$r"/* "$tmp"/ 2>/dev/null || true
    cp "$queue"/id:* "$tmp"/
    rm -rf "fuzz/corpus/$r.min"
    afl-cmin -i "$tmp" -o "fuzz/corpus/$r.min" -t "$TIMEOUT_MS" -m "$MEMORY_MB" -- "$bin/$r"
    rm -rf "fuzz/corpus/$r" "$tmp"
    mv "fuzz/corpus/$r.min" "fuzz/corpus/$r"
    # AFL++'s queue names (id:000123,src:...) hold ':' and ','; name kept findings by content.
    for f in "fuzz/corpus/$r"/*; do
      case "$(basename "$f")" in
        *:*|*,*) mv "$f" "fuzz/corpus/$r/min-$(sha256sum "$f" | cut -c1-12)" ;;
      esac
    done
  done
  exit 0
fi

for r in "${readers[@]}"; do
  out="fuzz/out/$r"
  rm -rf "$out"
  # -E stops after EXECS executions; -t and -m turn a slow input (> 1 s) or one that needs
  # more than 256 MB into a finding.
  nice -n "$NICE" afl-fuzz -i "fuzz/corpus/$r" -o "$out" -E "$EXECS" -t "$TIMEOUT_MS" -m "$MEMORY_MB" \
    -- "$bin/$r" > "$out.log" 2>&1 || true
  stats="$out/default/fuzzer_stats"
  get() { awk -v k="$1" '$1 == k { print $3 }' "$stats"; }
  line="$r: execs=$(get execs_done) edges=$(get edges_found)/$(get total_edges) \
corpus=$(get corpus_count) crashes=$(get saved_crashes) hangs=$(get saved_hangs) \
seconds=$(( $(get last_update) - $(get start_time) ))"
  echo "$line" | tee -a fuzz/out/summary.txt
done

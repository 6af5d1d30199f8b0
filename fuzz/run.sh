#!/usr/bin/env bash
# Builds and runs every fuzz target for SECONDS each (default 20), starting
# from the committed seeds in fuzz/seeds/<target>/ and growing fuzz/corpus/.
# Installs cargo-fuzz when it is missing. libFuzzer needs unstable compiler
# flags; RUSTC_BOOTSTRAP=1 lets the stable toolchain accept them.
# Exit 0 when no target found a crash; 1 otherwise (the inputs are in
# fuzz/artifacts/<target>/).
#
#   fuzz/run.sh            20 s per target
#   fuzz/run.sh 60         60 s per target
#   fuzz/run.sh 30 units   only the named targets
set -euo pipefail

secs="${1:-20}"
shift || true
targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
    targets=(load pathway samples sbml tables reaction units keys)
fi
case "$secs" in
    '' | *[!0-9]*) echo "usage: fuzz/run.sh [SECONDS] [TARGET...]" >&2; exit 2 ;;
esac

here="$(cd "$(dirname "$0")" && pwd)"
cd "$here/.."
export RUSTC_BOOTSTRAP=1

if ! cargo fuzz --version >/dev/null 2>&1; then
    cargo install cargo-fuzz --locked
fi

# dgpath forbids unsafe code, so the address sanitizer adds little beyond
# time; debug assertions (-a) turn on overflow checks.
flags=(--fuzz-dir fuzz --sanitizer none --debug-assertions)
cargo fuzz build "${flags[@]}"

failed=()
for t in "${targets[@]}"; do
    mkdir -p "fuzz/corpus/$t" "fuzz/artifacts/$t"
    args=(-max_total_time="$secs" -timeout=10 -rss_limit_mb=4096 -print_final_stats=1)
    if [ -f "fuzz/dict/$t.dict" ]; then
        args+=(-dict="fuzz/dict/$t.dict")
    fi
    if [ "$t" = load ]; then
        args+=(-max_len=16384)
    fi
    if [ "$t" = keys ]; then
        # Long key sequences from the start (no slow growth of the length
        # limit) reach edits inside edits, undo chains and walks.
        args+=(-max_len=256 -len_control=0)
    fi
    echo "== fuzz target $t, $secs s"
    if ! cargo fuzz run "${flags[@]}" "$t" "fuzz/corpus/$t" "fuzz/seeds/$t" -- "${args[@]}"; then
        failed+=("$t")
    fi
done

if [ ${#failed[@]} -gt 0 ]; then
    echo "fuzzing found crashes in: ${failed[*]} (inputs under fuzz/artifacts/)" >&2
    exit 1
fi
echo "fuzzing: no crashes in ${targets[*]} ($secs s each)"

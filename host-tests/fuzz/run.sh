#!/usr/bin/env bash
# Runs every fuzz target for SECONDS (default 60) from the committed seeds, into a scratch
# corpus, and prints libFuzzer's final statistics for each. With FUZZ_RUNS=N set, runs N
# executions per target from a fixed seed instead (deterministic; what CI uses). Needs the
# nightly toolchain and cargo-fuzz (`cargo install cargo-fuzz --locked`).
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")"
secs="${1:-60}"
scratch="$(mktemp -d)"
trap 'rm -rf "$scratch"' EXIT
for t in snapshot_decode frame_decode monitor_samples; do
  mkdir -p "$scratch/$t"
  if [ -n "${FUZZ_RUNS:-}" ]; then
    limit=(-runs="$FUZZ_RUNS" -seed=20261201)
    echo "== fuzz $t for $FUZZ_RUNS executions"
  else
    limit=(-max_total_time="$secs")
    echo "== fuzz $t for ${secs}s"
  fi
  cargo +nightly fuzz run "$t" "$scratch/$t" "seeds/$t" -- \
    "${limit[@]}" -print_final_stats=1 2> "$scratch/$t.log" || {
      tail -40 "$scratch/$t.log"; echo "fuzz target $t failed"; exit 1; }
  grep -E "stat::number_of_executed_units|stat::peak_rss_mb" "$scratch/$t.log" || true
  grep -E "^#[0-9]+ +DONE" "$scratch/$t.log" | tail -1 || true
done

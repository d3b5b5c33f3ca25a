#!/usr/bin/env bash
# End-to-end timing of `phasewise advise` including process start, on the benchmark panels in
# benches/panels/ (warm knowledge base). Prints the fastest of N runs (wall and CPU seconds):
# the fastest run is the one least disturbed by other work on the machine.
# Usage: tools/bench_advise.sh [N]   (after `cargo build --release`)
set -euo pipefail
cd "$(dirname "$0")/.."
n="${1:-10}"
bin=target/release/phasewise
for panel in benches/panels/p20.txt benches/panels/p500.txt; do
  "$bin" advise --input "$panel" --format json > /dev/null   # warm the caches
  best_wall=999; best_cpu=999
  for _ in $(seq "$n"); do
    out=$( { /usr/bin/time -f "%e %U %S" "$bin" advise --input "$panel" --format json > /dev/null; } 2>&1 | tail -1)
    read -r wall user sys <<< "$out"
    cpu=$(echo "$user + $sys" | bc)
    best_wall=$(echo "if ($wall < $best_wall) $wall else $best_wall" | bc)
    best_cpu=$(echo "if ($cpu < $best_cpu) $cpu else $best_cpu" | bc)
  done
  echo "$panel: fastest of $n runs: wall ${best_wall} s, CPU ${best_cpu} s"
done

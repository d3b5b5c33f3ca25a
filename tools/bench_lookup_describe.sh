#!/usr/bin/env bash
# Whole-process timing of `lookup` (1,000 SMILES, 1,000 names) and `describe` (20,000 SMILES),
# the figures of docs/performance.md ("Speed of lookup and describe", issue 13). Writes the
# inputs to a scratch directory, builds a knowledge base there with the binary under test, and
# prints the mean CPU time of N runs (perf stat task-clock: user + system) and single-run
# user/system/wall times. CPU time is the comparable figure on a shared machine.
# Usage: tools/bench_lookup_describe.sh [BINARY] [N]   (default target/release/phasewise, 10)
set -euo pipefail
repo=$(cd "$(dirname "$0")/.." && pwd)
bin=$(realpath "${1:-$repo/target/release/phasewise}")
n="${2:-10}"
dir=$(mktemp -d)
trap 'rm -rf "$dir"' EXIT
# inputs, as described in docs/performance.md (each awk reads its whole input: no SIGPIPE)
awk -F'\t' '!/^#/ && $1 != "source" { k++; if (k % 9 == 1 && m < 1000) { print $4; m++ } }' \
  "$repo/tests/data/random_smiles.tsv" > "$dir/smiles1000.txt"
awk -F'\t' '!/^#/ && $1 != "name" && m < 1000 { print $1; m++ }' \
  "$repo/tests/data/coverage_names.tsv" > "$dir/names1000.txt"
zcat "$repo/data/kb/compounds.tsv.gz" | awk -F'\t' 'NR > 1 && m < 20000 { print $6; m++ }' \
  > "$dir/smiles20k.txt"
"$bin" --kb "$dir/kb.sqlite" kb build > /dev/null 2>&1
# lookup and describe exit 1 when some inputs are unresolved or fail: not an error here
set +e
echo "load average: $(cut -d' ' -f1-3 /proc/loadavg)"
for list in smiles1000 names1000; do
  run=("$bin" --kb "$dir/kb.sqlite" --user-kb "$dir/none.sqlite" lookup --input "$dir/$list.txt" --format json)
  "${run[@]}" > /dev/null 2>&1   # warm the caches (exit 1: some queries unresolved)
  if command -v perf > /dev/null; then
    ms=$(perf stat -r "$n" -x, -e task-clock "${run[@]}" 2>&1 > /dev/null | grep task-clock | cut -d, -f1)
    echo "lookup $list: mean CPU of $n runs ${ms} ms"
  fi
  /usr/bin/time -f "lookup $list: %U s user, %S s sys, %e s wall (one run)" "${run[@]}" 2>&1 > /dev/null | tail -1
done
/usr/bin/time -f "describe smiles20k (TSV): %U s user, %S s sys, %e s wall" \
  "$bin" describe --format tsv - < "$dir/smiles20k.txt" 2>&1 > /dev/null | tail -1
if [ "${RDKIT:-0}" = 1 ]; then
  /usr/bin/time -f "RDKit imports alone: %U s user" python3 -c \
    "from rdkit import Chem, RDLogger; from rdkit.Chem import Descriptors, rdMolDescriptors" 2>&1 | tail -1
  /usr/bin/time -f "RDKit five descriptors, smiles20k: %U s user, %S s sys, %e s wall (imports included)" \
    python3 "$repo/tools/rdkit_describe.py" "$dir/smiles20k.txt" 2>&1 > /dev/null | tail -1
fi
echo "load average: $(cut -d' ' -f1-3 /proc/loadavg)"

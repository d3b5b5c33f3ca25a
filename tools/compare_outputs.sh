#!/usr/bin/env bash
# Compare two phasewise binaries command by command: stdout, stderr, exit code and every file a
# command writes. Used for refactors whose acceptance criterion is byte-identical output.
#
#   tools/compare_outputs.sh OLD_BINARY NEW_BINARY
#
# Runs every `$ phasewise ...` example of README.md and docs/user-guide.md plus a broad set of
# invocations (every command, every --format, error cases, help of every command, manual pages,
# completions). Each binary runs the same sequence in its own scratch directory, with its own
# copy of one shipped knowledge base and a fresh user overlay, so commands that write (kb add,
# kb import, scout --store) leave both sides in the same state. Prints one line per difference
# and a summary; exit status 0 only when nothing differs.
set -u
old=$(realpath "$1"); new=$(realpath "$2")
repo=$(cd "$(dirname "$0")/.." && pwd)
scratch=$(mktemp -d)
trap 'rm -rf "$scratch"' EXIT

# One shipped base built once (by the old binary) and copied to both sides.
mkdir -p "$scratch/base"
PHASEWISE_KB="$scratch/base/kb.sqlite" PHASEWISE_USER_KB="$scratch/base/user.sqlite" \
  "$old" kb build --force >/dev/null 2>&1 || { echo "could not build the knowledge base"; exit 2; }
rm -f "$scratch/base/user.sqlite"*

# The command list: documented examples first, then the broad set.
cmds="$scratch/commands.txt"
{
  for doc in README.md docs/user-guide.md; do
    # `$ phasewise ...` lines (joining `\` continuations) and bare `phasewise ...` lines of code blocks
    awk '
      /^```/ { inblock = !inblock; next }
      cont { line = line " " $0; if ($0 !~ /\\$/) { print line; cont = 0 } ; next }
      inblock && /^(\$ )?phasewise / {
        line = $0; sub(/^\$ /, "", line)
        if (line ~ /\\$/) { cont = 1; next }
        print line
      }' "$repo/$doc" | sed -e 's/\\ / /g' -e 's/ *(abridged)$//' | grep -v '\.\.\.'
  done
  cat <<'LIST'
phasewise --help
phasewise --version
phasewise -V
phasewise help
phasewise
phasewise lookup --help
phasewise describe --help
phasewise advise --help
phasewise predict --help
phasewise plan --help
phasewise phases --help
phasewise kb --help
phasewise kb build --help
phasewise kb path --help
phasewise kb stats --help
phasewise kb add --help
phasewise kb import --help
phasewise kb export --help
phasewise suitability --help
phasewise scout --help
phasewise transfer --help
phasewise model --help
phasewise model train --help
phasewise model eval --help
phasewise completions --help
phasewise manpages --help
phasewise help scout
phasewise completions bash
phasewise completions zsh
phasewise completions fish
phasewise completions elvish
phasewise completions powershell
phasewise completions tcsh
phasewise manpages --output-dir man && cat man/*
phasewise kb path
phasewise kb stats
phasewise kb stats --format json
phasewise kb stats --format tsv
phasewise kb stats --format csv
phasewise lookup caffeine
phasewise lookup caffeine --format json
phasewise lookup caffeine aspirin --format csv
phasewise lookup caffeine aspirin --format tsv
phasewise lookup caffeine --format markdown
phasewise lookup caffeine --format html
phasewise lookup caffiene nonsense-compound-xyz
phasewise lookup nonsense-compound-xyz --format json
phasewise lookup 'CC(=O)Oc1ccccc1C(=O)O' 58-08-2 RYYVLZVUVIJVGH-UHFFFAOYSA-N
phasewise lookup
printf 'caffeine\naspirin\n' | phasewise lookup --input -
printf 'caffeine\naspirin\n' | phasewise lookup -
phasewise lookup --input no-such-file.txt
phasewise describe 'c1ccccc1O'
phasewise describe 'c1ccccc1O' --format json
phasewise describe 'c1ccccc1O' --format csv
phasewise describe 'c1ccccc1O' --format tsv
phasewise describe 'c1ccccc1O' --format markdown
phasewise describe 'C1CC'
phasewise describe caffeine
phasewise advise caffeine theobromine
phasewise advise caffeine theobromine --format json
phasewise advise caffeine theobromine --format csv
phasewise advise caffeine theobromine --format tsv
phasewise advise caffeine theobromine --format markdown
phasewise advise caffeine theobromine --format html
phasewise advise toluene benzene ethanol
phasewise advise chloride nitrate sulfate
phasewise advise 'acetic acid' 'formic acid' 'lactic acid'
phasewise advise --input examples/panels/solvent-screen.txt --format json
phasewise advise caffeine --phases-available examples/lab/lab-phases.txt
phasewise advise caffeine --phases-available examples/broken/bad-phases.txt
phasewise advise caffeine --detector nonsense
phasewise advise caffeine nonsense-compound-xyz
phasewise advise
phasewise predict caffeine theophylline --mode rp --phase rp-c18 --gradient '0:5,20:95' --format json
phasewise predict caffeine theophylline --mode rp --phase rp-c18 --gradient '0:5,20:95' --format csv
phasewise predict caffeine theophylline --mode rp --phase rp-c18 --gradient '0:5,20:95' --format tsv
phasewise predict caffeine theophylline --mode rp --phase rp-c18 --isocratic 30
phasewise predict caffeine --mode rp --phase no-such-phase --gradient '0:5,20:95'
phasewise predict caffeine --mode rp --phase rp-c18 --gradient 'bad'
phasewise predict toluene --mode gc --phase gc-5-phenyl --oven '40:2,10:250:5' --column 30x0.25x0.25 --format json
phasewise predict toluene --mode gc --phase gc-5-phenyl --oven '40:2,10:250:5' --column 30x0.25 --format json
phasewise predict chloride nitrate --mode ic-anion --phase ic-anion-hydroxide --format json
phasewise predict chloride nitrate sulfate --mode ic-anion --phase ic-anion-hydroxide
phasewise predict chloride nitrate --mode ic-anion --phase ic-anion-hydroxide --format csv
phasewise predict toluene ethylbenzene --mode gc --phase gc-5-phenyl
phasewise predict toluene ethylbenzene --mode gc --phase gc-5-phenyl --format tsv
phasewise predict caffeine --mode ion-exclusion --phase x
phasewise predict caffeine --mode gc --phase gc-5-phenyl --ph 3
phasewise predict caffeine --mode rp --phase rp-c18 --gradient '0:5,20:95' --t0 1.5 --ph 3 --modifier methanol --temperature 40
phasewise phases
phasewise phases --format json
phasewise phases --format tsv
phasewise phases --format csv
phasewise phases --mode gc
phasewise plan caffeine theobromine
phasewise plan caffeine theobromine --format markdown --date 2026-01-01
phasewise plan caffeine theobromine --output plan2.md --date 2026-01-01 && cat plan2.md
phasewise plan caffeine theobromine --output plan2.html --date 2026-01-01 && cat plan2.html
phasewise plan caffeine --output plan3.txt
phasewise plan caffeine theobromine --output plan4.json --date 2026-01-01
phasewise suitability examples/measured/run-07.csv --t0 1.60 --length-mm 150 --format json
phasewise suitability examples/measured/run-07.csv --t0 1.60 --length-mm 150 --format csv
phasewise suitability examples/measured/run-07.csv --t0 1.60 --length-mm 150 --format tsv
phasewise suitability examples/measured/run-07.csv --t0 1.60
phasewise suitability examples/measured/run-07.csv
phasewise suitability examples/measured/run-07.csv --t0 -1
phasewise suitability no-such-file.csv --t0 1
cat examples/measured/run-07.csv | phasewise suitability - --t0 1.60
phasewise suitability examples/measured/run-07.csv --t0 1.60 --k-range 2,1
phasewise suitability examples/measured/run-07.csv --column 150x4.6 --flow 1.0 --critical 'a,b'
phasewise suitability examples/measured/run-07.csv --t0 1.60 --min-plates 100000 --format csv
printf 'name;rt;w50\nA;1,23;0,05\n' | phasewise suitability - --t0 0.5
phasewise suitability examples/broken/bad.csv --t0 1.60
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' --column 150x4.6 --flow 1.0 --dwell 0.8 --format json
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' --column 150x4.6 --flow 1.0 --dwell 0.8 --format csv
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' --column 150x4.6 --flow 1.0 --dwell 0.8 --format tsv
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' --column 150x4.6 --flow 1.0 --dwell 0.8 --window-data w.tsv --window-svg w.svg && cat w.tsv w.svg
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' --column 150x4.6 --flow 1.0 --dwell 0.8 --temperatures 30,40
phasewise scout examples/measured/scout-10min.csv --gradients '0:5,10:95' --column 150x4.6 --flow 1.0
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95' --column 150x4.6 --flow 1.0
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' --column 150x4.6 --flow 1.0 --dwell 0.8 --mode hilic
phasewise scout examples/measured/scout-10min.csv examples/measured/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' --column 150x4.6 --flow 1.0 --dwell 0.8 --store --phase rp-c18 --modifier acetonitrile --ph 3.0 --source 'compare script (invented)'
phasewise predict 4-aminophenol caffeine --mode rp --phase rp-c18 --gradient 0:5,20:95 --t0 1.587 --flow 1.0 --dwell 0.8 --modifier acetonitrile --ph 3.0 --format json
phasewise scout --mode gc examples/measured/gc-scout-5cpm.csv examples/measured/gc-scout-15cpm.csv --ovens '40:1,5:300:5;40:1,15:300:5' --column 30x0.25x0.25 --velocity 35 --phase gc-5-phenyl --format json
phasewise scout --mode gc examples/measured/gc-scout-5cpm.csv examples/measured/gc-scout-15cpm.csv --ovens '40:1,5:300:5;40:1,15:300:5' --column 30x0.25x0.25 --velocity 35 --phase gc-5-phenyl --format csv
phasewise scout --mode gc examples/measured/gc-scout-5cpm.csv examples/measured/gc-scout-15cpm.csv --ovens '40:1,5:300:5;40:1,15:300:5' --column 30x0.25x0.25 --velocity 35 --phase gc-5-phenyl --format tsv
phasewise scout --mode gc examples/measured/gc-scout-5cpm.csv examples/measured/gc-scout-15cpm.csv --ovens '40:1,5:300:5;40:1,15:300:5' --column 30x0.25 --phase gc-5-phenyl
phasewise transfer --from 150x4.6 --from-particle 5 --to 100x2.1 --to-particle 1.8 --flow 1.0 --gradient '0:5,20:95,23:95' --format json
phasewise transfer --from 150x4.6 --from-particle 5 --to 100x2.1 --to-particle 1.8 --flow 1.0 --gradient '0:5,20:95,23:95' --format csv
phasewise transfer --from 150x4.6 --from-particle 5 --to 100x2.1 --to-particle 1.8 --flow 1.0 --gradient '0:5,20:95,23:95' --format tsv
phasewise transfer --from 150x4.6 --to 100x0 --flow 1.0 --gradient '0:5,20:95'
phasewise transfer --from 150 --to 100x2.1 --flow 1.0 --gradient '0:5,20:95'
phasewise model eval --systems tests/data/systems_subset.tsv --retention tests/data/retention_subset.tsv
phasewise model eval --systems tests/data/systems_subset.tsv --retention tests/data/retention_subset.tsv --format json
phasewise model eval --systems no-such.tsv --retention tests/data/retention_subset.tsv
phasewise model train --systems tests/data/systems_subset.tsv --retention tests/data/retention_subset.tsv --output-dir trained && ls trained && cat trained/*
phasewise kb add --name $'evil\x1b[31mred' --smiles CCO --source 'compare script (invented)'
phasewise lookup $'evil\x1b[31mred' --format csv
phasewise lookup $'evil\x1b[31mred' --format tsv
phasewise lookup $'evil\x1b[31mred'
phasewise kb add --name 'lab compound Q (invented)' --smiles 'CCCCO' --prop logp=0.9 --prop 'pka=15;type=acidic' --source 'compare script (invented)'
phasewise kb add --name x --prop logp=1
phasewise kb add --name y --smiles 'C1CC' --source z
phasewise kb import examples/lab/lab-compounds.csv
phasewise kb import examples/broken/bad.csv
phasewise kb import examples/broken/bad.csv --skip-bad
phasewise kb import examples/broken/nosrc.csv
phasewise kb export
phasewise kb export --format json
phasewise kb export --format tsv
phasewise lookup 'lab compound Q (invented)' --format json
phasewise nonsense-command
phasewise lookup --format nonsense caffeine
phasewise --kb /nonexistent/dir/kb.sqlite lookup caffeine
LIST
} | sed 's#/nonexistent/dir/#missing-directory/dir/#g' > "$cmds"
# (the documented example writes into /nonexistent/dir; a directory of the scratch area that
# surely does not exist keeps the check independent of the machine)

run_side() { # $1 binary, $2 where its results go
  # Both sides run at the same paths (binary, base, overlay, working directory), so that paths
  # printed in messages match; the results are moved aside afterwards.
  local dir="$scratch/run" bin="$scratch/bin/phasewise"
  rm -rf "$dir" "$scratch/bin"; mkdir -p "$dir/work" "$dir/out" "$scratch/bin"
  cp "$1" "$bin"
  cp "$scratch/base/kb.sqlite" "$dir/kb.sqlite"
  cp -r "$repo/examples" "$dir/work/examples"
  cp "$repo"/examples/measured/* "$repo"/examples/broken/* "$dir/work/"
  mkdir -p "$dir/work/tests"; cp -r "$repo/tests/data" "$dir/work/tests/data"
  printf 'caffeine\ncaffiene\n58-08-2\n' > "$dir/work/q.tsv"
  local i=0
  while IFS= read -r line; do
    i=$((i + 1))
    local n; n=$(printf '%03d' "$i")
    (
      cd "$dir/work" || exit 99
      phasewise() { "$bin" "$@"; }
      export -f phasewise 2>/dev/null
      export bin PHASEWISE_KB="$dir/kb.sqlite" PHASEWISE_USER_KB="$dir/user.sqlite" NO_COLOR=1 \
        COLUMNS=100 LC_ALL=C.UTF-8
      eval "$line"
    ) >"$dir/out/$n.stdout" 2>"$dir/out/$n.stderr" </dev/null
    echo $? >"$dir/out/$n.rc"
  done <"$cmds"
  mv "$dir" "$2"
}

run_side "$old" "$scratch/old"
run_side "$new" "$scratch/new"

total=$(wc -l <"$cmds"); differ=0
i=0
while IFS= read -r line; do
  i=$((i + 1)); n=$(printf '%03d' "$i")
  for part in stdout stderr rc; do
    # the binary's own path appears in clap's usage lines only through argv[0]; normalise it
    if ! cmp -s "$scratch/old/out/$n.$part" "$scratch/new/out/$n.$part"; then
      differ=$((differ + 1))
      echo "DIFF [$n $part] $line"
      diff "$scratch/old/out/$n.$part" "$scratch/new/out/$n.$part" | head -10
    fi
  done
done <"$cmds"
# files left behind in the working directories (plans, SVGs, manual pages, trained models)
if ! diff -r "$scratch/old/work" "$scratch/new/work" >/dev/null; then
  differ=$((differ + 1)); echo "DIFF in written files:"; diff -r "$scratch/old/work" "$scratch/new/work" | head -20
fi
nonzero=$(cat "$scratch"/old/out/*.rc | grep -vc '^0$')
echo "compared $total commands (stdout, stderr, exit code each; $nonzero of them exit non-zero) and the files they wrote: $differ difference(s)"
[ "$differ" -eq 0 ]

#!/usr/bin/env bash
# Renders what a reviewer looks at with the release binary and headless Chromium (issue 16):
# the HTML plan of an LC and a GC example panel (screenshot, and print-to-PDF on A4 with every
# page turned into a PNG to check the page breaks), the predicted chromatograms of the LC and
# GC scouting optima (with their close-up panels), the two window diagrams and the figures
# embedded in the plans, each SVG as a PNG. Look at every PNG: overlapping or clipped labels,
# legends listing marks that are not drawn, empty panels, axes running far past the last peak.
# The panels and peak tables are the invented examples of examples/.
# Needs chromium and pdftoppm (Debian: apt-get install chromium poppler-utils) and a release
# build (cargo build --release). Not part of `cargo test`; rendering tests assert on structure.
#   tools/look_at_figures.sh [OUTDIR]   (default: target/figures-look)
set -euo pipefail
repo=$(cd "$(dirname "$0")/.." && pwd)
pw="$repo/target/release/phasewise"
out=$(realpath -m "${1:-$repo/target/figures-look}")
mkdir -p "$out"
[[ -x "$pw" ]] || { echo "$0: build first: cargo build --release" >&2; exit 2; }
command -v chromium >/dev/null || { echo "$0: chromium missing (apt-get install chromium)" >&2; exit 2; }
command -v pdftoppm >/dev/null || { echo "$0: pdftoppm missing (apt-get install poppler-utils)" >&2; exit 2; }
shot() { # shot FILE PNG WIDTH,HEIGHT
    chromium --headless --no-sandbox --disable-gpu --hide-scrollbars --window-size="$3" \
        --screenshot="$2" "file://$1" >/dev/null 2>&1
}
cd "$repo"
"$pw" plan --input examples/panels/analgesic-impurities.txt --no-date --document-id DEMO-LC-1 \
    --output "$out/plan-lc.html"
"$pw" plan --input examples/panels/solvent-screen.txt --no-date --document-id DEMO-GC-1 \
    --output "$out/plan-gc.html"
m=examples/measured
"$pw" scout $m/scout-10min.csv $m/scout-30min.csv --gradients '0:5,10:95;0:5,30:95' \
    --column 150x4.6 --flow 1.0 --dwell 0.8 --particle 3.5 \
    --window-svg "$out/window-lc.svg" --chromatogram-svg "$out/optimum-lc.svg" >/dev/null
"$pw" scout --mode gc $m/gc-scout-5cpm.csv $m/gc-scout-15cpm.csv \
    --ovens '40:1,5:300:5;40:1,15:300:5' --column 30x0.25x0.25 --velocity 35 --phase gc-5-phenyl \
    --ramp-range 2,20 --window-svg "$out/window-gc.svg" --chromatogram-svg "$out/optimum-gc.svg" \
    >/dev/null
for p in plan-lc plan-gc; do
    shot "$out/$p.html" "$out/$p-screen.png" 1100,3000
    chromium --headless --no-sandbox --disable-gpu --no-pdf-header-footer \
        --print-to-pdf="$out/$p.pdf" "file://$out/$p.html" >/dev/null 2>&1
    pdftoppm -r 50 -png "$out/$p.pdf" "$out/$p-page"
done
# the figures embedded in the plans (first choice and back-up), each on its own at full size
python3 - "$out" <<'PY'
import re, sys
out = sys.argv[1]
for plan in ["plan-lc", "plan-gc"]:
    html = open(f"{out}/{plan}.html", encoding="utf-8").read()
    for i, svg in enumerate(re.findall(r"<svg.*?</svg>", html, re.S), 1):
        open(f"{out}/{plan}-fig{i}.svg", "w", encoding="utf-8").write(svg)
PY
for f in window-lc window-gc optimum-lc optimum-gc; do
    shot "$out/$f.svg" "$out/$f.png" 1000,800
done
for f in "$out"/plan-*-fig*.svg; do
    shot "$f" "${f%.svg}.png" 1000,900
done
ls -1 "$out"

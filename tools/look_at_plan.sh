#!/bin/sh
# Renders the invented demo plans (tests/data/plan/*.json) to HTML, prints them to A4 PDF with
# headless Chromium, and turns every page into a PNG to look at (issue 16: "check the pages").
# Needs chromium and pdftoppm (Debian: apt-get install chromium poppler-utils).
# Usage: tools/look_at_plan.sh [OUTDIR]   (default: target/plan-look)
set -eu
out=${1:-target/plan-look}
mkdir -p "$out"
cargo build --quiet --example plan_from_json
for panel in lc_impurity_panel gc_solvent_panel; do
    html="$out/$panel.html"
    target/debug/examples/plan_from_json "tests/data/plan/$panel.json" "$html"
    chromium --headless --no-sandbox --disable-gpu --no-pdf-header-footer \
        --print-to-pdf="$out/$panel.pdf" "file://$(realpath "$html")" 2>/dev/null
    pdftoppm -r 60 -png "$out/$panel.pdf" "$out/$panel-page"
    chromium --headless --no-sandbox --disable-gpu --hide-scrollbars --window-size=1100,2400 \
        --screenshot="$out/$panel-screen.png" "file://$(realpath "$html")" 2>/dev/null
done
ls -1 "$out"

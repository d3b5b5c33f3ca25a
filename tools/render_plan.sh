#!/usr/bin/env bash
# Render an HTML method plan to a PNG with headless Chromium, to look at the layout by eye.
# Not part of `cargo test`. Usage: tools/render_plan.sh PLAN.html OUT.png [WIDTH,HEIGHT]
# Installs the Debian package `chromium` when /usr/bin/chromium is missing (needs root).
set -euo pipefail

if [[ $# -lt 2 ]]; then
    echo "usage: $0 PLAN.html OUT.png [WIDTH,HEIGHT]" >&2
    exit 2
fi
html=$1
out=$2
size=${3:-1200,3000}

if [[ ! -f "$html" ]]; then
    echo "$0: $html: no such file" >&2
    exit 2
fi
out_dir=$(dirname -- "$out")
if [[ ! -d "$out_dir" || ! -w "$out_dir" ]]; then
    echo "$0: cannot write in $out_dir" >&2
    exit 2
fi

if [[ ! -x /usr/bin/chromium ]]; then
    echo "$0: /usr/bin/chromium missing; installing the Debian package chromium" >&2
    apt-get update && apt-get install -y chromium
fi

abs_html=$(realpath -- "$html")
abs_out=$(realpath -- "$out_dir")/$(basename -- "$out")
profile=$(mktemp -d)
trap 'rm -rf -- "$profile"' EXIT

/usr/bin/chromium --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --user-data-dir="$profile" --screenshot="$abs_out" --window-size="$size" \
    "file://$abs_html" 2> >(grep -v -e 'dbus' -e 'Fontconfig' >&2 || true)

if [[ ! -s "$abs_out" ]]; then
    echo "$0: chromium wrote no screenshot to $abs_out" >&2
    exit 1
fi
echo "$abs_out"

#!/usr/bin/env bash
# Cold store for fresh produce: air from -30 to 10 °C must read within ±0.5 °C, with 99.7 % of
# channels inside that (a Monte Carlo over the tolerances), on a 12-bit converter whose reference is
# the 3.3 V supply of the divider. Three thermistors are on the shortlist (cold-store-parts.csv, our own
# plausible figures): which one, in which divider, with which standard resistor, and which firmware
# table? The requirements are in cold-store.json; flags on the command line override them, and
# `-o DIR` writes the review package (report.md, design.json, design.h, SVG pictures).
# Usage: examples/cold-store.sh [path/to/rtline] [more flags]
set -euo pipefail
rtline=${1:-rtline}
shift || true
"$rtline" design --spec "$(dirname "$0")/cold-store.json" "$@"

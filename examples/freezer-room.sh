#!/usr/bin/env bash
# Walk-in freezer room: -30 to 5 °C, a probe known only by its R-T points (freezer-room-rt.csv, our own
# illustrative data). Fit Steinhart-Hart to the points, see what a beta model would cost, size a divider
# for the span with E96 values (freezer-room.json), then check the chosen design point by point.
# Run from the repository root. Usage: examples/freezer-room.sh [path/to/rtline]
set -euo pipefail
rtline=${1:-rtline}
"$rtline" fit --points examples/freezer-room-rt.csv
echo
"$rtline" size --spec examples/freezer-room.json
echo
"$rtline" check --points examples/freezer-room-rt.csv --span -30:5 --step 5 --circuit divider-high --rs 51k1

#!/usr/bin/env bash
# Walk-in freezer room: -30 to 5 °C, a probe known only by its R-T points (freezer-room-rt.csv, our own
# illustrative data). Fit Steinhart-Hart to the points, see what a beta model would cost, then size a
# divider for the span with E96 values and check the chosen design point by point.
# Usage: examples/freezer-room.sh [path/to/rtline]
set -euo pipefail
rtline=${1:-rtline}
here=$(dirname "$0")
"$rtline" fit --points "$here/freezer-room-rt.csv"
echo
"$rtline" size --points "$here/freezer-room-rt.csv" --span -30:5 --circuit divider-high --series E96 --top 3
echo
"$rtline" check --points "$here/freezer-room-rt.csv" --span -30:5 --step 5 --circuit divider-high --rs 51k1

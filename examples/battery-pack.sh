#!/usr/bin/env bash
# Battery-pack monitor: cell temperature -20 to 60 °C, a 47 kΩ NTC with B = 4090 K (our own plausible
# figures), 5 V excitation, at most 0.2 mW in the thermistor and at least 1 V of output span. Which
# topology is most linear here? The design is in battery-pack.json.
# Usage: examples/battery-pack.sh [path/to/rtline]
set -euo pipefail
rtline=${1:-rtline}
"$rtline" size --spec "$(dirname "$0")/battery-pack.json"

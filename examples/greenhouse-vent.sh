#!/usr/bin/env bash
# Greenhouse vent controller: air temperature 0 to 45 °C, a 10 kΩ NTC (B = 3890 K, our own plausible
# figures) read ratiometrically by a 3.3 V ADC. The bead in still air has a dissipation constant of
# about 1.5 mW/K, and self-heating must stay under 0.2 K. Which series resistor should be fitted?
# The design is in greenhouse-vent.json; flags on the command line would override it.
# Usage: examples/greenhouse-vent.sh [path/to/rtline]
set -euo pipefail
rtline=${1:-rtline}
"$rtline" size --spec "$(dirname "$0")/greenhouse-vent.json"

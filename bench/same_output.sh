#!/bin/sh
# Checks that two rtline builds print the same bytes for a set of size runs covering every topology,
# drive, load, line and constraint: run it against the build before a speed-up to show the speed-up
# changed no result. Usage: bench/same_output.sh OLD_RTLINE NEW_RTLINE
set -u
old=$1
new=$2
fail=0
n=0
base="size --r25 10k --beta 3950 --format json"
while IFS= read -r args; do
    [ -z "$args" ] && continue
    n=$((n + 1))
    a=$($old $base $args 2>&1; echo "exit $?")
    b=$($new $base $args 2>&1; echo "exit $?")
    if [ "$a" != "$b" ]; then
        echo "DIFFERENT: $args"
        fail=1
    fi
done <<'RUNS'
--span 5:40 --circuit divider-low --top 20
--span 5:40 --circuit divider-high --top 20 --line least-squares
--span 5:40 --circuit divider-low --line minimax --series E96
--span -20:60 --circuit shunt --top 10
--span -20:60 --circuit shunt --current 100u --top 10 --max-power 50u
--span -20:60 --circuit shunt-divider --series E48 --top 30
--span -20:60 --circuit shunt-divider --series E24 --line least-squares --top 10
--span -20:60 --circuit shunt-divider --series E12 --line minimax --top 10
--span 0:100 --circuit shunt-divider --series E96 --range 100:1M --top 25 --step 0.25
--span 0:45 --circuit divider-low --excitation 3.3 --max-power 100u --top 50
--span 0:45 --circuit divider-low --excitation 3.3 --max-self-heating 0.05 --dissipation 1.5 --top 50
--span 0:45 --circuit divider-low --excitation 3.3 --min-sensitivity 10m --top 50
--span 0:45 --circuit divider-low --min-span 0.3 --top 50
--span 0:45 --circuit divider-high --excitation 5 --load 100k --top 10
--span 0:45 --circuit shunt-divider --excitation 5 --load 47k --max-power 200u --min-span 0.5 --top 10
--span 0:45 --circuit shunt-divider --excitation 5 --min-sensitivity 20m --series E12 --top 10
--span 0:45 --circuit bridge --top 10
--span 0:45 --circuit bridge --load 10k --excitation 2.5 --top 10
--span 0:45 --circuit bridge --current 100u --top 10
--span 0:45 --circuit bridge --null-at 20 --line least-squares --top 10
--span -30:5 --circuit shunt-bridge --series E48 --top 10
--span -30:5 --circuit shunt-bridge --series E24 --load 20k --excitation 3.3 --max-power 100u --top 10
--span -30:5 --circuit shunt-bridge --series E24 --current 50u --line minimax --top 10
--span 0:100 --circuit shunt-bridge --series E192 --range 100:1M --top 5 --step 0.25
--span 0:45 --circuit divider-low --excitation 5 --min-span 4.9
--span -30:5 --compare --excitation 3.3 --max-power 1m
--span 5:40 --compare
--span 5:40 --circuit divider-low --tradeoff
--span 5:40 --circuit shunt --tradeoff --current 10u
--span 5:40 --circuit divider-low --tradeoff --excitation 5 --max-power 0.4m
RUNS
echo "$n runs compared"
exit $fail

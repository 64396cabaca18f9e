#!/bin/sh
# Fails when a core source or public header names a command-line flag ("--step", "--adc-ref"): the
# core names its inputs by rtline::Input, and the CLI maps them to flags (src/cli/input_flags.cpp).
# A C++ pre-decrement ("--n;", "; --shift)") is not a flag.
root=${1:-.}
# A flag built from its name ("--" + name) counts too.
found=$( (grep -rnE -- '--[a-z][a-z0-9-]*' "$root/src/core" "$root/include/rtline" |
          grep -vE -- '(^|[^a-z0-9-])--[a-z_][a-z0-9_]*;|; --[a-z_][a-z0-9_]*\)';
         grep -rnF -- '"--"' "$root/src/core" "$root/include/rtline") )
if [ -n "$found" ]; then
    echo "command-line flags in the core (name the input by rtline::Input instead):"
    echo "$found"
    exit 1
fi
echo "no command-line flags in src/core or include/rtline"

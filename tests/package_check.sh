#!/usr/bin/env bash
# The man pages and the bash completion the build made, checked against the program itself (ctest runs
# this as package_docs):
#   - every command `rtline --help` lists has a man page, and it shows every long option of its --help;
#   - completing `rtline COMMAND --` offers exactly the long options of `rtline COMMAND --help`;
#   - the values completed for a word-valued option are exactly those the program names when it refuses a
#     wrong one ("choose A, B or C").
#   bash tests/package_check.sh RTLINE COMPLETION_FILE MAN_DIR
set -uo pipefail
rtline=$1 completion=$2 man_dir=$3
failed=0
fail() { echo "FAIL: $*"; failed=$((failed + 1)); }

# shellcheck source=/dev/null
source "$completion"
complete_words() {  # the completion's answer for the words given, the last one being completed
    COMP_WORDS=(rtline "$@")
    COMP_CWORD=$((${#COMP_WORDS[@]} - 1))
    COMPREPLY=()
    _rtline
    printf '%s\n' "${COMPREPLY[@]}" | sort -u
}
long_options() { "$rtline" "$1" --help | grep -oE '^  +(-[a-z],)?--[a-z0-9-]+' | sed 's/.*--/--/' | sort -u; }

commands=$("$rtline" --help | sed -n '/^Subcommands:/,/^$/p' | sed -n 's/^  \([a-z][a-z0-9-]*\) .*/\1/p')
[ -n "$commands" ] || fail "rtline --help lists no commands"
[ -f "$man_dir/rtline.1.gz" ] || fail "no rtline.1.gz"
checked=0
for c in $commands; do
    page="$man_dir/rtline-$c.1.gz"
    if [ ! -f "$page" ]; then fail "no man page for $c"; continue; fi
    text=$(MANWIDTH=200 man -l "$page" 2>/dev/null)
    opts=$(long_options "$c")
    [ -n "$opts" ] || fail "$c --help shows no options"
    for o in $opts; do
        grep -q -- "$o" <<<"$text" || fail "man page of $c lacks $o"
    done
    offered=$(complete_words "$c" -- | grep -- '^--')
    [ "$offered" = "$opts" ] || fail "completion of '$c --' differs from its --help:
$(diff <(echo "$opts") <(echo "$offered"))"
    checked=$((checked + 1))
done

# The words in "...; choose A, B or C" (parenthesised notes dropped), or "... takes A (note) or B".
refused_choices() {
    "$rtline" "$@" 2>&1 >/dev/null | sed -E 's/\([^)]*\)//g; s/.*(choose|takes) //; s/ or /, /; s/[ ]+,/,/g' \
        | tr ',' '\n' | sed 's/^ *//; s/ *$//' | grep -v '^$' | sort -u
}
base=(--r25 10k --beta 3890 --span 0:45)
while read -r command option; do
    case $command in
        check) args=(check "${base[@]}" --circuit divider-low --rs 9k1) ;;
        size) args=(size "${base[@]}" --circuit divider-low) ;;
        table) args=(table "${base[@]}" --circuit divider-low --rs 9k1 --degree 3) ;;
        budget) args=(budget "${base[@]}" --circuit divider-low --rs 9k1) ;;
        fit) args=(fit --points "$(dirname "$0")/../examples/freezer-room-rt.csv") ;;
        model) args=(model --points "$(dirname "$0")/../examples/freezer-room-rt.csv" --span 0:10) ;;
    esac
    want=$(refused_choices "${args[@]}" "$option" not-a-choice)
    got=$(complete_words "$command" "$option" "")
    if [ -z "$want" ] || [ "$want" != "$got" ]; then
        fail "$command $option: the program takes [$(echo $want)], completion offers [$(echo $got)]"
    fi
    checked=$((checked + 1))
done <<'LIST'
check --circuit
check --format
check --line
size --series
size --line
table --spacing
table --fit
budget --distribution
budget --reading
fit --model
model --model
LIST

echo "package_check: $checked checked, $failed failed"
[ "$failed" -eq 0 ] && [ "$checked" -gt 0 ]

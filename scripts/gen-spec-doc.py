#!/usr/bin/env python3
"""Writes docs/spec.md: every spec key of every command, from the program's own --help.

Usage: scripts/gen-spec-doc.py build/rtline > docs/spec.md
"""
import re
import subprocess
import sys

exe = sys.argv[1]
commands = ["model", "fit", "check", "size", "table", "budget"]
print("""# Spec files and JSON Lines batches

`--spec FILE` (`-` for stdin) reads a JSON object whose keys are a command's long flag names with `-`
turned into `_`; the values are numbers or the same strings the flags take (`"22k"`, `"-30:5"`), and
`true`/`false` for switches. The spec's values are put before the command line's own flags, so a flag
given on the command line overrides the spec. An unknown key, a wrong type or a bad value is exit 2 with
a message naming the key.

A design document that rtline wrote can be read back as a spec: a `check` or `size` JSON output gives its
`model` (beta or Steinhart–Hart; a table model cannot be read back), `span`, `line` and `circuit`
(topology, resistors, load, drive); for `size`, the resistors of the best candidate. So
`rtline size ... --format json | rtline check --spec -` checks the chosen design. A relative `points` path in a spec file is read from the spec file's folder.

`--jsonl` reads one spec per line of stdin and writes one compact JSON result per line of stdout, in
order; blank lines are skipped. The command line's flags apply to every line (and override it). A bad
line gives `{"line": N, "error": "..."}` in its place and the batch goes on; a line with no feasible
design gives `{"line": N, "error": "...", "infeasible": true}`. The exit code is 2 when any line was bad,
else 1 when any had no feasible design, else 0. `-o` is refused with `--jsonl`.

The keys below are generated from each command's `--help` (scripts/gen-spec-doc.py); units and
defaults are those the flags state.
""")
for cmd in commands:
    r = subprocess.run([exe, cmd, "--help"], capture_output=True, text=True)
    if r.returncode != 0:
        continue
    print(f"## {cmd}\n")
    print("| key | flag | meaning |")
    print("| --- | --- | --- |")
    for line in r.stdout.splitlines():
        m = re.match(r"^\s+(?:-\w,)?--([a-z0-9-]+)(?: [A-Z]+(?: REQUIRED)?)?\s{2,}(.*)$", line)
        if not m:
            continue
        flag, meaning = m.group(1), m.group(2).strip()
        if flag in ("help", "spec", "jsonl"):
            continue
        required = " (required)" if "REQUIRED" in line else ""
        meaning = meaning.replace("|", "\\|")
        print(f"| `{flag.replace('-', '_')}` | `--{flag}` | {meaning}{required} |")
    print()

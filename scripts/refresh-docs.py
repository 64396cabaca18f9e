#!/usr/bin/env python3
"""Re-runs the commands shown in Markdown files and pastes their real output back.

A block is a ```text fence whose first line starts with "$ "; the command is that line and any
continuation lines ending in a backslash. The rest of the block is replaced by what the command prints,
run from the repository root with build/ first on PATH. tests/docs_test.cpp checks the same blocks.
Usage: scripts/refresh-docs.py README.md docs/*.md
"""
import os
import subprocess
import sys

root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
env = dict(os.environ, PATH=os.path.join(root, "build") + os.pathsep + os.environ.get("PATH", ""))


def refresh(path):
    lines = open(path, encoding="utf-8").read().split("\n")
    out = []
    i = 0
    while i < len(lines):
        out.append(lines[i])
        if lines[i].strip() == "```text" and i + 1 < len(lines) and lines[i + 1].startswith("$ "):
            i += 1
            command = []
            while True:
                out.append(lines[i])
                command.append(lines[i][2:] if not command else lines[i])
                if not lines[i].endswith("\\"):
                    break
                i += 1
            while not lines[i].startswith("```"):
                i += 1
            text = "\n".join(command)
            result = subprocess.run(["bash", "-c", text], cwd=root, env=env, capture_output=True, text=True)
            body = result.stdout
            if result.returncode != 0:
                body += result.stderr
            out.extend(body.rstrip("\n").split("\n"))
            out.append(lines[i])
        i += 1
    open(path, "w", encoding="utf-8").write("\n".join(out))


for p in sys.argv[1:]:
    refresh(p)

#!/usr/bin/python3
"""Reads a Markdown document rtline wrote, with nothing but Python's standard library, and reports
its structure as GitHub-flavoured Markdown (the GFM spec's pipe tables) would render it.

stdin:  {"text": "the whole document"}
stdout: {"headings": [{"level": N, "text": "..."}],
         "items": [{"label": "..." or null, "text": "..."}],   # "- **label:** text" list items
         "tables": [{"heading": "the heading above it", "header": [...], "align": ["left"|"right"|"none"],
                     "rows": [["cell", ...], ...]}],
         "quotes": ["one paragraph of a block quote, as rendered text", ...], "code_blocks": N}

Cells are split at every '|' not preceded by a backslash, the outer pipes dropped, and backslash
escapes of ASCII punctuation undone (GFM spec, "Backslash escapes" and "Tables"). The script exits
non-zero, naming the line, when the document would not render as the tables it means to hold:
a delimiter row whose cell count differs from the header's, a body row with another cell count,
a table not set off by blank lines, or an unclosed code fence. Nothing here knows rtline's code.
"""
import json
import re
import sys

DELIMITER_CELL = re.compile(r"^\s*(:?)-{3,}(:?)\s*$")
ESCAPABLE = set("!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~")


def fail(number, why):
    raise SystemExit("line %d: %s" % (number, why))


def split_cells(line):
    """The cells of a table line: split at unescaped pipes, the outer ones dropped."""
    body = line.strip()
    if not body.startswith("|"):
        return None
    cells, cell, i = [], "", 1
    while i < len(body):
        ch = body[i]
        if ch == "\\" and i + 1 < len(body):
            cell += body[i:i + 2]
            i += 2
            continue
        if ch == "|":
            cells.append(cell)
            cell = ""
        else:
            cell += ch
        i += 1
    if cell.strip():
        cells.append(cell)  # a row without the closing pipe still ends its last cell
    return [c.strip() for c in cells]


STRONG = re.compile(r"(?<!\\)\*\*(.+?)(?<!\\)\*\*")


def plain(text):
    """Running text as it reads once rendered: strong emphasis (**...**) dropped, escapes undone."""
    return unescape(STRONG.sub(lambda m: m.group(1), text))


def unescape(text):
    out, i = "", 0
    while i < len(text):
        if text[i] == "\\" and i + 1 < len(text) and text[i + 1] in ESCAPABLE:
            out += text[i + 1]
            i += 2
        else:
            out += text[i]
            i += 1
    return out


def read(text):
    lines = text.split("\n")
    doc = {"headings": [], "items": [], "tables": [], "quotes": [], "code_blocks": 0}
    heading = ""
    quote = None
    i = 0
    while i < len(lines):
        line = lines[i]
        number = i + 1
        if line.startswith("```"):
            end = i + 1
            while end < len(lines) and not lines[end].startswith("```"):
                end += 1
            if end == len(lines):
                fail(number, "a code fence that is never closed")
            doc["code_blocks"] += 1
            i = end + 1
            continue
        if line.startswith(">"):
            part = plain(line[1:].strip())
            if quote is None:
                quote = []
            if part:
                quote.append(part)
            elif quote:
                doc["quotes"].append(" ".join(quote))
                quote = []
            i += 1
            continue
        if quote:
            doc["quotes"].append(" ".join(quote))
        quote = None
        m = re.match(r"^(#{1,6}) (.*)$", line)
        if m:
            heading = unescape(m.group(2).strip())
            doc["headings"].append({"level": len(m.group(1)), "text": heading})
            i += 1
            continue
        if line.startswith("- "):
            item = line[2:]
            m = re.match(r"^\*\*(.*?):\*\* (.*)$", item)
            if m:
                doc["items"].append({"label": unescape(m.group(1)), "text": unescape(m.group(2))})
            else:
                doc["items"].append({"label": None, "text": unescape(item)})
            i += 1
            continue
        header = split_cells(line)
        if header is not None:
            if i > 0 and lines[i - 1].strip():
                fail(number, "a table right after other text (it would not start a table)")
            if i + 1 >= len(lines):
                fail(number, "a table header without a delimiter row")
            delimiter = split_cells(lines[i + 1])
            if delimiter is None or len(delimiter) != len(header):
                fail(number + 1, "the delimiter row does not have the header's %d cells" % len(header))
            align = []
            for cell in delimiter:
                d = DELIMITER_CELL.match(cell)
                if not d:
                    fail(number + 1, "'%s' is not a delimiter cell" % cell)
                align.append("right" if d.group(2) and not d.group(1) else
                             "left" if d.group(1) and not d.group(2) else
                             "center" if d.group(1) else "none")
            table = {"heading": heading, "header": [unescape(c) for c in header], "align": align, "rows": []}
            j = i + 2
            while j < len(lines) and lines[j].strip():
                row = split_cells(lines[j])
                if row is None:
                    fail(j + 1, "text right after a table (it would be read as a row)")
                if len(row) != len(header):
                    fail(j + 1, "a row of %d cells under a header of %d" % (len(row), len(header)))
                table["rows"].append([unescape(c) for c in row])
                j += 1
            doc["tables"].append(table)
            i = j
            continue
        i += 1
    if quote:
        doc["quotes"].append(" ".join(quote))
    return doc


if __name__ == "__main__":
    json.dump(read(json.load(sys.stdin)["text"]), sys.stdout)

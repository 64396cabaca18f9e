#!/usr/bin/python3
"""Reads an SVG picture rtline wrote, with Python's own XML parser, and reports what it shows.

stdin:  {"path": "picture.svg"}
stdout: {"root": {"tag", "width", "height"}, "title": "...", "texts": ["every text element", ...],
         "scripts": N, "links": N,
         "plots": [{"title", "area": {"x", "y", "w", "h"},
                    "x_ticks" / "y_ticks" / "right_ticks" / "top_ticks": [{"pos": px, "label": "..."}],
                    "x_label", "y_label", "right_label", "top_label",
                    "legend": ["entry text", ...],
                    "series": [{"label", "polylines": [[[x, y], ...], ...]}],
                    "markers": [{"label", "points": [[x, y], ...]}]}]}

xml.etree.ElementTree.parse raises on any text that is not well-formed XML (unescaped & or <,
mismatched tags, bad characters), so a clean run is the well-formedness check. Positions come from
the SVG attributes as written: a tick or marker group's transform="translate(x,y)", a polyline's
points="x,y x,y ...", the plot area's rect. Nothing here knows how rtline computed them.
"""
import json
import re
import sys
import xml.etree.ElementTree as ET

NS = "{http://www.w3.org/2000/svg}"
TRANSLATE = re.compile(r"translate\(\s*([-0-9.eE+]+)\s*[, ]\s*([-0-9.eE+]+)\s*\)")


def translate(element):
    m = TRANSLATE.search(element.get("transform", ""))
    if not m:
        raise SystemExit("no translate() on a " + element.tag)
    return float(m.group(1)), float(m.group(2))


def text_of(element):
    return "".join(element.itertext())


def classes(element):
    return element.get("class", "").split()


def child_title(element):
    t = element.find(NS + "title")
    return "" if t is None else text_of(t)


def read_plot(g):
    plot = {"title": "", "x_ticks": [], "y_ticks": [], "right_ticks": [], "top_ticks": [], "legend": [],
            "series": [], "markers": [], "x_label": "", "y_label": "", "right_label": "", "top_label": ""}
    for e in g.iter():
        c = classes(e)
        if e.tag == NS + "rect" and "plot-area" in c:
            plot["area"] = {k: float(e.get(a)) for k, a in (("x", "x"), ("y", "y"), ("w", "width"), ("h", "height"))}
        elif e.tag == NS + "text" and "plot-title" in c:
            plot["title"] = text_of(e)
        elif e.tag == NS + "text":
            for name in ("x-label", "y-label", "right-label", "top-label"):
                if name in c:
                    plot[name.replace("-", "_")] = text_of(e)
        elif e.tag == NS + "g" and c and c[0] in ("x-tick", "y-tick", "right-tick", "top-tick"):
            x, y = translate(e)
            kind = c[0].split("-")[0]
            pos = x if kind in ("x", "top") else y
            plot[kind + "_ticks"].append({"pos": pos, "label": text_of(e.find(NS + "text"))})
        elif e.tag == NS + "g" and "legend" in c:
            plot["legend"] = [text_of(t) for t in e.iter(NS + "text")]
        elif e.tag == NS + "g" and "series" in c:
            lines = []
            for pl in e.iter(NS + "polyline"):
                pts = [tuple(float(v) for v in p.split(",")) for p in pl.get("points").split()]
                lines.append(pts)
            plot["series"].append({"label": child_title(e), "polylines": lines})
        elif e.tag == NS + "g" and "markers" in c:
            pts = [list(translate(m)) for m in e.findall(NS + "g")]
            plot["markers"].append({"label": child_title(e), "points": pts})
    return plot


def main():
    path = json.load(sys.stdin)["path"]
    root = ET.parse(path).getroot()
    out = {"root": {"tag": root.tag, "width": root.get("width"), "height": root.get("height")},
           "title": child_title(root),
           "texts": [text_of(t) for t in root.iter(NS + "text")],
           "scripts": len(list(root.iter(NS + "script"))) + len(list(root.iter(NS + "foreignObject"))),
           "links": sum(1 for e in root.iter() for k in e.attrib if k.endswith("href") or k == "src"),
           "plots": [read_plot(g) for g in root.iter(NS + "g") if "plot" in classes(g)]}
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()

"""Checks a report page (tritsim report) as a browser rendered it.

usage: report_page_check.py run  RUN.json  PAGE.html DOM.html PNG LOG
       report_page_check.py sweep SWEEP.csv PAGE.html DOM.html PNG LOG

PAGE.html is the file tritsim wrote, DOM.html what headless Chromium's
--dump-dom printed after running its scripts, PNG its --screenshot, LOG its
stderr with --enable-logging=stderr. Prints one "FAIL: ..." line per
problem and exits 1 if there is any.

The expected values are computed here, independently of tritsim's C++:
the headline figures from the JSON with Python's own number formatting
(printf-style %.4g, C99 7.21.6.1, with SI prefixes), the Pareto front of the
sweep from the textbook definition (Deb 2001, ch. 2: a point is dominated
when another is at least as good in every objective and better in one), the
sorted order from Python's sort.
"""
import csv
import html.parser
import json
import math
import re
import struct
import sys
import zlib

failures = []


def fail(message):
    failures.append(message)
    print("FAIL: " + message)


def si(v, unit="", digits=4):
    """SiText of sim/report/svg_plot.h, written again from its comment."""
    space = " " if unit else ""
    mag = abs(v)
    if mag == 0 or 1e-2 <= mag < 1e4:
        return "%.*g" % (digits, v) + space + unit
    k = max(-5, min(6, math.floor(math.log10(mag) / 3)))
    scaled = v / math.pow(1000.0, k)
    if abs(float("%.*g" % (digits, scaled))) >= 1000 and k < 6:
        k += 1
        scaled = v / math.pow(1000.0, k)
    prefix = {0: "", 1: "k", 2: "M", 3: "G", 4: "T", 5: "P", 6: "E",
              -1: "m", -2: "\u00b5", -3: "n", -4: "p", -5: "f"}[k]
    return "%.*g" % (digits, scaled) + " " + prefix + unit


class Dom(html.parser.HTMLParser):
    """Text by element id, <html> attributes, and table rows' data-v cells."""

    def __init__(self):
        super().__init__()
        self.by_id = {}
        self.root = {}
        self.stack = []  # open elements' ids (None when none)
        self.tables = {}  # table id -> list of rows, each a list of (data-v, text)
        self.table = None
        self.cell = None
        self.headers = {}  # table id -> list of (data-key, aria-sort)

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "html":
            self.root = a
        if tag == "table":
            self.table = a.get("id")
            self.tables[self.table] = []
            self.headers[self.table] = []
        if tag == "tr" and self.table is not None:
            self.tables[self.table].append([])
        if tag == "th" and self.table is not None:
            self.headers[self.table].append((a.get("data-key"), a.get("aria-sort")))
            self.tables[self.table].pop() if self.tables[self.table] == [[]] else None
        if tag == "td" and self.table is not None:
            self.cell = [a.get("data-v"), ""]
        if tag in ("meta", "br", "img", "input", "link"):
            return
        self.stack.append(a.get("id"))
        if a.get("id"):
            self.by_id[a["id"]] = ""

    def handle_endtag(self, tag):
        if tag == "td" and self.cell is not None and self.table is not None:
            self.tables[self.table][-1].append(tuple(self.cell))
            self.cell = None
        if tag == "table":
            self.table = None
        if tag in ("meta", "br", "img", "input", "link"):
            return
        if self.stack:
            self.stack.pop()

    def handle_data(self, data):
        for element_id in self.stack:
            if element_id:
                self.by_id[element_id] += data
        if self.cell is not None:
            self.cell[1] += data


def png_size_and_colours(path):
    """Width, height and number of distinct RGB(A) pixels of an 8-bit PNG
    (PNG specification, ISO/IEC 15948: IHDR, IDAT, filter types 0-4)."""
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise ValueError("not a PNG")
    pos, idat, width, height, colour = 8, b"", 0, 0, 0
    while pos < len(data):
        length, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            width, height, depth, colour = struct.unpack(">IIBB", body[:10])
            if depth != 8 or colour not in (2, 6):
                raise ValueError("unexpected PNG depth %d colour type %d" % (depth, colour))
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    bpp = 3 if colour == 2 else 4
    raw = zlib.decompress(idat)
    stride = width * bpp
    prev = bytearray(stride)
    colours = set()
    for y in range(height):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if f == 1:
                line[i] = (line[i] + a) & 255
            elif f == 2:
                line[i] = (line[i] + b) & 255
            elif f == 3:
                line[i] = (line[i] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[i] = (line[i] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        if y % 4 == 0:  # every 4th row is plenty to count colours
            for x in range(0, stride, bpp * 2):
                colours.add(bytes(line[x:x + 3]))
        prev = line
    return width, height, len(colours)


def common_checks(page_path, dom_path, png_path, log_path):
    page = open(page_path, encoding="utf-8").read()
    # Self-contained: no reference outside the file (the SVG namespace URI is a
    # name, not a fetch).
    outside = re.findall(r"(?:https?:)?//[^\s\"'<>)]+", page.replace(
        "http://www.w3.org/2000/svg", ""))
    outside = [u for u in outside if not u.startswith("//") or "." in u.split("/")[2]]
    if outside:
        fail("%s refers outside the file: %s" % (page_path, outside[:3]))
    for needle in ("<link", "<img", "<iframe", "@import", " src="):
        if needle in page:
            fail("%s holds %r (the page must be self-contained)" % (page_path, needle))
    if re.search(r"url\((?!#)", page):
        fail("%s holds a url() that is not a fragment" % page_path)
    dom = Dom()
    dom.feed(open(dom_path, encoding="utf-8").read())
    if dom.root.get("data-page-ready") != "1":
        fail("%s: the page's script did not finish (no data-page-ready=1 in the DOM)" % page_path)
    if dom.root.get("data-page-errors") != "0":
        fail("%s: %s script or console errors" % (page_path, dom.root.get("data-page-errors")))
    console = [l for l in open(log_path, errors="replace") if ":CONSOLE" in l]
    if console:
        fail("%s: console messages: %s" % (page_path, console[:3]))
    try:
        width, height, colours = png_size_and_colours(png_path)
        if width < 800 or height < 600:
            fail("%s is %dx%d" % (png_path, width, height))
        if colours < 8:
            fail("%s has only %d colours: nothing drawn" % (png_path, colours))
    except (OSError, ValueError, zlib.error) as e:
        fail("%s: %s" % (png_path, e))
    return dom


def expect_text(dom, element_id, want):
    got = dom.by_id.get(element_id)
    if got is None:
        fail("no element #%s in the page" % element_id)
    elif got.strip() != want:
        fail("#%s shows %r, expected %r" % (element_id, got.strip(), want))


def check_run(run_path, dom):
    run = json.load(open(run_path))
    for p in run["phases"]:
        n = p["name"]
        expect_text(dom, "h-%s-tokens_per_second" % n, si(p["tokens_per_second"]) + " tokens/s")
        expect_text(dom, "h-%s-joules_per_token" % n, si(p["joules_per_token"], "J"))
        expect_text(dom, "h-%s-watts" % n, si(p["watts"], "W"))
        expect_text(dom, "h-%s-bound_by" % n, p["bound_by"])
        if "roofline-" + n not in dom.by_id:
            fail("no roofline plot for phase %s" % n)
    t = run["totals"]
    expect_text(dom, "h-run-tokens_per_second", si(t["tokens_per_second"]) + " tokens/s")
    expect_text(dom, "h-run-joules_per_token", si(t["joules_per_token"], "J"))
    for plot in ("stalls", "energy"):
        if plot not in dom.by_id:
            fail("no %s plot" % plot)


def check_sweep(csv_path, dom):
    rows = list(csv.DictReader(open(csv_path, newline="")))
    expect_text(dom, "h-points", str(len(rows)))
    ok = [r for r in rows if r["status"] == "ok"]
    best = max(ok, key=lambda r: float(r["tokens_per_second"]))
    expect_text(dom, "h-best-tokens_per_second", si(float(best["tokens_per_second"])) + " tokens/s")
    low = min(ok, key=lambda r: float(r["joules_per_token"]))
    expect_text(dom, "h-best-joules_per_token", si(float(low["joules_per_token"]), "J"))
    # Every point on the max tokens/s, min J/token front is labelled in the plot.
    pts = [(float(r["tokens_per_second"]), float(r["joules_per_token"]), r["id"]) for r in ok]
    front = [p for p in pts if not any(
        q[0] >= p[0] and q[1] <= p[1] and (q[0] > p[0] or q[1] < p[1]) for q in pts)]
    plot = dom.by_id.get("front-tps-jpt", "")
    for _, _, pid in front:
        if pid.split("-")[0] not in plot:
            fail("front point %s is not labelled in the front plot" % pid)
    table = dom.tables.get("front-table-tps-jpt", [])
    if sorted(r[0][1] for r in table if r) != sorted(p[2] for p in front):
        fail("front table %s, expected %s" % ([r[0][1] for r in table if r],
                                               sorted(p[2] for p in front)))
    # The points table was sorted on load by #sort=-tokens_per_second.
    headers = dom.headers.get("points", [])
    keys = [k for k, _ in headers]
    if "tokens_per_second" not in keys:
        fail("points table has no tokens_per_second column: %s" % keys)
        return
    col = keys.index("tokens_per_second")
    if headers[col][1] != "descending":
        fail("points table header tokens_per_second aria-sort=%s, expected descending"
             % headers[col][1])
    shown = [r[keys.index("id")][1] for r in dom.tables["points"] if r]
    # Empty values (failed points) last, ties in file order (a stable sort).
    want = [r["id"] for r in sorted(ok, key=lambda r: -float(r["tokens_per_second"]))]
    want += [r["id"] for r in rows if r["status"] != "ok"]
    if shown != want:
        fail("points table order %s, expected %s (by tokens_per_second, descending)"
             % (shown, want))


def main():
    kind, data, page, dom_path, png, log = sys.argv[1:7]
    dom = common_checks(page, dom_path, png, log)
    if kind == "run":
        check_run(data, dom)
    else:
        check_sweep(data, dom)
    sys.exit(1 if failures else 0)


if __name__ == "__main__":
    main()

"""Open report.html files in headless Chromium; check DOM text, screenshot and PDF.

Usage: report_browser.py WORKDIR OUTDIR...
The PNG screenshot is decoded with zlib here (python3-pil may be absent).
"""
import csv
import html as htmllib
import json
import os
import re
import struct
import subprocess
import sys
import tempfile
import zlib

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync"]
passed = failed = 0


def check(cond, what):
    global passed, failed
    if cond:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


def chromium(args, url):
    with tempfile.TemporaryDirectory() as prof:
        r = subprocess.run(["/usr/bin/chromium"] + FLAGS + ["--user-data-dir=" + prof] + args + [url],
                           stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, timeout=180)
    return r.stdout.decode("utf-8", "replace")


def png_pixels(path):
    """Width, height and rows of RGB(A) bytes of an 8-bit PNG (filters undone)."""
    data = open(path, "rb").read()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    pos, idat, w = 8, b"", 0
    while pos < len(data):
        n, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, ctype = struct.unpack(">IIBB", body[:10])
            assert depth == 8 and ctype in (2, 6), (depth, ctype)
            bpp = 3 if ctype == 2 else 4
        elif kind == b"IDAT":
            idat += body
        pos += 12 + n
    raw = zlib.decompress(idat)
    stride = w * bpp
    rows, prev = [], bytearray(stride)
    for y in range(h):
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
        rows.append(bytes(line))
        prev = line
    return w, h, bpp, rows


def people(v):
    return "{:,.0f}".format(v)


def html_text(t):
    """Text as Chromium serialises it in --dump-dom (&, <, > escaped)."""
    return htmllib.escape(t, quote=False)


def one(work, out):
    name = os.path.basename(out)
    html = os.path.join(out, "report.html")
    url = "file://" + os.path.abspath(html)
    s = json.load(open(os.path.join(out, "summary.json")))
    text = open(html, encoding="utf-8").read()

    dom = chromium(["--dump-dom"], url)
    check("Key figures" in dom, name + ": DOM lacks the key figures heading")
    if "reach" in s:
        r = s["reach"]
        pct = "%.0f%%" % (100 * r["people_within_limit"] / r["people_total"])
        check(pct in dom, name + ": DOM lacks the share within the limit " + pct)
        check(people(r["people_beyond_limit"]) in dom, name + ": DOM lacks people beyond the limit")
        check("sites over capacity" in dom, name + ": DOM lacks sites over capacity")
    if "site" in s:
        site = s["site"]
        check("sites to open" in dom, name + ": DOM lacks sites to open")
        for row in csv.DictReader(open(os.path.join(out, site.get("folder", "."), "sites.csv"))):
            if row["status"] == "new":
                check(html_text(row["id"] + " " + row["name"]) in dom, name + ": DOM lacks new site " + row["id"])
        check(people(site["after"]["people_covered"]) in dom, name + ": DOM lacks people covered after")
    if "supply" in s:
        tot = s["supply"]["totals"]
        check("stock delivered to the sites" in dom, name + ": DOM lacks the stock figure")
        check("{:,.0f} t".format(tot["kg_delivered"] / 1000) in dom, name + ": DOM lacks tonnes delivered")
        for dep, v in tot["by_depot"].items():
            check("%s %g trips" % (dep, v["trips"]) in dom, name + ": DOM lacks trips of depot " + dep)
        for row in csv.DictReader(open(os.path.join(out, "supply_stock.csv"))):
            check(row["site_id"] in dom, name + ": DOM lacks stock of site " + row["site_id"])
        check("Shortages" in dom, name + ": DOM lacks the shortages table")
    if "compare" in s:
        for v in s["compare"]["variants"]:
            check(html_text(v["name"]) in dom, name + ": DOM lacks variant " + v["name"])
        check("Ranking" in dom, name + ": DOM lacks the ranking table")
    if "links" in s:
        for t in s["links"]["top"]:
            check(t["road_id"] in dom, name + ": DOM lacks critical road " + t["road_id"])
    n_img = text.count("data:image/png;base64,")
    check(n_img >= 1 and dom.count("data:image/png;base64,") == n_img,
          name + ": DOM lacks some of its %d images" % n_img)

    shot = os.path.join(work, name + ".png")
    chromium(["--screenshot=" + shot, "--window-size=412,1800"], url)
    check(os.path.isfile(shot), name + ": no screenshot")
    if os.path.isfile(shot):
        w, h, bpp, rows = png_pixels(shot)
        check((w, h) == (412, 1800), name + ": screenshot is %dx%d" % (w, h))
        colours, ink = set(), 0
        for row in rows[::4]:
            for x in range(0, w * bpp, bpp * 2):
                px = row[x:x + 3]
                colours.add(px)
                if px != b"\xff\xff\xff":
                    ink += 1
        # A blank page is one colour; the report has text, maps and boxes.
        check(len(colours) > 200, name + ": screenshot has %d colours" % len(colours))
        check(ink > 0.2 * (h // 4) * (w // 2), name + ": screenshot mostly white")

    pdf = os.path.join(work, name + ".pdf")
    chromium(["--print-to-pdf=" + pdf, "--no-pdf-header-footer"], url)
    check(os.path.isfile(pdf), name + ": no PDF")
    if os.path.isfile(pdf):
        pages = len(re.findall(rb"/Type\s*/Page[^s]", open(pdf, "rb").read()))
        # Each <section class="page"> starts a new A4 page after the opening
        # page of key figures; long tables may add pages.
        breaks = open(html, encoding="utf-8").read().count('<section class="page">')
        check(breaks + 1 <= pages <= breaks + 6,
              name + ": PDF has %d pages for %d page breaks" % (pages, breaks))
        # A4 is 595.28 x 841.89 pt (210 x 297 mm at 72 pt per 25.4 mm).
        boxes = re.findall(rb"/MediaBox\s*\[\s*0\s+0\s+([0-9.]+)\s+([0-9.]+)\s*\]",
                           open(pdf, "rb").read())
        check(boxes and all(abs(float(a) - 595.28) < 1 and abs(float(b) - 841.89) < 1
                            for a, b in boxes),
              name + ": PDF pages are not A4")


def main():
    work = sys.argv[1]
    for out in sys.argv[2:]:
        if not os.path.isfile(os.path.join(out, "report.html")):
            check(False, out + ": no report.html")
            continue
        one(work, out)
    print("report_browser: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())

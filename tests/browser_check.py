#!/usr/bin/env python3
"""browser_check.py - the design review in a real browser.

Usage: browser_check.py LAMPWICK SOURCE_ROOT OUT_DIR [CHROMIUM]

For every bundled profile, `lampwick report` writes OUT_DIR/NAME.html and
headless Chromium (Debian's package) reads it:
- --dump-dom: the document as the browser built it has every section of
  htmlreport.h, in order (spread: the bundled profiles all have a [spread]
  section), a heading in each, every table has a header row of <th>, the
  inline charts are all there; the file has no script, no external
  reference (src, href, url(), @import) and every <svg> parses as XML;
- --print-to-pdf: it prints, a page or more per section (print CSS starts
  each on a new page), and pdftotext finds the specification table's title,
  its first mode's row and the caution;
- --screenshot: OUT_DIR/NAME.png, kept as a CI artifact.
Each browser call is bounded (60 s).
"""
import html.parser
import os
import pathlib
import re
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
from checklib import check, fail, finish  # noqa: E402

LW, ROOT, OUT = sys.argv[1], pathlib.Path(sys.argv[2]), pathlib.Path(sys.argv[3])
CHROMIUM = sys.argv[4] if len(sys.argv) > 4 else shutil.which("chromium") or "chromium"
SECTIONS = ["summary", "inputs", "provenance", "specification", "discharge", "energy",
            "corners", "spread", "warnings", "caution"]




def chromium(args, profile_dir):
    cmd = [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
           "--disable-extensions", "--user-data-dir=" + profile_dir] + args
    return subprocess.run(cmd, capture_output=True, text=True, timeout=60)


class Dom(html.parser.HTMLParser):
    """What the dumped DOM holds: sections, headings, tables and their headers."""

    def __init__(self):
        super().__init__()
        self.sections, self.stack, self.tables, self.svgs = [], [], [], 0
        self.headed = set()

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "section":
            self.sections.append(a.get("id"))
        if tag == "h2" and self.sections:
            self.headed.add(self.sections[-1])
        if tag == "table":
            self.tables.append({"th": 0, "thead": False})
        if tag == "thead" and self.tables:
            self.tables[-1]["thead"] = True
        if tag == "th" and self.tables:
            self.tables[-1]["th"] += 1
        if tag == "svg" and "xmlns" in a or (tag == "svg" and "viewbox" in a):
            self.svgs += 1


def static_checks(name, text):
    check("<script" not in text.lower(), "%s: a script" % name)
    check(not re.search(r"""\s(src|href)\s*=""", text, re.I), "%s: an external reference" % name)
    check("url(" not in text and "@import" not in text, "%s: a CSS reference" % name)
    svgs = re.findall(r"<svg xmlns=.*?</svg>\n(?=<figcaption)", text, re.S)
    check(len(svgs) >= 3, "%s: %d charts" % (name, len(svgs)))
    for k, s in enumerate(svgs):
        try:
            root = ET.fromstring(s)
            check(root.find("{http://www.w3.org/2000/svg}title") is not None,
               "%s: chart %d has no <title>" % (name, k))
        except ET.ParseError as e:
            fail("%s: chart %d is not XML: %s" % (name, k, e))
    return len(svgs)


OUT.mkdir(parents=True, exist_ok=True)
env = dict(os.environ, SOURCE_DATE_EPOCH="1767225600")  # 2026-01-01: a fixed date
with tempfile.TemporaryDirectory() as tmp:
    for prof in sorted((ROOT / "profiles").glob("*.ini")):
        name = prof.stem
        page = OUT / (name + ".html")
        p = subprocess.run([LW, "report", str(prof), "-o", str(page), "--samples", "2000"],
                           capture_output=True, text=True, env=env, timeout=300)
        if not check(p.returncode == 0, "%s: report exit %d: %s" % (name, p.returncode, p.stderr)):
            continue
        text = page.read_text(encoding="utf-8")
        check("2026-01-01" in text, "%s: the date of SOURCE_DATE_EPOCH is not shown" % name)
        ncharts = static_checks(name, text)
        check(re.search(r"<li>profile: .*</li>\n<li>cell file: ", text) is not None,
              "%s: the provenance lacks the profile or the cell file" % name)
        check("<tr><td>pack</td><td>cell</td>" in text and "<td>line " in text,
              "%s: the inputs are not echoed with their lines" % name)
        url = page.resolve().as_uri()

        d = chromium(["--dump-dom", url], tmp)
        if check(d.returncode == 0 and "</html>" in d.stdout, "%s: --dump-dom failed: %s" %
              (name, d.stderr[-300:])):
            dom = Dom()
            dom.feed(d.stdout)
            check(dom.sections == SECTIONS, "%s: sections %s" % (name, dom.sections))
            check(dom.headed == set(SECTIONS), "%s: sections without a heading: %s" %
               (name, set(SECTIONS) - dom.headed))
            # inputs, specification, energy, corners and the spread's summary
            # at least (htmlreport.c)
            check(len(dom.tables) >= 5, "%s: %d tables" % (name, len(dom.tables)))
            for k, t in enumerate(dom.tables):
                check(t["thead"] and t["th"] > 0, "%s: table %d has no header" % (name, k))
            check(dom.svgs == ncharts, "%s: the browser built %d charts of %d" %
               (name, dom.svgs, ncharts))

        pdf = OUT / (name + ".pdf")
        r = chromium(["--no-pdf-header-footer", "--print-to-pdf=" + str(pdf), url], tmp)
        if check(r.returncode == 0 and pdf.exists(), "%s: --print-to-pdf failed" % name):
            info = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True)
            m = re.search(r"^Pages:\s+(\d+)", info.stdout, re.M)
            pages = int(m.group(1)) if m else 0
            check(pages >= len(SECTIONS), "%s: %d pages for %d sections" % (name, pages,
                                                                      len(SECTIONS)))
            body = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True,
                                  text=True).stdout
            check("Runtime table:" in body, "%s: the PDF lacks the specification table" % name)
            check("Caution" in body and "qualified people" in body,
               "%s: the PDF lacks the caution" % name)
            m = re.search(r"<caption>Runtime table:.*?<tbody>\n<tr><td>([^<]*)</td>", text, re.S)
            check(m is not None and m.group(1) in body,
               "%s: the PDF lacks the table's first row (%s)" % (name, m and m.group(1)))

        shot = OUT / (name + ".png")
        s = chromium(["--screenshot=" + str(shot), "--window-size=1200,2400", url], tmp)
        # a page of text and charts; a blank screenshot of this size is a
        # few kilobytes (a judgement, no source)
        check(s.returncode == 0 and shot.exists() and shot.stat().st_size > 10000,
           "%s: --screenshot failed" % name)

finish("; pages and screenshots in %s" % OUT)

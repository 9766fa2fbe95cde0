#!/usr/bin/env python3
"""visual_check.py - the charts as a browser draws them, against references.

Usage: visual_check.py LAMPWICK SOURCE_ROOT OUT_DIR [--update] [CHROMIUM]

Writes every kind of chart of the bundled profiles (the run chart and the
modes chart of each, and for the demo the sweep trade-off chart, the spread
histogram and ranking, and the LED fit chart), renders each SVG with
headless Chromium at its own size and compares the PNG with
tests/visual/NAME.png: the same size, and at most 0.05 % of the pixels
differing by more than 40 of 255 in any channel (room for anti-aliasing,
none for a moved label, axis or curve: a 12-pixel label
moved is some 500 pixels).  A failure leaves OUT_DIR/NAME.png
and OUT_DIR/NAME.diff.png to look at.

--update writes the renders into tests/visual/ instead: do it deliberately,
look at every changed PNG, and commit them with the change that moved them.
The comparison is itself checked: a render with a 20 x 20 block painted in
must fail it (400 pixels).
"""
import os
import pathlib
import re
import shutil
import subprocess
import sys
import tempfile

from PIL import Image, ImageChops, ImageDraw

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
from checklib import count, fail, finish  # noqa: E402

args = [a for a in sys.argv[1:] if a != "--update"]
UPDATE = "--update" in sys.argv
LW, ROOT, OUT = args[0], pathlib.Path(args[1]), pathlib.Path(args[2])
CHROMIUM = args[3] if len(args) > 3 else shutil.which("chromium") or "chromium"
REF = ROOT / "tests" / "visual"
# a judgement, no source: anti-aliasing between runs of one browser moves a
# few pixels by little; a moved label or line moves hundreds by much
TOL_DIFF, TOL_SHARE = 40, 0.0005



def charts(out):
    """(name, command) for every chart; each command writes out/NAME.svg."""
    demo = str(ROOT / "profiles" / "demo.ini")
    jobs = []
    for p in sorted((ROOT / "profiles").glob("*.ini")):
        jobs.append((p.stem + "-run", ["run", str(p), "--plot", str(out / (p.stem + "-run.svg"))]))
        jobs.append((p.stem + "-modes", ["table", str(p), "--plot",
                                         str(out / (p.stem + "-modes.svg"))]))
    jobs.append(("demo-sweep", ["sweep", demo, "--vary", "pack.ambient_c=-10,20",
                                "--vary", "drive.resistor_ohm=22,33,47", "--plot",
                                str(out / "demo-sweep.svg")]))
    jobs.append(("demo-histogram", ["spread", demo, "--samples", "2000", "--histogram",
                                    str(out / "demo-histogram.svg")]))
    jobs.append(("demo-ranking", ["spread", demo, "--samples", "2000", "--ranking",
                                  str(out / "demo-ranking.svg")]))
    jobs.append(("led-fit", ["fit", "led", str(ROOT / "docs" / "examples" / "white-led-bench.csv"),
                             "--plot", str(out / "led-fit.svg")]))
    return jobs


def render(svg, png, tmp):
    head = svg.read_text(encoding="utf-8")[:400]
    w = re.search(r"""width=['"]([0-9.]+)""", head)
    h = re.search(r"""height=['"]([0-9.]+)""", head)
    size = "%d,%d" % (round(float(w.group(1))), round(float(h.group(1))))
    r = subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu",
                        "--no-first-run", "--hide-scrollbars", "--force-device-scale-factor=1",
                        "--user-data-dir=" + tmp, "--screenshot=" + str(png),
                        "--window-size=" + size, svg.resolve().as_uri()],
                       capture_output=True, text=True, timeout=60)
    return r.returncode == 0 and png.exists()


def differs(a, b):
    """None when a and b match within the tolerance, else why not."""
    if a.size != b.size:
        return "size %s, reference %s" % (a.size, b.size)
    d = ImageChops.difference(a.convert("RGB"), b.convert("RGB"))
    worst = d.convert("L").point(lambda v: 255 if v > TOL_DIFF else 0)
    # a channel may differ more than the grey mean shows: take the largest
    chans = [c.point(lambda v: 255 if v > TOL_DIFF else 0) for c in d.split()]
    mask = ImageChops.lighter(ImageChops.lighter(chans[0], chans[1]), chans[2])
    mask = ImageChops.lighter(mask, worst)
    n = sum(1 for v in mask.getdata() if v)
    share = n / float(a.size[0] * a.size[1])
    if share > TOL_SHARE:
        return "%.2f %% of the pixels differ (at most %.2f %%)" % (100 * share, 100 * TOL_SHARE)
    return None


OUT.mkdir(parents=True, exist_ok=True)
env = dict(os.environ, SOURCE_DATE_EPOCH="1767225600")
with tempfile.TemporaryDirectory() as tmp:
    first = None
    for name, cmd in charts(OUT):
        p = subprocess.run([LW] + cmd, capture_output=True, text=True, env=env, timeout=300)
        svg, png = OUT / (name + ".svg"), OUT / (name + ".png")
        count()
        if p.returncode != 0 or not svg.exists():
            fail("%s: lampwick %s: exit %d %s" % (name, " ".join(cmd[:2]), p.returncode,
                                                  p.stderr.strip()))
            continue
        if not render(svg, png, tmp):
            fail("%s: the browser did not render it" % name)
            continue
        img = Image.open(png)
        first = first or img
        ref = REF / (name + ".png")
        if UPDATE:
            REF.mkdir(exist_ok=True)
            shutil.copyfile(png, ref)
            continue
        if not ref.exists():
            fail("%s: no reference %s (run with --update, look, commit)" % (name, ref))
            continue
        why = differs(img, Image.open(ref))
        if why:
            fail("%s: %s; see %s" % (name, why, png))
            if img.size == Image.open(ref).size:
                ImageChops.difference(img.convert("RGB"),
                                      Image.open(ref).convert("RGB")).save(
                    OUT / (name + ".diff.png"))
    # the comparison can fail: a block painted into a render
    if first is not None and not UPDATE:
        count()
        bad = first.convert("RGB").copy()
        ImageDraw.Draw(bad).rectangle([200, 200, 219, 219], fill=(0, 0, 0))
        if differs(bad, first) is None:
            fail("the comparison takes a render with a 20 x 20 block painted in")

finish("; references updated" if UPDATE else "")

#!/usr/bin/env python3
# svgcheck.py FILE [MIN] - an independent check of a chart written by lampwick:
# the file parses as XML 1.0 (Python's xml.dom.minidom over expat), its root
# is <svg> in the SVG namespace with a width, height and viewBox, and every
# data mark (polyline vertex, circle centre) inside a plot area (a nested
# <svg x y width height>) lies within that area, and there are at least MIN
# such marks (default 0), and no two point labels in an area overlap.
# Exit 0 when all hold,
# else print what failed and exit 1.
import sys
import xml.dom.minidom as minidom

def fail(msg):
    print(f"{sys.argv[1]}: {msg}")
    sys.exit(1)

doc = minidom.parse(sys.argv[1])
root = doc.documentElement
if root.tagName != "svg" or root.getAttribute("xmlns") != "http://www.w3.org/2000/svg":
    fail("the root is not an SVG element in the SVG namespace")
for a in ("width", "height", "viewBox"):
    if not root.getAttribute(a):
        fail(f"the root has no {a}")
marks = 0
for area in root.getElementsByTagName("svg"):
    x, y = float(area.getAttribute("x")), float(area.getAttribute("y"))
    w, h = float(area.getAttribute("width")), float(area.getAttribute("height"))
    def inside(px, py):
        return x - 0.51 <= px <= x + w + 0.51 and y - 0.51 <= py <= y + h + 0.51
    for pl in area.getElementsByTagName("polyline"):
        for pair in pl.getAttribute("points").split():
            px, py = (float(v) for v in pair.split(","))
            marks += 1
            if not inside(px, py):
                fail(f"polyline vertex {pair} outside the plot area {x},{y} {w}x{h}")
    for c in area.getElementsByTagName("circle"):
        px, py = float(c.getAttribute("cx")), float(c.getAttribute("cy"))
        marks += 1
        if not inside(px, py):
            fail(f"marker at {px},{py} outside the plot area {x},{y} {w}x{h}")
    # point labels inside the area: none over another (boxes at 6 px a
    # character and 12 px tall, the writer's own estimate of 10-px text)
    boxes = []
    for t in area.getElementsByTagName("text"):
        if t.getAttribute("class") != "pt" or not t.firstChild:
            continue
        tx, ty = float(t.getAttribute("x")), float(t.getAttribute("y"))
        text = t.firstChild.data
        box = (tx, ty - 10, tx + 6 * len(text), ty + 2)
        for o in boxes:
            if box[0] < o[0][2] - 0.5 and box[2] > o[0][0] + 0.5 and box[1] < o[0][3] - 0.5 and box[3] > o[0][1] + 0.5:
                fail(f"point labels '{text}' and '{o[1]}' overlap")
        boxes.append((box, text))
if len(sys.argv) > 2 and marks < int(sys.argv[2]):
    fail(f"{marks} data marks, expected at least {sys.argv[2]}")

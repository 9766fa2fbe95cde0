#!/usr/bin/env python3
"""run_light.py - run a light from Python through liblampwick's JSON call.

Usage: run_light.py PROFILE [--mode NAME] [--set SECTION.KEY=VALUE ...]
                    [--lib PATH/liblampwick.so] [--json]

One C call, lw_api_run_json (api.h), takes the profile's path, a mode and
overrides as strings and returns the JSON document of `lampwick run
--format json` (docs/json.md); nothing here depends on the layout of a C
structure.  Cells are looked up as lampwick looks them up: the profile's
folder, $LAMPWICK_CELLS, ~/.local/share/lampwick/cells, the installed cells.

Prints the runtime, the output and the corners, or with --json the whole
document.  Exits 1 when the run gives no answer and 2 on bad input, as the
command line does.
"""
import argparse
import ctypes
import ctypes.util
import json
import sys


def load_library(path=None):
    """liblampwick from PATH, or wherever the system's loader finds it."""
    name = path or ctypes.util.find_library("lampwick")
    if not name:
        sys.exit("run_light.py: liblampwick not found; give --lib PATH/liblampwick.so")
    lib = ctypes.CDLL(name)
    # the text is returned as a raw pointer, so that lw_api_free can free it
    lib.lw_api_run_json.restype = ctypes.c_void_p
    lib.lw_api_run_json.argtypes = [ctypes.c_char_p, ctypes.c_char_p,
                                    ctypes.POINTER(ctypes.c_char_p), ctypes.c_size_t]
    lib.lw_api_free.restype = None
    lib.lw_api_free.argtypes = [ctypes.c_void_p]
    return lib


def run_json(lib, profile, mode=None, sets=()):
    """The document of one run, as a Python dict."""
    arr = (ctypes.c_char_p * max(1, len(sets)))(*[s.encode() for s in sets])
    ptr = lib.lw_api_run_json(profile.encode(), mode.encode() if mode else None, arr,
                              len(sets))
    if not ptr:
        raise MemoryError("lw_api_run_json: out of memory")
    try:
        return json.loads(ctypes.string_at(ptr).decode("utf-8"))
    finally:
        lib.lw_api_free(ptr)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("profile")
    ap.add_argument("--mode")
    ap.add_argument("--set", action="append", default=[], dest="sets")
    ap.add_argument("--lib")
    ap.add_argument("--json", action="store_true")
    a = ap.parse_args()
    doc = run_json(load_library(a.lib), a.profile, a.mode, a.sets)
    if a.json:
        json.dump(doc, sys.stdout, indent=1)
        print()
    if "error" in doc:
        e = doc["error"]
        where = e["file"] + (":%d" % e["line"] if e["line"] else "")
        print("run_light.py: %s%s" % (where + ": " if where else "", e["message"]),
              file=sys.stderr)
        return e["status"]
    if a.json:
        return 0
    run = doc["tables"][0]["rows"][0]
    print("%s: %.2f h to cutoff (%s), %.1f lm at 30 s" %
          (doc["input"], run["runtime_h"], run["end_reason"], run["flux_30s_lm"]))
    for t in doc["tables"][1:]:
        for r in t["rows"]:
            hours = "%.2f h" % r["runtime_h"] if r["runtime_h"] is not None else "-"
            print("  %-10s %6.1f C  %8.2f mA  %8.1f lm  %s" %
                  (r["corner"], r["ambient_c"], r["led_ma"], r["flux_lm"], hours))
    print(doc["caution"])
    return 0


if __name__ == "__main__":
    sys.exit(main())
